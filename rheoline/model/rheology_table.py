r"""The Rabinowitsch-Mooney tube flow of one rheology, tabulated once for every lumen.

For a non-Newtonian fluid the line's solvers need, in every lumen and at every trial flow,
the wall shear stress of fully developed laminar flow (:mod:`rheoline.model.rabinowitsch`):
an inner Newton iteration on the wall shear rate, each step evaluating the constitutive law
at 16 quadrature nodes.  Nothing in that relation depends on the lumen except through one
number: written with

.. math:: \phi = \ln\frac{3 Q}{\pi R^3} = \ln\dot\gamma_w + \ln\left[1 - \int_0^1
          \left(\frac{\tau(\dot\gamma_w s)}{\tau_w}\right)^3 ds\right]

the wall stress is a function of :math:`\phi` alone, :math:`\ln\tau_w = M(\phi)`, for a
given rheology.  Where the rheology is the same in every scenario (a fluid at one
temperature and hematocrit), :class:`RheologyTable` tabulates :math:`M` and
:math:`M' = d\ln\tau_w/d\phi` once on a uniform grid of :math:`\phi`, and the solvers read
the apparent viscosity of any lumen at any flow from it by cubic Hermite interpolation:

.. math:: \mu_{app} = \frac{\tau_w \pi R^3}{4 Q} = \tfrac34\,e^{M(\phi) - \phi},\qquad
          \frac{d\ln\mu_{app}}{d\ln Q} = M'(\phi) - 1.

**Error bound.**  Each node's value is the exact inverse of
:func:`rheoline.model.rabinowitsch.rabinowitsch_flow` (Newton on the wall shear rate to
rounding), with the exact slope of that same 16-point rule.  The error of cubic Hermite interpolation with exact slopes is
:math:`M''''(\xi)\,s^2(1-s)^2h^4/4!`, largest at an interval's midpoint; the table is
accepted only when the interpolant agrees with the exact inverse at *every* midpoint and
quarter point within :data:`TABLE_TOLERANCE` (1e-12 in :math:`\ln\tau_w`, so 1e-12 relative
in the apparent viscosity), else the grid is refined (twice at most), else no table is used
and the solvers iterate exactly as before.  Outside the tabulated range of wall shear rates
(:data:`TABLE_SHEAR_RATES`) the exact inverse is used.  Yield-stress models are not
tabulated (near a vanishing flow their integral is a difference of nearly equal numbers).

References
----------
Rabinowitsch, B., Z. Phys. Chem. A145 (1929) 1-26; Mooney, M., J. Rheol. 2 (1931) 210-222.
Fritsch, F.N., Carlson, R.E., "Monotone piecewise cubic interpolation", SIAM J. Numer. Anal.
17 (1980) 238-246 (the cubic Hermite form and its error term).

Examples
--------
>>> from rheoline.model.rheology import Carreau
>>> blood = Carreau(mu_zero=0.056, mu_inf=0.00345, relaxation_time=3.313, flow_index=0.3568)
>>> table = rheology_table(blood)
>>> table.max_error < TABLE_TOLERANCE
True
>>> import numpy as np
>>> phi = np.log(3 * 1e-6 / (np.pi * 0.5e-3**3))       # 1 mL/s through a 1 mm bore
>>> log_tau, _ = table.evaluate(np.array([phi]))
>>> from rheoline.model.rabinowitsch import wall_shear_rate_for_flow
>>> _, tau = wall_shear_rate_for_flow(blood, 1e-6, 0.5e-3)
>>> bool(abs(np.exp(log_tau[0]) / tau - 1.0) < 1e-11)
True
"""

from __future__ import annotations

import dataclasses

import numpy as np

from rheoline.model.rabinowitsch import _S_NODES as _quadrature
from rheoline.model.rabinowitsch import _S_WEIGHTS as _weights

__all__ = [
    "RheologyTable",
    "rheology_table",
    "cached_table",
    "TABLE_TOLERANCE",
    "TABLE_SHEAR_RATES",
    "LOG_THREE_QUARTERS",
]

