"""Predicted-against-measured plots as small standalone SVG (no plotting library needed).

Log-log axes, the line of perfect agreement and bands of +/-15 % and +/-35 %; one
colour per series; recalled rows drawn hollow.
"""

from __future__ import annotations

import math
from html import escape

__all__ = ["scatter_svg"]

_COLOURS = ("#1f77b4", "#d62728", "#2ca02c", "#9467bd", "#ff7f0e", "#8c564b", "#17becf")
_W, _H, _PAD = 520, 420, 60


def _ticks(lo: float, hi: float):
    out = []
    for e in range(math.floor(math.log10(lo)), math.ceil(math.log10(hi)) + 1):
        for m in (1, 2, 5):
            v = m * 10.0**e
            if lo <= v <= hi:
                out.append(v)
    return out


def _fmt(v: float) -> str:
    return f"{v:g}"


def scatter_svg(title: str, unit: str, series: dict, caution: str) -> str:
    """An SVG document: ``series`` maps a label to ``[(measured, predicted, hollow), ...]``.

    Examples
    --------
    >>> svg = scatter_svg("t", "mPa s", {"a": [(1.0, 1.1, False), (2.0, 1.9, True)]}, "c")
    >>> svg.startswith("<svg") and svg.count("<circle") == 3   # two points, one legend mark
    True
    """
    values = [v for pts in series.values() for m, p, _ in pts for v in (m, p) if v > 0]
    lo, hi = (min(values) / 1.3, max(values) * 1.3) if values else (0.1, 10.0)
    span = math.log10(hi) - math.log10(lo)

    def x(v):
        return _PAD + (math.log10(v) - math.log10(lo)) / span * (_W - 1.5 * _PAD)

    def y(v):
        return _H - _PAD - (math.log10(v) - math.log10(lo)) / span * (_H - 1.6 * _PAD)

    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{_W}" height="{_H + 40}" '
        f'font-family="sans-serif" font-size="11">',
        f'<text x="{_W / 2}" y="16" text-anchor="middle" font-size="13">{escape(title)}</text>',
    ]
    for v in _ticks(lo, hi):
        parts.append(
            f'<line x1="{x(v):.1f}" y1="{y(lo):.1f}" x2="{x(v):.1f}" y2="{y(hi):.1f}" stroke="#eee"/>'
            f'<line x1="{x(lo):.1f}" y1="{y(v):.1f}" x2="{x(hi):.1f}" y2="{y(v):.1f}" stroke="#eee"/>'
            f'<text x="{x(v):.1f}" y="{y(lo) + 14:.1f}" text-anchor="middle">{_fmt(v)}</text>'
            f'<text x="{x(lo) - 4:.1f}" y="{y(v) + 4:.1f}" text-anchor="end">{_fmt(v)}</text>'
        )
    for factor, dash in (
        (1.0, ""),
        (1.15, "4,3"),
        (1 / 1.15, "4,3"),
        (1.35, "1,3"),
        (1 / 1.35, "1,3"),
    ):
        a, b = max(lo, lo / factor), min(hi, hi / factor)  # the line y = factor x inside the box
        parts.append(
            f'<line x1="{x(a):.1f}" y1="{y(a * factor):.1f}" x2="{x(b):.1f}" '
            f'y2="{y(b * factor):.1f}" stroke="#888" stroke-dasharray="{dash}"/>'
        )
    for i, (label, pts) in enumerate(series.items()):
        colour = _COLOURS[i % len(_COLOURS)]
        for m, p, hollow in pts:
            if m > 0 and p > 0:
                fill = "none" if hollow else colour
                parts.append(
                    f'<circle cx="{x(m):.1f}" cy="{y(p):.1f}" r="3.5" stroke="{colour}" fill="{fill}"/>'
                )
        ly = 34 + 14 * i
        parts.append(
            f'<circle cx="{_PAD + 8}" cy="{ly - 4}" r="3.5" fill="{colour}"/>'
            f'<text x="{_PAD + 16}" y="{ly}">{escape(label)}</text>'
        )
    parts += [
        f'<text x="{_W / 2}" y="{_H - 22}" text-anchor="middle">measured [{escape(unit)}]</text>',
        f'<text x="14" y="{_H / 2}" text-anchor="middle" transform="rotate(-90 14 {_H / 2})">'
        f"predicted [{escape(unit)}]</text>",
        f'<text x="{_W / 2}" y="{_H - 6}" text-anchor="middle" fill="#555">solid: agreement; '
        "dashed: +/-15 %; dotted: +/-35 %; hollow: recalled (not counted)</text>",
        f'<text x="{_W / 2}" y="{_H + 14}" text-anchor="middle" font-size="9" fill="#a00">'
        f"{escape(caution[:120])}</text>",
        f'<text x="{_W / 2}" y="{_H + 26}" text-anchor="middle" font-size="9" fill="#a00">'
        f"{escape(caution[120:240])}</text>",
        "</svg>",
    ]
    return "\n".join(parts)
