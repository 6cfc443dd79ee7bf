"""A line laid out for one fluid: the per-part arrays every solve of a line works on.

:func:`build_layout` stacks the parts of a :class:`~rheoline.model.line.Line` into arrays
of shape ``(n_rows, *scenario_shape)``: the lumens (and equivalent-length fittings) with
their bores, lengths, roughness, entrance/transition loss coefficients and Pries 1992
viscosity factors; the K fittings with their quadratic and (Hooper 1981) linear
coefficients; the measured parts with their fitted coefficients; the exit jet.  The
solvers (:mod:`rheoline.model.line_solvers`) evaluate losses on these arrays only.

It also records which published models the line applies (:attr:`LineLayout.models_used`:
keys of :data:`rheoline.model.provenance.REGISTRY`) and, per part, whether a catalogue
size was used and whether a correlation was used outside its range.

Examples
--------
>>> from rheoline.model.fluid_base import newtonian_fluid
>>> from rheoline.model.line import Line
>>> from rheoline.model.parts import Catheter, Fitting, Tube
>>> water = newtonian_fluid("water", 1.0e-3, 998.0)
>>> line = Line([Tube(inner_diameter=3e-3, length=1.0), Fitting(k=0.5), Catheter(gauge=18)])
>>> layout = build_layout(line, water)
>>> layout.lumen_rows.tolist(), layout.k_rows.tolist(), layout.minor_k.round(3).tolist()
([0, 2], [1], [0.5, 0.444])
>>> layout.models_used
('crane-tp410', 'typical-catalogue')
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.blood import pries_1992_relative_viscosity
from rheoline.model.losses import EXIT_K, transition_k
from rheoline.model.parts import Fitting, Lumen, MeasuredPart, Needle
from rheoline.model.validation import outside_mask

__all__ = [
    "LineLayout",
    "build_layout",
    "fluid_shape",
    "scenario_shape",
    "lumen_row_count",
    "part_models",
    "PRIES_REFERENCE_DIAMETER",
]

#: Largest diameter [m] of the data behind Pries 1992; the line's correction is relative to it.
PRIES_REFERENCE_DIAMETER = 1.9779e-3

_DIMENSIONS = ("inner_diameter", "length", "roughness", "k", "equivalent_length")


def _shape_of(*values):
    return np.broadcast_shapes(*(np.shape(v) for v in values if v is not None))


def fluid_shape(fluid):
    """Scenario shape of a fluid: its array properties broadcast together."""
    rheo = fluid.rheology
    return _shape_of(
        fluid.density,
        fluid.temperature_c,
        fluid.hematocrit,
        fluid.plasma_viscosity,
        rheo.viscosity(1.0),
    )


def part_models(part) -> tuple:
    """Provenance keys of what a part's own numbers rest on (catalogue sizes, Crane, Hooper).

    A part may say so itself with a ``models_used`` attribute; otherwise a catalogue-sized
    needle rests on ISO 9626, a catalogue-sized catheter or cannula on typical catalogue
    values, a non-circular lumen on Shah & London 1978, a fitting made by
    :meth:`Fitting.crane` on Crane TP-410 and one made with a Hooper ``laminar_k`` on
    Hooper 1981.

    Examples
    --------
    >>> from rheoline.model.parts import Needle
    >>> part_models(Needle(gauge=22)), part_models(Needle(gauge=22, inner_diameter=4e-4))
    (('iso-9626',), ())
    """
    own = getattr(part, "models_used", None)
    if own is not None:
        return tuple(own)
    keys = []
    if part.source_note is not None:  # a catalogue size (catheters, needles, cannula walls)
        keys.append("iso-9626" if isinstance(part, Needle) else "typical-catalogue")
    shape = getattr(part, "shape", None)
    if shape is not None and shape.key != "circle":  # a non-circular lumen's laminar f Re
        keys.append("shah-london-1978")
    if isinstance(part, Fitting):
        if str(part.name).endswith("(Crane TP-410)"):
            keys.append("crane-tp410")
        if part.laminar_k is not None:
            keys.append("hooper-1981")
    return tuple(keys)


@dataclass(frozen=True)
class LineLayout:
    """Stacked per-part arrays of a line for one fluid and scenario shape (SI units)."""

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
    models_used: tuple = ()  # provenance keys of the line's own models (not the fluid's)
    part_outside_range: np.ndarray | None = None  # (n_parts, *shape) bool
    part_catalogue: np.ndarray | None = None  # (n_parts,) bool: a catalogue size
    rheology: object = None  # the fluid's rheology model for these scenarios
    table: object = None  # the rheology's RheologyTable (rheoline.model.rheology_table)

    # ---------------------------------------------------------------- constants of a pass
    # (computed once per layout, read by every residual pass of the solvers)
    @cached_property
    def inverse_lod(self):
        """D / L of each lumen [-]."""
        return self.diameter / self.length

    @cached_property
    def reynolds_factor(self):
        """Re / (Q / mu) of each lumen: rho D / A [kg/m^4]."""
        return self.density * self.diameter / self.area

    @cached_property
    def friction_factor(self):
        """Frictional drop / (f Re mu Q) of each lumen: L / (2 D^2 A) [1/m^4]."""
        return 0.5 * self.length / (self.diameter * self.diameter * self.area)

    @cached_property
    def minor_factor(self):
        """Minor (entrance, transition) drop / Q^2 of each lumen: K rho / (2 A^2)."""
        return self.minor_k * (0.5 * self.density) / (self.area * self.area)

    @cached_property
    def smooth(self) -> bool:
        """True when every lumen's wall is smooth (no roughness term in the friction)."""
        return not np.any(self.relative_roughness)

    @cached_property
    def developing_rows(self):
        """``developing`` as the friction wants it: True or False when the same for every
        lumen, else the per-lumen mask."""
        dev = np.asarray(self.developing, dtype=bool)
        return True if dev.all() else (False if not dev.any() else dev)

    @cached_property
    def phi_offset(self):
        """ln(3 s / (pi R^3)) of each lumen: phi = ln Q + this is the argument of the
        rheology table (s the flow scale of a non-circular lumen)."""
        return np.log(3.0 * self.flow_scale / (np.pi * (self.diameter / 2.0) ** 3))


