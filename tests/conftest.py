import warnings

import pytest
from hypothesis import settings

settings.register_profile("ci", max_examples=60, deadline=None)
settings.load_profile("ci")


@pytest.fixture
def no_warnings():
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        yield
