"""Branched lines in scenario files, runs, JSON records and packs (issue 17).

The network physics are checked in tests/test_branched.py (exact linear networks, the
series Line, parallel lumens, the Y-site's backflow exactly when the junction exceeds the
bag head).  Here: the file layer reads, checks and writes topologies; a branched run gives
the model's own answer (Kirchhoff 1847: mass balance at every node) and renders its flags
from the network's condition arrays.
"""

import html
import json
import re
import warnings

import numpy as np
import pytest

import rheoline
from rheoline.errors import ScenarioError
from rheoline.model.branched import Branch, PartNetwork, PressureNode, Pump
from rheoline.model.parts import Catheter, CheckValve, Fitting, Tube, extension_set
from rheoline.model.shapes import Annulus, Semicircle
from rheoline.scenario.compare import check_scenarios, run_scenarios
from rheoline.scenario.files import (
    dump_scenarios,
    example_path,
    load_scenarios,
    loads_scenarios,
    value_of,
)
from rheoline.units import ML_PER_MIN, MMHG

HEAD = 'format_version = 1\n[[scenario]]\nname = "case"\nfluid = "saline-0.9"\n'


def node(name, kind, **fields):
    extra = "".join(f'{k} = "{v}"\n' for k, v in fields.items())
    return f'[[scenario.node]]\nname = "{name}"\ntype = "{kind}"\n{extra}'


def branch(name, start, end, parts='type = "tube"\ninner_diameter = "1 mm"\nlength = "1 m"\n'):
    return (
        f'[[scenario.branch]]\nname = "{name}"\nfrom = "{start}"\nto = "{end}"\n'
        f"[[scenario.branch.part]]\n{parts}"
    )


def load(*tables):
    return loads_scenarios(HEAD + "".join(tables))


def run(sset):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return run_scenarios(sset)


BAG = node("bag", "bag", head="1 m")
VEIN = node("vein", "outlet", pressure="8 mmHg")


# --------------------------------------------------------------------------- reading
@pytest.mark.parametrize("name", ["ward-y-site", "trauma-bay"])
def test_branched_examples_round_trip_in_toml_and_json(name):
    sset = load_scenarios(example_path(name))
    assert all(sc.topology is not None for sc in sset.scenarios)
    assert loads_scenarios(dump_scenarios(sset)) == sset
    assert loads_scenarios(dump_scenarios(sset, "json"), fmt="json") == sset
    check_scenarios(sset)


def test_topology_description_holds_nodes_branches_and_sweeps():
    sset = load(
        node("bag", "bag", head="80 cm"),
        'pressure = ["0 mmHg", "300 mmHg"]\n',
        node("pump", "pump", flow="100 mL/h", pressure_limit="300 mmHg"),
        node("y", "junction"),
        VEIN,
        branch("set", "bag", "y"),
        branch("pump line", "pump", "y"),
        branch("catheter", "y", "vein", 'type = "catheter"\ngauge = [18, 20]\n'),
    )
    sc = sset.scenarios[0]
    topo = sc.topology
    assert [n.type for n in topo.nodes] == ["bag", "pump", "junction", "outlet"]
    assert topo.node("pump").values["flow"] == pytest.approx(100 * 1e-6 / 3600)
    assert topo.node("bag").fields["head"].written == "80 cm"
    assert [(b.start, b.end) for b in topo.branches] == [("bag", "y"), ("pump", "y"), ("y", "vein")]
    assert [p for p, _ in sc.axes] == ["node[1].pressure", "branch[3].part[1].gauge"]
    assert sc.n_points == 4 and sc.n_parts == 3 and sc.parts == ()
    assert value_of("node[2].flow", 2e-6, "pump").written == "120 mL/min"


