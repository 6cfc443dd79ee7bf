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
    ``line.pressure_drop(fluid, flow, *, with_slope=False, pries_correction=False)``
        total losses [Pa] source to outlet at a flow (and d losses / dQ [Pa s/m^3]),
        vectorized; what a branched network needs of each branch.
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
    parts; NaN for a fluid without red cells), ``.conditions`` ({key: bool array}, keys of
    :data:`rheoline.model.conditions.CONDITIONS`), ``.part_conditions`` (per part),
    ``.models_used`` (provenance keys), ``.flags`` (tuple of str, rendered from the
    conditions), ``.exceeds_pressure_limit``
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

Where the code lives: this module holds :class:`Line` (the public face);
:mod:`rheoline.model.line_layout` lays a line out for a fluid (per-part arrays),
:mod:`rheoline.model.line_losses` holds the losses at a flow,
:mod:`rheoline.model.line_solvers` the solvers (in blocks of scenarios,
:mod:`rheoline.model.line_blocks`), :mod:`rheoline.model.line_newton` the Newton path,
:mod:`rheoline.model.line_characteristic` the shared characteristic,
:mod:`rheoline.model.rheology_table` the tabulated Rabinowitsch-Mooney relation of a shared
non-Newtonian fluid, and :mod:`rheoline.model.line_result` the result, its conditions and
flags.

