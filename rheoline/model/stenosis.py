r"""Local narrowing of a vessel: the Young & Tsai (1973) pressure drop and the flow it costs.

Young & Tsai wrote the steady pressure drop across a stenosis as a viscous term
plus a flow-separation (expansion) term,

.. math::

    \Delta p_s = \frac{K_v\,\mu}{D_0}\,U
               + \frac{K_t\,\rho}{2}\left(\frac{A_0}{A_1} - 1\right)^2 |U|\,U,

with U the mean velocity in the unobstructed vessel (diameter D_0, area A_0),
A_1 the throat area, mu the viscosity and rho the density.  The expansion
coefficient K_t is :data:`YOUNG_TSAI_1973_EXPANSION_COEFFICIENT` (1.52).  The
viscous coefficient K_v depends on the shape; :data:`VISCOUS_COEFFICIENT_MODELS`
offers

* ``"throat-poiseuille"`` (default): :math:`K_v = 32 (L_s / D_0)(A_0/A_1)^2`, the
  Poiseuille resistance of a throat of diameter D_1 over the stenosis length L_s;
  with no narrowing it is exactly the plain segment;
* ``"seeley-young-1976"``: :math:`K_v = 32\,(0.83 L_s + 1.64 D_1) / D_0\,(A_0/A_1)^2`,
  the fit of Seeley & Young (1976) to their model stenoses; it adds converging and
  diverging flow losses and so does not reduce to the plain tube.

The unsteady (inertance) term of Young & Tsai is left out: flows here are steady.
A :class:`StenosedVessel` puts a stenosis in a :class:`~rheoline.model.vessels.Vessel`
(and, optionally, in series with the vascular bed downstream) and gives its flow at a
driving pressure and the fraction of flow the narrowing costs.

References
----------
Young, D.F., Tsai, F.Y., "Flow characteristics in models of arterial stenoses --
I. Steady flow", J. Biomech. 6 (1973) 395-410; "-- II. Unsteady flow", J. Biomech. 6
(1973) 547-559.
Seeley, B.D., Young, D.F., "Effect of geometry on pressure losses across models of
arterial stenoses", J. Biomech. 9 (1976) 439-448.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.validation import (
    check_finite,
    check_nonnegative,
    check_positive,
    check_range,
    scalar_or_array,
)
from rheoline.model.vessels import BLOOD_DENSITY, Vessel

__all__ = [
    "YOUNG_TSAI_1973_EXPANSION_COEFFICIENT",
    "VISCOUS_COEFFICIENT_MODELS",
    "REDUCTION_KINDS",
    "throat_diameter",
    "young_tsai_1973_coefficients",
    "young_tsai_1973_pressure_drop",
    "StenosedVessel",
    "stenosis_flow_fraction_lost",
]

#: K_t, the expansion (turbulent) loss coefficient of Young & Tsai 1973 (1.52).
YOUNG_TSAI_1973_EXPANSION_COEFFICIENT = 1.52


def _kv_throat_poiseuille(diameter, throat, stenosis_length):
    return 32.0 * (stenosis_length / diameter) * (diameter / throat) ** 4


def _kv_seeley_young_1976(diameter, throat, stenosis_length):
    return 32.0 * (0.83 * stenosis_length + 1.64 * throat) / diameter * (diameter / throat) ** 4


#: Viscous coefficient K_v by name: ``f(D_0 [m], D_1 [m], L_s [m]) -> K_v [-]``.
VISCOUS_COEFFICIENT_MODELS = {
    "throat-poiseuille": _kv_throat_poiseuille,
    "seeley-young-1976": _kv_seeley_young_1976,
}

#: How a narrowing is stated: percent of the diameter or of the area removed.
REDUCTION_KINDS = ("diameter", "area")


def _viscous_model(name):
    try:
        return VISCOUS_COEFFICIENT_MODELS[name]
    except (KeyError, TypeError):
        raise InputRangeError(
            f"viscous_model must be one of {sorted(VISCOUS_COEFFICIENT_MODELS)}, got {name!r}"
        ) from None


def throat_diameter(diameter, reduction_percent, kind="area"):
    r"""Throat diameter [m] of a stenosis stated as a percent reduction.

    .. math:: D_1 = D_0 (1 - d/100) \;\text{(diameter)}, \qquad
              D_1 = D_0 \sqrt{1 - a/100} \;\text{(area)}

    Parameters
    ----------
    diameter : float or array_like
        Unobstructed diameter D_0 [m].
    reduction_percent : float or array_like
        Percent reduction, 0 (none) to below 100.
    kind : {"area", "diameter"}

    Examples
    --------
    >>> throat_diameter(4e-3, 50.0, "diameter"), throat_diameter(4e-3, 75.0, "area")
    (0.002, 0.002)
    """
    d0 = check_positive("diameter", diameter, "m")
    pct = check_range(
        "reduction_percent",
        reduction_percent,
        0.0,
        99.9,
        "%",
        hint="a complete occlusion (100 %) carries no flow",
    )
    if kind == "diameter":
        return scalar_or_array(d0 * (1.0 - pct / 100.0))
    if kind == "area":
        return scalar_or_array(d0 * np.sqrt(1.0 - pct / 100.0))
    raise InputRangeError(f"kind must be one of {REDUCTION_KINDS}, got {kind!r}")


def young_tsai_1973_coefficients(
    diameter, throat_diameter, stenosis_length, viscous_model="throat-poiseuille"
):
    """Young & Tsai coefficients (K_v, K_t) [-] for a stenosis geometry.

    Parameters
    ----------
    diameter : float or array_like
        Unobstructed diameter D_0 [m].
    throat_diameter : float or array_like
        Throat diameter D_1 [m], 0 < D_1 <= D_0.
    stenosis_length : float or array_like
        Length of the narrowing L_s [m], > 0.
    viscous_model : {"throat-poiseuille", "seeley-young-1976"}

    Returns
    -------
    tuple of (float or ndarray, float)
        K_v and K_t = 1.52.

    Examples
    --------
    >>> kv, kt = young_tsai_1973_coefficients(4e-3, 4e-3, 1e-2)
    >>> round(kv, 6), kt                     # 32 L_s / D_0 with no narrowing
    (80.0, 1.52)
    """
    fn = _viscous_model(viscous_model)
    d0 = check_positive("diameter", diameter, "m")
    d1 = check_positive("throat_diameter", throat_diameter, "m")
    ls = check_positive("stenosis_length", stenosis_length, "m")
    if np.any(d1 > d0 * (1.0 + 1e-12)):
        raise InputRangeError(
            "throat_diameter must not exceed diameter (a stenosis narrows the vessel); "
            f"got throat_diameter={float(np.max(d1)):g} m, diameter={float(np.min(d0)):g} m"
        )
    return scalar_or_array(fn(d0, d1, ls)), YOUNG_TSAI_1973_EXPANSION_COEFFICIENT


def _stenosis_terms(diameter, throat, stenosis_length, viscosity, density, viscous_model):
    """Linear and quadratic coefficients b, a of dp_s = b Q + a Q |Q|."""
    kv, kt = young_tsai_1973_coefficients(diameter, throat, stenosis_length, viscous_model)
    mu = check_positive("viscosity", viscosity, "Pa s")
    rho = check_positive("density", density, "kg/m^3")
    d0 = np.asarray(diameter, dtype=float)
    a0 = np.pi * d0**2 / 4.0
    linear = np.asarray(kv) * mu / (d0 * a0)
    quadratic = kt * rho / (2.0 * a0**2) * ((d0 / np.asarray(throat)) ** 2 - 1.0) ** 2
    return linear, quadratic


def young_tsai_1973_pressure_drop(
    flow,
    diameter,
    throat_diameter,
    stenosis_length,
    viscosity,
    density=BLOOD_DENSITY,
    viscous_model="throat-poiseuille",
):
    r"""Steady pressure drop [Pa] across a stenosis (Young & Tsai 1973).

    .. math:: \Delta p_s = \frac{K_v \mu}{D_0} U + \frac{K_t \rho}{2}
              \left(\frac{A_0}{A_1} - 1\right)^2 |U| U, \qquad U = \frac{Q}{A_0}

    Parameters
    ----------
    flow : float or array_like
        Volume flow Q [m^3/s] (its sign gives the drop's sign).
    diameter : float or array_like
        Unobstructed diameter D_0 [m].
    throat_diameter : float or array_like
        Throat diameter D_1 [m].
    stenosis_length : float or array_like
        Length of the narrowing L_s [m].
    viscosity : float or array_like
        Blood viscosity [Pa s] (Newtonian, as in Young & Tsai).
    density : float or array_like
        Blood density [kg/m^3] (1060 by default).
    viscous_model : {"throat-poiseuille", "seeley-young-1976"}
        How K_v follows from the geometry.

    Returns
    -------
    float or ndarray
        Pressure drop [Pa].

    Notes
    -----
    Young & Tsai fitted rigid model stenoses in steady flow; the expansion term
    dominates at high flow and severe narrowing.  Wall compliance, post-stenotic
    pressure recovery details and pulsatility are outside the model.

    Examples
    --------
    >>> dp = young_tsai_1973_pressure_drop(5e-6, 4e-3, 2e-3, 1e-2, 3.5e-3)
    >>> round(dp, 1)
    1593.5
    """
    q = check_finite("flow", flow)
    linear, quadratic = _stenosis_terms(
        diameter, throat_diameter, stenosis_length, viscosity, density, viscous_model
    )
    return scalar_or_array(linear * q + quadratic * q * np.abs(q))


@dataclass(frozen=True)
class StenosedVessel:
    """A vessel segment with a local narrowing, optionally feeding a downstream bed.

    Parameters
    ----------
    vessel : Vessel
        The unobstructed segment; its apparent viscosity and density are used in
        the stenosis (Newtonian, as in Young & Tsai).
    reduction_percent : float or array_like
        Narrowing, percent of diameter or area removed (0 to 99.9).
    kind : {"area", "diameter"}
        Which ``reduction_percent`` states.
    stenosis_length : float or array_like, optional
        Length of the narrowing [m], at most the vessel's length; default two
        unobstructed diameters.
    viscous_model : {"throat-poiseuille", "seeley-young-1976"}
    downstream_resistance : float or array_like
        Resistance [Pa s/m^3] of the bed the vessel feeds, in series (0 by
        default: the drive acts across the segment alone).

    Notes
    -----
    The segment's total resistance is the plain vessel over ``length -
    stenosis_length`` plus the Young & Tsai stenosis plus the bed::

        dp = (R_rest + R_bed + b) Q + a Q |Q|

    and :meth:`flow` solves that quadratic in closed form.

    Examples
    --------
    >>> v = Vessel(radius=2e-3, length=0.05, viscosity_law="newtonian", viscosity=3.5e-3)
    >>> s = StenosedVessel(v, reduction_percent=0.0)
    >>> bool(abs(s.flow(500.0) / v.flow(500.0) - 1) < 1e-12)
    True
    """

    vessel: Vessel
    reduction_percent: float | np.ndarray
    kind: str = "area"
    stenosis_length: float | np.ndarray | None = None
    viscous_model: str = "throat-poiseuille"
    downstream_resistance: float | np.ndarray = 0.0

    def __post_init__(self):
        if not isinstance(self.vessel, Vessel):
            raise InputRangeError(
                f"vessel must be a rheoline Vessel, got {type(self.vessel).__name__}"
            )
        if self.kind not in REDUCTION_KINDS:
            raise InputRangeError(f"kind must be one of {REDUCTION_KINDS}, got {self.kind!r}")
        _viscous_model(self.viscous_model)
        ls = (
            2.0 * np.asarray(self.vessel.diameter)
            if self.stenosis_length is None
            else check_positive("stenosis_length", self.stenosis_length, "m")
        )
        if np.any(ls > np.asarray(self.vessel.length)):
            raise InputRangeError(
                f"stenosis_length must not exceed the vessel length, got "
                f"{float(np.max(ls)):g} m in a {float(np.min(self.vessel.length)):g} m vessel; "
                "lengthen the vessel or shorten the narrowing"
            )
        object.__setattr__(self, "stenosis_length", scalar_or_array(ls))
        object.__setattr__(
            self,
            "downstream_resistance",
            scalar_or_array(
                check_nonnegative("downstream_resistance", self.downstream_resistance, "Pa s/m^3")
            ),
        )
        throat_diameter(self.vessel.diameter, self.reduction_percent, self.kind)

    @property
    def models_used(self) -> tuple:
        """Provenance keys of the models applied: the vessel's, then Young & Tsai 1973.

        Examples
        --------
        >>> v = Vessel(radius=2e-3, length=0.05, viscosity_law="newtonian", viscosity=3.5e-3)
        >>> StenosedVessel(v, 50.0, viscous_model="seeley-young-1976").models_used
        ('hagen-poiseuille', 'young-tsai-1973', 'seeley-young-1976')
        """
        own = ("young-tsai-1973",)
        if self.viscous_model == "seeley-young-1976":
            own += ("seeley-young-1976",)
        return (*self.vessel.models_used, *own)

    @property
    def throat_diameter(self):
        """Throat diameter D_1 [m]."""
        return throat_diameter(self.vessel.diameter, self.reduction_percent, self.kind)

    def _terms(self):
        v = self.vessel
        linear, quadratic = _stenosis_terms(
            v.diameter,
            self.throat_diameter,
            self.stenosis_length,
            v.apparent_viscosity,
            v.density,
            self.viscous_model,
        )
        rest = np.asarray(v.resistance) * (
            1.0 - np.asarray(self.stenosis_length) / np.asarray(v.length)
        )
        return linear, quadratic, rest + np.asarray(self.downstream_resistance)

    def stenosis_pressure_drop(self, flow):
        """Pressure drop [Pa] across the narrowing alone at a flow [m^3/s]."""
        q = check_finite("flow", flow)
        linear, quadratic, _ = self._terms()
        return scalar_or_array(linear * q + quadratic * q * np.abs(q))

    def pressure_drop(self, flow):
        """Pressure drop [Pa] across segment and bed at a flow [m^3/s]."""
        q = check_finite("flow", flow)
        linear, quadratic, rest = self._terms()
        return scalar_or_array((linear + rest) * q + quadratic * q * np.abs(q))

    def flow(self, pressure_drop):
        """Flow [m^3/s] at a driving pressure [Pa] across segment and bed.

        ``Q = 2 |dp| / (b + sqrt(b^2 + 4 a |dp|))`` with the sign of dp, which is
        exact for the quadratic and stays accurate as a tends to 0.
        """
        dp = check_finite("pressure_drop", pressure_drop)
        linear, quadratic, rest = self._terms()
        b = linear + rest
        mag = np.abs(dp)
        return scalar_or_array(
            np.sign(dp) * 2.0 * mag / (b + np.sqrt(b**2 + 4.0 * quadratic * mag))
        )

    def unobstructed_flow(self, pressure_drop):
        """Flow [m^3/s] at the same drive with no narrowing."""
        dp = check_finite("pressure_drop", pressure_drop)
        total = np.asarray(self.vessel.resistance) + np.asarray(self.downstream_resistance)
        return scalar_or_array(dp / total)

    def flow_fraction_lost(self, pressure_drop):
        """1 - Q_stenosed / Q_unobstructed [-] at a driving pressure [Pa].

        Written as ``1 - 2 R_0 / (b + sqrt(b^2 + 4 a |dp|))`` (R_0 the unobstructed
        resistance), the ratio of :meth:`flow` to :meth:`unobstructed_flow` with the drive
        cancelled, so it stays finite at zero drive (the creeping-flow limit 1 - R_0 / b).
        """
        dp = check_finite("pressure_drop", pressure_drop)
        linear, quadratic, rest = self._terms()
        b = linear + rest
        total = np.asarray(self.vessel.resistance) + np.asarray(self.downstream_resistance)
        ratio = 2.0 * total / (b + np.sqrt(b**2 + 4.0 * quadratic * np.abs(dp)))
        return scalar_or_array(1.0 - ratio)


def stenosis_flow_fraction_lost(
    vessel: Vessel,
    pressure_drop,
    reduction_percent,
    kind="area",
    stenosis_length=None,
    downstream_resistance=0.0,
    viscous_model="throat-poiseuille",
):
    """Fraction of flow lost [-] against percent diameter or area reduction.

    A thin wrapper on :class:`StenosedVessel`: pass an array of
    ``reduction_percent`` to get the curve.

    Parameters
    ----------
    vessel : Vessel
    pressure_drop : float or array_like
        Driving pressure [Pa] across vessel and downstream bed.
    reduction_percent : float or array_like
        Percent reduction (0 to 99.9).
    kind : {"area", "diameter"}
    stenosis_length : float, optional
        [m]; default two diameters.
    downstream_resistance : float
        Bed resistance in series [Pa s/m^3].
    viscous_model : {"throat-poiseuille", "seeley-young-1976"}

    Returns
    -------
    float or ndarray
        Fraction of flow lost [-], 0 with no narrowing.

    Examples
    --------
    >>> v = Vessel(radius=2e-3, length=0.05, viscosity_law="newtonian", viscosity=3.5e-3)
    >>> lost = stenosis_flow_fraction_lost(v, 12000.0, [0.0, 50.0, 90.0],
    ...                                    downstream_resistance=2.4e9)
    >>> [round(float(x), 3) for x in lost]
    [0.0, 0.015, 0.405]
    """
    pct = np.asarray(reduction_percent, dtype=float)
    sten = StenosedVessel(vessel, pct, kind, stenosis_length, viscous_model, downstream_resistance)
    return sten.flow_fraction_lost(pressure_drop)
