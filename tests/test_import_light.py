"""Importing rheoline and using the fluid layer loads no scenario or widget libraries."""

import json
import subprocess
import sys

HEAVY = ("plotly", "ipywidgets", "pandas", "pint")


def test_model_layer_imports_no_heavy_libraries():
    code = (
        "import sys, json\n"
        "import rheoline\n"
        "rheoline.water_viscosity(20.0)\n"
        "rheoline.fluid('whole-blood', hematocrit=0.45).viscosity(10.0)\n"
        "rheoline.fit_rheology([1.0, 10.0, 100.0], [0.001, 0.01, 0.1], models=['newtonian'])\n"
        f"print(json.dumps([m for m in {HEAVY!r} if m in sys.modules]))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert json.loads(out.stdout.strip().splitlines()[-1]) == []
