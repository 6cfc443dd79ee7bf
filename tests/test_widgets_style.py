"""The widget layer's look: series colours that stay apart under colour-vision deficiency,
dash and marker as well as colour, flags in words and symbols, one number format with units,
and the caution banner."""

from __future__ import annotations

import itertools

import numpy as np
import pytest

import rheoline
from rheoline.units import ML_PER_MIN, MMHG
from rheoline.widgets import style
from rheoline.widgets.banner import BANNER_CLASS, caution_banner

# --- palette: distinguishable under colour-vision deficiency ------------------------------
# Machado, G.M., Oliveira, M.M., Fernandes, L.A.F., "A physiologically-based model for
# simulation of color vision deficiency", IEEE TVCG 15(6), 2009: severity-1.0 matrices on
# linear RGB.  # from memory
MACHADO_2009 = {
    "protanopia": [
        [0.152286, 1.052583, -0.204868],
        [0.114503, 0.786281, 0.099216],
        [-0.003882, -0.048116, 1.051998],
    ],
    "deuteranopia": [
        [0.367322, 0.860646, -0.227968],
        [0.280085, 0.672501, 0.047413],
        [-0.011820, 0.042940, 0.968881],
    ],
    "tritanopia": [
        [1.255528, -0.076749, -0.178779],
        [-0.078411, 0.930809, 0.147602],
        [0.004733, 0.691367, 0.303900],
    ],
    "normal vision": np.eye(3),
}


def _linear_rgb(hex_colour):
    c = np.array([int(hex_colour[i : i + 2], 16) for i in (1, 3, 5)]) / 255.0
    # IEC 61966-2-1 (sRGB) transfer function
    return np.where(c <= 0.04045, c / 12.92, ((c + 0.055) / 1.055) ** 2.4)


def _cie_lab(linear):
    # sRGB (D65) to XYZ, IEC 61966-2-1; XYZ to CIELAB, CIE 15:2004
    xyz = np.array(
        [[0.4124, 0.3576, 0.1805], [0.2126, 0.7152, 0.0722], [0.0193, 0.1192, 0.9505]]
    ) @ np.clip(linear, 0, 1)
    t = xyz / np.array([0.95047, 1.0, 1.08883])
    f = np.where(t > (6 / 29) ** 3, np.cbrt(t), t / (3 * (6 / 29) ** 2) + 4 / 29)
    return np.array([116 * f[1] - 16, 500 * (f[0] - f[1]), 200 * (f[1] - f[2])])


@pytest.mark.parametrize("vision", sorted(MACHADO_2009))
def test_palette_colours_stay_apart_under_simulated_colour_vision_deficiency(vision):
    matrix = np.asarray(MACHADO_2009[vision])
    labs = [_cie_lab(matrix @ _linear_rgb(c)) for c in style.PALETTE]
    closest = min(np.linalg.norm(a - b) for a, b in itertools.combinations(labs, 2))
    # CIE76 delta E of 15: clearly different side by side  # common practice, no source
    assert closest >= 15.0, f"two series colours nearly merge for {vision}: dE {closest:.1f}"


def test_series_differ_by_dash_and_marker_as_well_as_colour():
    styles = [style.series_style(i) for i in range(len(style.PALETTE))]
    pairs = {(s["dash"], s["marker"]) for s in styles}
    assert len(pairs) == len(styles)


def test_flags_carry_a_symbol_and_a_word_not_colour_alone():
    for level, (symbol, word, _) in style.FLAG_LEVELS.items():
        text = style.flag_html(level, "<b>bad</b> & worse")
        assert symbol in text and word in text
        assert "&lt;b&gt;bad&lt;/b&gt; &amp; worse" in text  # the message is escaped
    assert len({w for _, w, _ in style.FLAG_LEVELS.values()}) == len(style.FLAG_LEVELS)


def test_number_formats_carry_their_units():
    # 1 mL/min = 1e-6/60 m^3/s; 300 mmHg = 300 * 133.322387415 Pa (NIST SP 811)
    assert style.format_flow(100e-6 / 60) == "100 mL/min (6,000 mL/h)"
    assert style.format_pressure(300 * MMHG) == "300 mmHg"
    assert style.format_pressure(300 * MMHG, "kPa") == "40.0 kPa"
    assert style.format_viscosity(1.0e-3) == "1.00 mPa s"
    assert style.significant(float("nan")) == "n/a"


def test_one_number_format_three_significant_figures_with_thousands_separators():
    # the pair: 183 mL/min beside 11,000 mL/h, both to three figures
    assert style.format_flow(183.35 * ML_PER_MIN) == "183 mL/min (11,000 mL/h)"
    cases = {12345.6: "12,300", 999.96: "1,000", 1.0: "1.00", 0.012345: "0.0123", -45.67: "-45.7"}
    for value, text in cases.items():
        assert style.significant(value) == text


def test_banner_states_the_caution_and_links_to_the_cautions_file():
    banner = caution_banner()
    assert BANNER_CLASS in banner._dom_classes
    assert rheoline.CAUTION.split(".")[0] in banner.value
    assert "CAUTIONS.md</a>" in banner.value
    assert "Air embolism" in banner.value  # the full text is on the page, folded
    assert "<button" not in banner.value


def test_banner_link_jumps_to_the_page_text_under_voila(monkeypatch):
    monkeypatch.setenv("VOILA_BASE_URL", "/")
    banner = caution_banner()
    assert "href='#rl-cautions-" in banner.value


# --- the charts' template: plotly's "simple_white" look, for the traces the views draw -----
def test_the_charts_template_is_simple_whites_look_for_2d_line_marker_and_bar_charts():
    import plotly.graph_objects as go
    import plotly.io as pio

    from rheoline.widgets.figures import BASE_LAYOUT, LOOK
    from rheoline.widgets.network_view import network_figure_placeholder

    named = pio.templates["simple_white"].to_plotly_json()
    ours = go.layout.Template(LOOK).to_plotly_json()
    # every layout property it sets is the named template's, value for value
    assert ours["layout"] == {key: named["layout"][key] for key in ours["layout"]}
    # the properties a 2-D chart reads are all there (the rest are maps, 3-D, polar, ...)
    for key in ("paper_bgcolor", "plot_bgcolor", "font", "xaxis", "yaxis", "colorway"):
        assert key in ours["layout"], key
    assert ours["layout"]["xaxis"]["showgrid"] is False
    assert ours["layout"]["yaxis"]["ticks"] == "outside"
    # the trace types the views draw take the named template's defaults
    assert set(ours["data"]) == {"scatter", "bar"}
    assert all(ours["data"][kind] == named["data"][kind] for kind in ours["data"])
    assert BASE_LAYOUT["template"] is LOOK
    placeholder = network_figure_placeholder().layout.template.to_plotly_json()
    assert placeholder == ours
