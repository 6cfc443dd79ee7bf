"""The line view: assemble one line, pick the fluid and the drive, read what the line does.

Controls: the parts (type, gauge or bore, length), the fluid, its temperature and
hematocrit, the drive (gravity head plus a source pressure, or a prescribed flow
with a pressure limit) and the back pressure.  Results: flow in mL/min and mL/h,
the required source pressure, the regime and largest Reynolds number, the
largest wall shear stress and the hemolysis index, the validity flags in words,
and two charts: the pressure budget (which part takes the drive) and the flow
against the drive around the current point.

Every number comes from :meth:`rheoline.Line.solve`; this module converts units
for display and draws.

Examples
--------
>>> view = LineView()
>>> sorted(view.figures)
['budget', 'drive']
"""

from __future__ import annotations

import functools

import ipywidgets as widgets
import numpy as np
import plotly.graph_objects as go

import rheoline
from rheoline.scenario.compare import HEMOLYSIS_CONCERN_STRESS
from rheoline.units import ML_PER_H, ML_PER_MIN, MMHG
from rheoline.widgets.base import _STYLE, View, drive_controls, fluid_controls, labelled
from rheoline.widgets.figures import BASE_LAYOUT, curve_and_point_figure
from rheoline.widgets.parts_editor import DEFAULT_PARTS, PartsEditor, build_part
from rheoline.widgets.style import PALETTE, flag_html, format_number, significant, user_text

__all__ = ["LineView", "fluid_for", "line_for", "DRIVE_MODES", "DRIVE_CURVE_POINTS"]

#: Drive modes: label -> meaning.
DRIVE_MODES = {
    "gravity and pressure": "flow at a head plus a source pressure",
    "set flow (pump)": "source pressure for a prescribed flow",
}
#: Points on the flow-against-drive chart.
DRIVE_CURVE_POINTS = 41


@functools.lru_cache(maxsize=64)
def fluid_options(name: str) -> frozenset:
    """The options a library fluid takes (``hematocrit``, ``mass_fraction``, ...)."""
    from rheoline.model.fluids import FLUID_LIBRARY

    return frozenset(FLUID_LIBRARY[name].options) if name in FLUID_LIBRARY else frozenset()


def _is_blood(name: str) -> bool:
    return "hematocrit" in fluid_options(name)


def fluid_for(name: str, temperature_c, hematocrit: float, mass_fraction: float = 0.4):
    """The library fluid at a temperature [degC] (float or array), with the hematocrit [-]
    for blood and the glycerol mass fraction [-] for glycerol-water; cached for floats."""
    if np.ndim(temperature_c) == 0:
        return _fluid_cached(name, float(temperature_c), float(hematocrit), float(mass_fraction))
    return _fluid(name, temperature_c, hematocrit, mass_fraction)


def _fluid(name, temperature_c, hematocrit, mass_fraction):
    options = fluid_options(name)
    kwargs = {}
    if "hematocrit" in options:
        kwargs["hematocrit"] = hematocrit
    if "mass_fraction" in options:
        kwargs["mass_fraction"] = mass_fraction
    return rheoline.fluid(name, temperature_c=temperature_c, **kwargs)


@functools.lru_cache(maxsize=256)
def _fluid_cached(name, temperature_c, hematocrit, mass_fraction):
    return _fluid(name, temperature_c, hematocrit, mass_fraction)


def _frozen(descriptions):
    return tuple(
        tuple(sorted((k, v) for k, v in d.items() if k != "part"))
        + ((("part", id(d["part"])),) if "part" in d else ())
        for d in descriptions
    )


def line_for(descriptions) -> rheoline.Line:
    """A :class:`rheoline.Line` from part descriptions (see :mod:`.parts_editor`)."""
    return rheoline.Line([build_part(d) for d in descriptions])


