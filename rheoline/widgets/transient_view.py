"""The infusion in time: pressure, flow and drug delivery against time, with the occlusion and
the rate changes as controls.

The view shows one scenario that asks for the time solve (a syringe pump's line): the
scenario set's own (a loaded file's) where it has any, else the invented demo scenarios of
the shipped example ``neonatal-syringe-line``.  Its controls edit the scenario description
(:mod:`rheoline.scenario.description`, :mod:`rheoline.scenario.transient_spec`): the set
rate, the syringe's compliance, an occlusion (the part, when it begins, the alarm pressure,
when it clears) and one rate change of the main pump; each edit is read by the scenario
file's own parser and checked by its reader, so the view accepts what a file accepts, with
the file's message.  Every number comes from the scenario layer's run
(:func:`rheoline.scenario.run.run_scenarios`, the run's ``transient`` step and its time
series, :func:`rheoline.scenario.pack_time.story`), the same as ``rheoline run`` and the
review pack; the callbacks compute nothing.  An edit of a scenario of the set is kept in
the set (the other views and a saved file see it); an edit of the demo stays in the view.

The solve of one point takes seconds, so the view solves when its tab is first opened
(``lazy``) and after each edit, never while the app is built.

Examples
--------
>>> view = TransientView(lazy=True)
>>> sorted(view.figures)
['drug', 'flow', 'pressure']
>>> view.controls["scenario"].options[0]
'carrier start-up and occlusion'
"""

from __future__ import annotations

import functools
import warnings

import ipywidgets as widgets
import numpy as np

from rheoline.scenario.description import ScenarioSet
from rheoline.scenario.schema import TRANSIENT_TABLE_FIELDS
from rheoline.scenario.transient_spec import OcclusionSpec, RateChangeSpec, TransientSpec
from rheoline.scenario.values import Where, parse_field
from rheoline.units import ML_PER_H, MMHG
from rheoline.widgets.base import _STYLE, View, labelled
from rheoline.widgets.figures import BASE_LAYOUT
from rheoline.widgets.style import flag_html, series_style, significant, user_text

__all__ = [
    "TransientView",
    "DEMO_EXAMPLE",
    "RESULT_ROWS",
    "time_scenarios",
    "time_run",
    "prepare_first_run",
    "with_occlusion",
    "with_rate_change",
]

#: The shipped example the view starts from where the set has no time-solve scenario.
DEMO_EXAMPLE = "neonatal-syringe-line"
#: The results shown, in order: (label, table column).
RESULT_ROWS = (
    ("internal volume of the line", "internal volume [mL]"),
    ("start-up (outlet at 90 % of the set rate)", "start-up time [min]"),
    ("rate change at the outlet, 50 %", "rate change t50 [min]"),
    ("rate change at the outlet, 90 %", "rate change t90 [min]"),
    ("time to the occlusion alarm", "time to alarm [min]"),
    ("bolus when the occlusion clears", "bolus [mL]"),
    ("drug delay, 50 %", "drug delay t50 [min]"),
    ("drug delay, 90 %", "drug delay t90 [min]"),
    ("dead volume downstream of the port", "port dead volume [mL]"),
)
#: The time plots: figure name -> (series column, axis title, chart title).
_PLOTS = {
    "pressure": ("syringe pressure [mmHg]", "pressure [mmHg]", "Pressure at the syringe"),
    "flow": ("outlet flow [mL/h]", "flow [mL/h]", "Flow at the outlet"),
    "drug": ("drug delivery [mg/h]", "drug [mg/h]", "Drug leaving the outlet"),
}
_VIEWS = Where("<views>")
#: The occlusion's controls (the switch first) and the rate change's, in argument order of
#: :func:`with_occlusion` and :func:`with_rate_change`.
_OCCLUSION_CONTROLS = ("occlusion", "occluded_part", "occlusion_min", "alarm_mmhg", "release_min")
_CHANGE_CONTROLS = ("rate_change", "change_min", "new_rate_ml_h", "ramp_min")


# --------------------------------------------------------------------------- description edits
def time_scenarios(scenario_set) -> list:
    """The scenarios of ``scenario_set`` that ask for the time solve."""
    return [sc for sc in scenario_set.scenarios if sc.asks_time_solve]


