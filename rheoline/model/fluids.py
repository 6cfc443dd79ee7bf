"""The named fluid library: ``fluid("saline-0.9", temperature_c=22.0)`` -> :class:`Fluid`.

One dict, :data:`FLUID_LIBRARY`, maps each name to a :class:`FluidEntry` (its
builder, description, default temperature, options and sources).  The
dispatcher :func:`fluid`, :func:`fluid_names`, the error messages (with
near-miss suggestions) and :func:`fluid_catalogue` (used by the docs) all read
it, so no list goes stale.  A user's own fluid joins the same dict through
:func:`register_fluid` or :func:`user_fluid_from_temperatures`.

Temperatures and hematocrits may be numpy arrays: the returned fluid's density
and rheology parameters then broadcast (one entry per scenario).

Every fluid :func:`fluid` returns records its recipe (``Fluid.recipe``, so that
``Fluid.at(temperature_c=..., hematocrit=...)`` rebuilds it), the provenance keys of
its property models (``Fluid.models_used``) and, per scenario, whether one of them was
used outside its validated range (``Fluid.outside_range``).

Examples
--------
>>> w = fluid("water", temperature_c=20.0)
>>> round(w.viscosity() * 1e3, 3), round(w.density, 1)
(1.002, 998.2)
>>> b = fluid("whole-blood", hematocrit=0.45)
>>> round(b.viscosity() * 1e3, 2), b.temperature_c
(3.98, 37.0)
>>> w.models_used
('iapws-2008', 'kell-1975')
"""

from __future__ import annotations

import difflib
import warnings
from collections.abc import Callable
from dataclasses import dataclass, field, replace

import numpy as np

from rheoline.errors import InputRangeError, RangeWarning
from rheoline.model import blood, viscosity
from rheoline.model.fluid_base import Fluid, FluidRecipe
from rheoline.model.fluid_builders import (
    albumin_builder,
    blood_builder,
    build_dextrose,
    build_glycerol,
    build_plasma,
    build_ringers,
    build_saline,
    build_water,
    newtonian_liquid,
)
from rheoline.model.temperature_fit import TEMPERATURE_MODEL_KEYS
from rheoline.model.validation import check_positive

__all__ = [
    "FluidEntry",
    "FLUID_LIBRARY",
    "fluid",
    "fluid_names",
    "fluid_catalogue",
    "register_fluid",
    "unregister_fluid",
    "user_fluid_from_temperatures",
]


@dataclass(frozen=True)
class FluidEntry:
    """One row of the fluid library.

    Parameters
    ----------
    builder : callable
        ``builder(temperature_c, **options) -> Fluid``.
    description : str
        One line for lists and docs.
    default_temperature_c : float
        Temperature [degC] used when the caller gives none.
    options : dict
        Option name -> (default, one-line description).  ``fluid`` rejects others.
    source : str
        The property models and where they come from.
    user : bool
        True for fluids registered at run time (they may be unregistered).
    """

    builder: Callable
    description: str
    default_temperature_c: float
    options: dict = field(default_factory=dict)
    source: str = ""
    user: bool = False


_MODEL_OPTION = ("carreau", "blood rheology model: " + ", ".join(blood.BLOOD_RHEOLOGY_MODELS))

