"""The :class:`Fluid` object every other layer consumes, and the recipe it was built from.

A fluid is a density and a rheology model at a temperature.  All three may be
arrays (one entry per scenario); they broadcast together.  The named fluid
library (:mod:`rheoline.model.fluids`) builds these; users may build their own.

A fluid says how it was made and what it rests on:

* ``recipe`` (:class:`FluidRecipe`): the library name, temperature and options it was
  built with, so that :meth:`Fluid.at` rebuilds it at another temperature or hematocrit
  (by building it again, never by inverting a viscosity model);
* ``models_used``: the provenance keys (:mod:`rheoline.model.provenance`) of its property
  models, in first-use order;
* ``outside_range``: per scenario, whether one of those models was used outside its
  validated range (the range warnings say the same in words).

Examples
--------
>>> from rheoline.model.fluids import fluid
>>> blood = fluid("whole-blood", hematocrit=0.40, model="casson")
>>> blood.recipe
FluidRecipe(name='whole-blood', temperature_c=37.0, options={'hematocrit': 0.4, 'model': 'casson'})
>>> cold = blood.at(temperature_c=20.0)
>>> cold.temperature_c, cold.rheology.name, bool(cold.viscosity() > blood.viscosity())
(20.0, 'casson', True)
>>> blood.at(hematocrit=[0.3, 0.5]).hematocrit.tolist()
[0.3, 0.5]
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from types import MappingProxyType

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.rheology import Newtonian, RheologyModel
from rheoline.model.validation import check_positive, freeze_arrays, frozen_copy

__all__ = ["Fluid", "FluidRecipe", "newtonian_fluid"]


@dataclass(frozen=True)
class FluidRecipe:
    """How a fluid was built: a library name, a temperature and options.

    Parameters
    ----------
    name : str
        The fluid library name (:func:`rheoline.model.fluids.fluid_names`).
    temperature_c : float or ndarray
        Temperature [degC] it was built at.
    options : Mapping
        The options it was built with (``hematocrit``, ``model``, ``mass_fraction``,
        ``concentration``, ...), as :func:`rheoline.model.fluids.fluid` takes them.  A
        glycerol mixture asked for by ``target_viscosity`` records the ``mass_fraction``
        that was mixed, so that it keeps its composition at another temperature.
    builder : callable, optional
        ``builder(temperature_c, **options) -> Fluid`` for a user's fluid that is not in
        the library (not compared, not shown).

    Examples
    --------
    >>> FluidRecipe("water", 20.0).build(temperature_c=37.0).temperature_c
    37.0
    """

    name: str
    temperature_c: float | np.ndarray
    options: Mapping = field(default_factory=dict)
    builder: Callable | None = field(default=None, compare=False, repr=False)

    def __post_init__(self):
        options = {
            k: frozen_copy(v) if isinstance(v, np.ndarray) else v for k, v in self.options.items()
        }
        object.__setattr__(self, "options", MappingProxyType(options))
        freeze_arrays(self, ("temperature_c",))

    def __repr__(self):
        return (
            f"FluidRecipe(name={self.name!r}, temperature_c={self.temperature_c!r}, "
            f"options={dict(self.options)!r})"
        )

    def build(self, temperature_c=None, **options):
        """The fluid of this recipe, with ``temperature_c`` and ``options`` replaced."""
        t = self.temperature_c if temperature_c is None else temperature_c
        merged = {**self.options, **options}
        if self.builder is None:
            from rheoline.model.fluids import fluid

            return fluid(self.name, temperature_c=t, **merged)
        from rheoline.model.fluids import _build

        return _build(self.name, self.builder, t, merged)


@dataclass(frozen=True)
class Fluid:
    """A fluid at a temperature: density and a rheology model.

    Parameters
    ----------
    name : str
        Library name or a user's label.
    temperature_c : float or ndarray
        Temperature [degC] the properties were evaluated at.
    density : float or ndarray
        Density [kg/m^3].
    rheology : RheologyModel
        The constitutive model (a :class:`~rheoline.model.rheology.Newtonian` for simple liquids).
    hematocrit : float or ndarray, optional
        Volume fraction of red cells [-] for blood fluids, else None.
    plasma_viscosity : float or ndarray, optional
        Viscosity of the suspending medium [Pa s] for blood fluids (used by
        diameter-dependent corrections such as Pries 1992), else None.
    source : str
        Where the property models come from (shown in tables and exports).
    notes : tuple of str
        Cautions attached to the values (e.g. "from memory" values).
    models_used : tuple of str
        Provenance keys of the property models (:mod:`rheoline.model.provenance`).
    recipe : FluidRecipe, optional
        How it was built (set by :func:`rheoline.model.fluids.fluid`); None for a fluid
        made from numbers.  :meth:`at` needs it.
    outside_range : bool or ndarray of bool
        Per scenario (the shape of the fluid's arrays): a property model was used outside
        its validated range.

    Examples
    --------
    >>> f = newtonian_fluid("bench oil", viscosity=0.05, density=870.0)
    >>> f.viscosity(), f.is_newtonian
    (0.05, True)
    """

    name: str
    temperature_c: float | np.ndarray
    density: float | np.ndarray
    rheology: RheologyModel
    hematocrit: float | np.ndarray | None = None
    plasma_viscosity: float | np.ndarray | None = None
    source: str = ""
    notes: tuple = field(default_factory=tuple)
    models_used: tuple = ()
    recipe: FluidRecipe | None = field(default=None, repr=False)
    outside_range: bool | np.ndarray = field(default=False, repr=False)

    def __post_init__(self):
        rho = check_positive("density", self.density, "kg/m^3")
        object.__setattr__(self, "density", float(rho) if rho.ndim == 0 else rho)
        object.__setattr__(self, "models_used", tuple(self.models_used))
        freeze_arrays(self)  # copies: the caller's arrays may change later

    def at(self, temperature_c=None, **options) -> Fluid:
        """The same fluid rebuilt at another temperature, hematocrit or option.

        Parameters
        ----------
        temperature_c : float or array_like, optional
            Temperature [degC]; default the fluid's own.
        **options
            Options of its library entry to change (``hematocrit=``, ``model=``,
            ``mass_fraction=``, ``concentration=``); the others keep their values.

        Returns
        -------
        Fluid
            Built again from :attr:`recipe` (nothing is inverted); arrays broadcast.

        Raises
        ------
        InputRangeError
            When the fluid has no recipe (made from numbers, or changed after it was
            built), naming the fix.

        Examples
        --------
        >>> from rheoline.model.fluids import fluid
        >>> round(fluid("water").at(temperature_c=37.0).viscosity() * 1e3, 3)  # IAPWS 2008
        0.691
        """
        if self.recipe is None:
            raise InputRangeError(
                f"fluid {self.name!r} has no recipe (it was made from numbers, or changed "
                "after it was built), so it cannot be rebuilt at another temperature or "
                "hematocrit; build it with rheoline.fluid(name, ...) or "
                "user_fluid_from_temperatures(...), or pass a fluid_builder",
                field="recipe",
            )
        return self.recipe.build(temperature_c, **options)

    def viscosity(self, shear_rate=None):
        """Apparent viscosity [Pa s] at ``shear_rate`` [1/s]; None gives the high-shear value."""
        if shear_rate is None:
            return self.rheology.infinite_shear_viscosity
        return self.rheology.viscosity(shear_rate)

    def describe(self) -> str:
        """One line: name, temperature, hematocrit, density and rheology with units.

        Examples
        --------
        >>> newtonian_fluid("bench oil", viscosity=0.05, density=870.0).describe()
        'bench oil at 20 degC; density 870 kg/m^3; newtonian: mu=0.05 Pa s'
        """
        parts = [f"{self.name} at {_span(self.temperature_c)} degC"]
        if self.hematocrit is not None:
            parts.append(f"hematocrit {_span(self.hematocrit)}")
        parts.append(f"density {_span(self.density)} kg/m^3")
        try:
            parts.append(self.rheology.describe())
        except (AttributeError, TypeError):  # a user's own rheology object
            parts.append(getattr(self.rheology, "name", type(self.rheology).__name__))
        return "; ".join(parts)

    @property
    def is_newtonian(self) -> bool:
        """True when the rheology model is Newtonian."""
        return bool(self.rheology.is_newtonian)

    @property
    def is_blood(self) -> bool:
        """True for blood and blood products (a hematocrit is set)."""
        return self.hematocrit is not None


def _span(value) -> str:
    arr = np.asarray(value, dtype=float)
    if arr.ndim == 0 or np.min(arr) == np.max(arr):
        return f"{float(arr.flat[0]):.4g}"
    return f"{np.min(arr):.4g}..{np.max(arr):.4g}"


def newtonian_fluid(
    name: str, viscosity, density, temperature_c=20.0, source: str = "user"
) -> Fluid:
    """A user's Newtonian fluid from a viscosity [Pa s] and density [kg/m^3]."""
    return Fluid(
        name=name,
        temperature_c=temperature_c,
        density=density,
        rheology=Newtonian(viscosity),
        source=source,
    )
