"""Constitutive models of viscous fluids: stress as a function of shear rate.

Each model is a small frozen object with

* ``viscosity(shear_rate)`` -> apparent viscosity [Pa s]
* ``stress(shear_rate)`` -> shear stress [Pa]
* ``shear_rate_at_stress(stress)`` -> shear rate [1/s], the inverse of ``stress``
* ``is_newtonian`` and the limits ``zero_shear_viscosity`` / ``infinite_shear_viscosity``

Parameters may be numpy arrays; they broadcast against the shear rate, so one
model object can stand for many scenarios (for instance blood at an array of
hematocrits).  The line solver integrates any of these objects through
``stress`` and ``shear_rate_at_stress``.

References
----------
Bird, R.B., Armstrong, R.C., Hassager, O., "Dynamics of Polymeric Liquids",
Vol. 1, 2nd ed., Wiley, 1987 (power law, Carreau, Carreau-Yasuda).
Casson, N., in "Rheology of Disperse Systems", Pergamon, 1959, pp. 84-104.
"""

from __future__ import annotations

from dataclasses import dataclass, fields

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.validation import check_nonnegative, check_positive, frozen_copy

__all__ = [
    "RheologyModel",
    "Newtonian",
    "PowerLaw",
    "Carreau",
    "CarreauYasuda",
    "Casson",
    "RHEOLOGY_MODELS",
    "PARAMETER_UNITS",
]

#: Shear rate [1/s] used for "high shear" in models with no finite infinite-shear
#: limit (power law, Casson): 1000 1/s, a customary reference for blood viscometry.
#: common practice, no source
HIGH_SHEAR_RATE = 1000.0


class RheologyModel:
    """Base class: subclasses define ``viscosity``; the rest follows from it."""

    name = "rheology"
    is_newtonian = False

    def viscosity(self, shear_rate):  # pragma: no cover - abstract
        raise NotImplementedError

    def stress(self, shear_rate):
        """Shear stress [Pa] at ``shear_rate`` [1/s]: ``viscosity * shear_rate``."""
        g = np.asarray(shear_rate, dtype=float)
        return _out(self.viscosity(g) * g)

    def shear_rate_at_stress(self, stress):
        """Shear rate [1/s] at which ``stress(shear_rate) == stress`` [Pa].

        The generic inverse is a vectorized bisection on the logarithm of the
        shear rate (stress is monotone in shear rate for every model here).
        Subclasses with a closed form override it.
        """
        tau = np.asarray(stress, dtype=float)
        shape = np.broadcast_shapes(tau.shape, np.shape(self.infinite_shear_viscosity))
        tau = np.broadcast_to(tau, shape)
        lo = np.full(shape, -12.0)
        hi = np.full(shape, 12.0)
        # widen the bracket where needed (very viscous or very thin fluids)
        for _ in range(4):
            need = self.stress(10.0**hi) < tau
            if not np.any(need):
                break
            hi = np.where(need, hi + 8.0, hi)
        for _ in range(80):
            mid = 0.5 * (lo + hi)
            above = self.stress(10.0**mid) > tau
            hi = np.where(above, mid, hi)
            lo = np.where(above, lo, mid)
        out = 10.0 ** (0.5 * (lo + hi))
        return np.where(tau > 0, out, 0.0)

    @property
    def zero_shear_viscosity(self):
        """Viscosity [Pa s] as the shear rate tends to 0 (inf for a yield-stress fluid)."""
        return self.viscosity(1e-12)

    @property
    def parameters(self) -> dict:
        """The model's parameters by name (SI; see :data:`PARAMETER_UNITS`)."""
        return {f.name: getattr(self, f.name) for f in fields(self)}

    def describe(self) -> str:
        """One line naming the model and its parameters with units.

        Examples
        --------
        >>> PowerLaw(0.01, 0.7).describe()
        'power-law: consistency=0.01 Pa s^n, flow_index=0.7'
        """
        parts = []
        for key, value in self.parameters.items():
            unit = PARAMETER_UNITS.get(key, "")
            arr = np.asarray(value, dtype=float)
            lo, hi = float(np.min(arr)), float(np.max(arr))
            shown = f"{lo:.4g}" if lo == hi else f"{lo:.4g}..{hi:.4g}"
            parts.append(f"{key}={shown}{' ' + unit if unit else ''}")
        return f"{self.name}: " + ", ".join(parts)

    @property
    def infinite_shear_viscosity(self):
        """Viscosity [Pa s] at high shear (the model's limit, or at HIGH_SHEAR_RATE)."""
        return self.viscosity(HIGH_SHEAR_RATE)


