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

    @property
    def is_newtonian(self) -> bool:
        """True when the rheology model is Newtonian."""
        return bool(self.rheology.is_newtonian)

    @property
    def is_blood(self) -> bool:
        """True for blood and blood products (a hematocrit is set)."""
        return self.hematocrit is not None


def newtonian_fluid(name: str, viscosity, density, temperature_c=20.0, source: str = "user") -> Fluid:
    """A user's Newtonian fluid from a viscosity [Pa s] and density [kg/m^3]."""
    return Fluid(name=name, temperature_c=temperature_c, density=density,
                 rheology=Newtonian(viscosity), source=source)
