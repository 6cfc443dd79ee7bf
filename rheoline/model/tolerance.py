r"""Tolerance bands: seeded, vectorized Monte Carlo of a line's flow (or required pressure).

Each tolerance is a half-width: a part's inner diameter and length as *relative*
tolerances (0.05 = +/- 5 %), the fluid temperature [degC] and hematocrit [-] as absolute
ones, and the viscosity as a relative one.  With ``distribution="uniform"`` a sample is
uniform within +/- the tolerance; with ``"normal"`` the tolerance is read as two standard
deviations (about 95 % of samples inside), the normal truncated at three standard deviations
(1.5 times the tolerance: :data:`NORMAL_TRUNCATION`) so that no draw is a bore, length or
viscosity of zero or less.  A tolerance whose reach (the tolerance, or 1.5 times it for a
normal) would take a sample out of its physical domain (a relative reach of 1 or more; a
hematocrit below 0 or above 0.95) is refused with the field named, never clipped.  All
samples are solved in one vectorized :meth:`~rheoline.model.line.Line.solve`.

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
from rheoline.model.provenance import merge_models
from rheoline.model.validation import check_nonnegative

__all__ = [
    "ToleranceResult",
    "flow_tolerance",
    "scale_viscosity",
    "NORMAL_TRUNCATION",
    "tolerance_reach",
    "check_relative_reach",
    "check_hematocrit_reach",
]

#: A normal draw is truncated at three standard deviations, i.e. at 1.5 times the
#: tolerance (two standard deviations): 0.27 % of an untruncated normal lies beyond.
NORMAL_TRUNCATION = 1.5
#: The highest hematocrit a sample may reach (the blood models' own limit).
_HEMATOCRIT_HIGH = 0.95

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

    The result has no recipe (``Fluid.at`` would rebuild the unscaled fluid).

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
    # no recipe: the library fluid it came from is no longer what it is
    return replace(fluid, rheology=new_rheo, plasma_viscosity=plasma, recipe=None)


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
    models_used : tuple of str
        Provenance keys of the models the band rests on (the line's and fluid's, and
        ``"saltelli-2008"`` for the variance shares).
    outside_range : bool or ndarray of bool
        Per scenario: the nominal solve or a sample used a correlation outside its range.
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
    models_used: tuple = ()
    outside_range: bool | np.ndarray = False


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
        Half-width [degC]; needs ``fluid_builder`` unless the fluid has a recipe
        (``Fluid.recipe``, set by :func:`rheoline.fluid`).
    hematocrit_tolerance : float
        Half-width [-] (absolute, e.g. 0.03); same requirement.
    viscosity_tolerance : float
        Relative half-width of every viscosity of the fluid model.
    fluid_builder : callable, optional
        ``fluid_builder(temperature_c=..., hematocrit=...)`` -> Fluid for arrays of samples
        (``hematocrit`` only for a blood fluid).  Default: :meth:`Fluid.at`, which builds
        the fluid again from its recipe (library name and options), checked to reproduce
        the nominal fluid; where it cannot, an error asks for ``fluid_builder``.
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
    >>> band.models_used[-1], band.outside_range
    ('saltelli-2008', False)
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
            f"distribution {distribution!r} is not known; choose 'uniform' or 'normal'",
            field="distribution",
            value=distribution,
        )
    n = int(n_samples)
    if n < 10:
        raise InputRangeError(
            f"n_samples must be at least 10, got {n_samples!r}", field="n_samples", value=n_samples
        )
    draw = _Draws(np.random.default_rng(seed), n, (n,) + (1,) * len(shape), distribution)
    new_parts = _sample_parts(line, draw, diameter_tolerance, length_tolerance)
    sampled_fluid = _sample_fluid(
        fluid, draw, temperature_tolerance, hematocrit_tolerance, viscosity_tolerance, fluid_builder
    )
    if not draw.inputs:
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
    nominal_result = line.solve(fluid, **drive)
    nominal = np.broadcast_to(np.asarray(getattr(nominal_result, quantity), dtype=float), shape)
    sampled_line = Line(new_parts, entrance=line.entrance, name=line.name)
    sampled = sampled_line.solve(sampled_fluid, **drive)
    out = np.broadcast_to(np.asarray(getattr(sampled, quantity), dtype=float), (n, *shape))
    outside = np.broadcast_to(sampled.conditions["outside_range"], (n, *shape)).any(axis=0)
    outside = outside | np.broadcast_to(nominal_result.conditions["outside_range"], shape)
    return _summarize(
        quantity,
        nominal,
        out,
        draw,
        percentiles,
        shape,
        seed,
        merge_models(nominal_result.models_used, sampled.models_used, ("saltelli-2008",)),
        outside,
    )


class _Draws:
    """The seeded generator and the sampled inputs: label -> deviation, label -> owner."""

    def __init__(self, rng, n, axis, distribution):
        self.rng, self.n, self.axis, self.distribution = rng, n, axis, distribution
        self.inputs = {}  # label -> sampled deviation, shape (n,)
        self.owners = {}  # label -> part name or None

    def __call__(self, tolerance):
        if self.distribution == "uniform":
            return self.rng.uniform(-1.0, 1.0, self.n) * tolerance
        z = self.rng.normal(0.0, 0.5, self.n)
        far = np.abs(z) > NORMAL_TRUNCATION
        while np.any(far):  # truncated: draw again beyond three standard deviations
            z[far] = self.rng.normal(0.0, 0.5, int(np.count_nonzero(far)))
            far = np.abs(z) > NORMAL_TRUNCATION
        return z * tolerance

    def record(self, label, value, owner):
        self.inputs[label], self.owners[label] = value, owner


def _sample_parts(line, draw, diameter_tolerance, length_tolerance):
    """The line's parts with sampled bores and lengths (a sample axis in front)."""
    new_parts = []
    for i, part in enumerate(line.parts):
        name = line.part_names[i]
        if not isinstance(part, Lumen):
            new_parts.append(part)
            continue
        d_tol = _tolerance_for(diameter_tolerance, i, name, "diameter_tolerance", draw)
        l_tol = _tolerance_for(length_tolerance, i, name, "length_tolerance", draw)
        d = np.asarray(part.inner_diameter, dtype=float)
        length = np.asarray(part.length, dtype=float)
        if d_tol > 0:
            dev = draw(d_tol)
            draw.record(f"inner_diameter of {name}", np.log1p(dev), name)
            d = d * (1.0 + dev.reshape(draw.axis))
        if l_tol > 0:
            dev = draw(l_tol)
            draw.record(f"length of {name}", np.log1p(dev), name)
            length = length * (1.0 + dev.reshape(draw.axis))
        if d_tol > 0 or l_tol > 0:
            # a non-circular lumen keeps its shape, scaled to the sampled hydraulic diameter
            part = part.resized(inner_diameter=d, length=length)
        new_parts.append(part)
    return new_parts


