"""The one description of a scenario: frozen dataclasses from the file to the review pack.

The reader (:mod:`rheoline.scenario.reading`) produces a :class:`ScenarioSet`, the views
edit it with :func:`dataclasses.replace`, the writer (:mod:`rheoline.scenario.writing`)
serializes it, and the run and the pack echo it.  Loading a file, writing the description
and loading that again gives an equal description.

Every field keeps both its value in SI (degrees Celsius for temperatures, a name for a
choice) and how it was written:

- :class:`Value`: one value, ``si`` and ``written`` (``"80 cm"``, ``18``, ``0.45``);
- :class:`Axis`: a swept field, one SI value per point, how each is shown, and the list or
  range table as written.

A scenario groups its fields by what they describe: the fluid recipe (:class:`FluidSpec`),
the drive (:class:`DriveSpec`), the line of parts (:class:`PartSpec`), Monte Carlo
tolerances (:class:`ToleranceSpec`, per part :class:`ToleranceWidth`), the volume to deliver
(:class:`DeliverySpec`) and the infusion site (:class:`SiteSpec`).  The attribute names are
the file's keys (the fluid's name is the file's ``fluid``); :mod:`rheoline.scenario.schema`
says which group each key belongs to.

A value built in code, not read from a file, may leave ``written`` as None; the writer then
writes it in the field's unit.  :func:`rheoline.scenario.written_values.value_of` builds a value
whose SI number is exactly what its written form reads back to.

Examples
--------
>>> sc = Scenario(
...     name="demo",
...     fluid=FluidSpec(Value("water", "water")),
...     drive=DriveSpec(head=Value(0.8, "80 cm")),
...     parts=(PartSpec("catheter", fields={"gauge": Axis((18, 20), ("18G", "20G"))}),),
... )
>>> sc.mode, sc.n_points, sc.values["temperature"]
('drive', 2, 22.0)
>>> [p for p, _ in sc.axes]
['part[1].gauge']
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Mapping
from dataclasses import dataclass, field, fields
from typing import TYPE_CHECKING

if TYPE_CHECKING:  # the topology module builds on this one
    from rheoline.scenario.topology import TopologySpec
    from rheoline.scenario.transient_spec import TransientSpec

__all__ = [
    "DEFAULT_TEMPERATURE_C",
    "DEFAULT_TOLERANCE_SAMPLES",
    "FrozenMap",
    "Value",
    "Axis",
    "FluidSpec",
    "DriveSpec",
    "DeliverySpec",
    "SiteSpec",
    "SyringeSpec",
    "ToleranceSpec",
    "ToleranceWidth",
    "PartSpec",
    "Scenario",
    "ScenarioSet",
    "sweep_points",
]

#: Fluid temperature [degC] of a scenario that gives none (room temperature).
DEFAULT_TEMPERATURE_C = 22.0
#: Monte Carlo samples of a scenario that gives tolerances but no ``samples``.
DEFAULT_TOLERANCE_SAMPLES = 2000


class FrozenMap(Mapping):
    """A read-only, hashable mapping (the fields of a part, its tolerances, a range table).

    >>> m = FrozenMap({"gauge": 18})
    >>> m["gauge"], m == {"gauge": 18}, hash(m) == hash(FrozenMap(gauge=18))
    (18, True, True)
    """

    __slots__ = ("_data",)

    def __init__(self, *args, **kwargs):
        object.__setattr__(self, "_data", dict(*args, **kwargs))

    def __getitem__(self, key):
        return self._data[key]

    def __iter__(self):
        return iter(self._data)

    def __len__(self):
        return len(self._data)

    def __hash__(self):
        return hash(tuple(self._data.items()))

    def __setattr__(self, name, value):
        raise AttributeError("a FrozenMap cannot be changed; build a new one")

    def __reduce__(self):
        return (FrozenMap, (self._data,))

    def __repr__(self):
        return f"FrozenMap({self._data!r})"


def _frozen(mapping):
    return mapping if isinstance(mapping, FrozenMap) else FrozenMap(mapping or {})


@dataclass(frozen=True)
class Value:
    """One field's value.

    Attributes
    ----------
    si : float, int, str or tuple
        The value in SI (degrees Celsius for a temperature, a fraction for hematocrit), an
        integer (gauge, samples, seed), a name (fluid, wall, set kind), or a tuple of SI
        values (a measured part's bench points).
    written : str, int, float, tuple or None
        How the file wrote it (``"80 cm"``, ``18``, ``0.45``); None for a value built in
        code, which the writer writes in the field's unit.
    """

    si: object
    written: object = None


@dataclass(frozen=True)
class Axis:
    """A swept field: its values (SI, or names), how each is shown, and how it was written.

    ``written`` is the list as written (a tuple), the range table as written (a
    :class:`FrozenMap` of ``start``, ``stop`` and ``step`` or ``count``), or None for an axis
    built in code, which the writer writes as a list in the field's unit.
    """

    values: tuple
    shown: tuple
    written: object = None

    def __post_init__(self):
        if isinstance(self.written, Mapping):
            object.__setattr__(self, "written", _frozen(self.written))

    def __len__(self):
        return len(self.values)


#: A field of a description: one value or a sweep.
Field = Value | Axis


def _si(f):
    """The SI value of a field (an :class:`Axis` stays an axis)."""
    return f.si if isinstance(f, Value) else f


class _Group:
    """Shared behaviour of the groups of scenario fields (their attributes are file keys)."""

    #: The file key of each attribute where they differ (the fluid's name is ``fluid``).
    _KEYS: dict = {}

    @classmethod
    def from_keys(cls, mapping):
        """The group of the fields in ``mapping`` (file key -> field) that belong to it."""
        attribute = {key: name for name, key in cls._KEYS.items()}
        names = {f.name for f in fields(cls)}
        return cls(
            **{attribute.get(k, k): v for k, v in mapping.items() if attribute.get(k, k) in names}
        )

    def items(self):
        """``(file key, field)`` of every given field, in attribute order."""
        for f in fields(self):
            value = getattr(self, f.name)
            if value is not None:
                yield self._KEYS.get(f.name, f.name), value


@dataclass(frozen=True)
class FluidSpec(_Group):
    """The fluid recipe: a library fluid's name, its temperature and its options.

    ``temperature`` None is :data:`DEFAULT_TEMPERATURE_C`; ``hematocrit`` and
    ``blood_model`` (blood fluids), ``mass_fraction`` or ``target_viscosity``
    (glycerol-water) and ``albumin_concentration`` (albumin fluids) are the library's
    options, None when not given.
    """

    name: Field
    temperature: Field | None = None
    hematocrit: Field | None = None
    mass_fraction: Field | None = None
    blood_model: Field | None = None
    albumin_concentration: Field | None = None
    target_viscosity: Field | None = None

    _KEYS = {"name": "fluid"}

    @property
    def options(self):
        """The library options given, by the library's option name (``{"hematocrit": ...,
        "model": ...}``: :data:`~rheoline.scenario.schema.FLUID_OPTION_KEYS`), SI or
        :class:`Axis`."""
        from rheoline.scenario.schema import FLUID_OPTION_KEYS

        return {
            option: _si(getattr(self, key))
            for option, key in FLUID_OPTION_KEYS.items()
            if getattr(self, key) is not None
        }


@dataclass(frozen=True)
class DriveSpec(_Group):
    """What drives the flow: a gravity ``head`` and ``source_pressure`` (the flow is solved),
    or a prescribed ``flow`` with an optional ``pressure_limit`` (the pressure is solved);
    ``back_pressure`` at the outlet either way.  All in SI (m, Pa, m^3/s)."""

    head: Field | None = None
    source_pressure: Field | None = None
    back_pressure: Field | None = None
    flow: Field | None = None
    pressure_limit: Field | None = None

    @property
    def mode(self):
        """``"flow"`` when a flow is prescribed (solve the pressure), else ``"drive"``."""
        return "flow" if self.flow is not None else "drive"


@dataclass(frozen=True)
class DeliverySpec(_Group):
    """The volume to deliver [m^3] and how the drive falls as it goes: a head when the bag is
    empty [m], a source pressure when empty [Pa], or a pressure time constant [s]."""

    volume: Field
    head_when_empty: Field | None = None
    source_pressure_when_empty: Field | None = None
    pressure_time_constant: Field | None = None


@dataclass(frozen=True)
class SiteSpec(_Group):
    """The infusion site: the inner diameter [m] of the vein the catheter sits in."""

    vein_diameter: Field


@dataclass(frozen=True)
class SyringeSpec(_Group):
    """The main syringe pump's mechanics, for the time solve: the syringe's compliance
    [m^3/Pa], the pump's slack [m^3], the stopper's break-loose as a pressure [Pa] or as a
    force [N] with the barrel's bore [m] or the syringe's nominal volume [m^3].  Its set rate
    is the drive's ``flow``; its rate changes, a compliance table, an occlusion and ports are
    the scenario's ``transient``
    (:class:`rheoline.scenario.transient_spec.TransientSpec`)."""

    syringe_compliance: Field | None = None
    slack: Field | None = None
    break_loose_pressure: Field | None = None
    break_loose_force: Field | None = None
    barrel_diameter: Field | None = None
    syringe_size: Field | None = None


@dataclass(frozen=True)
class ToleranceSpec(_Group):
    """Scenario-wide Monte Carlo tolerances (each a :class:`Value`, None when not given).

    ``temperature`` is a half-width [K], ``hematocrit`` a half-width [-], ``viscosity`` a
    relative half-width [-], ``distribution`` ``"uniform"`` (default) or ``"normal"``,
    ``samples`` and ``seed`` integers.
    """

    temperature: Value | None = None
    hematocrit: Value | None = None
    viscosity: Value | None = None
    distribution: Value | None = None
    samples: Value | None = None
    seed: Value | None = None

    def get(self, key, default=None):
        """The SI value of ``key``, or ``default`` when not given."""
        value = getattr(self, key, None)
        return default if value is None else value.si

    @property
    def n_samples(self):
        """Monte Carlo samples per case (:data:`DEFAULT_TOLERANCE_SAMPLES` when not given)."""
        return int(self.get("samples", DEFAULT_TOLERANCE_SAMPLES))


@dataclass(frozen=True)
class ToleranceWidth:
    """The half-width of a part's bore or length spread.

    ``kind`` is ``"relative"`` (``width`` a fraction of the nominal value) or ``"absolute"``
    (``width`` in metres); ``written`` is how the file wrote it (``"5 %"``, ``"0.02 mm"``).
    """

    kind: str
    width: float
    written: object = None

    def fraction_of(self, nominal):
        """The half-width as a fraction of ``nominal`` [m]."""
        return self.width if self.kind == "relative" else self.width / nominal


@dataclass(frozen=True)
class PartSpec:
    """One part of the line: its type, its label as written, its fields and tolerances.

    Attributes
    ----------
    type : str
        One of :data:`rheoline.scenario.schema.PART_TYPES`.
    label : str
        The label as written; "" when the file gives none (the line engine names the part).
    fields : Mapping[str, Value | Axis]
        The part's fields by file key (``gauge``, ``inner_diameter``, ...), in schema order.
    tolerance : Mapping[str, ToleranceWidth]
        Half-widths of ``inner_diameter`` and ``length``.
    """

    type: str
    label: str = ""
    fields: Mapping[str, Field] = field(default_factory=FrozenMap)
    tolerance: Mapping[str, ToleranceWidth] = field(default_factory=FrozenMap)

    def __post_init__(self):
        object.__setattr__(self, "fields", _frozen(self.fields))
        object.__setattr__(self, "tolerance", _frozen(self.tolerance))

    @property
    def values(self):
        """The fields in SI (an :class:`Axis` where swept), by file key."""
        return {k: _si(v) for k, v in self.fields.items()}

    @property
    def name(self):
        """The label, or what names the part when it has none: a set's kind, else its type."""
        if self.label:
            return self.label
        kind = self.fields.get("kind")
        if self.type == "set" and isinstance(kind, Value):
            return kind.si
        return self.type


