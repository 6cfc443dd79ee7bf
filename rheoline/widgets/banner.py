"""The caution banner: always shown at the top of every view, with no way to close it.

The banner states :data:`rheoline.CAUTION`; its words "CAUTIONS.md" are a link.
Below the statement a native ``<details>`` element holds the whole of CAUTIONS.md
(read from the repository), so the cautions are one click away in a notebook, in
the Voila page and offline alike.  Under Voila (the kernel has ``VOILA_BASE_URL``)
the link jumps to that text on the page; in a notebook it is the relative path to
the repository's CAUTIONS.md, which Jupyter opens.  The statement itself is never
hidden: only the long text folds.

Examples
--------
>>> banner = caution_banner(href="CAUTIONS.md")
>>> "not for clinical decisions" in banner.value and "href='CAUTIONS.md'" in banner.value
True
"""

from __future__ import annotations

import functools
import html
import itertools
import os
from pathlib import Path

import ipywidgets as widgets

import rheoline

__all__ = ["caution_banner", "cautions_href", "cautions_html", "BANNER_CLASS"]

#: CSS class of the banner (the browser test looks for it).
BANNER_CLASS = "rl-caution-banner"

_REPO_CAUTIONS = Path(__file__).resolve().parents[2] / "CAUTIONS.md"
_IDS = itertools.count(1)


def cautions_href(anchor: str = "rl-cautions") -> str:
    """Where the link points: the on-page text under Voila, else a relative path."""
    if os.environ.get("VOILA_BASE_URL") is not None:
        return f"#{anchor}"
    try:
        return os.path.relpath(_REPO_CAUTIONS, Path.cwd()).replace(os.sep, "/")
    except ValueError:  # another drive on Windows
        return _REPO_CAUTIONS.as_uri()


@functools.lru_cache(maxsize=1)
def cautions_html() -> str:
    """CAUTIONS.md as HTML (mistune when present, else preformatted text); escaped input."""
    try:
        text = _REPO_CAUTIONS.read_text(encoding="utf-8")
    except OSError:
        return f"<p>{html.escape(rheoline.CAUTION)}</p>"
    try:
        import mistune

        return mistune.create_markdown(escape=True)(text)
    except ImportError:  # pragma: no cover - mistune comes with nbconvert
        return f"<pre style='white-space:pre-wrap'>{html.escape(text)}</pre>"


def caution_banner(href: str | None = None) -> widgets.HTML:
    """The non-dismissable caution banner as an ipywidgets HTML widget.

    Parameters
    ----------
    href : str, optional
        Link target of "CAUTIONS.md"; default :func:`cautions_href`.

    Returns
    -------
    ipywidgets.HTML
        With the CSS class :data:`BANNER_CLASS`.
    """
    anchor = f"rl-cautions-{next(_IDS)}"
    target = html.escape(href if href is not None else cautions_href(anchor), quote=True)
    text = html.escape(rheoline.CAUTION)
    link = f"<a href='{target}' target='_self' class='rl-cautions-link'>CAUTIONS.md</a>"
    text = text.replace("CAUTIONS.md", link)
    value = (
        "<div role='note' aria-label='caution' style='border:2px solid #2b2b2b;"
        "background:#fff4d6;color:#1a1a1a;padding:6px 10px;margin:0 0 6px 0;"
        "font-size:14px;line-height:1.35'>"
        f"<b>[!] CAUTION</b> &mdash; {text}"
        f"<details id='{anchor}' class='rl-cautions-text' style='margin-top:4px'>"
        "<summary>Read CAUTIONS.md here</summary>"
        f"<div style='max-height:320px;overflow:auto'>{cautions_html()}</div></details></div>"
    )
    banner = widgets.HTML(value=value, layout=widgets.Layout(width="auto"))
    banner.add_class(BANNER_CLASS)
    return banner
