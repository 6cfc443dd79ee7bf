"""Typical nominal dimensions of infusion and vascular-access parts.

Makers' dimensions differ; every value here is a *typical nominal* value for a
first estimate, recalled rather than read from a data sheet where marked
"from memory".  Every part accepts the user's measured inner diameter and
length instead, which should be preferred for any decision.

Tables (SI metres)
------------------
:data:`CATHETER_GAUGES`
    Peripheral intravenous catheters 14G-26G: outer diameter, typical inner
    diameter, typical length (from memory), and the typical labelled gravity flow of
    water [m^3/s] (from memory; used only by tests as a wide-band plausibility check).
:data:`NEEDLE_GAUGES`
    Hypodermic needle tubing per ISO 9626: nominal outer diameter (mid-range) and the
    minimum inner diameter for regular and thin walls (from memory; verify against
    ISO 9626:2016 Table 1).  The minimum inner diameter gives a low flow estimate.
:data:`CIRCUIT_TUBING`
    Extracorporeal circuit tubing by nominal inch size (1/4, 3/8, 1/2 inch inner
    diameter): exact by definition of the size.
:data:`EXTENSION_SETS`
    Administration and extension set tubing bores (typical, from memory).
:data:`CENTRAL_LINE_LUMENS`
    Gauge-equivalent lumens of multi-lumen central venous catheters (typical, from
    memory); one lumen is modelled at a time.
:data:`MULTI_LUMEN_CATHETERS`
    Multi-lumen catheters whose lumen cross-sections are known in shape: double-D
    (two D-shaped lumens back to back) dialysis and apheresis catheters, and a coaxial
    catheter whose outer lumen is an annulus (typical sizes, from memory).
:data:`CANNULA_TYPICAL_WALL`
    Typical wall thickness of cannulas and sheaths given by French size (from memory).
:data:`SYRINGE_BARRELS`
    Typical barrel bores of single-use syringes by nominal volume (from memory), for a
    stopper's break-loose force as a pressure.
"""

from __future__ import annotations

__all__ = [
    "CATHETER_GAUGES",
    "NEEDLE_GAUGES",
    "NEEDLE_WALLS",
    "CIRCUIT_TUBING",
    "EXTENSION_SETS",
    "CENTRAL_LINE_LUMENS",
    "MULTI_LUMEN_CATHETERS",
    "CANNULA_TYPICAL_WALL",
    "FRENCH_TO_METRE",
    "SYRINGE_BARRELS",
]

_MM = 1e-3
_ML_PER_MIN = 1e-6 / 60.0

#: gauge -> (outer diameter, inner diameter, length [m], labelled gravity flow [m^3/s]);
#: typical nominal values of peripheral IV catheters, from memory.
CATHETER_GAUGES = {
    14: (2.1 * _MM, 1.70 * _MM, 45 * _MM, 300 * _ML_PER_MIN),
    16: (1.7 * _MM, 1.35 * _MM, 45 * _MM, 200 * _ML_PER_MIN),
    18: (1.3 * _MM, 1.00 * _MM, 45 * _MM, 95 * _ML_PER_MIN),
    20: (1.1 * _MM, 0.80 * _MM, 32 * _MM, 60 * _ML_PER_MIN),
    22: (0.9 * _MM, 0.64 * _MM, 25 * _MM, 35 * _ML_PER_MIN),
    24: (0.7 * _MM, 0.50 * _MM, 19 * _MM, 22 * _ML_PER_MIN),
    26: (0.6 * _MM, 0.41 * _MM, 19 * _MM, 14 * _ML_PER_MIN),
}

#: Wall types of ISO 9626 and the column they use in :data:`NEEDLE_GAUGES`.
NEEDLE_WALLS = ("regular", "thin")

