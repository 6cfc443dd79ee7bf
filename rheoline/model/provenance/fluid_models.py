"""Registry entries of the fluid property models: water, solutions, user fits, blood."""

from __future__ import annotations

from rheoline.model.provenance.entry import MODEL as _M
from rheoline.model.provenance.entry import ModelEntry

#: Water, infusion solutions, glycerol mixtures, temperature fits and blood.
FLUID_ENTRIES = (
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
        used_in=(_M + "water.iapws_2008_viscosity", _M + "water.water_viscosity"),
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
        used_in=(_M + "water.kell_1975_water_density",),
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
        used_in=(_M + "solutions.laliberte_2007_viscosity",),
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
        used_in=(_M + "solutions.laliberte_cooper_2004_density",),
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
        used_in=(_M + "solutions.dextrose_5_viscosity",),
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
        used_in=(_M + "solutions.albumin_viscosity",),
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
            _M + "glycerol.glycerol_water_viscosity",
            _M + "glycerol.glycerol_fraction_for_viscosity",
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
        used_in=(_M + "glycerol.glycerol_water_density",),
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
        used_in=(_M + "temperature_fit.fit_viscosity_temperature",),
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
        used_in=(_M + "temperature_fit.fit_viscosity_temperature",),
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
)
