"""Shared test configuration."""

import os

from hypothesis import HealthCheck, settings

# A documented example budget: 'ci' for the suite (200 examples a property), 'dev' for quick
# local runs. Under CI (the CI variable set) the examples are derandomized, so a landing run is
# reproducible; local runs draw new examples each time and keep finding new cases.
settings.register_profile(
    "ci",
    max_examples=200,
    deadline=None,
    suppress_health_check=[HealthCheck.too_slow],
    derandomize=bool(os.environ.get("CI")),
)
settings.register_profile("dev", max_examples=30, deadline=None)
settings.load_profile(os.environ.get("RHEOLINE_HYPOTHESIS_PROFILE", "ci"))
