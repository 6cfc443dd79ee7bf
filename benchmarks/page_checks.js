// What is clipped or cut on the app's visible tab: one record per problem.
// - "overflow": an element whose box leaves its parent's box sideways (more than 1 px), where
//   the parent does not scroll;
// - "cut": an element whose own text is wider than its box while it hides the rest
//   (overflow hidden or clip, or text-overflow ellipsis).
// Used by tests/test_browser_layout.py and docs/screenshots.py.
() => {
  const root = document.querySelector('.rl-app');
  const problems = [];
  const scrolls = v => v === 'auto' || v === 'scroll';
  const name = e => (e.className && typeof e.className === 'string' ? '.' +
    e.className.trim().split(/\s+/).filter(c => c.startsWith('rl-') || c.startsWith('widget-'))
      .slice(0, 3).join('.') : '') || e.tagName.toLowerCase();
  const visible = e => {
    const r = e.getBoundingClientRect();
    if (r.width === 0 || r.height === 0) return false;
    const s = getComputedStyle(e);
    return s.visibility !== 'hidden' && s.display !== 'none';
  };
  for (const e of root.querySelectorAll('*')) {
    if (!visible(e) || e.closest('.js-plotly-plot .modebar-container')) continue;
    if (e instanceof SVGElement && !(e.tagName === 'svg' && e.classList.contains('main-svg'))) continue;
    const s = getComputedStyle(e);
    const text = (e.innerText || e.textContent || '').trim().slice(0, 60);
    const hides = s.overflowX === 'hidden' || s.overflowX === 'clip' || s.textOverflow === 'ellipsis';
    if (hides && e.scrollWidth > e.clientWidth + 1 && text && !(e instanceof SVGElement)) {
      problems.push({kind: 'cut', element: name(e), text, width: e.clientWidth, needs: e.scrollWidth});
    }
    const p = e.parentElement;
    if (!p || !root.contains(p) || !visible(p)) continue;
    const ps = getComputedStyle(p);
    if (scrolls(ps.overflowX)) continue;
    const r = e.getBoundingClientRect(), pr = p.getBoundingClientRect();
    if (r.right > pr.right + 1 || r.left < pr.left - 1) {
      problems.push({kind: 'overflow', element: name(e), parent: name(p), text,
        right: Math.round(r.right), parent_right: Math.round(pr.right)});
    }
  }
  const page = document.documentElement;
  if (page.scrollWidth > page.clientWidth + 1) {
    problems.push({kind: 'overflow', element: 'page', parent: 'window', text: '',
      right: page.scrollWidth, parent_right: page.clientWidth});
  }
  return problems;
}