def _sample_fluid(
    fluid, draw, temperature_tolerance, hematocrit_tolerance, viscosity_tolerance, fluid_builder
):
    """The fluid at sampled temperatures and hematocrits (rebuilt), viscosities scaled."""
    t_tol = float(check_nonnegative("temperature_tolerance", temperature_tolerance, "degC"))
    h_tol = float(check_nonnegative("hematocrit_tolerance", hematocrit_tolerance))
    if h_tol > 0 and fluid.hematocrit is None:
        raise InputRangeError(
            f"hematocrit_tolerance needs a blood fluid; {fluid.name!r} has no hematocrit",
            field="hematocrit_tolerance",
            value=hematocrit_tolerance,
        )
    sampled = fluid
    if t_tol > 0 or h_tol > 0:
        builder = fluid_builder or _recipe_builder(fluid)
        dev = draw(t_tol)
        kwargs = {
            "temperature_c": np.asarray(fluid.temperature_c, dtype=float) + dev.reshape(draw.axis)
        }
        if t_tol > 0:
            draw.record("temperature", dev, None)
        if fluid.hematocrit is not None:
            check_hematocrit_reach(fluid.hematocrit, h_tol, draw.distribution)
            dev = draw(h_tol)
            kwargs["hematocrit"] = np.asarray(fluid.hematocrit, dtype=float) + dev.reshape(
                draw.axis
            )
            if h_tol > 0:
                draw.record("hematocrit", dev, None)
        sampled = builder(**kwargs)
    v_tol = float(check_nonnegative("viscosity_tolerance", viscosity_tolerance))
    check_relative_reach("viscosity_tolerance", v_tol, draw.distribution)
    if v_tol > 0:
        dev = draw(v_tol)
        draw.record("viscosity", np.log1p(dev), None)
        sampled = scale_viscosity(sampled, 1.0 + dev.reshape(draw.axis))
    return sampled


