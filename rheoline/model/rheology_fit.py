"""Rheology fits: every model of :data:`rheoline.model.rheology.RHEOLOGY_MODELS` fitted to
bench data, with standard errors, residuals, the best model by AICc and a Newtonian test.

Examples
--------
>>> fit = fit_rheology([1.0, 10.0, 100.0, 1000.0], viscosity=[1e-3, 1.001e-3, 0.999e-3, 1e-3])
>>> fit.best, fit.is_newtonian
('newtonian', True)
"""

from __future__ import annotations

import difflib
from dataclasses import dataclass, field

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.rheology import RHEOLOGY_MODELS, RheologyModel
from rheoline.model.validation import check_positive

__all__ = ["ModelFit", "RheologyFit", "fit_rheology"]


def _clip(p):
    return np.clip(p, -60.0, 60.0)


# name -> (parameter names, unconstrained vector -> natural parameters, jacobian d natural/d p)
def _newtonian_map(p):
    return {"mu": np.exp(_clip(p[0]))}


def _power_map(p):
    q = np.exp(_clip(p))
    return {"consistency": q[0], "flow_index": q[1]}


def _carreau_map(p):
    q = np.exp(_clip(p))
    out = {"mu_zero": q[0] + q[1], "mu_inf": q[0], "relaxation_time": q[2], "flow_index": q[3]}
    if len(p) == 5:
        out["a"] = q[4]
    return out


def _casson_map(p):
    return {"yield_stress": p[0] ** 2, "casson_viscosity": np.exp(_clip(p[1]))}


def _jacobian_natural(name, p):
    """d(natural parameters)/d(unconstrained parameters), rows in the map's order."""
    q = np.exp(_clip(p))
    if name == "casson":
        return np.diag([2.0 * p[0], q[1]])
    if name in ("carreau", "carreau-yasuda"):
        g = np.diag(q)
        g[0, :] = 0.0
        g[0, 0], g[0, 1] = q[0], q[1]  # mu_zero = e^p0 + e^p1
        g[1, :] = 0.0
        g[1, 0] = q[0]  # mu_inf = e^p0
        return g
    return np.diag(q)


_MAPS = {
    "newtonian": _newtonian_map,
    "power-law": _power_map,
    "carreau": _carreau_map,
    "carreau-yasuda": _carreau_map,
    "casson": _casson_map,
}


def _starts(name, g, tau, n_pl, k_pl):
    eta = tau / g
    lg = np.log(g)
    if name == "newtonian":
        return [np.array([np.mean(np.log(eta))])]
    if name == "power-law":
        return [np.array([np.log(k_pl), np.log(max(n_pl, 1e-3))])]
    if name == "casson":
        slope, intercept = np.polyfit(np.sqrt(g), np.sqrt(tau), 1)
        s0 = max(intercept, 1e-4 * np.sqrt(np.max(tau)))
        eta_c = max(slope, 1e-6 * np.sqrt(np.max(eta))) ** 2
        return [np.array([s0, np.log(eta_c)]), np.array([0.0, np.log(np.min(eta))])]
    mu_inf = 0.5 * np.min(eta)
    span = max(np.max(eta) - mu_inf, 1e-3 * mu_inf)
    n0 = float(np.clip(n_pl, 0.1, 0.9))
    starts = []
    for lam in (1.0 / np.exp(np.max(lg)), 1.0 / np.exp(np.median(lg)), 1.0 / np.exp(np.min(lg))):
        base = [np.log(mu_inf), np.log(span), np.log(lam), np.log(n0)]
        starts.append(np.array(base + [np.log(2.0)] if name == "carreau-yasuda" else base))
    return starts


@dataclass(frozen=True, eq=False)
class ModelFit:
    """The least-squares fit of one rheology model.

    Attributes
    ----------
    name : str
        Model name (a key of ``RHEOLOGY_MODELS``).
    model : RheologyModel or None
        The fitted model object (None if the fit failed).
    parameters : dict
        Parameter name -> value (SI: Pa s, Pa, s, -).
    standard_errors : dict
        Parameter name -> standard error (same unit; NaN when not identifiable
        from the data).
    residuals : ndarray
        ln(measured stress) - ln(fitted stress) [-] (relative residuals).
    rss : float
        Residual sum of squares of ``residuals``.
    aicc : float
        Corrected Akaike information criterion (inf when the data are too few for
        the model's parameters).
    message : str
        Notes from the optimizer.
    """

    name: str
    model: RheologyModel | None
    parameters: dict
    standard_errors: dict
    residuals: np.ndarray = field(repr=False)
    rss: float
    aicc: float
    message: str = ""

    @property
    def n_parameters(self) -> int:
        return len(self.parameters)


