"""The line-in-time view: it draws the scenario layer's run, edits the one description, and
shows bad input as the file's own message.

The numbers the view shows are the run's (``rheoline run`` and the review pack give the
same; tests/test_transient_scenario.py holds the run to closed forms and to the model API),
so the checks here are that the view shows exactly them, edits what it says it edits and
escapes what a file wrote.
"""

import numpy as np
import pytest

from rheoline.scenario.description import ScenarioSet
from rheoline.scenario.reading import loads_scenarios
from rheoline.scenario.run import run_scenarios
from rheoline.widgets.banner import BANNER_CLASS
from rheoline.widgets.document import ScenarioDocument
from rheoline.widgets.edits import at_point
from rheoline.widgets.transient_view import TransientView, with_occlusion, with_rate_change

MMHG = 133.322387415  # Pa, NIST SP 811 (2008) Appendix B.8
UL_PER_MMHG = 1e-9 / MMHG

FILE = """
format_version = 1
[[scenario]]
name = "steady <b>bag</b>"
fluid = "water"
head = "1 m"
[[scenario.part]]
type = "tube"
inner_diameter = "3 mm"
length = "1 m"

[[scenario]]
name = "pump <img src=x>"
fluid = "water"
temperature = "20 degC"
flow = ["2 mL/h", "4 mL/h"]
syringe_compliance = "1 uL/mmHg"

[[scenario.port]]
label = "<img src=x> drug"
boundary = 0
flow = "1 mL/h"
concentration = "1 mg/mL"

[[scenario.part]]
type = "tube"
label = "<b onmouseover=alert(3)>line"
inner_diameter = "0.5 mm"
length = "1 m"
"""


@pytest.fixture(scope="module")
def shared():
    doc = ScenarioDocument(loads_scenarios(FILE))
    view = TransientView(document=doc, lazy=True)
    view.show_figures()
    return doc, view


def test_lazy_view_solves_only_when_shown():
    view = TransientView(lazy=True)
    assert view.run is None and view.figures["flow"].data == ()
    assert BANNER_CLASS in view.children[0]._dom_classes  # the short caution on top
    assert "first opened" in view.status.value


def test_the_view_shows_the_runs_numbers(shared):
    doc, view = shared
    assert list(view.controls["scenario"].options) == ["pump <img src=x>"]  # time solve only
    table = view.run.table.iloc[0]
    # the view solved the first point of the swept rate, as the scenario layer runs it
    sc = doc.scenario("pump <img src=x>")
    want = run_scenarios(ScenarioSet((at_point(sc),), "t")).table.iloc[0]
    assert want["flow [mL/h]"] == pytest.approx(2.0)
    for column in ("start-up time [min]", "drug delay t90 [min]", "internal volume [mL]"):
        assert table[column] == pytest.approx(want[column], rel=1e-9), column
    assert view.controls["flow_ml_h"].value == pytest.approx(2.0)
    assert view.controls["compliance"].value == pytest.approx(1.0)
    series = view.run.time_series
    run_rows = series[series["phase"] == "run"]
    flow = view.figures["flow"].data[0]
    assert np.allclose(flow.x, run_rows["time [min]"]) and np.allclose(
        flow.y, run_rows["outlet flow [mL/h]"]
    )
    assert "not computed: the scenario has no occlusion" in view.results.value


def test_labels_from_the_file_are_escaped(shared):
    _, view = shared
    names = [t.name for t in view.figures["drug"].data]
    assert names == ["&lt;img src=x&gt; drug"]
    assert "<img" not in view.status.value + view.results.value
    assert "&lt;img src=x&gt;" in view.status.value


def test_an_occlusion_edit_goes_into_the_shared_description(shared):
    doc, view = shared
    view.controls["occluded_part"].value = 1
    view.controls["occlusion_min"].value = 20.0
    view.controls["alarm_mmhg"].value = 200.0
    view.set_control("occlusion", True)
    spec = doc.scenario("pump <img src=x>").transient
    assert spec.occlusion.part.si == 1 and spec.occlusion.time.si == pytest.approx(1200.0)
    assert spec.occlusion.alarm_pressure.written == "200 mmHg"
    assert len(doc.scenario("pump <img src=x>").drive.flow.values) == 2  # the sweep is kept
    row = view.run.table.iloc[0]
    # time to alarm = C (p_alarm - p_running) / Q (the closed form of one compliance), the
    # pump and the port both filling the syringe's node; p_running from the run's steady solve
    c, q = 1.0 * UL_PER_MMHG, 3e-6 / 3600.0
    p = row["required pressure [mmHg]"] * MMHG
    assert row["time to alarm [min]"] * 60 == pytest.approx(c * (200 * MMHG - p) / q, rel=2e-2)
    names = [t.name for t in view.figures["pressure"].data]
    assert names == ["the line", "had there been no occlusion"]