#: The library: name -> entry.  Every list of fluids (names, errors, docs) reads this dict.
FLUID_LIBRARY: dict[str, FluidEntry] = {
    "water": FluidEntry(
        build_water, "pure water", 20.0, {}, "IAPWS 2008 viscosity, Kell 1975 density"
    ),
    "saline-0.9": FluidEntry(
        build_saline,
        "0.9 % sodium chloride (9 g/L)",
        20.0,
        {},
        "Laliberte 2007; Laliberte & Cooper 2004",
    ),
    "dextrose-5": FluidEntry(
        build_dextrose,
        "5 % dextrose in water",
        20.0,
        {},
        "relative viscosity to water, from memory",
    ),
    "lactated-ringers": FluidEntry(
        build_ringers,
        "lactated Ringer's (Hartmann's) solution",
        20.0,
        {},
        "Laliberte 2007 mixture rule",
    ),
    "plasma": FluidEntry(
        build_plasma, "blood plasma (Newtonian)", 37.0, {}, "1.8 x water, common practice"
    ),
    "albumin-5": FluidEntry(
        albumin_builder(50.0, "albumin-5"),
        "5 % human albumin in saline",
        20.0,
        {"concentration": (50.0, "albumin [kg/m^3]")},
        "Mooney form, parameters from memory",
    ),
    "albumin-20": FluidEntry(
        albumin_builder(200.0, "albumin-20"),
        "20 % human albumin",
        20.0,
        {"concentration": (200.0, "albumin [kg/m^3]; 250 for a 25 % solution")},
        "Mooney form, parameters from memory",
    ),
    "albumin-25": FluidEntry(
        albumin_builder(250.0, "albumin-25"),
        "25 % human albumin",
        20.0,
        {"concentration": (250.0, "albumin [kg/m^3]")},
        "Mooney form, parameters from memory",
    ),
    "whole-blood": FluidEntry(
        blood_builder("whole-blood", 0.45, "hematocrit 0.45 is a typical value"),
        "whole blood (shear-thinning)",
        37.0,
        {
            "hematocrit": (0.45, "red-cell volume fraction [-] (typical 0.45)"),
            "model": _MODEL_OPTION,
        },
        "Pries 1992, Cho & Kensey 1991, Wells & Merrill 1962, Merrill 1965",
    ),
    "packed-red-cells": FluidEntry(
        blood_builder(
            "packed-red-cells",
            0.65,
            "hematocrit 0.65 is a typical value for a packed "
            "red-cell unit (units range about 0.55-0.80)",
            medium="additive-solution",
        ),
        "packed red cells (cold from storage by default)",
        4.0,
        {
            "hematocrit": (0.65, "red-cell volume fraction [-] (typical 0.65)"),
            "model": _MODEL_OPTION,
        },
        "as whole blood, in an additive solution (no aggregation; medium from memory)",
    ),
    "glycerol-water": FluidEntry(
        build_glycerol,
        "glycerol-water bench analog",
        20.0,
        {
            "mass_fraction": (None, "glycerol mass fraction [-]"),
            "target_viscosity": (None, "or: the viscosity to mix for [Pa s]"),
        },
        "Cheng 2008; Volk & Kaehler 2018",
    ),
}

_LIBRARY_NAMES = frozenset(FLUID_LIBRARY)


def _library_table() -> str:
    lines = []
    for name, e in FLUID_LIBRARY.items():
        opts = ", ".join(f"{k}={v[0]!r}" for k, v in e.options.items())
        lines.append(
            f"* ``{name}``: {e.description} (default {e.default_temperature_c:g} degC"
            f"{'; options ' + opts if opts else ''}). Source: {e.source}."
        )
    return "\n    ".join(lines)


def _normalize(name):
    return str(name).strip().lower().replace("_", "-").replace(" ", "-")


def _entry(name) -> tuple[str, FluidEntry]:
    key = _normalize(name)
    if key in FLUID_LIBRARY:
        return key, FLUID_LIBRARY[key]
    near = difflib.get_close_matches(key, list(FLUID_LIBRARY), n=3, cutoff=0.5)
    hint = f"; did you mean {' or '.join(repr(n) for n in near)}?" if near else ""
    raise InputRangeError(
        f"fluid {name!r} is not in the library{hint} Known fluids: {', '.join(FLUID_LIBRARY)}. "
        "Register your own with register_fluid() or user_fluid_from_temperatures().",
        field="name",
        value=name,
    )


def fluid(name: str, temperature_c=None, **options) -> Fluid:
    """A library fluid at a temperature.

    Parameters
    ----------
    name : str
        A name from :func:`fluid_names` (case and ``_``/``-`` are forgiven).
    temperature_c : float or array_like, optional
        Temperature [degC]; defaults to the entry's default (20 degC for water and
        solutions, 37 degC for plasma and whole blood, 4 degC for packed red cells).
    **options
        Fluid-specific options: ``hematocrit`` and ``model`` for the blood fluids,
        ``mass_fraction`` (or ``target_viscosity``) for glycerol-water,
        ``concentration`` for albumin.  :func:`fluid_catalogue` lists them.

    Returns
    -------
    Fluid
        Density [kg/m^3] and rheology; arrays where the inputs were arrays.

    Raises
    ------
    InputRangeError
        Unknown fluid (with near-miss suggestions) or option, or bad values.

    Notes
    -----
    The library (generated from :data:`FLUID_LIBRARY`):

    LIBRARY_TABLE

    ``Fluid.viscosity()`` (no shear rate) is the rheology model's high-shear value:
    the infinite-shear limit for Carreau models, the value at 1000 1/s for the
    power law and Casson.

    Examples
    --------
    >>> round(fluid("saline-0.9", temperature_c=37.0).viscosity() * 1e3, 3)
    0.701
    >>> fluid("glycerol-water", mass_fraction=[0.3, 0.4]).viscosity().round(5)
    array([0.00245, 0.00367])
    """
    key, entry = _entry(name)
    unknown = sorted(set(options) - set(entry.options))
    if unknown:
        allowed = ", ".join(entry.options) or "none"
        near = difflib.get_close_matches(unknown[0], list(entry.options), n=1)
        hint = f"; did you mean {near[0]!r}?" if near else ""
        raise InputRangeError(
            f"fluid {key!r} has no option {unknown[0]!r}{hint} (options: {allowed})",
            field=unknown[0],
            value=options[unknown[0]],
        )
    t = entry.default_temperature_c if temperature_c is None else temperature_c
    return _build(key, entry.builder, t, options, stacklevel=3)


