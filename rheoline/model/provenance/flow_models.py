"""Registry entries of the flow models: lumens, losses, catalogue sizes, blood damage,
uncertainty, vessels, hemodynamics and units."""

from __future__ import annotations

from rheoline.model.conversions import CMH2O, MMHG
from rheoline.model.provenance.entry import MODEL as _M
from rheoline.model.provenance.entry import ModelEntry

#: Lumens and lines, catalogue sizes, hemolysis, tolerance shares, vessels, hemodynamics.
FLOW_ENTRIES = (
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
        used_in=(_M + "losses.hooper_1981_2k_k", _M + "laminar_losses.hooper_1981_inlet_k"),
    ),
    ModelEntry(
        "hooper-1988",
        "Hooper 1988 loss coefficients of sudden contractions and expansions",
        "laminar (and turbulent) step losses between lumens, the model band's alternative to "
        "the constant handbook K",
        "Hooper, W.B., 'Calculate head loss caused by change in pipe size', Chem. Eng. 95 (16) "
        "(1988) 89-92",
        None,
        "contraction: laminar form up to an upstream Re of 2500; expansion: laminar form below "
        "4000; fitted to industrial pipe sizes (infusion bores extrapolate)",
        {},
        cite="Hooper",
        used_in=(
            _M + "laminar_losses.hooper_1988_contraction_k",
            _M + "laminar_losses.hooper_1988_expansion_k",
        ),
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
        "Typical nominal sizes of catheters, sets, cannula walls, central-line lumens and syringe "
        "barrels",
        "catheter bores and lengths by gauge, set bores, cannula walls, central-line lumens, the "
        "barrel bore of a syringe named by its volume",
        "typical nominal values (from memory); intravascular catheters are specified in the "
        "ISO 10555 series, whose tables were not read",
        None,
        "first estimates only: a maker's dimensions differ, measure the bore for a decision",
        {},
        recalled=True,
        cite="from memory",
        used_in=(_M + "parts.Catheter", _M + "parts.Cannula", _M + "catalogue"),
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
        "linear segments (Poiseuille resistances); one connected network; in a branched "
        "line, each branch's own nonlinear law (mass balance at every node, one pressure per "
        "node)",
        {},
        cite="Kirchhoff",
        used_in=(_M + "network", _M + "branched.PartNetwork"),
    ),
    ModelEntry(
        "todini-pilati-1988",
        "Todini & Pilati 1988 global gradient method",
        "node pressures and branch flows of a branched line: Newton's method on the branch "
        "laws and node balances together, from the linearized (laminar) network",
        "Todini, E., Pilati, S., 'A gradient algorithm for the analysis of pipe networks', "
        "in Coulbeck, B., Orr, C.-H. (eds.), Computer Applications in Water Supply, Vol. 1, "
        "Research Studies Press, Letchworth, 1988, pp. 1-20",
        None,
        "steady flow; each branch's pressure-flow law continuous and increasing (a yield "
        "stress is refused); check valves taken as ideal one-way branches; convergence to "
        "1e-11 of the largest flow, flagged where not reached",
        {},
        cite="Todini",
        used_in=(_M + "branched.PartNetwork",),
    ),
    ModelEntry(
        "shah-london-1978",
        "Shah & London 1978 laminar friction of non-circular ducts",
        "laminar f Re and hydraulic diameter of D-shaped, annular, crescent and rectangular "
        "lumens (annulus exact; rectangle and eccentric annulus by their series)",
        "Shah, R.K., London, A.L., 'Laminar Flow Forced Convection in Ducts', Advances in "
        "Heat Transfer, Supplement 1, Academic Press, New York, 1978; Piercy, N.A.V., "
        "Hooper, M.S., Winny, H.F., 'Viscous flow through pipes with cores', Phil. Mag. (7) 15 "
        "(1933) 647-676 (eccentric annulus)",
        None,
        "fully developed laminar flow of a Newtonian fluid; transitional and turbulent flow "
        "use the circle's friction at the hydraulic diameter (approximate); the semicircle's "
        "constant is recalled (from memory, checked against a finite-difference solution)",
        {"reynolds": (0.0, 2300.0)},
        recalled=True,
        cite="Shah & London",
        used_in=(_M + "shapes",),
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
        f"conversions at the edges: 1 mmHg = {MMHG} Pa (the conventional mmHg; SP 811 lists "
        f"1.333 224 E+02 Pa), 1 cmH2O = {CMH2O} Pa, 1 cP = 1 mPa s "
        "(rheoline.model.conversions)",
        "Thompson, A., Taylor, B.N., 'Guide for the Use of the International System of Units "
        "(SI)', NIST Special Publication 811, 2008, Appendix B",
        None,
        "exact or to the digits given",
        {},
        cite="NIST SP 811",
        used_in=(_M + "hemodynamics", _M + "conversions"),
    ),
)