@dataclass(frozen=True)
class Scenario:
    """One scenario: a fluid, a drive, a line of parts, and what else the file asks.

    ``parts`` run from source to outlet.  ``tolerance``, ``delivery`` and ``site`` are None
    when the file gives none of their fields.  ``model_band`` False leaves the run's model
    band out (:mod:`rheoline.scenario.model_band`).  A branched scenario has a ``topology``
    (:class:`rheoline.scenario.topology.TopologySpec`: nodes with their sources, pumps and
    outlets, and branches of parts), no ``parts`` and an empty ``drive``.
    A scenario that asks for the time solve has a ``syringe`` (:class:`SyringeSpec`) or a
    ``transient`` (:class:`rheoline.scenario.transient_spec.TransientSpec`: rate changes, a
    syringe compliance table, the solve's duration, an occlusion, injection ports), or both.
    """

    name: str
    fluid: FluidSpec
    drive: DriveSpec
    parts: tuple[PartSpec, ...]
    tolerance: ToleranceSpec | None = None
    delivery: DeliverySpec | None = None
    site: SiteSpec | None = None
    notes: str = ""
    model_band: bool = True
    topology: TopologySpec | None = None
    syringe: SyringeSpec | None = None
    transient: TransientSpec | None = None

    def __post_init__(self):
        object.__setattr__(self, "parts", tuple(self.parts))

    @property
    def n_parts(self):
        """Parts of the line, or of every branch of a branched scenario."""
        return len(self.parts) + (self.topology.n_parts if self.topology is not None else 0)

    def groups(self):
        """The groups of single-valued fields that are given, in file order."""
        given = (self.fluid, self.drive, self.delivery, self.site, self.syringe)
        return [g for g in given if g is not None]

    @property
    def asks_time_solve(self):
        """Whether the scenario asks for the time solve (a syringe, a transient table, or a
        part's compliance)."""
        return (
            self.syringe is not None
            or self.transient is not None
            or any(k in p.fields for p in self.parts for k in ("compliance", "compliance_values"))
        )

    @property
    def values(self):
        """Every given field by file key, in SI (an :class:`Axis` where swept); the
        temperature is always there (:data:`DEFAULT_TEMPERATURE_C` when not given)."""
        out = {}
        for group in self.groups():
            out.update((k, _si(v)) for k, v in group.items())
        out.setdefault("temperature", DEFAULT_TEMPERATURE_C)
        return out

    @property
    def axes(self):
        """The swept fields as ``[(path, Axis), ...]``; paths like ``"part[2].gauge"``."""
        out = [(k, v) for g in self.groups() for k, v in g.items() if isinstance(v, Axis)]
        for i, p in enumerate(self.parts, start=1):
            out += [(f"part[{i}].{k}", v) for k, v in p.fields.items() if isinstance(v, Axis)]
        if self.topology is not None:
            out += self.topology.axes
        return out

    @property
    def n_points(self):
        """Number of sweep points (1 when nothing is swept)."""
        return math.prod(len(a) for _, a in self.axes)

    @property
    def mode(self):
        """``"flow"`` when a flow is prescribed (solve the pressure), else ``"drive"``."""
        return self.drive.mode

    @property
    def has_tolerance(self):
        """Whether the scenario or any of its parts gives a tolerance."""
        return self.tolerance is not None or any(p.tolerance for p in self.parts)

    @property
    def n_samples(self):
        """Monte Carlo samples per case: the tolerance's ``samples`` (or
        :data:`DEFAULT_TOLERANCE_SAMPLES`) when a tolerance is given, else 0."""
        if not self.has_tolerance:
            return 0
        return self.tolerance.n_samples if self.tolerance else DEFAULT_TOLERANCE_SAMPLES

    def points(self):
        """The sweep points (see :func:`sweep_points`)."""
        return sweep_points(self)

    def field(self, path):
        """The field at a dotted path (``"head"``, ``"fluid"``, ``"tolerance.samples"``,
        ``"part[2].gauge"``, ``"part[2].tolerance.length"``; a branched scenario's
        ``"node[1].head"``, ``"branch[2].part[1].gauge"``), or None where not given."""
        if path.startswith(("node[", "branch[")):
            return self.topology.field(path)
        group, key, part = self._locate(path)
        if part is not None:
            return (part.tolerance if group == "tolerance" else part.fields).get(key)
        holder = getattr(self, group)
        return None if holder is None else getattr(holder, _attribute(type(holder), key), None)

    def with_field(self, path, value):
        """A copy with the field at ``path`` set to ``value`` (a :class:`Value`,
        :class:`Axis` or :class:`ToleranceWidth`; None removes it), the way a view edits one.
        Nothing is validated here: ``parse_scenarios(scenario_set_data(sset))`` checks an
        edited set as the reader checks a file.

        >>> sc = Scenario("x", FluidSpec(Value("water")), DriveSpec(head=Value(1.0)), ())
        >>> sc.with_field("head", Value(0.5)).drive.head
        Value(si=0.5, written=None)
        >>> sc.with_field("volume", Value(1e-3)).delivery.volume.si
        0.001
        """
        from dataclasses import replace

        if path.startswith(("node[", "branch[")):  # rheoline.scenario.topology
            return replace(self, topology=self.topology.with_field(path, value))
        group, key, part = self._locate(path)
        if part is not None:
            j = int(path[5 : path.index("]")]) - 1
            name = "tolerance" if group == "tolerance" else "fields"
            entries = {k: v for k, v in getattr(part, name).items() if k != key}
            if value is not None:
                entries[key] = value
            parts = list(self.parts)
            parts[j] = replace(part, **{name: entries})
            return replace(self, parts=tuple(parts))
        cls = _GROUPS[group]
        holder = getattr(self, group) or cls(**{f.name: None for f in fields(cls)})
        holder = replace(holder, **{_attribute(cls, key): value})
        empty = all(getattr(holder, f.name) is None for f in fields(holder))
        return replace(
            self, **{group: None if empty and group not in ("fluid", "drive") else holder}
        )

    def _locate(self, path):
        """``(group, key, part)`` of a dotted path: the group attribute (fluid, drive,
        delivery, site, tolerance) and key, and the :class:`PartSpec` for a part's field."""
        from rheoline.scenario.schema import SCENARIO_FIELDS

        head, _, key = path.rpartition(".")
        if head.startswith("part["):
            j = int(head[5 : head.index("]")])
            part = self.parts[j - 1]
            return ("tolerance" if head.endswith(".tolerance") else "fields"), key, part
        if head == "tolerance":
            return "tolerance", key, None
        if head or key not in SCENARIO_FIELDS or not SCENARIO_FIELDS[key].group:
            raise KeyError(f"no field {path!r} in a scenario")
        return SCENARIO_FIELDS[key].group, key, None