@pytest.mark.parametrize(
    ("tables", "field", "words"),
    [
        (
            (BAG, VEIN, node("bag", "junction"), branch("s", "bag", "vein")),
            "node[3].name",
            "node 'bag' is named twice (node[1] and node[3])",
        ),
        (
            (BAG, VEIN, branch("s", "bag", "vien")),
            "branch[1].to",
            "unknown node 'vien'; did you mean 'vein'",
        ),
        (
            (BAG, VEIN, branch("s", "bag", "vein"), branch("s", "bag", "vein")),
            "branch[2].name",
            "branch 's' is named twice",
        ),
        ((BAG, VEIN, branch("s", "vein", "vein")), "branch[1].to", "to itself"),
        (
            (BAG, VEIN, node("spare", "junction"), branch("s", "bag", "vein")),
            "node[3].name",
            "node 'spare' is on no branch",
        ),
        (
            (
                BAG,
                VEIN,
                node("cap", "junction"),
                branch("s", "bag", "vein"),
                branch("t", "bag", "cap"),
            ),
            "node[3].type",
            "a dead end",
        ),
        (
            (
                BAG,
                VEIN,
                node("p", "pump", flow="5 mL/h"),
                node("q", "pump", flow="5 mL/h"),
                node("m", "junction"),
                branch("s", "bag", "vein"),
                branch("a", "p", "m"),
                branch("b", "q", "m"),
            ),
            "branch[2].name",
            "a disconnected branch",
        ),
        (
            (
                BAG,
                VEIN,
                node("x", "junction"),
                node("y", "junction"),
                branch("s", "bag", "vein"),
                branch("up", "x", "y"),
                branch("down", "y", "x"),
            ),
            "branch[2].name",
            "a loop with no source",
        ),
        (
            (
                node("m", "junction"),
                node("p", "pump", flow="5 mL/h"),
                branch("s", "p", "m"),
                branch("t", "p", "m"),
            ),
            "node",
            "no bag, source or outlet",
        ),
        (
            (node("p", "pump"), VEIN, branch("s", "p", "vein")),
            "node[1].flow",
            "a pump node needs flow",
        ),
        ((node("b", "bgg"), VEIN, branch("s", "b", "vein")), "node[1].type", "did you mean 'bag'"),
        (
            (node("b", "zz"), VEIN, branch("s", "b", "vein")),
            "node[1].type",
            "unknown node type 'zz'. Allowed: bag, source, pump, outlet, junction.",
        ),
        (
            (node("b", "bag", head="1 m", flow="1 mL/h"), VEIN, branch("s", "b", "vein")),
            "node[1].flow",
            "unknown bag node field 'flow'",
        ),
        (
            (BAG, VEIN, branch("s", "bag", "vein", 'type = "tube"\nlength = "1 m"\n')),
            "branch[1].part[1].inner_diameter",
            "a tube needs inner_diameter or shape",
        ),
        (
            (BAG, VEIN, branch("s", "bag", "vein", 'type = "catheter"\ngauge = 19\n')),
            "branch[1].part[1].gauge",
            "not in the catheter catalogue",
        ),
        ((BAG, VEIN), "branch", "lists its branches"),
        (
            ('head = "1 m"\n', BAG, VEIN, branch("s", "bag", "vein")),
            "head",
            "give each bag node its head",
        ),
    ],
)
def test_topology_errors_name_the_file_scenario_and_field(tables, field, words):
    with pytest.raises(ScenarioError, match=re.escape(words)) as info:
        sset = load(*tables)
        check_scenarios(sset)
    assert info.value.field == field
    assert str(info.value).startswith(f"<string>, scenario 'case', field '{field}'")


def test_a_model_error_in_a_branch_names_the_branch_part():
    cannula = 'type = "cannula"\nfrench = 3\nwall_thickness = "0.6 mm"\nlength = "0.1 m"\n'
    sset = load(BAG, VEIN, branch("s", "bag", "vein"), branch("t", "bag", "vein", cannula))
    with pytest.raises(ScenarioError, match="leaves no bore in a 3 Fr cannula") as info:
        check_scenarios(sset)
    assert info.value.field == "branch[2].part[1].wall_thickness"  # the field the model names


# --------------------------------------------------------------------------- shapes
def test_shaped_and_catalogue_lumens_build_the_model_parts():
    sset = load(
        BAG,
        VEIN,
        branch(
            "s",
            "bag",
            "vein",
            'type = "tube"\nshape = "annulus"\nouter_diameter = "2 mm"\ncore_diameter = "0.9 mm"\n'
            'length = "0.3 m"\n[[scenario.branch.part]]\ntype = "tube"\nshape = "d-shaped"\n'
            'diameter = "3 mm"\nlength = "0.2 m"\n[[scenario.branch.part]]\ntype = "check-valve"\n'
            "k = 3\n",
        ),
    )
    table = run(sset).table
    line = rheoline.Line(
        [
            Tube(shape=Annulus(2e-3, 0.9e-3), length=0.3),
            Tube(shape=Semicircle(3e-3), length=0.2),
            CheckValve(k=3.0),
        ]
    )
    expected = line.solve(
        rheoline.fluid("saline-0.9", temperature_c=22.0), head=1.0, back_pressure=8 * MMHG
    ).flow
    assert table["flow [mL/min]"].iloc[0] == pytest.approx(expected / ML_PER_MIN, rel=1e-9)


