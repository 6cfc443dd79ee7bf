r"""Loss coefficients that rise at low Reynolds number: Hooper's inlet and step forms.

The line engine's default minor losses are the constant, turbulent-flow handbook values
(:mod:`rheoline.model.losses`: a flush inlet K = 0.5, Crane's contraction
:math:`0.5(1-\beta^2)`, Borda-Carnot's expansion).  In laminar flow real steps lose more,
roughly as :math:`C/Re`.  These published forms are the defensible laminar alternative; the
model band (:mod:`rheoline.model.model_band`) solves a line with them to show how far the
answer moves with the choice.  They are not the default: their constants come from
industrial pipe fittings and steps of 1/2 inch and up, and at infusion bores they are an
extrapolation, no better established than the constant K.

* :func:`hooper_1981_inlet_k`: a pipe inlet, :math:`K = K_1/Re + K_\infty` with
  :math:`K_1 = 160` (Hooper 1981, from memory) and :math:`K_\infty` the inlet's constant K.
* :func:`hooper_1988_contraction_k`: a sudden contraction, referred to the downstream
  velocity; laminar (:math:`Re_1 \le 2500`)
  :math:`K_1 = (1.2 + 160/Re_1)\,[(D_1/D_2)^4 - 1]`, turbulent
  :math:`K_1 = (0.6 + 0.48 f_1)(D_1/D_2)^2[(D_1/D_2)^2 - 1]` (upstream velocity), then
  :math:`K_2 = K_1 (D_2/D_1)^4`.
* :func:`hooper_1988_expansion_k`: a sudden expansion, referred to the downstream velocity;
  laminar (:math:`Re_1 < 4000`) :math:`K_1 = 2[1 - (D_1/D_2)^4]`, turbulent
  :math:`K_1 = (1 + 0.8 f_1)[1 - (D_1/D_2)^2]^2` (upstream velocity), then
  :math:`K_2 = K_1 (D_2/D_1)^4`.

:math:`Re_1` and :math:`f_1` (Darcy) are those of the upstream lumen.

References
----------
Hooper, W.B., "The two-K method predicts head losses in pipe fittings", Chem. Eng. 88 (17)
(1981) 96-100.
Hooper, W.B., "Calculate head loss caused by change in pipe size", Chem. Eng. 95 (16)
(1988) 89-92.  The tests compare with the ``fluids`` library's ``contraction_sharp`` and
``diffuser_sharp`` (method "Hooper").
"""

from __future__ import annotations

import numpy as np

from rheoline.model.validation import check_nonnegative, check_positive, scalar_or_array

__all__ = [
    "HOOPER_1981_INLET_K1",
    "HOOPER_1988_CONTRACTION_LAMINAR_RE",
    "HOOPER_1988_EXPANSION_LAMINAR_RE",
    "hooper_1981_inlet_k",
    "hooper_1988_contraction_k",
    "hooper_1988_expansion_k",
]

#: Hooper 1981's K_1 of a pipe inlet (flush or projecting) [-].  From memory: Hooper's
#: table (as reproduced in Darby, "Chemical Engineering Fluid Mechanics", 2001) lists
#: K_1 = 160 for every inlet, with K_inf 0.5 (flush) and 1.0 (projecting).
HOOPER_1981_INLET_K1 = 160.0
#: Upstream Reynolds number up to which Hooper 1988's laminar contraction form holds.
HOOPER_1988_CONTRACTION_LAMINAR_RE = 2500.0
#: Upstream Reynolds number below which Hooper 1988's laminar expansion form holds.
HOOPER_1988_EXPANSION_LAMINAR_RE = 4000.0


def hooper_1981_inlet_k(reynolds, k_infinity=0.5):
    r"""Loss coefficient [-] of a pipe inlet by Hooper's 1981 two-K form.

    .. math:: K = \frac{160}{Re} + K_\infty

    Parameters
    ----------
    reynolds : float or array_like
        Reynolds number [-] of the lumen entered, > 0.
    k_infinity : float or array_like
        The inlet's high-Reynolds-number K [-] (0.5 for a flush sharp-edged inlet).

    Returns
    -------
    float or ndarray
        K referred to the velocity of the lumen entered.

    Notes
    -----
    :math:`K_1 = 160` is recalled (see :data:`HOOPER_1981_INLET_K1`).  Hooper's method
    spans laminar to turbulent flow; the size term of his fittings does not apply to inlets.

    References
    ----------
    Hooper, W.B., Chem. Eng. 88 (17) (1981) 96-100.

    Examples
    --------
    >>> round(hooper_1981_inlet_k(400.0), 3)      # 160/400 + 0.5
    0.9
    """
    re = check_positive("reynolds", reynolds)
    k_inf = check_nonnegative("k_infinity", k_infinity)
    return scalar_or_array(HOOPER_1981_INLET_K1 / re + k_inf)