def _aicc(rss, n_points, n_params):
    k = n_params + 1  # the residual variance is a parameter too
    if n_points - k - 1 <= 0:
        return np.inf
    rss = max(rss, n_points * 1e-24)  # noise-free data: ties go to the simpler model
    return n_points * np.log(rss / n_points) + 2 * k + 2 * k * (k + 1) / (n_points - k - 1)


def _stress(name, q, g):
    """Stress [Pa] of model ``name`` with natural parameters ``q`` (plain numpy, fast)."""
    if name == "newtonian":
        return q["mu"] * g
    if name == "power-law":
        return q["consistency"] * g ** q["flow_index"]
    if name == "casson":
        return (np.sqrt(q["yield_stress"]) + np.sqrt(q["casson_viscosity"] * g)) ** 2
    a = q.get("a", 2.0)
    x = 1.0 + (q["relaxation_time"] * g) ** a
    return (q["mu_inf"] + (q["mu_zero"] - q["mu_inf"]) * x ** ((q["flow_index"] - 1.0) / a)) * g


def _fit_one(name, g, tau, n_pl, k_pl, extra_starts=()):
    from scipy.optimize import least_squares

    mapping = _MAPS[name]
    cls = RHEOLOGY_MODELS[name]
    log_tau = np.log(tau)

    def residuals(p):
        r = log_tau - np.log(_stress(name, mapping(p), g))
        return np.where(np.isfinite(r), r, 1e3)

    best = None
    with np.errstate(all="ignore"):
        for p0 in [*extra_starts, *_starts(name, g, tau, n_pl, k_pl)]:
            res = least_squares(
                residuals,
                p0,
                method="trf",
                x_scale="jac",
                xtol=1e-9,
                ftol=1e-11,
                gtol=1e-11,
                max_nfev=100 * (p0.size + 1),
            )
            if best is None or res.cost < best.cost:
                best = res
        r = residuals(best.x)
    params = {k: float(v) for k, v in mapping(best.x).items()}
    rss = float(np.sum(r**2))
    dof = g.size - best.x.size
    message = best.message
    names = list(params)
    errors = dict.fromkeys(names, np.nan)
    jac = best.jac
    identifiable = np.linalg.cond(jac) < 1e10 if jac.size else False
    if dof > 0 and identifiable:
        cov_p = rss / dof * np.linalg.inv(jac.T @ jac)
        gmat = _jacobian_natural(name, best.x)
        cov = gmat @ cov_p @ gmat.T
        errors = {k: float(np.sqrt(max(cov[i, i], 0.0))) for i, k in enumerate(names)}
    elif dof <= 0:
        message += "; as many parameters as points: no uncertainty"
    else:
        message += "; parameters not all identifiable from these data (standard errors NaN)"
    try:
        model = cls(**params)
    except ValueError as exc:  # pragma: no cover - the mapping keeps parameters valid
        model, message = None, f"{message}; {exc}"
    return ModelFit(
        name=name,
        model=model,
        parameters=params,
        standard_errors=errors,
        residuals=r,
        rss=rss,
        aicc=float(_aicc(rss, g.size, best.x.size)),
        message=message,
    )


def _fmt(v):
    return "nan" if not np.isfinite(v) else f"{v:.4g}"


