"""A branched scenario's sweep points gathered into groups (scenario/network_build.py).

The groups are built a field at a time by the line's own gathering
(:func:`rheoline.scenario.build.gathered`); here every group's arrays are read back point by
point against the sweep itself (``sweep_points``) and the file's fields, an independent path.
"""

import numpy as np

from rheoline.scenario.description import Axis, sweep_points
from rheoline.scenario.files import loads_scenarios
from rheoline.scenario.network_build import network_groups

TEXT = """format_version = 1
[[scenario]]
name = "swept network"
fluid = ["saline-0.9", "water"]
temperature = ["20 degC", "37 degC"]
[[scenario.node]]
name = "bag"
type = "bag"
head = ["60 cm", "90 cm"]
[[scenario.node]]
name = "pump"
type = "pump"
flow = ["10 mL/h", "100 mL/h", "900 mL/h"]
pressure_limit = "300 mmHg"
[[scenario.node]]
name = "y"
type = "junction"
[[scenario.node]]
name = "vein"
type = "outlet"
pressure = "8 mmHg"
[[scenario.branch]]
name = "set"
from = "bag"
to = "y"
[[scenario.branch.part]]
type = "tube"
inner_diameter = "3 mm"
length = ["1 m", "2 m"]
[[scenario.branch]]
name = "pump line"
from = "pump"
to = "y"
[[scenario.branch.part]]
type = "measured"
flows = ["10 mL/min", "40 mL/min"]
pressure_drops = ["20 mmHg", "90 mmHg"]
[[scenario.branch]]
name = "catheter"
from = "y"
to = "vein"
[[scenario.branch.part]]
type = "catheter"
gauge = [20, 22]
"""


def _expected(holder_value, point, path):
    """The value of one field at one sweep point, from the sweep (swept) or the file."""
    if isinstance(holder_value, Axis):
        return point[path][0]
    return holder_value


def test_network_groups_hold_every_points_own_values():
    sc = loads_scenarios(TEXT).scenarios[0]
    points = sweep_points(sc)
    groups = network_groups(sc)
    # fluid x gauge: four groups, in first-point order; every point in exactly one
    assert len(points) == 2 * 2 * 2 * 3 * 2 * 2
    assert len(groups) == 4
    assert sorted(i for g in groups for i in g.indices) == list(range(len(points)))
    assert [g.indices[0] for g in groups] == sorted(g.indices[0] for g in groups)
    topo = sc.topology
    for g in groups:
        pts = [points[i] for i in g.indices]
        assert g.labels == [", ".join(shown for _, shown in pt.values()) for pt in pts]
        assert {pt["fluid"][0] for pt in pts} == {g.values["fluid"]}
        assert {pt["branch[3].part[1].gauge"][0] for pt in pts} == {g.parts[2]["gauge"]}
        want = [_expected(sc.values["temperature"], pt, "temperature") for pt in pts]
        np.testing.assert_array_equal(g.values["temperature"], want)
        for i, node in enumerate(topo.nodes, start=1):
            for key, value in node.values.items():
                want = [_expected(value, pt, f"node[{i}].{key}") for pt in pts]
                np.testing.assert_array_equal(g.nodes[i - 1][key], want)
        for (prefix, spec), stacked in zip(topo.part_paths, g.parts, strict=True):
            for key in ("inner_diameter", "length"):
                if key in spec.values:
                    want = [_expected(spec.values[key], pt, prefix + key) for pt in pts]
                    np.testing.assert_array_equal(stacked[key], want)
        assert np.ptp(g.parts[0]["length"]) > 0 and np.ptp(g.nodes[0]["head"]) > 0
        # the measured pairs are fixed: one array of the bench points, not one per point
        np.testing.assert_allclose(g.parts[1]["flows"], np.array([10.0, 40.0]) * 1e-6 / 60)