class LineView(View):
    """Build one line and see its flow, pressure, regime, shear and pressure budget.

    Parameters
    ----------
    parts : sequence of dict, optional
        Part descriptions, source to outlet (default: a 3.0 mm x 1.8 m set and an 18G catheter).
    fluid : str
        A name from :func:`rheoline.fluid_names`.
    temperature_c : float
        Fluid temperature [degC].
    hematocrit : float
        Hematocrit [-] (blood fluids only).
    head_cm, source_pressure_mmhg, back_pressure_mmhg : float
        The drive: fluid surface above the outlet [cm], source pressure [mmHg],
        outlet pressure [mmHg].
    flow_ml_min, pressure_limit_mmhg : float
        The prescribed flow [mL/min] and the pressure limit [mmHg] (0 = none) of
        the "set flow (pump)" mode.
    mode : str
        A key of :data:`DRIVE_MODES`.
    lazy : bool
        Keep the charts as plain figures until :meth:`show_figures`.
    """

    title = "Line"

    def __init__(
        self,
        parts=DEFAULT_PARTS,
        fluid: str = "saline-0.9",
        temperature_c: float = 22.0,
        hematocrit: float = 0.45,
        head_cm: float = 100.0,
        source_pressure_mmhg: float = 0.0,
        back_pressure_mmhg: float = 0.0,
        flow_ml_min: float = 100.0,
        pressure_limit_mmhg: float = 300.0,
        mode: str = "gravity and pressure",
        lazy: bool = False,
    ):
        super().__init__()
        c = self.controls
        self.editor = PartsEditor(parts)
        c["parts"] = self.editor.version
        c.update(fluid_controls(fluid, temperature_c, hematocrit))
        c["mode"] = labelled(
            widgets.ToggleButtons(
                options=list(DRIVE_MODES), value=mode, description="drive", style=_STYLE
            ),
            "rl-mode",
        )
        c.update(drive_controls(head_cm, source_pressure_mmhg, back_pressure_mmhg))
        c["flow_ml_min"] = labelled(
            widgets.BoundedFloatText(
                value=flow_ml_min,
                min=0.001,
                max=20000.0,
                step=5.0,
                description="set flow [mL/min]",
                style=_STYLE,
            ),
            "rl-set-flow",
        )
        c["pressure_limit_mmhg"] = labelled(
            widgets.BoundedFloatText(
                value=pressure_limit_mmhg,
                min=0.0,
                max=45000.0,
                step=10.0,
                description="pressure limit [mmHg] (0 = none)",
                style=_STYLE,
            ),
            "rl-pressure-limit",
        )
        self.results = labelled(widgets.HTML(), "rl-results")
        self.result = None

        self.figures["budget"] = go.Figure(
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
        self.figures["drive"] = curve_and_point_figure(
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

        self._line_key = None
        self._line = None
        self._watch({name: {"solve"} for name in c})
        self._run(lambda: self._refresh({"solve"}))
        self._widgetize(lazy)

        drive_box = widgets.VBox(
            [
                c["mode"],
                c["head_cm"],
                c["source_pressure_mmhg"],
                c["flow_ml_min"],
                c["pressure_limit_mmhg"],
                c["back_pressure_mmhg"],
            ]
        )
        fluid_box = widgets.VBox(
            [c["fluid"], c["temperature_c"], c["hematocrit"], c["mass_fraction"]]
        )
        self._finish(
            [
                self.editor,
                widgets.HBox([fluid_box, drive_box]),
                self.results,
                widgets.HBox([self.figure_box("budget"), self.figure_box("drive")]),
            ]
        )

    # -- inputs to the line engine ---------------------------------------------------
    def line(self) -> rheoline.Line:
        """The line the editor describes (rebuilt only when the parts changed)."""
        descriptions = self.editor.descriptions()
        key = _frozen(descriptions)
        if key != self._line_key:
            self._line = line_for(descriptions)
            self._line_key = key
        return self._line

    def fluid(self):
        """The fluid at the current temperature and hematocrit."""
        c = self.controls
        return fluid_for(
            c["fluid"].value,
            c["temperature_c"].value,
            c["hematocrit"].value,
            c["mass_fraction"].value,
        )

    def drive(self) -> dict:
        """Keyword arguments of :meth:`rheoline.Line.solve` for the current drive (SI)."""
        c = self.controls
        back = c["back_pressure_mmhg"].value * MMHG
        if c["mode"].value == "set flow (pump)":
            # the pump's outlet pressure is the whole drive (no bag head), as in scenario files
            limit = c["pressure_limit_mmhg"].value
            return {
                "back_pressure": back,
                "flow": c["flow_ml_min"].value * ML_PER_MIN,
                "pressure_limit": limit * MMHG if limit > 0 else None,
            }
        return {
            "head": c["head_cm"].value * 1e-2,
            "back_pressure": back,
            "source_pressure": c["source_pressure_mmhg"].value * MMHG,
        }

    def solve(self):
        """The line engine's result for the current inputs."""
        return self.line().solve(self.fluid(), **self.drive())

    def drive_curve(self):
        """(x, y) of the flow-against-drive chart: flow [m^3/s] against head [m], or
        required pressure [Pa] against flow [m^3/s] in the pump mode."""
        drive = self.drive()
        line, fluid = self.line(), self.fluid()
        if "flow" in drive:
            flows = np.linspace(0.02, 2.0, DRIVE_CURVE_POINTS) * drive["flow"]
            kwargs = {k: v for k, v in drive.items() if k not in ("flow", "pressure_limit")}
            return flows, line.solve(fluid, flow=flows, **kwargs).required_pressure
        top = max(2.0 * drive["head"], 1.5)
        heads = np.linspace(0.0, top, DRIVE_CURVE_POINTS)
        return heads, line.solve(fluid, **{**drive, "head": heads}).flow

    # -- drawing ---------------------------------------------------------------------
    def _refresh(self, parts):
        c = self.controls
        options = fluid_options(c["fluid"].value)
        c["hematocrit"].disabled = "hematocrit" not in options
        c["mass_fraction"].disabled = "mass_fraction" not in options
        pump = c["mode"].value == "set flow (pump)"
        c["source_pressure_mmhg"].disabled = pump
        c["head_cm"].disabled = pump
        c["flow_ml_min"].disabled = not pump
        c["pressure_limit_mmhg"].disabled = not pump
        result = self.solve()
        self.result = result
        x, y = self.drive_curve()
        self._show_results(result, pump)
        self._draw_budget(result)
        self._draw_drive(result, x, y, pump)

    def _show_results(self, result, pump):
        flow = float(result.flow)
        required = float(result.required_pressure)
        regime = str(result.regime)
        lines = [
            f"<div>flow <b><span class='rl-flow' data-flow-ml-min='{flow / ML_PER_MIN!r}'>"
            f"{significant(flow / ML_PER_MIN)} mL/min</span></b> "
            f"(<span class='rl-flow-h'>{significant(flow / ML_PER_H)} mL/h</span>)</div>",
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
            f"<div>dominant part <b>{user_text(result.dominant_part)}</b> "
            f"({significant(100 * float(result.dominant_share))} % of the pressure budget)</div>",
        ]
        flags = []
        if regime != "laminar":
            flags.append(flag_html("caution", f"{regime} flow: losses rise faster than the flow"))
        if pump and bool(np.any(result.exceeds_pressure_limit)):
            flags.append(flag_html("exceeded", "the required pressure is above the pressure limit"))
        if (
            _is_blood(self.controls["fluid"].value)
            and float(result.max_wall_shear_stress) > HEMOLYSIS_CONCERN_STRESS
        ):
            flags.append(
                flag_html(
                    "caution",
                    "hemolysis concern: wall shear stress above "
                    f"{HEMOLYSIS_CONCERN_STRESS:g} Pa (screening threshold of the "
                    "scenario layer)",
                )
            )
        flags += [flag_html("caution", text) for text in result.flags]
        if not flags:
            flags.append(flag_html("ok", "no validity flags for these inputs"))
        self.results.value = "".join(lines) + "".join(flags)

    def _draw_budget(self, result):
        labels = [user_text(f"{i}. {p.name}") for i, p in enumerate(self.line().parts, 1)]
        labels.append("exit")
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
            f"{significant(d)} mmHg, {significant(100 * s, 2)} %"
            + (" (dominant)" if i == dominant else "")
            for i, (d, s) in enumerate(zip(drops, shares, strict=True))
        ]
        fig = self.figures["budget"]
        with fig.batch_update():
            bar = fig.data[0]
            bar.x, bar.y, bar.text = drops, labels, text
            bar.marker.pattern.shape = ["/" if i == dominant else "" for i in range(len(drops))]

    def _draw_drive(self, result, x, y, pump):
        fig = self.figures["drive"]
        c = self.controls
        with fig.batch_update():
            if pump:
                limit = c["pressure_limit_mmhg"].value
                fig.data[0].x, fig.data[0].y = x / ML_PER_MIN, y / MMHG
                fig.data[1].x = [float(result.flow) / ML_PER_MIN]
                fig.data[1].y = [float(result.required_pressure) / MMHG]
                fig.data[2].x = [x[0] / ML_PER_MIN, x[-1] / ML_PER_MIN] if limit > 0 else []
                fig.data[2].y = [limit, limit] if limit > 0 else []
                fig.layout.xaxis.title.text = "flow [mL/min]"
                fig.layout.yaxis.title.text = "required source pressure [mmHg]"
                fig.layout.title.text = "Pressure the pump must supply"
            else:
                fig.data[0].x, fig.data[0].y = x * 100.0, y / ML_PER_MIN
                fig.data[1].x = [c["head_cm"].value]
                fig.data[1].y = [float(result.flow) / ML_PER_MIN]
                fig.data[2].x, fig.data[2].y = [], []
                fig.layout.xaxis.title.text = "head [cm] (with the set source pressure)"
                fig.layout.yaxis.title.text = "flow [mL/min]"
                fig.layout.title.text = "Flow against bag height"
