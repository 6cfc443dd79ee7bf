"""The :class:`Fluid` object every other layer consumes.

A fluid is a density and a rheology model at a temperature.  All three may be
arrays (one entry per scenario); they broadcast together.  The named fluid
library (:mod:`rheoline.model.fluids`) builds these; users may build their own.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from rheoline.model.rheology import Newtonian, RheologyModel
from rheoline.model.validation import check_positive

__all__ = ["Fluid", "newtonian_fluid"]


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

    def __post_init__(self):
        rho = check_positive("density", self.density, "kg/m^3")
        object.__setattr__(self, "density", float(rho) if rho.ndim == 0 else rho)

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
