"""Shared test settings: hypothesis profiles and solver skip markers.

GDOF_PROFILE=thorough runs many more examples (on demand); CI uses the quick default.
"""

import os

import pytest
from hypothesis import HealthCheck, settings

# quick (CI, the default) is derandomized: the same examples on every run, so that a verdict of CI
# depends on the code alone; thorough explores new examples on every run
settings.register_profile("quick", max_examples=40, deadline=None, derandomize=True,
                          suppress_health_check=[HealthCheck.too_slow])
settings.register_profile("thorough", max_examples=400, deadline=None,
                          suppress_health_check=[HealthCheck.too_slow])
settings.load_profile(os.environ.get("GDOF_PROFILE", "quick"))


def pytest_collection_modifyitems(config, items):
    from verifier.solvers.smt import is_available
    if not is_available("cvc5"):
        skip = pytest.mark.skip(reason="cvc5 backend not installed")
        for item in items:
            if "cvc5" in item.keywords:
                item.add_marker(skip)