@dataclass(frozen=True)
class Newtonian(RheologyModel):
    """A Newtonian fluid: constant viscosity.

    Parameters
    ----------
    mu : float or array_like
        Dynamic viscosity [Pa s], > 0.

    Examples
    --------
    >>> Newtonian(1.0e-3).stress(100.0)
    0.1
    """

    mu: float | np.ndarray
    name = "newtonian"
    is_newtonian = True

    def __post_init__(self):
        object.__setattr__(self, "mu", _param(check_positive("viscosity", self.mu, "Pa s")))

    def viscosity(self, shear_rate=None):
        """Viscosity [Pa s], the same at every shear rate."""
        if shear_rate is None:
            return _out(self.mu)
        g = np.asarray(shear_rate, dtype=float)
        return _out(self.mu * np.ones_like(g))

    def shear_rate_at_stress(self, stress):
        return _out(np.asarray(stress, dtype=float) / self.mu)

    @property
    def zero_shear_viscosity(self):
        return _out(self.mu)

    @property
    def infinite_shear_viscosity(self):
        return _out(self.mu)


@dataclass(frozen=True)
class PowerLaw(RheologyModel):
    r"""Ostwald-de Waele power law, :math:`\tau = K \dot\gamma^n`.

    Parameters
    ----------
    consistency : float or array_like
        K [Pa s^n], > 0.
    flow_index : float or array_like
        n [-], > 0 (n < 1 shear-thinning, n = 1 Newtonian).

    Examples
    --------
    >>> round(PowerLaw(0.01, 0.7).viscosity(100.0), 6)
    0.002512
    """

    consistency: float | np.ndarray
    flow_index: float | np.ndarray
    name = "power-law"

    def __post_init__(self):
        object.__setattr__(
            self, "consistency", _param(check_positive("consistency", self.consistency))
        )
        object.__setattr__(
            self, "flow_index", _param(check_positive("flow_index", self.flow_index))
        )

    def viscosity(self, shear_rate=None):
        g = HIGH_SHEAR_RATE if shear_rate is None else np.asarray(shear_rate, dtype=float)
        g = np.maximum(g, 1e-300)
        return _out(self.consistency * g ** (self.flow_index - 1.0))

    def stress(self, shear_rate):
        g = np.asarray(shear_rate, dtype=float)
        return _out(self.consistency * np.abs(g) ** self.flow_index * np.sign(g))

    def shear_rate_at_stress(self, stress):
        tau = np.asarray(stress, dtype=float)
        return _out((np.maximum(tau, 0.0) / self.consistency) ** (1.0 / self.flow_index))


@dataclass(frozen=True)
class CarreauYasuda(RheologyModel):
    r"""Carreau-Yasuda model.

    .. math:: \mu = \mu_\infty + (\mu_0 - \mu_\infty)
              [1 + (\lambda \dot\gamma)^a]^{(n-1)/a}

    Parameters
    ----------
    mu_zero, mu_inf : float or array_like
        Zero- and infinite-shear viscosities [Pa s], ``mu_zero >= mu_inf > 0``.
    relaxation_time : float or array_like
        lambda [s], > 0.
    flow_index : float or array_like
        n [-], 0 < n <= 1.
    a : float or array_like
        Yasuda exponent [-], > 0 (a = 2 is the Carreau model).
    """

    mu_zero: float | np.ndarray
    mu_inf: float | np.ndarray
    relaxation_time: float | np.ndarray
    flow_index: float | np.ndarray
    a: float | np.ndarray = 2.0
    name = "carreau-yasuda"

    def __post_init__(self):
        for field in ("mu_zero", "mu_inf", "relaxation_time", "flow_index", "a"):
            object.__setattr__(self, field, _param(check_positive(field, getattr(self, field))))
        if np.any(self.mu_zero < self.mu_inf):
            raise InputRangeError(
                "mu_zero must be at least mu_inf (zero-shear viscosity is the larger); "
                f"got mu_zero={self.mu_zero!r} Pa s, mu_inf={self.mu_inf!r} Pa s"
            )

    def viscosity(self, shear_rate=None):
        if shear_rate is None:
            return _out(self.mu_inf + 0.0 * self.mu_zero)
        g = np.abs(np.asarray(shear_rate, dtype=float))
        x = 1.0 + (self.relaxation_time * g) ** self.a
        return _out(
            self.mu_inf + (self.mu_zero - self.mu_inf) * x ** ((self.flow_index - 1.0) / self.a)
        )

    @property
    def zero_shear_viscosity(self):
        return _out(self.mu_zero + 0.0 * self.mu_inf)

    @property
    def infinite_shear_viscosity(self):
        return _out(self.mu_inf + 0.0 * self.mu_zero)