def _identity(value):
    return value


def _lumen_geometry(part, ones, geometry, take=_identity):
    """Append a lumen's flow area, laminar f Re and circle flow scale; its area's diameter.

    A circle (any part without a ``shape``) gets exactly pi D^2 / 4, 16 and 1, so that the
    answers of circular lines do not move by a rounding.
    """
    d = take(part.inner_diameter) * ones
    shape = getattr(part, "shape", None)
    if shape is None:
        geometry["area"].append(np.pi * d**2 / 4.0)
        geometry["f_re"].append(16.0 * ones)
        geometry["scale"].append(ones)
        return d
    area = take(shape.area) * ones
    geometry["area"].append(area)
    geometry["f_re"].append(take(shape.laminar_f_re) * ones)
    geometry["scale"].append(np.pi * d**2 / (4.0 * area))
    geometry["shaped"].append(part.name)
    return np.sqrt(4.0 * area / np.pi)


def scenario_shape(line, fluid, extra_shape=()):
    """The scenario shape of a line, a fluid and drive arrays of ``extra_shape``."""
    dims = [getattr(p, a, None) for p in line.parts for a in _DIMENSIONS]
    return np.broadcast_shapes(
        fluid_shape(fluid), tuple(extra_shape), *(np.shape(v) for v in dims if v is not None)
    )


def _is_lumen_row(part) -> bool:
    """True for a part laid out as a lumen row: a lumen, or a fitting given by its
    equivalent length (a short lumen of its bore)."""
    return isinstance(part, Lumen) or (
        isinstance(part, Fitting) and part.equivalent_length is not None
    )


def lumen_row_count(line) -> int:
    """Lumen rows of a line's layout (lumens and equivalent-length fittings)."""
    return sum(1 for part in line.parts if _is_lumen_row(part))


