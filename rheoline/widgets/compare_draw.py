"""How the comparison shows its candidates: the chart's traces and the operating-point table.

Everything here renders numbers the comparison's solver computed
(:mod:`rheoline.widgets.compare_solve`): flows in mL/min and mL/h, bands as shaded areas,
flags as a symbol and words.  Series differ by colour, dash and marker.  Nothing here
computes physics.
"""

from __future__ import annotations

import numpy as np
import plotly.graph_objects as go

from rheoline.model.hemolysis import HEMOLYSIS_CONCERN_STRESS
from rheoline.units import ML_PER_H, ML_PER_MIN
from rheoline.widgets.compare_solve import BAND_SAMPLES, SWEEPS
from rheoline.widgets.style import BAND_OPACITY, flag_text, series_style, significant, user_text

__all__ = ["chart_text", "traces", "draw_curves", "row_flags", "row_html", "table_html"]


def chart_text(text) -> str:
    """A user's string (a candidate's name) made safe for a chart's legend
    (:func:`rheoline.widgets.style.user_text`)."""
    return user_text(text)


def traces(names) -> list:
    """The chart's traces: a band per candidate (first), then a curve per candidate."""
    out = []
    for i, name in enumerate(names):
        s = series_style(i)
        out.append(
            go.Scatter(
                name=chart_text(f"{name} p5-p95"),
                mode="lines",
                fill="toself",
                fillcolor=s["color"],
                opacity=BAND_OPACITY,
                line=dict(width=0),
                hoverinfo="skip",
                showlegend=False,
                legendgroup=chart_text(name),
            )
        )
    for i, name in enumerate(names):
        s = series_style(i)
        out.append(
            go.Scatter(
                name=chart_text(name),
                mode="lines+markers",
                line=dict(color=s["color"], dash=s["dash"], width=2.5),
                marker=dict(symbol=s["marker"], size=8, color=s["color"], maxdisplayed=12),
                legendgroup=chart_text(name),
            )
        )
    return out


def draw_curves(fig, names, curves, bands, sweep, flow_unit=("mL/min", ML_PER_MIN)):
    """Set the chart: each candidate's curve ``(x, flow [m^3/s])`` and band ``(x, p5, p95)``
    (or None), flows in ``flow_unit`` (name, m^3/s per unit), in one batch update; the
    traces are made anew when the candidates changed."""
    n = len(names)
    unit, per = flow_unit
    with fig.batch_update():
        if len(fig.data) != 2 * n or any(
            t.name != chart_text(name) for t, name in zip(fig.data[n:], names, strict=False)
        ):
            fig.data = []
            fig.add_traces(traces(names))
        for i, ((x, flow), band) in enumerate(zip(curves, bands, strict=True)):
            fig.data[n + i].x, fig.data[n + i].y = x, flow / per
            if band is None:
                fig.data[i].x, fig.data[i].y = [], []
            else:
                bx, p5, p95 = band
                fig.data[i].x = np.concatenate([bx, bx[::-1]])
                fig.data[i].y = np.concatenate([p95, p5[::-1]]) / per
        fig.layout.xaxis.title.text = SWEEPS[sweep][0]
        fig.layout.yaxis.title.text = f"flow [{unit}]"
        title = f"Candidates: flow against {sweep}"
        if any(b is not None for b in bands):
            title += f" (shaded: p5-p95 of {BAND_SAMPLES} tolerance samples)"
        fig.layout.title.text = title


def row_flags(result, differ) -> list:
    """The flags of a candidate's operating point, as text: a hemolysis concern, a regime
    other than laminar (both from the result's conditions), the engine's own flags, and the
    inputs where it differs from the shared controls (``differ``)."""
    flags = []
    if bool(np.any(result.conditions["hemolysis_concern"])):
        flags.append(
            flag_text(
                "caution",
                f"hemolysis concern: wall shear stress above {HEMOLYSIS_CONCERN_STRESS:g} Pa",
            )
        )
    if str(result.regime) != "laminar":
        flags.append(flag_text("caution", f"{result.regime} flow"))
    flags += [flag_text("caution", f) for f in result.flags]
    if differ:
        flags.append(flag_text("note", f"at its own inputs: {', '.join(differ)}"))
    return flags


def row_html(name, parts, result, band, flags, banded, flow_unit=("mL/min", ML_PER_MIN)) -> str:
    """One table row: the candidate ``name``, its ``parts`` in words, its operating point's
    numbers (flows in ``flow_unit`` and in a second unit), its p5-p95 ``band`` [m^3/s] (a
    column only when ``banded``) and its flags."""
    flow = float(result.flow)
    per, other = flow_unit[1], _other_flow_unit(flow_unit[0])[1]
    band_cell = ""
    if banded:
        cell = (
            f"{significant(band[0] / per)}-{significant(band[1] / per)}" if band else "no tolerance"
        )
        band_cell = f"<td>{cell}</td>"
    flags = "; ".join(flags) or "[ok] ok: no flags"
    return (
        f"<tr><td><b>{user_text(name)}</b></td>"
        f"<td>{user_text(parts)}</td>"
        f"<td class='rl-compare-flow'>{significant(flow / per)}</td>"
        f"<td>{significant(flow / other)}</td>"
        f"<td>{user_text(str(result.regime))} ({significant(float(result.max_reynolds))})</td>"
        f"<td>{user_text(str(result.dominant_part))} "
        f"({significant(100 * float(result.dominant_share))} %)</td>"
        f"<td>{significant(float(result.max_wall_shear_stress))}</td>{band_cell}"
        f"<td>{user_text(flags)}</td></tr>"
    )


def _other_flow_unit(unit):
    """The second flow unit a table shows beside ``unit``: mL/h, or mL/min beside mL/h."""
    return ("mL/min", ML_PER_MIN) if unit == "mL/h" else ("mL/h", ML_PER_H)


def table_html(rows, banded, shared, flow_unit="mL/min") -> str:
    """The operating-point table of ``rows`` (:func:`row_html`, flows in ``flow_unit``),
    under a line that states the shared controls' inputs (``shared``: control -> amount)."""
    other = _other_flow_unit(flow_unit)[0]
    head = (
        f"<tr><th>candidate</th><th>parts</th><th>flow [{flow_unit}]</th><th>flow [{other}]</th>"
        "<th>regime (max Re)</th><th>dominant part (share)</th>"
        "<th>max wall shear stress [Pa]</th>"
        + (f"<th>flow p5-p95 [{flow_unit}]</th>" if banded else "")
        + "<th>flags</th></tr>"
    )
    return (
        "<div style='white-space:normal;overflow-wrap:break-word'>"
        f"<div><b>At the operating point</b> (each candidate at its own inputs; the "
        f"shared controls: head {significant(shared['head_cm'])} cm, source pressure "
        f"{significant(shared['source_pressure_mmhg'])} mmHg, back pressure "
        f"{significant(shared['back_pressure_mmhg'])} mmHg, "
        f"{user_text(shared['fluid'])} at {significant(shared['temperature_c'])} degC)</div>"
        "<table class='rl-table' style='border-collapse:collapse;width:100%' border='1' "
        f"cellpadding='4'>{head}{''.join(rows)}</table></div>"
    )