@dataclass(frozen=True, repr=False, eq=False)
class RheologyFit:
    """Result of :func:`fit_rheology`.

    Attributes
    ----------
    best : str
        Name of the model with the lowest AICc.
    criterion : str
        ``"AICc"``.
    fits : dict
        Model name -> :class:`ModelFit` for every model tried.
    is_newtonian : bool
        True when the power-law flow index's confidence interval contains 1.
    flow_index : float
        The power-law flow index n [-] of the data.
    flow_index_interval : tuple of float
        Its two-sided confidence interval at ``confidence``.
    confidence : float
        Confidence level of the Newtonian test (0.95 by default).
    shear_rate, shear_stress : ndarray
        The data [1/s], [Pa].
    """

    best: str
    criterion: str
    fits: dict
    is_newtonian: bool
    flow_index: float
    flow_index_interval: tuple
    confidence: float
    shear_rate: np.ndarray
    shear_stress: np.ndarray

    @property
    def model(self) -> RheologyModel:
        """The best model, ready for ``viscosity``/``stress`` or a :class:`Fluid`."""
        return self.fits[self.best].model

    @property
    def parameters(self) -> dict:
        """Parameters of the best model."""
        return self.fits[self.best].parameters

    @property
    def standard_errors(self) -> dict:
        """Standard errors of the best model's parameters."""
        return self.fits[self.best].standard_errors

    @property
    def residuals(self) -> np.ndarray:
        """Relative residuals ln(measured / fitted stress) of the best model."""
        return self.fits[self.best].residuals

    def __repr__(self) -> str:
        lo, hi = self.flow_index_interval
        lines = [
            f"RheologyFit({self.shear_rate.size} points, best {self.best!r} by {self.criterion}; "
            f"newtonian={self.is_newtonian}: power-law n = {self.flow_index:.4g}, "
            f"{self.confidence:.0%} interval {lo:.4g}..{hi:.4g})",
        ]
        for name, f in sorted(self.fits.items(), key=lambda kv: kv[1].aicc):
            ps = ", ".join(
                f"{k}={_fmt(v)}+/-{_fmt(f.standard_errors[k])}" for k, v in f.parameters.items()
            )
            mark = "*" if name == self.best else " "
            lines.append(f" {mark} {name:15s} {self.criterion}={_fmt(f.aicc):>9s}  {ps}")
        return "\n".join(lines)


def _choose_models(models):
    if models is None:
        return list(RHEOLOGY_MODELS)
    if isinstance(models, str):
        models = [models]
    chosen = []
    for m in models:
        if m not in RHEOLOGY_MODELS:
            near = difflib.get_close_matches(str(m), RHEOLOGY_MODELS, n=1)
            hint = f"; did you mean {near[0]!r}?" if near else ""
            raise InputRangeError(
                f"models: {m!r} is not a rheology model{hint} (choose from {list(RHEOLOGY_MODELS)})"
            )
        chosen.append(m)
    return chosen


