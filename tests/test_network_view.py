"""The branched-line view (widgets/network_view.py, network_draw.py): every example's network
drawn, reversed flow told in words and by shape, edits through the scenario layer."""

import numpy as np
import pytest

from rheoline.scenario.reading import example_names, example_path, load_scenarios, loads_scenarios
from rheoline.widgets.network_draw import NODE_SYMBOLS
from rheoline.widgets.network_view import NetworkView, single_point

pytestmark = pytest.mark.filterwarnings("ignore::rheoline.errors.RheolineWarning")

BRANCHED = [
    (name, sc)
    for name in example_names()
    for sc in load_scenarios(example_path(name)).scenarios
    if sc.topology is not None
]


def _arrows(fig):
    return [a for a in fig.layout.annotations if a.showarrow]


@pytest.mark.parametrize(("name", "scenario"), BRANCHED, ids=[f"{n}:{s.name}" for n, s in BRANCHED])
def test_view_draws_every_example_topology(name, scenario):
    view = NetworkView([scenario])
    fig = view.figures["network"]
    topo = scenario.topology
    lines = {t.name: t for t in fig.data if t.mode == "lines"}
    assert set(lines) == {b.name for b in topo.branches}
    nodes = [t for t in fig.data if t.mode == "markers+text"]
    assert sorted(x for t in nodes for x in t.text) == sorted(n.name for n in topo.nodes)
    for trace in nodes:
        assert trace.marker.symbol == NODE_SYMBOLS[trace.name]
    for b in topo.branches:  # each branch in words, with its flow
        assert f"{b.name}: " in view.results.value
    assert "Total flow into the outlets" in view.results.value
    assert view.children[0] is view.banner  # the caution on top
    assert "not for clinical decisions" in view.banner.value
    # every open branch has one arrow, placed on its own path
    open_branches = [b for b in topo.branches if lines[b.name].line.dash != "dot"]
    assert len(_arrows(fig)) == len(open_branches)
    assert not any(line.line.dash == "dash" for line in lines.values())  # nothing reversed


def _ward(view, pump_ml_h):
    view.set_control("scenario", "Y-site without a check valve")
    view.set_control("node[2].flow", pump_ml_h)
    return view


def test_reversed_flow_in_words_and_by_shape():
    view = _ward(NetworkView(), 100.0)
    assert "REVERSED" not in view.results.value
    assert "No branch carries flow against its direction." in view.results.value
    _ward(view, 1500.0)
    text = view.results.value
    assert "gravity set: REVERSED, 6.37 mL/min flows back from y-site to saline bag" in text
    assert "Reversed flow: 6.37 mL/min in gravity set" in text
    assert "6.37 mL/min pushed back into saline bag by pump" in text
    fig = view.figures["network"]
    gravity = next(t for t in fig.data if t.name == "gravity set")
    assert gravity.line.dash == "dash"
    # its arrow points back: the head is nearer the bag (the branch's start) than the tail
    xs, ys = np.asarray(gravity.x), np.asarray(gravity.y)
    start = np.array([xs[0], ys[0]])
    arrow = next(a for a in _arrows(fig) if np.isclose(a.x, xs).any() and np.isclose(a.y, ys).any())
    head, tail = np.array([arrow.x, arrow.y]), np.array([arrow.ax, arrow.ay])
    assert np.linalg.norm(head - start) < np.linalg.norm(tail - start)
    assert any("REVERSED" in a.text for a in fig.layout.annotations)
    # the description holds the edit, in the field's unit
    assert view.scenario.field("node[2].flow").written == "25 mL/min"


def test_check_valve_closes_instead_of_reversing():
    view = NetworkView()
    view.set_control("scenario", "Y-site with a check valve on the gravity line")
    view.set_control("node[2].flow", 1500.0)
    assert "gravity set: closed by its check valve" in view.results.value
    assert "REVERSED" not in view.results.value
    gravity = next(t for t in view.figures["network"].data if t.name == "gravity set")
    assert gravity.line.dash == "dot"


def test_fluid_and_node_edits_go_through_the_scenario_layer():
    view = NetworkView()
    view.set_control("scenario", "pressure bag")
    before = view.run.table["flow [mL/min]"].iloc[0]
    assert view.controls["node[1].pressure"].value == 150.0  # the sweep's first point
    view.set_control("node[1].pressure", 300.0)  # the bag's squeeze [mmHg]
    assert view.run.table["flow [mL/min]"].iloc[0] > before
    view.set_control("fluid", "whole-blood")
    assert view.scenario.fluid.hematocrit is not None  # a blood option, from the controls
    assert view.run.table["fluid"].iloc[0] == "whole-blood"
    view.set_control("fluid", "saline-0.9")
    assert view.scenario.fluid.hematocrit is None
    view.set_control("node[1].pressure", 0.0)  # 0 = no squeeze: the field is dropped
    assert view.scenario.field("node[1].pressure") is None


