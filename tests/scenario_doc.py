"""A shared scenario document for the scenario-file tests.

Used by tests/test_scenario_files.py, tests/test_scenario_files_fuzz.py and
tests/test_scenario_description.py.
"""

# Conversion factors from NIST SP 811 (2008), Appendix B.8: 1 mmHg = 133.3224 Pa,
# 1 cmH2O = 98.0665 Pa; 1 mL/min = 1e-6 m^3 / 60 s by definition of the litre.
MMHG_PA = 133.3224


def one(**fields):
    """A valid one-scenario document (plain data) with ``fields`` overriding the defaults."""
    scenario = {
        "name": "case",
        "fluid": "water",
        "head": "1 m",
        "part": [{"type": "catheter", "gauge": 18}],
    }
    scenario.update(fields)
    scenario = {k: v for k, v in scenario.items() if v is not None}
    return {"format_version": 1, "scenario": [scenario]}
