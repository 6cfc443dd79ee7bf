"""Registry entries of the time-dependent infusion models: compliance and its time solve,
the liquid's compressibility, and drug transport."""

from __future__ import annotations

from rheoline.model.provenance.entry import MODEL as _M
from rheoline.model.provenance.entry import ModelEntry

#: Compliance, slack and break-loose in time; liquid compressibility; drug transport.
TRANSIENT_ENTRIES = (
    ModelEntry(
        "lumped-compliance",
        "Lumped compliance, slack and break-loose of a syringe-pump line, solved in time",
        "pressure and flow in time through a compliant line: start-up, rate changes, occlusion "
        "alarm and bolus",
        "Snijder, R.A., Konings, M.K., Lucas, P., Egberts, T.C., Timmerman, A.D., 'Flow "
        "variability and its physical causes in infusion technology: a systematic review of in "
        "vitro measurement and modeling studies', Biomed. Eng./Biomed. Tech. 60 (2015)",
        "10.1515/bmt-2014-0148",
        "a liquid-filled line; compliance lumped at part boundaries (half of each part's); "
        "liquid inertia neglected; the line's steady pressure-flow law at each instant; slack "
        "taken up once, gliding friction after break-loose borne by the pump",
        {},
        cite="Snijder",
        used_in=(_M + "transient.simulate_infusion", _M + "line_dynamics"),
    ),
    ModelEntry(
        "iapws-95-compressibility",
        "Compressibility of liquid water, IAPWS-95",
        "the compliance of the liquid held by a part whose own compliance is not given",
        "Wagner, W., Pruss, A., 'The IAPWS formulation 1995 for the thermodynamic properties of "
        "ordinary water substance for general and scientific use', J. Phys. Chem. Ref. Data 31 "
        "(2002) 387-535",
        None,
        "one value, 4.5e-10 1/Pa: water at 20-37 degC and 1 atm within 2.5 %",
        {},
        cite="IAPWS-95",
        used_in=(_M + "compliance",),
    ),
    ModelEntry(
        "levenspiel-1999",
        "Levenspiel 1999 residence-time distributions: plug flow, laminar segregated flow",
        "drug transport from a port to the outlet: plug flow, and F = 1 - (tau/2t)^2 of laminar "
        "flow without radial diffusion",
        "Levenspiel, O., Chemical Reaction Engineering, 3rd ed., Wiley, New York (1999)",
        None,
        "laminar tube flow whose radial diffusion is too slow for Taylor-Aris dispersion "
        "(the widest spread: an upper bound of the 90 % delay); a velocity profile of constant "
        "shape",
        {},
        cite="Levenspiel",
        used_in=(_M + "transport.levenspiel_laminar_fraction", _M + "transport.transport_path"),
    ),
    ModelEntry(
        "taylor-1953",
        "Taylor 1953 dispersion of a solute in laminar tube flow",
        "axial spreading of a drug where radial diffusion evens out the profile, "
        "u^2 R^2 / (48 D_m)",
        "Taylor, G.I., 'Dispersion of soluble matter in solvent flowing slowly through a tube', "
        "Proc. R. Soc. Lond. A 219 (1953) 186-203",
        None,
        "residence time much longer than the radial diffusion time, L/u >> R^2/(3.8^2 D_m) "
        "(taken as ten times: radial diffusion number 0.68 or more); small dispersion numbers",
        {"radial_diffusion_number": (10.0 / 3.8317**2, None)},
        cite="Taylor",
        used_in=(_M + "transport.taylor_aris_dispersion",),
    ),
    ModelEntry(
        "aris-1956",
        "Aris 1956 molecular term of Taylor dispersion",
        "adds the molecular diffusivity to Taylor's coefficient, D_m + u^2 R^2 / (48 D_m)",
        "Aris, R., 'On the dispersion of a solute in a fluid flowing through a tube', Proc. R. "
        "Soc. Lond. A 235 (1956) 67-77",
        None,
        "as Taylor 1953",
        {},
        cite="Aris",
        used_in=(_M + "transport.taylor_aris_dispersion",),
    ),
)