def _shape(made):
    values = (made.density, made.temperature_c, made.hematocrit, made.plasma_viscosity)
    shapes = [np.shape(v) for v in values if v is not None]
    return np.broadcast_shapes(*shapes, np.shape(made.rheology.viscosity(1.0)))


def _outside(made, caught):
    """Per scenario: did a property model warn that it was outside its range?"""
    shape = _shape(made)
    mask = np.zeros(shape, dtype=bool)
    for w in caught:
        if not isinstance(w.message, RangeWarning):
            continue
        hit = np.asarray(getattr(w.message, "outside", True), dtype=bool)
        try:
            mask = mask | np.broadcast_to(hit, shape)
        except ValueError:  # a mask of another shape: count it for every scenario
            mask = mask | bool(np.any(hit))
    return bool(mask) if mask.ndim == 0 else mask


def _build(name, builder, temperature_c, options, stacklevel=2):
    """``builder(temperature_c, **options)`` with its recipe, range mask and warnings.

    The property functions each check their range; each distinct warning is passed on
    once, and the values they found outside their range become ``outside_range``.
    """
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        made = builder(temperature_c, **options)
    seen = set()
    for w in caught:
        key = (w.category, str(w.message))
        if key not in seen:
            seen.add(key)
            warnings.warn(w.message, stacklevel=stacklevel + 1)
    recipe = made.recipe or FluidRecipe(name, temperature_c, options)
    if made.recipe is None and name not in FLUID_LIBRARY:
        recipe = FluidRecipe(name, temperature_c, options, builder=builder)
    return replace(made, recipe=recipe, outside_range=_outside(made, caught))


if fluid.__doc__:
    fluid.__doc__ = fluid.__doc__.replace("LIBRARY_TABLE", _library_table())


def fluid_names() -> list[str]:
    """Names of every fluid in the library, user-registered ones last.

    Examples
    --------
    >>> fluid_names()[:3]
    ['water', 'saline-0.9', 'dextrose-5']
    """
    return list(FLUID_LIBRARY)


def fluid_catalogue() -> list[dict]:
    """One dict per fluid: name, description, default temperature, options, source.

    Examples
    --------
    >>> fluid_catalogue()[0]["description"]
    'pure water'
    """
    return [
        {
            "name": name,
            "description": e.description,
            "default_temperature_c": e.default_temperature_c,
            "options": {k: v[1] for k, v in e.options.items()},
            "source": e.source,
            "user": e.user,
        }
        for name, e in FLUID_LIBRARY.items()
    ]


def register_fluid(
    name: str,
    builder: Callable,
    *,
    description: str = "user fluid",
    default_temperature_c: float = 20.0,
    options: dict | None = None,
    source: str = "user",
    overwrite: bool = False,
) -> None:
    """Add a user's fluid to the library so that ``fluid(name, ...)`` builds it.

    Parameters
    ----------
    name : str
        New library name (normalized to lower case with hyphens).
    builder : callable
        ``builder(temperature_c, **options) -> Fluid``.
    description, default_temperature_c, options, source
        As in :class:`FluidEntry`.
    overwrite : bool
        Replace an earlier user fluid of the same name.  Built-in fluids can
        never be replaced.

    Raises
    ------
    InputRangeError
        The name is a built-in fluid, or already registered and ``overwrite`` is False.
    """
    key = _normalize(name)
    if key in _LIBRARY_NAMES:
        raise InputRangeError(
            f"{key!r} is a built-in fluid and cannot be replaced; choose another name"
        )
    if key in FLUID_LIBRARY and not overwrite:
        raise InputRangeError(
            f"fluid {key!r} is already registered; pass overwrite=True to replace it"
        )
    if not callable(builder):
        raise InputRangeError(f"builder for {key!r} must be callable(temperature_c, **options)")
    FLUID_LIBRARY[key] = FluidEntry(
        builder, description, float(default_temperature_c), dict(options or {}), source, user=True
    )
    _library_changed()