#: Largest interpolation error accepted at the grid midpoints, in ln(wall shear stress) [-].
TABLE_TOLERANCE = 1e-12
#: Newtonian wall shear rates 4Q/(pi R^3) [1/s] the table spans; outside it the exact inverse.
TABLE_SHEAR_RATES = (1e-4, 1e8)
#: ln(3/4): mu_app = (3/4) exp(M - phi).
LOG_THREE_QUARTERS = float(np.log(0.75))
_FIRST_STEP = 0.02  # grid step in phi tried first (refined by halving)
_REFINEMENTS = 2
_CACHE_SIZE = 16
_cache: dict = {}


@dataclasses.dataclass(frozen=True, eq=False)
class RheologyTable:
    """ln(wall stress) M and its slope M' on a uniform grid of phi = ln(3Q/(pi R^3)).

    Attributes
    ----------
    start, step : float
        First node and spacing of the grid in phi.
    values, slopes : ndarray
        M and M' = d ln(tau_w) / d phi at the nodes.
    max_error : float
        The largest difference from the exact inverse at the interval midpoints.
    """

    start: float
    step: float
    values: np.ndarray
    slopes: np.ndarray
    max_error: float

    @property
    def stop(self) -> float:
        """Last node of the grid in phi."""
        return self.start + self.step * (self.values.size - 1)

    def contains(self, phi):
        """Where ``phi`` lies within the tabulated range."""
        return (phi >= self.start) & (phi <= self.stop)

    def evaluate(self, phi):
        """M(phi) and M'(phi) by cubic Hermite interpolation (phi clipped to the range)."""
        t = (np.clip(phi, self.start, self.stop) - self.start) * (1.0 / self.step)
        k = np.minimum(t.astype(np.intp), self.values.size - 2)
        s = t - k
        s2 = s * s
        m0, m1 = self.values.take(k), self.values.take(k + 1)
        d0, d1 = self.slopes.take(k) * self.step, self.slopes.take(k + 1) * self.step
        b01 = s2 * (3.0 - 2.0 * s)
        value = m0 + b01 * (m1 - m0) + s * (1.0 - s) * ((1.0 - s) * d0 - s * d1)
        # d/ds of the same cubic, over the step
        dvalue = 6.0 * s * (1.0 - s) * (m1 - m0) + (1.0 - s) * (1.0 - 3.0 * s) * d0
        dvalue = dvalue + s * (3.0 * s - 2.0) * d1
        return value, dvalue * (1.0 / self.step)


_S_NODES = _quadrature.reshape(-1, 1)
_S_WEIGHTS = _weights.reshape(-1, 1)
_FD = 1e-5  # central difference in ln(shear rate) for the rheology's log-slope


def _log_slope(rheology, rate):
    """d ln(tau) / d ln(shear rate) of the rheology at ``rate`` (central difference)."""
    up = np.asarray(rheology.stress(rate * np.exp(_FD)), dtype=float)
    down = np.asarray(rheology.stress(rate * np.exp(-_FD)), dtype=float)
    return (np.log(up) - np.log(down)) / (2.0 * _FD)


def _phi(rheology, y):
    """phi = ln(3Q/(pi R^3)) at y = ln(wall shear rate), the 16-point rule of
    :func:`rheoline.model.rabinowitsch.rabinowitsch_flow`."""
    rate = np.exp(y)
    ratio = np.asarray(rheology.stress(_S_NODES * rate), dtype=float) / np.asarray(
        rheology.stress(rate), dtype=float
    )
    return y + np.log1p(-(_S_WEIGHTS * ratio * ratio * ratio).sum(axis=0))


def _state(rheology, y):
    """phi, M = ln(tau_w) and their derivatives in y = ln(wall shear rate), of the same
    16-point rule as :func:`rheoline.model.rabinowitsch.rabinowitsch_flow` (so that the
    slopes are those of the tabulated function itself)."""
    rate = np.exp(y)
    tau_w = np.asarray(rheology.stress(rate), dtype=float)
    ratio = np.asarray(rheology.stress(_S_NODES * rate), dtype=float) / tau_w
    cube = ratio * ratio * ratio
    integral = (_S_WEIGHTS * cube).sum(axis=0)
    slope_w = _log_slope(rheology, rate)
    dintegral = 3.0 * (_S_WEIGHTS * cube * (_log_slope(rheology, _S_NODES * rate) - slope_w))
    dphi = 1.0 - dintegral.sum(axis=0) / (1.0 - integral)
    return y + np.log1p(-integral), np.log(tau_w), dphi, slope_w