def _ratios(upstream_diameter, downstream_diameter):
    d1 = check_positive("upstream_diameter", upstream_diameter, "m")
    d2 = check_positive("downstream_diameter", downstream_diameter, "m")
    return d1, d2


def hooper_1988_contraction_k(
    upstream_diameter, downstream_diameter, upstream_reynolds, upstream_friction=0.0, laminar=None
):
    r"""Sudden contraction K [-] by Hooper 1988, referred to the downstream velocity.

    .. math::

        K_1 = \begin{cases}
        (1.2 + 160/Re_1)\,[(D_1/D_2)^4 - 1] & Re_1 \le 2500 \\
        (0.6 + 0.48 f_1)\,(D_1/D_2)^2\,[(D_1/D_2)^2 - 1] & Re_1 > 2500
        \end{cases},\qquad K_2 = K_1\,(D_2/D_1)^4

    Parameters
    ----------
    upstream_diameter, downstream_diameter : float or array_like
        Bores [m]; 0 where the bore does not fall.
    upstream_reynolds : float or array_like
        Reynolds number [-] in the upstream lumen, > 0.
    upstream_friction : float or array_like
        Darcy friction factor [-] of the upstream lumen (turbulent branch only).
    laminar : bool or array_like of bool, optional
        Which branch to use; default by the Reynolds number (laminar up to 2500).  A
        caller that holds the branch fixed while it solves for the flow passes it.

    Returns
    -------
    float or ndarray
        K referred to the downstream (smaller) bore's velocity; 0 where the bore does not
        fall.

    References
    ----------
    Hooper, W.B., Chem. Eng. 95 (16) (1988) 89-92.

    Examples
    --------
    >>> round(hooper_1988_contraction_k(3e-3, 1e-3, 700.0), 4)   # (1.2 + 160/700)(1 - 1/81)
    1.4109
    """
    d1, d2 = _ratios(upstream_diameter, downstream_diameter)
    re1 = check_positive("upstream_reynolds", upstream_reynolds)
    f1 = check_nonnegative("upstream_friction", upstream_friction)
    r2 = np.maximum(d1 / d2, 1.0) ** 2  # (D1/D2)^2 >= 1
    turbulent = (0.6 + 0.48 * f1) * r2 * (r2 - 1.0)
    if laminar is None:
        laminar = re1 <= HOOPER_1988_CONTRACTION_LAMINAR_RE
    k1 = np.where(laminar, (1.2 + 160.0 / re1) * (r2 * r2 - 1.0), turbulent)
    return scalar_or_array(k1 / (r2 * r2))


def hooper_1988_expansion_k(
    upstream_diameter, downstream_diameter, upstream_reynolds, upstream_friction=0.0, laminar=None
):
    r"""Sudden expansion K [-] by Hooper 1988, referred to the downstream velocity.

    .. math::

        K_1 = \begin{cases}
        2\,[1 - (D_1/D_2)^4] & Re_1 < 4000 \\
        (1 + 0.8 f_1)\,[1 - (D_1/D_2)^2]^2 & Re_1 \ge 4000
        \end{cases},\qquad K_2 = K_1\,(D_2/D_1)^4

    The laminar form is larger than Borda-Carnot's :math:`(1-\beta^2)^2`: a laminar jet
    carries twice the kinetic energy of a flat profile of the same mean velocity.

    Parameters
    ----------
    upstream_diameter, downstream_diameter : float or array_like
        Bores [m]; 0 where the bore does not grow.
    upstream_reynolds : float or array_like
        Reynolds number [-] in the upstream (smaller) lumen, > 0.
    upstream_friction : float or array_like
        Darcy friction factor [-] of the upstream lumen (turbulent branch only).
    laminar : bool or array_like of bool, optional
        Which branch to use; default by the Reynolds number (laminar below 4000).

    Returns
    -------
    float or ndarray
        K referred to the downstream (larger) bore's velocity; 0 where the bore does not
        grow.

    References
    ----------
    Hooper, W.B., Chem. Eng. 95 (16) (1988) 89-92.

    Examples
    --------
    >>> round(hooper_1988_expansion_k(1e-3, 2e-3, 700.0), 4)   # 2 (1 - 1/16) x 16
    30.0
    """
    d1, d2 = _ratios(upstream_diameter, downstream_diameter)
    re1 = check_positive("upstream_reynolds", upstream_reynolds)
    f1 = check_nonnegative("upstream_friction", upstream_friction)
    b2 = np.minimum(d1 / d2, 1.0) ** 2  # (D1/D2)^2 <= 1
    turbulent = (1.0 + 0.8 * f1) * (1.0 - b2) ** 2
    if laminar is None:
        laminar = re1 < HOOPER_1988_EXPANSION_LAMINAR_RE
    k1 = np.where(laminar, 2.0 * (1.0 - b2 * b2), turbulent)
    return scalar_or_array(k1 / (b2 * b2))
