"""Curves for comparing candidate lines: flow against drive, bore, temperature or hematocrit.

Each candidate line is solved once for the whole array of x values (one vectorized
solve per line).  The result holds plain arrays; ``.table`` builds a pandas DataFrame
on first access.

Examples
--------
>>> from rheoline.model.fluid_base import newtonian_fluid
>>> from rheoline.model.line import Line
>>> from rheoline.model.parts import Catheter
>>> water = newtonian_fluid("water", 0.955e-3, 997.8)
>>> lines = {"18G": Line([Catheter(gauge=18)]), "22G": Line([Catheter(gauge=22)])}
>>> c = flow_curves(lines, water, over="head", values=[0.5, 1.0])
>>> [bool(c.flows["18G"][i] > c.flows["22G"][i]) for i in range(2)]
[True, True]
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.line import Line
from rheoline.model.parts import Lumen
from rheoline.model.provenance import merge_models
from rheoline.model.validation import check_finite

__all__ = ["CURVE_VARIABLES", "CurveSet", "flow_curves"]

#: x variables of :func:`flow_curves` and their units.
CURVE_VARIABLES = {
    "head": "m",
    "source_pressure": "Pa",
    "inner_diameter": "m",
    "temperature_c": "degC",
    "hematocrit": "-",
}


@dataclass(frozen=True)
class CurveSet:
    """Flow [m^3/s] of each candidate line at each x value.

    Attributes
    ----------
    over : str
        The x variable (a key of :data:`CURVE_VARIABLES`).
    values : ndarray
        The x values.
    flows : dict
        {line label: ndarray of flows [m^3/s]}.
    regimes : dict
        {line label: ndarray of the worst-part regime}.
    models_used : tuple of str
        Provenance keys of the models every curve rests on, in first-use order.
    """

    over: str
    values: np.ndarray
    flows: dict
    regimes: dict
    models_used: tuple = ()

    @cached_property
    def table(self):
        """Long-format pandas DataFrame: line, x, flow [m^3/s], regime."""
        import pandas as pd

        unit = CURVE_VARIABLES[self.over]
        frames = [
            pd.DataFrame(
                {
                    "line": label,
                    f"{self.over} [{unit}]": self.values,
                    "flow [m^3/s]": self.flows[label],
                    "regime": self.regimes[label],
                }
            )
            for label in self.flows
        ]
        return pd.concat(frames, ignore_index=True)


def _with_diameter(line, part, values):
    index = (
        part
        if isinstance(part, int)
        else (line.part_names.index(part) if part in line.part_names else None)
    )
    if (
        index is None
        or not 0 <= index < len(line.parts)
        or not isinstance(line.parts[index], Lumen)
    ):
        lumens = [
            n for n, p in zip(line.part_names, line.parts, strict=True) if isinstance(p, Lumen)
        ]
        raise InputRangeError(
            f"part {part!r} is not a lumen of the line; choose one of {lumens} (name or index)"
        )
    old = line.parts[index]
    new = old.resized(inner_diameter=values)  # a non-circular lumen keeps its shape
    parts = list(line.parts)
    parts[index] = new
    return Line(parts, entrance=line.entrance, name=line.name)


def flow_curves(
    lines,
    fluid,
    over,
    values,
    part=-1,
    head=0.0,
    source_pressure=0.0,
    back_pressure=0.0,
    fluid_builder=None,
):
    """Flow of each candidate line as one input sweeps ``values``.

    Parameters
    ----------
    lines : dict or sequence of Line
        Candidates; a sequence is labelled by each line's name.
    fluid : Fluid
    over : str
        "head" [m], "source_pressure" [Pa], "inner_diameter" [m] (of ``part``),
        "temperature_c" [degC] or "hematocrit" [-] (these two rebuild the fluid).
    values : array_like
        The x values.
    part : int or str
        For ``over="inner_diameter"``: the lumen whose bore sweeps (default the last part).
    head, source_pressure, back_pressure : float
        The fixed drive.
    fluid_builder : callable, optional
        ``fluid_builder(temperature_c=..., hematocrit=...)``; default :meth:`Fluid.at`, the
        fluid built again from its recipe (its library name and options).

    Returns
    -------
    CurveSet
    """
    if over not in CURVE_VARIABLES:
        raise InputRangeError(
            f"over {over!r} is not a curve variable; choose one of {', '.join(CURVE_VARIABLES)}"
        )
    x = check_finite(over, values).ravel()
    labelled = dict(lines) if isinstance(lines, dict) else {ln.name: ln for ln in lines}
    drive = {"head": head, "source_pressure": source_pressure, "back_pressure": back_pressure}
    the_fluid = fluid
    if over in ("head", "source_pressure"):
        drive[over] = x
    elif over in ("temperature_c", "hematocrit"):
        if over == "hematocrit" and fluid.hematocrit is None:
            raise InputRangeError(
                f"a hematocrit curve needs a blood fluid; {fluid.name!r} has none"
            )
        kwargs = {"temperature_c": np.asarray(fluid.temperature_c) * np.ones_like(x)}
        if fluid.hematocrit is not None:
            kwargs["hematocrit"] = np.asarray(fluid.hematocrit) * np.ones_like(x)
        kwargs[over] = x
        the_fluid = (fluid.at if fluid_builder is None else fluid_builder)(**kwargs)
    flows, regimes, models = {}, {}, ()
    for label, line in labelled.items():
        solved_line = line
        if over == "inner_diameter":
            index = len(line.parts) - 1 if part == -1 else part
            solved_line = _with_diameter(line, index, x)
        result = solved_line.solve(the_fluid, **drive)
        flows[label] = np.broadcast_to(np.asarray(result.flow, dtype=float), x.shape).copy()
        regimes[label] = np.broadcast_to(np.asarray(result.regime), x.shape).copy()
        models = merge_models(models, result.models_used)
    return CurveSet(over=over, values=x, flows=flows, regimes=regimes, models_used=models)
