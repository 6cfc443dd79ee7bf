"""The comparison view: candidate lines on one chart, tolerance bands, and a table.

Each candidate is a named list of part descriptions (see :mod:`.parts_editor`).
The chart shows flow against a swept quantity for every candidate at the shared
fluid and drive:

* ``"head"`` -- the gravity head [cm] (with the shared source pressure on top),
* ``"bore"`` -- the inner diameter [mm] of each candidate's sized part (its last
  catheter, needle or cannula; else its last tube), swept over a range given in percent
  of its nominal bore (so a catheter's bore stays inside its wall),
* ``"temperature"`` -- the fluid temperature [degC].

With a tolerance set (bore [%] of the sized part, temperature [degC], as half-widths
of uniform spreads), each candidate gets a shaded p5-p95 band from a seeded Monte
Carlo of :data:`BAND_SAMPLES` samples, solved by the line engine in one vectorized
call: at every curve point for a bore tolerance alone (where the flows' order
statistics are the flows at the bore's order statistics, see
:meth:`ComparisonView._percentiles`), else at :data:`BAND_POINTS` points, the band
drawn through them.  The table below gives each candidate at the shared
operating point (the current head, bore and temperature).

Responsiveness: every candidate's curve, band and table row are cached under the
inputs they depend on, so a control change recomputes only what it changed (adding
a candidate solves that candidate only), and all traces are set in one
``fig.batch_update()``.

Examples
--------
>>> view = ComparisonView()
>>> len(view.candidates), len(view.figures["curves"].data)
(3, 6)
"""

from __future__ import annotations

import ipywidgets as widgets
import numpy as np
import plotly.graph_objects as go

from rheoline.scenario.compare import HEMOLYSIS_CONCERN_STRESS
from rheoline.units import ML_PER_H, ML_PER_MIN, MMHG
from rheoline.widgets.base import _STYLE, View, drive_controls, fluid_controls, labelled
from rheoline.widgets.figures import BASE_LAYOUT
from rheoline.widgets.line_view import _is_blood, fluid_for, fluid_options
from rheoline.widgets.parts_editor import CATHETER_GAUGES, build_part, part_label
from rheoline.widgets.style import BAND_OPACITY, flag_text, series_style, significant, user_text

__all__ = [
    "ComparisonView",
    "responsiveness_case",
    "SWEEPS",
    "BAND_SAMPLES",
    "BAND_POINTS",
    "DEFAULT_CANDIDATES",
    "sized_part_index",
]

#: Sweep choices: name -> (axis title, default range, SI factor of the shown unit).
SWEEPS = {
    "head": ("head [cm]", (10.0, 200.0), 1e-2),
    "bore": ("inner diameter of the sized part [mm]", (70.0, 120.0), 1e-2),
    "temperature": ("temperature [degC]", (4.0, 40.0), 1.0),
}
#: Monte Carlo samples of a tolerance band.
BAND_SAMPLES = 2000
#: Sweep points the band is solved at (the curve itself has ``points`` points).
BAND_POINTS = 9
#: Seed of the band's random numbers (the same inputs give the same band).
BAND_SEED = 20261201

_SET = {"type": "tube", "label": "administration set", "inner_diameter_mm": 3.0, "length_cm": 180.0}
#: Invented starting candidates: three catheters behind the same gravity set.
DEFAULT_CANDIDATES = tuple(
    {"name": f"set + {g}G", "parts": (_SET, {"type": "catheter", "gauge": g})} for g in (16, 18, 20)
)


def sized_part_index(descriptions) -> int:
    """Index of the part a bore sweep or bore tolerance acts on."""
    for kinds in (("catheter", "needle", "cannula"), ("tube",)):
        hits = [i for i, d in enumerate(descriptions) if d["type"] in kinds]
        if hits:
            return hits[-1]
    raise ValueError("a bore sweep needs a catheter, needle, cannula or tube in the line")