def _exact(rheology, phi, y_guess):
    """M and M' at ``phi`` (R = 1) by Newton on ln(wall shear rate) from ``y_guess``
    (within some 1e-5 of the root: two steps reach rounding, a last one is taken to first
    order)."""
    y = y_guess
    for _ in range(2):
        at, _, dphi, _ = _state(rheology, y)
        y = y + (phi - at) / dphi
    at, log_tau, dphi, slope_w = _state(rheology, y)
    return log_tau + slope_w * (phi - at) / dphi, slope_w / dphi


def _build_at(rheology, low, high, step):
    """The table on a grid of ``step`` from ``low`` to ``high`` and its checked error."""
    n = int(np.ceil((high - low) / step)) + 1
    phi = low + step * np.arange(n)
    # phi(y) is monotone and close to y + ln(3/4): a dense pass in y, then Newton
    y_dense = np.linspace(low - 1.0, high + 3.0, 4 * n)
    phi_dense = _phi(rheology, y_dense)
    values, slopes = _exact(rheology, phi, np.interp(phi, phi_dense, y_dense))
    table = RheologyTable(float(low), step, values, slopes, np.inf)
    # the error peaks at an interval's midpoint (h^4 term) and near its quarter points
    # (a slope error); check both in every interval
    check = np.concatenate([phi[:-1] + 0.5 * step, phi[:-1] + 0.25 * step])
    exact, _ = _exact(rheology, check, np.interp(check, phi_dense, y_dense))
    error = float(np.max(np.abs(table.evaluate(check)[0] - exact)))
    finite = np.all(np.isfinite(values)) and np.all(np.isfinite(slopes))
    return dataclasses.replace(table, max_error=error if finite else np.inf)


def _build(rheology):
    low, high = (float(np.log(0.75 * g)) for g in TABLE_SHEAR_RATES)
    table = _build_at(rheology, low, high, _FIRST_STEP)
    for _ in range(_REFINEMENTS):
        if table.max_error < TABLE_TOLERANCE:
            return table
        if not np.isfinite(table.max_error):
            return None
        # the error falls as h^4: aim at a third of the tolerance
        shrink = (TABLE_TOLERANCE / 3.0 / table.max_error) ** 0.25
        table = _build_at(rheology, low, high, table.step * min(0.5, shrink))
    return table if table.max_error < TABLE_TOLERANCE else None


def _key(rheology):
    """A hashable key of a rheology whose parameters are all scalars (else None)."""
    if not dataclasses.is_dataclass(rheology) or getattr(rheology, "is_newtonian", False):
        return None
    if getattr(rheology, "yield_stress", None) is not None:
        return None
    params = []
    for f in dataclasses.fields(rheology):
        value = getattr(rheology, f.name)
        if np.ndim(value) > 0:
            return None
        params.append((f.name, float(value)))
    return (type(rheology), tuple(params))


def rheology_table(rheology):
    """The :class:`RheologyTable` of a rheology the same in every scenario, or None.

    None for a Newtonian or yield-stress model, a model with array parameters (different
    scenarios, different rheology), a model that is not a dataclass, or one whose table
    fails its error check.  Tables are kept (a few per process) and shared by every line.
    """
    key = _key(rheology)
    if key is None:
        return None
    if key not in _cache:
        if len(_cache) >= _CACHE_SIZE:
            _cache.pop(next(iter(_cache)))
        with np.errstate(all="ignore"):
            _cache[key] = _build(rheology)
    return _cache[key]


def cached_table(rheology):
    """The table of ``rheology`` if one was built (or found impossible: None) in this
    process, else False (nothing is built here)."""
    key = _key(rheology)
    if key is None:
        return None
    return _cache.get(key, False)
