"""Builders of the library fluids: one function per fluid, each recording its models.

Each builder takes ``temperature_c`` (and the fluid's options) and returns a
:class:`~rheoline.model.fluid_base.Fluid` whose ``models_used`` names the provenance keys
(:mod:`rheoline.model.provenance`) of its property models.  :mod:`rheoline.model.fluids`
lists them in :data:`~rheoline.model.fluids.FLUID_LIBRARY` and builds them through
:func:`~rheoline.model.fluids.fluid`, which adds the recipe and the range mask.

Examples
--------
>>> build_water(20.0).models_used
('iapws-2008', 'kell-1975')
>>> blood_builder("whole-blood", 0.45, "typical")(37.0, model="casson").models_used[:5]
('blood-scaling', 'plasma-viscosity-ratio', 'iapws-2008', 'pries-1992', 'merrill-1965')
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model import blood, viscosity
from rheoline.model.fluid_base import Fluid, FluidRecipe
from rheoline.model.rheology import Newtonian

__all__ = [
    "MEDIUM_KEYS",
    "blood_models_used",
    "as_temperature",
    "newtonian_liquid",
    "build_water",
    "build_saline",
    "build_ringers",
    "build_dextrose",
    "albumin_builder",
    "build_plasma",
    "blood_builder",
    "build_glycerol",
]


def as_temperature(temperature_c):
    t = viscosity.check_temperature_c(temperature_c)
    return float(t) if t.ndim == 0 else t


def newtonian_liquid(name, t, mu, rho, source, notes=(), models=()):
    return Fluid(
        name=name,
        temperature_c=as_temperature(t),
        density=rho,
        rheology=Newtonian(mu),
        source=source,
        notes=tuple(notes),
        models_used=models,
    )


#: Provenance keys of the water and electrolyte property models (viscosity first).
_WATER_MODELS = ("iapws-2008", "kell-1975")
_ELECTROLYTE_MODELS = ("laliberte-2007", "iapws-2008", "laliberte-cooper-2004", "kell-1975")


def build_water(temperature_c):
    return newtonian_liquid(
        "water",
        temperature_c,
        viscosity.water_viscosity(temperature_c),
        viscosity.water_density(temperature_c),
        "viscosity IAPWS 2008 (Huber et al. 2009); density Kell 1975",
        models=_WATER_MODELS,
    )


def build_saline(temperature_c):
    return newtonian_liquid(
        "saline-0.9",
        temperature_c,
        viscosity.saline_viscosity(temperature_c),
        viscosity.saline_density(temperature_c),
        "9 g/L NaCl; Laliberte 2007 viscosity, Laliberte & Cooper 2004 density",
        models=_ELECTROLYTE_MODELS,
    )


def build_ringers(temperature_c):
    return newtonian_liquid(
        "lactated-ringers",
        temperature_c,
        viscosity.lactated_ringers_viscosity(temperature_c),
        viscosity.lactated_ringers_density(temperature_c),
        "Laliberte 2007 / Laliberte & Cooper 2004 mixture of NaCl, KCl, CaCl2",
        ("recipe from memory; sodium lactate counted as NaCl of equal sodium",),
        models=_ELECTROLYTE_MODELS,
    )


def build_dextrose(temperature_c):
    return newtonian_liquid(
        "dextrose-5",
        temperature_c,
        viscosity.dextrose_5_viscosity(temperature_c),
        viscosity.dextrose_5_density(temperature_c),
        "water (IAPWS 2008) x relative viscosity 1.13; density 1017 kg/m^3 at 20 degC",
        ("relative viscosity and density from memory",),
        models=("dextrose-5-relative", *_WATER_MODELS),
    )


def albumin_builder(default_concentration, label):
    def build(temperature_c, concentration=default_concentration):
        return newtonian_liquid(
            label,
            temperature_c,
            viscosity.albumin_viscosity(concentration, temperature_c),
            viscosity.albumin_density(concentration, temperature_c),
            "saline (Laliberte 2007) x Mooney relative viscosity of albumin",
            (
                "albumin intrinsic viscosity and crowding coefficient from memory; "
                "an estimate within perhaps 15 %",
            ),
            models=("albumin-mooney", *_ELECTROLYTE_MODELS),
        )

    return build


def build_plasma(temperature_c):
    t = np.asarray(temperature_c, dtype=float)
    mu = blood.plasma_viscosity(t)
    return Fluid(
        name="plasma",
        temperature_c=as_temperature(t),
        density=blood.plasma_density(t),
        rheology=Newtonian(mu),
        hematocrit=None,
        plasma_viscosity=mu,
        source="1.8 x water viscosity (IAPWS 2008); 1025 kg/m^3 at 37 degC",
        notes=("plasma-to-water ratio and density are typical values",),
        models_used=("plasma-viscosity-ratio", *_WATER_MODELS),
    )


#: Provenance keys of the suspending media (:data:`blood.SUSPENDING_MEDIA`).
MEDIUM_KEYS = {"plasma": "plasma-viscosity-ratio", "additive-solution": "additive-solution-medium"}

#: Provenance keys of the shape of each blood rheology model (:data:`blood.BLOOD_RHEOLOGY_MODELS`).
_SHAPE_KEYS = {
    "carreau": ("cho-kensey-1991", "carreau"),
    "carreau-yasuda": ("cho-kensey-1991", "carreau-yasuda"),
    "casson": ("casson",),
    "power-law": ("cho-kensey-1991", "power-law"),
    "newtonian": (),
}
#: What sets the low-shear rise where red cells aggregate (none in an additive solution).
_AGGREGATION_KEYS = {
    "carreau": "wells-merrill-1962",
    "carreau-yasuda": "wells-merrill-1962",
    "power-law": "wells-merrill-1962",
    "casson": "merrill-1965",
}


def blood_models_used(model, medium="plasma"):
    """Provenance keys of a blood fluid built with rheology ``model`` in ``medium``.

    The medium's viscosity (over water), the high-shear viscosity of Pries 1992 at its
    largest tube, the low-shear rise fitted to Wells & Merrill 1962 (Merrill's yield stress
    for Casson) where red cells aggregate, the model's shape, and the density.

    Examples
    --------
    >>> blood_models_used("casson", "additive-solution")
    ('blood-scaling', 'additive-solution-medium', 'iapws-2008', 'pries-1992', 'casson', 'blood-density-mixture', 'kell-1975')
    """
    aggregates = blood.SUSPENDING_MEDIA[medium][1]
    keys = ["blood-scaling", MEDIUM_KEYS[medium], "iapws-2008", "pries-1992"]
    if aggregates and model in _AGGREGATION_KEYS:
        keys.append(_AGGREGATION_KEYS[model])
    return (*keys, *_SHAPE_KEYS[model], "blood-density-mixture", "kell-1975")


def blood_builder(label, default_hematocrit, typical_note, medium="plasma"):
    def build(temperature_c, hematocrit=default_hematocrit, model="carreau"):
        rheology, density, mu_p = blood.blood_properties(hematocrit, temperature_c, model, medium)
        h_b, t_b = np.broadcast_arrays(
            np.asarray(hematocrit, dtype=float), np.asarray(temperature_c, dtype=float)
        )
        notes = [
            f"rheology model {model!r} in {medium}; high shear Pries 1992, shear-thinning "
            "fitted to Wells & Merrill 1962 (see rheoline validate)"
        ]
        if hematocrit is default_hematocrit:
            notes.append(typical_note)
        return Fluid(
            name=label,
            temperature_c=as_temperature(t_b),
            density=density,
            rheology=rheology,
            hematocrit=float(h_b) if h_b.ndim == 0 else h_b,
            plasma_viscosity=mu_p,
            source=f"{medium} x Pries 1992 large bore; Cho & Kensey 1991 shape; "
            "Wells & Merrill 1962 fit",
            notes=tuple(notes),
            models_used=blood_models_used(model, medium),
        )

    return build


def build_glycerol(temperature_c, mass_fraction=None, target_viscosity=None):
    if (mass_fraction is None) == (target_viscosity is None):
        raise InputRangeError(
            "glycerol-water needs exactly one of mass_fraction= (glycerol mass fraction, "
            "e.g. 0.4) or target_viscosity= (Pa s, e.g. 3.5e-3)",
            field="mass_fraction",
            value=mass_fraction,
        )
    if mass_fraction is None:
        mass_fraction = viscosity.glycerol_fraction_for_viscosity(target_viscosity, temperature_c)
    w = np.asarray(mass_fraction, dtype=float)
    mu = viscosity.glycerol_water_viscosity(w, temperature_c)
    rho = viscosity.glycerol_water_density(w, temperature_c)
    label = "glycerol-water"
    notes = (f"glycerol mass fraction {np.round(w, 4).tolist()}",)
    made = newtonian_liquid(
        label,
        temperature_c,
        mu,
        rho,
        "Cheng 2008 viscosity; Volk & Kaehler 2018 density",
        notes,
        models=("cheng-2008", "iapws-2008", "volk-kaehler-2018", "kell-1975"),
    )
    # the recipe keeps the composition mixed, also when asked for by target viscosity
    fraction = float(w) if w.ndim == 0 else w
    return replace(made, recipe=FluidRecipe(label, made.temperature_c, {"mass_fraction": fraction}))