def _sort_parts(parts, ones, take=_identity):
    """Rows of lumens, K fittings and measured parts, and the lumens' stacked geometry.

    ``geometry["equivalent"]`` holds each lumen row's area-equivalent diameter (the bore
    for a circle), which transitions, the exit and K fittings see; ``real`` maps the rows
    of real lumens (not equivalent lengths) to it.
    """
    rows = {"lumen": [], "k": [], "measured": []}
    geometry = {
        key: []
        for key in ("diameter", "length", "rough", "developing")
        + ("area", "f_re", "scale", "equivalent", "shaped")
    }
    real = {}  # lumen row -> area-equivalent bore of a real lumen (not an equivalent length)
    for i, part in enumerate(parts):
        if isinstance(part, Lumen):
            d = take(part.inner_diameter)
            entry = (d, take(part.length), take(part.roughness) / d, True)
            geometry["equivalent"].append(_lumen_geometry(part, ones, geometry, take))
            real[i] = geometry["equivalent"][-1]
        elif isinstance(part, Fitting) and part.equivalent_length is not None:
            entry = (take(part.inner_diameter), take(part.equivalent_length), 0.0, False)
            geometry["equivalent"].append(_lumen_geometry(part, ones, geometry, take))
        elif isinstance(part, Fitting):
            rows["k"].append(i)
            continue
        elif isinstance(part, MeasuredPart):
            rows["measured"].append(i)
            continue
        else:  # pragma: no cover - Part subclasses are the ones above
            raise InputRangeError(f"unknown part type {type(part).__name__}")
        rows["lumen"].append(i)
        for key, value in zip(("diameter", "length", "rough"), entry[:3], strict=True):
            geometry[key].append(value * ones)
        geometry["developing"].append(entry[3])
    return rows, geometry, real


def _minor_losses(lumen_rows, real, entrance_k, ones, shape):
    """Entrance K of the first real lumen, transition K (contraction/expansion) of the others."""
    minor = np.zeros((len(lumen_rows), *shape))
    previous = None
    expansion = False
    for j, i in enumerate(lumen_rows):
        if i not in real:
            continue
        d = real[i]
        if previous is None:
            minor[j] = entrance_k * ones
        else:
            minor[j] = transition_k(previous, d)
            expansion = expansion or bool(np.any(d > previous))
        previous = d
    if previous is None and len(lumen_rows):
        minor[0] = entrance_k * ones
    return minor, expansion


def _k_fittings(parts, k_rows, lumen_rows, equivalent, mu_ref, rho, ones, take=_identity):
    """Quadratic coefficient, Hooper linear coefficient and reference area of each K fitting.

    A K refers to the fitting's own bore, else the nearest upstream lumen, else downstream.
    """
    k_coef, k_area, k_lin = [], [], []
    for i in k_rows:
        part = parts[i]
        d = take(part.inner_diameter)
        if d is None:
            up = [j for j in lumen_rows if j < i]
            down = [j for j in lumen_rows if j > i]
            ref = up[-1] if up else (down[0] if down else None)
            if ref is None:
                raise InputRangeError(
                    f"fitting {part.name!r} has no inner_diameter and the line has no lumen "
                    "to refer its K to; pass Fitting(k=..., inner_diameter=...)",
                    field="inner_diameter",
                )
            d = equivalent[lumen_rows.index(ref)]
        area = np.pi * (d * ones) ** 2 / 4.0
        k_area.append(area)
        k_coef.append(take(part.k) * rho / (2.0 * area * area))
        # Hooper 1981: K_1/Re rho u^2/2 = K_1 mu Q / (2 D A), linear in Q
        k1 = 0.0 if part.laminar_k is None else take(part.laminar_k)
        k_lin.append(k1 * mu_ref / (2.0 * (d * ones) * area))
    return k_coef, k_lin, k_area


def _exit_coefficient(lumen_rows, real, equivalent, rho, ones):
    exit_rows = [j for j, i in enumerate(lumen_rows) if i in real]
    if not exit_rows:
        return 0.0 * ones
    d_out = equivalent[exit_rows[-1]]
    a_out = np.pi * d_out**2 / 4.0
    return EXIT_K * rho / (2.0 * a_out * a_out)


def _pries_factor(fluid, diameter, ones, n_l, shape, take=_identity):
    """Pries 1992 in-vitro factor of each lumen relative to the reference diameter."""
    if not fluid.is_blood:
        raise InputRangeError(
            f"pries_correction applies to blood; fluid {fluid.name!r} has no hematocrit. "
            "Use a blood fluid or pries_correction=False",
            field="pries_correction",
            value=True,
        )
    h = take(fluid.hematocrit) * ones
    ref = pries_1992_relative_viscosity(PRIES_REFERENCE_DIAMETER, h)
    factor = pries_1992_relative_viscosity(np.minimum(diameter, PRIES_REFERENCE_DIAMETER), h) / ref
    return np.broadcast_to(factor, (n_l, *shape))


def _shape_fields(geometry, n_l, shape):
    """Flow areas, laminar f Re and flow scales (plain 16 and 1 when every lumen is round)."""
    shaped = tuple(geometry["shaped"])

    def stack(key):
        return np.array(geometry[key]).reshape((n_l, *shape))

    return {
        "area": stack("area"),
        "laminar_f_re": stack("f_re") if shaped else 16.0,
        "flow_scale": stack("scale") if shaped else 1.0,
        "shaped": shaped,
    }