#: The dataclass of each group of scenario fields, by the schema's group name.
_GROUPS = {
    "fluid": FluidSpec,
    "drive": DriveSpec,
    "delivery": DeliverySpec,
    "site": SiteSpec,
    "syringe": SyringeSpec,
    "tolerance": ToleranceSpec,
}


def _attribute(cls, key):
    """The attribute of group ``cls`` that holds the file key ``key``."""
    return {k: name for name, k in cls._KEYS.items()}.get(key, key)


@dataclass(frozen=True)
class ScenarioSet:
    """A validated scenario file: its scenarios, title and notes, and where it came from.

    ``source`` (the file name), ``text`` (the text as read), ``sha256`` (of the bytes as
    given) and ``raw`` (those bytes, which the review pack copies) say where the set came
    from and take no part in equality.
    """

    scenarios: tuple[Scenario, ...]
    title: str = ""
    notes: str = ""
    source: str = field(default="<string>", compare=False)
    text: str = field(default="", compare=False, repr=False)
    sha256: str = field(default="", compare=False)
    raw: bytes = field(default=b"", compare=False, repr=False)

    def __post_init__(self):
        object.__setattr__(self, "scenarios", tuple(self.scenarios))

    @property
    def n_points(self):
        """Sweep points of all scenarios together."""
        return sum(s.n_points for s in self.scenarios)


def sweep_points(scenario: Scenario):
    """Expand a scenario's sweeps into their cross product.

    Returns
    -------
    list of dict
        One dict per sweep point, mapping each swept path (``"head"``,
        ``"part[2].gauge"``) to ``(value, shown)``; ``[{}]`` when nothing sweeps.
        The first axis varies slowest (like nested loops in file order).
    """
    axes = scenario.axes
    if not axes:
        return [{}]
    ranges = [range(len(a)) for _, a in axes]
    return [
        {p: (a.values[i], a.shown[i]) for (p, a), i in zip(axes, idx, strict=True)}
        for idx in itertools.product(*ranges)
    ]