#: gauge -> (nominal outer diameter, minimum inner diameter regular wall, thin wall) [m];
#: ISO 9626 values, from memory (verify against the standard).
NEEDLE_GAUGES = {
    14: (2.055 * _MM, 1.500 * _MM, 1.700 * _MM),
    15: (1.835 * _MM, 1.300 * _MM, 1.450 * _MM),
    16: (1.645 * _MM, 1.100 * _MM, 1.250 * _MM),
    17: (1.455 * _MM, 0.950 * _MM, 1.156 * _MM),
    18: (1.250 * _MM, 0.790 * _MM, 0.910 * _MM),
    19: (1.065 * _MM, 0.648 * _MM, 0.750 * _MM),
    20: (0.890 * _MM, 0.560 * _MM, 0.635 * _MM),
    21: (0.815 * _MM, 0.490 * _MM, 0.547 * _MM),
    22: (0.714 * _MM, 0.390 * _MM, 0.440 * _MM),
    23: (0.637 * _MM, 0.317 * _MM, 0.370 * _MM),
    24: (0.565 * _MM, 0.280 * _MM, 0.343 * _MM),
    25: (0.515 * _MM, 0.232 * _MM, 0.280 * _MM),
    26: (0.455 * _MM, 0.232 * _MM, 0.280 * _MM),
    27: (0.410 * _MM, 0.184 * _MM, 0.241 * _MM),
    28: (0.360 * _MM, 0.133 * _MM, 0.190 * _MM),
    29: (0.338 * _MM, 0.133 * _MM, 0.190 * _MM),
    30: (0.309 * _MM, 0.133 * _MM, 0.165 * _MM),
}

#: Nominal inch size -> inner diameter [m] (1 inch = 25.4 mm exactly).
CIRCUIT_TUBING = {
    "1/4": 0.25 * 25.4 * _MM,
    "3/8": 0.375 * 25.4 * _MM,
    "1/2": 0.5 * 25.4 * _MM,
}

#: kind -> (inner diameter, typical length [m]); typical, from memory.
EXTENSION_SETS = {
    "gravity-set": (3.0 * _MM, 1.8),
    "standard-extension": (1.5 * _MM, 0.5),
    "small-bore-extension": (1.0 * _MM, 0.15),
    "microbore-extension": (0.5 * _MM, 1.5),
}

#: (french, number of lumens) -> {lumen: gauge-equivalent}, typical length 0.20 m; from memory.
#: The lumens are not circular; the gauge equivalent's inner diameter from
#: :data:`CATHETER_GAUGES` is used as the hydraulic diameter.
CENTRAL_LINE_LUMENS = {
    (7.0, 3): {"distal": 16, "medial": 18, "proximal": 18},
    (7.0, 2): {"distal": 16, "proximal": 18},
    (8.5, 4): {"distal": 14, "medial": 18, "proximal": 18, "fourth": 18},
}

#: kind -> {"french", "length" [m], "lumens": {lumen: (shape key, {dimension: [m]})}}; the
#: shape keys are those of :data:`rheoline.model.shapes.LUMEN_SHAPES`.  Typical cross-sections,
#: from memory: a double-D catheter's two lumens are D-shaped, each about the outer diameter
#: less two walls of some 0.35-0.45 mm across its flat side (the septum is neglected: a
#: slightly large bore); a coaxial catheter's outer lumen is the annulus around its inner tube.
MULTI_LUMEN_CATHETERS = {
    "11.5 Fr double-D": {
        "french": 11.5,
        "length": 0.16,
        "lumens": {
            "arterial": ("d-shaped", {"diameter": 3.0 * _MM}),
            "venous": ("d-shaped", {"diameter": 3.0 * _MM}),
        },
    },
    "13.5 Fr double-D": {
        "french": 13.5,
        "length": 0.20,
        "lumens": {
            "arterial": ("d-shaped", {"diameter": 3.7 * _MM}),
            "venous": ("d-shaped", {"diameter": 3.7 * _MM}),
        },
    },
    "7 Fr coaxial double-lumen": {
        "french": 7.0,
        "length": 0.20,
        "lumens": {
            "inner": ("circle", {"diameter": 0.9 * _MM}),
            "outer": ("annulus", {"outer_diameter": 1.9 * _MM, "inner_diameter": 1.2 * _MM}),
        },
    },
}

#: Typical wall thickness [m] of cannulas/sheaths by French size when the user gives no
#: inner diameter (thin-wall introducer sheaths); typical, from memory.
CANNULA_TYPICAL_WALL = 0.2 * _MM

#: 1 French = 1/3 mm of outer diameter (a definition of the Charriere scale).
FRENCH_TO_METRE = _MM / 3.0

#: Nominal syringe volume [m^3] -> typical barrel bore [m] (the inner diameter the stopper
#: seals, whose area turns a break-loose force into a pressure); typical of single-use
#: syringes, from memory.  Makers differ by a millimetre or more: measure the barrel.
SYRINGE_BARRELS = {
    1e-6: 4.8 * _MM,
    3e-6: 8.7 * _MM,
    5e-6: 12.1 * _MM,
    10e-6: 14.5 * _MM,
    20e-6: 19.1 * _MM,
    30e-6: 21.7 * _MM,
    50e-6: 26.6 * _MM,
}
