"""The topology of a branched scenario: named nodes and branches of parts between them.

A scenario file describes a branched line (two catheters in parallel, a pump joining a
gravity line at a Y-site, the lumens of a central line) by its nodes and branches instead
of one line of parts::

    [[scenario.node]]
    name = "saline bag"
    type = "bag"
    head = "80 cm"

    [[scenario.node]]
    name = "y-site"
    type = "junction"

    [[scenario.branch]]
    name = "gravity set"
    from = "saline bag"
    to = "y-site"

    [[scenario.branch.part]]
    type = "set"
    kind = "gravity-set"

Node types (:data:`NODE_FIELDS`): a ``bag`` (its fluid surface at a ``head`` above the
reference level, squeezed by an optional ``pressure``), a ``source`` (a held ``pressure``
at an optional ``head``), a ``pump`` (a set ``flow`` into the node, with an optional
``pressure_limit``), an ``outlet`` (a vein or a beaker at a ``pressure``, at an optional
``head``) and a ``junction`` (a Y-site, a manifold, a hub: it only conserves mass).  Heads
are heights above the reference level, which is the outlets' level unless an outlet gives
its own ``head``.  Every node a branch names must be listed once; each branch is a list of
parts (the part tables of a line, shapes and multi-lumen catheters included) from its
``from`` node to its ``to`` node, which is the direction its flow is expected to take
(flow the other way is reported as reversed).

This module holds the schema of those tables and the frozen dataclasses of the
description (:class:`NodeSpec`, :class:`BranchSpec`, :class:`TopologySpec`, held by
:attr:`rheoline.scenario.description.Scenario.topology`); the reader is
:mod:`rheoline.scenario.topology_reading`.

Examples
--------
>>> NODE_FIELDS["pump"]["flow"].unit, sorted(REQUIRED_NODE["bag"])
('mL/min', ['head'])
>>> from rheoline.scenario.description import Value
>>> t = TopologySpec(
...     (NodeSpec("bag", "bag", {"head": Value(0.8, "80 cm")}), NodeSpec("vein", "outlet")),
...     (BranchSpec("set", "bag", "vein", ()),),
... )
>>> t.node("bag").values, [n.name for n in t.held_nodes]
({'head': 0.8}, ['bag', 'vein'])
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field

from rheoline.scenario.description import Axis, FrozenMap, Value
from rheoline.scenario.schema import FieldSpec
from rheoline.units import MMHG

__all__ = [
    "MAX_NODES",
    "MAX_BRANCHES",
    "NODE_TYPES",
    "HELD_TYPES",
    "NODE_FIELDS",
    "REQUIRED_NODE",
    "BRANCH_FIELDS",
    "NodeSpec",
    "BranchSpec",
    "TopologySpec",
    "topology_field_spec",
]

#: Most nodes of one branched scenario.
MAX_NODES = 60
#: Most branches of one branched scenario.
MAX_BRANCHES = 60

_BAR = 1e5
_NAME = FieldSpec("text", sweep=False, help="a unique name, used by the branches' from and to")
_TYPE = FieldSpec("text", sweep=False, help="bag, source, pump, outlet or junction")
_HEIGHT = FieldSpec(
    "length", "m", -10.0, 10.0, help="height above the reference level (negative below)"
)

#: The fields of each node type (the file's ``[[scenario.node]]`` tables).
NODE_FIELDS = {
    "bag": {
        "name": _NAME,
        "type": _TYPE,
        "head": FieldSpec(
            "length",
            "m",
            0.0,
            10.0,
            help="height of the bag's fluid surface above the reference level (the outlets')",
        ),
        "pressure": FieldSpec(
            "pressure",
            "mmHg",
            0.0,
            30 * _BAR,
            help="pressure applied to the bag (pressure bag, infuser); none for gravity alone",
        ),
    },
    "source": {
        "name": _NAME,
        "type": _TYPE,
        "pressure": FieldSpec(
            "pressure",
            "mmHg",
            0.0,
            30 * _BAR,
            help="pressure held at the source (a pressurized reservoir, a rapid infuser)",
        ),
        "head": _HEIGHT,
    },
    "pump": {
        "name": _NAME,
        "type": _TYPE,
        "flow": FieldSpec(
            "flow", "mL/min", 1e-12, 20e-3 / 60, help="flow the pump pushes into the node"
        ),
        "pressure_limit": FieldSpec(
            "pressure",
            "mmHg",
            1.0,
            60 * _BAR,
            help="pressure at which the pump would alarm (occlusion limit)",
        ),
    },
    "outlet": {
        "name": _NAME,
        "type": _TYPE,
        "pressure": FieldSpec(
            "pressure",
            "mmHg",
            -200 * MMHG,
            1000 * MMHG,
            help="pressure at the outlet (vein, beaker); 0 when not given",
        ),
        "head": _HEIGHT,
    },
    "junction": {"name": _NAME, "type": _TYPE},
}
#: The node types a file may name.
NODE_TYPES = tuple(NODE_FIELDS)
#: Node types whose pressure is held (the others are solved).
HELD_TYPES = ("bag", "source", "outlet")
#: The fields each node type must give.
REQUIRED_NODE = {"bag": ("head",), "source": ("pressure",), "pump": ("flow",)}

#: The fields of a ``[[scenario.branch]]`` table.
BRANCH_FIELDS = {
    "name": FieldSpec("text", sweep=False, help="a unique name for the branch"),
    "from": FieldSpec("text", sweep=False, help="the node the branch starts at"),
    "to": FieldSpec("text", sweep=False, help="the node the branch ends at (flow expected)"),
    "part": FieldSpec(
        "parts", sweep=False, help="the [[scenario.branch.part]] tables, from 'from' to 'to'"
    ),
}


def topology_field_spec(path: str, node_type: str | None = None) -> FieldSpec:
    """The :class:`FieldSpec` of ``"node[2].head"`` (with the node's type) or of a branch's
    own field ``"branch[1].from"``; a KeyError for a field the file cannot hold."""
    head, key = path.rsplit(".", 1)
    if head.startswith("node["):
        return NODE_FIELDS[node_type][key]
    return BRANCH_FIELDS[key]


def _frozen(mapping):
    return mapping if isinstance(mapping, FrozenMap) else FrozenMap(mapping or {})


def _si(f):
    return f.si if isinstance(f, Value) else f


@dataclass(frozen=True)
class NodeSpec:
    """One node: its name, its type (:data:`NODE_TYPES`) and its fields.

    Attributes
    ----------
    name : str
        The name the branches use.
    type : str
        "bag", "source", "pump", "outlet" or "junction".
    fields : Mapping[str, Value | Axis]
        ``head`` [m], ``pressure`` [Pa], ``flow`` [m^3/s], ``pressure_limit`` [Pa], by file
        key, in schema order.
    """

    name: str
    type: str
    fields: Mapping = field(default_factory=FrozenMap)

    def __post_init__(self):
        object.__setattr__(self, "fields", _frozen(self.fields))

    @property
    def values(self):
        """The fields in SI (an :class:`Axis` where swept), by file key."""
        return {k: _si(v) for k, v in self.fields.items()}

    @property
    def held(self):
        """Whether the node's pressure is held (a bag, a source or an outlet)."""
        return self.type in HELD_TYPES


@dataclass(frozen=True)
class BranchSpec:
    """One branch: its name, its end nodes (the file's ``from`` and ``to``) and its parts
    (:class:`~rheoline.scenario.description.PartSpec`, from ``start`` to ``end``)."""

    name: str
    start: str
    end: str
    parts: tuple = ()

    def __post_init__(self):
        object.__setattr__(self, "parts", tuple(self.parts))


@dataclass(frozen=True)
class TopologySpec:
    """The nodes and branches of a branched scenario (see the module docstring)."""

    nodes: tuple
    branches: tuple

    def __post_init__(self):
        object.__setattr__(self, "nodes", tuple(self.nodes))
        object.__setattr__(self, "branches", tuple(self.branches))

    def node(self, name):
        """The :class:`NodeSpec` named ``name`` (a KeyError if there is none)."""
        for n in self.nodes:
            if n.name == name:
                return n
        raise KeyError(name)

    @property
    def held_nodes(self):
        """The bags, sources and outlets, in file order."""
        return tuple(n for n in self.nodes if n.held)

    @property
    def pumps(self):
        """The pump nodes, in file order."""
        return tuple(n for n in self.nodes if n.type == "pump")

    @property
    def n_parts(self):
        """Parts of all branches together."""
        return sum(len(b.parts) for b in self.branches)

    @property
    def part_paths(self):
        """``(path prefix, PartSpec)`` of every part, e.g. ``("branch[2].part[1].", spec)``."""
        return [
            (f"branch[{i}].part[{j}].", p)
            for i, b in enumerate(self.branches, start=1)
            for j, p in enumerate(b.parts, start=1)
        ]

    def _locate(self, path):
        """``(kind, indices, key)`` of ``"node[i].key"`` or ``"branch[i].part[j].key"``."""
        head, _, key = path.rpartition(".")
        numbers = [int(x.split("]")[0]) - 1 for x in head.split("[")[1:]]
        return ("node" if head.startswith("node[") else "part"), numbers, key

    def field(self, path):
        """The field at ``"node[2].head"`` or ``"branch[1].part[2].gauge"`` (None where not
        given)."""
        kind, idx, key = self._locate(path)
        if kind == "node":
            return self.nodes[idx[0]].fields.get(key)
        return self.branches[idx[0]].parts[idx[1]].fields.get(key)

    def with_field(self, path, value):
        """A copy with the field at ``path`` set to ``value`` (None removes it); nothing is
        validated here (the reader checks an edited set, as for
        :meth:`rheoline.scenario.description.Scenario.with_field`).

        >>> t = TopologySpec((NodeSpec("p", "pump", {"flow": Value(1e-6)}),), ())
        >>> t.with_field("node[1].flow", Value(2e-6)).nodes[0].values
        {'flow': 2e-06}
        """
        from dataclasses import replace

        kind, idx, key = self._locate(path)
        holder = self.nodes[idx[0]] if kind == "node" else self.branches[idx[0]].parts[idx[1]]
        entries = {k: v for k, v in holder.fields.items() if k != key}
        if value is not None:
            entries[key] = value
        holder = replace(holder, fields=entries)
        if kind == "node":
            nodes = list(self.nodes)
            nodes[idx[0]] = holder
            return replace(self, nodes=tuple(nodes))
        branch = self.branches[idx[0]]
        parts = list(branch.parts)
        parts[idx[1]] = holder
        branches = list(self.branches)
        branches[idx[0]] = replace(branch, parts=tuple(parts))
        return replace(self, branches=tuple(branches))

    def with_branch_parts(self, index, parts):
        """A copy whose branch ``index`` (1-based, as in ``branch[1]``) holds ``parts``
        (PartSpecs, from its ``from`` node to its ``to`` node); validated by the reader, as
        :meth:`with_field` is.

        >>> t = TopologySpec((), (BranchSpec("set", "bag", "vein", ()),))
        >>> t.with_branch_parts(1, ("a part",)).branches[0].parts
        ('a part',)
        """
        from dataclasses import replace

        branches = list(self.branches)
        branches[index - 1] = replace(branches[index - 1], parts=tuple(parts))
        return replace(self, branches=tuple(branches))

    @property
    def axes(self):
        """The swept fields as ``[(path, Axis), ...]``: nodes first, then the branches'
        parts (paths like ``"node[3].flow"`` and ``"branch[2].part[1].gauge"``)."""
        out = [
            (f"node[{i}].{k}", v)
            for i, n in enumerate(self.nodes, start=1)
            for k, v in n.fields.items()
            if isinstance(v, Axis)
        ]
        for prefix, p in self.part_paths:
            out += [(prefix + k, v) for k, v in p.fields.items() if isinstance(v, Axis)]
        return out
