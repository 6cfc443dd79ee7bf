"""The registry of named models and correlations: one entry each, read by everything.

Every published method, handbook table and recalled data set the toolkit applies has
one :class:`ModelEntry` in :data:`REGISTRY`, under a stable lowercase key
(``"churchill-1977"``; review packs cite it).  The entry holds the full reference
(with a DOI only where one is known for certain), the validity range in words, and
the same range as data (``ranges``), so that

* the range warnings (:func:`rheoline.model.validation.warn_outside`) read their
  limits from the entry, and a range lives in one place;
* each result records, as ``models_used`` (a tuple of keys in first-use order), the
  entries it actually applied: ``Fluid.models_used``, ``LineResult.models_used``,
  ``DeliveryResult.models_used``, ``ToleranceResult.models_used``,
  ``CurveSet.models_used``, ``Vessel.models_used``;
* review packs, views and docs list exactly those entries (:func:`entries`).

Ranges are keyed by the quantity's argument name and given in SI, except where the
name states its unit (``temperature_c`` in degC, ``cardiac_output_l_min`` in L/min,
``body_surface_area_m2`` in m^2).  ``None`` is an open end.

Examples
--------
>>> model_entry("churchill-1977").title
'Churchill 1977 friction factor, all regimes'
>>> model_entry("iapws-2008").ranges["temperature_c"]
(0.0, 100.0)
>>> merge_models(("iapws-2008", "kell-1975"), ("kell-1975", "hagen-poiseuille"))
('iapws-2008', 'kell-1975', 'hagen-poiseuille')
>>> [e.key for e in entries(("giersiepen-1990",))]
['giersiepen-1990']
"""

from __future__ import annotations

import difflib
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from types import MappingProxyType

from rheoline.errors import InputRangeError

__all__ = ["ModelEntry", "REGISTRY", "model_entry", "entries", "merge_models"]


@dataclass(frozen=True)
class ModelEntry:
    """One named model or correlation.

    Attributes
    ----------
    key : str
        Stable lowercase hyphenated key (``"churchill-1977"``); packs cite it.
    title : str
        Short name with author and year.
    role : str
        What it computes in this toolkit.
    reference : str
        Full citation: authors, title, journal, volume, pages, year.
    doi : str or None
        The DOI where one is known for certain, else None.
    validity : str
        The validity range in words.
    ranges : Mapping[str, tuple]
        Quantity -> (low, high), machine-readable (SI unless the name states the unit);
        None is an open end.  The range warnings read these.
    recalled : bool
        True where parameters or values are recalled rather than read from the source
        ("from memory"): verify before relying on them.
    cite : str
        The words (author and year) a docstring that applies the entry uses to cite it.
    used_in : tuple of str
        Dotted names of the functions or classes that apply it (their docstrings, or
        their module's, cite ``cite``; a test checks).
    """

    key: str
    title: str
    role: str
    reference: str
    doi: str | None
    validity: str
    ranges: Mapping[str, tuple] = field(default_factory=dict)
    recalled: bool = False
    cite: str = ""
    used_in: tuple = ()

    def __post_init__(self):
        object.__setattr__(self, "ranges", MappingProxyType(dict(self.ranges)))


_M = "rheoline.model."