# --------------------------------------------------------------------------- runs
def test_one_branch_network_gives_the_line_scenario_answer():
    parts = 'type = "set"\nkind = "gravity-set"\n[[scenario.branch.part]]\ntype = "catheter"\ngauge = 18\n'
    net = run(load(node("bag", "bag", head="90 cm"), VEIN, branch("set", "bag", "vein", parts)))
    line = run(
        loads_scenarios(
            HEAD + 'head = "90 cm"\nback_pressure = "8 mmHg"\nmodel_band = false\n'
            '[[scenario.part]]\ntype = "set"\n'
            'kind = "gravity-set"\n[[scenario.part]]\ntype = "catheter"\ngauge = 18\n'
        )
    )
    for column in ("flow [mL/min]", "max Reynolds number", "max wall shear stress [Pa]"):
        assert net.table[column].iloc[0] == pytest.approx(line.table[column].iloc[0], rel=1e-9)
    assert net.table["drive"].iloc[0] == "network" and net.table["reversed flow [mL/min]"][0] == 0
    assert np.isnan(line.table["reversed flow [mL/min]"].iloc[0])
    drops = net.parts.set_index("part")["pressure drop [Pa]"]
    assert drops["set / 18G catheter"] == pytest.approx(
        line.parts.set_index("part")["pressure drop [Pa]"]["18G catheter"], rel=1e-9
    )
    assert {"kirchhoff-1847", "todini-pilati-1988"} <= set(net.models_used)
    # the same models as the line without its model band (a network run has no band)
    assert set(line.models_used) <= set(net.models_used)
    assert "todini-pilati-1988" not in line.models_used


def _ward_network(check_valve, pump_ml_h):
    """The ward example's network built directly with the model (same parts and nodes)."""
    gravity = [extension_set("gravity-set", name="gravity set"), Fitting(k=2.0)]
    if check_valve:
        gravity.append(CheckValve(k=4.0))
    return PartNetwork(
        [
            Branch("gravity set", "saline bag", "y-site", gravity),
            Branch("pump line", "pump", "y-site", [Tube(inner_diameter=2.5e-3, length=2.5)]),
            Branch(
                "extension and catheter",
                "y-site",
                "vein",
                [extension_set("small-bore-extension"), Catheter(gauge=22)],
            ),
        ],
        [PressureNode("saline bag", head=0.6), PressureNode("vein", 8 * MMHG, outlet=True)],
        [Pump("pump", flow=np.asarray(pump_ml_h) * 1e-6 / 3600, pressure_limit=300 * MMHG)],
    )


def test_ward_example_reports_backflow_into_the_bag_in_words_and_data():
    result = run(load_scenarios(example_path("ward-y-site")))
    table, branches = result.table, result.branches
    fluid = rheoline.fluid("saline-0.9", temperature_c=22.0)
    for valved, scenario in (
        (False, "Y-site without a check valve"),
        (True, "Y-site with a check valve on the gravity line"),
    ):
        rows = table[table["scenario"] == scenario]
        model = _ward_network(valved, [100.0, 500.0, 1500.0]).solve(fluid)
        gravity = branches[
            (branches["branch"] == "gravity set") & branches["case"].isin(rows["case"])
        ]
        np.testing.assert_allclose(
            gravity["flow [mL/min]"], model.branch_flow[0] / ML_PER_MIN, rtol=1e-9
        )
        outflow = -model.pressure_node_inflow[1] / ML_PER_MIN
        np.testing.assert_allclose(rows["flow [mL/min]"], outflow, rtol=1e-9)
        assert list(gravity["reversed"]) == list(model.reversed[0])
        assert not valved or not gravity["reversed"].any()
    backward = table.set_index("case").loc["Y-site without a check valve | 1500 mL/h"]
    amount = backward["reversed flow [mL/min]"]
    assert amount > 1.0 and backward["reversed branch"] == "gravity set"
    assert f"{amount:.3g} mL/min pushed back into saline bag by pump" in backward["flags"]
    assert "reversed flow in gravity set" in backward["flags"]
    valved = table.set_index("case").loc[
        "Y-site with a check valve on the gravity line | 1500 mL/h"
    ]
    assert valved["flags"] == "check valve closed in gravity set"
    assert valved["flow [mL/min]"] == pytest.approx(25.0, rel=1e-12)  # all of the pump's flow


