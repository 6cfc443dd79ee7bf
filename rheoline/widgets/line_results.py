"""How the line view shows a line's result: the numbers in words, the flags, and the charts.

Everything here renders the line engine's result (:class:`rheoline.model.line.LineResult`)
for display: units converted for the trade, flags as a symbol and words, the pressure
budget and the flow-against-drive chart.  Nothing here computes physics.
"""

from __future__ import annotations

import numpy as np
import plotly.graph_objects as go

from rheoline.model.hemolysis import HEMOLYSIS_CONCERN_STRESS
from rheoline.units import ML_PER_H, ML_PER_MIN, MMHG
from rheoline.widgets.edits import shown_amount
from rheoline.widgets.figures import BASE_LAYOUT, curve_and_point_figure
from rheoline.widgets.style import PALETTE, flag_html, format_number, significant, user_text

__all__ = [
    "budget_figure",
    "drive_figure",
    "results_html",
    "flags_html",
    "draw_budget",
    "draw_drive",
    "drawing_of",
]


def budget_figure():
    """The pressure budget chart (one horizontal bar per part and the exit), empty."""
    return go.Figure(
        data=[
            go.Bar(
                name="pressure drop",
                orientation="h",
                marker=dict(color=PALETTE[0], line=dict(color="#1a1a1a", width=1)),
                textposition="auto",
            )
        ],
        layout=go.Layout(
            title="Pressure budget: where the drive goes",
            xaxis_title="pressure drop [mmHg]",
            yaxis=dict(autorange="reversed"),
            **{**BASE_LAYOUT, "showlegend": False},
        ),
    )


def drive_figure():
    """The flow-against-drive chart (the curve, the current point, a pressure limit), empty."""
    return curve_and_point_figure(
        "Flow against drive",
        "this line",
        "current drive",
        extra_traces=[
            go.Scatter(
                name="pressure limit",
                mode="lines",
                line=dict(color=PALETTE[3], width=2, dash="dash"),
            )
        ],
    )


def results_html(result, pump, flow_unit=("mL/min", ML_PER_MIN)):
    """The result in words (HTML): flow (in ``flow_unit``: name, m^3/s per unit, and in a
    second unit), pressure, regime, shear, the dominant part, and the flags."""
    flow = float(result.flow)
    unit, per = flow_unit
    other, other_per = ("mL/min", ML_PER_MIN) if unit == "mL/h" else ("mL/h", ML_PER_H)
    required = float(result.required_pressure)
    regime = str(result.regime)
    lines = [
        f"<div>flow <b><span class='rl-flow' data-flow-ml-min='{flow / ML_PER_MIN!r}'>"
        f"{significant(flow / per)} {unit}</span></b> "
        f"(<span class='rl-flow-other'>{significant(flow / other_per)} {other}</span>)</div>",
        (
            f"<div>required pump pressure <b><span class='rl-required-pressure'>"
            f"{format_number(required / MMHG, 'mmHg')}</span></b> "
            f"({format_number(required / 1e3, 'kPa')})</div>"
            if pump
            else f"<div>net drive <b>{format_number(float(result.net_drive) / MMHG, 'mmHg')}</b> "
            f"(gravity head plus source pressure, less back pressure)</div>"
        ),
        f"<div>regime <b><span class='rl-regime'>{user_text(regime)}</span></b> "
        f"(largest Reynolds number {significant(float(result.max_reynolds))})</div>",
        f"<div>largest wall shear stress <b>"
        f"{format_number(float(result.max_wall_shear_stress), 'Pa')}</b>; hemolysis index "
        + (
            f"<b>{format_number(float(result.hemolysis_index), '%')}</b> (Giersiepen 1990, a "
            "screening indicator)</div>"
            if np.isfinite(float(result.hemolysis_index))
            else "<b>n/a</b> (no red cells)</div>"
        ),
        f"<div>dominant part <b>{user_text(str(result.dominant_part))}</b> "
        f"({significant(100 * float(result.dominant_share))} % of the pressure budget)</div>",
    ]
    return "".join(lines) + "".join(flags_html(result, pump))


