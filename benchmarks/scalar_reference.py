r"""The straightforward alternative the benchmark races: the line's physics in plain Python.

A careful user who does not have the vectorized engine would write the pressure budget of
one scenario with the ``math`` module and scalars, and hand it to
:func:`scipy.optimize.brentq`, one scenario at a time.  This module is that program, for a
line of straight lumens in series (here: a 3.0 mm x 1.8 m tube, then an 18G catalogue
catheter), with the *same* correlations as :mod:`rheoline.model.line`,
:mod:`rheoline.model.lumen` and :mod:`rheoline.model.losses`, so that both answers agree
within 1e-6 relative:

.. math::

    \rho g h + p_{source} - p_{back} = \sum_i \left[f_{app,i}\frac{L_i}{D_i} + K_i\right]
        \frac{\rho \bar u_i^2}{2} + K_{exit}\frac{\rho \bar u_{out}^2}{2}

* :math:`f_{app}`: Churchill 1977 with its laminar term replaced by the Shah 1978
  developing-flow apparent friction (as ``lumen._friction_and_slope`` with
  ``developing=True``), written here in its direct (non-logarithmic) form;
* :math:`K_1` the sharp-edged entrance 0.5, :math:`K_{i>1}` the Crane sudden contraction
  :math:`0.5(1 - \beta^2)` or the Borda-Carnot expansion :math:`(A_2/A_1 - 1)^2` referred to
  the downstream velocity (``losses.transition_k``), :math:`K_{exit} = 1`;
* for a Carreau fluid, the Reynolds number uses the apparent viscosity
  :math:`\tau_w / (8\bar u/D)` of the fully developed laminar flow from the
  Rabinowitsch-Mooney integral with the same 16-point Gauss-Legendre rule in
  :math:`t = \sqrt{s}` as ``lumen._rabinowitsch_state``, its wall shear rate found by Newton
  steps on its logarithm (``lumen._solve_log_wall_shear_rate``).

No numpy call is made per evaluation: the quadrature nodes are Python floats computed once
at import.  Pries 1992 correction, fittings and measured parts are not mirrored (the
benchmark line has none).

References
----------
Shah, R.K., J. Fluids Eng. 100 (1978) 177-179.  Churchill, S.W., Chem. Eng. 84 (1977) 91-92.
Crane Co., Technical Paper 410 (2009), p. A-26, A-29.
Rabinowitsch, B., Z. Phys. Chem. A145 (1929) 1-26.

Examples
--------
>>> line = ScalarLine([(3.0e-3, 1.8), (1.0e-3, 0.045)])
>>> water = ScalarNewtonian(viscosity=0.955e-3, density=997.8)
>>> round(solve_flow(line, water, head=1.0)[0] * 6e7, 1)      # mL/min
98.5
"""

from __future__ import annotations

import math

import numpy as np
from scipy.optimize import brentq

__all__ = [
    "GRAVITY",
    "ScalarLine",
    "ScalarNewtonian",
    "ScalarCarreau",
    "losses",
    "residual",
    "solve_flow",
    "solve_pressure",
]

#: Standard gravity [m/s^2] (NIST SP 811), as rheoline.model.line.GRAVITY.
GRAVITY = 9.80665
#: Sharp-edged entrance and exit jet coefficients (Crane TP-410 (2009) p. A-29).
SHARP_ENTRANCE_K = 0.5
EXIT_K = 1.0

# The 16-point Gauss-Legendre rule in t on [0, 1], s = t^2, ds = 2 t dt (lumen.py's rule),
# as plain Python floats so that no evaluation calls numpy.
_GL_X, _GL_W = np.polynomial.legendre.leggauss(16)
_S_NODES = [float((0.5 * (x + 1.0)) ** 2) for x in _GL_X]
_S_WEIGHTS = [float(0.5 * w * 2.0 * 0.5 * (x + 1.0)) for x, w in zip(_GL_X, _GL_W, strict=True)]
_RULE = tuple(zip(_S_NODES, _S_WEIGHTS, strict=True))
del _GL_X, _GL_W


class ScalarLine:
    """Straight smooth lumens in series, ``[(inner_diameter [m], length [m]), ...]``.

    Precomputes the per-lumen constants (area, L/D, minor-loss K) once, as a careful user
    would; :func:`losses` reads them.
    """

    def __init__(self, lumens, entrance_k=SHARP_ENTRANCE_K):
        self.lumens = []
        previous = None
        for diameter, length in lumens:
            d, length = float(diameter), float(length)
            if previous is None:
                k = entrance_k
            else:
                area_ratio = (d / previous) ** 2
                k = (area_ratio - 1.0) ** 2 if area_ratio > 1.0 else 0.5 * (1.0 - area_ratio)
            area = math.pi * d * d / 4.0
            self.lumens.append((d, length / d, area, k, d / 2.0))
            previous = d
        a_out = self.lumens[-1][2]
        self.exit_factor = EXIT_K / (2.0 * a_out * a_out)  # times rho Q^2


class ScalarNewtonian:
    """A Newtonian fluid: viscosity [Pa s], density [kg/m^3]."""

    def __init__(self, viscosity, density):
        self.viscosity = float(viscosity)
        self.density = float(density)

    def apparent_viscosity(self, flow, radius):
        """The viscosity [Pa s], the same at every flow."""
        return self.viscosity