def _freeze(obj):
    if isinstance(obj, dict):
        return tuple(sorted((k, _freeze(v)) for k, v in obj.items()))
    if isinstance(obj, (list, tuple)):
        return tuple(_freeze(v) for v in obj)
    if obj is None or isinstance(obj, (str, int, float, bool)):
        return obj
    return ("object", id(obj))  # built parts from a file: the same object, the same part


class ComparisonView(View):
    """Candidate lines side by side: flow against head, bore or temperature.

    Parameters
    ----------
    candidates : sequence of dict, optional
        ``{"name": str, "parts": [part descriptions]}`` each.
    fluid, temperature_c, hematocrit : shared fluid.
    head_cm, source_pressure_mmhg, back_pressure_mmhg : shared drive.
    sweep : str
        A key of :data:`SWEEPS`.
    points : int
        Points per curve.
    bore_tolerance_percent, temperature_tolerance_c : float
        Half-widths of the uniform tolerance spreads (0 = no band).
    lazy : bool
        Keep the chart a plain figure until :meth:`show_figures`.
    line_source : callable, optional
        Returns the part descriptions of another view's line (the app passes the line
        view's); a button then adds that line as a candidate.
    """

    title = "Compare"

    def __init__(
        self,
        candidates=DEFAULT_CANDIDATES,
        fluid: str = "saline-0.9",
        temperature_c: float = 22.0,
        hematocrit: float = 0.45,
        head_cm: float = 100.0,
        source_pressure_mmhg: float = 0.0,
        back_pressure_mmhg: float = 0.0,
        sweep: str = "head",
        points: int = 200,
        bore_tolerance_percent: float = 0.0,
        temperature_tolerance_c: float = 0.0,
        lazy: bool = False,
        line_source=None,
    ):
        super().__init__()
        self.candidates = [
            {"name": c["name"], "parts": [dict(p) for p in c["parts"]]} for c in candidates
        ]
        self._cache: dict = {}
        self.points = int(points)
        c = self.controls
        c.update(fluid_controls(fluid, temperature_c, hematocrit))
        c.update(drive_controls(head_cm, source_pressure_mmhg, back_pressure_mmhg))
        c["sweep"] = labelled(
            widgets.ToggleButtons(
                options=list(SWEEPS), value=sweep, description="flow against", style=_STYLE
            ),
            "rl-sweep",
        )
        low, high = SWEEPS[sweep][1]
        c["sweep_from"] = labelled(
            widgets.BoundedFloatText(value=low, min=0.0, max=1e4, description="from", style=_STYLE),
            "rl-sweep-from",
        )
        c["sweep_to"] = labelled(
            widgets.BoundedFloatText(value=high, min=0.0, max=1e4, description="to", style=_STYLE),
            "rl-sweep-to",
        )
        c["bore_tolerance_percent"] = labelled(
            widgets.BoundedFloatText(
                value=bore_tolerance_percent,
                min=0.0,
                max=30.0,
                step=0.5,
                description="bore tolerance +/- [%]",
                style=_STYLE,
            ),
            "rl-bore-tolerance",
        )
        c["temperature_tolerance_c"] = labelled(
            widgets.BoundedFloatText(
                value=temperature_tolerance_c,
                min=0.0,
                max=20.0,
                step=0.5,
                description="temperature tolerance +/- [degC]",
                style=_STYLE,
            ),
            "rl-temperature-tolerance",
        )
        c["candidates"] = widgets.IntText(value=0, layout=widgets.Layout(display="none"))

        # adding and removing candidates
        self.new_kind = widgets.Dropdown(
            options=["catheter", "needle"], value="catheter", layout=widgets.Layout(width="110px")
        )
        self.new_gauge = widgets.Dropdown(
            options=[(f"{g}G", g) for g in CATHETER_GAUGES],
            value=14,
            layout=widgets.Layout(width="80px"),
        )
        self.new_behind_set = widgets.Checkbox(
            value=True, description="behind the 3.0 mm x 1.8 m set", indent=False
        )
        self.add_button = labelled(
            widgets.Button(description="add candidate", icon="plus"), "rl-add-candidate"
        )
        self.add_button.on_click(lambda b: self.add_candidate(self._new_candidate()))
        self.chooser = labelled(
            widgets.SelectMultiple(options=[], rows=4, description="candidates", style=_STYLE),
            "rl-candidates",
        )
        self.remove_button = labelled(
            widgets.Button(description="remove selected", icon="trash"), "rl-remove-candidate"
        )
        self.remove_button.on_click(lambda b: self.remove_candidates(self.chooser.value))
        self.table = labelled(widgets.HTML(), "rl-compare-table")
        self.line_source = line_source
        self.add_line_button = labelled(
            widgets.Button(
                description="add the line view's line",
                icon="plus",
                layout=widgets.Layout(display=None if line_source else "none"),
            ),
            "rl-add-line",
        )
        self.add_line_button.on_click(
            lambda b: self.add_candidate({"name": "line view", "parts": self.line_source()})
        )

        self.figures["curves"] = go.Figure(
            data=self._traces(),
            layout=go.Layout(
                title="Candidates: flow against head",
                yaxis_title="flow [mL/min]",
                xaxis_title=SWEEPS[sweep][0],
                **{**BASE_LAYOUT, "height": 420},
            ),
        )

        everything = {"curves", "table"}
        self._watch(
            {
                **{
                    k: everything
                    for k in (
                        "fluid",
                        "temperature_c",
                        "hematocrit",
                        "mass_fraction",
                        "head_cm",
                        "source_pressure_mmhg",
                        "back_pressure_mmhg",
                        "candidates",
                    )
                },
                **{k: {"curves"} for k in ("sweep_from", "sweep_to")},
                "bore_tolerance_percent": everything,
                "temperature_tolerance_c": everything,
            }
        )
        c["sweep"].observe(self._sweep_changed, names="value")
        c["fluid"].observe(lambda change: self._enable(), names="value")
        self._enable()
        self._run(lambda: self._refresh(everything))
        self._widgetize(lazy)

        shared = widgets.HBox(
            [
                widgets.VBox([c["fluid"], c["temperature_c"], c["hematocrit"], c["mass_fraction"]]),
                widgets.VBox([c["head_cm"], c["source_pressure_mmhg"], c["back_pressure_mmhg"]]),
                widgets.VBox([c["bore_tolerance_percent"], c["temperature_tolerance_c"]]),
            ]
        )
        sweep_box = widgets.HBox([c["sweep"], c["sweep_from"], c["sweep_to"]])
        adder = widgets.HBox(
            [
                self.new_kind,
                self.new_gauge,
                self.new_behind_set,
                self.add_button,
                self.add_line_button,
            ]
        )
        self.new_kind.observe(self._kind_changed, names="value")
        self._finish(
            [
                widgets.HBox(
                    [widgets.VBox([adder, widgets.HBox([self.chooser, self.remove_button])])]
                ),
                shared,
                sweep_box,
                self.figure_box("curves"),
                self.table,
            ]
        )

    # -- candidates --------------------------------------------------------------------
    def _kind_changed(self, change):
        from rheoline.widgets.parts_editor import NEEDLE_GAUGES

        gauges = CATHETER_GAUGES if change.new == "catheter" else NEEDLE_GAUGES
        self.new_gauge.options = [(f"{g}G", g) for g in gauges]
        self.new_gauge.value = gauges[len(gauges) // 2]

    def _new_candidate(self):
        kind, gauge = self.new_kind.value, self.new_gauge.value
        part = {"type": kind, "gauge": gauge}
        parts = [dict(_SET), part] if self.new_behind_set.value else [part]
        name = f"{'set + ' if self.new_behind_set.value else ''}{gauge}G {kind}"
        return {"name": name, "parts": parts}

    def _unique(self, name):
        taken = {c["name"] for c in self.candidates}
        out, k = name, 2
        while out in taken:
            out, k = f"{name} ({k})", k + 1
        return out

    def add_candidate(self, candidate: dict):
        """Add a candidate ``{"name": ..., "parts": [...]}`` (only it gets solved)."""
        self.candidates.append(
            {
                "name": self._unique(candidate["name"]),
                "parts": [dict(p) for p in candidate["parts"]],
            }
        )
        self.controls["candidates"].value += 1

    def remove_candidates(self, names):
        """Remove the named candidates (at least one stays)."""
        keep = [c for c in self.candidates if c["name"] not in set(names)]
        if keep and len(keep) != len(self.candidates):
            self.candidates = keep
            self.controls["candidates"].value += 1

    def set_candidates(self, candidates):
        """Replace every candidate."""
        self.candidates = [
            {"name": c["name"], "parts": [dict(p) for p in c["parts"]]} for c in candidates
        ]
        self.controls["candidates"].value += 1

    # -- inputs ------------------------------------------------------------------------
    def _enable(self):
        options = fluid_options(self.controls["fluid"].value)
        self.controls["hematocrit"].disabled = "hematocrit" not in options
        self.controls["mass_fraction"].disabled = "mass_fraction" not in options

    def _sweep_changed(self, change):
        low, high = SWEEPS[change.new][1]
        c = self.controls
        self._paused = True
        try:
            c["sweep_from"].value, c["sweep_to"].value = low, high
        finally:
            self._paused = False
        self._run(lambda: self._refresh({"curves"}))

    def _shared(self):
        c = self.controls
        return {
            "fluid": c["fluid"].value,
            "temperature_c": float(c["temperature_c"].value),
            "hematocrit": float(c["hematocrit"].value),
            "mass_fraction": float(c["mass_fraction"].value),
            "head": c["head_cm"].value * 1e-2,
            "source_pressure": c["source_pressure_mmhg"].value * MMHG,
            "back_pressure": c["back_pressure_mmhg"].value * MMHG,
        }

    def sweep_values(self, n=None):
        """The sweep grid in the shown unit (cm, mm or degC)."""
        c = self.controls
        low, high = sorted((c["sweep_from"].value, c["sweep_to"].value))
        if high == low:
            high = low + 1.0
        return np.linspace(low, high, self.points if n is None else n)

    def _tolerances(self):
        c = self.controls
        return (c["bore_tolerance_percent"].value / 100.0, c["temperature_tolerance_c"].value)

    def _solve(self, candidate, shared, sweep, values, bore_scale=None, temperature=None):
        """Flow [m^3/s] of a candidate over ``values`` of ``sweep`` (SI), by the line engine.

        ``bore_scale`` multiplies the sized part's bore and ``temperature`` [degC] replaces
        the shared temperature: arrays of tolerance samples that broadcast with ``values``.
        """
        descriptions = candidate["parts"]
        index = sized_part_index(descriptions)
        sized = build_part(descriptions[index])
        bore = sized.inner_diameter
        if sweep == "bore":
            bore = bore * values
        if bore_scale is not None:
            bore = bore * bore_scale
        parts = [build_part(d) for d in descriptions]
        from rheoline import Line, Tube

        if bore is not sized.inner_diameter:
            # a swept or sampled bore is the same lumen (its bore, length, roughness and name)
            # without the catalogue's outer diameter, which only bounds a nominal part's bore
            parts[index] = Tube(
                inner_diameter=bore,
                length=sized.length,
                name=sized.name,
                roughness=getattr(sized, "roughness", 0.0),
            )
        t = shared["temperature_c"] if temperature is None else temperature
        if sweep == "temperature":
            t = values if temperature is None else values + (temperature - shared["temperature_c"])
        fluid = fluid_for(shared["fluid"], t, shared["hematocrit"], shared["mass_fraction"])
        head = values if sweep == "head" else shared["head"]
        return Line(parts).solve(
            fluid,
            head=head,
            source_pressure=shared["source_pressure"],
            back_pressure=shared["back_pressure"],
        )

    def _x(self, candidate, sweep, values):
        """The chart's x for a candidate: the sweep values, or its bores [mm] for "bore"."""
        if sweep != "bore":
            return values
        sized = build_part(candidate["parts"][sized_part_index(candidate["parts"])])
        return sized.inner_diameter * 1e3 * values * SWEEPS["bore"][2]

    def _key(self, what, candidate, shared, sweep, *extra):
        """Cache key of what a curve or band depends on (the swept input left out)."""
        swept = {"head": "head", "temperature": "temperature_c"}.get(sweep)
        inputs = {k: v for k, v in shared.items() if k != swept}
        return (what, _freeze(candidate), _freeze(inputs), sweep, *extra)

    def curve(self, candidate):
        """(x in the shown unit, flow [m^3/s]) of one candidate, cached."""
        shared, sweep, values = self._shared(), self.controls["sweep"].value, self.sweep_values()
        key = self._key("curve", candidate, shared, sweep, values[0], values[-1], len(values))
        if key not in self._cache:
            result = self._solve(candidate, shared, sweep, values * SWEEPS[sweep][2])
            self._cache[key] = (
                self._x(candidate, sweep, values),
                np.asarray(result.flow, dtype=float),
            )
        return self._cache[key]

    def _samples(self):
        """The seeded tolerance samples: bore scale [-] and temperature [degC], or None."""
        bore_tol, temperature_tol = self._tolerances()
        u = np.random.default_rng(BAND_SEED).uniform(-1.0, 1.0, size=(2, BAND_SAMPLES, 1))
        scale = 1.0 + bore_tol * u[0] if bore_tol else None
        temperature = (
            self._shared()["temperature_c"] + temperature_tol * u[1] if temperature_tol else None
        )
        return scale, temperature

    def _percentiles(self, candidate, shared, sweep, values):
        """p5 and p95 of the flow [m^3/s] over the tolerance samples at each of ``values``.

        Percentiles are order statistics (``method="inverted_cdf"``).  With the bore as the
        only spread input, flow rises strictly with the bore (a property of the line engine,
        tested there), so the flows' order statistics are the flows at the bore samples'
        order statistics: two solves per point give exactly what solving all
        :data:`BAND_SAMPLES` samples gives (``tests/test_widgets.py`` checks the two agree).
        With a temperature spread too, every sample is solved.
        """
        scale, temperature = self._samples()
        if temperature is None:
            scale = np.percentile(scale, [5.0, 95.0], axis=0, method="inverted_cdf")
        result = self._solve(
            candidate,
            shared,
            sweep,
            values * SWEEPS[sweep][2],
            bore_scale=scale,
            temperature=temperature,
        )
        flows = np.asarray(result.flow, dtype=float)
        if temperature is None:
            return flows[0], flows[1]
        p5, p95 = np.percentile(flows, [5.0, 95.0], axis=0, method="inverted_cdf")
        return p5, p95

    def band(self, candidate):
        """(x, p5, p95 flow [m^3/s]) of one candidate's tolerance band, or None, cached.

        The band is solved at every curve point when the bore is the only spread input,
        else at :data:`BAND_POINTS` points (every sample solved there).
        """
        bore_tol, temperature_tol = self._tolerances()
        if bore_tol == 0 and temperature_tol == 0:
            return None
        shared, sweep = self._shared(), self.controls["sweep"].value
        values = self.sweep_values(None if temperature_tol == 0 else BAND_POINTS)
        key = self._key(
            "band",
            candidate,
            shared,
            sweep,
            values[0],
            values[-1],
            len(values),
            bore_tol,
            temperature_tol,
        )
        if key not in self._cache:
            p5, p95 = self._percentiles(candidate, shared, sweep, values)
            self._cache[key] = (self._x(candidate, sweep, values), p5, p95)
        return self._cache[key]

    def operating_point(self, candidate):
        """The line engine's result for one candidate at the shared inputs, cached."""
        shared = self._shared()
        key = ("point", _freeze(candidate), _freeze(shared))
        if key not in self._cache:
            descriptions = candidate["parts"]
            from rheoline import Line

            line = Line([build_part(d) for d in descriptions])
            fluid = fluid_for(
                shared["fluid"],
                shared["temperature_c"],
                shared["hematocrit"],
                shared["mass_fraction"],
            )
            self._cache[key] = line.solve(
                fluid,
                head=shared["head"],
                source_pressure=shared["source_pressure"],
                back_pressure=shared["back_pressure"],
            )
        return self._cache[key]

    # -- drawing -----------------------------------------------------------------------
    def _traces(self):
        traces = []
        for i, candidate in enumerate(self.candidates):
            s = series_style(i)
            traces.append(
                go.Scatter(
                    name=user_text(f"{candidate['name']} p5-p95"),
                    mode="lines",
                    fill="toself",
                    fillcolor=s["color"],
                    opacity=BAND_OPACITY,
                    line=dict(width=0),
                    hoverinfo="skip",
                    showlegend=False,
                    legendgroup=user_text(candidate["name"]),
                )
            )
        for i, candidate in enumerate(self.candidates):
            s = series_style(i)
            traces.append(
                go.Scatter(
                    name=user_text(candidate["name"]),
                    mode="lines+markers",
                    line=dict(color=s["color"], dash=s["dash"], width=2.5),
                    marker=dict(symbol=s["marker"], size=8, color=s["color"], maxdisplayed=12),
                    legendgroup=user_text(candidate["name"]),
                )
            )
        return traces

    def _refresh(self, parts):
        if len(self._cache) > 400:  # keep the cache from growing without bound
            self._cache.clear()
        names = [c["name"] for c in self.candidates]
        if list(self.chooser.options) != names:
            self.chooser.options = names
        if "curves" in parts:
            self._draw_curves()
        if "table" in parts:
            self._draw_table()

    def _draw_curves(self):
        fig = self.figures["curves"]
        sweep = self.controls["sweep"].value
        curves = [self.curve(c) for c in self.candidates]
        bands = [self.band(c) for c in self.candidates]
        n = len(self.candidates)
        with fig.batch_update():
            if len(fig.data) != 2 * n or any(
                t.name != user_text(c["name"])
                for t, c in zip(fig.data[n:], self.candidates, strict=False)
            ):
                fig.data = []
                fig.add_traces(self._traces())
            for i, ((x, flow), band) in enumerate(zip(curves, bands, strict=True)):
                fig.data[n + i].x, fig.data[n + i].y = x, flow / ML_PER_MIN
                if band is None:
                    fig.data[i].x, fig.data[i].y = [], []
                else:
                    bx, p5, p95 = band
                    fig.data[i].x = np.concatenate([bx, bx[::-1]])
                    fig.data[i].y = np.concatenate([p95, p5[::-1]]) / ML_PER_MIN
            fig.layout.xaxis.title.text = SWEEPS[sweep][0]
            title = f"Candidates: flow against {sweep}"
            if any(b is not None for b in bands):
                title += f" (shaded: p5-p95 of {BAND_SAMPLES} tolerance samples)"
            fig.layout.title.text = title

    def _draw_table(self):
        bore_tol, temperature_tol = self._tolerances()
        head = (
            "<tr><th>candidate</th><th>parts</th><th>flow [mL/min]</th><th>flow [mL/h]</th>"
            "<th>regime (max Re)</th><th>dominant part (share)</th>"
            "<th>max wall shear stress [Pa]</th>"
            + ("<th>flow p5-p95 [mL/min]</th>" if bore_tol or temperature_tol else "")
            + "<th>flags</th></tr>"
        )
        rows = []
        for candidate in self.candidates:
            r = self.operating_point(candidate)
            flow = float(r.flow)
            flags = [flag_text("caution", f) for f in r.flags]
            if str(r.regime) != "laminar":
                flags.insert(0, flag_text("caution", f"{r.regime} flow"))
            if float(r.max_wall_shear_stress) > HEMOLYSIS_CONCERN_STRESS and _is_blood(
                self.controls["fluid"].value
            ):
                flags.insert(
                    0,
                    flag_text(
                        "caution",
                        "hemolysis concern: wall shear stress above "
                        f"{HEMOLYSIS_CONCERN_STRESS:g} Pa",
                    ),
                )
            band_cell = ""
            if bore_tol or temperature_tol:
                band_cell = f"<td>{self._point_band(candidate)}</td>"
            parts = ", ".join(part_label(d, i) for i, d in enumerate(candidate["parts"], 1))
            rows.append(
                f"<tr><td><b>{user_text(candidate['name'])}</b></td>"
                f"<td>{user_text(parts)}</td>"
                f"<td class='rl-compare-flow'>{significant(flow / ML_PER_MIN)}</td>"
                f"<td>{significant(flow / ML_PER_H)}</td>"
                f"<td>{user_text(str(r.regime))} ({significant(float(r.max_reynolds))})</td>"
                f"<td>{user_text(str(r.dominant_part))} "
                f"({significant(100 * float(r.dominant_share), 2)} %)</td>"
                f"<td>{significant(float(r.max_wall_shear_stress))}</td>{band_cell}"
                f"<td>{user_text('; '.join(flags) or '[ok] ok: no flags')}</td></tr>"
            )
        shared = self._shared()
        self.table.value = (
            f"<div><b>At the operating point</b>: head {significant(shared['head'] * 100)} cm, "
            f"source pressure {significant(shared['source_pressure'] / MMHG)} mmHg, back "
            f"pressure {significant(shared['back_pressure'] / MMHG)} mmHg, "
            f"{user_text(shared['fluid'])} at {significant(shared['temperature_c'])} degC</div>"
            "<table class='rl-table' style='border-collapse:collapse' border='1' "
            f"cellpadding='4'>{head}{''.join(rows)}</table>"
        )

    def _point_band(self, candidate):
        """p5-p95 flow [mL/min] at the operating point, cached."""
        bore_tol, temperature_tol = self._tolerances()
        shared = self._shared()
        key = ("point-band", _freeze(candidate), _freeze(shared), bore_tol, temperature_tol)
        if key not in self._cache:
            p5, p95 = self._percentiles(
                candidate, shared, "head", np.asarray([shared["head"] / SWEEPS["head"][2]])
            )
            self._cache[key] = (
                f"{significant(p5[0] / ML_PER_MIN)}-{significant(p95[0] / ML_PER_MIN)}"
            )
        return self._cache[key]


def responsiveness_case(points: int = 200, bore_tolerance_percent: float = 5.0) -> ComparisonView:
    """The comparison the responsiveness target names: 7 candidates x ``points`` points with
    a :data:`BAND_SAMPLES`-sample bore tolerance band (catheters 14G-26G behind one set).

    Time one control change with :meth:`View.set_control`, e.g.
    ``view.set_control("temperature_c", 23.0)`` returns the update's Python time [s].
    """
    candidates = [
        {"name": f"set + {g}G", "parts": (_SET, {"type": "catheter", "gauge": g})}
        for g in CATHETER_GAUGES[:7]
    ]
    return ComparisonView(
        candidates=candidates, points=points, bore_tolerance_percent=bore_tolerance_percent
    )
