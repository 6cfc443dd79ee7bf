"""The line view: one scenario of the set, its line of parts, its fluid and its drive.

The view shows and edits one scenario of a :class:`~rheoline.widgets.document.ScenarioDocument`
(choose which above the parts).  Controls: the parts (type, gauge or bore, length), the fluid,
its temperature and hematocrit, the drive (gravity head plus a source pressure, or a
prescribed flow with a pressure limit) and the back pressure.  A control's change edits that
field of the scenario description and nothing else (:mod:`rheoline.widgets.edits`); every
field the view has no control for (tolerances, a volume to deliver, a vein) stays in the
set, and the status line names it.  A swept field is shown at the first point of its sweep,
and the status line says so.

Results: flow in the chosen flow unit (mL/min, mL/h, L/min or mL/s; the pump's set flow is
typed in it) and a second one, the required source pressure, the regime and largest Reynolds
number, the largest wall shear stress and the hemolysis index, the validity flags in words,
and three charts: the line drawn to scale with each part's share of the pressure drop, the
pressure budget (which part takes the drive) and the flow against the drive around the
current point.  The fluid and the line are built from the description
by the scenario layer's builder (:mod:`rheoline.widgets.scenario_models`); every number comes
from :meth:`rheoline.Line.solve`; this module converts units for display and draws.

Examples
--------
>>> view = LineView()
>>> sorted(view.figures), view.scenario.name
(['budget', 'drawing', 'drive'], 'line view')
"""

from __future__ import annotations

import functools
from dataclasses import replace

import ipywidgets as widgets
import numpy as np

from rheoline.errors import ScenarioError
from rheoline.scenario.description import (
    DEFAULT_TEMPERATURE_C,
    DriveSpec,
    FluidSpec,
    Scenario,
    ScenarioSet,
)
from rheoline.scenario.line_drawing import line_drawing
from rheoline.units import FLOW_UNITS, ML_PER_MIN
from rheoline.widgets.base import (
    _STYLE,
    CONTROL_FIELDS,
    View,
    drive_controls,
    fluid_controls,
    labelled,
)
from rheoline.widgets.document import ScenarioDocument
from rheoline.widgets.edits import (
    control_range,
    first_si,
    parsed,
    shown_amount,
    sweep_notes,
    unshown_fields,
    with_fields,
    written,
)
from rheoline.widgets.line_results import (
    budget_figure,
    draw_budget,
    draw_drive,
    drawing_of,
    drive_figure,
    results_html,
)
from rheoline.widgets.parts_editor import DEFAULT_PARTS, PartsEditor
from rheoline.widgets.scenario_models import drive_of, model_of, point_of
from rheoline.widgets.style import flag_html, user_text

__all__ = [
    "LineView",
    "line_scenario",
    "fluid_options",
    "DRIVE_MODES",
    "DRIVE_CURVE_POINTS",
    "SHOWN_FIELDS",
]

#: Drive modes: label -> meaning.
DRIVE_MODES = {
    "gravity and pressure": "flow at a head plus a source pressure",
    "set flow (pump)": "source pressure for a prescribed flow",
}
_PUMP = "set flow (pump)"
#: What the view says when the set holds branched scenarios only.
_NO_LINE = (
    "line view: the scenario set holds no line scenario (its branched scenarios are shown "
    "in the Network tab)"
)
#: Points on the flow-against-drive chart.
DRIVE_CURVE_POINTS = 41
#: The scenario fields the line view shows (the parts have their own rows).
SHOWN_FIELDS = frozenset(
    {
        "notes",
        "fluid",
        "temperature",
        "hematocrit",
        "mass_fraction",
        "head",
        "source_pressure",
        "back_pressure",
        "flow",
        "pressure_limit",
    }
)
#: control name -> the scenario field it shows.
_FIELD_OF = {
    **{k: v for k, v in CONTROL_FIELDS.items() if k != "fluid"},
    "flow_ml_min": "flow",
    "pressure_limit_mmhg": "pressure_limit",
}
_GRAVITY_FIELDS = ("head", "source_pressure")
_PUMP_FIELDS = ("flow", "pressure_limit")


