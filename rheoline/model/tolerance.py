r"""Tolerance bands: seeded, vectorized Monte Carlo of a line's flow (or required pressure).

Each tolerance is a half-width: a part's inner diameter and length as *relative*
tolerances (0.05 = +/- 5 %), the fluid temperature [degC] and hematocrit [-] as absolute
ones, and the viscosity as a relative one.  With ``distribution="uniform"`` a sample is
uniform within +/- the tolerance; with ``"normal"`` the tolerance is read as two standard
deviations (about 95 % of samples inside).  All samples are solved in one vectorized
:meth:`~rheoline.model.line.Line.solve`.

The spread is attributed to the inputs by standardized regression coefficients of
ln(output) on the sampled inputs, :math:`S_i = b_i^2 \operatorname{var}(x_i) /
\operatorname{var}(\ln y)`, a first-order (linear) variance share that is accurate when the
output is close to a power law of the inputs over the band (Saltelli et al. 2008, ch. 1).
For a laminar lumen :math:`Q \propto D^4`, so a 5 % diameter tolerance gives about 20 %
on flow, and that part's diameter usually dominates.

References
----------
Saltelli, A. et al., "Global Sensitivity Analysis: The Primer", Wiley, 2008.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass, fields, replace

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.line import Line, _check_line
from rheoline.model.parts import Lumen
from rheoline.model.validation import check_nonnegative

__all__ = ["ToleranceResult", "flow_tolerance", "scale_viscosity"]

#: Viscosity-like fields of each rheology model, scaled together by a viscosity tolerance.
_VISCOSITY_FIELDS = {
    "newtonian": ("mu",),
    "power-law": ("consistency",),
    "carreau": ("mu_zero", "mu_inf"),
    "carreau-yasuda": ("mu_zero", "mu_inf"),
    "casson": ("casson_viscosity", "yield_stress"),
}


def scale_viscosity(fluid, factor):
    """The fluid with every viscosity (and a Casson yield stress) multiplied by ``factor``.

    Examples
    --------
    >>> from rheoline.model.fluid_base import newtonian_fluid
    >>> scale_viscosity(newtonian_fluid("w", 1e-3, 998.0), 1.1).viscosity()
    0.0011
    """
    rheo = fluid.rheology
    names = _VISCOSITY_FIELDS.get(rheo.name)
    if names is None:
        raise InputRangeError(
            f"viscosity tolerance does not know the rheology model {rheo.name!r}; known: "
            f"{', '.join(_VISCOSITY_FIELDS)}"
        )
    factor = np.asarray(factor, dtype=float)
    known = {f.name for f in fields(rheo)}
    changes = {n: getattr(rheo, n) * factor for n in names if n in known}
    new_rheo = replace(rheo, **changes)
    plasma = None if fluid.plasma_viscosity is None else fluid.plasma_viscosity * factor
    return replace(fluid, rheology=new_rheo, plasma_viscosity=plasma)


@dataclass(frozen=True)
class ToleranceResult:
    """Monte Carlo band of a line's output.

    For a vectorized call (array drives, fluid properties or part sizes: the scenario
    shape ``S``) every sample applies the same deviations to every scenario (common
    random numbers), and the per-scenario fields below are arrays of shape ``S``.

    Attributes
    ----------
    quantity : str
        "flow" [m^3/s] or "required_pressure" [Pa].
    nominal : float or ndarray
        Output at the nominal inputs.
    samples : ndarray
        Output of every sample, shape ``(n_samples, *S)``.
    percentiles : dict
        {percent: value (float or array)} for the requested percentiles.
    shares : dict
        {input label: share of the variance of ln(output) [-] (float or array)}, largest
        first (by the mean over the scenarios).
    dominant_input : str or ndarray of str
        Label of the input with the largest share, e.g. "inner_diameter of 18G catheter".
    dominant_part : str or None, or an object array of them
        The part whose tolerance dominates (None when a fluid tolerance does).
    relative_spread : float or ndarray
        (p95 - p5) / (2 * nominal) where those percentiles were requested, else the
        standard deviation over the nominal.
    seed : int
    """

    quantity: str
    nominal: float | np.ndarray
    samples: np.ndarray
    percentiles: dict
    shares: dict
    dominant_input: str | np.ndarray
    dominant_part: str | None | np.ndarray
    relative_spread: float | np.ndarray
    seed: int


def _draw(rng, tolerance, n, distribution):
    if distribution == "uniform":
        return rng.uniform(-1.0, 1.0, n) * tolerance
    return rng.normal(0.0, 0.5, n) * tolerance


def _out(value):
    arr = np.asarray(value, dtype=float)
    return float(arr) if arr.ndim == 0 else arr


def flow_tolerance(
    line,
    fluid,
    *,
    head=0.0,
    source_pressure=None,
    back_pressure=0.0,
    flow=None,
    diameter_tolerance=0.0,
    length_tolerance=0.0,
    temperature_tolerance=0.0,
    hematocrit_tolerance=0.0,
    viscosity_tolerance=0.0,
    fluid_builder=None,
    n_samples=10_000,
    seed=0,
    distribution="uniform",
    percentiles=(5.0, 50.0, 95.0),
):
    """Propagate tolerances into the flow (or, with ``flow``, the required pressure).

    Parameters
    ----------
    line : Line
        Part sizes may be arrays (one per scenario).
    fluid : Fluid
        The nominal fluid (its properties may be arrays).
    head, source_pressure, back_pressure, flow
        The drive, as in :meth:`Line.solve` (arrays broadcast into scenarios).
    diameter_tolerance, length_tolerance : float or dict
        Relative half-width for every lumen, or ``{part name or index: tolerance}``.
    temperature_tolerance : float
        Half-width [degC]; needs ``fluid_builder`` unless the fluid is a library fluid.
    hematocrit_tolerance : float
        Half-width [-] (absolute, e.g. 0.03); same requirement.
    viscosity_tolerance : float
        Relative half-width of every viscosity of the fluid model.
    fluid_builder : callable, optional
        ``fluid_builder(temperature_c=..., hematocrit=...)`` -> Fluid for arrays of samples
        (``hematocrit`` only for a blood fluid).  Default: the library fluid of the same
        name rebuilt with the options the nominal fluid was made with (the blood rheology
        ``model`` from its rheology, a glycerol ``mass_fraction`` or an albumin
        ``concentration`` inverted from its viscosity), checked to reproduce the nominal
        fluid; where it cannot, an error asks for ``fluid_builder``.
    n_samples : int
    seed : int
        Seed of numpy's default generator (the same seed gives the same band).
    distribution : {"uniform", "normal"}
    percentiles : sequence of float

    Returns
    -------
    ToleranceResult

    Examples
    --------
    >>> from rheoline.model.fluid_base import newtonian_fluid
    >>> from rheoline.model.parts import Catheter, Tube
    >>> water = newtonian_fluid("water", 0.955e-3, 997.8)
    >>> line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=22)])
    >>> band = flow_tolerance(line, water, head=1.0, diameter_tolerance=0.05, n_samples=2000)
    >>> band.dominant_input
    'inner_diameter of 22G catheter'
    >>> heads = flow_tolerance(line, water, head=[0.5, 1.0], diameter_tolerance=0.05,
    ...                        n_samples=2000)
    >>> heads.samples.shape, heads.dominant_input.tolist()
    ((2000, 2), ['inner_diameter of 22G catheter', 'inner_diameter of 22G catheter'])
    """
    shape = _check_line(
        line,
        fluid,
        head=head,
        source_pressure=source_pressure,
        back_pressure=back_pressure,
        flow=flow,
    )
    if distribution not in ("uniform", "normal"):
        raise InputRangeError(
            f"distribution {distribution!r} is not known; choose 'uniform' or 'normal'"
        )
    n = int(n_samples)
    if n < 10:
        raise InputRangeError(f"n_samples must be at least 10, got {n_samples!r}")
    rng = np.random.default_rng(seed)
    axis = (n,) + (1,) * len(shape)  # a sample axis in front of the scenario axes
    inputs = {}  # label -> sampled deviation, shape (n,)
    owners = {}  # label -> part name or None
    new_parts = []
    for i, part in enumerate(line.parts):
        name = line.part_names[i]
        if not isinstance(part, Lumen):
            new_parts.append(part)
            continue
        d_tol = _tolerance_for(diameter_tolerance, i, name, "diameter_tolerance")
        l_tol = _tolerance_for(length_tolerance, i, name, "length_tolerance")
        d = np.asarray(part.inner_diameter, dtype=float)
        length = np.asarray(part.length, dtype=float)
        if d_tol > 0:
            dev = _draw(rng, d_tol, n, distribution)
            label = f"inner_diameter of {name}"
            inputs[label], owners[label] = np.log1p(dev), name
            d = d * (1.0 + dev.reshape(axis))
        if l_tol > 0:
            dev = _draw(rng, l_tol, n, distribution)
            label = f"length of {name}"
            inputs[label], owners[label] = np.log1p(dev), name
            length = length * (1.0 + dev.reshape(axis))
        if d_tol > 0 or l_tol > 0:
            # a non-circular lumen keeps its shape, scaled to the sampled hydraulic diameter
            new_parts.append(part.resized(inner_diameter=d, length=length))
        else:
            new_parts.append(part)
    sampled_fluid = fluid
    t_tol = float(check_nonnegative("temperature_tolerance", temperature_tolerance, "degC"))
    h_tol = float(check_nonnegative("hematocrit_tolerance", hematocrit_tolerance))
    if h_tol > 0 and fluid.hematocrit is None:
        raise InputRangeError(
            f"hematocrit_tolerance needs a blood fluid; {fluid.name!r} has no hematocrit"
        )
    if t_tol > 0 or h_tol > 0:
        builder = fluid_builder or _library_builder(fluid)
        dev = _draw(rng, t_tol, n, distribution)
        kwargs = {"temperature_c": np.asarray(fluid.temperature_c, dtype=float) + dev.reshape(axis)}
        if t_tol > 0:
            inputs["temperature"], owners["temperature"] = dev, None
        if fluid.hematocrit is not None:
            dev = _draw(rng, h_tol, n, distribution)
            kwargs["hematocrit"] = np.clip(
                np.asarray(fluid.hematocrit, dtype=float) + dev.reshape(axis), 0.0, 0.95
            )
            if h_tol > 0:
                inputs["hematocrit"], owners["hematocrit"] = dev, None
        sampled_fluid = builder(**kwargs)
    v_tol = float(check_nonnegative("viscosity_tolerance", viscosity_tolerance))
    if v_tol > 0:
        dev = _draw(rng, v_tol, n, distribution)
        inputs["viscosity"], owners["viscosity"] = np.log1p(dev), None
        sampled_fluid = scale_viscosity(sampled_fluid, 1.0 + dev.reshape(axis))
    if not inputs:
        raise InputRangeError(
            "no tolerance given: set diameter_tolerance, length_tolerance, temperature_tolerance, "
            "hematocrit_tolerance or viscosity_tolerance"
        )
    drive = dict(head=head, back_pressure=back_pressure)
    if flow is None:
        drive["source_pressure"] = source_pressure
        quantity = "flow"
    else:
        drive["flow"] = flow
        quantity = "required_pressure"
    nominal = np.asarray(getattr(line.solve(fluid, **drive), quantity), dtype=float)
    nominal = np.broadcast_to(nominal, shape)
    sampled_line = Line(new_parts, entrance=line.entrance, name=line.name)
    out = np.asarray(getattr(sampled_line.solve(sampled_fluid, **drive), quantity), dtype=float)
    out = np.broadcast_to(out, (n, *shape))
    pct = {float(p): _out(np.percentile(out, p, axis=0)) for p in percentiles}
    shares = _shares(inputs, out.reshape(n, -1), shape)
    labels = list(shares)
    stacked = np.stack([np.asarray(shares[k]).reshape(-1) for k in labels])
    top = np.asarray(labels, dtype=object)[np.argmax(stacked, axis=0)].reshape(shape)
    size = np.where(np.abs(nominal) > 0, np.abs(nominal), np.nan)
    if 5.0 in pct and 95.0 in pct:
        spread = (np.asarray(pct[95.0]) - np.asarray(pct[5.0])) / (2.0 * size)
    else:
        spread = np.std(out, axis=0) / size
    if shape == ():
        top_input, top_part = str(top), owners[str(top)]
    else:
        top_input = top.astype(str)
        top_part = np.vectorize(owners.get, otypes=[object])(top)
    return ToleranceResult(
        quantity=quantity,
        nominal=_out(nominal),
        samples=np.array(out),
        percentiles=pct,
        shares=shares,
        dominant_input=top_input,
        dominant_part=top_part,
        relative_spread=_out(spread),
        seed=int(seed),
    )


def _tolerance_for(tolerance, index, name, label):
    if isinstance(tolerance, dict):
        value = tolerance.get(name, tolerance.get(index, 0.0))
    else:
        value = tolerance
    value = float(check_nonnegative(label, value))
    if value >= 1.0:
        raise InputRangeError(f"{label} {value:g} is relative (0.05 = 5 %); pass a value below 1")
    return value


def _recover_model(fluid):
    from rheoline.model.blood import BLOOD_RHEOLOGY_MODELS

    if fluid.rheology.name not in BLOOD_RHEOLOGY_MODELS:
        raise InputRangeError(f"rheology {fluid.rheology.name!r} is not a blood model")
    return fluid.rheology.name


def _recover_mass_fraction(fluid):
    from rheoline.model import viscosity

    return viscosity.glycerol_fraction_for_viscosity(
        fluid.rheology.viscosity(), fluid.temperature_c
    )


def _recover_concentration(fluid):
    # invert the Mooney form mu = mu_s exp([eta] c / (1 - k c)): c = r / ([eta] + k r)
    from rheoline.model import viscosity

    r = np.log(fluid.rheology.viscosity() / viscosity.saline_viscosity(fluid.temperature_c))
    return r / (viscosity.ALBUMIN_INTRINSIC_VISCOSITY + viscosity.ALBUMIN_CROWDING * r)


#: Library options a Fluid does not record, and how to read each back from the fluid.
_OPTION_RECOVERY = {
    "model": _recover_model,
    "mass_fraction": _recover_mass_fraction,
    "concentration": _recover_concentration,
}

#: Shear rates [1/s] at which a rebuilt fluid must match the nominal one.
_CHECK_SHEAR_RATES = np.array([1.0, 100.0, 1e4])


def _same_fluid(a, b, rtol=1e-6):
    pairs = [(a.density, b.density)]
    pairs += [(a.rheology.viscosity(g), b.rheology.viscosity(g)) for g in _CHECK_SHEAR_RATES]
    return all(np.allclose(x, y, rtol=rtol, atol=0.0) for x, y in pairs)


def _library_builder(fluid):
    """A builder of the library fluid ``fluid.name`` with the nominal fluid's own options."""
    from rheoline.model import fluids

    try:
        name, entry = fluids._entry(fluid.name)
    except InputRangeError as exc:
        raise InputRangeError(
            f"temperature or hematocrit tolerance needs fluid_builder for the user fluid "
            f"{fluid.name!r} (a callable taking temperature_c= and hematocrit=)"
        ) from exc
    options = {}
    for option in entry.options:
        if option in _OPTION_RECOVERY:
            try:
                options[option] = _OPTION_RECOVERY[option](fluid)
            except InputRangeError:
                continue  # left out; the check below tells whether it mattered

    def build(**kwargs):
        return fluids.fluid(name, **options, **kwargs)

    nominal = {"temperature_c": fluid.temperature_c}
    if fluid.hematocrit is not None:
        nominal["hematocrit"] = fluid.hematocrit
    rebuilt = None
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # the nominal fluid already warned
        try:
            rebuilt = build(**nominal)
        except InputRangeError:
            pass
    if rebuilt is None or not _same_fluid(rebuilt, fluid):
        given = ", ".join(f"{k}={v!r}" for k, v in options.items())
        raise InputRangeError(
            f"the library fluid {name!r} rebuilt for the temperature or hematocrit tolerance "
            f"({given or 'default options'}) does not reproduce the fluid given (changed "
            f"after rheoline.fluid()?); pass a fluid_builder taking temperature_c= (and "
            f"hematocrit=), e.g. lambda **kw: rheoline.fluid({name!r}, <its options>, **kw)"
        )
    return build


def _shares(inputs, output, shape=()):
    """First-order variance shares of ln(output) from a linear regression on the inputs.

    ``output`` is ``(n_samples, n_scenarios)``; one least-squares solve serves every
    scenario (the sampled inputs are shared).  Returns {label: share (float or array)},
    largest mean share first.
    """
    labels = list(inputs)
    x = np.column_stack([inputs[k] for k in labels])
    y = np.log(np.maximum(output, 1e-300))
    xc = x - x.mean(axis=0)
    yc = y - y.mean(axis=0)
    coef, *_ = np.linalg.lstsq(xc, yc, rcond=None)
    contrib = coef**2 * xc.var(axis=0)[:, None]
    total = contrib.sum(axis=0)
    share = np.where(total > 0, contrib / np.where(total > 0, total, 1.0), 0.0)
    order = np.argsort(-share.mean(axis=1), kind="stable")
    return {labels[i]: _out(share[i].reshape(shape)) for i in order}