def _table_value(table, key, text):
    """A field of a time-solve table (``occlusion``, ``rate_change``) read from ``text``."""
    return parse_field(text, TRANSIENT_TABLE_FIELDS[table][key], _VIEWS, f"{table}.{key}")


def _with_spec(scenario, spec):
    """``scenario`` with its time-solve tables ``spec`` (None where it holds nothing)."""
    from dataclasses import replace

    return replace(scenario, transient=None if spec == TransientSpec() else spec)


def with_occlusion(scenario, part=None, time_min=None, alarm_mmhg=None, release_min=None):
    """``scenario`` with an occlusion of part number ``part`` (1 = first) from
    ``time_min`` until ``release_min`` (None or 0: until the alarm) with the alarm at
    ``alarm_mmhg``; ``part`` None removes the occlusion.  Values are read by the file's
    parser (its ranges, its messages)."""
    spec = scenario.transient or TransientSpec()
    if part is None:
        return _with_spec(scenario, spec.with_occlusion(None))
    occlusion = OcclusionSpec(
        part=_table_value("occlusion", "part", int(part)),
        time=_table_value("occlusion", "time", f"{float(time_min):.12g} min"),
        alarm_pressure=_table_value(
            "occlusion", "alarm_pressure", f"{float(alarm_mmhg):.12g} mmHg"
        ),
        release=None
        if not release_min
        else _table_value("occlusion", "release", f"{float(release_min):.12g} min"),
    )
    return _with_spec(scenario, spec.with_occlusion(occlusion))


def with_rate_change(scenario, time_min=None, rate_ml_h=None, ramp_min=0.0):
    """``scenario`` whose main pump changes once, at ``time_min`` to ``rate_ml_h`` over
    ``ramp_min`` (0: a step); ``time_min`` None removes its rate changes."""
    spec = scenario.transient or TransientSpec()
    if time_min is None:
        return _with_spec(scenario, spec.with_rate_changes(()))
    change = RateChangeSpec(
        time=_table_value("rate_change", "time", f"{float(time_min):.12g} min"),
        rate=_table_value("rate_change", "rate", f"{float(rate_ml_h):.12g} mL/h"),
        ramp=_table_value("rate_change", "ramp", f"{float(ramp_min):.12g} min")
        if ramp_min
        else None,
    )
    return _with_spec(scenario, spec.with_rate_changes((change,)))


@functools.lru_cache(maxsize=1)
def _demo_set():
    """The demo example's set, read once (a ScenarioSet is immutable)."""
    from rheoline.scenario.files import example_path, load_scenarios

    return load_scenarios(example_path(DEMO_EXAMPLE))


#: The latest time solves by the scenario solved (one sweep point), most recent last.
_RUNS: dict = {}
#: How many time solves :func:`time_run` keeps.
RUNS_KEPT = 8


def time_run(point):
    """The scenario layer's run of ``point`` (a scenario at one sweep point), with the time
    solve; the latest :data:`RUNS_KEPT` are kept, keyed on the scenario (an immutable
    description), so a scenario solved before is not solved again.

    The warnings of the run are given again at every call (a range warning of a kept run
    is shown as when it was solved).
    """
    from rheoline.scenario.run import run_scenarios

    kept = _RUNS.pop(point, None)
    if kept is None:
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            run = run_scenarios(ScenarioSet((point,), "line in time", source="<views>"))
        kept = (run, tuple(w.message for w in caught))
    _RUNS[point] = kept
    while len(_RUNS) > RUNS_KEPT:
        del _RUNS[next(iter(_RUNS))]
    for message in kept[1]:
        warnings.warn(message, stacklevel=2)
    return kept[0]


def prepare_first_run(document=None):
    """Solve what the view shows first (the set's first time-solve scenario, else the
    demo's), so the tab opens without waiting for it (:meth:`App.prepare`)."""
    from rheoline.widgets.edits import at_point

    mine = time_scenarios(document.scenario_set) if document is not None else []
    time_run(at_point((mine or _demo_set().scenarios)[0]))