def test_a_blocked_pump_shows_no_pressure_and_says_why():
    # the pump line's check valve faces the pump: its set flow has no way out, and the view
    # gives no number for the pump's pressure (the model's was ~5e14 mmHg) but the reason
    sset = loads_scenarios(
        'format_version = 1\n[[scenario]]\nname = "s"\nfluid = "saline-0.9"\n'
        '[[scenario.node]]\nname = "bag"\ntype = "bag"\nhead = "1 m"\n'
        '[[scenario.node]]\nname = "vein"\ntype = "outlet"\n'
        '[[scenario.node]]\nname = "pump"\ntype = "pump"\nflow = "60 mL/h"\n'
        '[[scenario.node]]\nname = "y"\ntype = "junction"\n'
        '[[scenario.branch]]\nname = "gravity"\nfrom = "bag"\nto = "y"\n'
        '[[scenario.branch.part]]\ntype = "tube"\ninner_diameter = "3 mm"\nlength = "1 m"\n'
        '[[scenario.branch]]\nname = "pump line"\nfrom = "y"\nto = "pump"\n'
        '[[scenario.branch.part]]\ntype = "tube"\ninner_diameter = "1 mm"\nlength = "1 m"\n'
        '[[scenario.branch.part]]\ntype = "check-valve"\nk = 4.0\n'
        '[[scenario.branch]]\nname = "catheter"\nfrom = "y"\nto = "vein"\n'
        '[[scenario.branch.part]]\ntype = "catheter"\ngauge = 20\n'
    )
    text = NetworkView(sset.scenarios).results.value
    assert (
        "Highest pump or source pressure: n/a (no finite value: the set flow of the pump at "
        "pump has no open way out, a check valve is closed against it; the flows are shown with "
        "that pump delivering nothing)" in text
    )
    assert "e+14" not in text and "mmHg" not in text.split("Highest pump")[1].split("<br>")[0]
    assert "pump occluded at pump" in text


def test_swept_scenarios_show_their_first_point():
    sc = load_scenarios(example_path("ward-y-site")).scenarios[0]
    one = single_point(sc)
    assert one.n_points == 1 and sc.n_points == 3
    assert one.field("node[2].flow").written == "100 mL/h"


def test_hostile_names_are_escaped():
    evil = "<img src=x onerror=alert(1)>"
    sset = loads_scenarios(
        'format_version = 1\n[[scenario]]\nname = "s"\nfluid = "saline-0.9"\n'
        f'[[scenario.node]]\nname = "{evil}"\ntype = "bag"\nhead = "1 m"\n'
        '[[scenario.node]]\nname = "vein"\ntype = "outlet"\n'
        f'[[scenario.branch]]\nname = "{evil} line"\nfrom = "{evil}"\nto = "vein"\n'
        '[[scenario.branch.part]]\ntype = "catheter"\ngauge = 18\n'
    )
    view = NetworkView(sset.scenarios)
    assert evil not in view.results.value and "&lt;img" in view.results.value
    fig = view.figures["network"]
    texts = [x for t in fig.data if t.text is not None for x in t.text]
    texts += [a.text for a in fig.layout.annotations] + [t.hovertext for t in fig.data]
    assert not any(evil in str(x) for x in texts)
    assert any("&lt;img" in str(x) for x in texts)
    assert evil not in str(view.node_box.children[0].children[0].value)


def test_app_has_the_network_tab():
    from rheoline.widgets.app import build_app

    app = build_app(tabs=("network",))
    assert not app.failures
    assert app.tabs.titles == ("Network",)


