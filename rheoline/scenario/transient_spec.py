"""The time solve's part of the scenario description: rate changes, an occlusion, injection
ports, a syringe compliance table and the solve's duration.

Frozen dataclasses like the rest of :mod:`rheoline.scenario.description` (whose
:class:`~rheoline.scenario.description.Scenario` holds one :class:`TransientSpec` as
``transient``, and the syringe's single values as ``syringe``).  Each value is a
:class:`~rheoline.scenario.description.Value` that keeps its SI number and how it was
written; none of them sweeps.  The reader is :mod:`rheoline.scenario.transient_fields`,
which also writes them back (``load -> dump -> load`` is the identity).

Examples
--------
>>> from rheoline.scenario.description import Value
>>> step = RateChangeSpec(time=Value(3600.0, "60 min"), rate=Value(5.5e-10, "2 mL/h"))
>>> step.is_ramp, step.end
(False, 3600.0)
>>> spec = TransientSpec(rate_changes=(step,))
>>> spec.with_occlusion(None) == spec
True
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from rheoline.scenario.description import Value

__all__ = ["RateChangeSpec", "OcclusionSpec", "PortSpec", "TransientSpec"]


@dataclass(frozen=True)
class RateChangeSpec:
    """One change of a pump's set rate: at ``time`` [s] the rate goes to ``rate`` [m^3/s], at
    once (a step) or in a straight line over ``ramp`` [s]."""

    time: Value
    rate: Value
    ramp: Value | None = None

    @property
    def is_ramp(self):
        """True for a ramp of a non-zero duration."""
        return self.ramp is not None and self.ramp.si > 0

    @property
    def end(self):
        """When the change is complete [s]."""
        return self.time.si + (self.ramp.si if self.ramp is not None else 0.0)

    def items(self):
        """``(file key, value)`` of the given fields."""
        yield "time", self.time
        yield "rate", self.rate
        if self.ramp is not None:
            yield "ramp", self.ramp


@dataclass(frozen=True)
class OcclusionSpec:
    """A complete occlusion of part number ``part`` (1 = the first; a :class:`Value` of an
    integer) from ``time`` [s]; the pump alarms and stops at ``alarm_pressure`` [Pa] at its
    syringe; the occlusion clears at ``release`` [s] (None: at the alarm)."""

    part: Value
    time: Value
    alarm_pressure: Value
    release: Value | None = None

    def items(self):
        """``(file key, value)`` of the given fields."""
        for key in ("part", "time", "alarm_pressure", "release"):
            value = getattr(self, key)
            if value is not None:
                yield key, value


@dataclass(frozen=True)
class PortSpec:
    """A further syringe pump joining the line at a part boundary (0: at the main syringe;
    ``k``: after part ``k``), with its set rate ``flow`` [m^3/s] from ``start`` [s], its rate
    changes, the drug's ``concentration`` [kg/m^3], its syringe's compliance [m^3/Pa], its
    pump's slack [m^3] and the drug's diffusivity [m^2/s]."""

    boundary: Value
    flow: Value
    concentration: Value
    label: str = ""
    start: Value | None = None
    rate_changes: tuple[RateChangeSpec, ...] = ()
    syringe_compliance: Value | None = None
    slack: Value | None = None
    diffusivity: Value | None = None

    def __post_init__(self):
        object.__setattr__(self, "rate_changes", tuple(self.rate_changes))

    @property
    def name(self):
        """The label, or where it joins when it has none."""
        return self.label or f"port after part {self.boundary.si}"

    def items(self):
        """``(file key, value)`` of the given single values, in file order (the label is text,
        the rate changes a list: see :func:`rheoline.scenario.transient_fields.port_data`)."""
        for key in (
            "boundary",
            "flow",
            "start",
            "concentration",
            "syringe_compliance",
            "slack",
            "diffusivity",
        ):
            value = getattr(self, key)
            if value is not None:
                yield key, value


@dataclass(frozen=True)
class TransientSpec:
    """What a scenario asks of the time solve besides the syringe's single values.

    Attributes
    ----------
    rate_changes : tuple of RateChangeSpec
        Changes of the main pump's set rate (it starts at the drive's ``flow`` at time 0).
    syringe_compliance_pressures, syringe_compliance_values : Value or None
        The main syringe's compliance as a table against gauge pressure (tuples of SI values).
    duration : Value or None
        How long to solve [s] (None: until every change has settled).
    occlusion : OcclusionSpec or None
    ports : tuple of PortSpec
    """

    rate_changes: tuple[RateChangeSpec, ...] = ()
    syringe_compliance_pressures: Value | None = None
    syringe_compliance_values: Value | None = None
    duration: Value | None = None
    occlusion: OcclusionSpec | None = None
    ports: tuple[PortSpec, ...] = ()

    def __post_init__(self):
        object.__setattr__(self, "rate_changes", tuple(self.rate_changes))
        object.__setattr__(self, "ports", tuple(self.ports))

    def with_occlusion(self, occlusion):
        """A copy with another occlusion (None: none), the way a view edits it."""
        return replace(self, occlusion=occlusion)

    def with_rate_changes(self, changes):
        """A copy with other rate changes of the main pump."""
        return replace(self, rate_changes=tuple(changes))
