"""Strategies and helpers shared by the model-layer property tests.

Used by tests/test_rel_properties_model.py (laws, trends, invariants, round trips),
tests/test_rel_properties_inputs.py (finite answers, invalid input) and
tests/test_rel_properties_vessels.py (vessels, delivery, fitted parts, user rheologies).
Each property counts the examples it ran with ``_count`` (tests/rel_record.py); each of
those modules has its own recorder, so the counts reach ``reliability_figures.json``.
"""

from __future__ import annotations

import math

import numpy as np
from hypothesis import assume
from hypothesis import strategies as st
from rel_record import bump

from rheoline.model.line import Line
from rheoline.model.parts import Catheter, Fitting, MeasuredPart, Needle, Tube

MMHG = 133.322387415  # NIST SP 811


def _count(name):
    bump(f"prop:{name}")
    bump("prop:examples_total")


# --------------------------------------------------------------------------- strategies
def _log_uniform(low, high):
    return st.floats(math.log10(low), math.log10(high)).map(lambda x: 10.0**x)


bores = _log_uniform(1e-4, 1e-2)  # 0.1 mm to 10 mm
lengths = _log_uniform(1e-3, 10.0)  # 1 mm to 10 m
heads = st.floats(0.01, 3.0)  # m
source_pressures = st.floats(0.0, 2000 * MMHG)  # Pa
viscosities = _log_uniform(5e-4, 0.5)  # Pa s
densities = st.floats(800.0, 1300.0)  # kg/m^3
water_temperatures = st.floats(0.0, 45.0)
fluid_temperatures = st.floats(0.0, 42.0)  # inside every simple fluid's range
blood_temperatures = st.floats(0.0, 42.0)  # the blood models' validated span
hematocrits = st.floats(0.0, 0.8)
simple_fluids = st.sampled_from(
    ["water", "saline-0.9", "dextrose-5", "lactated-ringers", "plasma", "albumin-5", "albumin-20"]
)


def _blood_models():
    from rheoline.model.blood import BLOOD_RHEOLOGY_MODELS

    return st.sampled_from(sorted(BLOOD_RHEOLOGY_MODELS))


def _catalogue_gauges():
    from rheoline.model.catalogue import CATHETER_GAUGES, NEEDLE_GAUGES

    return st.sampled_from(sorted(CATHETER_GAUGES)), st.sampled_from(sorted(NEEDLE_GAUGES))


catheter_gauges, needle_gauges = _catalogue_gauges()


@st.composite
def lines(draw, max_parts=4):
    """A line of 1..max_parts parts: lumens, K fittings and measured parts, at least one lumen."""
    n = draw(st.integers(1, max_parts))
    parts = []
    for i in range(n):
        kind = draw(
            st.sampled_from(["tube", "catheter", "needle", "fitting", "measured"])
            if i
            else st.sampled_from(["tube", "catheter", "needle"])
        )
        if kind == "fitting":
            parts.append(Fitting(k=draw(st.floats(0.05, 20.0))))
        elif kind == "measured":
            q1 = draw(_log_uniform(1e-8, 1e-4))
            a = draw(_log_uniform(1e6, 1e10))  # Pa s/m^3
            parts.append(MeasuredPart(flows=[q1, 2 * q1], pressure_drops=[a * q1, 2.2 * a * q1]))
        elif kind == "catheter":
            parts.append(Catheter(gauge=draw(catheter_gauges)))
        elif kind == "needle":
            parts.append(
                Needle(gauge=draw(needle_gauges), wall=draw(st.sampled_from(["regular", "thin"])))
            )
        else:
            parts.append(Tube(inner_diameter=draw(bores), length=draw(lengths)))
    return Line(parts)


def _assume_not_transitional(*results):
    """Skip cases with a lumen in the laminar-turbulent transition (Re 2300-4000).

    There, Churchill 1977 friction rises with Reynolds number, so a thinner fluid can flow
    less (the effect Hagen saw in 1839, common practice, no source): trends in viscosity,
    temperature and hematocrit hold only within one regime.
    """
    regimes = set()
    for r in results:
        regimes.update(np.ravel(r.part_regimes).tolist())
    regimes.discard("n/a")
    assume("transitional" not in regimes and len(regimes) <= 1)


def _finite(*arrays):
    return all(np.all(np.isfinite(np.asarray(a, dtype=float))) for a in arrays)


def _lumen_rows(result):
    return [i for i, kind in enumerate(result.part_kinds) if kind == "lumen"]