def test_a_check_valve_against_the_pump_is_flagged_as_an_occlusion():
    valve_back = 'type = "tube"\ninner_diameter = "1 mm"\nlength = "1 m"\n' + (
        '[[scenario.branch.part]]\ntype = "check-valve"\nk = 4.0\n'
    )
    sset = load(
        BAG,
        VEIN,
        node("pump", "pump", flow="60 mL/h"),
        node("y", "junction"),
        branch("gravity", "bag", "y"),
        branch("pump line", "y", "pump", valve_back),
        branch("catheter", "y", "vein"),
    )
    row = run(sset).table.iloc[0]
    assert "pump occluded at pump: a check valve is closed against its set flow" in row["flags"]
    assert "not converged" not in row["flags"] and "pushed back" not in row["flags"]
    assert row["reversed flow [mL/min]"] == 0


def test_a_blocked_pump_has_no_pressure_in_the_table_json_or_nodes():
    # Pump A's only branch holds a check valve facing it: its set flow has no way out
    # (Kirchhoff 1847), so its pressure has no finite value (it was 4.98e14 mmHg) and the
    # highest pump pressure is empty; pump B's open line has an answer.  Only A is named.
    valve_back = 'type = "tube"\ninner_diameter = "1 mm"\nlength = "1 m"\n' + (
        '[[scenario.branch.part]]\ntype = "check-valve"\nk = 4.0\n'
    )
    sset = load(
        BAG,
        VEIN,
        node("pump A", "pump", flow="60 mL/h", pressure_limit="300 mmHg"),
        node("pump B", "pump", flow="30 mL/h"),
        node("y", "junction"),
        branch("gravity", "bag", "y"),
        branch("line A", "y", "pump A", valve_back),
        branch("line B", "pump B", "y"),
        branch("catheter", "y", "vein"),
    )
    result = run(sset)
    row = result.table.iloc[0]
    assert np.isnan(row["required pressure [mmHg]"])
    assert "pump occluded at pump A: a check valve is closed against its set flow" in row["flags"]
    assert "pump B" not in row["flags"]
    assert "implausible" not in row["flags"]  # no huge pressure left to call implausible
    assert bool(row["over pressure limit"])  # A's pressure rises to its alarm
    nodes = result.nodes.set_index("node")
    assert np.isnan(nodes.loc["pump A", "pressure [mmHg]"])
    assert bool(nodes.loc["pump A", "over pressure limit"])
    assert np.isfinite(nodes.loc["pump B", "pressure [mmHg]"])
    drops = result.branches.set_index("branch")["pressure drop [mmHg]"]
    assert np.isnan(drops["line A"]) and np.isfinite(drops["line B"])
    [record] = json.loads(json.dumps(result.records(), allow_nan=False))
    assert record["required_pressure_mmhg"] is None
    pressures = {n["name"]: n["pressure_mmhg"] for n in record["nodes"]}
    assert pressures["pump A"] is None and pressures["pump B"] > 0


def test_a_blocked_pump_delivers_nothing_in_the_table_json_and_node_rows():
    # An occluded pump delivers nothing at steady state: the case is the network without
    # pump A and its line (Kirchhoff 1847), pump A's node row takes in 0 and the node rows
    # balance; B pushes back into the bag and the flag names B alone.
    valve_back = 'type = "tube"\ninner_diameter = "1 mm"\nlength = "1 m"\n' + (
        '[[scenario.branch.part]]\ntype = "check-valve"\nk = 4.0\n'
    )
    common = (BAG, VEIN, node("pump B", "pump", flow="3000 mL/h"), node("y", "junction"))
    pipes = (branch("gravity", "bag", "y"), branch("line B", "pump B", "y"))
    pipes += (branch("catheter", "y", "vein"),)
    with_a = run(
        load(
            *common,
            node("pump A", "pump", flow="60 mL/h"),
            *pipes,
            branch("line A", "y", "pump A", valve_back),
        )
    )
    without = run(load(*common, *pipes))
    row, alone = with_a.table.iloc[0], without.table.iloc[0]
    assert row["flow [mL/min]"] == pytest.approx(alone["flow [mL/min]"], rel=1e-9)
    assert (
        "pump occluded at pump A: a check valve is closed against its set flow (no solution "
        "with it; shown with the pump delivering nothing" in row["flags"]
    )
    back = [f for f in row["flags"].split("; ") if "pushed back" in f]
    assert back == [f for f in alone["flags"].split("; ") if "pushed back" in f]
    assert back[0].endswith("pushed back into bag by pump B")
    nodes = with_a.nodes.set_index("node")["flow in [mL/min]"]
    assert nodes["pump A"] == 0.0
    assert abs(nodes.sum()) < 1e-9 * nodes.abs().max()  # what enters leaves
    others = without.nodes.set_index("node")
    for name in ("bag", "vein", "pump B", "y"):
        assert nodes[name] == pytest.approx(others.loc[name, "flow in [mL/min]"], rel=1e-9)
        got = with_a.nodes.set_index("node").loc[name, "pressure [mmHg]"]
        assert got == pytest.approx(others.loc[name, "pressure [mmHg]"], rel=1e-9)
    [record] = json.loads(json.dumps(with_a.records(), allow_nan=False))
    flow_in = {n["name"]: n["flow_in_ml_min"] for n in record["nodes"]}
    assert flow_in["pump A"] == 0.0 and record["required_pressure_mmhg"] is None
    assert flow_in["vein"] == pytest.approx(-alone["flow [mL/min]"], rel=1e-9)


