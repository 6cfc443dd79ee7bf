"""Read and check the topology of a branched scenario, and write it back.

:func:`parse_branched_scenario` validates a ``[[scenario]]`` table that holds
``[[scenario.node]]`` and ``[[scenario.branch]]`` tables (see
:mod:`rheoline.scenario.topology`) into a
:class:`~rheoline.scenario.description.Scenario` with a ``topology``.  Every problem is one
:class:`~rheoline.errors.ScenarioError` naming the file, the scenario and the field: a node
named twice, an unknown node (with the nearest name), a branch from a node to itself, a
node on no branch, a junction that ends one branch only (a dead end), a disconnected branch
or a loop with no source (a part of the network joined to no bag, source or outlet, found
by :func:`rheoline.model.network_topology.sourceless_parts`, the model's own check).
:func:`topology_data` is the writer's side: the plain data of the tables.

Examples
--------
>>> from rheoline.scenario.reading import loads_scenarios
>>> text = '''
... format_version = 1
... [[scenario]]
... name = "two catheters"
... fluid = "saline-0.9"
... [[scenario.node]]
... name = "bag"
... type = "bag"
... head = "1 m"
... [[scenario.node]]
... name = "vein"
... type = "outlet"
... [[scenario.branch]]
... name = "left"
... from = "bag"
... to = "vein"
... [[scenario.branch.part]]
... type = "catheter"
... gauge = 18
... [[scenario.branch]]
... name = "right"
... from = "bag"
... to = "vein"
... [[scenario.branch.part]]
... type = "catheter"
... gauge = [18, 20]
... '''
>>> sc = loads_scenarios(text).scenarios[0]
>>> [b.name for b in sc.topology.branches], sc.n_points, [p for p, _ in sc.axes]
(['left', 'right'], 2, ['branch[2].part[1].gauge'])
>>> loads_scenarios(text.replace('to = "vein"', 'to = "veins"'))
Traceback (most recent call last):
...
rheoline.errors.ScenarioError: <string>, scenario 'two catheters', field 'branch[1].to': unknown node 'veins'; did you mean 'vein'? The nodes are: bag, vein
"""

from __future__ import annotations

import difflib

from rheoline.scenario import schema
from rheoline.scenario.description import DriveSpec, FluidSpec, Scenario
from rheoline.scenario.topology import (
    BRANCH_FIELDS,
    MAX_BRANCHES,
    MAX_NODES,
    NODE_FIELDS,
    NODE_TYPES,
    REQUIRED_NODE,
    BranchSpec,
    NodeSpec,
    TopologySpec,
)
from rheoline.scenario.values import (
    check_keys,
    check_text,
    parse_field,
    shown,
    table_type,
    type_name,
)

__all__ = ["LINE_ONLY_FIELDS", "parse_branched_scenario", "topology_data"]

#: Scenario fields of a line that a branched scenario gives elsewhere (or not at all),
#: with where they go.
LINE_ONLY_FIELDS = {
    "head": "give each bag node its head",
    "source_pressure": "give a bag or source node its pressure",
    "back_pressure": "give each outlet node its pressure",
    "flow": "give each pump node its flow",
    "pressure_limit": "give each pump node its pressure_limit",
    "volume": "delivery times are computed for lines only",
    "head_when_empty": "delivery times are computed for lines only",
    "source_pressure_when_empty": "delivery times are computed for lines only",
    "pressure_time_constant": "delivery times are computed for lines only",
    "vein_diameter": "the catheter-to-vein ratio is computed for lines only",
    "tolerance": "tolerance bands are computed for lines only",
    "part": "put the parts in the branches, as [[scenario.branch.part]] tables",
}