def _summarize(quantity, nominal, out, draw, percentiles, shape, seed, models, outside):
    """Percentiles, variance shares and the dominant input of the sampled outputs."""
    n = out.shape[0]
    pct = {float(p): _out(np.percentile(out, p, axis=0)) for p in percentiles}
    shares = _shares(draw.inputs, out.reshape(n, -1), shape)
    labels = list(shares)
    stacked = np.stack([np.asarray(shares[k]).reshape(-1) for k in labels])
    top = np.asarray(labels, dtype=object)[np.argmax(stacked, axis=0)].reshape(shape)
    size = np.where(np.abs(nominal) > 0, np.abs(nominal), np.nan)
    if 5.0 in pct and 95.0 in pct:
        spread = (np.asarray(pct[95.0]) - np.asarray(pct[5.0])) / (2.0 * size)
    else:
        spread = np.std(out, axis=0) / size
    if shape == ():
        top_input, top_part = str(top), draw.owners[str(top)]
    else:
        top_input = top.astype(str)
        top_part = np.vectorize(draw.owners.get, otypes=[object])(top)
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
        models_used=models,
        outside_range=bool(outside) if np.ndim(outside) == 0 else np.asarray(outside),
    )


def _tolerance_for(tolerance, index, name, label, draw):
    if isinstance(tolerance, dict):
        value = tolerance.get(name, tolerance.get(index, 0.0))
    else:
        value = tolerance
    value = float(check_nonnegative(label, value))
    check_relative_reach(label, value, draw.distribution, part=name)
    return value


def tolerance_reach(tolerance, distribution="uniform"):
    """The farthest a sample lies from its nominal value: the tolerance (uniform), or
    :data:`NORMAL_TRUNCATION` times it (normal, truncated at three standard deviations).

    Examples
    --------
    >>> tolerance_reach(0.1), tolerance_reach(0.1, "normal")
    (0.1, 0.15000000000000002)
    """
    return tolerance * (1.0 if distribution == "uniform" else NORMAL_TRUNCATION)


def check_relative_reach(label, tolerance, distribution="uniform", part=None):
    """Refuse a relative tolerance whose draws could reach zero (or below) of the nominal.

    Raises
    ------
    InputRangeError
        Naming ``label``, when the reach (:func:`tolerance_reach`) is 1 or more.

    Examples
    --------
    >>> check_relative_reach("diameter_tolerance", 0.5, "normal")
    >>> check_relative_reach("diameter_tolerance", 0.7, "normal")
    Traceback (most recent call last):
    ...
    rheoline.errors.InputRangeError: diameter_tolerance 0.7 is relative (0.05 = 5 %); with a \
normal spread (truncated at 1.5x) it draws values down to -0.05 times the nominal, zero or \
less; pass a half-width below 0.667, or distribution 'uniform' (below 1)
    """
    tolerance = np.asarray(tolerance, dtype=float)
    reach = tolerance_reach(tolerance, distribution)
    if np.all(reach < 1.0):
        return
    of = f" of {part}" if part else ""
    how = "uniform spread" if distribution == "uniform" else "normal spread (truncated at 1.5x)"
    largest = 1.0 / (tolerance_reach(1.0, distribution))
    fix = f"pass a half-width below {largest:.3g}"
    if distribution != "uniform":
        fix += ", or distribution 'uniform' (below 1)"
    raise InputRangeError(
        f"{label}{of} {float(np.max(tolerance)):g} is relative (0.05 = 5 %); with a {how} it "
        f"draws values down to {1.0 - float(np.max(reach)):.3g} times the nominal, zero or "
        f"less; {fix}",
        field=label,
        value=float(np.max(tolerance)),
    )


