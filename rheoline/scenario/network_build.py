"""Build the model of a branched scenario: sweep groups, the fluid, the branches, the network.

A branched scenario's sweep points are gathered into :class:`NetworkGroup` s as a line's
are (:mod:`rheoline.scenario.build`): points that share their fluid and the discrete
choices of every part of every branch are solved together, every other field (node heads,
pressures and pump flows, part sizes, temperatures) an array over the group's points.
:func:`build_network` turns a group into a :class:`BuiltNetwork`: the fluid and a
:class:`rheoline.model.branched.PartNetwork` whose bags, sources and outlets are pressure
nodes and whose pumps push their set flows.  A model error names the file's field.

Examples
--------
>>> from rheoline.scenario.reading import example_path, load_scenarios
>>> sset = load_scenarios(example_path("ward-y-site"))
>>> g = network_groups(sset.scenarios[0])[0]
>>> built = build_network(g, sset.source)
>>> [b.name for b in built.network.branches]
['gravity set', 'pump line', 'extension and catheter']
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field

import numpy as np

from rheoline.errors import RheolineError, ScenarioError
from rheoline.scenario.build import (
    _DISCRETE,
    Group,
    _stacked_part,
    build_fluid,
    build_part_list,
)
from rheoline.scenario.description import Axis, sweep_points

__all__ = ["NetworkGroup", "BuiltNetwork", "network_groups", "branch_group", "build_network"]


@dataclass
class NetworkGroup(Group):
    """Sweep points of one branched scenario solved together.

    As :class:`rheoline.scenario.build.Group`, with ``parts`` the field values of every
    part of every branch (in :attr:`TopologySpec.part_paths` order) and ``nodes`` those of
    every node (arrays over the group's points).
    """

    nodes: list = field(default_factory=list)


@dataclass(frozen=True)
class BuiltNetwork:
    """The model objects of a :class:`NetworkGroup`: its fluid, its network, and per branch
    its parts (source to end, as the branch's line holds them)."""

    fluid: object
    network: object
    branch_parts: tuple


def _point(sc, pt):
    """The fluid fields, node fields and part fields of sweep point ``pt``."""

    def pick(path, value):
        return pt[path][0] if isinstance(value, Axis) else value

    topo = sc.topology
    vals = {k: (pt[k][0] if k in pt else v) for k, v in sc.values.items()}
    nodes = [
        {k: pick(f"node[{i}].{k}", v) for k, v in n.values.items()}
        for i, n in enumerate(topo.nodes, start=1)
    ]
    parts = [{k: pick(prefix + k, v) for k, v in p.values.items()} for prefix, p in topo.part_paths]
    return vals, nodes, parts


def network_groups(sc):
    """The sweep points of the branched scenario ``sc`` gathered into
    :class:`NetworkGroup` s (in first-point order)."""
    keyed = {}
    for i, pt in enumerate(sweep_points(sc)):
        vals, nodes, parts = _point(sc, pt)
        key = (
            vals["fluid"],
            tuple(tuple((k, v) for k, v in sorted(pv.items()) if k in _DISCRETE) for pv in parts),
        )
        label = ", ".join(shown for _, shown in pt.values())
        keyed.setdefault(key, []).append((i, label, vals, parts, nodes))
    out = []
    for members in keyed.values():
        vals = {
            k: members[0][2][k] if k == "fluid" else np.asarray([m[2][k] for m in members], float)
            for k in members[0][2]
        }
        parts = [_stacked_part(members, j) for j in range(len(members[0][3]))]
        as_parts = [(m[0], m[1], m[2], m[4]) for m in members]
        nodes = [_stacked_part(as_parts, j) for j in range(len(members[0][4]))]
        out.append(
            NetworkGroup(sc, [m[0] for m in members], [m[1] for m in members], vals, parts, nodes)
        )
    return out


def branch_group(g, i):
    """A line :class:`~rheoline.scenario.build.Group` of branch ``i`` (0-based) of ``g``:
    the scenario's fluid and that branch's parts, for the line builders and part names."""
    topo = g.scenario.topology
    start = sum(len(b.parts) for b in topo.branches[:i])
    branch = topo.branches[i]
    line_scenario = dataclasses.replace(g.scenario, parts=branch.parts, topology=None)
    parts = g.parts[start : start + len(branch.parts)]
    return Group(line_scenario, g.indices, g.labels, g.values, parts)


def _fail(g, source, exc, path):
    return ScenarioError(str(exc), source=source, scenario=repr(g.scenario.name), field=path)


def build_network(g, source) -> BuiltNetwork:
    """The fluid and :class:`~rheoline.model.branched.PartNetwork` of group ``g``."""
    from rheoline.model.branched import Branch, PartNetwork, PressureNode, Pump
    from rheoline.model.line import Line

    topo = g.scenario.topology
    fluid = build_fluid(g, source)
    branches, parts = [], []
    for i, b in enumerate(topo.branches):
        bg = branch_group(g, i)
        made = build_part_list(b.parts, bg.parts, source, g.scenario.name, f"branch[{i + 1}].")
        try:
            branches.append(Branch(b.name, b.start, b.end, Line(made)))
        except RheolineError as exc:
            raise _fail(g, source, exc, f"branch[{i + 1}].part") from None
        parts.append(tuple(made))
    held, pumps = [], []
    for i, (node, v) in enumerate(zip(topo.nodes, g.nodes, strict=True), start=1):
        try:
            if node.held:
                held.append(
                    PressureNode(
                        node.name,
                        pressure=v.get("pressure", 0.0),
                        head=v.get("head", 0.0),
                        label=node.name,
                        outlet=node.type == "outlet",
                    )
                )
            elif node.type == "pump":
                pumps.append(Pump(node.name, v["flow"], v.get("pressure_limit"), label=node.name))
        except RheolineError as exc:
            raise _fail(g, source, exc, f"node[{i}]") from None
    try:
        network = PartNetwork(branches, held, pumps, name=g.scenario.name)
    except RheolineError as exc:
        raise _fail(g, source, exc, "branch") from None
    return BuiltNetwork(fluid, network, tuple(parts))