_ENTRIES = (
    # ------------------------------------------------------------------ water and solutions
    ModelEntry(
        "iapws-2008",
        "IAPWS 2008 viscosity of water",
        "viscosity of water, and of the water in solutions, plasma and glycerol mixtures",
        "Huber, M.L., Perkins, R.A., Laesecke, A., Friend, D.G., Sengers, J.V., Assael, M.J., "
        "Metaxa, I.N., Vogel, E., Mares, R., Miyagawa, K., 'New international formulation for "
        "the viscosity of H2O', J. Phys. Chem. Ref. Data 38 (2009) 101-125 (IAPWS R12-08)",
        "10.1063/1.3088050",
        "liquid water at 1 atm, 0-100 degC (the formulation itself spans far wider)",
        {"temperature_c": (0.0, 100.0)},
        cite="Huber",
        used_in=(_M + "viscosity.iapws_2008_viscosity", _M + "viscosity.water_viscosity"),
    ),
    ModelEntry(
        "kell-1975",
        "Kell 1975 density of water",
        "density of water, and the thermal expansion applied to solution and blood densities",
        "Kell, G.S., 'Density, thermal expansivity, and compressibility of liquid water from "
        "0 to 150 degC', J. Chem. Eng. Data 20 (1975) 97-105",
        "10.1021/je60064a005",
        "fitted 0-150 degC; used for liquid water at 1 atm, 0-100 degC",
        {"temperature_c": (0.0, 100.0)},
        cite="Kell",
        used_in=(_M + "viscosity.kell_1975_water_density",),
    ),
    ModelEntry(
        "laliberte-2007",
        "Laliberte 2007 viscosity of aqueous electrolytes",
        "viscosity of 0.9 % saline, lactated Ringer's and the saline of albumin solutions",
        "Laliberte, M., 'Model for calculating the viscosity of aqueous solutions', J. Chem. "
        "Eng. Data 52 (2007) 321-335; coefficients as compiled in Laliberte, J. Chem. Eng. Data "
        "54 (2009) 1725-1760",
        "10.1021/je0604075",
        "0-100 degC; each solute up to the mass fraction of its fitted data "
        "(NaCl 0.26, KCl 0.26, CaCl2 0.51)",
        {"temperature_c": (0.0, 100.0)},
        cite="Laliberte",
        used_in=(_M + "viscosity.laliberte_2007_viscosity",),
    ),
    ModelEntry(
        "laliberte-cooper-2004",
        "Laliberte & Cooper 2004 density of aqueous electrolytes",
        "density of 0.9 % saline, lactated Ringer's and albumin solutions",
        "Laliberte, M., Cooper, W.E., 'Model for calculating the density of aqueous electrolyte "
        "solutions', J. Chem. Eng. Data 49 (2004) 1141-1151",
        "10.1021/je0498659",
        "0-100 degC; each solute up to the mass fraction of its fitted data",
        {"temperature_c": (0.0, 100.0)},
        cite="Laliberte & Cooper",
        used_in=(_M + "viscosity.laliberte_cooper_2004_density",),
    ),
    ModelEntry(
        "dextrose-5-relative",
        "5 % dextrose as water times a relative viscosity (1.13) and density (1017 kg/m^3)",
        "viscosity and density of 5 % dextrose",
        "relative viscosity and density after handbook tables of aqueous D-glucose, values "
        "recalled (from memory); water from IAPWS 2008 and Kell 1975",
        None,
        "0-100 degC; the relative viscosity held constant with temperature (within about 2 % "
        "over 5-40 degC, an assumption)",
        {"temperature_c": (0.0, 100.0)},
        recalled=True,
        cite="1.13",
        used_in=(_M + "viscosity.dextrose_5_viscosity",),
    ),
    ModelEntry(
        "albumin-mooney",
        "Albumin in saline, Mooney 1951 form with recalled coefficients",
        "viscosity of human albumin solutions relative to saline",
        "Mooney, M., 'The viscosity of a concentrated suspension of spherical particles', "
        "J. Colloid Sci. 6 (1951) 162-170; intrinsic viscosity 4.0 mL/g and crowding "
        "coefficient 1.3 mL/g recalled (from memory)",
        None,
        "albumin 0-300 kg/m^3; an estimate within perhaps 15 % at 20-25 % albumin",
        {"concentration": (0.0, 300.0)},
        recalled=True,
        cite="Mooney",
        used_in=(_M + "viscosity.albumin_viscosity",),
    ),
    ModelEntry(
        "cheng-2008",
        "Cheng 2008 viscosity of glycerol-water mixtures",
        "viscosity of glycerol-water bench analogs, and the glycerol fraction for a target",
        "Cheng, N.-S., 'Formula for the viscosity of a glycerol-water mixture', Ind. Eng. Chem. "
        "Res. 47 (2008) 3285-3288",
        "10.1021/ie071349z",
        "glycerol mass fraction 0-1, 0-100 degC",
        {"temperature_c": (0.0, 100.0), "mass_fraction": (0.0, 1.0)},
        cite="Cheng",
        used_in=(
            _M + "viscosity.glycerol_water_viscosity",
            _M + "viscosity.glycerol_fraction_for_viscosity",
        ),
    ),
    ModelEntry(
        "volk-kaehler-2018",
        "Volk & Kaehler 2018 density of glycerol-water mixtures",
        "density of glycerol-water bench analogs",
        "Volk, A., Kaehler, C.J., 'Density model for aqueous glycerol solutions', Exp. Fluids "
        "59 (2018) 75",
        "10.1007/s00348-018-2527-y",
        "fitted 15-30 degC (from memory); used 0-40 degC, where it agrees with CoolProp's "
        "aqueous-glycerol fit within 0.3 % (checked in the tests)",
        {"temperature_c": (0.0, 40.0)},
        cite="Volk & Kaehler",
        used_in=(_M + "viscosity.glycerol_water_density",),
    ),
    ModelEntry(
        "andrade-1930",
        "Andrade 1930 viscosity-temperature law",
        "a user's fluid from viscosities measured at two or more temperatures",
        "Andrade, E.N. da C., 'The viscosity of liquids', Nature 125 (1930) 309-310",
        None,
        "within the measured temperatures (the fit warns outside them)",
        {},
        cite="Andrade",
        used_in=(_M + "fitting.fit_viscosity_temperature",),
    ),
    ModelEntry(
        "vft",
        "Vogel-Fulcher-Tammann viscosity-temperature law",
        "a user's fluid from viscosities measured at three or more temperatures",
        "Vogel, H., Phys. Z. 22 (1921) 645; Fulcher, G.S., J. Am. Ceram. Soc. 8 (1925) 339; "
        "Tammann, G., Hesse, W., Z. Anorg. Allg. Chem. 156 (1926) 245",
        None,
        "within the measured temperatures (the fit warns outside them)",
        {},
        cite="Vogel",
        used_in=(_M + "fitting.fit_viscosity_temperature",),
    ),
    # ------------------------------------------------------------------ blood
    ModelEntry(
        "plasma-viscosity-ratio",
        "Plasma as 1.8 times water, with plasma density 1025 kg/m^3 at 37 degC",
        "viscosity and density of plasma, the suspending medium of the blood models",
        "common practice, no source: a plasma-to-water viscosity ratio of 1.8 (1.24 mPa s at "
        "37 degC, inside the usual normal range 1.10-1.35 mPa s); density recalled (from "
        "memory); water from IAPWS 2008 and Kell 1975",
        None,
        "0-42 degC (refrigerated storage to hyperthermia); plasma follows water's temperature "
        "dependence (an assumption)",
        {"temperature_c": (0.0, 42.0)},
        recalled=True,
        cite="1.8",
        used_in=(_M + "blood.plasma_viscosity", _M + "blood.plasma_density"),
    ),
    ModelEntry(
        "blood-density-mixture",
        "Blood density as a plasma and red-cell mixture (1025 and 1100 kg/m^3 at 37 degC)",
        "density of whole blood and packed red cells",
        "volume-weighted mixture of plasma and red cells; densities recalled (from memory)",
        None,
        "hematocrit 0-0.95, 0-42 degC, scaled with water's thermal expansion",
        {"temperature_c": (0.0, 42.0)},
        recalled=True,
        cite="red cells",
        used_in=(_M + "blood.blood_density",),
    ),
    ModelEntry(
        "blood-scaling",
        "Hematocrit and temperature scaling of the blood rheology models (this toolkit)",
        "blood viscosity at any hematocrit, temperature and medium: high shear = medium x Pries "
        "1992 at its largest tube, zero shear = high shear x (1 + c H) with c fitted to Wells & "
        "Merrill 1962, Cho & Kensey 1991 shapes, temperature through the medium's viscosity",
        "an engineering assumption of this toolkit, anchored at Pries 1992 (high shear), Wells & "
        "Merrill 1962 (shear-thinning, 37 degC) and the medium's viscosity (H = 0); its measured "
        "accuracy is in the validation report (rheoline validate)",
        None,
        "hematocrit 0-0.8, 0-42 degC; the red cells' relative viscosity taken as independent "
        "of temperature",
        {"hematocrit": (0.0, 0.8), "temperature_c": (0.0, 42.0)},
        cite="Cho & Kensey",
        used_in=(_M + "blood.blood_rheology",),
    ),
    ModelEntry(
        "quemada-1978",
        "Quemada 1978 relative viscosity of a concentrated suspension",
        "a concentrated suspension's relative viscosity (a function of the toolkit; the blood "
        "models anchor at Pries 1992 instead)",
        "Quemada, D., 'Rheology of concentrated disperse systems II. A model for non-Newtonian "
        "shear viscosity in steady flows', Rheol. Acta 17 (1978) 632-642",
        "10.1007/BF01522036",
        "hematocrit 0-0.8 (k H below 2, maximum packing)",
        {"hematocrit": (0.0, 0.8), "temperature_c": (0.0, 42.0)},
        cite="Quemada",
        used_in=(_M + "blood.quemada_1978_relative_viscosity",),
    ),
    ModelEntry(
        "cho-kensey-1991",
        "Cho & Kensey 1991 blood parameters (Carreau, Carreau-Yasuda)",
        "shape parameters of the shear-thinning blood models and their anchor at H 0.45, 37 degC",
        "Cho, Y.I., Kensey, K.R., 'Effects of the non-Newtonian viscosity of blood on flows in a "
        "diseased arterial vessel. Part 1: Steady flows', Biorheology 28 (1991) 241-262, "
        "Table 1 (values recalled, from memory)",
        None,
        "human blood near H 0.45 at 37 degC; elsewhere through the toolkit's scaling",
        {"hematocrit": (0.0, 0.8), "temperature_c": (0.0, 42.0)},
        recalled=True,
        cite="Cho & Kensey",
        used_in=(_M + "blood.blood_rheology",),
    ),
    ModelEntry(
        "wells-merrill-1962",
        "Zero-shear amplitude of the blood models fitted to Wells & Merrill 1962",
        "how much blood in plasma thickens at low shear: mu_0 = mu_inf (1 + c H), c per model",
        "Wells, R.E., Merrill, E.W., 'Influence of flow properties of blood upon "
        "viscosity-hematocrit relationships', J. Clin. Invest. 41 (1962) 1591-1598; fitted to "
        "the digitization by H. Mella (2025) packaged in rheoline/validation/data",
        "10.1172/JCI104617",
        "fitted at hematocrit 0.33-0.57, 12-124 1/s, 37 degC; extrapolated elsewhere",
        {"hematocrit": (0.33, 0.57), "shear_rate": (12.0, 124.0)},
        cite="Wells & Merrill",
        used_in=(_M + "blood.blood_zero_shear_viscosity",),
    ),
    ModelEntry(
        "additive-solution-medium",
        "Additive solution of a stored red-cell unit as 1.15 times water",
        "viscosity of the suspending medium of packed red cells (no red-cell aggregation)",
        "a saline-adenine-glucose-mannitol additive solution with some residual plasma; the "
        "ratio 1.15 to water is recalled (from memory), no measured value was found",
        None,
        "0-42 degC, following water's temperature dependence (an assumption)",
        {"temperature_c": (0.0, 42.0)},
        recalled=True,
        cite="additive solution",
        used_in=(_M + "blood.medium_viscosity",),
    ),
    ModelEntry(
        "merrill-1965",
        "Merrill yield stress of blood vs hematocrit",
        "yield stress of the Casson blood model",
        "Merrill, E.W., Gilliland, E.R., Cokelet, G., Shin, H., Britten, A., Wells, R.E., "
        "'Rheology of human blood, near and at zero flow', Biophys. J. 3 (1963) 199-213; "
        "Merrill, E.W. et al., J. Appl. Physiol. 20 (1965) 954-967 (coefficients from memory)",
        None,
        "hematocrit above 0.05; yield stress held independent of temperature",
        {"hematocrit": (0.0, 0.8)},
        recalled=True,
        cite="Merrill",
        used_in=(_M + "blood.merrill_1965_yield_stress",),
    ),
    ModelEntry(
        "carreau",
        "Carreau model",
        "shear-thinning viscosity between a zero- and an infinite-shear plateau",
        "Carreau, P.J., 'Rheological equations from molecular network theories', Trans. Soc. "
        "Rheol. 16 (1972) 99-127; Bird, R.B., Armstrong, R.C., Hassager, O., 'Dynamics of "
        "Polymeric Liquids', Vol. 1, 2nd ed., Wiley, 1987",
        None,
        "any shear rate (both plateaus bounded)",
        {},
        cite="Carreau",
        used_in=(_M + "rheology.Carreau",),
    ),
    ModelEntry(
        "carreau-yasuda",
        "Carreau-Yasuda model",
        "shear-thinning viscosity with the Yasuda exponent a",
        "Yasuda, K., Armstrong, R.C., Cohen, R.E., 'Shear flow properties of concentrated "
        "solutions of linear and star branched polystyrenes', Rheol. Acta 20 (1981) 163-178; "
        "Bird, Armstrong & Hassager 1987",
        None,
        "any shear rate (both plateaus bounded)",
        {},
        cite="Yasuda",
        used_in=(_M + "rheology.CarreauYasuda",),
    ),
    ModelEntry(
        "casson",
        "Casson model",
        "viscosity of a yield-stress fluid (blood at low shear)",
        "Casson, N., in 'Rheology of Disperse Systems', Pergamon, 1959, pp. 84-104",
        None,
        "stress above the yield stress; no flow below it",
        {},
        cite="Casson",
        used_in=(_M + "rheology.Casson",),
    ),
    ModelEntry(
        "power-law",
        "Ostwald-de Waele power law",
        "shear-thinning or thickening viscosity K gamma^(n-1); for blood, the power law "
        "closest to the Carreau curve over 10-10^4 1/s",
        "Bird, R.B., Armstrong, R.C., Hassager, O., 'Dynamics of Polymeric Liquids', Vol. 1, "
        "2nd ed., Wiley, 1987",
        None,
        "no plateaus: departs from real fluids at very low and very high shear (blood fit: "
        "10-10^4 1/s)",
        {},
        cite="power law",
        used_in=(_M + "rheology.PowerLaw",),
    ),
    ModelEntry(
        "pries-1992",
        "Pries 1992 in-vitro apparent viscosity of blood in tubes",
        "the Fahraeus-Lindqvist effect: apparent viscosity vs tube diameter and hematocrit",
        "Pries, A.R., Neuhaus, D., Gaehtgens, P., 'Blood viscosity in tube flow: dependence on "
        "diameter and hematocrit', Am. J. Physiol. 263 (1992) H1770-H1778",
        "10.1152/ajpheart.1992.263.6.H1770",
        "glass tubes 3.3-1978 um, discharge hematocrit up to about 0.9",
        {"diameter": (3.3e-6, 1978e-6)},
        cite="Pries",
        used_in=(
            _M + "blood.pries_1992_relative_viscosity",
            _M + "blood.whole_blood_high_shear_viscosity",
        ),
    ),
    ModelEntry(
        "pries-1994",
        "Pries 1994 in-vivo apparent viscosity of blood in microvessels",
        "apparent viscosity in living microvessels (wall layer free of red cells)",
        "Pries, A.R., Secomb, T.W., Gessner, T., Sperandio, M.B., Gross, J.F., Gaehtgens, P., "
        "'Resistance to blood flow in microvessels in vivo', Circ. Res. 75 (1994) 904-915",
        "10.1161/01.RES.75.5.904",
        "microvessels of the rat mesentery; anchored by the in-vitro data at 3.3-1978 um",
        {"diameter": (3.3e-6, 1978e-6)},
        cite="Pries",
        used_in=(_M + "vessels.pries_1994_relative_viscosity",),
    ),
    # ------------------------------------------------------------------ lumens and lines
    ModelEntry(
        "hagen-poiseuille",
        "Hagen-Poiseuille law",
        "fully developed laminar pressure drop of a lumen or vessel, f = 64/Re",
        "Sutera, S.P., Skalak, R., 'The history of Poiseuille's law', Annu. Rev. Fluid Mech. "
        "25 (1993) 1-19",
        None,
        "steady, fully developed laminar flow (Re below 2300) in a straight rigid circular tube",
        {"reynolds": (0.0, 2300.0)},
        cite="Poiseuille",
        used_in=(_M + "lumen.poiseuille_flow", _M + "lumen.poiseuille_pressure_drop"),
    ),
    ModelEntry(
        "shah-1978",
        "Shah 1978 apparent friction of developing laminar flow",
        "the extra loss of a short lumen whose laminar profile is still developing",
        "Shah, R.K., 'A correlation for laminar hydrodynamic entry length solutions for "
        "circular and noncircular ducts', J. Fluids Eng. 100 (1978) 177-179; Shah, R.K., "
        "London, A.L., 'Laminar Flow Forced Convection in Ducts', Academic Press, 1978",
        "10.1115/1.3448626",
        "laminar flow (Re below 2300) from a uniform inlet profile, any length",
        {"reynolds": (0.0, 2300.0)},
        cite="Shah",
        used_in=(_M + "lumen.shah_1978_apparent_friction",),
    ),
    ModelEntry(
        "churchill-1977",
        "Churchill 1977 friction factor, all regimes",
        "Darcy friction factor of a lumen in transitional and turbulent flow",
        "Churchill, S.W., 'Friction-factor equation spans all fluid-flow regimes', Chem. Eng. "
        "84 (24) (1977) 91-92",
        None,
        "all Reynolds numbers and relative roughnesses; the transitional range (Re 2300-4000) "
        "is an interpolation",
        {},
        cite="Churchill",
        used_in=(_M + "lumen.churchill_1977_friction",),
    ),
    ModelEntry(
        "metzner-reed-1955",
        "Metzner-Reed generalized Reynolds number",
        "Reynolds number and transitional/turbulent friction of a non-Newtonian fluid",
        "Metzner, A.B., Reed, J.C., 'Flow of non-Newtonian fluids - correlation of the laminar, "
        "transition, and turbulent-flow regions', AIChE J. 1 (1955) 434-440",
        None,
        "laminar flow exact; transitional and turbulent friction approximate",
        {},
        cite="Metzner",
        used_in=(_M + "lumen.lumen_pressure_drop",),
    ),
    ModelEntry(
        "rabinowitsch-mooney",
        "Rabinowitsch-Mooney relation for tube flow of any rheology",
        "laminar flow of a non-Newtonian fluid from its wall shear stress (16-point "
        "Gauss-Legendre integral)",
        "Rabinowitsch, B., Z. Phys. Chem. A 145 (1929) 1-26; Mooney, M., J. Rheol. 2 (1931) "
        "210-222",
        None,
        "steady, fully developed laminar flow, no wall slip",
        {},
        cite="Rabinowitsch",
        used_in=(_M + "lumen.rabinowitsch_flow",),
    ),
    ModelEntry(
        "crane-tp410",
        "Crane Technical Paper 410 loss coefficients",
        "entrance, sudden contraction and exit losses of a line, and fitting K from L/D",
        "Crane Co., 'Flow of Fluids Through Valves, Fittings, and Pipe', Technical Paper 410, "
        "2009, pp. A-26..A-29",
        None,
        "turbulent flow; applied as constant K in laminar flow too (a conservative handbook "
        "practice)",
        {},
        cite="Crane",
        used_in=(_M + "losses.crane_sudden_contraction_k", _M + "losses.crane_fitting_k"),
    ),
    ModelEntry(
        "borda-carnot",
        "Borda-Carnot sudden expansion loss (Idelchik)",
        "loss where a lumen widens into the next",
        "Idelchik, I.E., 'Handbook of Hydraulic Resistance', 3rd ed., Begell House, 1996, "
        "diagram 4-1; Crane TP-410 (2009), p. A-26",
        None,
        "turbulent flow; applied in laminar flow as a handbook estimate",
        {},
        cite="Idelchik",
        used_in=(_M + "losses.borda_carnot_expansion_k",),
    ),
    ModelEntry(
        "hooper-1981",
        "Hooper 1981 two-K fitting coefficients",
        "fitting K that rises at low Reynolds number, K = K_1/Re + K_inf (1 + 1 inch/D)",
        "Hooper, W.B., 'The two-K method predicts head losses in pipe fittings', Chem. Eng. "
        "88 (17) (1981) 96-100",
        None,
        "industrial fittings, laminar to turbulent; small bores extrapolate the (1 + 1 inch/D) "
        "term",
        {},
        cite="Hooper",
        used_in=(_M + "losses.hooper_1981_2k_k",),
    ),
    ModelEntry(
        "iso-9626",
        "ISO 9626 hypodermic needle tubing sizes",
        "outer and minimum inner diameters of needles by gauge and wall",
        "ISO 9626:2016, Stainless steel needle tubing for the manufacture of medical devices, "
        "Table 1 (values recalled, from memory)",
        None,
        "needles 14G-30G, regular and thin walls; the minimum bore gives a low flow estimate",
        {},
        recalled=True,
        cite="ISO 9626",
        used_in=(_M + "parts.Needle",),
    ),
    ModelEntry(
        "typical-catalogue",
        "Typical nominal sizes of catheters, sets, cannula walls and central-line lumens",
        "catheter bores and lengths by gauge, set bores, cannula walls, central-line lumens",
        "typical nominal values (from memory); intravascular catheters are specified in the "
        "ISO 10555 series, whose tables were not read",
        None,
        "first estimates only: a maker's dimensions differ, measure the bore for a decision",
        {},
        recalled=True,
        cite="from memory",
        used_in=(_M + "parts.Catheter", _M + "parts.Cannula"),
    ),
    # ------------------------------------------------------------------ blood damage
    ModelEntry(
        "giersiepen-1990",
        "Giersiepen 1990 hemolysis power law",
        "hemolysis index of blood from wall shear stress and residence time",
        "Giersiepen, M., Wurzinger, L.J., Opitz, R., Reul, H., 'Estimation of shear "
        "stress-related blood damage in heart valve prostheses - in vitro comparison of 25 "
        "aortic valves', Int. J. Artif. Organs 13 (1990) 300-306",
        None,
        "constant stress up to 255 Pa, exposure 7-700 ms (from memory); a comparative "
        "indicator only",
        {"shear_stress": (0.0, 255.0), "exposure_time": (0.007, 0.7)},
        recalled=True,
        cite="Giersiepen",
        used_in=(_M + "hemolysis.giersiepen_1990_hemolysis_index",),
    ),
    ModelEntry(
        "leverett-1972",
        "Leverett 1972 red-cell damage threshold (150 Pa)",
        "wall shear stress above which a blood case is flagged as a hemolysis concern",
        "Leverett, L.B., Hellums, J.D., Alfrey, C.P., Lynch, E.C., 'Red blood cell damage by "
        "shear stress', Biophys. J. 12 (1972) 257-273 (threshold recalled, from memory)",
        None,
        "exposures of minutes; shorter exposures tolerate more, so a conservative screen",
        {},
        recalled=True,
        cite="Leverett",
        used_in=(_M + "hemolysis",),
    ),
    # ------------------------------------------------------------------ uncertainty
    ModelEntry(
        "saltelli-2008",
        "First-order variance shares by standardized regression (Saltelli 2008)",
        "which input dominates the spread of a tolerance band",
        "Saltelli, A. et al., 'Global Sensitivity Analysis: The Primer', Wiley, 2008, ch. 1",
        None,
        "accurate when the output is close to a power law of the inputs over the band",
        {},
        cite="Saltelli",
        used_in=(_M + "tolerance",),
    ),
    # ------------------------------------------------------------------ vessels
    ModelEntry(
        "young-tsai-1973",
        "Young & Tsai 1973 stenosis pressure drop",
        "pressure drop across an arterial stenosis (viscous plus expansion terms)",
        "Young, D.F., Tsai, F.Y., 'Flow characteristics in models of arterial stenoses - "
        "I. Steady flow', J. Biomech. 6 (1973) 395-410; '- II. Unsteady flow', J. Biomech. 6 "
        "(1973) 547-559",
        None,
        "axisymmetric model stenoses in steady flow",
        {},
        cite="Young & Tsai",
        used_in=(_M + "stenosis.young_tsai_1973_pressure_drop",),
    ),
    ModelEntry(
        "seeley-young-1976",
        "Seeley & Young 1976 viscous coefficient of a stenosis",
        "viscous coefficient K_v of a stenosis (an option of the Young & Tsai drop)",
        "Seeley, B.D., Young, D.F., 'Effect of geometry on pressure losses across models of "
        "arterial stenoses', J. Biomech. 9 (1976) 439-448",
        None,
        "axisymmetric model stenoses in steady flow",
        {},
        cite="Seeley",
        used_in=(_M + "stenosis",),
    ),
    ModelEntry(
        "kirchhoff-1847",
        "Kirchhoff's laws on a network of resistances",
        "flows and node pressures of a vessel network (scipy.sparse solve)",
        "Kirchhoff, G., 'Ueber die Aufloesung der Gleichungen, auf welche man bei der "
        "Untersuchung der linearen Vertheilung galvanischer Stroeme gefuehrt wird', Ann. Phys. "
        "Chem. 72 (1847) 497-508",
        None,
        "linear segments (Poiseuille resistances); one connected network",
        {},
        cite="Kirchhoff",
        used_in=(_M + "network",),
    ),
    ModelEntry(
        "annulus-poiseuille",
        "Laminar flow in a concentric annulus (Bird, Stewart & Lightfoot 2002)",
        "how much a catheter in a vein raises the vein's resistance",
        "Bird, R.B., Stewart, W.E., Lightfoot, E.N., 'Transport Phenomena', 2nd ed., Wiley, "
        "2002, section 2.4, eq. 2.4-17",
        None,
        "steady laminar Newtonian flow, catheter concentric in the vein",
        {},
        cite="Bird",
        used_in=(_M + "vessels.annulus_resistance_factor",),
    ),
    ModelEntry(
        "catheter-vein-ratio",
        "Catheter-to-vein diameter ratio, flagged above 0.45",
        "context of an infusion site: how much of the vein a catheter fills",
        "common practice, no source",
        None,
        "no prediction of thrombosis or vein injury",
        {"diameter_ratio": (0.0, 0.45)},
        cite="common practice",
        used_in=(_M + "vessels.infusion_site_context",),
    ),
    ModelEntry(
        "vascular-resistance",
        "Vascular resistance, (mean upstream - downstream pressure) / flow",
        "SVR, PVR and their indices in Wood units and dyn s cm^-5",
        "the definition; 1 Wood unit = 1 mmHg min/L = 79.99 dyn s cm^-5 (NIST SP 811 "
        "conversions), commonly rounded to 80",
        None,
        "adult cardiac outputs 0.5-40 L/min and body surface areas 0.2-3.5 m^2 are plausible "
        "(common practice, no source)",
        {"cardiac_output_l_min": (0.5, 40.0), "body_surface_area_m2": (0.2, 3.5)},
        cite="NIST",
        used_in=(_M + "hemodynamics",),
    ),
    ModelEntry(
        "dubois-1916",
        "DuBois & DuBois 1916 body surface area",
        "body surface area from height and weight",
        "DuBois, D., DuBois, E.F., 'A formula to estimate the approximate surface area if "
        "height and weight be known', Arch. Intern. Med. 17 (1916) 863-871",
        None,
        "adults (fitted on nine subjects)",
        {},
        cite="DuBois",
        used_in=(_M + "hemodynamics.dubois_1916_body_surface_area",),
    ),
    ModelEntry(
        "mosteller-1987",
        "Mosteller 1987 body surface area",
        "body surface area from height and weight",
        "Mosteller, R.D., 'Simplified calculation of body-surface area', N. Engl. J. Med. 317 "
        "(1987) 1098",
        "10.1056/NEJM198710223171717",
        "adults and children",
        {},
        cite="Mosteller",
        used_in=(_M + "hemodynamics.mosteller_1987_body_surface_area",),
    ),
    ModelEntry(
        "nist-sp811",
        "NIST SP 811 unit conversions",
        "conversions at the edges: 1 mmHg = 133.322 Pa, 1 cmH2O = 98.0665 Pa, 1 cP = 1 mPa s",
        "Thompson, A., Taylor, B.N., 'Guide for the Use of the International System of Units "
        "(SI)', NIST Special Publication 811, 2008, Appendix B",
        None,
        "exact or to the digits given",
        {},
        cite="NIST SP 811",
        used_in=(_M + "hemodynamics",),
    ),
)

