import os
import warnings

import pytest
from hypothesis import HealthCheck, settings

# CI runs a fixed, reproducible set of examples (what passes here passes there); local runs
# explore new examples each time.
settings.register_profile("ci", max_examples=60, deadline=None, derandomize=True,
                          suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much])
settings.register_profile("dev", max_examples=60, deadline=None,
                          suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much])
settings.load_profile("ci" if os.environ.get("CI") else "dev")


@pytest.fixture
def no_warnings():
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        yield