Solver cost (see the benchmarks): a flow solve of N scenarios costs about three vectorized
residual passes (safeguarded Newton from the laminar-plus-kinetic closed form, the last
step taken to first order); many drives through one line with one fluid cost less than one,
on the line's tabulated characteristic, where its grid costs less than the Newton passes.
Scenarios are solved in blocks of some 8,000 lumen-scenarios: the working memory of a solve
stays a few megabytes for any number of scenarios, on top of its answers.  Not yet in blocks:
a large result's per-part properties beyond the drops, Reynolds numbers and velocities
(``conditions``, ``part_conditions``, ``flags``, ``models_used``, wall stresses, hemolysis)
lay the whole line out again on first use (measured: some 500 MB per million scenarios of a
two-lumen line), so a sweep of many millions of scenarios that needs them is best solved
in parts.
"""

from __future__ import annotations

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model import line_solvers as _solvers
from rheoline.model import lumen as _lumen
from rheoline.model.line_layout import build_layout
from rheoline.model.line_result import LineResult, make_result
from rheoline.model.losses import entrance_k
from rheoline.model.parts import Fitting, Part
from rheoline.model.validation import as_float_array, check_finite, check_nonnegative

__all__ = ["Line", "LineResult", "GRAVITY"]

#: Standard acceleration of gravity [m/s^2] (CGPM 1901; NIST SP 811).
GRAVITY = 9.80665


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


def _drive_of(fluid, head, source_pressure, back_pressure, flow=None):
    """The checked drive of a solve (:class:`rheoline.model.line_solvers.Drive`)."""
    return _solvers.Drive(
        check_finite("head", head),
        check_finite("source_pressure", source_pressure),
        check_finite("back_pressure", back_pressure),
        fluid.density,
        GRAVITY,
        None if flow is None else check_nonnegative("flow", flow, "m^3/s"),
    )


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


def _check_something_resists(parts):
    """Refuse a line of loss-free fittings only: it would carry an unbounded flow.

    Only a line made of fittings given by ``k`` can resist nothing; it is refused where
    the sum of its coefficients is zero in any scenario (a swept ``k`` that reaches 0).
    """
    if not all(isinstance(part, Fitting) and part.k is not None for part in parts):
        return
    total = sum(
        np.asarray(part.k, dtype=float)
        + (0.0 if part.laminar_k is None else np.asarray(part.laminar_k, dtype=float))
        for part in parts
    )
    if np.any(total == 0):
        raise InputRangeError(
            "parts: no part of this line resists flow (every part is a fitting with k = 0 "
            "and no laminar_k), so any drive gives an unbounded flow; add the lumen the "
            "fluid runs through (a tube, catheter, needle or set) or give a fitting k > 0",
            field="parts",
        )


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
        _check_something_resists(parts)
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

    def _layout(self, fluid, extra_shape=(), pries=False):
        """The line laid out for ``fluid`` (:func:`rheoline.model.line_layout.build_layout`)."""
        return build_layout(self, fluid, extra_shape, pries)

    @staticmethod
    def _exact_losses(layout, fluid, q):
        """(losses [Pa], d losses / d ln Q [Pa], pieces, apparent viscosity) on a prepared
        layout (:func:`rheoline.model.line_solvers.exact_losses`); :meth:`pressure_drop` is
        the public form."""
        return _solvers.exact_losses(layout, fluid, q)[:4]

    def pressure_drop(self, fluid, flow, *, with_slope=False, pries_correction=False):
        r"""Total losses [Pa] from the source to the outlet at a flow, and their slope.

        The sum of every part's drop and the exit jet at ``flow``: the net drive (source
        pressure + rho g h - back pressure) that :meth:`solve` would need for this flow.
        It is what a branched network needs of each branch (a monotone function of its
        flow and its derivative), and the inverse of :meth:`solve`'s flow answer.

        Parameters
        ----------
        fluid : Fluid
            The fluid; its properties may be arrays (one per scenario).
        flow : float or array_like
            Flow [m^3/s], >= 0; broadcasts with the fluid's and the parts' arrays.
        with_slope : bool
            Also return d(losses)/dQ [Pa s/m^3] at ``flow`` (exact, not a finite
            difference; for a non-Newtonian fluid it includes the change of each lumen's
            apparent viscosity with the flow).
        pries_correction : bool
            As in :meth:`solve` (blood only).

        Returns
        -------
        losses : float or ndarray
            [Pa]; 0 at zero flow, except for a yield-stress fluid, whose losses tend to its
            yield pressure (:meth:`yield_pressure`).
        slope : float or ndarray
            Only with ``with_slope``: d(losses)/dQ [Pa s/m^3] (at zero flow, the limit as
            the flow tends to 0).

        Raises
        ------
        InputRangeError
            A negative or non-finite flow, a ``fluid`` that is not a Fluid, arrays that do
            not broadcast.

        Notes
        -----
        .. math:: \Delta p_{line}(Q) = \sum_{parts} \Delta p_i(Q) + K_{exit}\,
                  \frac{\rho \bar u_{out}^2}{2}

        with each term as in :class:`Line`.  Vectorized: one pass of the line's physics for
        every scenario.

        Examples
        --------
        >>> from rheoline.model.fluid_base import newtonian_fluid
        >>> from rheoline.model.parts import Catheter, Tube
        >>> water = newtonian_fluid("water", viscosity=0.955e-3, density=997.8)
        >>> line = Line([Tube(inner_diameter=3.0e-3, length=1.8), Catheter(gauge=18)])
        >>> q = line.solve(water, head=1.0).flow
        >>> round(line.pressure_drop(water, q) / (997.8 * GRAVITY * 1.0), 9)   # = rho g h
        1.0
        >>> dp, slope = line.pressure_drop(water, [1e-6, 2e-6], with_slope=True)
        >>> bool(np.all(slope > dp / np.array([1e-6, 2e-6])))  # rises faster than linearly
        True
        """
        self._check_inputs(fluid, flow=flow)
        q_in = check_nonnegative("flow", flow, "m^3/s")
        drive = _solvers.Drive(0.0, 0.0, 0.0, fluid.density, GRAVITY, q_in)
        total, slope = _solvers.losses_at(self, fluid, drive, pries_correction)
        if not with_slope:
            return _lumen.scalar_or_array(total)
        return _lumen.scalar_or_array(total), _lumen.scalar_or_array(slope)

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
        drive = _drive_of(fluid, head, source_pressure, back_pressure, flow)
        total = _solvers.losses_at(self, fluid, drive, pries_correction, residual=True)[0]
        return _lumen.scalar_or_array(total)

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
            _solvers.yield_drop(build_layout(self, fluid, (), pries_correction), fluid)
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
        initial_flow=None,
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
        initial_flow : float or array_like, optional
            A warm start for the flow solve [m^3/s]: where a view or a sweep solves near an
            earlier answer, that answer (broadcasting to the scenarios; entries that are
            not positive are ignored).  It changes how many iterations the solve takes,
            not its answer.  Not with ``flow``.

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
            initial_flow=initial_flow,
        )
        if flow is not None:
            if initial_flow is not None:
                raise InputRangeError(
                    "initial_flow is a warm start for a flow solve; a prescribed flow "
                    "(a pump) needs none: drop initial_flow",
                    field="initial_flow",
                    value=initial_flow,
                )
            if source_pressure is not None:
                raise InputRangeError(
                    "give either flow (a pump: the pressure is solved) or source_pressure "
                    "(the flow is solved), not both",
                    field="source_pressure",
                    value=source_pressure,
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
            initial_flow,
        )

    def _solve_pressure(self, fluid, flow, head, back_pressure, pressure_limit, pries):
        drive = _drive_of(fluid, head, 0.0, back_pressure, flow)
        solved = _solvers.solve_for_pressure(self, fluid, drive, pries)
        return make_result(self, fluid, solved, pressure_limit)

    def _solve_flow(
        self, fluid, head, source_pressure, back_pressure, pressure_limit, pries, start=None
    ):
        drive = _drive_of(fluid, head, source_pressure, back_pressure)
        if start is not None:
            start = as_float_array("initial_flow", start)
        solved = _solvers.solve_for_flow(self, fluid, drive, pries, start)
        return make_result(self, fluid, solved, pressure_limit)