def fit_rheology(
    shear_rate,
    shear_stress=None,
    viscosity=None,
    models=None,
    confidence: float = 0.95,
    flow_index_tolerance: float = 0.0,
) -> RheologyFit:
    r"""Fit rheology models to measured data and pick the best.

    Every model (default: all of ``RHEOLOGY_MODELS``) is fitted by nonlinear
    least squares (``scipy.optimize.least_squares``) on the logarithm of the
    stress, i.e. relative errors, which suits data spanning decades of shear
    rate.  Parameters are kept valid by the fit's parametrization (logarithms of
    positive parameters, mu_zero >= mu_inf).

    Standard errors come from the Jacobian at the optimum,
    :math:`\mathrm{cov} = s^2 (J^T J)^{-1}` with :math:`s^2 = RSS/(N - p)`,
    carried to the model's own parameters by the delta method.

    The best model minimizes the corrected Akaike information criterion

    .. math:: \mathrm{AICc} = N \ln(RSS/N) + 2K + \frac{2K(K+1)}{N - K - 1}

    with K = p + 1 (the p model parameters and the residual variance); a model
    with N <= K + 1 is not eligible.

    **Newtonian test.**  ``is_newtonian`` is True when the confidence interval
    (Student t, N - 2 degrees of freedom) of the power-law flow index n, from the
    straight-line fit ln(stress) = ln K + n ln(shear rate), contains 1, widened
    by ``flow_index_tolerance`` (i.e. :math:`|n - 1| \le t\,s_n + \text{tol}`).
    This is the t-test (equivalently the F-test) of the Newtonian model nested in
    the power law: the Newtonian fit is within the scatter of the data.

    Parameters
    ----------
    shear_rate : array_like
        Shear rates [1/s], > 0, at least two distinct values.
    shear_stress : array_like, optional
        Shear stresses [Pa], > 0.  Give this or ``viscosity``.
    viscosity : array_like, optional
        Apparent viscosities [Pa s], > 0.
    models : list of str, optional
        Model names to try.
    confidence : float
        Confidence level of the Newtonian test, 0.5 to 0.9999.
    flow_index_tolerance : float
        Deviation of n from 1 accepted as Newtonian regardless of scatter [-], >= 0.

    Returns
    -------
    RheologyFit

    Raises
    ------
    InputRangeError
        Neither or both of ``shear_stress`` and ``viscosity``, mismatched lengths,
        fewer than 3 points or 2 distinct shear rates, non-positive values.

    Examples
    --------
    >>> rate = np.array([1.0, 10.0, 100.0, 1000.0])
    >>> fit = fit_rheology(rate, viscosity=[1e-3, 1.001e-3, 0.999e-3, 1e-3])
    >>> fit.best, fit.is_newtonian, round(fit.parameters["mu"] * 1e3, 3)
    ('newtonian', True, 1.0)
    """
    from scipy import stats

    if (shear_stress is None) == (viscosity is None):
        raise InputRangeError(
            "fit_rheology needs exactly one of shear_stress= [Pa] or viscosity= [Pa s]"
        )
    g = np.ravel(check_positive("shear_rate", shear_rate, "1/s"))
    if shear_stress is not None:
        tau = np.ravel(check_positive("shear_stress", shear_stress, "Pa"))
    else:
        tau = np.ravel(check_positive("viscosity", viscosity, "Pa s"))
    if tau.shape != g.shape:
        raise InputRangeError(
            f"shear_rate and {'shear_stress' if shear_stress is not None else 'viscosity'} must have "
            f"the same length, got {g.size} and {tau.size}"
        )
    if viscosity is not None:
        tau = tau * g
    if g.size < 3 or np.unique(g).size < 2:
        raise InputRangeError(
            f"fit_rheology needs at least 3 points at 2 or more distinct shear rates, got {g.size} "
            f"points at {np.unique(g).size} shear rate(s)"
        )
    if not 0.5 <= confidence <= 0.9999:
        raise InputRangeError(f"confidence must lie between 0.5 and 0.9999, got {confidence!r}")
    if not np.isfinite(flow_index_tolerance) or flow_index_tolerance < 0:
        raise InputRangeError(
            f"flow_index_tolerance must be 0 or more, got {flow_index_tolerance!r}"
        )
    names = _choose_models(models)

    x, y = np.log(g), np.log(tau)
    n_pl, ln_k = np.polyfit(x, y, 1)
    resid = y - (ln_k + n_pl * x)
    dof = g.size - 2
    s_n = np.sqrt(np.sum(resid**2) / dof / np.sum((x - x.mean()) ** 2)) if dof > 0 else np.inf
    half = stats.t.ppf(0.5 + confidence / 2, dof) * s_n if dof > 0 else np.inf
    is_newtonian = bool(abs(n_pl - 1.0) <= half + flow_index_tolerance + 1e-9)

    fits = {}
    for name in sorted(names, key=lambda m: m == "carreau-yasuda"):  # Carreau seeds Carreau-Yasuda
        extra = ()
        if name == "carreau-yasuda" and "carreau" in fits:
            c = fits["carreau"].parameters
            extra = (
                np.log(
                    [
                        c["mu_inf"],
                        max(c["mu_zero"] - c["mu_inf"], 1e-300),
                        c["relaxation_time"],
                        c["flow_index"],
                        2.0,
                    ]
                ),
            )
        fits[name] = _fit_one(name, g, tau, n_pl, np.exp(ln_k), extra)
    fits = {name: fits[name] for name in names}
    order = sorted(fits.values(), key=lambda f: (f.aicc, f.n_parameters))
    return RheologyFit(
        best=order[0].name,
        criterion="AICc",
        fits=fits,
        is_newtonian=is_newtonian,
        flow_index=float(n_pl),
        flow_index_interval=(float(n_pl - half), float(n_pl + half)),
        confidence=float(confidence),
        shear_rate=g,
        shear_stress=tau,
    )
