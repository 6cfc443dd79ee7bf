"""Reduction of bench measurements: plate-drag viscosity, rheology fits, temperature fits.

* :func:`plate_drag_viscosity`: one-point Couette reduction, viscosity from the
  drag force on a plate sliding over a thin film.
* :func:`fit_rheology`: fit every model of
  :data:`rheoline.model.rheology.RHEOLOGY_MODELS` to (shear rate, stress) or
  (shear rate, viscosity) pairs, with standard errors, residuals, the best model
  by AICc, and whether the data are Newtonian within their scatter.
* :func:`fit_viscosity_temperature`: Andrade or Vogel-Fulcher-Tammann law
  through viscosities measured at several temperatures (used by
  :func:`rheoline.model.fluids.user_fluid_from_temperatures`).
"""

from __future__ import annotations

import difflib
import warnings
from dataclasses import dataclass, field

import numpy as np

from rheoline.errors import InputRangeError, RegimeWarning, RheolineWarning
from rheoline.model.rheology import RHEOLOGY_MODELS, RheologyModel
from rheoline.model.validation import check_positive, scalar_or_array, warn_outside

__all__ = [
    "plate_drag_viscosity",
    "couette_viscosity",
    "COUETTE_TRANSITION_REYNOLDS",
    "ModelFit",
    "RheologyFit",
    "fit_rheology",
    "TemperatureFit",
    "TEMPERATURE_MODELS",
    "TEMPERATURE_MODEL_KEYS",
    "fit_viscosity_temperature",
]

_KELVIN = 273.15


# ------------------------------------------------------------------ plate drag
def plate_drag_viscosity(force, area, speed, gap, density=None):
    r"""Viscosity from a plate dragged over a thin film (plane Couette flow).

    .. math:: \mu = \frac{F\,h}{A\,U}, \qquad \dot\gamma = U / h

    Parameters
    ----------
    force : float or array_like
        Drag force on the plate F [N], > 0.
    area : float or array_like
        Wetted plate area A [m^2], > 0.
    speed : float or array_like
        Plate speed U relative to the fixed wall [m/s], > 0.
    gap : float or array_like
        Film thickness h [m], > 0.
    density : float or array_like, optional
        Fluid density [kg/m^3]; given, the film Reynolds number rho U h / mu is
        checked against :data:`COUETTE_TRANSITION_REYNOLDS`.

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s] at the shear rate U/h (apparent viscosity for a
        non-Newtonian fluid).

    Warns
    -----
    RegimeWarning
        When ``density`` is given and the film Reynolds number exceeds about 1400.

    Notes
    -----
    Assumes a linear velocity profile: laminar film, gap much smaller than the
    plate, edge effects neglected.  A coaxial-cylinder viscometer with a gap much
    narrower than its radius reduces the same way with F = torque / radius and
    A = 2 pi R L; :func:`couette_viscosity` handles any gap.

    References
    ----------
    Bird, R.B., Stewart, W.E., Lightfoot, E.N., "Transport Phenomena", 2nd ed.,
    Wiley, 2002, section 1.1 (Newton's law of viscosity).

    Examples
    --------
    >>> plate_drag_viscosity(force=0.01, area=0.01, speed=0.1, gap=1e-4)
    0.001
    """
    f = check_positive("force", force, "N")
    a = check_positive("area", area, "m^2")
    u = check_positive("speed", speed, "m/s")
    h = check_positive("gap", gap, "m")
    mu = f * h / (a * u)
    if density is not None:
        rho = check_positive("density", density, "kg/m^3")
        _warn_couette_regime(rho * u * h / mu)
    return scalar_or_array(mu)


#: Reynolds number (full gap, full wall speed) above which plane Couette flow may
#: turn turbulent: about 4 x 360 (transition near 360 on half-gap and half-speed,
#: Tillmark & Alfredsson 1992, J. Fluid Mech. 235:89, from memory).
COUETTE_TRANSITION_REYNOLDS = 1400.0


def _warn_couette_regime(reynolds):
    re = np.asarray(reynolds, dtype=float)
    if np.any(re > COUETTE_TRANSITION_REYNOLDS):
        warnings.warn(
            RegimeWarning(
                f"film Reynolds number up to {float(np.max(re)):.3g} exceeds about "
                f"{COUETTE_TRANSITION_REYNOLDS:g}: the film may not be laminar and the one-point "
                "reduction overestimates viscosity; lower the speed or the gap",
                quantity="reynolds",
                value=float(np.max(re)),
                limit=COUETTE_TRANSITION_REYNOLDS,
            ),
            stacklevel=3,
        )