def check_hematocrit_reach(hematocrit, tolerance, distribution="uniform"):
    """Refuse a hematocrit tolerance whose draws leave 0 to 0.95 around ``hematocrit``.

    Examples
    --------
    >>> check_hematocrit_reach(0.45, 0.03)
    >>> check_hematocrit_reach(0.02, 0.03)
    Traceback (most recent call last):
    ...
    rheoline.errors.InputRangeError: hematocrit_tolerance 0.03 around hematocrit 0.02 \
(uniform) draws hematocrits from -0.01 to 0.05, outside 0 to 0.95; narrow the tolerance \
to 0.02 or less
    """
    h = np.asarray(hematocrit, dtype=float)
    reach = tolerance_reach(float(tolerance), distribution)
    low, high = h - reach, h + reach
    if np.all(low >= 0.0) and np.all(high <= _HEMATOCRIT_HIGH):
        return
    room = float(np.min(np.minimum(h, _HEMATOCRIT_HIGH - h))) / tolerance_reach(1.0, distribution)
    raise InputRangeError(
        f"hematocrit_tolerance {float(tolerance):g} around hematocrit {float(np.min(h)):g} "
        f"({distribution}) draws hematocrits from {float(np.min(low)):.3g} to "
        f"{float(np.max(high)):.3g}, outside 0 to {_HEMATOCRIT_HIGH}; narrow the tolerance to "
        f"{max(room, 0.0):.3g} or less",
        field="hematocrit_tolerance",
        value=float(tolerance),
    )


#: Shear rates [1/s] at which a rebuilt fluid must match the nominal one.
_CHECK_SHEAR_RATES = np.array([1.0, 100.0, 1e4])


def _same_fluid(a, b, rtol=1e-6):
    pairs = [(a.density, b.density)]
    pairs += [(a.rheology.viscosity(g), b.rheology.viscosity(g)) for g in _CHECK_SHEAR_RATES]
    return all(np.allclose(x, y, rtol=rtol, atol=0.0) for x, y in pairs)


def _recipe_builder(fluid):
    """``fluid.at``: the nominal fluid rebuilt from its recipe, checked to reproduce it."""
    if fluid.recipe is None:
        raise InputRangeError(
            f"temperature or hematocrit tolerance needs fluid_builder for the fluid "
            f"{fluid.name!r} (a callable taking temperature_c= and hematocrit=): it has no "
            "recipe to be rebuilt from (made from numbers, or changed after it was built)",
            field="fluid_builder",
        )
    nominal = {"temperature_c": fluid.temperature_c}
    if fluid.hematocrit is not None:
        nominal["hematocrit"] = fluid.hematocrit
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # the nominal fluid already warned
        rebuilt = fluid.at(**nominal)
    if not _same_fluid(rebuilt, fluid):
        raise InputRangeError(
            f"the fluid {fluid.name!r} rebuilt from its recipe ({fluid.recipe!r}) for the "
            "temperature or hematocrit tolerance does not reproduce the fluid given (changed "
            "after it was built?); pass a fluid_builder taking temperature_c= (and "
            f"hematocrit=), e.g. lambda **kw: rheoline.fluid({fluid.name!r}, <its options>, **kw)",
            field="fluid_builder",
        )
    return fluid.at


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