def _library_changed():
    """Forget the time solve's kept runs: a scenario names its fluid, and that name may now
    build another (:mod:`rheoline.model.transient_reuse`)."""
    from rheoline.model import transient_reuse

    transient_reuse.clear()


def unregister_fluid(name: str) -> None:
    """Remove a user-registered fluid (built-in fluids stay)."""
    key, entry = _entry(name)
    if not entry.user:
        raise InputRangeError(f"{key!r} is a built-in fluid and cannot be removed")
    del FLUID_LIBRARY[key]
    _library_changed()


def user_fluid_from_temperatures(
    name: str,
    temperatures_c,
    viscosities,
    density,
    model: str = "andrade",
    *,
    temperature_c=None,
    register: bool = False,
    overwrite: bool = False,
) -> Fluid:
    """A user's Newtonian fluid from viscosities measured at two or more temperatures.

    The viscosities are fitted with :func:`rheoline.model.fitting.fit_viscosity_temperature`
    (Andrade needs two temperatures, VFT three); the density is a constant or, given
    one value per temperature, a straight line in temperature.

    Parameters
    ----------
    name : str
        The fluid's label (and library name when ``register`` is True).
    temperatures_c : array_like
        Measurement temperatures [degC].
    viscosities : array_like
        Measured dynamic viscosities [Pa s].
    density : float or array_like
        Density [kg/m^3]: one value, or one per temperature.
    model : {"andrade", "vft"}
        Temperature law (see :data:`rheoline.model.fitting.TEMPERATURE_MODELS`).
    temperature_c : float or array_like, optional
        Temperature of the returned fluid [degC]; default the middle of the
        measured range.
    register : bool
        Also add the fluid to the library, so ``fluid(name, temperature_c=...)``
        works everywhere a library fluid does.
    overwrite : bool
        Replace an earlier registration of the same name.

    Returns
    -------
    Fluid
        Newtonian; evaluating it outside the measured temperatures warns (RangeWarning).

    Examples
    --------
    >>> oil = user_fluid_from_temperatures("bench oil", [20.0, 40.0], [0.060, 0.025], 870.0)
    >>> round(oil.viscosity() * 1e3, 1), oil.temperature_c
    (38.2, 30.0)
    """
    from rheoline.model.temperature_fit import fit_viscosity_temperature

    temps = viscosity.check_temperature_c(temperatures_c, "temperatures_c")
    fit = fit_viscosity_temperature(temps, viscosities, model)
    rho = check_positive("density", density, "kg/m^3")
    if rho.ndim == 0 or rho.size == 1:
        coeffs = np.array([0.0, float(np.ravel(rho)[0])])
    elif rho.shape == temps.shape:
        coeffs = np.polyfit(temps, rho, 1)
    else:
        raise InputRangeError(
            f"density must be one value or one per temperature ({temps.size}), got {rho.size} values"
        )
    label = str(name)
    source = f"user data, {fit.model} fit over {fit.temperature_range_c[0]:g}-{fit.temperature_range_c[1]:g} degC"

    def build(temperature_c):
        t = np.asarray(viscosity.check_temperature_c(temperature_c))
        made = newtonian_liquid(
            label,
            t,
            fit.viscosity(t),
            np.polyval(coeffs, t),
            source,
            (f"fitted to {temps.size} measured viscosities",),
            models=(TEMPERATURE_MODEL_KEYS[fit.model],),
        )
        return replace(made, recipe=FluidRecipe(label, made.temperature_c, {}, builder=build))

    if register:
        register_fluid(
            label,
            build,
            description=f"user fluid ({fit.model} fit)",
            default_temperature_c=float(np.mean(fit.temperature_range_c)),
            source=source,
            overwrite=overwrite,
        )
    t_eval = float(np.mean(fit.temperature_range_c)) if temperature_c is None else temperature_c
    return _build(label, build, t_eval, {})
