"""The comparison view: the scenarios' lines on one chart, tolerance bands, and a table.

The view draws the candidates of a scenario set (:mod:`.compare_candidates`: each scenario
with a gravity or pressure drive, one candidate per point of its part sweeps, at most
:data:`~.compare_candidates.MAX_SHOWN_CANDIDATES`) as flow against head, bore or
temperature (:mod:`.compare_solve` computes the numbers), each at its own inputs.  The
shared controls show the first candidate's fluid, drive and tolerances; a change sets that
field in every scenario drawn.  "add candidate" adds a scenario to the set, "remove
selected" removes scenarios (or points of a part sweep).  The status line names every
scenario and field the view does not draw.  The table gives each candidate at its
operating point.

Responsiveness: every candidate's curve, band and table row are cached under the
description they depend on, so a control change recomputes only what it changed (adding a
candidate solves that candidate only), and all traces are set in one ``fig.batch_update()``.

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

from rheoline.errors import RheolineError
from rheoline.scenario.description import ScenarioSet
from rheoline.units import FLOW_UNITS
from rheoline.widgets.base import _STYLE, View, drive_controls, fluid_controls, labelled
from rheoline.widgets.compare_candidates import (
    DEFAULT_SET_PART,
    MAX_SHOWN_CANDIDATES,
    SHARED,
    default_candidates,
    differences,
    find_candidates,
    not_drawn,
    shared_amounts,
    shared_scenario,
    sweep_words,
    with_shared,
)
from rheoline.widgets.compare_draw import draw_curves, row_flags, row_html, table_html
from rheoline.widgets.compare_solve import (
    BAND_POINTS,
    BAND_SAMPLES,
    SWEEPS,
    CandidateSolver,
)
from rheoline.widgets.document import ScenarioDocument
from rheoline.widgets.edits import without_points
from rheoline.widgets.figures import BASE_LAYOUT
from rheoline.widgets.line_view import fluid_options
from rheoline.widgets.parts_editor import (
    CATHETER_GAUGES,
    NEEDLE_GAUGES,
    part_label,
    part_spec,
)
from rheoline.widgets.style import flag_html

__all__ = [
    "ComparisonView",
    "responsiveness_case",
    "SWEEPS",
    "BAND_SAMPLES",
    "BAND_POINTS",
]

#: The unit of a sweep's "from" and "to" fields (the bore sweeps a share of the nominal bore).
SWEEP_INPUT_UNITS = {"head": "cm", "bore": "% of nominal bore", "temperature": "degC"}

_EVERYTHING = frozenset({"curves", "table"})


class ComparisonView(View):
    """The set's lines side by side: flow against head, bore or temperature.

    Parameters
    ----------
    document : ScenarioDocument, optional
        The set to compare (the app passes the one all views share); without it the view
        makes its own of ``candidates``.
    candidates : sequence of (str, sequence of PartSpec), optional
        Named lines for a view's own set, each at the inputs below (default: an 18G
        catheter and its neighbours behind a 3.0 mm x 1.8 m set).
    fluid, temperature_c, hematocrit : inputs of the candidates of a view's own set.
    head_cm, source_pressure_mmhg, back_pressure_mmhg : their drive.
    bore_tolerance_percent, temperature_tolerance_c : float
        Their tolerance half-widths (0 = no band).
    sweep : str
        A key of :data:`SWEEPS`.
    points : int
        Points per curve.
    lazy : bool
        Keep the chart a plain figure until :meth:`show_figures`.
    line_source : callable, optional
        Returns the line view's scenario (the app passes it); a button then adds a copy of
        it to the set.
    """

    title = "Compare"

    def __init__(
        self,
        candidates=None,
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
        document: ScenarioDocument | None = None,
    ):
        super().__init__()
        self.solver = CandidateSolver()
        self.points = int(points)
        self.line_source = line_source
        c = self.controls
        c.update(fluid_controls(fluid, temperature_c, hematocrit))
        c.update(drive_controls(head_cm, source_pressure_mmhg, back_pressure_mmhg))
        self._build_tolerance_controls(bore_tolerance_percent, temperature_tolerance_c)
        if document is None:
            document = ScenarioDocument(
                ScenarioSet(self._own_scenarios(candidates), source="<views>")
            )
        self.document = document
        self.candidates, self._found = [], None
        self._build_sweep_controls(sweep)
        self._build_candidate_controls()
        self.figures["curves"] = go.Figure(
            layout=go.Layout(
                title="Candidates: flow against head",
                yaxis_title="flow [mL/min]",
                xaxis_title=SWEEPS[sweep][0],
                **{**BASE_LAYOUT, "height": 420},
            ),
        )
        self._follow(self.document)
        self._on_edit(list(SHARED), self._edit_shared)
        self._watch(
            {"sweep_from": {"curves"}, "sweep_to": {"curves"}, "flow_unit": {"curves", "table"}}
        )
        c["sweep"].observe(self._sweep_changed, names="value")
        self._run(self._document_changed)
        self._widgetize(lazy)
        self._layout()
        self.status.add_class("rl-compare-status")

    # -- building ----------------------------------------------------------------------
    def _own_scenarios(self, candidates):
        amounts = self.shared_amounts()
        if candidates is None:
            return default_candidates(amounts)
        return tuple(shared_scenario(name, parts, amounts) for name, parts in candidates)

    def _build_tolerance_controls(self, bore_percent, temperature_c):
        c = self.controls
        c["bore_tolerance_percent"] = labelled(
            widgets.BoundedFloatText(
                value=bore_percent,
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
                value=temperature_c,
                min=0.0,
                max=20.0,
                step=0.5,
                description="temperature tolerance +/- [degC]",
                style=_STYLE,
            ),
            "rl-temperature-tolerance",
        )

    def _build_sweep_controls(self, sweep):
        c = self.controls
        c["sweep"] = labelled(
            widgets.ToggleButtons(
                options=list(SWEEPS), value=sweep, description="flow against", style=_STYLE
            ),
            "rl-sweep",
        )
        c["flow_unit"] = labelled(
            widgets.Dropdown(
                options=list(FLOW_UNITS), value="mL/min", description="flow unit", style=_STYLE
            ),
            "rl-flow-unit",
        )
        low, high = SWEEPS[sweep][1]
        unit = SWEEP_INPUT_UNITS[sweep]
        c["sweep_from"] = labelled(
            widgets.BoundedFloatText(
                value=low, min=0.0, max=1e4, description=f"from [{unit}]", style=_STYLE
            ),
            "rl-sweep-from",
        )
        c["sweep_to"] = labelled(
            widgets.BoundedFloatText(
                value=high, min=0.0, max=1e4, description=f"to [{unit}]", style=_STYLE
            ),
            "rl-sweep-to",
        )

    def _build_candidate_controls(self):
        self.new_kind = widgets.Dropdown(
            options=["catheter", "needle"], value="catheter", layout=widgets.Layout(width="110px")
        )
        self.new_gauge = widgets.Dropdown(
            options=[(f"{g}G", g) for g in CATHETER_GAUGES],
            value=14,
            layout=widgets.Layout(width="80px"),
        )
        self.new_behind_set = widgets.Checkbox(
            value=True,
            description="behind the 3.0 mm x 1.8 m set",
            indent=False,
            layout=widgets.Layout(width="auto"),
        )
        self.add_button = labelled(
            widgets.Button(description="add candidate", icon="plus"), "rl-add-candidate"
        )
        self.add_button.on_click(lambda b: self._run(self._add_new))
        self.chooser = labelled(
            widgets.SelectMultiple(options=[], rows=4, description="candidates", style=_STYLE),
            "rl-candidates",
        )
        self.remove_button = labelled(
            widgets.Button(description="remove selected", icon="trash"), "rl-remove-candidate"
        )
        self.remove_button.on_click(
            lambda b: self._run(lambda: self.remove_candidates(self.chooser.value))
        )
        self.table = labelled(widgets.HTML(), "rl-compare-table")
        self.add_line_button = labelled(
            widgets.Button(
                description="add the line view's scenario",
                icon="plus",
                layout=widgets.Layout(width="auto", display=None if self.line_source else "none"),
            ),
            "rl-add-line",
        )
        self.add_line_button.on_click(lambda b: self._run(self._add_line))
        self.new_kind.observe(self._kind_changed, names="value")

    def _layout(self):
        c = self.controls
        adder = widgets.VBox(
            [
                widgets.HBox([self.new_kind, self.new_gauge]),
                self.new_behind_set,
                widgets.HBox([self.add_button, self.add_line_button]),
            ]
        )
        inputs = [
            adder,
            widgets.HBox([self.chooser, self.remove_button]),
            c["fluid"],
            c["temperature_c"],
            c["hematocrit"],
            c["mass_fraction"],
            c["head_cm"],
            c["source_pressure_mmhg"],
            c["back_pressure_mmhg"],
            c["bore_tolerance_percent"],
            c["temperature_tolerance_c"],
            c["flow_unit"],
            c["sweep"],
            c["sweep_from"],
            c["sweep_to"],
        ]
        self._finish([self.two_columns(inputs, [self.figure_box("curves")]), self.table])

    # -- the set's candidates ----------------------------------------------------------
    def _document_changed(self):
        self._sync()
        self._refresh(_EVERYTHING)

    def _sync(self):
        """Find the candidates, set the shared controls from the first (no edit), and say
        what the view draws."""
        self._found = find_candidates(self.document.scenarios)
        self.candidates = list(self._found.shown)
        if self.candidates:
            amounts = self._amounts(self.candidates[0])
            self._paused = True
            try:
                for name, amount in amounts.items():
                    if amount is not None:
                        self.controls[name].value = amount
            finally:
                self._paused = False
        self._enable()
        names = [c.name for c in self.candidates]
        if list(self.chooser.options) != names:
            self.chooser.options = names
        self.say(*self.shown_summary())

    def _amounts(self, candidate):
        return shared_amounts(candidate, self._bore_fraction(candidate))

    def shared_amounts(self) -> dict:
        """What the shared controls show: ``{control: amount}``."""
        return {name: self.controls[name].value for name in SHARED}

    def shown_summary(self):
        """``(level, text)``: what the view draws of the set and what it does not ("ok"
        only when it draws every scenario with every field)."""
        found = self._found
        if not self.candidates:
            text = "comparison: no scenario with a gravity or pressure drive to compare"
            if found.pumps:
                text += f"; pump scenarios (the line view shows them): {_quoted(found.pumps)}"
            if found.networks:
                text += (
                    f"; branched scenarios (the Network tab shows them): {_quoted(found.networks)}"
                )
            return "note", text
        scenarios = list(dict.fromkeys(c.scenario for c in self.candidates))
        n = len(self.candidates)
        text = f"comparison: {n} candidate{'s' * (n != 1)} from {_quoted(scenarios)}"
        notes = []
        if found.hidden:
            notes.append(
                f"not drawn (the first {MAX_SHOWN_CANDIDATES} are): {_quoted(found.hidden)}"
            )
        if found.pumps:
            notes.append(f"pump scenarios, not compared here: {_quoted(found.pumps)}")
        if found.networks:
            notes.append(f"branched scenarios, drawn in the Network tab: {_quoted(found.networks)}")
        notes += self._per_scenario_notes()
        if len(scenarios) > 1:
            text += (
                "; each is drawn at its own inputs; the shared controls show "
                f"{self.candidates[0].scenario!r} and set every scenario drawn"
            )
        return ("note" if notes else "ok"), "; ".join([text, *notes])

    def _per_scenario_notes(self):
        notes, seen = [], set()
        shown = self.shared_amounts()
        for candidate in self.candidates:
            if candidate.scenario in seen:
                continue
            seen.add(candidate.scenario)
            name = repr(candidate.scenario)
            sweeps = sweep_words(candidate)
            if sweeps:
                notes.append(f"{name} at the first point of its sweeps: {', '.join(sweeps)}")
            unused = not_drawn(candidate)
            if unused:
                notes.append(f"{name}: not drawn here: {', '.join(unused)}")
            differ = differences(candidate, shown, self._bore_fraction(candidate))
            if differ:
                notes.append(f"{name} differs from the shared controls: {', '.join(differ)}")
        return notes

    def _failed(self, exc):
        # no table for inputs that did not compute (the chart keeps the last that did)
        self.table.value = flag_html(
            "error",
            "no table for these inputs (see the message below); the chart shows the "
            "last inputs that computed",
        )

    # -- edits of the set --------------------------------------------------------------
    def _edit_shared(self, name):
        """Set the field control ``name`` shows in every scenario drawn."""
        amount = self.controls[name].value
        amounts = self.shared_amounts()
        changes = {}
        for scenario_name in dict.fromkeys(c.scenario for c in self.candidates):
            sc = self.document.scenario(scenario_name)
            new = with_shared(sc, name, amount, amounts)
            if new != sc:
                changes[scenario_name] = new
        self._enable()
        if changes:
            self.document.replace(changes, by=self)

    def add_candidate(self, name: str, parts):
        """Add a scenario ``name`` of ``parts`` (PartSpecs) at the shared controls' inputs
        (only it gets solved); returns the scenario as the set keeps it."""
        sc = shared_scenario(name, parts, self.shared_amounts())
        return self.document.add(sc, by=self)

    def add_scenario(self, scenario):
        """Add a copy of ``scenario`` (renamed if its name is taken) to the set."""
        return self.document.add(scenario, by=self)

    def _add_new(self):
        kind, gauge = self.new_kind.value, self.new_gauge.value
        part = part_spec(kind, gauge=gauge)
        behind = self.new_behind_set.value
        parts = [DEFAULT_SET_PART, part] if behind else [part]
        self.add_candidate(f"{'set + ' if behind else ''}{gauge}G {kind}", parts)

    def _add_line(self):
        self.add_scenario(self.line_source())

    def remove_candidates(self, names):
        """Remove the named candidates: a whole scenario, or the points of its one part
        sweep (at least one candidate stays)."""
        chosen = [c for c in self.candidates if c.name in set(names)]
        if not chosen:
            return
        if len(chosen) == len(self.candidates) and not self._found.hidden:
            raise RheolineError("the comparison keeps at least one candidate; add another first")
        changes, gone = {}, []
        for scenario_name in dict.fromkeys(c.scenario for c in chosen):
            sc = self.document.scenario(scenario_name)
            points = [dict(c.chosen) for c in chosen if c.scenario == scenario_name]
            if not points[0] or len(points) == _n_points(sc):
                gone.append(scenario_name)
                continue
            paths = list(points[0])
            if len(paths) > 1:
                raise RheolineError(
                    f"{scenario_name!r} sweeps {' and '.join(paths)} together; remove the "
                    "whole scenario, or change its sweep in the file"
                )
            changes[scenario_name] = without_points(sc, paths[0], [p[paths[0]] for p in points])
        if changes:
            self.document.replace(changes, by=self)
        if gone:
            self.document.remove(gone, by=self)

    def _kind_changed(self, change):
        gauges = CATHETER_GAUGES if change.new == "catheter" else NEEDLE_GAUGES
        self.new_gauge.options = [(f"{g}G", g) for g in gauges]
        self.new_gauge.value = gauges[len(gauges) // 2]

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
            c["sweep_from"].description = f"from [{SWEEP_INPUT_UNITS[change.new]}]"
            c["sweep_to"].description = f"to [{SWEEP_INPUT_UNITS[change.new]}]"
        finally:
            self._paused = False
        self._run(lambda: self._refresh({"curves"}))

    def sweep_values(self, n=None):
        """The sweep grid in the shown unit (cm, mm or degC)."""
        c = self.controls
        low, high = sorted((c["sweep_from"].value, c["sweep_to"].value))
        if high == low:
            high = low + 1.0
        return np.linspace(low, high, self.points if n is None else n)

    def curve(self, candidate):
        """(x in the shown unit, flow [m^3/s]) of one candidate, cached."""
        sweep = self.controls["sweep"].value
        return self.solver.curve(candidate.description, sweep, self.sweep_values())

    def band(self, candidate):
        """(x, p5, p95 flow [m^3/s]) of one candidate's tolerance band, or None, cached."""
        sweep = self.controls["sweep"].value
        return self.solver.band(
            candidate.description, sweep, self.sweep_values(), self.sweep_values(BAND_POINTS)
        )

    def operating_point(self, candidate):
        """The line engine's result for one candidate at its own inputs, cached."""
        return self.solver.operating_point(candidate.description)

    # -- drawing -----------------------------------------------------------------------
    def _refresh(self, parts):
        names = [c.name for c in self.candidates]
        if "curves" in parts:
            curves = [self.curve(c) for c in self.candidates]
            bands = [self.band(c) for c in self.candidates]
            draw_curves(
                self.figures["curves"],
                names,
                curves,
                bands,
                self.controls["sweep"].value,
                self.flow_unit,
            )
        if "table" in parts:
            self._draw_table()

    def _draw_table(self):
        shared = self.shared_amounts()
        bands = [self.solver.point_band(c.description) for c in self.candidates]
        banded = any(b is not None for b in bands)
        rows = []
        for candidate, band in zip(self.candidates, bands, strict=True):
            result = self.operating_point(candidate)
            differ = differences(candidate, shared, self._bore_fraction(candidate))
            parts = ", ".join(part_label(p, i) for i, p in enumerate(candidate.parts, 1))
            flags = row_flags(result, differ)
            rows.append(
                row_html(candidate.name, parts, result, band, flags, banded, self.flow_unit)
            )
        self.table.value = table_html(rows, banded, shared, self.flow_unit[0])

    @property
    def flow_unit(self) -> tuple[str, float]:
        """The flow unit chosen for the chart and the table: (name, m^3/s in one unit)."""
        name = self.controls["flow_unit"].value
        return name, FLOW_UNITS[name]

    def _bore_fraction(self, candidate):
        return self.solver.tolerances(candidate.description)[0]


def _quoted(names) -> str:
    return ", ".join(repr(n) for n in names)


def _n_points(sc) -> int:
    n = 1
    for path, axis in sc.axes:
        if path.startswith("part["):
            n *= len(axis)
    return n


def responsiveness_case(points: int = 200, bore_tolerance_percent: float = 5.0) -> ComparisonView:
    """The comparison the responsiveness target names: 7 candidates x ``points`` points with
    a :data:`BAND_SAMPLES`-sample bore tolerance band (catheters 14G-26G behind one set).

    Time one control change with :meth:`View.set_control`, e.g.
    ``view.set_control("temperature_c", 23.0)`` returns the update's Python time [s].
    """
    candidates = [
        (f"set + {g}G", (DEFAULT_SET_PART, part_spec("catheter", gauge=g)))
        for g in CATHETER_GAUGES[:7]
    ]
    return ComparisonView(
        candidates=candidates, points=points, bore_tolerance_percent=bore_tolerance_percent
    )
