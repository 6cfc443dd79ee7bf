"""Look of the views: a colour-blind-safe palette, flag symbols and words, number formats.

Nothing here computes physics.  The formats convert SI values to the units the
trade reads (mL/min, mL/h, mmHg, cmH2O, mPa s) with the constants of
:mod:`rheoline.units`, and always print the unit beside the number.

The palette is our own choice, checked in ``tests/test_widgets.py`` to keep every
pair of series colours apart (CIE76 colour difference of at least 15) under
simulated protanopia, deuteranopia and tritanopia (Machado, Oliveira and
Fernandes 2009).  Series also differ by dash and marker, and every flag is a
symbol plus words, so colour is never the only cue.

Examples
--------
>>> format_flow(2.5e-6)
'150 mL/min (9,000 mL/h)'
>>> format_pressure(39996.6)
'300 mmHg'
>>> flag_text("caution", "turbulent in part 2")
'[!] caution: turbulent in part 2'
>>> user_text('<a href="x">18G</a> & co')
'&lt;a href=&#34;x&#34;&gt;18G&lt;/a&gt; &amp; co'
"""

from __future__ import annotations

from rheoline.units import CMH2O, ML_PER_H, ML_PER_MIN, MMHG, significant

__all__ = [
    "PALETTE",
    "DASHES",
    "MARKERS",
    "BAND_OPACITY",
    "series_style",
    "FLAG_LEVELS",
    "user_text",
    "flag_text",
    "flag_html",
    "significant",
    "format_flow",
    "format_pressure",
    "format_stress",
    "format_viscosity",
    "format_number",
]

#: Series colours, in order of use: ink blue, amber, sky, plum, pine, straw, charcoal.
PALETTE = ("#1f4e9c", "#e08a00", "#5ab4e5", "#a8327a", "#138a63", "#f2d53c", "#2b2b2b")
#: Plotly dash styles, one per series, so series differ without colour.
DASHES = ("solid", "dash", "dot", "dashdot", "longdash", "longdashdot", "solid")
#: Plotly marker symbols, one per series.
MARKERS = ("circle", "square", "diamond", "triangle-up", "x", "star", "cross")
#: Opacity of a shaded tolerance band.
BAND_OPACITY = 0.22

#: flag level -> (symbol, word, text colour).  The symbol and word carry the meaning;
#: the colour only repeats it.
FLAG_LEVELS = {
    "ok": ("[ok]", "ok", "#138a63"),
    "note": ("[i]", "note", "#1f4e9c"),
    "caution": ("[!]", "caution", "#8a5a00"),
    "exceeded": ("[X]", "limit exceeded", "#a8327a"),
    "error": ("[X]", "not computed", "#a8327a"),
    "failed": ("[X]", "failed", "#a8327a"),
}


def series_style(index: int) -> dict:
    """Colour, dash and marker of the ``index``-th series (cycling)."""
    n = len(PALETTE)
    return {"color": PALETTE[index % n], "dash": DASHES[index % n], "marker": MARKERS[index % n]}


def user_text(text) -> str:
    """A user's string (a name, a label, a path, a message quoting them) made safe for an
    HTML widget or a plotly chart.

    Plotly reads a subset of HTML in chart titles, legends, hover labels and axis labels
    (a part labelled ``<a href=...>`` became a live link inside a chart), and HTML widgets
    read all of it.  Every user string on its way to either goes through here: ``&``,
    ``<``, ``>`` and both quotes become entities, which HTML and plotly both show as the
    characters (numeric entities for the quotes: plotly decodes those, not ``&quot;``).
    """
    return (
        str(text)
        .replace("&", "&amp;")
        .replace("<", "&lt;")
        .replace(">", "&gt;")
        .replace('"', "&#34;")
        .replace("'", "&#39;")
    )


def flag_text(level: str, message: str) -> str:
    """A flag as plain text: symbol, word, message."""
    symbol, word, _ = FLAG_LEVELS[level]
    return f"{symbol} {word}: {message}"


def flag_html(level: str, message: str) -> str:
    """A flag as an HTML line (the message is escaped)."""
    symbol, word, colour = FLAG_LEVELS[level]
    return (
        f"<div class='rl-flag rl-flag-{level}' style='color:{colour}'>"
        f"<b>{user_text(symbol)} {user_text(word)}</b>: {user_text(message)}</div>"
    )


def format_number(value: float, unit: str, digits: int = 3) -> str:
    """A number with its unit, e.g. ``'1.2 Pa'``."""
    return f"{significant(value, digits)} {unit}"


def format_flow(flow_si: float, digits: int = 3) -> str:
    """A flow [m^3/s] in mL/min and mL/h."""
    return (
        f"{significant(flow_si / ML_PER_MIN, digits)} mL/min "
        f"({significant(flow_si / ML_PER_H, digits)} mL/h)"
    )


def format_pressure(pressure_si: float, unit: str = "mmHg", digits: int = 3) -> str:
    """A pressure [Pa] in mmHg (default), cmH2O or kPa."""
    factor = {"mmHg": MMHG, "cmH2O": CMH2O, "kPa": 1e3, "Pa": 1.0}[unit]
    return format_number(pressure_si / factor, unit, digits)


def format_stress(stress_si: float, digits: int = 3) -> str:
    """A shear stress [Pa] in Pa."""
    return format_number(stress_si, "Pa", digits)


def format_viscosity(viscosity_si: float, digits: int = 3) -> str:
    """A viscosity [Pa s] in mPa s."""
    return format_number(viscosity_si * 1e3, "mPa s", digits)
