"""The comparison's numbers: each candidate's curve, tolerance band and operating point.

A candidate's fluid and line come from its description through the scenario layer's builder
(:mod:`rheoline.widgets.scenario_models`); every flow comes from :meth:`rheoline.Line.solve`.
The chart shows flow against a swept quantity:

* ``"head"`` -- the gravity head [cm] (with the candidate's source pressure on top),
* ``"bore"`` -- the inner diameter [mm] of the candidate's sized part (its last catheter,
  needle or cannula; else its last tube), swept over a range given in percent of its
  nominal bore,
* ``"temperature"`` -- the fluid temperature [degC].

A candidate whose description gives a tolerance of its sized part's bore (relative, or
absolute turned relative at the nominal bore) or a temperature tolerance (half-widths) gets
a shaded p5-p95 band from a seeded Monte Carlo of :data:`BAND_SAMPLES` uniform samples,
solved by the line engine in one vectorized call: at every curve point for a bore tolerance
alone (where the flows' order statistics are the flows at the bore's order statistics, see
:meth:`CandidateSolver.percentiles`), else at :data:`BAND_POINTS` points.

Every curve, band and operating point is cached under the description it depends on (the
swept input left out), so a change recomputes only what it changed.
"""

from __future__ import annotations

import numpy as np

from rheoline.widgets.edits import with_fields
from rheoline.widgets.parts_editor import sized_part_index
from rheoline.widgets.scenario_models import (
    drive_of,
    fluid_at,
    line_with_bores,
    model_of,
    point_of,
)

__all__ = ["CandidateSolver", "SWEEPS", "BAND_SAMPLES", "BAND_POINTS", "BAND_SEED"]

#: Sweep choices: name -> (axis title, default range, SI factor of the shown unit).
SWEEPS = {
    "head": ("head [cm]", (10.0, 200.0), 1e-2),
    "bore": ("inner diameter of the sized part [mm]", (70.0, 120.0), 1e-2),
    "temperature": ("temperature [degC]", (4.0, 40.0), 1.0),
}
#: Monte Carlo samples of a tolerance band.
BAND_SAMPLES = 2000
#: Sweep points the band is solved at when every sample is solved.
BAND_POINTS = 9
#: Seed of the band's random numbers (the same inputs give the same band).
BAND_SEED = 20261201
#: Most cached results before the cache starts again.
_CACHE_LIMIT = 400