def test_a_refused_edit_is_the_files_message_and_keeps_the_charts(shared):
    doc, view = shared
    view.set_control("occlusion", True)  # as the test before leaves it (run alone, too)
    before = view.figures["pressure"].data[0].y
    view.set_control("release_min", 5.0)  # clears before it begins (at 20 min)
    assert view.last_update_ok is False
    assert "occlusion.release" in view.messages.value
    assert doc.scenario("pump <img src=x>").transient.occlusion.release is None
    assert np.array_equal(view.figures["pressure"].data[0].y, before)


def test_description_edits_read_like_a_file():
    sc = loads_scenarios(FILE).scenarios[1]
    occluded = with_occlusion(sc, 1, 30, 300, 45)
    assert occluded.transient.occlusion.release.si == pytest.approx(2700.0)
    assert with_occlusion(occluded).transient.ports == sc.transient.ports
    changed = with_rate_change(sc, 60, 0.5, 10)
    (change,) = changed.transient.rate_changes
    assert (change.time.si, change.end) == pytest.approx((3600.0, 4200.0))
    assert with_rate_change(changed) == sc
    with pytest.raises(Exception, match="occlusion.alarm_pressure"):
        with_occlusion(sc, 1, 30, 5000)


def test_another_views_edit_does_not_solve_the_time_view_again():
    """A head change in the line view changes the shared set but not the time view's
    scenario: the time view keeps its run (it used to solve again at every edit of any
    view once its tab had been opened) and draws nothing."""
    from rheoline.widgets.app import build_app

    app = build_app(tabs=("line", "time"))
    app.tabs.selected_index = 1
    time_view = app.views["time"]
    run, drawn = time_view.run, []
    assert run is not None and time_view.figures["pressure"].data
    time_view._draw = lambda: drawn.append("drawn")
    app.views["line"].set_control("head_cm", 123.0)
    assert app.views["line"].scenario.values["head"] == pytest.approx(1.23)  # it was edited
    assert time_view.run is run and drawn == []


def test_a_scenario_solved_before_is_not_solved_again(monkeypatch):
    from rheoline.widgets import transient_view

    view = TransientView(lazy=True)
    view.set_control("flow_ml_h", 0.7)
    first = view.run
    view.set_control("flow_ml_h", 0.9)
    assert view.run is not first and view.last_update_ok
    solved = []
    monkeypatch.setattr(
        "rheoline.scenario.run.run_scenarios", lambda *a, **k: solved.append(a) or None
    )
    view.set_control("flow_ml_h", 0.7)  # back to the rate before: the run kept
    assert view.run is first and solved == [] and view.last_update_ok
    assert len(transient_view._RUNS) <= transient_view.RUNS_KEPT


def test_prepare_solves_the_first_scenario_without_building_a_view():
    from rheoline.widgets import transient_view
    from rheoline.widgets.app import build_app

    transient_view._RUNS.clear()
    app = build_app()
    assert "time" in app.views and app.views.built("time") is None  # asking builds nothing
    app.prepare()
    assert [app.views.built(n) is None for n in app.views] == [False] + [True] * 5
    (point,) = transient_view._RUNS
    app.tabs.selected_index = list(app.views).index("time")
    view = app.views["time"]
    assert at_point(view.scenario) == point and view.run is transient_view._RUNS[point][0]


def test_prepare_never_breaks_the_served_page(monkeypatch):
    # the app's notebook calls prepare() in the served kernel: a scenario the time solve
    # refuses must leave the page to open (the tab says why when opened), not fail the cell
    from rheoline.errors import ScenarioError
    from rheoline.widgets import transient_view
    from rheoline.widgets.app import build_app

    def refuse(document):
        raise ScenarioError("refused for the test", field="occlusion")

    monkeypatch.setattr(transient_view, "prepare_first_run", refuse)
    app = build_app()
    app.prepare()
    assert app.views.built("time") is None