def _line_models(line, rows, expansion, pries):
    keys = ["crane-tp410"] if rows["lumen"] else []  # entrance, contraction and exit K
    if expansion:
        keys.append("borda-carnot")
    for part in line.parts:
        keys.extend(part_models(part))
    if pries:
        keys.append("pries-1992")
    return tuple(dict.fromkeys(keys))


def _part_outside(line, rows, diameter, pries, shape):
    """Per part: a correlation used outside its registry range (Pries 1992 below 3.3 um)."""
    out = np.zeros((len(line.parts), *shape), dtype=bool)
    if pries and len(rows["lumen"]):
        capped = np.minimum(diameter, PRIES_REFERENCE_DIAMETER)
        out[rows["lumen"]] = outside_mask("pries-1992", "diameter", capped)
    return out


def build_layout(line, fluid, extra_shape=(), pries=False, block=None, table=None) -> LineLayout:
    """Lay ``line`` out for ``fluid`` over the scenario shape (see the module notes).

    Parameters
    ----------
    line : Line
    fluid : Fluid
    extra_shape : tuple
        Shape of drive arrays to broadcast with the fluid's and the parts' arrays.
    pries : bool
        Apply the Pries 1992 diameter correction (blood only).
    block : rheoline.model.line_blocks.Block, optional
        Lay out only these scenarios (of the shape the line, the fluid and ``extra_shape``
        broadcast to): every array then has the block's 1-D shape.
    table : rheoline.model.rheology_table.RheologyTable, optional
        The fluid's tabulated Rabinowitsch-Mooney relation, for the solvers to read.

    Returns
    -------
    LineLayout
    """
    if block is None:
        shape, take, rheology = scenario_shape(line, fluid, extra_shape), _identity, fluid.rheology
    else:
        shape, take, rheology = block.shape, block.take, block.take_rheology(fluid.rheology)
    ones = np.ones(shape)
    density = take(fluid.density)
    rho = density * ones
    rows, geometry, real = _sort_parts(line.parts, ones, take)
    n_l = len(rows["lumen"])
    diameter = np.array(geometry["diameter"]).reshape((n_l, *shape))
    minor, expansion = _minor_losses(rows["lumen"], real, line.entrance_k, ones, shape)
    mu_ref = rheology.infinite_shear_viscosity
    k_coef, k_lin, k_area = _k_fittings(
        line.parts, rows["k"], rows["lumen"], geometry["equivalent"], mu_ref, rho, ones, take
    )
    measured = [line.parts[i].scaled_coefficients(mu_ref, density) for i in rows["measured"]]
    factor = (
        _pries_factor(fluid, diameter, ones, n_l, shape, take) if pries else np.ones((n_l, *shape))
    )
    n_k, n_m = len(rows["k"]), len(rows["measured"])
    return LineLayout(
        shape=shape,
        names=line.part_names,
        kinds=tuple(p.kind for p in line.parts),
        lumen_rows=np.array(rows["lumen"], dtype=int),
        k_rows=np.array(rows["k"], dtype=int),
        measured_rows=np.array(rows["measured"], dtype=int),
        diameter=diameter,
        length=np.array(geometry["length"]).reshape((n_l, *shape)),
        relative_roughness=np.array(geometry["rough"]).reshape((n_l, *shape)),
        developing=np.array(geometry["developing"], dtype=bool).reshape((n_l,) + (1,) * len(shape)),
        minor_k=minor,
        viscosity_factor=factor,
        k_coefficient=np.array(k_coef).reshape((n_k, *shape)),
        k_linear=np.array(k_lin).reshape((n_k, *shape)),
        k_velocity_area=np.array(k_area).reshape((n_k, *shape)),
        measured_a=np.array([a * ones for a, _ in measured]).reshape((n_m, *shape)),
        measured_b=np.array([b * ones for _, b in measured]).reshape((n_m, *shape)),
        exit_coefficient=_exit_coefficient(rows["lumen"], real, geometry["equivalent"], rho, ones),
        density=rho,
        pries=bool(pries),
        **_shape_fields(geometry, n_l, shape),
        models_used=_line_models(line, rows, expansion, pries),
        part_outside_range=_part_outside(line, rows, diameter, pries, shape),
        part_catalogue=np.array([p.source_note is not None for p in line.parts], dtype=bool),
        rheology=rheology,
        table=table,
    )