#: Every named model and correlation by key (read-only).  Warnings, results, packs and
#: docs read this one mapping.
REGISTRY: Mapping[str, ModelEntry] = MappingProxyType({e.key: e for e in _ENTRIES})


def model_entry(key: str) -> ModelEntry:
    """The registry entry of ``key``.

    Raises
    ------
    InputRangeError
        For an unknown key, naming the near misses and every known key.

    Examples
    --------
    >>> model_entry("shah-1978").doi
    '10.1115/1.3448626'
    >>> model_entry("churchil-1977")
    Traceback (most recent call last):
    ...
    rheoline.errors.InputRangeError: model 'churchil-1977' is not in the registry; did you mean 'churchill-1977'? ...
    """
    try:
        return REGISTRY[key]
    except (KeyError, TypeError):
        near = difflib.get_close_matches(str(key), list(REGISTRY), n=1)
        hint = f"; did you mean {near[0]!r}?" if near else ""
        raise InputRangeError(
            f"model {key!r} is not in the registry{hint} Known: {', '.join(REGISTRY)}",
            field="key",
            value=key,
        ) from None


def entries(keys: Iterable[str]) -> tuple[ModelEntry, ...]:
    """The entries of ``keys`` in the order given (duplicates dropped).

    Examples
    --------
    >>> [e.title for e in entries(["kell-1975", "kell-1975"])]
    ['Kell 1975 density of water']
    """
    return tuple(model_entry(k) for k in dict.fromkeys(keys))


def merge_models(*groups: Iterable[str]) -> tuple[str, ...]:
    """The union of several ``models_used`` tuples, in first-use order.

    Examples
    --------
    >>> merge_models(("a",), ("b", "a"), ())
    ('a', 'b')
    """
    return tuple(dict.fromkeys(k for group in groups for k in group))