def flags_html(result, pump):
    """The validity flags of a result, each a symbol and words (an "ok" flag when none)."""
    regime = str(result.regime)
    flags = []
    if regime != "laminar":
        flags.append(flag_html("caution", f"{regime} flow: losses rise faster than the flow"))
    if pump and bool(np.any(result.conditions["over_pressure_limit"])):
        flags.append(flag_html("exceeded", "the required pressure is above the pressure limit"))
    if bool(np.any(result.conditions["hemolysis_concern"])):
        flags.append(
            flag_html(
                "caution",
                "hemolysis concern: wall shear stress above "
                f"{HEMOLYSIS_CONCERN_STRESS:g} Pa (a screening threshold of the "
                "hemolysis model)",
            )
        )
    flags += [flag_html("caution", text) for text in result.flags]
    if not flags:
        flags.append(flag_html("ok", "no validity flags for these inputs"))
    return flags


def draw_budget(fig, result, part_names):
    """Set the pressure budget chart: each part's drop and share [mmHg, %], the exit last."""
    labels = [user_text(f"{i}. {name}") for i, name in enumerate(part_names, start=1)] + ["exit"]
    drops = (
        np.append(
            np.asarray(result.part_pressure_drops, dtype=float),
            float(result.exit_pressure_drop),
        )
        / MMHG
    )
    total = drops.sum()
    shares = drops / total if total > 0 else np.zeros_like(drops)
    dominant = int(np.argmax(drops))
    text = [
        f"{significant(d)} mmHg, {significant(100 * s)} %"
        + (" (dominant)" if i == dominant else "")
        for i, (d, s) in enumerate(zip(drops, shares, strict=True))
    ]
    with fig.batch_update():
        bar = fig.data[0]
        bar.x, bar.y, bar.text = drops, labels, text
        bar.marker.pattern.shape = ["/" if i == dominant else "" for i in range(len(drops))]


def drawing_of(parts, result):
    """The line drawn to scale (:func:`rheoline.scenario.line_drawing.line_drawing`) from the
    line engine's parts and result: each part's bore and length, its pressure drop, the exit
    last."""
    from rheoline.scenario.line_drawing import line_drawing

    def size(part, name, factor):
        value = getattr(part, name, None)
        return None if value is None else float(np.ravel(value)[0]) * factor

    names = [user_text(f"{i}. {p.name}") for i, p in enumerate(parts, start=1)] + ["exit"]
    bores = [size(p, "inner_diameter", 1e3) for p in parts] + [None]
    lengths = [size(p, "length", 1.0) for p in parts] + [None]
    drops = np.append(
        np.asarray(result.part_pressure_drops, dtype=float).reshape(len(parts), -1)[:, 0],
        float(np.ravel(result.exit_pressure_drop)[0]),
    )
    return line_drawing(names, bores, lengths, drops / MMHG)


def draw_drive(fig, result, x, y, drive, flow_unit=("mL/min", ML_PER_MIN)):
    """Set the flow-against-drive chart from the curve ``(x, y)`` and the drive [SI], flows in
    ``flow_unit`` (name, m^3/s per unit)."""
    pump = "flow" in drive
    unit, per = flow_unit
    with fig.batch_update():
        if pump:
            limit = drive.get("pressure_limit")
            fig.data[0].x, fig.data[0].y = x / per, y / MMHG
            fig.data[1].x = [float(result.flow) / per]
            fig.data[1].y = [float(result.required_pressure) / MMHG]
            ends = [x[0] / per, x[-1] / per]
            fig.data[2].x = ends if limit else []
            fig.data[2].y = [shown_amount("pressure_limit", limit)] * 2 if limit else []
            fig.layout.xaxis.title.text = f"flow [{unit}]"
            fig.layout.yaxis.title.text = "required source pressure [mmHg]"
            fig.layout.title.text = "Pressure the pump must supply"
        else:
            fig.data[0].x, fig.data[0].y = x * 100.0, y / per
            fig.data[1].x = [shown_amount("head", drive["head"])]
            fig.data[1].y = [float(result.flow) / per]
            fig.data[2].x, fig.data[2].y = [], []
            fig.layout.xaxis.title.text = "head [cm] (with the set source pressure)"
            fig.layout.yaxis.title.text = f"flow [{unit}]"
            fig.layout.title.text = "Flow against bag height"