def parse_branched_scenario(raw, values, at, name, notes) -> Scenario:
    """The :class:`Scenario` of a branched ``[[scenario]]`` table.

    Parameters
    ----------
    raw : dict
        The table as read.
    values : dict
        Its fluid fields, parsed (file key -> Value or Axis).
    at : rheoline.scenario.values.Where
        The file and scenario, for messages.
    name, notes : str
        The scenario's name and notes, checked.
    """
    for key, where in LINE_ONLY_FIELDS.items():
        if key in raw:
            at.fail(
                f"applies to a line of parts; a branched scenario (with [[scenario.branch]]) "
                f"gives its drives at its nodes: {where}",
                key,
            )
    nodes = _parse_nodes(_table_list(raw, "node", MAX_NODES, at), at)
    names = [n.name for n in nodes]
    branches = []
    for i, b in enumerate(_table_list(raw, "branch", MAX_BRANCHES, at), start=1):
        branches.append(_parse_branch(b, i, names, at))
        _once([x.name for x in branches], "branch", f"branch[{i}].name", at)
    topology = TopologySpec(tuple(nodes), tuple(branches))
    _check_graph(topology, at)
    return Scenario(
        name, FluidSpec.from_keys(values), DriveSpec(), (), notes=notes, topology=topology
    )


def _table_list(raw, key, limit, at):
    if key not in raw:
        other = "branch" if key == "node" else "node"
        at.fail(
            f"is missing; a branched scenario (it gives [[scenario.{other}]]) lists its "
            f"{'nodes (bag, source, pump, outlet, junction)' if key == 'node' else 'branches'} "
            f"in [[scenario.{key}]] tables",
            key,
        )
    tables = raw[key]
    if not isinstance(tables, list) or not tables:
        got = "an empty list" if tables == [] else type_name(tables)
        at.fail(f"must be a non-empty list of [[scenario.{key}]] tables, got {got}", key)
    if len(tables) > limit:
        at.fail(f"{len(tables)} entries is above the limit of {limit}", key)
    for i, t in enumerate(tables, start=1):
        if not isinstance(t, dict):
            at.fail(f"must be a table, got {type_name(t)}", f"{key}[{i}]")
    return tables


def _once(names, what, path, at):
    """Fail at ``path`` if the last of ``names`` was given before."""
    *before, last = names
    if last in before:
        at.fail(
            f"{what} '{shown(last)}' is named twice ({what}[{before.index(last) + 1}] and "
            f"{what}[{len(names)}]); give each {what} one entry with a unique name",
            path,
        )


def _name(raw, path, at):
    if "name" not in raw:
        at.fail('is missing; give it a unique name = "..."', path + "name")
    text = check_text(raw["name"], at, path + "name", schema.MAX_NAME_CHARS).strip()
    if not text:
        at.fail("must not be empty", path + "name")
    return text


# --------------------------------------------------------------------------- nodes
def _parse_nodes(tables, at):
    nodes = []
    for i, raw in enumerate(tables, start=1):
        prefix = f"node[{i}]."
        name = _name(raw, prefix, at)
        ntype = table_type(raw, prefix, at, "node type", NODE_TYPES)
        specs = NODE_FIELDS[ntype]
        check_keys(raw, specs, at, prefix, what=f"{ntype} node field")
        for key in REQUIRED_NODE.get(ntype, ()):
            if key not in raw:
                at.fail(f"is missing: a {ntype} node needs {key}", prefix + key)
        fields = {
            key: parse_field(raw[key], spec, at, prefix + key)
            for key, spec in specs.items()
            if key in raw and key not in ("name", "type")
        }
        nodes.append(NodeSpec(name, ntype, fields))
        _once([n.name for n in nodes], "node", prefix + "name", at)
    return nodes


