"""Every public function documents each parameter, what it returns, what it raises, where its
formula comes from, and an example (the examples run as doctests) — checked with numpydoc's
validator and docstring parser."""

from __future__ import annotations

import importlib
import inspect

import pytest
from numpydoc.docscrape import FunctionDoc
from numpydoc.validate import validate

MODULES = ["ionact", "ionact.models", "ionact.calibration", "ionact.water", "ionact.units", "ionact.electrode"]
# numpydoc codes that must not occur: a parameter undocumented (PR01), documented but not in the
# signature (PR02), without a description (PR07); no Returns section (RT01) or no description of
# the return value (RT03); no Examples section (EX01)
REQUIRED = {"PR01", "PR02", "PR07", "RT01", "RT03", "EX01"}
# functions that compute nothing from the literature (parsing, registries, switches): no References
NO_SOURCE = {
    "ionact.register_ion", "ionact.strict", "ionact.compare_models", "ionact.compare_adjusters",
    "ionact.check_samples", "ionact.models.get_model", "ionact.models.model_names",
    "ionact.units.parse_amount", "ionact.units.convert_amount", "ionact.units.format_amount",
    "ionact.units.parse_scalar", "ionact.units.temperature_celsius", "ionact.water.checked_temperature",
    "ionact.calibration.measurement_for", "ionact.quantify", "ionact.design_adjuster",
    "ionact.ionic_strength_from_tds",
}
# functions that cannot fail on their arguments
NO_RAISES = {"ionact.models.model_names", "ionact.water.dh_a_array", "ionact.water.dh_b_array"}


def _public_functions() -> dict[str, object]:
    seen: dict[int, str] = {}
    out: dict[str, object] = {}
    for mod_name in MODULES:
        mod = importlib.import_module(mod_name)
        for name in getattr(mod, "__all__", []):
            obj = getattr(mod, name)
            if not inspect.isfunction(obj) or id(obj) in seen:
                continue
            seen[id(obj)] = f"{mod_name}.{name}"
            out[f"{mod_name}.{name}"] = obj
    return out


FUNCTIONS = _public_functions()


def test_the_public_functions_are_many():
    assert len(FUNCTIONS) > 50


@pytest.mark.parametrize("name", sorted(FUNCTIONS))
def test_numpydoc_sections(name):
    errors = [f"{code}: {msg}" for code, msg in validate(name)["errors"] if code in REQUIRED]
    assert errors == []


@pytest.mark.parametrize("name", sorted(FUNCTIONS))
def test_raises_and_references(name):
    doc = FunctionDoc(FUNCTIONS[name])
    missing = []
    if name not in NO_RAISES and not doc["Raises"]:
        missing.append("Raises")
    if name not in NO_SOURCE and not doc["References"]:
        missing.append("References")
    assert missing == []
