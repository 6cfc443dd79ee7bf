"""The branched-line view: a drawn network, its flows, and reversed flow in words and shape.

Pick a branched scenario (the shipped examples' by default: an invented trauma bay and an
invented ward), set the fluid, its temperature and hematocrit, and the drives at the nodes
(a bag's head and pressure, a source's pressure, a pump's rate and pressure limit, an
outlet's pressure), pick a branch and edit its parts as the line view edits a line's (the
same parts editor, :class:`~rheoline.widgets.parts_editor.PartsEditor`), and read what each
branch does: the diagram
(:func:`rheoline.widgets.network_draw.network_figure`) draws every branch with an arrow
in the direction its flow takes, dashed with its arrow pointing back and the word
"REVERSED" where the flow runs against the branch's direction, dotted and "closed" where a
check valve holds it; the results list each branch in words, the total flow into the
outlets and the flags.

The view edits one :class:`~rheoline.scenario.description.Scenario` (its topology is the
description's): each control replaces one field through the scenario layer
(:meth:`Scenario.with_field` with :func:`rheoline.scenario.written_values.value_of`; the parts
editor one branch's parts, :meth:`TopologySpec.with_branch_parts`), the edited
set is checked by the reader (:func:`~rheoline.scenario.reading.parse_scenarios`) and run
by :func:`~rheoline.scenario.run.run_scenarios`; no physics here.  A swept scenario is
shown at its first sweep point.  The caution banner is on top; every user string is
escaped.

Examples
--------
>>> view = NetworkView()
>>> sorted(view.figures), view.controls["scenario"].value
(['network'], 'pressure bag')
>>> _ = view.set_control("scenario", "Y-site without a check valve")
>>> view.controls["node[2].flow"].value                   # the pump's rate [mL/h]
100.0
>>> "REVERSED" in view.results.value
False
>>> _ = view.set_control("node[2].flow", 1500.0)
>>> "Reversed flow: 6.37 mL/min in gravity set" in view.results.value
True
"""

from __future__ import annotations

import math
from dataclasses import replace

import ipywidgets as widgets

from rheoline.scenario.description import ScenarioSet, Value
from rheoline.units import FLOW_UNITS, from_unit, per_ml_min, to_unit
from rheoline.widgets.base import _STYLE, View, fluid_controls, labelled, number_field
from rheoline.widgets.network_draw import branch_words, network_figure
from rheoline.widgets.parts_editor import PartsEditor
from rheoline.widgets.style import flag_html, significant, user_text

__all__ = ["NetworkView", "NODE_CONTROLS", "single_point", "branched_examples"]

#: Per node type: (field, label, display unit, unit kind, step) of each drive control.
NODE_CONTROLS = {
    "bag": (
        ("head", "head", "cm", "length", 5.0),
        ("pressure", "pressure", "mmHg", "pressure", 10.0),
    ),
    "source": (
        ("pressure", "pressure", "mmHg", "pressure", 10.0),
        ("head", "head", "cm", "length", 5.0),
    ),
    "pump": (
        ("flow", "rate", "mL/h", "flow", 10.0),
        ("pressure_limit", "pressure limit (0 = none)", "mmHg", "pressure", 10.0),
    ),
    "outlet": (("pressure", "pressure", "mmHg", "pressure", 1.0),),
    "junction": (),
}
#: Fields a control may clear by reading 0 (no bag pressure, no pump limit).
_OPTIONAL_AT_ZERO = {("bag", "pressure"), ("pump", "pressure_limit")}
_FLUID_FIELDS = {
    "temperature_c": "temperature",
    "hematocrit": "hematocrit",
    "mass_fraction": "mass_fraction",
}


def branched_examples():
    """The branched scenarios of the shipped example files (a tuple of Scenario)."""
    from rheoline.scenario.reading import example_names, example_path, load_scenarios

    out = []
    for name in example_names():
        out += [s for s in load_scenarios(example_path(name)).scenarios if s.topology is not None]
    return tuple(out)


def single_point(scenario):
    """``scenario`` with every swept field at its first value (an :class:`Axis` becomes a
    :class:`Value` written as the file wrote that value, where it did)."""
    for path, axis in scenario.axes:
        written = axis.written[0] if isinstance(axis.written, tuple) else None
        scenario = scenario.with_field(path, Value(axis.values[0], written))
    return scenario


def _node_path(i, key):
    return f"node[{i}].{key}"