@functools.lru_cache(maxsize=64)
def fluid_options(name: str) -> dict:
    """The options a library fluid takes and their defaults (``{"hematocrit": 0.45}``)."""
    from rheoline.model.fluids import FLUID_LIBRARY

    entry = FLUID_LIBRARY.get(name)
    return {} if entry is None else {k: v[0] for k, v in entry.options.items()}


def _option_fields(fluid, amounts):
    """The fluid's option fields from control amounts (None where it takes no such option)."""
    options = fluid_options(fluid)
    return {
        key: parsed(key, amounts[key]) if key in options else None
        for key in ("hematocrit", "mass_fraction")
    }


def line_scenario(
    name="line view",
    parts=DEFAULT_PARTS,
    fluid="saline-0.9",
    temperature_c=DEFAULT_TEMPERATURE_C,
    hematocrit=0.45,
    mass_fraction=0.4,
    head_cm=100.0,
    source_pressure_mmhg=0.0,
    back_pressure_mmhg=0.0,
    flow_ml_min=100.0,
    pressure_limit_mmhg=0.0,
    mode="gravity and pressure",
) -> Scenario:
    """A scenario description from the amounts the line view's controls show.

    A zero source or back pressure, or a zero pressure limit, is left out (as a file that
    does not give it); the options are given only for a fluid that takes them.
    """
    amounts = {"hematocrit": hematocrit, "mass_fraction": mass_fraction}
    sc = Scenario(name, FluidSpec(parsed("fluid", fluid)), DriveSpec(), tuple(parts))
    fields = {
        "temperature": parsed("temperature", written("temperature", temperature_c)),
        **_option_fields(fluid, amounts),
    }
    given = {"back_pressure": back_pressure_mmhg}
    if mode == _PUMP:
        fields["flow"] = parsed("flow", written("flow", flow_ml_min))
        given["pressure_limit"] = pressure_limit_mmhg
    else:
        fields["head"] = parsed("head", written("head", head_cm))
        given["source_pressure"] = source_pressure_mmhg
    for key, amount in given.items():
        if amount:
            fields[key] = parsed(key, written(key, amount))
    return with_fields(sc, **fields)