def test_sweep_points_equal_single_scenarios_and_balance_mass():
    text = HEAD + "".join(
        [
            node("bag", "bag", head="80 cm"),
            node("pump", "pump", pressure_limit="300 mmHg"),
            'flow = ["60 mL/h", "900 mL/h", "2400 mL/h"]\n',
            node("y", "junction"),
            VEIN,
            branch("set", "bag", "y", 'type = "set"\nkind = "gravity-set"\n'),
            branch("pump line", "pump", "y"),
            branch("catheter", "y", "vein", 'type = "catheter"\ngauge = [20, 22]\n'),
        ]
    )
    swept = run(loads_scenarios(text))
    assert len(swept.table) == 6
    for case, row in swept.table.set_index("case").iterrows():
        flow_text, gauge = row["point"].split(", ")
        single = text.replace('["60 mL/h", "900 mL/h", "2400 mL/h"]', f'"{flow_text}"')
        single = single.replace("gauge = [20, 22]", f"gauge = {gauge[:-1]}")
        one = run(loads_scenarios(single))
        assert one.table["flow [mL/min]"].iloc[0] == pytest.approx(row["flow [mL/min]"], rel=1e-9)
        mine = swept.nodes[swept.nodes["case"] == case].set_index("node")["flow in [mL/min]"]
        # Kirchhoff 1847: what the bag and the pump feed in leaves at the vein
        assert mine["bag"] + mine["pump"] == pytest.approx(-mine["vein"], rel=1e-9)
        assert mine["y"] == 0.0


def test_trauma_bay_shares_its_flow_between_five_lumens():
    result = run(load_scenarios(example_path("trauma-bay")))
    for case, rows in result.branches.groupby("case", sort=False):
        flows = rows.set_index("branch")["flow [mL/min]"]
        lumens = flows.drop("rapid line")
        assert lumens.sum() == pytest.approx(flows["rapid line"], rel=1e-9)
        assert flows["left arm 16G"] > flows["right arm 18G"]
        assert flows["central line medial lumen"] == pytest.approx(
            flows["central line proximal lumen"], rel=1e-12
        )
        total = result.table.set_index("case").loc[case, "flow [mL/min]"]
        assert total == pytest.approx(flows["rapid line"], rel=1e-9)
    assert not result.branches["reversed"].any()
    assert (result.table["reversed flow [mL/min]"] == 0).all()


def test_run_json_records_gain_branches(capsys):
    from rheoline import cli

    assert cli.main(["run", str(example_path("ward-y-site")), "--json"]) == 0
    out, err = capsys.readouterr()
    records = json.loads(out)
    assert rheoline.CAUTION in err and all(r["caution"] == rheoline.CAUTION for r in records)
    back = next(r for r in records if r["name"] == "Y-site without a check valve | 1500 mL/h")
    names = [b["name"] for b in back["branches"]]
    assert names == ["gravity set", "pump line", "extension and catheter"]
    gravity = back["branches"][0]
    assert gravity["reversed"] is True and gravity["flow_ml_min"] < 0
    assert back["reversed_flow_ml_min"] == pytest.approx(-gravity["flow_ml_min"], rel=1e-12)
    assert back["reversed_branch"] == "gravity set"
    assert {n["name"]: n["type"] for n in back["nodes"]}["y-site"] == "junction"
    assert all(
        {"name", "flow_ml_min", "reversed"} <= set(b) for r in records for b in r["branches"]
    )