def couette_viscosity(torque, inner_radius, outer_radius, length, angular_speed):
    r"""Viscosity from a coaxial-cylinder (Couette) viscometer, any gap width.

    .. math:: \mu = \frac{T\,(R_o^2 - R_i^2)}{4\pi L\,\Omega\,R_i^2 R_o^2}

    Parameters
    ----------
    torque : float or array_like
        Torque on the inner cylinder T [N m], > 0.
    inner_radius, outer_radius : float or array_like
        Cylinder radii R_i < R_o [m].
    length : float or array_like
        Wetted length L [m], > 0 (end effects neglected).
    angular_speed : float or array_like
        Relative angular speed Omega [rad/s], > 0.

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s] (Newtonian; for a shear-thinning fluid an
        apparent viscosity at the inner-wall shear rate
        :math:`2\Omega R_o^2/(R_o^2 - R_i^2)`).

    References
    ----------
    Bird, R.B., Stewart, W.E., Lightfoot, E.N., "Transport Phenomena", 2nd ed.,
    Wiley, 2002, Example 3.6-3 (tangential annular flow).

    Examples
    --------
    >>> round(couette_viscosity(1.0e-4, 0.02, 0.021, 0.05, 2.0), 6)
    0.018496
    """
    t = check_positive("torque", torque, "N m")
    ri = check_positive("inner_radius", inner_radius, "m")
    ro = check_positive("outer_radius", outer_radius, "m")
    if np.any(ro <= ri):
        raise InputRangeError(
            f"outer_radius must be larger than inner_radius, got {np.min(ro):g} m <= {np.max(ri):g} m"
        )
    length = check_positive("length", length, "m")
    omega = check_positive("angular_speed", angular_speed, "rad/s")
    return scalar_or_array(t * (ro**2 - ri**2) / (4.0 * np.pi * length * omega * ri**2 * ro**2))


# ---------------------------------------------------------------- rheology fits
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


# ------------------------------------------------------------ temperature fits
def _andrade(temperature_c, a, b):
    return np.exp(a + b / (np.asarray(temperature_c) + _KELVIN))


def _vft(temperature_c, a, b, t0_c):
    return np.exp(a + b / (np.asarray(temperature_c) - t0_c))


#: Temperature laws of viscosity: name -> (function(temperature_c, *params), parameter names,
#: minimum number of temperatures).
TEMPERATURE_MODELS = {
    "andrade": (_andrade, ("a", "b"), 2),
    "vft": (_vft, ("a", "b", "t0_c"), 3),
}

#: Provenance key (:mod:`rheoline.model.provenance`) of each temperature law.
TEMPERATURE_MODEL_KEYS = {"andrade": "andrade-1930", "vft": "vft"}


@dataclass(frozen=True, eq=False)
class TemperatureFit:
    r"""A viscosity-temperature law fitted to measurements.

    ``"andrade"``: :math:`\mu = \exp(a + b/T)`, T in kelvin (b [K]);
    ``"vft"``: :math:`\mu = \exp(a + b/(t - t_0))`, t and t_0 in degC (b [K]).
    ``mu`` in Pa s.

    Attributes
    ----------
    model : str
    parameters, standard_errors : dict
    residuals : ndarray
        ln(measured / fitted viscosity) [-].
    temperature_range_c : tuple
        The measured temperatures' span [degC]; :meth:`viscosity` warns outside it.
    """

    model: str
    parameters: dict
    standard_errors: dict
    residuals: np.ndarray = field(repr=False)
    temperature_range_c: tuple

    def viscosity(self, temperature_c):
        """Viscosity [Pa s] at ``temperature_c`` [degC] from the fitted law."""
        t = np.asarray(temperature_c, dtype=float)
        warn_outside(
            TEMPERATURE_MODEL_KEYS[self.model],
            "temperature_c",
            t,
            low=self.temperature_range_c[0],
            high=self.temperature_range_c[1],
            label=f"this {self.model} fit (the measured temperatures)",
            unit="degC",
        )
        func = TEMPERATURE_MODELS[self.model][0]
        return scalar_or_array(func(t, *self.parameters.values()))


