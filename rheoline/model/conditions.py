"""The conditions a result reports, as data: one key each, with its severity and words.

A solved line (:class:`rheoline.model.line.LineResult`) holds one boolean array per
condition in ``conditions`` (the scenario shape) and, for the per-part ones, in
``part_conditions`` (shape ``(n_parts, *scenario_shape)``).  The keys are those of
:data:`CONDITIONS`; the sentences of ``LineResult.flags`` are rendered from the arrays,
and every other layer renders its own words from the same arrays (nothing parses a
sentence).

Severities: ``"caution"`` (an assumption is strained; the number is still the model's
answer), ``"limit"`` (a constraint the user set is broken) and ``"fault"`` (the number
itself is not assured).

Examples
--------
>>> CONDITIONS["turbulent"].words
'turbulent flow'
>>> [c.key for c in CONDITIONS.values() if c.per_part]
['turbulent', 'transitional', 'transition_zone', 'developing', 'outside_range', \
'catalogue_size', 'hemolysis_extrapolated', 'measured_extrapolated']
>>> count_words(np.array([True, False, True]))
' in 2 of 3 scenarios'
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = [
    "Condition",
    "CONDITIONS",
    "SEVERITIES",
    "count_words",
    "IMPLAUSIBLE_VELOCITY",
    "IMPLAUSIBLE_PRESSURE",
]

#: Severities, mildest first.
SEVERITIES = ("caution", "limit", "fault")


@dataclass(frozen=True)
class Condition:
    """One reported condition.

    Attributes
    ----------
    key : str
        The key of the boolean arrays in ``LineResult.conditions`` / ``part_conditions``.
    severity : str
        One of :data:`SEVERITIES`.
    words : str
        A few words for it, for tables and flags ("turbulent flow").
    meaning : str
        One sentence: when the array is True.
    per_part : bool
        Also reported per part (``part_conditions``); the scenario array is then the
        "any part" of the per-part one.
    """

    key: str
    severity: str
    words: str
    meaning: str
    per_part: bool = False


_LIST = (
    Condition(
        "turbulent",
        "caution",
        "turbulent flow",
        "a lumen's Reynolds number is 4000 or more (Churchill 1977 friction decides the loss)",
        per_part=True,
    ),
    Condition(
        "transitional",
        "caution",
        "transitional flow",
        "a lumen's Reynolds number is 2300-4000, where friction is uncertain",
        per_part=True,
    ),
    Condition(
        "transition_zone",
        "caution",
        "near the laminar-turbulent transition",
        "a lumen's Reynolds number is 1800-4000 (rheoline.model.friction."
        "TRANSITION_ZONE_REYNOLDS up to the turbulent limit): the friction there depends on "
        "inlet disturbances, so a warmer or thinner fluid can flow less, not more",
        per_part=True,
    ),
    Condition(
        "developing",
        "caution",
        "developing laminar flow",
        "a laminar lumen is shorter than its entrance length (Shah 1978 apparent friction)",
        per_part=True,
    ),
    Condition(
        "outside_range",
        "caution",
        "outside a correlation's range",
        "a correlation was used outside its registry range (the fluid's property models, or a "
        "part's correlation such as Pries 1992)",
        per_part=True,
    ),
    Condition(
        "catalogue_size",
        "caution",
        "catalogue size",
        "a part's bore or length is a typical catalogue value (from memory), not a measured one",
        per_part=True,
    ),
    Condition(
        "hemolysis_extrapolated",
        "caution",
        "hemolysis index extrapolated",
        "a blood case's wall stress is above 255 Pa or its exposure outside 7-700 ms, the fitted "
        "range of Giersiepen 1990",
        per_part=True,
    ),
    Condition(
        "measured_extrapolated",
        "caution",
        "measured part extrapolated",
        "a measured part carries a flow outside the span of its bench flows (its fitted "
        "a Q + b Q^2 is extrapolated there)",
        per_part=True,
    ),
    Condition(
        "hemolysis_concern",
        "caution",
        "hemolysis concern",
        "a blood case's largest wall shear stress exceeds the screening threshold "
        "(rheoline.model.hemolysis.HEMOLYSIS_CONCERN_STRESS)",
    ),
    Condition(
        "non_newtonian",
        "caution",
        "non-Newtonian fluid",
        "the fluid's rheology is not Newtonian (Rabinowitsch-Mooney laminar drops, "
        "Metzner-Reed beyond)",
    ),
    Condition(
        "blood_as_newtonian",
        "caution",
        "blood treated as Newtonian",
        "a blood fluid with a Newtonian (high-shear) rheology: shear thinning ignored",
    ),
    Condition(
        "no_forward_flow",
        "limit",
        "no forward flow",
        "the drive does not exceed the back pressure (or a yield-stress fluid's yield pressure)",
    ),
    Condition(
        "over_pressure_limit",
        "limit",
        "over pressure limit",
        "the required source pressure exceeds the pressure limit given",
    ),
    Condition(
        "implausible",
        "fault",
        "physically implausible",
        "a lumen's mean velocity exceeds IMPLAUSIBLE_VELOCITY (a tenth of the speed of sound "
        "in water) or the source pressure exceeds IMPLAUSIBLE_PRESSURE (beyond any part's "
        "rating): the line cannot carry this flow; the numbers are the model's extrapolation",
    ),
    Condition(
        "not_converged",
        "fault",
        "solver not converged",
        "the flow solve stopped before full convergence (the result is the last bracketed iterate)",
    ),
)

#: The mean velocity [m/s] above which a result is flagged ``implausible``: a tenth of the
#: speed of sound in water, 1482 m/s at 20 degC (Del Grosso & Mader 1972, J. Acoust. Soc.
#: Am. 52:1442; rounded down to 148).  Beyond it the liquid's compressibility is no longer
#: negligible, and no infusion or access device runs near it (common practice, no source).
IMPLAUSIBLE_VELOCITY = 148.0
#: The source pressure [Pa] above which a result is flagged ``implausible``: 10 MPa
#: (75,000 mmHg, 1,450 psi), above the rating of any part of an infusion or access line
#: (injector-rated sets and catheters are rated to a few MPa; from memory).
IMPLAUSIBLE_PRESSURE = 10.0e6

#: Every condition by key; results, flags, tables and views read this one dict.
CONDITIONS = {c.key: c for c in _LIST}


def count_words(mask) -> str:
    """``" in k of n scenarios"`` for a mask over several scenarios, ``""`` for one.

    Examples
    --------
    >>> count_words(True)
    ''
    """
    mask = np.asarray(mask)
    if mask.size == 1:
        return ""
    return f" in {int(np.count_nonzero(mask))} of {mask.size} scenarios"