def test_files_view_loads_branched_scenarios_into_the_shared_set(tmp_path):
    import shutil

    from rheoline.widgets.app import build_app

    app = build_app(tabs=("line", "compare", "network", "files"), workspace=tmp_path)
    network, files = app.views["network"], app.views["files"]
    assert not network.from_document  # the demo set holds lines only: the examples shown
    shutil.copy(example_path("trauma-bay"), tmp_path / "bay.toml")
    files.load("bay.toml")
    assert network.from_document
    assert list(network.controls["scenario"].options) == ["pressure bag", "rapid infuser"]
    assert network.scenario.name == "pressure bag"
    assert "central line distal lumen" in network.results.value
    status = files.status.value
    assert "network view: scenario &#39;pressure bag&#39; (1 of 2 branched" in status
    assert "the scenario set holds no line scenario" in status  # the line view says so
    assert "branched scenarios (the Network tab shows them)" in status
    assert list(app.views["line"].controls["scenario"].options) == []
    # an edit in the network view is an edit of the set: saved, and read back
    network.set_control("temperature_c", 30.0)
    assert files.document.scenario("pressure bag").values["temperature"] == pytest.approx(30.0)
    saved = files.save("bay-edited.toml")
    again = load_scenarios(saved)
    assert again.scenarios[0].values["temperature"] == pytest.approx(30.0)
    assert again.scenarios[1] == load_scenarios(example_path("trauma-bay")).scenarios[1]


def test_line_view_keeps_to_line_scenarios_of_a_mixed_set():
    from rheoline.scenario.description import ScenarioSet
    from rheoline.widgets.document import ScenarioDocument
    from rheoline.widgets.line_view import LineView

    lines = load_scenarios(example_path("minimal")).scenarios
    ward = load_scenarios(example_path("ward-y-site")).scenarios
    doc = ScenarioDocument(ScenarioSet((*ward, *lines), source="<mixed>"))
    view = LineView(document=doc)
    assert list(view.controls["scenario"].options) == [lines[0].name]
    assert view.last_update_ok
    network = NetworkView(document=doc)
    assert list(network.controls["scenario"].options) == [s.name for s in ward]


def test_a_branchs_parts_are_edited_with_the_line_views_parts_editor():
    # a bigger catheter on the outlet branch: more flow, and the edit is the set's
    from rheoline.scenario.description import ScenarioSet
    from rheoline.widgets.document import ScenarioDocument

    ward = load_scenarios(example_path("ward-y-site"))
    doc = ScenarioDocument(ScenarioSet(ward.scenarios, source="<ward>"))
    view = NetworkView(document=doc)
    assert view.controls["branch"].value == 1
    assert [p.type for p in view.editor.parts()] == ["set", "fitting"]
    before = view.run.table["flow [mL/min]"].iloc[0]
    view.set_control("branch", 3)  # extension and catheter
    assert [p.type for p in view.editor.parts()] == ["set", "catheter"]
    catheter = view.editor.rows[1]
    catheter.size.value = 18
    after = view.run.table["flow [mL/min]"].iloc[0]
    assert after > before
    held = doc.scenario("Y-site without a check valve").topology.branches[2].parts[1]
    assert held.fields["gauge"].si == 18
    assert (
        doc.scenario("Y-site without a check valve").topology.branches[0]
        == (ward.scenarios[0].topology.branches[0])
    )
    # the pump's sweep (three rates) is kept in the set; the view shows its first point
    assert len(doc.scenario("Y-site without a check valve").topology.nodes[1].fields["flow"]) == 3
    # a bore the file format refuses is refused with the reader's message, nothing kept
    catheter.bore.value = 90.0
    assert not view.last_update_ok
    assert "inner_diameter" in view.messages.value
    assert doc.scenario("Y-site without a check valve").topology.branches[2].parts[1] == held


def test_flows_are_shown_in_the_flow_unit_chosen_without_solving_again():
    view = _ward(NetworkView(), 1500.0)
    run = view.run
    view.set_control("flow_unit", "mL/h")
    text = view.results.value
    # 6.37 mL/min x 60 min/h = 382 mL/h (the same run, said in the other unit)
    assert "gravity set: REVERSED, 382 mL/h flows back from y-site to saline bag" in text
    assert "Reversed flow: 382 mL/h in gravity set" in text
    assert run.table.iloc[0]["flow [mL/h]"] == pytest.approx(1120, abs=5)
    assert "Total flow into the outlets: 1,120 mL/h</b>" in text  # three figures, once
    labels = [a.text for a in view.figures["network"].layout.annotations if not a.showarrow]
    assert any("<b>REVERSED</b> 382 mL/h" in t for t in labels)
    assert view.run is run  # a unit is a way of showing, not an input
    view.set_control("flow_unit", "L/min")
    assert "REVERSED, 0.00637 L/min flows back" in view.results.value
    assert "mL/h)</b>" in view.results.value  # the total also in mL/h
