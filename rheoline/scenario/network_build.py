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

from rheoline.errors import RheolineError, ScenarioError
from rheoline.scenario.build import Group, build_fluid, build_part_list, gathered

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


def network_groups(sc):
    """The sweep points of the branched scenario ``sc`` gathered into
    :class:`NetworkGroup` s (in first-point order), as a line's points are
    (:func:`rheoline.scenario.build.gathered`, with every branch's parts and every node)."""
    topo = sc.topology
    holders = [(prefix, p.values) for prefix, p in topo.part_paths]
    n_parts = len(holders)
    holders += [(f"node[{i}].", n.values) for i, n in enumerate(topo.nodes, start=1)]
    return [
        NetworkGroup(sc, members, labels, vals, stacked[:n_parts], stacked[n_parts:])
        for members, labels, vals, stacked in gathered(sc, holders)
    ]


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
