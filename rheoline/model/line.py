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
    ``line.pressure_residual(fluid, flow, head=0.0, source_pressure=0.0, back_pressure=0.0)``
        one vectorized evaluation of the line's physics: losses(flow) - net drive [Pa].
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
    ``delivery.falling_head_delivery_time(line, fluid, volume, head_full, head_empty, ...)``,
    ``delivery.pressure_bag_delivery_time(...)``; ``tolerance.flow_tolerance(...)``;
    ``curves.flow_curves(lines, fluid, over=..., values=...)``;
    ``hemolysis.giersiepen_1990_hemolysis_index(shear_stress, exposure_time)``.
"""