def test_line_records_have_no_branches(capsys):
    from rheoline import cli

    assert cli.main(["run", str(example_path("minimal")), "--json"]) == 0
    [record] = json.loads(capsys.readouterr().out)
    assert "branches" not in record and "reversed_flow_ml_min" not in record


def test_check_names_the_network(capsys):
    from rheoline import cli

    assert cli.main(["check", str(example_path("trauma-bay"))]) == 0
    out = capsys.readouterr().out
    assert "pressure bag: network of 5 nodes and 6 branches, 12 part(s)" in out


# --------------------------------------------------------------------------- packs
def test_pack_of_a_branched_run_has_branch_and_node_tables_with_the_caution(tmp_path):
    import csv

    from openpyxl import load_workbook

    from rheoline.scenario.export import is_review_pack, write_pack

    result = run(load_scenarios(example_path("ward-y-site")))
    folder = write_pack(result, tmp_path / "pack")
    for name, columns in (("branches.csv", "branch"), ("nodes.csv", "node")):
        with (folder / name).open(encoding="utf-8", newline="") as fh:
            rows = list(csv.reader(fh))
        assert rows[0] == ["caution: " + rheoline.CAUTION]
        assert columns in rows[1] and len(rows) == 2 + (18 if name == "branches.csv" else 24)
    book = load_workbook(folder / "results.xlsx", read_only=True)
    assert {"branches", "nodes"} <= set(book.sheetnames)
    assert next(book["branches"].iter_rows(values_only=True))[0] == "caution: " + rheoline.CAUTION
    page = (folder / "report.html").read_text(encoding="utf-8")
    assert page.index(html.escape(rheoline.CAUTION)) < page.index("Branches of each branched line")
    assert (
        "Y-site without a check valve | 1500 mL/h: flow runs backwards in branch gravity set"
        in page
    )
    assert "mL/min flows back into saline bag (bag)" in page
    manifest = json.loads((folder / "manifest.json").read_text())
    assert {"branches.csv", "nodes.csv"} <= set(manifest["files_sha256"])
    assert is_review_pack(folder)
    assert write_pack(result, folder, force=True) == folder  # replaces its own pack


def test_pack_of_lines_only_adds_no_network_files(tmp_path):
    from rheoline.scenario.export import write_pack

    folder = write_pack(run(load_scenarios(example_path("minimal"))), tmp_path / "pack")
    names = {p.name for p in folder.iterdir()}
    assert not names & {"branches.csv", "nodes.csv"}
    assert "Branches of each branched line" not in (folder / "report.html").read_text()


def test_hostile_node_and_branch_names_are_escaped_and_neutralized(tmp_path):
    import csv

    from rheoline.scenario.export import write_pack

    evil = "<img src=x onerror=alert(1)>"
    sset = load(
        node("=HYPERLINK(1)", "bag", head="1 m"),
        node(evil, "outlet"),
        branch("@SUM(A1)", "=HYPERLINK(1)", evil),
    )
    folder = write_pack(run(sset), tmp_path / "pack")
    page = (folder / "report.html").read_text(encoding="utf-8")
    assert evil not in page and "&lt;img src=x onerror=alert(1)&gt;" in page
    with (folder / "branches.csv").open(encoding="utf-8", newline="") as fh:
        cells = [c for row in csv.reader(fh) for c in row]
    assert "'@SUM(A1)" in cells and "'=HYPERLINK(1)" in cells
    assert not any(c.startswith(("=", "@", "+")) for c in cells)


def test_network_rows_flag_a_measured_part_outside_its_bench_and_implausible_answers():
    # a bench curve of 1-2 mL/min driven at about 30 mL/min: flagged as a line's would be
    measured = (
        'type = "measured"\nflows = ["1 mL/min", "2 mL/min"]\n'
        'pressure_drops = ["10 mmHg", "20 mmHg"]\n'
    )
    bag = node("bag", "bag", head="1 m") + 'pressure = "300 mmHg"\n'
    result = run(load(bag, VEIN, branch("bench", "bag", "vein", measured)))
    assert "measured part used outside its bench flows" in result.table["flags"].iloc[0]
    assert "physically implausible" not in result.table["flags"].iloc[0]
    # a pump forcing 20 L/min through a 0.3 mm, 1 m tube: no line holds that
    pump = node("pump", "pump", flow="20 L/min")
    tiny = 'type = "tube"\ninner_diameter = "0.3 mm"\nlength = "1 m"\n'
    result = run(load(pump, VEIN, branch("tiny", "pump", "vein", tiny)))
    assert "physically implausible" in result.table["flags"].iloc[0]
