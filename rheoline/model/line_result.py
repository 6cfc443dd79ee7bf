"""The answer of a line solve as data: :class:`LineResult`.

Fields and properties carry SI units; per-part arrays have shape ``(n_parts,
*scenario_shape)``.  What the result says about its own validity is data too:

* ``conditions``: one boolean array of the scenario shape per key of
  :data:`rheoline.model.conditions.CONDITIONS` (turbulent, over the pressure limit, a
  correlation outside its range, ...);
* ``part_conditions``: the per-part ones, shape ``(n_parts, *scenario_shape)``;
* ``models_used``: the provenance keys (:mod:`rheoline.model.provenance`) of every model
  the answer rests on, the fluid's first, in first-use order.

``flags`` renders sentences from those arrays for Python users; other layers render their
own words from the arrays and never parse the sentences.

Examples
--------
>>> import numpy as np
>>> from rheoline.model.fluids import fluid
>>> from rheoline.model.line import Line
>>> from rheoline.model.parts import Catheter, Tube
>>> line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=14, length=0.03)])
>>> r = line.solve(fluid("saline-0.9"), head=np.array([0.5, 3.0]))
>>> r.conditions["turbulent"].tolist(), r.part_conditions["turbulent"][1].tolist()
([False, True], [False, True])
>>> r.models_used
('laliberte-2007', 'iapws-2008', 'laliberte-cooper-2004', 'kell-1975', 'hagen-poiseuille', 'shah-1978', 'churchill-1977', 'crane-tp410', 'typical-catalogue')
>>> float(r.hemolysis_index[0])         # saline has no red cells
nan
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from rheoline.model import lumen as _lumen
from rheoline.model.conditions import (
    CONDITIONS,
    IMPLAUSIBLE_PRESSURE,
    IMPLAUSIBLE_VELOCITY,
)
from rheoline.model.friction import TRANSITION_ZONE_REYNOLDS
from rheoline.model.hemolysis import (
    GIERSIEPEN_1990_MAX_STRESS,
    GIERSIEPEN_1990_TIME_RANGE,
    HEMOLYSIS_CONCERN_STRESS,
)
from rheoline.model.hemolysis import _index as _giersiepen_index
from rheoline.model.line_flags import result_flags
from rheoline.model.provenance import merge_models
from rheoline.model.validation import check_finite

__all__ = ["LineResult", "make_result"]


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
        Every scenario converged (``conditions["not_converged"]`` says which did not).
    part_names, part_kinds : tuple of str
    line, fluid
        What was solved.
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
    _layout_source: object = field(repr=False)
    _viscosity: np.ndarray = field(repr=False)
    _moving: np.ndarray = field(repr=False)
    _pressure_limit: object = field(repr=False, default=None)
    _converged_mask: np.ndarray | None = field(repr=False, default=None)

    @cached_property
    def _layout(self):
        """The line's layout for this result (built on first use after a blocked solve:
        whole, so its memory grows with the scenarios, some 500 MB per million scenarios of
        a two-lumen line)."""
        source = self._layout_source
        return source() if callable(source) else source

    @property
    def scenario_shape(self):
        """Shape of the scenario arrays (() for a single scenario)."""
        return np.shape(self.part_pressure_drops)[1:]

    def _per_lumen(self, compute):
        """A per-part array: ``compute(rows)`` on the lumen rows, NaN for fittings and measured parts."""
        out = np.full(self.part_pressure_drops.shape, np.nan)
        rows = self._layout.lumen_rows
        if len(rows):
            out[rows] = compute(rows)
        return out

    # ------------------------------------------------------------------ per part
    def _wall_stress(self, developing):
        """Length-averaged wall stress [Pa] of each lumen with the apparent friction
        (``developing`` as the layout's) or the fully developed one (``False``)."""
        layout = self._layout

        def stress(rows):
            re = np.maximum(self.part_reynolds[rows], 1e-300)
            u = self.part_mean_velocity[rows]
            f_re, _ = _lumen._friction_re_and_slope(
                re,
                layout.length / layout.diameter,
                layout.relative_roughness,
                developing,
                layout.laminar_f_re,
            )
            # f rho u^2 / 8 = (f Re) mu u / (8 D): the force balance dp_f A = tau P L
            tau = f_re * self._viscosity * u / (8.0 * layout.diameter)
            return np.where(self._moving, tau, 0.0)

        return self._per_lumen(stress)

    @cached_property
    def part_wall_shear_stress(self):
        r"""Length-averaged wall shear stress [Pa] of each lumen, from the friction the line used.

        .. math:: \bar\tau_w = \frac{\Delta p_f\,D_h}{4 L} = f_{app}\frac{\rho\bar u^2}{8}

        the force balance :math:`\Delta p_f A = \bar\tau_w P L` on the lumen's frictional
        drop (without its entrance or transition K), with the apparent Darcy friction the
        solve used: Shah 1978 in developing laminar flow, Churchill 1977 beyond.  Shah's
        :math:`f_{app}` also holds the momentum change of the developing profile, so in
        short lumens this is an upper estimate of the mean wall stress (conservative for
        the hemolysis index, which is based on it); in long lumens it tends to the fully
        developed value (:attr:`part_developed_wall_shear_stress`).
        """
        return self._wall_stress(self._layout.developing)

    @cached_property
    def part_developed_wall_shear_stress(self):
        """Wall shear stress [Pa] of fully developed flow at each lumen's Reynolds number,
        f_fd rho u^2 / 8 (the value far from any inlet)."""
        return self._wall_stress(False)

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
    def part_residence_time(self):
        """Mean residence time [s] of each lumen, L / u."""

        def residence(rows):
            u = self.part_mean_velocity[rows]
            return np.where(u > 0, self._layout.length / np.where(u > 0, u, 1.0), np.inf)

        return self._per_lumen(residence)

    @cached_property
    def part_hemolysis_index(self):
        """Giersiepen 1990 index [%] of each lumen at its wall stress and residence time.

        NaN for a fluid without red cells (``fluid.is_blood`` False), and for fittings and
        measured parts.
        """
        if not self.fluid.is_blood:
            return np.full(self.part_pressure_drops.shape, np.nan)

        def index(rows):
            tau = self.part_wall_shear_stress[rows]
            t = self.part_residence_time[rows]
            return np.where(tau > 0, _giersiepen_index(tau, np.where(tau > 0, t, 0.0)), 0.0)

        return self._per_lumen(index)

    # ------------------------------------------------------------------ per scenario
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
    def hemolysis_index(self):
        """Hemolysis concern indicator [%]: Giersiepen 1990 summed over the lumens.

        A comparative indicator for blood (see :mod:`rheoline.model.hemolysis` for its
        limits); NaN for a fluid without red cells.
        """
        if not self.fluid.is_blood:
            return _lumen.scalar_or_array(np.full(self.scenario_shape, np.nan))
        return _lumen.scalar_or_array(np.nansum(self.part_hemolysis_index, axis=0))

    # ------------------------------------------------------------------ conditions as data
    @cached_property
    def part_conditions(self):
        """Per-part conditions: {key: bool array (n_parts, *scenario_shape)}.

        Keys: the per-part entries of :data:`rheoline.model.conditions.CONDITIONS`
        (``turbulent``, ``transitional``, ``transition_zone``, ``developing``, ``outside_range``,
        ``catalogue_size``, ``hemolysis_extrapolated``).
        """
        shape = self.part_pressure_drops.shape
        moving = np.asarray(self._moving)
        re = np.nan_to_num(self.part_reynolds)
        turbulent = moving & (re >= _lumen.TURBULENT_LIMIT_REYNOLDS)
        out = {
            "turbulent": turbulent,
            "transitional": moving & (re >= _lumen.LAMINAR_LIMIT_REYNOLDS) & ~turbulent,
            "transition_zone": moving & (re >= TRANSITION_ZONE_REYNOLDS) & ~turbulent,
            "developing": self._developing(moving, re),
            "outside_range": np.broadcast_to(self._layout.part_outside_range, shape),
            "catalogue_size": np.broadcast_to(
                self._layout.part_catalogue.reshape((-1,) + (1,) * len(self.scenario_shape)),
                shape,
            ),
            "hemolysis_extrapolated": self._hemolysis_outside(),
            "measured_extrapolated": self._measured_outside(moving),
        }
        return {key: out[key] for key in CONDITIONS if key in out}

    def _measured_outside(self, moving):
        """Measured parts carrying a flow outside the span of their bench flows."""
        out = np.zeros(self.part_pressure_drops.shape, dtype=bool)
        q = np.asarray(self.flow, dtype=float)
        for i, part in enumerate(self.line.parts):
            if getattr(part, "kind", None) == "measured":
                low, high = float(np.min(part.flows)), float(np.max(part.flows))
                out[i] = moving & ((q < low * (1 - 1e-9)) | (q > high * (1 + 1e-9)))
        return out

    def _developing(self, moving, re):
        """Laminar real lumens shorter than their entrance length (Shah 1978 applies)."""
        out = np.zeros(self.part_pressure_drops.shape, dtype=bool)
        for j, i in enumerate(self._layout.lumen_rows):
            if np.asarray(self._layout.developing[j]).all():
                out[i] = (
                    moving
                    & (re[i] < _lumen.LAMINAR_LIMIT_REYNOLDS)
                    & (self.part_entrance_length[i] > self._layout.length[j])
                )
        return out

    def _hemolysis_outside(self):
        """Blood: wall stress above, or exposure outside, the Giersiepen 1990 fitted range."""
        if not self.fluid.is_blood:
            return np.zeros(self.part_pressure_drops.shape, dtype=bool)
        tau = np.nan_to_num(self.part_wall_shear_stress)
        t = np.nan_to_num(self.part_residence_time, posinf=0.0)
        low, high = GIERSIEPEN_1990_TIME_RANGE
        return (tau > GIERSIEPEN_1990_MAX_STRESS) | ((tau > 0) & ((t < low) | (t > high)))

    @cached_property
    def conditions(self):
        """Conditions per scenario: {key: bool array of the scenario shape}.

        One array per key of :data:`rheoline.model.conditions.CONDITIONS`; a per-part
        condition holds where any part has it (``outside_range`` also where the fluid's
        property models were used outside their range, ``fluid.outside_range``).
        """
        shape = self.scenario_shape
        moving = np.broadcast_to(np.asarray(self._moving), shape)
        fluid = self.fluid
        full = np.ones(shape, dtype=bool)
        out = {key: np.any(value, axis=0) for key, value in self.part_conditions.items()}
        fluid_outside = np.broadcast_to(np.asarray(getattr(fluid, "outside_range", False)), shape)
        out["outside_range"] = out["outside_range"] | fluid_outside
        is_blood = bool(fluid.is_blood)
        out["hemolysis_concern"] = is_blood & (
            np.asarray(self.max_wall_shear_stress) > HEMOLYSIS_CONCERN_STRESS
        )
        out["non_newtonian"] = full & (not fluid.is_newtonian)
        out["blood_as_newtonian"] = full & (fluid.is_newtonian and is_blood)
        out["no_forward_flow"] = ~moving
        out["over_pressure_limit"] = np.broadcast_to(np.asarray(self.exceeds_pressure_limit), shape)
        out["implausible"] = self._implausible(shape)
        converged = True if self._converged_mask is None else self._converged_mask
        out["not_converged"] = ~np.broadcast_to(np.asarray(converged, dtype=bool), shape)
        return {key: np.asarray(out[key], dtype=bool) for key in CONDITIONS}

    def _implausible(self, shape):
        """Beyond physical plausibility (:data:`~rheoline.model.conditions.IMPLAUSIBLE_VELOCITY`,
        :data:`~rheoline.model.conditions.IMPLAUSIBLE_PRESSURE`)."""
        u = np.nan_to_num(np.abs(self.part_mean_velocity), posinf=np.inf)
        fast = np.any(u > IMPLAUSIBLE_VELOCITY, axis=0) if u.size else np.zeros(shape, bool)
        high = np.asarray(self.required_pressure, dtype=float) > IMPLAUSIBLE_PRESSURE
        return np.broadcast_to(fast | high | ~np.isfinite(self.required_pressure), shape)

    @cached_property
    def models_used(self):
        """Provenance keys of every model this answer rests on, in first-use order.

        The fluid's models, then the line's: Hagen-Poiseuille for lumens, Shah 1978 for
        lumens whose flow develops, Churchill 1977 only where a lumen leaves laminar flow,
        Rabinowitsch-Mooney (and Metzner-Reed beyond laminar flow) only for a
        non-Newtonian fluid, Crane TP-410 and Borda-Carnot minor losses, Hooper 1981 only
        for two-K fittings, Pries 1992 where the diameter correction was applied
        (:attr:`pries_correction`; a blood fluid's own high-shear viscosity also rests on
        it), catalogue sizes where used, and Giersiepen 1990 and the concern threshold only
        for a fluid with red cells.
        """
        layout = self._layout
        lumens = layout.diameter.shape[0] > 0
        moving = np.broadcast_to(np.asarray(self._moving), self.scenario_shape)
        re = np.nan_to_num(self.part_reynolds)
        beyond = bool(np.any(moving & (re >= _lumen.LAMINAR_LIMIT_REYNOLDS)))
        newtonian = self.fluid.is_newtonian
        keys = [
            ("hagen-poiseuille", lumens),
            ("shah-1978", lumens and bool(np.any(layout.developing))),
            ("churchill-1977", beyond),
            ("rabinowitsch-mooney", lumens and not newtonian),
            ("metzner-reed-1955", beyond and not newtonian),
        ]
        blood = [("giersiepen-1990", self.fluid.is_blood), ("leverett-1972", self.fluid.is_blood)]
        return merge_models(
            getattr(self.fluid, "models_used", ()),
            (key for key, used in keys if used),
            layout.models_used,
            (key for key, used in blood if used),
        )

    @property
    def pries_correction(self) -> bool:
        """True when the Pries 1992 diameter correction was applied to the lumens."""
        return bool(self._layout.pries)

    @cached_property
    def flags(self):
        """Validity notes in words (tuple of str), rendered from :attr:`conditions`."""
        return tuple(result_flags(self))

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


# ---------------------------------------------------------------------------- assembly
def make_result(line, fluid, solved, pressure_limit) -> LineResult:
    """A :class:`LineResult` from a solve (:class:`rheoline.model.line_solvers.Solved`)."""
    required = solved.required
    exceeds = np.zeros(np.shape(required), bool)
    if pressure_limit is not None:
        limit = check_finite("pressure_limit", pressure_limit)
        exceeds = np.asarray(required > limit)
    return LineResult(
        flow=_lumen.scalar_or_array(solved.flow),
        required_pressure=_lumen.scalar_or_array(required),
        net_drive=_lumen.scalar_or_array(solved.net),
        part_pressure_drops=solved.drops,
        exit_pressure_drop=_lumen.scalar_or_array(solved.exit_drop),
        part_reynolds=solved.reynolds,
        part_mean_velocity=solved.velocity,
        exceeds_pressure_limit=bool(exceeds) if exceeds.ndim == 0 else exceeds,
        iterations=int(solved.iterations),
        converged=bool(np.all(solved.converged)),
        part_names=line.part_names,
        part_kinds=tuple(p.kind for p in line.parts),
        line=line,
        fluid=fluid,
        _layout_source=solved.layout,
        _viscosity=solved.viscosity,
        _moving=solved.moving,
        _pressure_limit=pressure_limit,
        _converged_mask=np.asarray(solved.converged, dtype=bool),
    )