class LineView(View):
    """Build one line and see its flow, pressure, regime, shear and pressure budget.

    Parameters
    ----------
    parts : sequence of PartSpec, optional
        The parts, source to outlet (default: a 3.0 mm x 1.8 m set and an 18G catheter).
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
    document : ScenarioDocument, optional
        The set to show one scenario of (the app passes the one all views share); without
        it the view makes its own from the arguments above (scenario "line view").
    scenario : str, optional
        The name of the scenario to show first (default: the document's first).
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
        document: ScenarioDocument | None = None,
        scenario: str | None = None,
    ):
        super().__init__()
        if document is None:
            own = line_scenario(
                parts=parts,
                fluid=fluid,
                temperature_c=temperature_c,
                hematocrit=hematocrit,
                head_cm=head_cm,
                source_pressure_mmhg=source_pressure_mmhg,
                back_pressure_mmhg=back_pressure_mmhg,
                flow_ml_min=flow_ml_min,
                pressure_limit_mmhg=pressure_limit_mmhg,
                mode=mode,
            )
            document = ScenarioDocument(ScenarioSet((own,), source="<views>"))
        self.document = document
        self._name = scenario or next(iter(document.line_names()), None)
        self._build_controls(fluid, temperature_c, hematocrit, head_cm, flow_ml_min, mode)
        self.controls["pressure_limit_mmhg"].value = pressure_limit_mmhg
        self._built_key = self._point = self._model = None
        self.result = None
        self._build_figures()

        self._follow(self.document)
        self.controls["scenario"].observe(self._chosen, names="value")
        self._on_edit([n for n in self.controls if n not in ("scenario", "flow_unit")], self._edit)
        self.controls["flow_unit"].observe(self._unit_chosen, names="value")
        self._run(self._document_changed)
        self._widgetize(lazy)
        self._layout()
        self.status.add_class("rl-line-status")

    # -- building ----------------------------------------------------------------------
    def _build_controls(self, fluid, temperature_c, hematocrit, head_cm, flow_ml_min, mode):
        c = self.controls
        c["scenario"] = labelled(
            widgets.Dropdown(
                options=self.document.line_names(),
                value=self._name,
                description="scenario",
                style=_STYLE,
                layout=widgets.Layout(width="auto", max_width="100%"),
            ),
            "rl-scenario",
        )
        self.editor = PartsEditor(self.document.scenario(self._name).parts)
        c["parts"] = self.editor.version
        c.update(fluid_controls(fluid, temperature_c, hematocrit))
        c["mode"] = labelled(
            widgets.ToggleButtons(
                options=list(DRIVE_MODES), value=mode, description="drive", style=_STYLE
            ),
            "rl-mode",
        )
        c.update(drive_controls(head_cm, 0.0, 0.0))
        c["flow_unit"] = labelled(
            widgets.Dropdown(
                options=list(FLOW_UNITS), value="mL/min", description="flow unit", style=_STYLE
            ),
            "rl-flow-unit",
        )
        flow_range = control_range("flow")
        c["flow_ml_min"] = labelled(  # the pump's flow, in the unit chosen in "flow unit"
            widgets.BoundedFloatText(
                value=flow_ml_min,
                min=max(flow_range[0], 0.001),
                max=flow_range[1],
                step=5.0,
                description="set flow [mL/min]",
                style=_STYLE,
            ),
            "rl-set-flow",
        )
        c["pressure_limit_mmhg"] = labelled(
            widgets.BoundedFloatText(
                value=0.0,
                min=0.0,
                max=control_range("pressure_limit")[1],
                step=10.0,
                description="pressure limit [mmHg] (0 = none)",
                style=_STYLE,
            ),
            "rl-pressure-limit",
        )
        self.results = labelled(widgets.HTML(), "rl-results")
        self.notes = labelled(widgets.HTML(), "rl-scenario-notes")

    def _build_figures(self):
        self.figures["budget"] = budget_figure()
        self.figures["drive"] = drive_figure()
        self.figures["drawing"] = line_drawing([], [], [], [])

    def _layout(self):
        c = self.controls
        drive_box = widgets.VBox(
            [
                c["mode"],
                c["flow_unit"],
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
                self.two_columns(
                    [c["scenario"], self.notes, self.editor, fluid_box, drive_box],
                    [
                        self.results,
                        self.figure_box("drawing"),
                        self.figure_box("budget"),
                        self.figure_box("drive"),
                    ],
                )
            ]
        )

    # -- the scenario shown ------------------------------------------------------------
    @property
    def scenario(self) -> Scenario:
        """The scenario description the view shows (as the set holds it)."""
        if self._name is None:
            raise ScenarioError(_NO_LINE)
        return self.document.scenario(self._name)

    def show(self, name: str) -> bool:
        """Show the scenario called ``name``; True when it computed."""
        self._name = self.document.scenario(name).name
        return self._run(self._document_changed)

    def _chosen(self, change):
        if not self._paused and change.new is not None and change.new != self._name:
            self.show(change.new)

    def _document_changed(self):
        names = self.document.line_names()
        if not names:  # a set of branched scenarios only: the network view shows them
            self._show_no_line()
            return
        if self._name not in names:
            self._name = names[0]
        self._sync()
        self._refresh({"solve"})

    def _sync(self):
        """Set every control from the scenario (no edit), and the status line."""
        sc = self.scenario
        values = {k: first_si(v) for g in sc.groups() for k, v in g.items()}
        c = self.controls
        self._paused = True
        try:
            if list(c["scenario"].options) != self.document.line_names():
                c["scenario"].options = self.document.line_names()
            c["scenario"].value = sc.name
            if values["fluid"] not in c["fluid"].options:
                c["fluid"].options = [*c["fluid"].options, values["fluid"]]
            c["fluid"].value = values["fluid"]
            defaults = {"temperature": DEFAULT_TEMPERATURE_C, **fluid_options(values["fluid"])}
            defaults.update(back_pressure=0.0, source_pressure=0.0, pressure_limit=0.0)
            pump = sc.mode == "flow"
            c["mode"].value = _PUMP if pump else "gravity and pressure"
            for name, key in _FIELD_OF.items():
                value = values.get(key, defaults.get(key))
                inactive = key in (_GRAVITY_FIELDS if pump else _PUMP_FIELDS)
                if value is not None and not (inactive and key not in values):
                    c[name].value = self._shown_amount(key, value)
            self.editor.set_parts(sc.parts, notify=False)
            self.notes.value = f"<i>{user_text(sc.notes)}</i>" if sc.notes else ""
        finally:
            self._paused = False
        self._enable()
        self.say(*self.shown_summary())

    def _show_no_line(self):
        """The set holds no line scenario: say so, and show no number."""
        self._name = None
        self._paused = True
        try:
            self.controls["scenario"].options = []
        finally:
            self._paused = False
        self.editor.set_parts((), notify=False)
        self.notes.value = ""
        self.results.value = flag_html("note", _NO_LINE)
        self.say("note", _NO_LINE)

    def _enable(self):
        c = self.controls
        options = fluid_options(c["fluid"].value)
        c["hematocrit"].disabled = "hematocrit" not in options
        c["mass_fraction"].disabled = "mass_fraction" not in options
        pump = c["mode"].value == _PUMP
        for name in ("source_pressure_mmhg", "head_cm"):
            c[name].disabled = pump
        for name in ("flow_ml_min", "pressure_limit_mmhg"):
            c[name].disabled = not pump

    def shown_summary(self):
        """``(level, text)``: what the view shows of its scenario and what it does not
        ("ok" only when it shows every field of it at its only point)."""
        names = self.document.line_names()
        if not names:
            return "note", _NO_LINE
        sc = self.scenario
        text = f"line view: scenario {sc.name!r}"
        if len(names) > 1:
            text += f" ({names.index(sc.name) + 1} of {len(names)}; choose another above)"
        sweeps = sweep_notes(sc)
        hidden = unshown_fields(sc, SHOWN_FIELDS)
        if sweeps:
            text += f"; shown at the first point of its sweeps: {', '.join(sweeps)}"
        if hidden:
            text += f"; not shown here (kept in the set and in saved files): {', '.join(hidden)}"
        return ("note" if sweeps or hidden else "ok"), text

    def _failed(self, exc):
        # no number for inputs that did not compute (the charts keep the last that did)
        self.results.value = flag_html(
            "error",
            "no result for these inputs (see the message below); the charts show "
            "the last inputs that computed",
        )

    # -- edits -------------------------------------------------------------------------
    def _edit(self, name):
        """Write the change of control ``name`` into the scenario (that field only)."""
        sc = self.scenario
        new = self._edited(sc, name)
        if new != sc:
            self.document.replace({sc.name: new}, by=self)
        else:
            self._enable()

    def _edited(self, sc, name):
        c = self.controls
        pump = sc.mode == "flow"
        if name == "parts":
            return replace(sc, parts=self.editor.parts())
        if name == "fluid":
            amounts = {k: c[k].value for k in ("hematocrit", "mass_fraction")}
            fluid = c["fluid"].value
            return with_fields(sc, fluid=parsed("fluid", fluid), **_option_fields(fluid, amounts))
        if name == "mode":
            return self._mode_changed(sc, c["mode"].value == _PUMP)
        key = _FIELD_OF[name]
        if key in ("hematocrit", "mass_fraction") and key not in fluid_options(c["fluid"].value):
            return sc  # a disabled control: the fluid takes no such option
        if key in (_GRAVITY_FIELDS if pump else _PUMP_FIELDS):
            return sc  # a disabled control of the other drive mode
        amount = c[name].value
        if key == "pressure_limit" and not amount:
            return with_fields(sc, pressure_limit=None)  # 0 = no limit
        if key == "flow":
            return with_fields(sc, flow=parsed("flow", self._written_flow(amount)))
        return with_fields(sc, **{key: parsed(key, written(key, amount))})

    # -- the flow unit -----------------------------------------------------------------
    @property
    def flow_unit(self) -> tuple[str, float]:
        """The flow unit chosen for the view: (name, m^3/s in one unit)."""
        name = self.controls["flow_unit"].value
        return name, FLOW_UNITS[name]

    def _written_flow(self, amount) -> str:
        """The pump's flow as a file writes it, in the chosen unit (``"100 mL/h"``)."""
        return f"{float(amount):.12g} {self.flow_unit[0]}"

    def _shown_amount(self, key, si) -> float:
        """A field's SI value in its control's unit (the flow in the chosen unit)."""
        if key == "flow":
            return float(f"{float(si) / self.flow_unit[1]:.12g}")
        return shown_amount(key, si)

    def _unit_chosen(self, change):
        """Show the set flow, its range, the results and the charts in the chosen unit (the
        scenario is not edited: the flow is the same)."""
        box = self.controls["flow_ml_min"]
        flow_si = box.value * FLOW_UNITS[change.old]
        low, high = (float(b) * ML_PER_MIN / self.flow_unit[1] for b in control_range("flow"))
        self._paused = True
        try:
            box.max = max(high, box.max)
            box.min = max(low, 1e-6)
            box.max = high
            box.value = float(f"{flow_si / self.flow_unit[1]:.12g}")
            box.description = f"set flow [{self.flow_unit[0]}]"
        finally:
            self._paused = False
        self._run(lambda: self._refresh({"solve"}))

    def _mode_changed(self, sc, pump):
        c = self.controls
        if pump == (sc.mode == "flow"):
            return sc
        fields = dict.fromkeys(_GRAVITY_FIELDS + _PUMP_FIELDS)
        if pump:
            fields["flow"] = parsed("flow", self._written_flow(c["flow_ml_min"].value))
            limit = c["pressure_limit_mmhg"].value
            fields["pressure_limit"] = (
                parsed("pressure_limit", written("pressure_limit", limit)) if limit else None
            )
        else:
            fields["head"] = parsed("head", written("head", c["head_cm"].value))
            pressure = c["source_pressure_mmhg"].value
            fields["source_pressure"] = (
                parsed("source_pressure", written("source_pressure", pressure))
                if pressure
                else None
            )
        return with_fields(sc, **fields)

    # -- inputs to the line engine -------------------------------------------------------
    def _built(self):
        """The builder's point and model objects of the scenario shown (rebuilt only when
        the scenario changed)."""
        sc = self.scenario
        if sc != self._built_key:
            point = point_of(sc)
            self._model = model_of(point)
            self._point, self._built_key = point, sc
        return self._point, self._model

    def line(self):
        """The line of the scenario shown, as the scenario layer builds it."""
        return self._built()[1].line

    def fluid(self):
        """The fluid of the scenario shown, as the scenario layer builds it."""
        return self._built()[1].fluid

    def drive(self) -> dict:
        """Keyword arguments of :meth:`rheoline.Line.solve` for the current drive (SI)."""
        return drive_of(self._built()[0])

    def solve(self):
        """The line engine's result for the scenario shown."""
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

    # -- drawing -----------------------------------------------------------------------
    def _refresh(self, parts):
        self._enable()
        result = self.solve()
        self.result = result
        x, y = self.drive_curve()
        pump = "flow" in self.drive()
        self.results.value = results_html(result, pump, self.flow_unit)
        parts = self.line().parts
        draw_budget(self.figures["budget"], result, [p.name for p in parts])
        self.replace_figure("drawing", drawing_of(parts, result))
        draw_drive(self.figures["drive"], result, x, y, self.drive(), self.flow_unit)