# --------------------------------------------------------------------------- branches
def _parse_branch(raw, i, node_names, at):
    from rheoline.scenario.reading import _parse_part

    prefix = f"branch[{i}]."
    check_keys(raw, BRANCH_FIELDS, at, prefix, what="branch field")
    name = _name(raw, prefix, at)
    ends = []
    for key, words in (("from", "starts at"), ("to", "ends at")):
        if key not in raw:
            at.fail(f"is missing; name the node the branch {words}", prefix + key)
        node = check_text(raw[key], at, prefix + key, schema.MAX_NAME_CHARS).strip()
        if node not in node_names:
            near = difflib.get_close_matches(node, node_names, n=1, cutoff=0.6)
            hint = f"; did you mean '{shown(near[0])}'?" if near else ""
            listed = ", ".join(shown(n) for n in node_names[:12])
            more = f", ... ({len(node_names)} in all)" if len(node_names) > 12 else ""
            at.fail(
                f"unknown node '{shown(node)}'{hint} The nodes are: {listed}{more}",
                prefix + key,
            )
        ends.append(node)
    if ends[0] == ends[1]:
        at.fail(
            f"the branch runs from node '{shown(ends[0])}' to itself, a loop with no source; "
            "give it two different nodes",
            prefix + "to",
        )
    parts_raw = raw.get("part")
    if not isinstance(parts_raw, list) or not parts_raw:
        got = "nothing" if parts_raw is None else type_name(parts_raw)
        at.fail(
            f"must be a non-empty list of [[scenario.branch.part]] tables, got {got}",
            prefix + "part",
        )
    if len(parts_raw) > schema.MAX_PARTS:
        at.fail(f"{len(parts_raw)} parts is above the limit of {schema.MAX_PARTS}", prefix + "part")
    parts = tuple(_parse_part(p, j, at, base=prefix) for j, p in enumerate(parts_raw, start=1))
    return BranchSpec(name, ends[0], ends[1], parts)


# --------------------------------------------------------------------------- the graph
def _check_graph(topology, at):
    """Every node on a branch, no dead-end junction, every part of the network held."""
    from rheoline.model.network_topology import sourceless_parts

    branches = topology.branches
    for i, node in enumerate(topology.nodes, start=1):
        on = [b.name for b in branches if node.name in (b.start, b.end)]
        if not on:
            at.fail(
                f"node '{shown(node.name)}' is on no branch; name it in a branch's from or to, "
                "or remove it",
                f"node[{i}].name",
            )
        if node.type == "junction" and len(on) == 1:
            at.fail(
                f"junction '{shown(node.name)}' ends branch '{shown(on[0])}' and no other: a dead "
                "end where no fluid can go; make it an outlet, or join another branch to it",
                f"node[{i}].type",
            )
    if not topology.held_nodes:
        at.fail(
            "the network has no bag, source or outlet, so its pressures are undetermined; give "
            "at least one node the type bag, source or outlet",
            "node",
        )
    names = [n.name for n in topology.nodes]
    held = {n.name for n in topology.held_nodes}
    for nodes, part, kind in sourceless_parts(names, branches, held)[:1]:
        first = next(i for i, b in enumerate(branches, start=1) if b.name == part[0])
        listed = ", ".join(f"'{shown(b)}'" for b in part[:6])
        at.fail(
            f"branch(es) {listed} (nodes {', '.join(shown(n) for n in nodes[:6])}) are joined to "
            f"no bag, source or outlet: {kind}, whose pressures and flows are undetermined; "
            "join them to the rest of the network, or make one of their nodes a bag, source or "
            "outlet",
            f"branch[{first}].name",
        )


# --------------------------------------------------------------------------- writing
def topology_data(topology, plain, part_data) -> dict:
    """The ``node`` and ``branch`` tables of ``topology`` as plain data.

    ``plain(field, spec)`` writes one field and ``part_data(part)`` one part table (the
    writer's own, :mod:`rheoline.scenario.writing`), so a branch's parts are written as a
    line's are.
    """
    nodes = []
    for n in topology.nodes:
        table = {"name": n.name, "type": n.type}
        specs = NODE_FIELDS[n.type]
        table.update((k, plain(v, specs[k])) for k, v in n.fields.items())
        nodes.append(table)
    branches = [
        {"name": b.name, "from": b.start, "to": b.end, "part": [part_data(p) for p in b.parts]}
        for b in topology.branches
    ]
    return {"node": nodes, "branch": branches}
