"""Viscosity and density of water, infusion solutions and glycerol-water bench analogs.

All functions take temperatures in degrees Celsius, return SI (Pa s, kg/m^3) and
broadcast over numpy arrays.  Outside a correlation's validated range they warn
with :class:`~rheoline.errors.RangeWarning`; impossible input (NaN, below
absolute zero, a mass fraction above 1) raises
:class:`~rheoline.errors.InputRangeError`.

Models
------
* water: IAPWS 2008 viscosity (Huber et al. 2009) at 0.101325 MPa, with the
  density from Kell 1975 (checked against IAPWS-95 in the tests);
* electrolyte infusions (0.9 % sodium chloride, lactated Ringer's): the
  Laliberte 2007 viscosity model and Laliberte & Cooper 2004 density model;
* 5 % dextrose and albumin solutions: relative viscosities scaled on water;
* glycerol-water mixtures: Cheng 2008 viscosity, Volk & Kaehler 2018 density,
  and the inverse (the glycerol fraction that gives a target viscosity).

The functions live in one module per idea, :mod:`rheoline.model.water`,
:mod:`rheoline.model.solutions` and :mod:`rheoline.model.glycerol`; this module
gathers their names (the fluid library and older code import them from here).
"""

from __future__ import annotations

from rheoline.model.glycerol import (
    glycerol_fraction_for_viscosity,
    glycerol_water_density,
    glycerol_water_viscosity,
)
from rheoline.model.solutions import (
    ALBUMIN_CROWDING,
    ALBUMIN_INTRINSIC_VISCOSITY,
    ALBUMIN_PARTIAL_SPECIFIC_VOLUME,
    DEXTROSE_5_DENSITY_20C,
    DEXTROSE_5_RELATIVE_VISCOSITY,
    LACTATED_RINGERS_G_PER_L,
    LALIBERTE_SOLUTES,
    SALINE_0_9_G_PER_L,
    LaliberteSolute,
    albumin_density,
    albumin_viscosity,
    dextrose_5_density,
    dextrose_5_viscosity,
    lactated_ringers_density,
    lactated_ringers_viscosity,
    laliberte_2007_viscosity,
    laliberte_cooper_2004_density,
    saline_density,
    saline_viscosity,
    solution_mass_fractions,
)
from rheoline.model.water import (
    WATER_RANGE_C,
    _water_quiet,  # noqa: F401  (the blood media build on it)
    check_temperature_c,
    iapws_2008_viscosity,
    kell_1975_water_density,
    water_density,
    water_viscosity,
)

__all__ = [
    "WATER_RANGE_C",
    "check_temperature_c",
    "water_viscosity",
    "water_density",
    "kell_1975_water_density",
    "iapws_2008_viscosity",
    "LaliberteSolute",
    "LALIBERTE_SOLUTES",
    "laliberte_2007_viscosity",
    "laliberte_cooper_2004_density",
    "solution_mass_fractions",
    "SALINE_0_9_G_PER_L",
    "LACTATED_RINGERS_G_PER_L",
    "saline_viscosity",
    "saline_density",
    "lactated_ringers_viscosity",
    "lactated_ringers_density",
    "DEXTROSE_5_RELATIVE_VISCOSITY",
    "DEXTROSE_5_DENSITY_20C",
    "dextrose_5_viscosity",
    "dextrose_5_density",
    "ALBUMIN_INTRINSIC_VISCOSITY",
    "ALBUMIN_CROWDING",
    "ALBUMIN_PARTIAL_SPECIFIC_VOLUME",
    "albumin_viscosity",
    "albumin_density",
    "glycerol_water_viscosity",
    "glycerol_water_density",
    "glycerol_fraction_for_viscosity",
]
