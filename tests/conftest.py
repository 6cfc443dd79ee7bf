"""Shared test configuration."""

import os

from hypothesis import HealthCheck, settings

# A documented example budget: 'ci' for the suite, 'dev' for quick local runs.
settings.register_profile("ci", max_examples=200, deadline=None,
                          suppress_health_check=[HealthCheck.too_slow])
settings.register_profile("dev", max_examples=30, deadline=None)
settings.load_profile(os.environ.get("RHEOLINE_HYPOTHESIS_PROFILE", "ci"))