#: What an empty chart says instead of blank axes.
_NOTHING_DRAWN = {
    name: {
        "text": text,
        "showarrow": False,
        "xref": "paper",
        "yref": "paper",
        "x": 0.5,
        "y": 0.5,
    }
    for name, text in (
        ("drug", "no drug joins this line at a port: nothing to draw"),
        ("pressure", "no time series"),
        ("flow", "no time series"),
    )
}


def _shown(amount) -> float:
    """An amount as its control shows it: 12 significant digits (0.5, not the
    0.5000000000000001 that the unit conversion leaves)."""
    return float(f"{amount:.12g}")


def _number(value, low, high, step, description, css):
    return labelled(
        widgets.BoundedFloatText(
            value=value, min=low, max=high, step=step, description=description, style=_STYLE
        ),
        css,
    )


# --------------------------------------------------------------------------- the view
class TransientView(View):
    """Pressure, flow and drug delivery against time for one syringe pump's line.

    Parameters
    ----------
    document : ScenarioDocument, optional
        The app's scenario set: its time-solve scenarios are shown and edited there.
        Without one, or while it has none, the view shows the demo example's scenarios.
    lazy : bool
        Solve and draw when :meth:`show_figures` is first called (the app's tabs) instead
        of now.
    """

    #: No other tab's name is inside it (the browser test finds a tab by a part of its name).
    title = "Infusion in time"

    def __init__(self, document=None, lazy: bool = False):
        super().__init__()
        self.document = document
        self._own = {sc.name: sc for sc in _demo_set().scenarios}
        self.run = None  # the last RunResult shown
        self._solved = False
        c = self.controls
        c["scenario"] = labelled(
            widgets.Dropdown(options=[], description="scenario", style=_STYLE), "rl-time-scenario"
        )
        c["flow_ml_h"] = _number(1.0, 0.001, 1000.0, 0.1, "set rate [mL/h]", "rl-time-rate")
        c["compliance"] = _number(
            1.5, 0.0, 1000.0, 0.1, "syringe compliance [uL/mmHg]", "rl-time-compliance"
        )
        c["occlusion"] = labelled(
            widgets.Checkbox(value=False, description="occlusion", style=_STYLE), "rl-occlusion"
        )
        c["occluded_part"] = labelled(
            widgets.Dropdown(options=[("part 1", 1)], description="occluded part", style=_STYLE),
            "rl-occluded-part",
        )
        c["occlusion_min"] = _number(30.0, 0.0, 10080.0, 5.0, "begins at [min]", "rl-occ-time")
        c["alarm_mmhg"] = _number(300.0, 1.0, 3000.0, 10.0, "alarm at [mmHg]", "rl-alarm")
        c["release_min"] = _number(
            0.0, 0.0, 10080.0, 5.0, "clears at [min] (0: at the alarm)", "rl-release"
        )
        c["rate_change"] = labelled(
            widgets.Checkbox(value=False, description="rate change", style=_STYLE),
            "rl-rate-change",
        )
        c["change_min"] = _number(60.0, 0.0, 10080.0, 5.0, "at [min]", "rl-change-time")
        c["new_rate_ml_h"] = _number(2.0, 0.0, 1000.0, 0.1, "new rate [mL/h]", "rl-new-rate")
        c["ramp_min"] = _number(0.0, 0.0, 10080.0, 1.0, "over [min] (0: a step)", "rl-ramp")
        self.results = widgets.HTML(value="")
        self.results.add_class("rl-time-results")
        self.figures = {name: self._empty_figure(name) for name in _PLOTS}
        self._choices()
        self._show_controls()
        self._on_edit([k for k in c if k != "scenario"], self._edited)
        c["scenario"].observe(self._chosen, names="value")
        if document is not None:
            self._follow(document)
        if lazy:
            self.say("note", "the time solve runs when this tab is first opened")
        else:
            self._run(self._solve)
        self._widgetize(lazy)
        occlusion = widgets.VBox(
            [c[k] for k in ("occlusion", "occluded_part", "occlusion_min", "alarm_mmhg")]
            + [c["release_min"]]
        )
        change = widgets.VBox([c[k] for k in ("rate_change", "change_min", "new_rate_ml_h")])
        change.children += (c["ramp_min"],)
        pump = widgets.VBox([c["scenario"], c["flow_ml_h"], c["compliance"]])
        for box in (occlusion, change):
            box.layout.margin = "6px 0 0 0"
        self._finish(
            [
                self.two_columns(
                    [pump, occlusion, change],
                    [self.results, *(self.figure_box(name) for name in _PLOTS)],
                )
            ]
        )

    # -- which scenario -------------------------------------------------------------
    def _source(self):
        """``(scenarios, from the document)``: the set's time-solve scenarios, else the demo."""
        if self.document is not None:
            mine = time_scenarios(self.document.scenario_set)
            if mine:
                return {sc.name: sc for sc in mine}, True
        return self._own, False

    @property
    def scenario(self):
        """The scenario shown (as described, sweeps and all)."""
        scenarios, _ = self._source()
        name = self.controls["scenario"].value
        return scenarios.get(name) or next(iter(scenarios.values()))

    def _choices(self):
        names = list(self._source()[0])
        dropdown = self.controls["scenario"]
        self._paused = True
        try:
            if list(dropdown.options) != names:
                dropdown.options = names
            if dropdown.value not in names:
                dropdown.value = names[0]
        finally:
            self._paused = False

    def _show_controls(self):
        """Set the controls from the shown scenario (without triggering edits)."""
        from rheoline.widgets.edits import at_point

        sc = at_point(self.scenario)
        c, spec = self.controls, self.scenario.transient
        self._paused = True
        try:
            c["flow_ml_h"].value = _shown(sc.drive.flow.si / ML_PER_H)
            compliance = sc.syringe.syringe_compliance if sc.syringe is not None else None
            c["compliance"].value = (
                0.0 if compliance is None else _shown(compliance.si * MMHG / 1e-9)
            )
            labels = [(f"{j}: {p.label or p.type}", j) for j, p in enumerate(sc.parts, start=1)]
            c["occluded_part"].options = labels
            occlusion = spec.occlusion if spec is not None else None
            c["occlusion"].value = occlusion is not None
            if occlusion is not None:
                c["occluded_part"].value = int(occlusion.part.si)
                c["occlusion_min"].value = _shown(occlusion.time.si / 60.0)
                c["alarm_mmhg"].value = _shown(occlusion.alarm_pressure.si / MMHG)
                release = occlusion.release
                c["release_min"].value = 0.0 if release is None else _shown(release.si / 60.0)
            changes = spec.rate_changes if spec is not None else ()
            c["rate_change"].value = bool(changes)
            if changes:
                c["change_min"].value = _shown(changes[0].time.si / 60.0)
                c["new_rate_ml_h"].value = _shown(changes[0].rate.si / ML_PER_H)
                ramp = changes[0].ramp
                c["ramp_min"].value = 0.0 if ramp is None else _shown(ramp.si / 60.0)
        finally:
            self._paused = False

    def _chosen(self, change):
        if not self._paused:
            self._show_controls()
            self._run(self._solve)

    def _document_changed(self):
        self._choices()
        self._show_controls()
        if self._shown:
            self._solve()  # nothing solved where the scenario shown is unchanged
        else:
            self._solved = False  # solved when the tab is opened

    # -- edits ----------------------------------------------------------------------
    def edited_scenario(self, name=None):
        """The shown scenario with control ``name``'s value (every control's where None),
        as a description edit checked by the scenario file's reader; the fields of other
        controls (a swept rate among them) stay as the scenario holds them."""
        from rheoline.widgets.document import checked_scenario
        from rheoline.widgets.edits import parsed

        c, sc = self.controls, self.scenario
        if name in (None, "flow_ml_h"):
            sc = sc.with_field("flow", parsed("flow", f"{c['flow_ml_h'].value:.12g} mL/h"))
        if name in (None, "compliance"):
            text = f"{c['compliance'].value:.12g} uL/mmHg"
            sc = sc.with_field("syringe_compliance", parsed("syringe_compliance", text))
        if name is None or name in _OCCLUSION_CONTROLS:
            values = [c[k].value for k in _OCCLUSION_CONTROLS[1:]]
            sc = with_occlusion(sc, *values) if c["occlusion"].value else with_occlusion(sc)
        if name is None or name in _CHANGE_CONTROLS:
            values = [c[k].value for k in _CHANGE_CONTROLS[1:]]
            sc = with_rate_change(sc, *values) if c["rate_change"].value else with_rate_change(sc)
        return checked_scenario(sc)

    def _edited(self, name):
        sc = self.edited_scenario(name)
        _, shared = self._source()
        if shared:
            self.document.replace({sc.name: sc}, by=self)  # redraws through _document_changed
        else:
            self._own[sc.name] = sc
            self._solve()

    # -- the run and the drawing ------------------------------------------------------
    def show_figures(self):
        """Solve first where the view was built lazily, then show the charts."""
        if not self._solved:
            self._run(self._solve)
        super().show_figures()

    def _failed(self, exc):
        self.say("error", "the inputs did not compute; the charts show the last good state")

    def _solve(self):
        from rheoline.widgets.edits import at_point, sweep_notes

        self._solved = True
        sc = self.scenario
        run = time_run(at_point(sc))
        if run is not self.run:  # another view's edit leaves this scenario as it was
            self.run = run
            self._draw()
        shown = f"{sc.name} from t = 0"
        notes = sweep_notes(sc)
        if notes:
            shown += " at " + ", ".join(notes)
        self.say("ok", shown)

    def _draw(self):
        from rheoline.scenario.pack_time import story

        run = self.run
        row = run.table.iloc[0]
        s = story(run.time_series, row["case"])
        for name, (column, _, _) in _PLOTS.items():
            fig = self.figures[name]
            traces = self._traces(s, column, name)
            with fig.batch_update():
                fig.data = ()
                for trace in traces:
                    fig.add_scatter(**trace)
                fig.layout.annotations = () if traces else (_NOTHING_DRAWN[name],)
        self.results.value = self._results_html(row)

    @staticmethod
    def _traces(s, column, name):
        """Plotly scatter arguments of one chart from one case's story (names escaped)."""
        pieces = []
        if name == "drug":
            pieces = [(user_text(port), rows, "solid") for port, rows in s["drugs"].items()]
        else:
            pieces.append(("the line", s["line"], "solid"))
            if not s["without occlusion"].empty:
                pieces.append(("had there been no occlusion", s["without occlusion"], "dot"))
        out = []
        for k, (label, rows, dash) in enumerate(pieces):
            style = series_style(k)
            out.append(
                {
                    "x": rows["time [min]"].to_numpy(),
                    "y": rows[column].to_numpy(),
                    "mode": "lines",
                    "name": label,
                    "line": {"color": style["color"], "dash": dash if k else "solid"},
                    "hovertemplate": f"{label}<br>%{{x:.4g}} min<br>%{{y:.4g}}<extra></extra>",
                }
            )
        return out

    def _results_html(self, row):
        case = row["case"]
        missing = self.run.not_computed.get(case, {})
        from rheoline.scenario.transient_step import RECORD_KEYS

        why = {RECORD_KEYS[k][0]: reason for k, reason in missing.items()}
        lines = []
        for label, column in RESULT_ROWS:
            value = row[column]
            unit = column[column.rindex("[") + 1 : -1]
            if np.isfinite(value):
                shown = f"{significant(value)} {unit}"
            else:
                shown = f"not computed: {why.get(column, 'see the notes')}"
            lines.append(f"<tr><td>{user_text(label)}</td><td>{user_text(shown)}</td></tr>")
        flags = [flag_html("caution", f) for f in self.run.flags.get(case, ())]
        notes = [flag_html("note", n.text) for n in self.run.notes]
        return f"<table class='rl-time-table'>{''.join(lines)}</table>" + "".join(flags + notes)

    @staticmethod
    def _empty_figure(name):
        import plotly.graph_objects as go

        _, axis, title = _PLOTS[name]
        layout = go.Layout(
            title=title, xaxis={"title": "time [min]"}, yaxis={"title": axis}, **BASE_LAYOUT
        )
        return go.Figure(layout=layout)
