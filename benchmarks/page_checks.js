// What is clipped or cut on the app's visible tab: one record per problem.
// - "overflow": an element whose box leaves its parent's box sideways (more than 1 px), where
//   the parent does not scroll;
// - "cut": an element whose own text is wider than its box while it hides the rest
//   (overflow hidden or clip, or text-overflow ellipsis);
// - "cut" also: a drop-down whose chosen option, or a text or number box whose value, is
//   wider than the box shows (measured in the box's own font);
// - "overlap": two texts of one chart drawn over each other (more than 2 px each way);
// - "crossed": a chart label's leader line drawn through another label's box;
// - "scroll": an element that scrolls sideways because what it holds is wider than it (a
//   box the user must scroll to see its right edge hides that edge as surely as a clip).
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
  const ruler = document.createElement('canvas').getContext('2d');
  const textWidth = (e, text) => {
    const s = getComputedStyle(e);
    ruler.font = `${s.fontStyle} ${s.fontWeight} ${s.fontSize} ${s.fontFamily}`;
    return ruler.measureText(text).width;
  };
  const shown = e => e.tagName === 'SELECT' ? (e.selectedOptions[0] || {}).text || ''
    : (e.tagName === 'INPUT' && /^(text|number|)$/.test(e.type) ? e.value : null);
  for (const e of root.querySelectorAll('*')) {
    if (!visible(e) || e.closest('.js-plotly-plot .modebar-container')) continue;
    if (e instanceof SVGElement && !(e.tagName === 'svg' && e.classList.contains('main-svg'))) continue;
    const s = getComputedStyle(e);
    const text = (e.innerText || e.textContent || '').trim().slice(0, 60);
    const hides = s.overflowX === 'hidden' || s.overflowX === 'clip' || s.textOverflow === 'ellipsis';
    if (hides && e.scrollWidth > e.clientWidth + 1 && text && !(e instanceof SVGElement)) {
      problems.push({kind: 'cut', element: name(e), text, width: e.clientWidth, needs: e.scrollWidth});
    }
    if (scrolls(s.overflowX) && e.scrollWidth > e.clientWidth + 1 && !(e instanceof SVGElement)) {
      problems.push({kind: 'scroll', element: name(e), text, width: e.clientWidth, needs: e.scrollWidth});
    }
    const value = shown(e);
    if (value) {
      const s = getComputedStyle(e);
      // the room inside the box: its width less padding, and a drop-down's arrow (20 px)
      const room = e.clientWidth - parseFloat(s.paddingLeft) - parseFloat(s.paddingRight)
        - (e.tagName === 'SELECT' ? 20 : 0);
      if (textWidth(e, value) > room + 1) {
        problems.push({kind: 'cut', element: name(e), text: value.slice(0, 60), width: Math.round(room),
          needs: Math.ceil(textWidth(e, value))});
      }
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
  for (const plot of root.querySelectorAll('.js-plotly-plot')) {
    if (!visible(plot)) continue;
    const texts = [...plot.querySelectorAll('text')]
      .map(t => ({text: (t.textContent || '').trim().slice(0, 60), r: t.getBoundingClientRect()}))
      .filter(t => t.text && t.r.width > 0);
    texts.forEach((a, i) => texts.slice(i + 1).forEach(b => {
      const w = Math.min(a.r.right, b.r.right) - Math.max(a.r.left, b.r.left);
      const h = Math.min(a.r.bottom, b.r.bottom) - Math.max(a.r.top, b.r.top);
      if (w > 2 && h > 2) {
        problems.push({kind: 'overlap', element: 'chart text', text: a.text, other: b.text,
          width: Math.round(w), height: Math.round(h)});
      }
    }));
  }
  for (const plot of root.querySelectorAll('.js-plotly-plot')) {
    if (!visible(plot)) continue;
    const notes = [...plot.querySelectorAll('g.annotation')].map(g => ({
      text: (g.textContent || '').trim().slice(0, 60),
      box: (g.querySelector('.annotation-text-g rect') || g).getBoundingClientRect(),
      leader: g.querySelector('.annotation-arrow-g path'),
    }));
    for (const a of notes) {
      // a label's leader (an arrow without text is an edge's arrowhead, part of a drawing)
      if (!a.text || !a.leader || !a.leader.getTotalLength) continue;
      const length = a.leader.getTotalLength(), m = a.leader.getScreenCTM();
      const crossed = new Set();
      for (let k = 0; k <= 40; k++) {  // points along the leader, in the page's pixels
        const p = a.leader.getPointAtLength(length * k / 40);
        const x = m.a * p.x + m.c * p.y + m.e, y = m.b * p.x + m.d * p.y + m.f;
        for (const b of notes) {
          if (b !== a && x > b.box.left + 1 && x < b.box.right - 1 && y > b.box.top + 1
              && y < b.box.bottom - 1) crossed.add(b.text);
        }
      }
      for (const other of crossed) {
        problems.push({kind: 'crossed', element: 'chart leader', text: a.text, other});
      }
    }
  }
  const page = document.documentElement;
  if (page.scrollWidth > page.clientWidth + 1) {
    problems.push({kind: 'overflow', element: 'page', parent: 'window', text: '',
      right: page.scrollWidth, parent_right: page.clientWidth});
  }
  return problems;
}