@dataclass(frozen=True)
class Carreau(CarreauYasuda):
    r"""Carreau model: Carreau-Yasuda with a = 2.

    .. math:: \mu = \mu_\infty + (\mu_0 - \mu_\infty)[1 + (\lambda\dot\gamma)^2]^{(n-1)/2}

    Examples
    --------
    >>> m = Carreau(mu_zero=0.056, mu_inf=0.00345, relaxation_time=3.313, flow_index=0.3568)
    >>> round(float(m.viscosity(1e-6)), 4), round(float(m.viscosity(1e6)), 5)
    (0.056, 0.00345)
    """

    a: float | np.ndarray = 2.0
    name = "carreau"


@dataclass(frozen=True)
class Casson(RheologyModel):
    r"""Casson model with a yield stress.

    .. math:: \sqrt{\tau} = \sqrt{\tau_y} + \sqrt{\eta_c \dot\gamma}
              \quad (\tau > \tau_y), \qquad \dot\gamma = 0 \quad (\tau \le \tau_y)

    Parameters
    ----------
    yield_stress : float or array_like
        tau_y [Pa], >= 0.
    casson_viscosity : float or array_like
        eta_c [Pa s], > 0.
    """

    yield_stress: float | np.ndarray
    casson_viscosity: float | np.ndarray
    name = "casson"

    def __post_init__(self):
        object.__setattr__(
            self, "yield_stress", _param(check_nonnegative("yield_stress", self.yield_stress, "Pa"))
        )
        object.__setattr__(
            self,
            "casson_viscosity",
            _param(check_positive("casson_viscosity", self.casson_viscosity, "Pa s")),
        )

    def stress(self, shear_rate):
        g = np.maximum(np.asarray(shear_rate, dtype=float), 0.0)
        return _out((np.sqrt(self.yield_stress) + np.sqrt(self.casson_viscosity * g)) ** 2)

    def viscosity(self, shear_rate=None):
        g = HIGH_SHEAR_RATE if shear_rate is None else np.asarray(shear_rate, dtype=float)
        g = np.maximum(g, 1e-300)
        return _out(self.stress(g) / g)

    def shear_rate_at_stress(self, stress):
        tau = np.maximum(np.asarray(stress, dtype=float), 0.0)
        excess = np.maximum(np.sqrt(tau) - np.sqrt(self.yield_stress), 0.0)
        return _out(excess**2 / self.casson_viscosity)

    @property
    def zero_shear_viscosity(self):
        return _out(np.where(self.yield_stress > 0, np.inf, self.casson_viscosity))


#: Units of the parameters of every model (for tables, exports and ``describe``).
PARAMETER_UNITS = {
    "mu": "Pa s",
    "consistency": "Pa s^n",
    "flow_index": "",
    "mu_zero": "Pa s",
    "mu_inf": "Pa s",
    "relaxation_time": "s",
    "a": "",
    "yield_stress": "Pa",
    "casson_viscosity": "Pa s",
}

#: The family of models by name; dispatchers, choices and docs read this dict.
RHEOLOGY_MODELS = {
    "newtonian": Newtonian,
    "power-law": PowerLaw,
    "carreau": Carreau,
    "carreau-yasuda": CarreauYasuda,
    "casson": Casson,
}


def _param(arr):
    """Store 0-d parameters as floats (readable reprs); arrays as read-only copies (the
    caller's array may change later)."""
    return float(arr) if np.ndim(arr) == 0 else frozen_copy(arr)


def _out(arr):
    arr = np.asarray(arr, dtype=float)
    return float(arr) if arr.ndim == 0 else arr
