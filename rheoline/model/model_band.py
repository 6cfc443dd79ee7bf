r"""The model band: how far a line's answer moves across the defensible model choices.

A tolerance band (:mod:`rheoline.model.tolerance`) spreads the inputs; the model band
spreads the models.  For each case the line is solved again with each defensible
alternative to a default model choice, and the band is the range of the answers (the flow
at a drive, or the source pressure a prescribed flow needs), with the choice that moves
the answer most named as the band's driver.  The choices (:data:`BAND_CHOICES`):

``step-losses``
    The inlet and the steps between lumens: constant handbook K (the default) against
    Hooper's laminar forms (:mod:`rheoline.model.laminar_losses`: the 1981 inlet
    :math:`160/Re + K_\infty`, the 1988 contraction and expansion).  Each step's branch
    (laminar or turbulent) is the one at the default answer's Reynolds number, held fixed
    while the alternative is solved.  Fittings given by a constant K have no laminar
    counterpart here (their kind is not known); fittings with a Hooper ``laminar_k``
    already carry it.
``transitional-friction``
    Only for cases with a lumen in the transition zone (Re 1800-4000,
    :data:`rheoline.model.friction.TRANSITION_ZONE_REYNOLDS`): the Churchill 1977 blend
    (the default) against laminar friction continued (Shah 1978, or the fully developed
    :math:`f\,Re` of the section) and against turbulent friction continued down (Churchill
    1977 without its transition term B, :math:`(f_{lam}^{12} + f_A^{12})^{1/12}` with
    :func:`churchill_1977_turbulent_friction`, which follows Colebrook, and so never below
    the laminar friction of a short lumen), in those lumens.
``blood-rheology``
    For blood: the default rheology against the caller's alternative fluids (the scenario
    layer passes the blood models that meet the validation targets,
    :mod:`rheoline.validation`).

An alternative that changes the losses of the line only (the first two) is solved as
the line's own losses plus a correction, by safeguarded Newton steps in ln Q; a pump's
pressure is the default pressure plus the correction at its flow.

Examples
--------
>>> from rheoline.model.fluid_base import newtonian_fluid
>>> from rheoline.model.line import Line
>>> from rheoline.model.parts import Catheter, Tube
>>> water = newtonian_fluid("water", viscosity=0.955e-3, density=997.8, temperature_c=22)
>>> line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=18)])
>>> band = model_band(line, water, head=1.0)
>>> [round(v * 6e7, 1) for v in (band.low, band.nominal, band.high)]      # mL/min
[87.0, 98.5, 98.5]
>>> str(band.driver)
'step-losses'
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from rheoline.model import friction as _friction
from rheoline.model.laminar_losses import (
    HOOPER_1981_INLET_K1,
    HOOPER_1988_CONTRACTION_LAMINAR_RE,
    HOOPER_1988_EXPANSION_LAMINAR_RE,
    hooper_1988_contraction_k,
    hooper_1988_expansion_k,
)
from rheoline.model.line_layout import build_layout
from rheoline.model.line_solvers import MIN_FLOW, exact_losses
from rheoline.model.parts import Lumen
from rheoline.model.provenance import merge_models
from rheoline.model.validation import scalar_or_array

__all__ = ["BAND_CHOICES", "ModelBand", "model_band", "churchill_1977_turbulent_friction"]

#: The model choices a band spreads: key -> what the alternative is, in words.
BAND_CHOICES = {
    "step-losses": "inlet and step loss coefficients: constant K against Hooper's laminar "
    "two-K forms (1981 inlet, 1988 contraction and expansion)",
    "transitional-friction": "friction at Re 1800-4000: the Churchill 1977 blend against "
    "laminar friction continued and turbulent friction continued down",
    "blood-rheology": "blood rheology: the default model against the other models that meet "
    "the validation targets",
}

_TOL = 1e-12  # on ln(losses) - ln(drive)
_MAX_ITER = 80
_SLOPE_STEP = 1e-5  # step in ln Q of the correction's central-difference slope


@dataclass(frozen=True)
class ModelBand:
    """A model band: the default answer and each alternative's, per scenario.

    Attributes
    ----------
    quantity : str
        ``"flow"`` (the answers are flows [m^3/s] at a drive) or ``"required_pressure"``
        (source pressures [Pa] for a prescribed flow).
    nominal : float or ndarray
        The default models' answer.
    alternatives : Mapping[str, ndarray]
        ``"choice:variant"`` (``"step-losses:hooper"``, ``"transitional-friction:laminar"``,
        ``"blood-rheology:carreau-yasuda"``) -> the answer with that alternative (NaN where
        it does not apply or did not converge).
    low, high : float or ndarray
        Smallest and largest answer, the default's included.
    driver : str or ndarray of str
        The choice (a key of :data:`BAND_CHOICES`) whose alternative moves the answer most,
        "" where none moves it.
    spread : float or ndarray
        That largest move relative to the default answer [-].
    models_used : tuple of str
        Provenance keys of the alternatives' models.
    """

    quantity: str
    nominal: object
    alternatives: dict = field(default_factory=dict)
    low: object = None
    high: object = None
    driver: object = ""
    spread: object = 0.0
    models_used: tuple = ()

    def choices(self):
        """The choices that took part, in :data:`BAND_CHOICES` order."""
        present = {label.split(":", 1)[0] for label in self.alternatives}
        return tuple(key for key in BAND_CHOICES if key in present)


def churchill_1977_turbulent_friction(reynolds, relative_roughness=0.0):
    r"""Churchill 1977's turbulent term alone, as a Darcy friction factor [-].

    .. math:: f = 8\,A^{-1/8},\qquad
              A = \left[2.457\ln\frac{1}{(7/Re)^{0.9} + 0.27\,\varepsilon/D}\right]^{16}

    The turbulent friction continued below the transition (Churchill's full equation
    blends it in above Re 2300): within a few per cent of Colebrook's equation.

    References
    ----------
    Churchill, S.W., Chem. Eng. 84 (24) (1977) 91-92.

    Examples
    --------
    >>> round(churchill_1977_turbulent_friction(2000.0), 4)
    0.0512
    """
    re = np.maximum(np.asarray(reynolds, dtype=float), 1e-300)
    w = np.exp(0.9 * (np.log(7.0) - np.log(re))) + 0.27 * np.asarray(relative_roughness, float)
    root = 2.457 * np.log(1.0 / w)
    return scalar_or_array(8.0 / (root * root))


# ----------------------------------------------------------------------- the corrections
def _real_rows(line, layout):
    """(row j in the lumen arrays, part index i) of the real lumens, upstream first."""
    return [(j, i) for j, i in enumerate(layout.lumen_rows) if isinstance(line.parts[i], Lumen)]


def _step_correction(line, layout, nominal_re):
    """The extra loss [Pa] of Hooper's inlet and step forms over the constant K, at a flow.

    Returns ``correction(q, re, u, mu)`` for the lumen arrays of ``layout``; each step's
    branch is the one at ``nominal_re`` (the default answer's lumen Reynolds numbers).
    """
    real = _real_rows(line, layout)
    bore = np.sqrt(4.0 * layout.area / np.pi)  # the area-equivalent bore steps refer to
    steps = []
    for (p, _), (j, _) in zip(real[:-1], real[1:], strict=True):
        d1, d2 = bore[p], bore[j]
        contraction = np.asarray(d2 < d1)
        limit = np.where(
            contraction, HOOPER_1988_CONTRACTION_LAMINAR_RE, HOOPER_1988_EXPANSION_LAMINAR_RE
        )
        laminar = np.where(
            contraction, nominal_re[p] <= limit, nominal_re[p] < limit
        )  # held fixed while solving
        steps.append((p, j, contraction, laminar))

    def correction(q, re, u, mu):
        rho = layout.density
        extra = np.zeros(np.shape(q))
        if not real:
            return extra
        first = real[0][0]
        extra = (
            extra + HOOPER_1981_INLET_K1 / np.maximum(re[first], 1e-300) * 0.5 * rho * u[first] ** 2
        )
        for p, j, contraction, laminar in steps:
            re1 = np.maximum(re[p], 1e-300)
            f1 = _darcy_developed(layout, p, re1)
            k_alt = np.where(
                contraction,
                hooper_1988_contraction_k(bore[p], bore[j], re1, f1, laminar=laminar),
                hooper_1988_expansion_k(bore[p], bore[j], re1, f1, laminar=laminar),
            )
            extra = extra + (k_alt - layout.minor_k[j]) * 0.5 * rho * u[j] ** 2
        return extra

    return correction


def _darcy_developed(layout, row, re):
    """Fully developed Darcy friction of lumen ``row`` at ``re`` (Churchill 1977)."""
    f_re, _ = _friction._friction_re_and_slope(
        re, 1.0, layout.relative_roughness[row], False, _row(layout.laminar_f_re, row)
    )
    return f_re / re


def _row(value, row):
    value = np.asarray(value)
    return value if value.ndim == 0 else value[row]


def _friction_correction(layout, mask, which):
    """The change of the lumens' frictional drop [Pa] with ``which`` friction ("laminar" or
    "turbulent") instead of the Churchill 1977 blend, in the lumens ``mask`` (n_lumen, ...)."""
    lod = layout.length / layout.diameter

    def correction(q, re, u, mu):
        re = np.maximum(re, 1e-300)
        blend, _ = _friction._friction_re_and_slope(
            re, lod, layout.relative_roughness, layout.developing, layout.laminar_f_re
        )
        shah, _ = _friction._shah_fre(lod / re, layout.laminar_f_re)
        developed = layout.laminar_f_re * np.ones_like(re)
        alt = 4.0 * np.where(layout.developing, shah, developed)  # Darcy f Re, laminar
        if which == "turbulent":
            # Churchill's blend without its transition term B: (f_lam^12 + f_A^12)^(1/12)
            turbulent = churchill_1977_turbulent_friction(re, layout.relative_roughness) * re
            alt = np.exp(np.logaddexp(12.0 * np.log(alt), 12.0 * np.log(turbulent)) / 12.0)
        # f (L/D) rho u^2 / 2 written with f Re, as the line's own lumen drop
        change = (alt - blend) * lod * 0.5 * mu * u / layout.diameter
        return np.where(mask, change, 0.0).sum(axis=0)

    return correction


# ----------------------------------------------------------------------- the solve
def _correction_slope(correction, q, re, u, mu, dlog_mu):
    """d(correction)/d ln Q [Pa] at ``q``, by a central difference along the flow's path.

    A step t in ln Q moves the flow and each lumen's velocity by e^t, its apparent
    viscosity by e^(t d ln mu / d ln Q) and its Reynolds number by e^(t (1 - d ln mu /
    d ln Q)); the path is the true one to first order, whose second-order part cancels in
    a central difference, so the slope is that of the correction to O(t^2) (t = 1e-5:
    about 1e-10 relative, near the cube root of the rounding of a difference).
    """
    t = _SLOPE_STEP
    up = np.exp(t * dlog_mu)
    down = np.exp(-t * dlog_mu)
    grow, shrink = np.exp(t), np.exp(-t)
    plus = correction(q * grow, re * grow / up, u * grow, mu * up)
    minus = correction(q * shrink, re * shrink / down, u * shrink, mu * down)
    return (plus - minus) / (2.0 * t)


def _flow_with_correction(layout, fluid, drive, correction, q_start, moving):
    """Flow [m^3/s] at which the line's losses plus ``correction`` equal ``drive`` [Pa].

    Safeguarded Newton steps in ln Q (the line's exact slope plus the correction's along
    the flow's path, :func:`_correction_slope`), bisecting inside the bracket kept from the
    residual's signs.  Returns the flows and the mask of scenarios that converged.
    """
    x = np.log(np.where(moving, np.maximum(q_start, MIN_FLOW), 1.0))
    log_drive = np.log(np.where(moving, drive, 1.0))
    lo = np.full(x.shape, -np.inf)
    hi = np.full(x.shape, np.inf)
    done = ~moving
    for _ in range(_MAX_ITER):
        q = np.exp(x)
        total, slope, pieces, mu, dlog_mu = exact_losses(layout, fluid, q)
        extra = correction(q, pieces[4], pieces[5], mu)
        losses = np.maximum(total + extra, 1e-300)
        g = np.log(losses) - log_drive
        done = done | (np.abs(g) < _TOL)
        if np.all(done):
            break
        hi = np.where(g > 0, np.minimum(hi, x), hi)
        lo = np.where(g <= 0, np.maximum(lo, x), lo)
        extra_slope = _correction_slope(correction, q, pieces[4], pieces[5], mu, dlog_mu)
        step = x - g * losses / np.maximum(slope + extra_slope, 1e-300 * losses)
        inside = (step > lo) & (step < hi)
        both = np.isfinite(lo) & np.isfinite(hi)
        bisect = 0.5 * (np.where(both, lo, 0.0) + np.where(both, hi, 0.0))
        fallback = np.where(both, bisect, np.where(g > 0, x - 1.0, x + 1.0))
        x = np.where(done, x, np.where(inside, step, fallback))
    return np.where(moving, np.exp(x), 0.0), done


def _answers(layout, fluid, nominal, corrections, pump):
    """The answer of each correction: flows at the nominal drive, or pump pressures."""
    shape = layout.shape
    q0 = np.broadcast_to(np.asarray(nominal.flow, dtype=float), shape)
    moving = q0 > 0
    out = {}
    for label, correction in corrections.items():
        if pump:
            required = np.broadcast_to(np.asarray(nominal.required_pressure, dtype=float), shape)
            q = np.where(moving, q0, 1.0)
            _, _, pieces, mu, _ = exact_losses(layout, fluid, q)
            extra = correction(q, pieces[4], pieces[5], mu)
            out[label] = np.where(moving, required + extra, required)
        else:
            drive = np.broadcast_to(np.asarray(nominal.net_drive, dtype=float), shape)
            q, ok = _flow_with_correction(layout, fluid, drive, correction, q0, moving)
            out[label] = np.where(ok, q, np.nan)
    return out


def _corrections(line, layout, nominal):
    """The loss corrections that apply to this line: {label: correction}, and their keys."""
    re = np.nan_to_num(nominal.part_reynolds[layout.lumen_rows])
    re = np.broadcast_to(re, (len(layout.lumen_rows), *layout.shape))
    out, keys = {}, []
    if _real_rows(line, layout):
        out["step-losses:hooper"] = _step_correction(line, layout, re)
        keys.append("hooper-1981")
        if len(_real_rows(line, layout)) > 1:
            keys.append("hooper-1988")
    zone = np.broadcast_to(
        np.asarray(nominal.part_conditions["transition_zone"])[layout.lumen_rows],
        (len(layout.lumen_rows), *layout.shape),
    )
    if np.any(zone):
        for which in ("laminar", "turbulent"):
            out[f"transitional-friction:{which}"] = _friction_correction(layout, zone, which)
        keys += ["shah-1978", "churchill-1977"]
    return out, keys


def model_band(
    line,
    fluid,
    *,
    head=0.0,
    source_pressure=None,
    back_pressure=0.0,
    flow=None,
    pries_correction=False,
    alternative_fluids=None,
    nominal=None,
):
    """The model band of a line: its answer under each defensible alternative model.

    Parameters
    ----------
    line : Line
    fluid : Fluid
    head, source_pressure, back_pressure, flow, pries_correction
        The drive, as for :meth:`rheoline.model.line.Line.solve` (``flow`` for a pump).
    alternative_fluids : Mapping[str, Fluid], optional
        ``{variant: fluid}``: the same fluid under other defensible models (for blood, the
        rheology models that meet the validation targets); each is solved with the same
        drive under the choice ``"blood-rheology"``.
    nominal : LineResult, optional
        The default solve of the same line, fluid and drive, if already made.

    Returns
    -------
    ModelBand
        Answers of the scenario shape (flows [m^3/s], or pressures [Pa] for a pump).

    Notes
    -----
    See the module notes for the choices and how each alternative is solved.  An
    alternative that does not converge is NaN and left out of the band.
    """
    drive = {"back_pressure": back_pressure, "pries_correction": pries_correction}
    pump = flow is not None
    if pump:
        drive["flow"] = flow
    else:
        drive.update(head=head, source_pressure=source_pressure)
    if nominal is None:
        nominal = line.solve(fluid, **drive)
    layout = build_layout(line, fluid, nominal.scenario_shape, pries_correction)
    corrections, keys = _corrections(line, layout, nominal)
    answers = _answers(layout, fluid, nominal, corrections, pump)
    for variant, other in (alternative_fluids or {}).items():
        res = line.solve(other, **drive)
        answers[f"blood-rheology:{variant}"] = np.asarray(
            res.required_pressure if pump else res.flow, dtype=float
        ) * np.ones(layout.shape)
        keys.extend(getattr(other, "models_used", ()))
    return _band(nominal, answers, pump, keys)


def _band(nominal, answers, pump, keys):
    """The :class:`ModelBand` of the default answer and the alternatives' answers."""
    value = np.asarray(nominal.required_pressure if pump else nominal.flow, dtype=float)
    shape = nominal.scenario_shape
    value = value * np.ones(shape)
    low, high = value.copy(), value.copy()
    best = np.zeros(shape)
    driver = np.full(shape, "", dtype=object)
    scale = np.where(np.abs(value) > 0, np.abs(value), 1.0)
    for label, answer in answers.items():
        ok = np.isfinite(answer)
        low = np.where(ok, np.minimum(low, answer), low)
        high = np.where(ok, np.maximum(high, answer), high)
        move = np.where(ok, np.abs(answer - value) / scale, 0.0)
        driver = np.where(move > best, label.split(":", 1)[0], driver)
        best = np.maximum(best, move)
    return ModelBand(
        quantity="required_pressure" if pump else "flow",
        nominal=scalar_or_array(value),
        alternatives={k: scalar_or_array(v) for k, v in answers.items()},
        low=scalar_or_array(low),
        high=scalar_or_array(high),
        driver=str(driver) if driver.ndim == 0 else driver.astype(str),
        spread=scalar_or_array(best),
        models_used=merge_models(keys),
    )
