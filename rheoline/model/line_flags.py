"""The sentences of a line result's flags, rendered from its condition arrays.

:attr:`rheoline.model.line_result.LineResult.flags` calls :func:`result_flags`: one
sentence per condition that holds in any scenario (per part: turbulent, transitional,
near transition, developing; then the shapes' and the fluid's), each with the count of
scenarios it holds in. Sentences are made here only; nothing reads them back.
"""

from __future__ import annotations

import numpy as np

from rheoline.model import lumen as _lumen
from rheoline.model.conditions import (
    count_words,
)
from rheoline.model.friction import TRANSITION_ZONE_REYNOLDS

__all__ = ["result_flags"]


def _part_flags(result, name, i):
    """The regime and developing-flow sentences of part ``i``."""
    pc = result.part_conditions
    r = np.nan_to_num(result.part_reynolds[i])
    out = []
    if np.any(pc["turbulent"][i]):
        out.append(
            f"{name}: turbulent flow (Re up to {r.max():.0f}){count_words(pc['turbulent'][i])}; "
            "Churchill 1977 friction used"
        )
    if np.any(pc["transitional"][i]):
        out.append(
            f"{name}: transitional flow (Re 2300-4000){count_words(pc['transitional'][i])}; "
            "friction is uncertain there (Churchill 1977 interpolation)"
        )
    near = pc["transition_zone"][i] & ~pc["transitional"][i]
    if np.any(near):
        out.append(
            f"{name}: laminar but near the transition (Re {TRANSITION_ZONE_REYNOLDS:.0f}-"
            f"{_lumen.LAMINAR_LIMIT_REYNOLDS:.0f}){count_words(near)}; friction is uncertain "
            "there, and a warmer or thinner fluid can flow less"
        )
    if np.any(pc["developing"][i]):
        out.append(
            f"{name}: developing laminar flow (shorter than its entrance length)"
            f"{count_words(pc['developing'][i])}; Shah 1978 apparent friction used"
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


def _fluid_flags(result):
    c = result.conditions
    if np.any(c["non_newtonian"]):
        return [
            "non-Newtonian fluid: laminar drops from the Rabinowitsch-Mooney integral of "
            f"the {result.fluid.rheology.name} model; transitional and turbulent friction "
            "use the Metzner-Reed Reynolds number (approximate)"
        ]
    if np.any(c["blood_as_newtonian"]):
        return ["blood treated as Newtonian (high-shear viscosity); shear thinning ignored"]
    return []


def result_flags(result):
    """Validity notes for a result (see :attr:`LineResult.flags`), from its conditions."""
    c = result.conditions
    out = []
    for i in result._layout.lumen_rows:
        out += _part_flags(result, result.part_names[i], i)
    for name, part in zip(result.part_names, result.line.parts, strict=True):
        if part.source_note:
            out.append(f"{name}: {part.source_note}")
    out += _shape_flags(result)
    out += _fluid_flags(result)
    if result._layout.pries:
        out.append("Pries 1992 in-vitro diameter correction applied to the apparent viscosity")
    if np.any(c["no_forward_flow"]):
        out.append(
            f"no forward flow: the drive does not exceed the back pressure (or a "
            f"yield-stress fluid's yield pressure){count_words(c['no_forward_flow'])}"
        )
    if np.any(c["over_pressure_limit"]):
        out.append(f"pressure limit exceeded{count_words(c['over_pressure_limit'])}")
    if np.any(c["hemolysis_extrapolated"]):
        out.append(
            "hemolysis index outside the Giersiepen 1990 fitted range "
            "(stress above 255 Pa or exposure outside 7-700 ms) in some part"
        )
    if np.any(c["measured_extrapolated"]):
        out.append(
            "a measured part carries a flow outside its bench flows (its fit is extrapolated)"
            f"{count_words(c['measured_extrapolated'])}"
        )
    if np.any(c["implausible"]):
        out.append(
            "physically implausible: a mean velocity near the speed of sound in water or a "
            f"pressure beyond any part's rating{count_words(c['implausible'])}; the line "
            "cannot carry this flow"
        )
    if np.any(c["not_converged"]):
        out.append(
            "solver did not reach full convergence in some scenarios (result is the "
            "last bracketed iterate)"
        )
    return out