def fit_viscosity_temperature(
    temperatures_c, viscosities, model: str = "andrade"
) -> TemperatureFit:
    """Fit the Andrade or Vogel-Fulcher-Tammann law to viscosities at several temperatures.

    Andrade is linear in ln(mu) and 1/T and is solved by linear least squares
    (two temperatures determine it exactly).  VFT adds the divergence temperature
    t_0 (kept below the lowest measured temperature) and is fitted with
    ``scipy.optimize.least_squares``; it needs three temperatures.

    Parameters
    ----------
    temperatures_c : array_like
        Temperatures [degC], distinct.
    viscosities : array_like
        Viscosities [Pa s], > 0, one per temperature.
    model : {"andrade", "vft"}

    Returns
    -------
    TemperatureFit

    References
    ----------
    Andrade, E.N. da C., "The viscosity of liquids", Nature 125 (1930) 309-310.
    Vogel, H., Phys. Z. 22 (1921) 645; Fulcher, G.S., J. Am. Ceram. Soc. 8 (1925)
    339; Tammann, G., Hesse, W., Z. Anorg. Allg. Chem. 156 (1926) 245.

    Examples
    --------
    >>> fit = fit_viscosity_temperature([20.0, 40.0], [1.0e-3, 0.653e-3])
    >>> round(fit.viscosity(30.0) * 1e3, 3)
    0.802
    """
    from scipy.optimize import least_squares

    if model not in TEMPERATURE_MODELS:
        near = difflib.get_close_matches(str(model), TEMPERATURE_MODELS, n=1)
        hint = f"; did you mean {near[0]!r}?" if near else ""
        raise InputRangeError(
            f"model {model!r} is not a temperature law{hint} (choose from {list(TEMPERATURE_MODELS)})"
        )
    func, names, minimum = TEMPERATURE_MODELS[model]
    t = np.ravel(np.asarray(temperatures_c, dtype=float))
    if not np.all(np.isfinite(t)) or np.any(t <= -_KELVIN):
        raise InputRangeError("temperatures_c must be finite and above -273.15 degC")
    mu = np.ravel(check_positive("viscosities", viscosities, "Pa s"))
    if mu.shape != t.shape:
        raise InputRangeError(
            f"give one viscosity per temperature: {t.size} temperatures, {mu.size} viscosities"
        )
    if np.unique(t).size < minimum:
        raise InputRangeError(
            f"the {model} law needs viscosities at {minimum} or more distinct temperatures, got {np.unique(t).size}"
        )
    y = np.log(mu)
    # A liquid thins as it warms (Andrade's law; common practice, no source).  Viscosities
    # that rise with temperature are most often two lists typed in opposite orders.
    if np.polyfit(1.0 / (t + _KELVIN), y, 1)[0] <= 0.0:
        warnings.warn(
            "viscosities rise with temperature in the data given, unlike a liquid; check that "
            "temperatures_c and viscosities are listed in the same order",
            RheolineWarning,
            stacklevel=3,
        )
    if model == "andrade":
        design = np.column_stack([np.ones_like(t), 1.0 / (t + _KELVIN)])
        p = np.linalg.lstsq(design, y, rcond=None)[0]
        r = y - design @ p
        dof = t.size - 2
        cov = (
            np.sum(r**2) / dof * np.linalg.inv(design.T @ design)
            if dof > 0
            else np.full((2, 2), np.nan)
        )
        errors = np.sqrt(np.abs(np.diag(cov)))
        params = p
    else:
        t_min = float(np.min(t))

        def resid(q):
            t0 = t_min - np.exp(q[2])
            return y - (q[0] + q[1] / (t - t0))

        # start from Andrade's slope with t0 100 K below the lowest temperature
        and_b = np.polyfit(1.0 / (t + _KELVIN), y, 1)[0]
        q0 = np.array([0.0, max(and_b, 10.0) / 2.0, np.log(100.0)])
        q0[0] = float(np.mean(y - q0[1] / (t - (t_min - 100.0))))
        res = least_squares(
            resid, q0, method="trf", xtol=1e-14, ftol=1e-14, gtol=1e-14, max_nfev=10000
        )
        q = res.x
        params = np.array([q[0], q[1], t_min - np.exp(q[2])])
        r = resid(q)
        dof = t.size - 3
        errors = np.full(3, np.nan)
        if dof > 0 and np.linalg.matrix_rank(res.jac) == 3:
            cov_q = np.sum(r**2) / dof * np.linalg.inv(res.jac.T @ res.jac)
            gmat = np.diag([1.0, 1.0, -np.exp(q[2])])
            errors = np.sqrt(np.abs(np.diag(gmat @ cov_q @ gmat.T)))
    return TemperatureFit(
        model=model,
        parameters=dict(zip(names, map(float, params), strict=True)),
        standard_errors=dict(zip(names, map(float, errors), strict=True)),
        residuals=r,
        temperature_range_c=(float(np.min(t)), float(np.max(t))),
    )
