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

from dataclasses import dataclass, fields, replace

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.line import Line, _check_line
from rheoline.model.parts import Lumen, Tube
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

    Attributes
    ----------
    quantity : str
        "flow" [m^3/s] or "required_pressure" [Pa].
    nominal : float
        Output at the nominal inputs.
    samples : ndarray
        Output of every sample.
    percentiles : dict
        {percent: value} for the requested percentiles.
    shares : dict
        {input label: share of the variance of ln(output)} [-], largest first.
    dominant_input : str
        Label of the input with the largest share, e.g. "inner_diameter of 18G catheter".
    dominant_part : str or None
        The part whose tolerance dominates (None when a fluid tolerance does).
    relative_spread : float
        (p95 - p5) / (2 * nominal) where those percentiles were requested, else the
        standard deviation over the nominal.
    seed : int
    """

    quantity: str
    nominal: float
    samples: np.ndarray
    percentiles: dict
    shares: dict
    dominant_input: str
    dominant_part: str | None
    relative_spread: float
    seed: int


def _draw(rng, tolerance, n, distribution):
    if distribution == "uniform":
        return rng.uniform(-1.0, 1.0, n) * tolerance
    return rng.normal(0.0, 0.5, n) * tolerance


def flow_tolerance(line, fluid, *, head=0.0, source_pressure=None, back_pressure=0.0, flow=None,
                   diameter_tolerance=0.0, length_tolerance=0.0, temperature_tolerance=0.0,
                   hematocrit_tolerance=0.0, viscosity_tolerance=0.0, fluid_builder=None,
                   n_samples=10_000, seed=0, distribution="uniform",
                   percentiles=(5.0, 50.0, 95.0)):
    """Propagate tolerances into the flow (or, with ``flow``, the required pressure).

    Parameters
    ----------
    line : Line
    fluid : Fluid
        The nominal fluid.
    head, source_pressure, back_pressure, flow
        The drive, as in :meth:`Line.solve`.
    diameter_tolerance, length_tolerance : float or dict
        Relative half-width for every lumen, or ``{part name or index: tolerance}``.
    temperature_tolerance : float
        Half-width [degC]; needs ``fluid_builder`` unless the fluid is a library fluid.
    hematocrit_tolerance : float
        Half-width [-] (absolute, e.g. 0.03); same requirement.
    viscosity_tolerance : float
        Relative half-width of every viscosity of the fluid model.
    fluid_builder : callable, optional
        ``fluid_builder(temperature_c=..., hematocrit=...)`` -> Fluid for arrays of samples;
        default rebuilds the library fluid of the same name (:func:`rheoline.model.fluids.fluid`).
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
    """
    _check_line(line, fluid, head=head, source_pressure=source_pressure,
                back_pressure=back_pressure, flow=flow)
    if distribution not in ("uniform", "normal"):
        raise InputRangeError(
            f"distribution {distribution!r} is not known; choose 'uniform' or 'normal'")
    n = int(n_samples)
    if n < 10:
        raise InputRangeError(f"n_samples must be at least 10, got {n_samples!r}")
    rng = np.random.default_rng(seed)
    inputs = {}          # label -> sampled deviation (relative or absolute)
    owners = {}          # label -> part name or None
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
            d = d * (1.0 + dev)
        if l_tol > 0:
            dev = _draw(rng, l_tol, n, distribution)
            label = f"length of {name}"
            inputs[label], owners[label] = np.log1p(dev), name
            length = length * (1.0 + dev)
        if d_tol > 0 or l_tol > 0:
            new_parts.append(Tube(inner_diameter=d, length=length, roughness=part.roughness,
                                  name=part.name))
        else:
            new_parts.append(part)
    sampled_fluid = fluid
    t_tol = float(check_nonnegative("temperature_tolerance", temperature_tolerance, "degC"))
    h_tol = float(check_nonnegative("hematocrit_tolerance", hematocrit_tolerance))
    if t_tol > 0 or h_tol > 0:
        builder = fluid_builder or _library_builder(fluid)
        temps = np.asarray(fluid.temperature_c, dtype=float) + _draw(rng, t_tol, n, distribution)
        kwargs = {"temperature_c": temps}
        if t_tol > 0:
            inputs["temperature"], owners["temperature"] = temps, None
        if fluid.hematocrit is not None:
            hct = np.clip(np.asarray(fluid.hematocrit, dtype=float)
                          + _draw(rng, h_tol, n, distribution), 0.0, 0.95)
            kwargs["hematocrit"] = hct
            if h_tol > 0:
                inputs["hematocrit"], owners["hematocrit"] = hct, None
        elif h_tol > 0:
            raise InputRangeError(
                f"hematocrit_tolerance needs a blood fluid; {fluid.name!r} has no hematocrit")
        sampled_fluid = builder(**kwargs)
    v_tol = float(check_nonnegative("viscosity_tolerance", viscosity_tolerance))
    if v_tol > 0:
        dev = _draw(rng, v_tol, n, distribution)
        inputs["viscosity"], owners["viscosity"] = np.log1p(dev), None
        sampled_fluid = scale_viscosity(sampled_fluid, 1.0 + dev)
    if not inputs:
        raise InputRangeError(
            "no tolerance given: set diameter_tolerance, length_tolerance, temperature_tolerance, "
            "hematocrit_tolerance or viscosity_tolerance")
    drive = dict(head=head, back_pressure=back_pressure)
    if flow is None:
        drive["source_pressure"] = source_pressure
        quantity = "flow"
    else:
        drive["flow"] = flow
        quantity = "required_pressure"
    nominal = getattr(line.solve(fluid, **drive), quantity)
    sampled_line = Line(new_parts, entrance=line.entrance, name=line.name)
    out = np.asarray(getattr(sampled_line.solve(sampled_fluid, **drive), quantity), dtype=float)
    out = np.broadcast_to(out, (n,)) if out.ndim == 0 else out.reshape(n, -1)[:, 0]
    pct = {float(p): float(np.percentile(out, p)) for p in percentiles}
    shares = _shares(inputs, out)
    top = next(iter(shares))
    if 5.0 in pct and 95.0 in pct:
        spread = (pct[95.0] - pct[5.0]) / (2.0 * abs(float(nominal)))
    else:
        spread = float(np.std(out) / abs(float(nominal)))
    return ToleranceResult(quantity=quantity, nominal=float(nominal), samples=out, percentiles=pct,
                           shares=shares, dominant_input=top, dominant_part=owners[top],
                           relative_spread=float(spread), seed=int(seed))


def _tolerance_for(tolerance, index, name, label):
    if isinstance(tolerance, dict):
        value = tolerance.get(name, tolerance.get(index, 0.0))
    else:
        value = tolerance
    value = float(check_nonnegative(label, value))
    if value >= 1.0:
        raise InputRangeError(f"{label} {value:g} is relative (0.05 = 5 %); pass a value below 1")
    return value


def _library_builder(fluid):
    from rheoline.model import fluids

    def build(**kwargs):
        return fluids.fluid(fluid.name, **kwargs)

    try:
        fluids.fluid(fluid.name)
    except InputRangeError as exc:
        raise InputRangeError(
            f"temperature or hematocrit tolerance needs fluid_builder for the user fluid "
            f"{fluid.name!r} (a callable taking temperature_c= and hematocrit=)") from exc
    return build


def _shares(inputs, output):
    """First-order variance shares of ln(output) from a linear regression on the inputs."""
    labels = list(inputs)
    x = np.column_stack([inputs[k] for k in labels])
    y = np.log(np.maximum(output, 1e-300))
    xc = x - x.mean(axis=0)
    yc = y - y.mean()
    coef, *_ = np.linalg.lstsq(xc, yc, rcond=None)
    contrib = coef**2 * xc.var(axis=0)
    total = contrib.sum()
    share = contrib / total if total > 0 else np.zeros_like(contrib)
    order = np.argsort(-share)
    return {labels[i]: float(share[i]) for i in order}