class NetworkView(View):
    """Draw a branched line and read its branch flows, with reversed flow marked.

    Parameters
    ----------
    scenarios : sequence of Scenario, optional
        Branched scenarios to choose from when no document holds any (default
        :func:`branched_examples`).
    lazy : bool
        Keep the diagram a plain figure until :meth:`show_figures`.
    document : ScenarioDocument, optional
        The scenario set the views share (:mod:`rheoline.widgets.document`).  While it
        holds branched scenarios the view offers those and writes every edit into it (so a
        saved file or a review pack holds the edit); while it holds none, the view offers
        ``scenarios`` and keeps its edits to itself.
    """

    title = "Network"

    def __init__(self, scenarios=None, lazy: bool = False, document=None):
        super().__init__()
        self.document = document
        chosen = tuple(scenarios) if scenarios is not None else None
        self._own = {s.name: s for s in (chosen or ()) if s.topology is not None}
        self._editing = False
        self.sources = self._offered()
        if not self.sources:
            raise ValueError("the network view needs at least one branched scenario")
        first = single_point(next(iter(self.sources.values())))
        self.scenario = first
        self.run = None
        c = self.controls
        c["scenario"] = labelled(
            widgets.Dropdown(
                options=list(self.sources), value=first.name, description="scenario", style=_STYLE
            ),
            "rl-network-scenario",
        )
        fluid = first.fluid
        c.update(
            fluid_controls(
                fluid.name.si,
                first.values["temperature"],
                fluid.hematocrit.si if fluid.hematocrit else 0.45,
                fluid.mass_fraction.si if fluid.mass_fraction else 0.4,
            )
        )
        # each node's drives side by side, wrapping to the next line where the column ends
        self.node_box = widgets.Box(layout=widgets.Layout(flex_flow="row wrap"))
        self.node_box.add_class("rl-network-nodes")
        c["branch"] = labelled(  # as wide as its column: a branch's name and its ends
            widgets.Dropdown(
                options=[], description="branch", style=_STYLE, layout=widgets.Layout(width="auto")
            ),
            "rl-network-branch",
        )
        self.editor = PartsEditor(())
        c["parts"] = self.editor.version
        c["flow_unit"] = labelled(
            widgets.Dropdown(
                options=list(FLOW_UNITS), value="mL/min", description="flow unit", style=_STYLE
            ),
            "rl-network-flow-unit",
        )
        self.results = labelled(widgets.HTML(), "rl-network-results")
        self.figures["network"] = network_figure_placeholder()
        self._build_node_controls()
        self._show_branches()
        c["scenario"].observe(self._picked, names="value")
        c["branch"].observe(self._branch_picked, names="value")
        self._observe("flow_unit", lambda name: self._show_run())
        self._observe("parts", self._edit_parts)
        for name in ("fluid", *_FLUID_FIELDS):
            self._observe(name, self._edit_fluid)
        if document is not None:
            self._follow(document)
        self._run(self._solve)
        self._widgetize(lazy)
        fluid_box = widgets.VBox(
            [c["fluid"], c["temperature_c"], c["hematocrit"], c["mass_fraction"]]
        )
        inputs = [
            c["scenario"],
            fluid_box,
            c["flow_unit"],
            self.node_box,
            widgets.VBox([c["branch"], self.editor], layout=widgets.Layout(margin="6px 0")),
        ]
        self._finish([self.two_columns(inputs, [self.results, self.figure_box("network")])])

    # -- the scenarios offered ---------------------------------------------------------
    @property
    def from_document(self) -> bool:
        """Whether the view shows the shared set's branched scenarios (and edits them)."""
        return self.document is not None and bool(self.document.branched())

    def _offered(self):
        """``{name: scenario}``: the document's branched scenarios, else the view's own."""
        if self.from_document:
            return {s.name: s for s in self.document.branched()}
        if not self._own:
            self._own = {s.name: s for s in branched_examples()}
        return dict(self._own)

    def _document_changed(self):
        """Another view changed the set (a file was loaded): offer its branched scenarios."""
        if self._editing:
            return
        offered = self._offered()
        if offered == self.sources:
            return
        self.sources = offered
        name = self.scenario.name if self.scenario.name in offered else next(iter(offered))
        self._paused = True
        try:
            self.controls["scenario"].options = list(offered)
            self.controls["scenario"].value = name
        finally:
            self._paused = False
        self._choose()

    def shown_summary(self):
        """``(level, text)``: what the view shows of the set's branched scenarios."""
        if not self.from_document:
            return "ok", "network view: the set holds no branched scenario"
        names = list(self.sources)
        sc = self.sources[self.scenario.name]
        text = (
            f"network view: scenario {sc.name!r} ({names.index(sc.name) + 1} of "
            f"{len(names)} branched; choose another above)"
        )
        if sc.axes:
            text += "; shown at the first point of its sweeps: " + ", ".join(
                f"{path} {axis.shown[0]}" for path, axis in sc.axes
            )
        return "note", text

    # -- controls ------------------------------------------------------------------
    def _observe(self, name, handler):
        def observer(change, name=name):
            if not self._paused:
                self._run(lambda: handler(name))

        self.controls[name].observe(observer, names="value")

    def _picked(self, change):
        if not self._paused and change.new is not None:
            self._run(self._choose)

    def _build_node_controls(self):
        """One row of drive controls per node that has drives (rebuilt per scenario)."""
        from rheoline.scenario.schema import field_spec

        for name in [k for k in self.controls if k.startswith("node[")]:
            del self.controls[name]
        rows = []
        for i, node in enumerate(self.scenario.topology.nodes, start=1):
            boxes = []
            for key, label, unit, kind, step in NODE_CONTROLS[node.type]:
                spec = field_spec(_node_path(i, key), node.type)
                low = (
                    0.0 if (node.type, key) in _OPTIONAL_AT_ZERO else to_unit(spec.low, unit, kind)
                )
                value = node.values.get(key, 0.0)
                name = _node_path(i, key)
                self.controls[name] = number_field(
                    float(to_unit(value, unit, kind)),
                    float(low),
                    float(to_unit(spec.high, unit, kind)),
                    step,
                    f"{label} [{unit}]",
                    f"rl-node-{key.replace('_', '-')}",
                )
                self._observe(name, self._edit_node)
                boxes.append(self.controls[name])
            if boxes:
                title = widgets.HTML(f"<b>{user_text(node.name)}</b> ({user_text(node.type)})")
                rows.append(
                    widgets.VBox([title, *boxes], layout=widgets.Layout(margin="0 12px 0 0"))
                )
        self.node_box.children = rows

    def _choose(self):
        """Show the scenario picked in the dropdown (controls set to its values)."""
        self.scenario = single_point(self.sources[self.controls["scenario"].value])
        fluid = self.scenario.fluid
        self._paused = True
        try:
            c = self.controls
            c["fluid"].value = fluid.name.si
            c["temperature_c"].value = float(self.scenario.values["temperature"])
            for key in ("hematocrit", "mass_fraction"):
                if getattr(fluid, key) is not None:
                    c[key].value = float(getattr(fluid, key).si)
        finally:
            self._paused = False
        self._build_node_controls()
        self._show_branches()
        self._solve()

    def _show_branches(self):
        """The branch dropdown for the scenario shown, and the parts of the branch picked
        in the editor (the set's parts, sweeps included)."""
        branches = self.scenario.topology.branches
        options = [(f"{i}. {b.name} ({b.start} to {b.end})", i) for i, b in enumerate(branches, 1)]
        picked = self.controls["branch"].value
        self._paused = True
        try:
            if list(self.controls["branch"].options) != options:
                self.controls["branch"].options = options
            self.controls["branch"].value = picked if picked in range(1, len(options) + 1) else 1
            self._show_parts()
        finally:
            self._paused = False

    def _show_parts(self):
        branch = self.sources[self.scenario.name].topology.branches[
            self.controls["branch"].value - 1
        ]
        self.editor.set_parts(branch.parts, notify=False)

    def _branch_picked(self, change):
        if not self._paused and change.new is not None:
            self._show_parts()

    # -- edits of the description ------------------------------------------------------
    def _edit_fluid(self, name):
        from rheoline.model.fluids import FLUID_LIBRARY
        from rheoline.scenario.written_values import value_of

        c = self.controls
        fluid = c["fluid"].value
        fields = [
            ("fluid", Value(fluid, fluid)),
            ("temperature", value_of("temperature", float(c["temperature_c"].value))),
        ]
        options = FLUID_LIBRARY[fluid].options
        for key in ("hematocrit", "mass_fraction"):
            fields.append((key, value_of(key, float(c[key].value)) if key in options else None))
        self._apply(lambda sc: _with_fields(sc, fields))

    def _edit_parts(self, name):
        """The parts editor changed the branch picked: that branch's parts, all of them."""
        index, parts = self.controls["branch"].value, self.editor.parts()
        self._apply(lambda sc: replace(sc, topology=sc.topology.with_branch_parts(index, parts)))

    def _edit_node(self, name):
        from rheoline.scenario.written_values import value_of

        i = int(name[5 : name.index("]")])
        node = self.scenario.topology.nodes[i - 1]
        key = name.rsplit(".", 1)[1]
        unit, kind = next((u, k) for f, _, u, k, _ in NODE_CONTROLS[node.type] if f == key)
        shown = float(self.controls[name].value)
        if shown == 0.0 and (node.type, key) in _OPTIONAL_AT_ZERO:
            value = None
        else:
            value = value_of(name, float(from_unit(shown, unit, kind)), node.type)
        self._apply(lambda sc: sc.with_field(name, value))

    def _apply(self, edit):
        """Write ``edit(scenario)`` into the scenario shown (an edit changes some fields and
        keeps every other, a sweep included): into the shared set, checked by its reader,
        when the view shows the set's scenarios; then solve it."""
        sc = edit(self.sources[self.scenario.name])
        if self.from_document:
            self._editing = True
            try:
                sc = self.document.replace({sc.name: sc}, by=self)[sc.name]
            finally:
                self._editing = False
        else:
            self._own[sc.name] = sc
        self.sources[sc.name] = sc
        self.scenario = single_point(sc)
        self._solve()

    # -- solve and draw ------------------------------------------------------------------
    def _solve(self):
        """Check the edited scenario as the reader checks a file, run it, draw the case."""
        from rheoline.scenario.reading import parse_scenarios
        from rheoline.scenario.run import run_scenarios
        from rheoline.scenario.writing import scenario_set_data

        self.results.value = flag_html("error", "the inputs did not compute (see the message)")
        sset = parse_scenarios(
            scenario_set_data(ScenarioSet((self.scenario,), source="<network view>")),
            source="<network view>",
        )
        self.run = run_scenarios(sset)
        self._show_run()

    def _show_run(self):
        """Draw the last run and say it in words, flows in the unit chosen (no solve)."""
        run, unit = self.run, self.controls["flow_unit"].value
        if run is None:  # nothing computed yet (the first inputs were refused)
            return
        row = run.table.iloc[0]
        case = row["case"]
        branches = run.branches[run.branches["case"] == case]
        nodes = run.nodes[run.nodes["case"] == case]
        topology, name = self.scenario.topology, self.scenario.name
        self._draw(network_figure(topology, branches, nodes, name, flow_unit=unit))
        self.results.value = _results_html(row, branches, run.flags[case], unit, nodes)

    def _draw(self, fresh):
        """Show ``fresh`` in place of the diagram (the chart sends it whole anyway)."""
        self.replace_figure("network", fresh)


