"""Parts in series: the line, its drives, the vectorized solve and its inverse.

API summary (the names the scenario layer, widgets and benchmarks code against)
-------------------------------------------------------------------------------
All quantities SI: metres, Pa, m^3/s, Pa s, kg/m^3; temperatures in degC.

Lumen physics (:mod:`rheoline.model.lumen`)
    ``poiseuille_flow(pressure_drop, radius, length, viscosity)`` -> flow [m^3/s]
    ``poiseuille_pressure_drop(flow, radius, length, viscosity)`` -> [Pa]
    ``reynolds_number(mean_velocity, diameter, density, viscosity)`` -> [-]
    ``shah_1978_apparent_friction(reynolds, length, diameter)`` -> Fanning f_app [-]
    ``churchill_1977_friction(reynolds, relative_roughness)`` -> Darcy f [-]
    ``apparent_darcy_friction(reynolds, length, diameter, relative_roughness)``
        Shah 1978 developing laminar flow blended into Churchill 1977 across regimes.
    ``rabinowitsch_flow(rheology, wall_shear_rate, radius)`` -> (flow, wall_shear_stress)
    ``power_law_tube_flow(pressure_drop, radius, length, consistency, flow_index)``
    ``lumen_pressure_drop(fluid, flow, inner_diameter, length, roughness=0.0)``
    ``velocity_profile(fluid, flow, inner_diameter, length, n_points=41)``
    ``entrance_length(reynolds, diameter)``, ``regime_of(reynolds)``

Loss coefficients (:mod:`rheoline.model.losses`)
    ``ENTRANCE_K`` {name: K}, ``entrance_k(kind)``, ``crane_sudden_contraction_k(d_up, d_down)``,
    ``borda_carnot_expansion_k(d_up, d_down)``, ``EXIT_K``, ``CRANE_L_OVER_D``,
    ``crane_fitting_k(kind, inner_diameter)``, ``equivalent_length(k, inner_diameter, ...)``.

Parts (:mod:`rheoline.model.parts`, catalogue in :mod:`rheoline.model.catalogue`)
    ``Tube(inner_diameter=..., length=..., roughness=0.0, name=None)``
    ``Catheter(gauge=..., inner_diameter=None, length=None, name=None)`` (14G-26G typical)
    ``Needle(gauge=..., wall="regular", length=0.038, inner_diameter=None, name=None)``
    ``Cannula(french=..., inner_diameter=None, wall_thickness=None, length=0.15, name=None)``
    ``Fitting(k=None, equivalent_length=None, inner_diameter=None, name=None)``
    ``MeasuredPart(flows=..., pressure_drops=..., test_viscosity=None, test_density=None,
    name=None)`` fits dp = a*Q + b*Q^2.
    Every part has ``.name``; lumens have ``.inner_diameter``, ``.length``,
    ``.outer_diameter`` (None where unknown).  Dimensions may be arrays (one per scenario).

Line (this module)
    ``Line(parts, entrance="sharp-edged")``
    ``line.solve(fluid, head=0.0, source_pressure=0.0, back_pressure=0.0)``
        flow at a drive: gravity head [m] of the fluid surface above the outlet, with the
        fluid's own density, plus a source pressure [Pa], against a back pressure [Pa].
    ``line.solve(fluid, flow=..., head=0.0, back_pressure=0.0, pressure_limit=None)``
        the source pressure a pump must supply for a prescribed flow [m^3/s].
        Both take ``pries_correction=False`` (blood: Pries 1992 diameter correction).
    ``line.part_names`` (unique labels, "#2" appended to repeats), ``line.parts``.
    ``line.pressure_residual(fluid, flow, head=0.0, source_pressure=0.0, back_pressure=0.0)``
        one vectorized evaluation of the line's physics: losses(flow) - net drive [Pa].
    ``line.yield_pressure(fluid)`` the net drive [Pa] a yield-stress fluid needs to move.
    Every numeric input, the fluid's array properties and array part dimensions broadcast
    into one solve (no Python loop per scenario).

Result: :class:`LineResult` (frozen dataclass)
    ``.flow`` [m^3/s], ``.required_pressure`` [Pa] (source pressure above the gravity head),
    ``.net_drive`` [Pa], ``.max_reynolds`` [-], ``.regime`` ("laminar", "transitional",
    "turbulent": the worst part; an array of str for vectorized solves), per-part arrays of
    shape ``(n_parts, *scenario_shape)``: ``.part_pressure_drops`` [Pa], ``.part_reynolds``,
    ``.part_mean_velocity`` [m/s], ``.part_wall_shear_stress`` [Pa],
    ``.part_wall_shear_rate`` [1/s], ``.part_entrance_length`` [m], ``.part_shares`` [-];
    ``.exit_pressure_drop`` [Pa] (the outlet jet, a row of its own in ``.parts``);
    ``.part_regimes``, ``.part_residence_time`` [s], ``.part_hemolysis_index`` [%],
    ``.exit_share`` [-], ``.iterations`` (0 on the shared-characteristic path), ``.converged``,
    ``.scenario_shape``;
    ``.dominant_part`` (name, array of str for vectorized solves), ``.dominant_share`` [-],
    ``.max_wall_shear_stress`` [Pa], ``.hemolysis_index`` [%] (Giersiepen 1990, summed over
    parts), ``.flags`` (tuple of str, validity notes in words), ``.exceeds_pressure_limit``
    (bool or bool array), ``.parts`` (pandas DataFrame built on first access: a row per part
    plus an ``exit`` row; columns ``part``, ``kind``, ``inner_diameter [m]``, ``length [m]``,
    ``reynolds``, ``regime``, ``pressure_drop [Pa]``, ``wall_shear_stress [Pa]``,
    ``wall_shear_rate [1/s]``, ``mean_velocity [m/s]``, ``entrance_length [m]``,
    ``share [-]``; for vectorized solves a leading ``scenario`` column (flat index into the
    scenario shape) and one row per scenario and part).

Delivery, tolerance, curves
    ``delivery.falling_head_delivery_time(line, fluid, volume, head_full, head_empty,
    source_pressure=0, back_pressure=0)``, ``delivery.pressure_bag_delivery_time(line, fluid,
    volume, pressure_full, pressure_empty=None, time_constant=None, head_full=0, ...)`` ->
    ``DeliveryResult`` (``.time`` [s], ``.initial_flow``, ``.final_flow``, ``.mean_flow``,
    ``.relative_error`` [-], ``.flags``);
    ``tolerance.flow_tolerance(line, fluid, head=..., diameter_tolerance=0.05, ...,
    n_samples=10000, seed=0)`` -> ``ToleranceResult`` (``.percentiles``, ``.shares``,
    ``.dominant_input``, ``.dominant_part``, ``.samples``);
    ``curves.flow_curves(lines, fluid, over="head", values=[...])`` -> ``CurveSet``
    (``.flows`` {label: array}, ``.regimes``, ``.table``);
    ``hemolysis.giersiepen_1990_hemolysis_index(shear_stress, exposure_time)``.

Solver cost (see the benchmarks): a flow solve of N scenarios costs a few vectorized residual
evaluations (safeguarded Newton from the laminar-plus-kinetic closed form); N >= 256 drives
through one line with one fluid cost less than one, on the line's tabulated characteristic.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model import lumen as _lumen
from rheoline.model.blood import pries_1992_relative_viscosity
from rheoline.model.hemolysis import GIERSIEPEN_1990_MAX_STRESS, GIERSIEPEN_1990_TIME_RANGE
from rheoline.model.hemolysis import _index as _giersiepen_index
from rheoline.model.losses import EXIT_K, entrance_k, transition_k
from rheoline.model.parts import Fitting, Lumen, MeasuredPart, Part
from rheoline.model.validation import check_finite, check_nonnegative

__all__ = ["Line", "LineResult", "GRAVITY"]

#: Standard acceleration of gravity [m/s^2] (CGPM 1901; NIST SP 811).
GRAVITY = 9.80665

# Largest diameter of the data behind Pries 1992; the correction is relative to it.
_PRIES_REFERENCE_DIAMETER = 1.9779e-3

_TOL = 1e-11  # convergence on ln(Q)
#: Drives [Pa] and flows [m^3/s] at or below these are numerically zero: flows that small
#: would underflow double precision in the friction terms, so they give a zero result.
_MIN_DRIVE = 1e-150
_MIN_FLOW = 1e-200
#: From this many scenarios on, a line whose geometry and fluid are shared by every scenario
#: (only the drive varies) is solved on its tabulated characteristic (see
#: ``Line._solve_flow_on_curve``); fewer scenarios, or per-scenario parts or fluids, take
#: the Newton path.
_CURVE_MIN_SCENARIOS = 256
_CURVE_TOL = 1e-9  # largest interpolation error in ln(Q) accepted on the characteristic
_MAX_ITER = 60


def _check_fluid(fluid):
    """Reject what is not a Fluid (a library name, None, a rheology model) with the fix."""
    if isinstance(fluid, str):
        raise InputRangeError(
            f"fluid must be a Fluid object, got the name {fluid!r}; build it first with "
            f"rheoline.fluid({fluid!r}) (or rheoline.fluid({fluid!r}, temperature_c=...)) and "
            "pass that"
        )
    if not (hasattr(fluid, "density") and hasattr(fluid, "rheology")):
        raise InputRangeError(
            f"fluid must be a Fluid object, got {fluid!r} ({type(fluid).__name__}); build one "
            'with rheoline.fluid("water") (see rheoline.fluid_names()) or '
            "rheoline.model.fluid_base.newtonian_fluid(name, viscosity, density)"
        )


def _check_line(line, fluid, **named):
    """For functions taking a line: a Line, a Fluid, and array inputs that broadcast."""
    if not isinstance(line, Line):
        raise InputRangeError(
            f"line must be a Line, got {type(line).__name__} ({line!r}); wrap the parts, "
            "e.g. Line([Tube(...), Catheter(gauge=18)])"
        )
    return line._check_inputs(fluid, **named)


def _broadcast_named(named):
    """np.broadcast_shapes of ``{label: array}``, or an InputRangeError naming the shapes."""
    shapes = {label: np.shape(value) for label, value in named.items() if value is not None}
    try:
        return np.broadcast_shapes(*shapes.values())
    except ValueError:
        arrays = {label: shape for label, shape in shapes.items() if shape != ()}
        listed = ", ".join(f"{label} {shape}" for label, shape in arrays.items())
        raise InputRangeError(
            f"array inputs whose shapes do not broadcast together: {listed}. Give them the "
            "same shape, or shapes that broadcast (numpy rules: trailing axes equal or 1), "
            "e.g. a column of shape (n, 1) against a row of shape (m,) for an n x m grid"
        ) from None


def _shape_of(*values):
    return np.broadcast_shapes(*(np.shape(v) for v in values if v is not None))


def _fluid_shape(fluid):
    rheo = fluid.rheology
    return _shape_of(
        fluid.density,
        fluid.temperature_c,
        fluid.hematocrit,
        fluid.plasma_viscosity,
        rheo.viscosity(1.0),
    )


@dataclass(frozen=True)
class _Layout:
    """Stacked per-part arrays of a line for one fluid and scenario shape."""

    shape: tuple
    names: tuple
    kinds: tuple
    lumen_rows: np.ndarray  # indices of parts that are lumens (incl. equivalent-length fittings)
    k_rows: np.ndarray  # indices of K fittings
    measured_rows: np.ndarray  # indices of measured parts
    diameter: np.ndarray  # (n_lumen, *shape)
    length: np.ndarray
    relative_roughness: np.ndarray
    developing: np.ndarray  # (n_lumen, 1...) bool
    minor_k: np.ndarray  # (n_lumen, *shape) entrance/transition K at the lumen velocity
    viscosity_factor: np.ndarray  # (n_lumen, *shape) Pries 1992 factor (1 without it)
    k_coefficient: np.ndarray  # (n_k, *shape): dp = c Q^2 (+ k_linear Q)
    k_linear: np.ndarray  # (n_k, *shape): Hooper 1981 laminar term of a 2-K fitting
    k_velocity_area: np.ndarray  # (n_k, *shape) area [m^2] the K refers to
    measured_a: np.ndarray  # (n_measured, *shape)
    measured_b: np.ndarray
    exit_coefficient: np.ndarray  # (*shape): dp_exit = c Q^2
    density: np.ndarray  # (*shape)
    pries: bool
    # non-circular lumens (rheoline.model.shapes); exactly pi D^2/4, 16 and 1 for circles
    area: np.ndarray = None  # (n_lumen, *shape) flow area [m^2]
    laminar_f_re: np.ndarray = 16.0  # (n_lumen, *shape) Fanning f Re of laminar flow
    flow_scale: np.ndarray = 1.0  # (n_lumen, *shape) pi D_h^2 / (4 A): Q -> Q of a circle of D_h
    shaped: tuple = ()  # names of the non-circular lumens


def _lumen_geometry(part, ones, areas, f_res, scales, shaped):
    """Append a lumen's flow area, laminar f Re and circle flow scale; its area's diameter.

    A circle (any part without a ``shape``) gets exactly pi D^2 / 4, 16 and 1, so that the
    answers of circular lines do not move by a rounding.
    """
    d = part.inner_diameter * ones
    shape = getattr(part, "shape", None)
    if shape is None:
        areas.append(np.pi * d**2 / 4.0)
        f_res.append(16.0 * ones)
        scales.append(ones)
        return d
    area = shape.area * ones
    areas.append(area)
    f_res.append(shape.laminar_f_re * ones)
    scales.append(np.pi * d**2 / (4.0 * area))
    shaped.append(part.name)
    return np.sqrt(4.0 * area / np.pi)


class Line:
    """Parts in series from the source (bag, pump, reservoir) to the outlet (vein, beaker).

    Parameters
    ----------
    parts : sequence of Part
        Tubes, catheters, needles, cannulas, fittings and measured parts, upstream first.
    entrance : str
        Shape of the line's inlet, a key of :data:`rheoline.model.losses.ENTRANCE_K`
        (default "sharp-edged", K = 0.5).

    Notes
    -----
    The pressure budget, source to outlet, in total (stagnation) pressure:

    .. math::

        p_{source} + \\rho g h - p_{back} = \\sum_{lumens}\\left[f_{app}\\frac{L}{D} + K_{in}\\right]
        \\frac{\\rho \\bar u^2}{2} + \\sum_{fittings} K\\frac{\\rho \\bar u^2}{2}
        + \\sum_{measured}(aQ + bQ^2) + K_{exit}\\frac{\\rho \\bar u_{out}^2}{2}

    with :math:`f_{app}` from :func:`rheoline.model.lumen.apparent_darcy_friction` (each
    lumen's flow develops again from its own inlet), :math:`K_{in}` the entrance loss for the
    first lumen and the contraction or expansion loss from the previous lumen for the others
    (:func:`rheoline.model.losses.transition_k`), and the exit jet loss :math:`K_{exit} = 1`
    at the last lumen.  Every term rises with flow, so the residual is monotone.

    Examples
    --------
    >>> from rheoline.model.fluid_base import newtonian_fluid
    >>> from rheoline.model.parts import Catheter, Tube
    >>> water = newtonian_fluid("water", viscosity=0.955e-3, density=997.8, temperature_c=22)
    >>> line = Line([Tube(inner_diameter=3.0e-3, length=1.8), Catheter(gauge=18)])
    >>> result = line.solve(water, head=1.0)
    >>> round(result.flow * 6e7, 1), result.regime, result.dominant_part       # mL/min
    (98.5, 'laminar', '18G catheter')
    >>> back = line.solve(water, flow=result.flow)
    >>> round(back.required_pressure, 1)            # a pump must supply 1 m of water head [Pa]
    9785.1
    """

    def __init__(self, parts, entrance="sharp-edged", name=None):
        if isinstance(parts, (Part, str)) or not hasattr(parts, "__iter__"):
            kind = type(parts).__name__
            raise InputRangeError(
                f"parts must be a list of parts, upstream first; got one {kind} ({parts!r}). "
                f"Pass a list of parts, e.g. Line([part]) or Line([tube, catheter])"
            )
        parts = tuple(parts)
        if not parts:
            raise InputRangeError("Line needs at least one part; got an empty list")
        for i, part in enumerate(parts):
            if not isinstance(part, Part):
                raise InputRangeError(
                    f"part[{i}] is {part!r}, not a rheoline part; use Tube, Catheter, Needle, "
                    "Cannula, Fitting or MeasuredPart"
                )
        self.parts = parts
        self.entrance = entrance
        self.entrance_k = entrance_k(entrance)
        self.name = name or " + ".join(p.name for p in parts)
        seen = {}
        names = []
        for part in parts:
            seen[part.name] = seen.get(part.name, 0) + 1
            names.append(part.name if seen[part.name] == 1 else f"{part.name} #{seen[part.name]}")
        self.part_names = tuple(names)

    def __repr__(self):
        return f"Line({list(self.part_names)!r})"

    def _check_inputs(self, fluid, **named):
        """Check the fluid and that every array (inputs, fluid, part sizes) broadcasts."""
        _check_fluid(fluid)
        arrays = dict(named)
        for attr in ("density", "temperature_c", "hematocrit"):
            arrays[f"fluid.{attr}"] = getattr(fluid, attr, None)
        for i, part in enumerate(self.parts):
            for attr in ("inner_diameter", "length", "roughness", "k", "equivalent_length"):
                arrays[f"part[{i}] ({part.name}) {attr}"] = getattr(part, attr, None)
        return _broadcast_named(arrays)

    def __len__(self):
        return len(self.parts)

    # ------------------------------------------------------------------ layout
    def _layout(self, fluid, extra_shape=(), pries=False):
        dims = []
        for part in self.parts:
            for attr in ("inner_diameter", "length", "roughness", "k", "equivalent_length"):
                value = getattr(part, attr, None)
                if value is not None:
                    dims.append(value)
        shape = np.broadcast_shapes(
            _fluid_shape(fluid), tuple(extra_shape), *(np.shape(v) for v in dims)
        )
        ones = np.ones(shape)
        rho = fluid.density * ones
        lumen_rows, k_rows, measured_rows = [], [], []
        diameters, lengths, rough, developing = [], [], [], []
        real_lumen_diameter = {}
        areas, f_res, scales, equivalent, shaped = [], [], [], [], []
        for i, part in enumerate(self.parts):
            if isinstance(part, Lumen):
                lumen_rows.append(i)
                diameters.append(part.inner_diameter * ones)
                lengths.append(part.length * ones)
                rough.append(part.roughness / part.inner_diameter * ones)
                developing.append(True)
                # transitions, the exit and K fittings see the area: its circle's diameter
                equivalent.append(_lumen_geometry(part, ones, areas, f_res, scales, shaped))
                real_lumen_diameter[i] = equivalent[-1]
            elif isinstance(part, Fitting) and part.equivalent_length is not None:
                lumen_rows.append(i)
                diameters.append(part.inner_diameter * ones)
                lengths.append(part.equivalent_length * ones)
                rough.append(0.0 * ones)
                developing.append(False)
                equivalent.append(_lumen_geometry(part, ones, areas, f_res, scales, shaped))
            elif isinstance(part, Fitting):
                k_rows.append(i)
            elif isinstance(part, MeasuredPart):
                measured_rows.append(i)
            else:  # pragma: no cover - Part subclasses are the ones above
                raise InputRangeError(f"unknown part type {type(part).__name__}")
        n_l = len(lumen_rows)
        diameter = np.array(diameters).reshape((n_l, *shape))
        minor = np.zeros((n_l, *shape))
        previous = None
        for j, i in enumerate(lumen_rows):
            if i not in real_lumen_diameter:
                continue
            d = real_lumen_diameter[i]
            minor[j] = self.entrance_k * ones if previous is None else transition_k(previous, d)
            previous = d
        if previous is None and n_l:
            minor[0] = self.entrance_k * ones
        # K fittings refer to their own bore, else the nearest upstream lumen, else downstream
        k_coef, k_area, k_lin = [], [], []
        mu_ref = fluid.rheology.infinite_shear_viscosity
        for i in k_rows:
            part = self.parts[i]
            d = part.inner_diameter
            if d is None:
                up = [j for j in lumen_rows if j < i]
                down = [j for j in lumen_rows if j > i]
                ref = up[-1] if up else (down[0] if down else None)
                if ref is None:
                    raise InputRangeError(
                        f"fitting {part.name!r} has no inner_diameter and the line has no lumen "
                        "to refer its K to; pass Fitting(k=..., inner_diameter=...)"
                    )
                d = equivalent[lumen_rows.index(ref)]
            area = np.pi * (d * ones) ** 2 / 4.0
            k_area.append(area)
            k_coef.append(part.k * rho / (2.0 * area * area))
            # Hooper 1981: K_1/Re rho u^2/2 = K_1 mu Q / (2 D A), linear in Q
            k1 = 0.0 if part.laminar_k is None else part.laminar_k
            k_lin.append(k1 * mu_ref / (2.0 * (d * ones) * area))
        m_a, m_b = [], []
        for i in measured_rows:
            a, b = self.parts[i].scaled_coefficients(mu_ref, fluid.density)
            m_a.append(a * ones)
            m_b.append(b * ones)
        exit_rows = [j for j, i in enumerate(lumen_rows) if i in real_lumen_diameter]
        if exit_rows:
            d_out = equivalent[exit_rows[-1]]
            a_out = np.pi * d_out**2 / 4.0
            exit_c = EXIT_K * rho / (2.0 * a_out * a_out)
        else:
            exit_c = 0.0 * ones
        factor = np.ones((n_l, *shape))
        if pries:
            if not fluid.is_blood:
                raise InputRangeError(
                    f"pries_correction applies to blood; fluid {fluid.name!r} has no hematocrit. "
                    "Use a blood fluid or pries_correction=False"
                )
            h = fluid.hematocrit * ones
            ref = pries_1992_relative_viscosity(_PRIES_REFERENCE_DIAMETER, h)
            factor = (
                pries_1992_relative_viscosity(np.minimum(diameter, _PRIES_REFERENCE_DIAMETER), h)
                / ref
            )
            factor = np.broadcast_to(factor, (n_l, *shape))
        dev = np.array(developing, dtype=bool).reshape((n_l,) + (1,) * len(shape))
        return _Layout(
            shape=shape,
            names=self.part_names,
            kinds=tuple(p.kind for p in self.parts),
            lumen_rows=np.array(lumen_rows, dtype=int),
            k_rows=np.array(k_rows, dtype=int),
            measured_rows=np.array(measured_rows, dtype=int),
            diameter=diameter,
            length=np.array(lengths).reshape((n_l, *shape)),
            relative_roughness=np.array(rough).reshape((n_l, *shape)),
            developing=dev,
            minor_k=minor,
            viscosity_factor=factor,
            k_coefficient=np.array(k_coef).reshape((len(k_rows), *shape)),
            k_linear=np.array(k_lin).reshape((len(k_rows), *shape)),
            k_velocity_area=np.array(k_area).reshape((len(k_rows), *shape)),
            measured_a=np.array(m_a).reshape((len(measured_rows), *shape)),
            measured_b=np.array(m_b).reshape((len(measured_rows), *shape)),
            exit_coefficient=exit_c,
            density=rho,
            pries=bool(pries),
            area=np.array(areas).reshape((n_l, *shape)),
            laminar_f_re=np.array(f_res).reshape((n_l, *shape)) if shaped else 16.0,
            flow_scale=np.array(scales).reshape((n_l, *shape)) if shaped else 1.0,
            shaped=tuple(shaped),
        )

    # ------------------------------------------------------------------ physics
    @staticmethod
    def _newtonian_path(layout, fluid):
        return fluid.is_newtonian or layout.diameter.shape[0] == 0

    def _apparent_viscosity(self, layout, fluid, log_q, state):
        """Apparent viscosity of each lumen at ln(Q) from the Rabinowitsch state (Taylor step)."""
        if state is None:
            mu = fluid.rheology.viscosity() * layout.viscosity_factor
            return mu, 0.0, None
        radius = layout.diameter / 2.0
        q_i, tau_i, dlog_q, dlog_tau = _lumen._rabinowitsch_state(fluid.rheology, state, radius)
        dlog_tau_q = dlog_tau / dlog_q  # d ln(tau_w) / d ln(Q)
        dlog_mu = dlog_tau_q - 1.0
        log_q_i = np.log(q_i)
        mismatch = log_q + np.log(layout.flow_scale) - log_q_i
        # wall stress carried from the inner state to ln(Q) by one Taylor step, then
        # mu_app = tau_w / (4 Q / (pi R^3))
        tau = tau_i * np.exp(dlog_tau_q * mismatch)
        mu = (
            layout.viscosity_factor
            * tau
            * np.pi
            * radius**3
            / (4.0 * np.exp(log_q) * layout.flow_scale)
        )
        return mu, dlog_mu, (log_q_i, dlog_q, mismatch)

    @staticmethod
    def _losses(layout, q, mu, dlog_mu):
        """Every loss at flow ``q``: total [Pa], d(total)/d ln Q [Pa], and the pieces."""
        area = layout.area
        dp_f, slope_f, re, u = _lumen._lumen_friction(
            q,
            area,
            layout.diameter,
            layout.length,
            layout.relative_roughness,
            layout.density,
            mu,
            dlog_mu,
            layout.developing,
            layout.laminar_f_re,
        )
        dp_m = layout.minor_k * 0.5 * layout.density * u * u
        dp_lumen = dp_f + dp_m
        q2 = q * q
        k_quad = layout.k_coefficient * q2
        k_lin = layout.k_linear * q
        dp_k = k_quad + k_lin
        lin = layout.measured_a * q
        quad = layout.measured_b * q2
        dp_exit = layout.exit_coefficient * q2
        total = dp_lumen.sum(axis=0) + dp_k.sum(axis=0) + (lin + quad).sum(axis=0) + dp_exit
        lumen_slope = dp_f * slope_f + 2.0 * dp_m
        slope = (
            lumen_slope.sum(axis=0)
            + (2.0 * k_quad + k_lin).sum(axis=0)
            + (lin + 2.0 * quad).sum(axis=0)
            + 2.0 * dp_exit
        )
        return total, slope, (dp_lumen, dp_k, lin + quad, dp_exit, re, u, lumen_slope)

    def _guess(self, layout, fluid, drive):
        """Flow from the laminar-plus-kinetic closed form dp = A Q + B Q^2 (quadratic in Q).

        For a non-Newtonian fluid the viscosity in A is refined by three cheap fixed-point
        passes at each lumen's Newtonian wall shear rate 4Q/(pi R^3).
        """
        mu = fluid.rheology.infinite_shear_viscosity * layout.viscosity_factor
        q = self._quadratic_guess(layout, mu, drive)
        if not self._newtonian_path(layout, fluid):
            radius = layout.diameter / 2.0
            # a yield-stress fluid's viscosity is unbounded at vanishing shear: a pass whose
            # guess overflows or underflows keeps the previous, finite guess
            with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
                for _ in range(3):
                    rate = 4.0 * q * layout.flow_scale / (np.pi * radius**3)
                    mu = fluid.rheology.viscosity(rate) * layout.viscosity_factor
                    refined = self._quadratic_guess(layout, mu, drive)
                    q = np.where(np.isfinite(refined) & (refined > 0.0), refined, q)
        return q

    @staticmethod
    def _quadratic_guess(layout, mu, drive):
        d, length = layout.diameter, layout.length
        # 2 C mu L / (A D_h^2) with C the laminar f Re: 128 mu L / (pi D^4) for a circle
        shape_factor = layout.laminar_f_re / 16.0 * layout.flow_scale
        a = (128.0 * mu * length / (np.pi * d**4) * shape_factor).sum(axis=0)
        a = a + layout.measured_a.sum(axis=0) + layout.k_linear.sum(axis=0)
        area = layout.area
        hagenbach = np.where(layout.developing, 1.25, 0.0)
        b = ((layout.minor_k + hagenbach) * layout.density / (2.0 * area * area)).sum(axis=0)
        b = b + layout.k_coefficient.sum(axis=0) + layout.measured_b.sum(axis=0)
        b = b + layout.exit_coefficient
        return 2.0 * drive / (a + np.sqrt(a * a + 4.0 * b * drive))

    # ------------------------------------------------------------------ public
    def pressure_residual(
        self, fluid, flow, head=0.0, source_pressure=0.0, back_pressure=0.0, pries_correction=False
    ):
        """Losses at ``flow`` minus the net drive [Pa]: one vectorized pass of the line's physics.

        For a non-Newtonian fluid the wall shear rate of each lumen is first solved
        (Newton steps on the Rabinowitsch integral).  Zero at the solution of
        :meth:`solve`; rises monotonically with flow.

        Examples
        --------
        >>> from rheoline.model.fluid_base import newtonian_fluid
        >>> from rheoline.model.parts import Tube
        >>> line = Line([Tube(inner_diameter=1e-3, length=1.0)])
        >>> water = newtonian_fluid("water", 1e-3, 998.0)
        >>> bool(line.pressure_residual(water, 1e-8, source_pressure=1e4) < 0)
        True
        """
        self._check_inputs(
            fluid,
            flow=flow,
            head=head,
            source_pressure=source_pressure,
            back_pressure=back_pressure,
        )
        q = check_nonnegative("flow", flow, "m^3/s")
        drive = self._drive(fluid, head, source_pressure, back_pressure)
        layout = self._layout(
            fluid, np.broadcast_shapes(q.shape, np.shape(drive)), pries_correction
        )
        q = np.maximum(q * np.ones(layout.shape), _MIN_FLOW)
        total, _, _, _ = self._exact_losses(layout, fluid, q)
        return _lumen.scalar_or_array(total - drive)

    def _exact_losses(self, layout, fluid, q):
        if self._newtonian_path(layout, fluid):
            mu, dlog_mu, _ = self._apparent_viscosity(layout, fluid, np.log(q), None)
        else:
            radius = layout.diameter / 2.0
            y, q_i, tau_i, dlog_q, dlog_tau = _lumen._solve_log_wall_shear_rate(
                fluid.rheology, q * layout.flow_scale * np.ones_like(radius), radius
            )
            # with the target flow, so that 64/Re gives 2 L tau_w / R even where the inner
            # solve is limited by rounding (a yield-stress fluid at a vanishing flow)
            mu = layout.viscosity_factor * tau_i * np.pi * radius**3 / (4.0 * q * layout.flow_scale)
            dlog_mu = dlog_tau / dlog_q - 1.0
        self._last_dlog_mu = dlog_mu
        return self._losses(layout, q, mu, dlog_mu) + (mu,)

    @staticmethod
    def _yield_drop(layout, fluid):
        """Net drive [Pa] a yield-stress fluid needs to move, sum of 2 L tau_y / R (else 0)."""
        tau_y = getattr(fluid.rheology, "yield_stress", None)
        if tau_y is None or not layout.diameter.shape[0]:
            return np.zeros(layout.shape)
        return (
            2.0 * layout.length * tau_y * layout.viscosity_factor / (layout.diameter / 2.0)
        ).sum(axis=0)

    def yield_pressure(self, fluid, pries_correction=False):
        """Net drive [Pa] below which a yield-stress fluid does not move (0 for other fluids).

        :math:`\\sum 2 L \\tau_y / R` over the lumens (a Casson fluid's plug spans the bore).

        Examples
        --------
        >>> from rheoline.model.fluid_base import Fluid
        >>> from rheoline.model.parts import Tube
        >>> from rheoline.model.rheology import Casson
        >>> paste = Fluid("paste", temperature_c=20.0, density=1000.0, rheology=Casson(0.01, 3e-3))
        >>> Line([Tube(inner_diameter=1e-3, length=1.0)]).yield_pressure(paste)   # 4 L tau_y / D
        40.0
        """
        return _lumen.scalar_or_array(
            self._yield_drop(self._layout(fluid, (), pries_correction), fluid)
        )

    @staticmethod
    def _drive(fluid, head, source_pressure, back_pressure):
        h = check_finite("head", head)
        ps = check_finite("source_pressure", source_pressure)
        pb = check_finite("back_pressure", back_pressure)
        return ps + fluid.density * GRAVITY * h - pb

    def solve(
        self,
        fluid,
        head=0.0,
        source_pressure=None,
        back_pressure=0.0,
        *,
        flow=None,
        pressure_limit=None,
        pries_correction=False,
    ):
        """Flow at a drive, or the source pressure needed for a prescribed flow.

        Parameters
        ----------
        fluid : Fluid
            The fluid; its density and rheology may be arrays (one per scenario).
        head : float or array_like
            Height [m] of the fluid surface above the outlet (negative below it).
        source_pressure : float or array_like, optional
            Gauge pressure [Pa] applied at the source on top of gravity (pressure bag,
            pressurized reservoir); default 0.  Not with ``flow``.
        back_pressure : float or array_like
            Gauge pressure [Pa] at the outlet (venous pressure; 0 for a beaker).
        flow : float or array_like, optional
            Prescribed flow [m^3/s] (a pump); the result's ``required_pressure`` is what the
            source must supply above the gravity head.
        pressure_limit : float or array_like, optional
            Pressure [Pa] the source may not exceed (a part's rating, a pump's occlusion
            limit), compared with ``required_pressure``.
        pries_correction : bool
            For blood, scale each lumen's apparent viscosity by the Pries 1992 in-vitro law
            relative to its value at 1.978 mm (the largest tube of its data) (the Fahraeus-Lindqvist effect).

        Returns
        -------
        LineResult

        Raises
        ------
        InputRangeError
            Negative flow, non-finite inputs, both ``flow`` and ``source_pressure``, a
            ``fluid`` that is not a Fluid (a name: pass ``rheoline.fluid(name)``), arrays
            (inputs, fluid properties, part sizes) whose shapes do not broadcast.

        Notes
        -----
        Flow solve: safeguarded Newton iterations on ln(losses) - ln(drive) as a function
        of ln(Q), started from the laminar-plus-kinetic closed form, with the derivative
        computed together with the residual and a bracket kept from the residual's signs;
        for a non-Newtonian fluid each lumen's wall shear rate is iterated jointly with the
        flow.  A drive at or below the back pressure gives zero flow (no backflow model).

        Many scenarios (256 or more) through one line with one fluid, where only the drive
        or the flow varies, share a single characteristic losses(Q): it is computed exactly
        on a log grid of flows and inverted by cubic Hermite interpolation with the exact
        slopes, its error checked at the grid midpoints (below 1e-9 in ln Q, else refined,
        else the Newton path).  ``result.iterations`` is 0 on that path.
        """
        self._check_inputs(
            fluid,
            head=head,
            source_pressure=source_pressure,
            back_pressure=back_pressure,
            flow=flow,
            pressure_limit=pressure_limit,
        )
        if flow is not None:
            if source_pressure is not None:
                raise InputRangeError(
                    "give either flow (a pump: the pressure is solved) or source_pressure "
                    "(the flow is solved), not both"
                )
            return self._solve_pressure(
                fluid, flow, head, back_pressure, pressure_limit, pries_correction
            )
        return self._solve_flow(
            fluid,
            head,
            0.0 if source_pressure is None else source_pressure,
            back_pressure,
            pressure_limit,
            pries_correction,
        )

    def _solve_pressure(self, fluid, flow, head, back_pressure, pressure_limit, pries):
        q_in = check_nonnegative("flow", flow, "m^3/s")
        gravity = fluid.density * GRAVITY * check_finite("head", head)
        pb = check_finite("back_pressure", back_pressure)
        shape = np.broadcast_shapes(q_in.shape, np.shape(gravity), pb.shape)
        positive = q_in[q_in > _MIN_FLOW]
        if q_in.size >= _CURVE_MIN_SCENARIOS and positive.size:
            shared = self._layout(fluid, (), pries)
            table = None
            if shared.shape == ():
                table = self._tabulate(
                    fluid, float(positive.min()) / 1.01, float(positive.max()) * 1.01, pries
                )
            if table is not None:
                layout = self._layout(fluid, shape, pries)
                q = q_in * np.ones(shape)
                moving = q > _MIN_FLOW
                y = np.log(np.where(moving, q, float(positive.min())))
                pieces, mu, total = self._parts_on_curve(table, layout, fluid, y)
                net = np.where(moving, total, 0.0)
                return self._result(
                    layout,
                    fluid,
                    q,
                    pieces,
                    mu,
                    moving,
                    net,
                    net + pb - gravity,
                    pressure_limit,
                    head,
                    pb,
                    iterations=0,
                    converged=np.ones(shape, bool),
                )
        layout = self._layout(fluid, shape, pries)
        q = q_in * np.ones(layout.shape)
        moving = q > _MIN_FLOW
        q_safe = np.where(moving, q, 1e-100)  # any flow; the results are masked below
        total, _, pieces, mu = self._exact_losses(layout, fluid, q_safe)
        required = np.where(moving, total, 0.0) + pb - gravity
        return self._result(
            layout,
            fluid,
            q,
            pieces,
            mu,
            moving,
            required + gravity - pb,
            required,
            pressure_limit,
            head,
            pb,
            iterations=1,
            converged=np.ones(layout.shape, bool),
        )

    def _solve_flow(self, fluid, head, source_pressure, back_pressure, pressure_limit, pries):
        drive = self._drive(fluid, head, source_pressure, back_pressure)
        if np.size(drive) >= _CURVE_MIN_SCENARIOS:
            shared = self._layout(fluid, (), pries)
            if shared.shape == ():
                solved = self._solve_flow_on_curve(shared, fluid, np.asarray(drive), pries)
                if solved is not None:
                    q_out, pieces, mu, moving, total, layout = solved
                    gravity = fluid.density * GRAVITY * check_finite("head", head)
                    pb = check_finite("back_pressure", back_pressure)
                    net = np.where(moving, total, 0.0)
                    return self._result(
                        layout,
                        fluid,
                        q_out,
                        pieces,
                        mu,
                        moving,
                        net,
                        net + pb - gravity,
                        pressure_limit,
                        head,
                        pb,
                        0,
                        np.ones(layout.shape, bool),
                    )
        layout = self._layout(fluid, np.shape(drive), pries)
        drive = drive * np.ones(layout.shape)
        moving = drive > _MIN_DRIVE
        drive_pos = np.where(moving, drive, 1.0)
        x = np.log(self._guess(layout, fluid, drive_pos))
        log_drive = np.log(drive_pos)
        lo = np.full(layout.shape, -np.inf)
        hi = np.full(layout.shape, np.inf)
        state = None
        if not self._newtonian_path(layout, fluid):
            radius = layout.diameter / 2.0
            state = np.log(4.0 * layout.flow_scale / (np.pi * radius**3)) + x
            # a yield-stress fluid needs the yield pressure 2 L tau_y / R in every lumen to move
            if getattr(fluid.rheology, "yield_stress", None) is not None:
                yield_drop = self._yield_drop(layout, fluid)
                moving = (drive > yield_drop * (1.0 + 1e-9)) & (drive > _MIN_DRIVE)
                drive_pos = np.where(moving, drive, 1.0)
                log_drive = np.log(drive_pos)
                x = np.where(moving, x, 0.0)
                state = np.log(4.0 * layout.flow_scale / (np.pi * radius**3)) + x
        converged = np.zeros(layout.shape, bool)
        for iteration in range(1, _MAX_ITER + 1):  # noqa: B007 (read after the loop)
            mu, dlog_mu, inner = self._apparent_viscosity(layout, fluid, x, state)
            q = np.exp(x)
            total, slope, pieces = self._losses(layout, q, mu, dlog_mu)
            g = np.log(total) - log_drive
            g_prime = slope / total
            if inner is None:
                consistent = np.ones(layout.shape, bool)
                mismatch = 0.0
            else:
                mismatch = np.max(np.abs(inner[2]), axis=0)
                consistent = mismatch < 1e-3
            hi = np.where(consistent & (g > 0), np.minimum(hi, x), hi)
            lo = np.where(consistent & (g <= 0), np.maximum(lo, x), lo)
            x_new = x - g / g_prime
            # strictly inside the bracket, else bisect (converged scenarios are frozen below,
            # so a step that lands on a bracket end is a cycle, not convergence)
            outside = ~((x_new > lo) & (x_new < hi)) & (np.abs(x_new - x) >= _TOL)
            both = np.isfinite(lo) & np.isfinite(hi)
            fallback = np.where(
                both,
                0.5 * (np.where(both, lo, 0.0) + np.where(both, hi, 0.0)),
                np.where(np.isfinite(hi), np.minimum(x, hi) - 2.0, np.maximum(x, lo) + 2.0),
            )
            x_new = np.where(outside, fallback, x_new)
            x_new = np.clip(x_new, x - 5.0, x + 5.0)
            step = np.where(moving & ~converged, x_new - x, 0.0)
            converged = converged | ((np.abs(step) < _TOL) & (np.asarray(mismatch) < _TOL))
            if np.all(converged | ~moving):
                break
            if inner is not None:
                log_q_i, dlog_q, _ = inner
                state = np.where(
                    converged,
                    state,
                    state
                    + np.clip((x_new + np.log(layout.flow_scale) - log_q_i) / dlog_q, -5.0, 5.0),
                )
            x = np.where(moving & ~converged, x_new, x)
        q_out = np.where(moving, q, 0.0)
        gravity = fluid.density * GRAVITY * check_finite("head", head)
        pb = check_finite("back_pressure", back_pressure)
        net = np.where(moving, total, 0.0)
        return self._result(
            layout,
            fluid,
            q_out,
            pieces,
            mu,
            moving,
            net,
            net + pb - gravity,
            pressure_limit,
            head,
            pb,
            iteration,
            converged | ~moving,
        )

    def _characteristic(self, fluid, q_grid, pries):
        """The line's exact loss curve on a grid of flows (one small vectorized pass)."""
        layout = self._layout(fluid, q_grid.shape, pries)
        total, slope, pieces, mu = self._exact_losses(layout, fluid, q_grid)
        return total, slope, pieces, mu, self._last_dlog_mu

    def _solve_flow_on_curve(self, shared, fluid, drive, pries):
        """Flow for many drives through one line whose geometry and fluid are shared.

        Every scenario then lies on the same characteristic, losses(Q).  It is computed
        exactly on a log-spaced grid of flows and inverted by cubic Hermite interpolation
        in (ln losses, ln Q) with the exact slopes; each part's drop and apparent viscosity
        are interpolated the same way.  The interpolation error is checked at the grid
        midpoints against exact evaluations (below 1e-9 in ln Q, else the grid is refined
        or the Newton path is used).  Returns None to fall back to the Newton path.
        """
        threshold = max(_MIN_DRIVE, float(self._yield_drop(shared, fluid)) * (1.0 + 1e-9))
        moving = drive > threshold
        if not np.any(moving):
            return None
        d_lo, d_hi = float(np.min(drive[moving])), float(np.max(drive[moving]))
        q_lo = float(self._guess(shared, fluid, np.asarray(d_lo))) / 4.0
        q_hi = float(self._guess(shared, fluid, np.asarray(d_hi))) * 4.0
        for _ in range(12):  # widen until the curve spans every drive
            ends = self._characteristic(fluid, np.array([q_lo, q_hi]), pries)[0]
            if ends[0] < d_lo and ends[1] > d_hi:
                break
            q_lo = q_lo / 8.0 if ends[0] >= d_lo else q_lo
            q_hi = q_hi * 8.0 if ends[1] <= d_hi else q_hi
        else:
            return None
        table = self._tabulate(fluid, q_lo, q_hi, pries)
        if table is None:
            return None
        log_q, log_t, dydx = table[0], table[1], table[2]
        y = _hermite(log_t, log_q, dydx, np.log(np.where(moving, drive, d_lo)))
        layout = self._layout(fluid, drive.shape, pries)
        pieces_out, mu_out, total_out = self._parts_on_curve(table, layout, fluid, y)
        return np.where(moving, np.exp(y), 0.0), pieces_out, mu_out, moving, total_out, layout

    def _tabulate(self, fluid, q_lo, q_hi, pries):
        """The characteristic on a log grid from q_lo to q_hi, checked at the midpoints."""
        span = np.log(q_hi / q_lo)
        n_grid = int(np.clip(np.ceil(span / 0.004), 64, 20000)) + 1
        for _ in range(4):
            log_q = np.linspace(np.log(q_lo), np.log(q_hi), n_grid)
            total, slope, pieces, mu, dlog_mu = self._characteristic(fluid, np.exp(log_q), pries)
            log_t = np.log(total)
            dydx = total / slope  # d ln Q / d ln losses
            log_mid = 0.5 * (log_q[1:] + log_q[:-1])
            log_mid_total = np.log(self._characteristic(fluid, np.exp(log_mid), pries)[0])
            if np.all(np.diff(log_t) > 0):
                err_q = np.abs(_hermite(log_t, log_q, dydx, log_mid_total) - log_mid)
                forward = _hermite_apply(
                    _hermite_basis(log_q, log_mid, uniform=True), log_t, 1.0 / dydx
                )
                err_t = np.abs(forward - log_mid_total)
                if max(np.max(err_q), np.max(err_t)) < _CURVE_TOL:
                    return log_q, log_t, dydx, pieces, mu, dlog_mu
            n_grid = 2 * n_grid - 1
        return None

    def _parts_on_curve(self, table, layout, fluid, y):
        """Per-part drops and apparent viscosities at ln(Q) = y from the tabulated curve."""
        log_q, _, _, pieces, mu, dlog_mu = table
        q = np.exp(y)
        dp_lumen_grid, lumen_slope_grid = pieces[0], pieces[6]
        n_l = dp_lumen_grid.shape[0]
        dp_lumen = np.empty((n_l, *np.shape(y)))
        mu_out = np.empty((n_l, *np.shape(y)))
        mu_grid = mu * np.ones_like(dp_lumen_grid)
        dlog_mu_grid = dlog_mu * np.ones_like(dp_lumen_grid)
        basis = _hermite_basis(log_q, y, uniform=True)
        for j in range(n_l):
            dp_lumen[j] = np.exp(
                _hermite_apply(
                    basis, np.log(dp_lumen_grid[j]), lumen_slope_grid[j] / dp_lumen_grid[j]
                )
            )
            if self._newtonian_path(layout, fluid):
                mu_out[j] = mu_grid[j, 0]
            else:
                mu_out[j] = np.exp(_hermite_apply(basis, np.log(mu_grid[j]), dlog_mu_grid[j]))
        area = layout.area
        u = q / area
        re = layout.density * u * layout.diameter / mu_out
        q2 = q * q
        dp_k = layout.k_coefficient * q2 + layout.k_linear * q
        dp_meas = layout.measured_a * q + layout.measured_b * q2
        dp_exit = layout.exit_coefficient * q2
        total_out = dp_lumen.sum(axis=0) + dp_k.sum(axis=0) + dp_meas.sum(axis=0) + dp_exit
        return (dp_lumen, dp_k, dp_meas, dp_exit, re, u), mu_out, total_out

    def _result(
        self,
        layout,
        fluid,
        q,
        pieces,
        mu,
        moving,
        net,
        required,
        pressure_limit,
        head,
        back_pressure,
        iterations,
        converged,
    ):
        dp_lumen, dp_k, dp_meas, dp_exit, re, u = pieces[:6]
        n = len(self.parts)
        shape = layout.shape
        drops = np.zeros((n, *shape))
        reynolds = np.full((n, *shape), np.nan)
        velocity = np.full((n, *shape), np.nan)
        drops[layout.lumen_rows] = dp_lumen
        drops[layout.k_rows] = dp_k
        drops[layout.measured_rows] = dp_meas
        reynolds[layout.lumen_rows] = re
        velocity[layout.lumen_rows] = u
        if len(layout.k_rows):
            velocity[layout.k_rows] = q / layout.k_velocity_area
        drops = np.where(moving, drops, 0.0)
        reynolds = np.where(moving, reynolds, np.where(np.isnan(reynolds), np.nan, 0.0))
        velocity = np.where(moving, velocity, np.where(np.isnan(velocity), np.nan, 0.0))
        exceeds = np.zeros(shape, bool)
        if pressure_limit is not None:
            limit = check_finite("pressure_limit", pressure_limit)
            exceeds = np.asarray(required > limit)
        return LineResult(
            flow=_lumen.scalar_or_array(q),
            required_pressure=_lumen.scalar_or_array(required),
            net_drive=_lumen.scalar_or_array(net),
            part_pressure_drops=drops,
            exit_pressure_drop=_lumen.scalar_or_array(np.where(moving, dp_exit, 0.0)),
            part_reynolds=reynolds,
            part_mean_velocity=velocity,
            exceeds_pressure_limit=bool(exceeds) if exceeds.ndim == 0 else exceeds,
            iterations=int(iterations),
            converged=bool(np.all(converged)),
            part_names=layout.names,
            part_kinds=layout.kinds,
            line=self,
            fluid=fluid,
            _layout=layout,
            _viscosity=mu * np.ones_like(layout.diameter),
            _moving=moving,
            _pressure_limit=pressure_limit,
        )


def _first_shape(values):
    return np.shape(values)[1:]


@dataclass(frozen=True)
class LineResult:
    """The answer of :meth:`Line.solve`; fields carry SI units.

    Scalars come back as Python floats (and str/bool); vectorized solves give arrays of the
    scenario shape, and per-part arrays have shape ``(n_parts, *scenario_shape)`` (NaN
    where a quantity does not apply, e.g. the Reynolds number of a measured part).

    Attributes
    ----------
    flow : float or ndarray
        [m^3/s].
    required_pressure : float or ndarray
        Source pressure [Pa] above the gravity head that this flow needs
        (losses + back pressure - rho g h).
    net_drive : float or ndarray
        Sum of all losses [Pa] (equals source pressure + rho g h - back pressure).
    part_pressure_drops : ndarray
        [Pa] per part; a lumen's row includes its entrance, contraction or expansion loss.
    exit_pressure_drop : float or ndarray
        [Pa] the outlet jet (K = 1 at the last lumen); ``part_pressure_drops.sum(0) +
        exit_pressure_drop == net_drive``.
    part_reynolds, part_mean_velocity : ndarray
        [-], [m/s].
    exceeds_pressure_limit : bool or ndarray
    iterations : int
        Newton iterations used (1 for a prescribed flow; 0 when the scenarios were solved on
        the line's shared, tabulated characteristic).
    converged : bool
    """

    flow: float | np.ndarray
    required_pressure: float | np.ndarray
    net_drive: float | np.ndarray
    part_pressure_drops: np.ndarray
    exit_pressure_drop: float | np.ndarray
    part_reynolds: np.ndarray
    part_mean_velocity: np.ndarray
    exceeds_pressure_limit: bool | np.ndarray
    iterations: int
    converged: bool
    part_names: tuple
    part_kinds: tuple
    line: object = field(repr=False)
    fluid: object = field(repr=False)
    _layout: object = field(repr=False)
    _viscosity: np.ndarray = field(repr=False)
    _moving: np.ndarray = field(repr=False)
    _pressure_limit: object = field(repr=False, default=None)

    @property
    def scenario_shape(self):
        """Shape of the scenario arrays (() for a single scenario)."""
        return _first_shape(self.part_pressure_drops)

    def _per_lumen(self, compute):
        """A per-part array: ``compute(rows)`` on the lumen rows, NaN for fittings and measured parts."""
        out = np.full(self.part_pressure_drops.shape, np.nan)
        rows = self._layout.lumen_rows
        if len(rows):
            out[rows] = compute(rows)
        return out

    @cached_property
    def part_wall_shear_stress(self):
        """Wall shear stress [Pa] of each lumen, f_fd rho u^2 / 8 (fully developed friction)."""

        def stress(rows):
            re = np.maximum(self.part_reynolds[rows], 1e-300)
            u = self.part_mean_velocity[rows]
            f_re, _ = _lumen._friction_re_and_slope(
                re, 1.0, self._layout.relative_roughness, False, self._layout.laminar_f_re
            )
            # f rho u^2 / 8 = (f Re) mu u / (8 D)
            tau = f_re * self._viscosity * u / (8.0 * self._layout.diameter)
            return np.where(self._moving, tau, 0.0)

        return self._per_lumen(stress)

    @cached_property
    def part_wall_shear_rate(self):
        """Wall shear rate [1/s] of each lumen, from the wall stress through the rheology."""

        def rate(rows):
            tau = self.part_wall_shear_stress[rows]
            if self.fluid.is_newtonian:
                return tau / self._viscosity
            return self.fluid.rheology.shear_rate_at_stress(tau / self._layout.viscosity_factor)

        return self._per_lumen(rate)

    @cached_property
    def part_entrance_length(self):
        """Hydrodynamic entrance length [m] of each lumen at its Reynolds number."""
        return self._per_lumen(
            lambda rows: _lumen.entrance_length(self.part_reynolds[rows], self._layout.diameter)
        )

    @cached_property
    def part_shares(self):
        """Each part's share [-] of the net drive (the exit jet holds the rest)."""
        net = np.asarray(self.net_drive, dtype=float)
        return np.where(net > 0, self.part_pressure_drops / np.where(net > 0, net, 1.0), 0.0)

    @cached_property
    def exit_share(self):
        """Share [-] of the net drive spent on the outlet jet."""
        net = np.asarray(self.net_drive, dtype=float)
        return _lumen.scalar_or_array(
            np.where(net > 0, self.exit_pressure_drop / np.where(net > 0, net, 1.0), 0.0)
        )

    @cached_property
    def part_regimes(self):
        """Regime name of each part (``"n/a"`` for fittings and measured parts)."""
        re = self.part_reynolds
        names = np.where(np.isnan(re), "n/a", _lumen.regime_of(np.nan_to_num(re)))
        return np.asarray(names)

    @cached_property
    def max_reynolds(self):
        """Largest Reynolds number [-] over the lumens."""
        re = np.nan_to_num(self.part_reynolds, nan=0.0)
        return _lumen.scalar_or_array(re.max(axis=0))

    @cached_property
    def regime(self):
        """Regime of the worst part: "laminar", "transitional" or "turbulent"."""
        return _lumen.regime_of(self.max_reynolds)

    @cached_property
    def _dominant_index(self):
        return np.argmax(self.part_pressure_drops, axis=0)

    @cached_property
    def dominant_part(self):
        """Name of the part with the largest pressure drop (str, or array of str)."""
        names = np.asarray(self.part_names)[self._dominant_index]
        return str(names) if names.ndim == 0 else names

    @cached_property
    def dominant_share(self):
        """Share [-] of the net drive taken by the dominant part."""
        idx = np.expand_dims(self._dominant_index, 0)
        return _lumen.scalar_or_array(np.take_along_axis(self.part_shares, idx, 0)[0])

    @cached_property
    def max_wall_shear_stress(self):
        """Largest lumen wall shear stress [Pa]."""
        return _lumen.scalar_or_array(np.nan_to_num(self.part_wall_shear_stress).max(axis=0))

    @cached_property
    def part_residence_time(self):
        """Mean residence time [s] of each lumen, L / u."""

        def residence(rows):
            u = self.part_mean_velocity[rows]
            return np.where(u > 0, self._layout.length / np.where(u > 0, u, 1.0), np.inf)

        return self._per_lumen(residence)

    @cached_property
    def part_hemolysis_index(self):
        """Giersiepen 1990 index [%] of each lumen at its wall stress and residence time."""

        def index(rows):
            tau = self.part_wall_shear_stress[rows]
            t = self.part_residence_time[rows]
            return np.where(tau > 0, _giersiepen_index(tau, np.where(tau > 0, t, 0.0)), 0.0)

        return self._per_lumen(index)

    @cached_property
    def hemolysis_index(self):
        """Hemolysis concern indicator [%]: Giersiepen 1990 summed over the lumens.

        A comparative indicator for blood (see :mod:`rheoline.model.hemolysis` for its
        limits); computed for any fluid.
        """
        return _lumen.scalar_or_array(np.nansum(self.part_hemolysis_index, axis=0))

    @cached_property
    def flags(self):
        """Validity notes in words (tuple of str); counts are over the scenarios."""
        return tuple(_flags(self))

    @cached_property
    def parts(self):
        """A pandas DataFrame, a row per part plus an ``exit`` row (a scenario column if vectorized)."""
        import pandas as pd

        shape = self.scenario_shape
        n_s = int(np.prod(shape)) if shape else 1
        names = list(self.part_names) + ["exit"]
        kinds = list(self.part_kinds) + ["exit"]
        n = len(names)

        def rows(per_part, exit_value):
            arr = np.concatenate(
                [
                    per_part.reshape(len(self.part_names), n_s),
                    np.broadcast_to(np.asarray(exit_value, dtype=float), shape).reshape(1, n_s),
                ],
                axis=0,
            )
            return arr.T.ravel()

        diam = self._per_lumen(lambda _rows: self._layout.diameter)
        length = self._per_lumen(lambda _rows: self._layout.length)
        regimes = np.concatenate(
            [self.part_regimes.reshape(len(self.part_names), n_s), np.full((1, n_s), "n/a")], axis=0
        ).T.ravel()
        table = {
            "part": np.tile(names, n_s),
            "kind": np.tile(kinds, n_s),
            "inner_diameter [m]": rows(diam, np.nan),
            "length [m]": rows(length, np.nan),
            "reynolds": rows(self.part_reynolds, np.nan),
            "regime": regimes,
            "pressure_drop [Pa]": rows(self.part_pressure_drops, self.exit_pressure_drop),
            "wall_shear_stress [Pa]": rows(self.part_wall_shear_stress, np.nan),
            "wall_shear_rate [1/s]": rows(self.part_wall_shear_rate, np.nan),
            "mean_velocity [m/s]": rows(self.part_mean_velocity, np.nan),
            "entrance_length [m]": rows(self.part_entrance_length, np.nan),
            "share [-]": rows(self.part_shares, self.exit_share),
        }
        frame = pd.DataFrame(table)
        if shape:
            frame.insert(0, "scenario", np.repeat(np.arange(n_s), n))
        return frame


def _count(mask, total):
    k = int(np.count_nonzero(mask))
    return "" if total == 1 else f" in {k} of {total} scenarios"


def _flags(result):
    """Validity notes for a result (see :attr:`LineResult.flags`)."""
    out = []
    moving = np.asarray(result._moving)
    total = moving.size
    re = result.part_reynolds
    rows = result._layout.lumen_rows
    for j, i in enumerate(rows):
        name = result.part_names[i]
        r = np.nan_to_num(re[i])
        turb = moving & (r >= _lumen.TURBULENT_LIMIT_REYNOLDS)
        trans = moving & (r >= _lumen.LAMINAR_LIMIT_REYNOLDS) & ~turb
        if np.any(turb):
            out.append(
                f"{name}: turbulent flow (Re up to {r.max():.0f}){_count(turb, total)}; "
                "Churchill 1977 friction used"
            )
        if np.any(trans):
            out.append(
                f"{name}: transitional flow (Re 2300-4000){_count(trans, total)}; "
                "friction is uncertain there (Churchill 1977 interpolation)"
            )
        developing = np.asarray(result._layout.developing[j]).all()
        if developing:
            short = (
                moving
                & (r < _lumen.LAMINAR_LIMIT_REYNOLDS)
                & (result.part_entrance_length[i] > result._layout.length[j])
            )
            if np.any(short):
                out.append(
                    f"{name}: developing laminar flow (shorter than its entrance length)"
                    f"{_count(short, total)}; Shah 1978 apparent friction used"
                )
    for name, part in zip(result.part_names, result.line.parts, strict=True):
        if part.source_note:
            out.append(f"{name}: {part.source_note}")
    out.extend(_shape_flags(result))
    if not result.fluid.is_newtonian:
        out.append(
            "non-Newtonian fluid: laminar drops from the Rabinowitsch-Mooney integral of "
            f"the {result.fluid.rheology.name} model; transitional and turbulent friction "
            "use the Metzner-Reed Reynolds number (approximate)"
        )
    elif result.fluid.is_blood:
        out.append("blood treated as Newtonian (high-shear viscosity); shear thinning ignored")
    if result._layout.pries:
        out.append("Pries 1992 in-vitro diameter correction applied to the apparent viscosity")
    stopped = ~moving
    if np.any(stopped):
        out.append(
            f"no forward flow: the drive does not exceed the back pressure (or a "
            f"yield-stress fluid's yield pressure){_count(stopped, total)}"
        )
    if np.any(result.exceeds_pressure_limit):
        out.append(f"pressure limit exceeded{_count(result.exceeds_pressure_limit, total)}")
    if result.fluid.is_blood:
        tau = np.nan_to_num(result.part_wall_shear_stress)
        t = np.nan_to_num(result.part_residence_time, posinf=0.0)
        outside = (tau > GIERSIEPEN_1990_MAX_STRESS) | (
            (tau > 0) & ((t < GIERSIEPEN_1990_TIME_RANGE[0]) | (t > GIERSIEPEN_1990_TIME_RANGE[1]))
        )
        if np.any(outside):
            out.append(
                "hemolysis index outside the Giersiepen 1990 fitted range "
                "(stress above 255 Pa or exposure outside 7-700 ms) in some part"
            )
    if not result.converged:
        out.append(
            "solver did not reach full convergence in some scenarios (result is the "
            "last bracketed iterate)"
        )
    return out


def _shape_flags(result):
    """Notes on the non-circular lumens of a result (see :mod:`rheoline.model.shapes`)."""
    out = []
    for name, part in zip(result.part_names, result.line.parts, strict=True):
        shape = getattr(part, "shape", None)
        if shape is None:
            continue
        out.append(
            f"{name}: non-circular lumen ({shape.description}): laminar friction of its shape "
            "(Shah & London 1978) on its hydraulic diameter; turbulent friction and developing "
            "flow use the circle's correlations at that diameter (approximate)"
        )
        if not result.fluid.is_newtonian:
            out.append(
                f"{name}: non-Newtonian flow in a non-circular lumen uses the apparent "
                "viscosity of a circle of its hydraulic diameter at the same mean velocity "
                "(approximate)"
            )
    return out


def _locate(x_grid, x):
    """Index k with x_grid[k] <= x < x_grid[k+1] (clipped), for an increasing grid.

    Buckets no wider than the smallest grid step hold at most one grid point, so a table
    lookup plus one comparison replaces a binary search per value.
    """
    step = float(np.min(np.diff(x_grid)))
    span = float(x_grid[-1] - x_grid[0])
    n_buckets = int(np.ceil(span / step)) + 1 if step > 0 else 0
    if not 0 < n_buckets <= 16 * x_grid.size:
        return np.clip(np.searchsorted(x_grid, x, side="right") - 1, 0, x_grid.size - 2)
    width = span / (n_buckets - 1) if n_buckets > 1 else 1.0
    starts = x_grid[0] + width * np.arange(n_buckets)
    table = np.clip(np.searchsorted(x_grid, starts, side="right") - 1, 0, x_grid.size - 2)
    b = np.clip(((x - x_grid[0]) / width).astype(np.intp), 0, n_buckets - 1)
    k = table[b]
    k = k + (x >= x_grid[np.minimum(k + 1, x_grid.size - 1)])
    return np.clip(k, 0, x_grid.size - 2)


def _hermite_basis(x_grid, x, uniform=False):
    """Interval index and the four cubic Hermite basis values (times the interval width)."""
    if uniform:
        h0 = x_grid[1] - x_grid[0]
        k = np.clip(((x - x_grid[0]) / h0).astype(np.intp), 0, x_grid.size - 2)
    else:
        k = _locate(x_grid, x)
    x0 = x_grid[k]
    h = x_grid[k + 1] - x0
    s = (x - x0) / h
    s2 = s * s
    s3 = s2 * s
    b01 = 3.0 * s2 - 2.0 * s3
    return k, (1.0 - b01, (s3 - 2.0 * s2 + s) * h, b01, (s3 - s2) * h)


def _hermite_apply(basis, y_grid, slope_grid):
    k, (b00, b10, b01, b11) = basis
    return b00 * y_grid[k] + b10 * slope_grid[k] + b01 * y_grid[k + 1] + b11 * slope_grid[k + 1]


def _hermite(x_grid, y_grid, slope_grid, x):
    """Cubic Hermite interpolation of y(x) on an increasing grid with slopes dy/dx."""
    return _hermite_apply(_hermite_basis(x_grid, x), y_grid, slope_grid)
