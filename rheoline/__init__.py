"""rheoline: flow, pressure and shear estimates for infusion lines and blood vessels.

Engineering estimates, not for clinical decisions: see CAUTIONS.md.

The public names below load on first use, so ``import rheoline`` stays light
(it imports numpy and scipy only when a model is used, and never pandas,
pint, plotly or ipywidgets).

Examples
--------
>>> import rheoline
>>> round(rheoline.water_viscosity(20.0) * 1e3, 3)   # mPa s
1.002
"""

from __future__ import annotations

import importlib

from rheoline.errors import (  # noqa: F401  (light: no third-party imports)
    InputRangeError,
    NetworkError,
    OutputError,
    PackExistsError,
    RangeWarning,
    RegimeWarning,
    RheolineError,
    RheolineWarning,
    ScenarioError,
    UnitError,
)

__version__ = "0.1.0"

#: The short caution every view, export and command-line result carries.
CAUTION = (
    "Engineering estimates, not for clinical decisions. The device maker's labelling, "
    "local protocols and codes, and licensed clinical practice take precedence. See CAUTIONS.md."
)

# public name -> module that defines it.  Add a line here when a module gains a public name.
_LAZY = {
    # fluid properties
    "water_viscosity": "rheoline.model.viscosity",
    "water_density": "rheoline.model.viscosity",
    "glycerol_water_viscosity": "rheoline.model.viscosity",
    "glycerol_water_density": "rheoline.model.viscosity",
    "glycerol_fraction_for_viscosity": "rheoline.model.viscosity",
    "blood_viscosity": "rheoline.model.blood",
    "plasma_viscosity": "rheoline.model.blood",
    "pries_1992_relative_viscosity": "rheoline.model.blood",
    "Fluid": "rheoline.model.fluid_base",
    "FluidRecipe": "rheoline.model.fluid_base",
    "newtonian_fluid": "rheoline.model.fluid_base",
    "fluid": "rheoline.model.fluids",
    "fluid_names": "rheoline.model.fluids",
    "user_fluid_from_temperatures": "rheoline.model.fluids",
    "register_fluid": "rheoline.model.fluids",
    "fluid_catalogue": "rheoline.model.fluids",
    "blood_rheology": "rheoline.model.blood",
    "fit_viscosity_temperature": "rheoline.model.fitting",
    # rheology
    "Newtonian": "rheoline.model.rheology",
    "PowerLaw": "rheoline.model.rheology",
    "Carreau": "rheoline.model.rheology",
    "CarreauYasuda": "rheoline.model.rheology",
    "Casson": "rheoline.model.rheology",
    "RHEOLOGY_MODELS": "rheoline.model.rheology",
    "fit_rheology": "rheoline.model.fitting",
    "plate_drag_viscosity": "rheoline.model.fitting",
    # lines
    "poiseuille_flow": "rheoline.model.lumen",
    "Tube": "rheoline.model.parts",
    "Catheter": "rheoline.model.parts",
    "Needle": "rheoline.model.parts",
    "Cannula": "rheoline.model.parts",
    "Fitting": "rheoline.model.parts",
    "MeasuredPart": "rheoline.model.parts",
    "Line": "rheoline.model.line",
    "LineResult": "rheoline.model.line",
    "GRAVITY": "rheoline.model.line",
    "CONDITIONS": "rheoline.model.conditions",
    "REGISTRY": "rheoline.model.provenance",
    "model_entry": "rheoline.model.provenance",
    "poiseuille_pressure_drop": "rheoline.model.lumen",
    "churchill_1977_friction": "rheoline.model.lumen",
    "shah_1978_apparent_friction": "rheoline.model.lumen",
    "circuit_tubing": "rheoline.model.parts",
    "extension_set": "rheoline.model.parts",
    "central_line_lumen": "rheoline.model.parts",
    "giersiepen_1990_hemolysis_index": "rheoline.model.hemolysis",
    "falling_head_delivery_time": "rheoline.model.delivery",
    "pressure_bag_delivery_time": "rheoline.model.delivery",
    "flow_tolerance": "rheoline.model.tolerance",
    "flow_curves": "rheoline.model.curves",
    # vessels and hemodynamics
    "Vessel": "rheoline.model.vessels",
    "vascular_resistance": "rheoline.model.hemodynamics",
    "body_surface_area": "rheoline.model.hemodynamics",
    "systemic_vascular_resistance": "rheoline.model.hemodynamics",
    "pulmonary_vascular_resistance": "rheoline.model.hemodynamics",
    "systemic_vascular_resistance_index": "rheoline.model.hemodynamics",
    "pulmonary_vascular_resistance_index": "rheoline.model.hemodynamics",
    "cardiac_index": "rheoline.model.hemodynamics",
    "pries_1994_relative_viscosity": "rheoline.model.vessels",
    "apparent_blood_viscosity": "rheoline.model.vessels",
    "fahraeus_lindqvist_curve": "rheoline.model.vessels",
    "resistance_vs_radius": "rheoline.model.vessels",
    "resistance_vs_hematocrit": "rheoline.model.vessels",
    "resistance_vs_temperature": "rheoline.model.vessels",
    "resistance_elasticity": "rheoline.model.vessels",
    "infusion_site_context": "rheoline.model.vessels",
    "StenosedVessel": "rheoline.model.stenosis",
    "young_tsai_1973_pressure_drop": "rheoline.model.stenosis",
    "stenosis_flow_fraction_lost": "rheoline.model.stenosis",
    "VesselNetwork": "rheoline.model.network",
    # branched lines and non-circular lumens
    "PartNetwork": "rheoline.model.branched",
    "Branch": "rheoline.model.branched",
    "PressureNode": "rheoline.model.branched",
    "Pump": "rheoline.model.branched",
    "CheckValve": "rheoline.model.parts",
    "multi_lumen_catheter_lumen": "rheoline.model.devices",
    "Semicircle": "rheoline.model.shapes",
    "Annulus": "rheoline.model.shapes",
    "Crescent": "rheoline.model.shapes",
    "Rectangle": "rheoline.model.shapes",
    # units (edge helpers; pint loads on first call)
    "parse_quantity": "rheoline.units",
    "format_quantity": "rheoline.units",
}

__all__ = sorted(
    [
        *_LAZY,
        "CAUTION",
        "__version__",
        "RheolineError",
        "InputRangeError",
        "UnitError",
        "ScenarioError",
        "NetworkError",
        "OutputError",
        "PackExistsError",
        "RheolineWarning",
        "RangeWarning",
        "RegimeWarning",
    ]
)


def __getattr__(name):
    try:
        module = _LAZY[name]
    except KeyError:
        raise AttributeError(f"module 'rheoline' has no attribute {name!r}") from None
    value = getattr(importlib.import_module(module), name)
    globals()[name] = value
    return value


def __dir__():
    return __all__