class ScalarCarreau:
    """A Carreau fluid, mu = mu_inf + (mu_zero - mu_inf) [1 + (lambda g)^2]^((n - 1)/2)."""

    def __init__(self, mu_zero, mu_inf, relaxation_time, flow_index, density):
        self.mu_zero = float(mu_zero)
        self.mu_inf = float(mu_inf)
        self.relaxation_time = float(relaxation_time)
        self.flow_index = float(flow_index)
        self.density = float(density)

    def stress(self, shear_rate):
        """Shear stress [Pa] at a shear rate [1/s]."""
        lg = self.relaxation_time * shear_rate
        x = 1.0 + lg * lg
        mu = self.mu_inf + (self.mu_zero - self.mu_inf) * x ** ((self.flow_index - 1.0) / 2.0)
        return mu * shear_rate

    def _dlog_stress(self, shear_rate):
        lg2 = (self.relaxation_time * shear_rate) ** 2
        x = 1.0 + lg2
        p = (self.flow_index - 1.0) / 2.0
        extra = (self.mu_zero - self.mu_inf) * x**p
        mu = self.mu_inf + extra
        return 1.0 + extra * p * 2.0 * lg2 / (x * mu)

    def _flow_at(self, log_rate, radius):
        """Rabinowitsch flow [m^3/s], wall stress [Pa] and d ln Q / d ln(rate) at ln(rate)."""
        rate = math.exp(log_rate)
        tau_w = self.stress(rate)
        integral = 0.0
        for s, w in _RULE:
            ratio = self.stress(s * rate) / tau_w
            integral += w * ratio * ratio * ratio
        bracket = 1.0 - integral
        flow = math.pi * radius**3 * rate * bracket / 3.0
        dlog_flow = 3.0 * self._dlog_stress(rate) * integral / bracket
        return flow, tau_w, dlog_flow

    def apparent_viscosity(self, flow, radius):
        """tau_w / (4 Q / (pi R^3)) [Pa s] of fully developed laminar flow at ``flow``.

        Newton steps on ln(wall shear rate) from the Newtonian value, to 1e-12 (as
        ``lumen._solve_log_wall_shear_rate``).
        """
        target = math.log(flow)
        y = math.log(4.0 * flow / (math.pi * radius**3))
        for _ in range(40):
            q, tau_w, dlog_q = self._flow_at(y, radius)
            step = min(max((target - math.log(q)) / dlog_q, -5.0), 5.0)
            y += step
            if abs(step) < 1e-12:
                break
        return tau_w * math.pi * radius**3 / (4.0 * q)


def _apparent_darcy_friction(re, length_over_diameter):
    """Shah 1978 developing laminar friction inside Churchill 1977 (smooth lumen), Darcy."""
    x = length_over_diameter / re
    rs = 1.0 / math.sqrt(x)
    p = 3.44 * rs
    fre = p + (0.3125 / x + 16.0 - p) / (1.0 + 0.00021 / (x * x))  # Fanning f_app Re
    laminar = fre / (2.0 * re)  # replaces Churchill's 8/Re
    big_a = (2.457 * math.log(1.0 / (7.0 / re) ** 0.9)) ** 16
    big_b = (37530.0 / re) ** 16
    return 8.0 * (laminar**12 + (big_a + big_b) ** -1.5) ** (1.0 / 12.0)


def losses(flow, line, fluid):
    """Sum of every loss [Pa] of ``line`` at ``flow`` [m^3/s] > 0."""
    rho = fluid.density
    total = line.exit_factor * rho * flow * flow
    for diameter, lod, area, k, radius in line.lumens:
        u = flow / area
        mu = fluid.apparent_viscosity(flow, radius)
        re = rho * u * diameter / mu
        total += (_apparent_darcy_friction(re, lod) * lod + k) * 0.5 * rho * u * u
    return total


def residual(flow, line, fluid, drive):
    """Losses at ``flow`` minus the net drive [Pa]."""
    return losses(flow, line, fluid) - drive


def _upper_flow(line, fluid, drive):
    """Hagen-Poiseuille flow at the drive with the lowest viscosity: above the solution
    (every loss term is at least the fully developed laminar one)."""
    mu = getattr(fluid, "mu_inf", getattr(fluid, "viscosity", None))
    resistance = sum(128.0 * mu * lod * d / (math.pi * d**4) for d, lod, _, _, _ in line.lumens)
    return drive / resistance


def solve_flow(line, fluid, head=0.0, source_pressure=0.0, back_pressure=0.0):
    """Flow [m^3/s] at a drive by brentq; returns (flow, residual evaluations).

    Bracketed between 1e-6 and 1 times the Hagen-Poiseuille flow, to 1e-13 relative.
    """
    drive = source_pressure + fluid.density * GRAVITY * head - back_pressure
    if drive <= 0.0:
        return 0.0, 0
    q_hi = _upper_flow(line, fluid, drive)
    flow, info = brentq(
        residual,
        1e-6 * q_hi,
        q_hi,
        args=(line, fluid, drive),
        xtol=1e-16 * q_hi,
        rtol=1e-13,
        full_output=True,
    )
    return flow, info.function_calls


def solve_pressure(line, fluid, flow, head=0.0, back_pressure=0.0):
    """Source pressure [Pa] above the gravity head for a prescribed flow [m^3/s]."""
    lost = losses(flow, line, fluid) if flow > 0.0 else 0.0
    return lost + back_pressure - fluid.density * GRAVITY * head