class CandidateSolver:
    """Curves, bands and operating points of candidate descriptions, cached.

    ``solved`` lists the name of the scenario of every line-engine call made for a curve,
    a band or an operating point (what was recomputed, in order).
    """

    def __init__(self):
        self._cache: dict = {}
        self.solved: list = []

    def clear(self):
        """Forget every cached result."""
        self._cache.clear()

    def _cached(self, key, compute):
        if key not in self._cache:
            if len(self._cache) > _CACHE_LIMIT:
                self._cache.clear()
            self._cache[key] = compute()
        return self._cache[key]

    # -- model objects -----------------------------------------------------------------
    def model(self, description):
        """The builder's one-point group and model objects of a candidate description."""
        return self._cached(("model", description), lambda: _model(description))

    def tolerances(self, description):
        """``(bore fraction, temperature half-width [K])`` of the description's band: its
        sized part's bore tolerance as a fraction of the nominal bore, and its
        temperature tolerance (0 for none)."""
        tolerance = description.tolerance
        temperature = float(tolerance.get("temperature", 0.0)) if tolerance else 0.0
        try:
            index = sized_part_index(description.parts)
        except ValueError:
            return 0.0, temperature
        width = description.parts[index].tolerance.get("inner_diameter")
        if width is None:
            return 0.0, temperature
        nominal = float(np.ravel(self.model(description)[1].parts[index].inner_diameter)[0])
        return float(width.fraction_of(nominal)), temperature

    # -- the line engine ---------------------------------------------------------------
    def _solve(self, description, sweep, values, bore_scale=None, temperature=None):
        """Flow [m^3/s] over ``values`` of ``sweep`` (SI); ``bore_scale`` multiplies the
        sized part's bore and ``temperature`` [degC] replaces the candidate's: arrays of
        tolerance samples that broadcast with ``values``."""
        self.solved.append(description.name)
        point, built = self.model(description)
        line = built.line
        if sweep == "bore" or bore_scale is not None:
            index = sized_part_index(description.parts)
            bore = built.parts[index].inner_diameter
            bore = bore * values if sweep == "bore" else bore
            bore = bore * bore_scale if bore_scale is not None else bore
            line = line_with_bores(point, index, bore)
        own = point.values["temperature"]
        fluid = built.fluid
        if sweep == "temperature":
            shift = 0.0 if temperature is None else temperature - own
            fluid = fluid_at(point, values + shift)
        elif temperature is not None:
            fluid = fluid_at(point, temperature)
        drive = drive_of(point)
        if sweep == "head":
            drive["head"] = values
        return line.solve(fluid, **drive)

    def x(self, description, sweep, values):
        """The chart's x: the sweep values, or the sized part's bores [mm] for "bore"."""
        if sweep != "bore":
            return values
        index = sized_part_index(description.parts)
        nominal = self.model(description)[1].parts[index].inner_diameter
        return nominal * 1e3 * values * SWEEPS["bore"][2]

    def curve(self, description, sweep, values):
        """(x in the shown unit, flow [m^3/s]) over ``values`` (shown unit), cached."""
        key = ("curve", _without_swept(description, sweep), sweep, _grid(values))
        return self._cached(
            key,
            lambda: (
                self.x(description, sweep, values),
                np.asarray(
                    self._solve(description, sweep, values * SWEEPS[sweep][2]).flow, dtype=float
                ),
            ),
        )

    def samples(self, description):
        """The seeded tolerance samples: bore scale [-] and temperature [degC], or None."""
        bore, temperature_tolerance = self.tolerances(description)
        u = np.random.default_rng(BAND_SEED).uniform(-1.0, 1.0, size=(2, BAND_SAMPLES, 1))
        scale = 1.0 + bore * u[0] if bore else None
        own = self.model(description)[0].values["temperature"]
        temperature = own + temperature_tolerance * u[1] if temperature_tolerance else None
        return scale, temperature

    def percentiles(self, description, sweep, values):
        """p5 and p95 of the flow [m^3/s] over the tolerance samples at each of ``values``.

        Percentiles are order statistics (``method="inverted_cdf"``).  With the bore as the
        only spread input, flow rises strictly with the bore (a property of the line engine,
        tested there), so the flows' order statistics are the flows at the bore samples'
        order statistics: two solves per point give exactly what solving all
        :data:`BAND_SAMPLES` samples gives (``tests/test_widgets.py`` checks the two agree).
        With a temperature spread too, every sample is solved.
        """
        scale, temperature = self.samples(description)
        if temperature is None:
            scale = np.percentile(scale, [5.0, 95.0], axis=0, method="inverted_cdf")
        result = self._solve(
            description,
            sweep,
            values * SWEEPS[sweep][2],
            bore_scale=scale,
            temperature=temperature,
        )
        flows = np.asarray(result.flow, dtype=float)
        if temperature is None:
            return flows[0], flows[1]
        p5, p95 = np.percentile(flows, [5.0, 95.0], axis=0, method="inverted_cdf")
        return p5, p95

    def band(self, description, sweep, values, coarse_values):
        """(x, p5, p95 flow [m^3/s]) of the tolerance band, or None without a tolerance,
        cached: over ``values`` for a bore tolerance alone, else over ``coarse_values``."""
        bore, temperature = self.tolerances(description)
        if bore == 0 and temperature == 0:
            return None
        grid = values if temperature == 0 else coarse_values
        key = ("band", _without_swept(description, sweep), sweep, _grid(grid))

        def compute():
            p5, p95 = self.percentiles(description, sweep, grid)
            return self.x(description, sweep, grid), p5, p95

        return self._cached(key, compute)

    def operating_point(self, description):
        """The line engine's result at the description's own inputs, cached."""

        def compute():
            self.solved.append(description.name)
            point, built = self.model(description)
            return built.line.solve(built.fluid, **drive_of(point))

        return self._cached(("point", description), compute)

    def point_band(self, description):
        """(p5, p95) flow [m^3/s] at the operating point, or None without a tolerance."""
        if self.tolerances(description) == (0.0, 0.0):
            return None

        def compute():
            head = drive_of(self.model(description)[0])["head"]
            p5, p95 = self.percentiles(description, "head", np.asarray([head / SWEEPS["head"][2]]))
            return float(p5[0]), float(p95[0])

        return self._cached(("point-band", description), compute)


def _model(description):
    point = point_of(description)
    return point, model_of(point)


def _grid(values):
    return (float(values[0]), float(values[-1]), len(values))


def _without_swept(description, sweep):
    """The description without the input a sweep replaces (the cache key of a curve)."""
    if sweep == "head":
        return with_fields(description, head=None)
    if sweep == "temperature":
        return with_fields(description, temperature=None)
    return description