def _with_fields(scenario, fields):
    """``scenario`` with each ``(path, value)`` of ``fields`` set."""
    for path, value in fields:
        scenario = scenario.with_field(path, value)
    return scenario


def network_figure_placeholder():
    """An empty diagram (filled by the first update)."""
    import plotly.graph_objects as go

    from rheoline.widgets.figures import LOOK

    return go.Figure(layout=go.Layout(template=LOOK, height=380))


def _drive_words(row, nodes):
    """The highest pump or source pressure in words; where a pump is blocked (its node's
    pressure empty in the case's ``nodes`` rows) none, and why, naming it (plain text)."""
    pressure = float(row["required pressure [mmHg]"])
    stuck = []
    if not math.isfinite(pressure) and nodes is not None:
        stuck = nodes[(nodes["type"] == "pump") & nodes["pressure [mmHg]"].isna()]["node"]
    if len(stuck) == 0:
        return f"Highest pump or source pressure: {significant(pressure)} mmHg"
    return (
        "Highest pump or source pressure: n/a (no finite value: the set flow of the pump at "
        f"{', '.join(stuck)} has no open way out, a check valve is closed against it; the "
        "flows are shown with that pump delivering nothing)"
    )


def _results_html(row, branches, flags, unit="mL/min", nodes=None):
    """The case in words: total flow, pump pressure, each branch, the flags (escaped);
    flows in ``unit``, the total also in mL/h where another unit is chosen; ``nodes`` the
    case's node rows (for a blocked pump's name)."""
    records = branches.to_dict("records")
    items = [f"<li>{user_text(branch_words(r, unit))}</li>" for r in records]
    total = significant(row["flow [mL/min]"] * per_ml_min(unit))
    also = "" if unit == "mL/h" else f" ({significant(row['flow [mL/h]'])} mL/h)"
    lines = [
        f"<b>Total flow into the outlets: {total} {unit}{also}</b>",
        user_text(_drive_words(row, nodes)),
    ]
    reversed_flow = row["reversed flow [mL/min]"]
    if reversed_flow > 0:
        back = significant(reversed_flow * per_ml_min(unit))
        lines.append(
            f"<b>Reversed flow: {back} {unit} in {user_text(row['reversed branch'])}"
            "</b> (drawn dashed, its arrow pointing back)"
        )
    else:
        lines.append("No branch carries flow against its direction.")
    said = "".join(flag_html("caution", f) for f in flags)
    return "<br>".join(lines) + f"<ul>{''.join(items)}</ul>" + said
