"""Every public result is a value: frozen, read-only inside, and round-trips through to_dict/from_dict."""

import dataclasses
import json

import numpy as np
import pytest

import ionact as ia
from ionact.conversion import StandardRecipe


def _design():
    return ia.design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, samples=ia.SamplePopulation(ionic_strength=(0, 0.02)),
                              analyte_range=(1e-5, 1e-3), budget=ia.Budget(mv=1.0), solve="none", model="davies")


def _results():
    sol = ia.Solution.from_salts({"NaCl": [0.01, 0.1]})
    one = ia.Solution.from_salts({"NaCl": 0.1})
    d = _design()
    return {
        "solution": sol,
        "activity_coefficients": ia.activity_coefficients(sol, "davies"),
        "mean": ia.mean_activity_coefficient(one, "NaCl", model="pitzer"),
        "comparison": ia.compare_models(one),
        "conversion": ia.concentration_from_activity("F-", [1e-4, 1e-3], matrix=ia.Solution.from_salts({"NaCl": 0.1}),
                                                     model="davies"),
        "standard": ia.standard_for_activity("NaF", "F-", 1e-3, model="davies"),
        "nikolsky": ia.nikolsky_eisenman("NO3-", 1e-4, {"Cl-": (1e-2, 5e-3)}),
        "temperature": ia.temperature_error(1e-4, -1, calibration_temperature=25.0, measurement_temperature=30.0),
        "estimate": ia.ionic_strength_from_conductivity([100.0, 900.0]),
        "design": d,
        "check": ia.check_samples({"analyte": [1e-4, 5e-3], "ionic_strength": [0.01, 0.01]}, d),
        "comparison_of_adjusters": ia.compare_adjusters({"A": {"(NH4)2SO4": 2.0}}, analyte="NO3-",
                                                        samples=ia.SamplePopulation(ionic_strength=(0, 0.02)),
                                                        analyte_range=(1e-5, 1e-3), budget=ia.Budget(mv=1.0),
                                                        model="davies").rows[0],
    }


@pytest.mark.parametrize("name", sorted(_results()))
def test_round_trip(name):
    r = _results()[name]
    data = json.loads(json.dumps(r.to_dict(), allow_nan=False))  # strict JSON
    back = type(r).from_dict(data)
    assert json.loads(json.dumps(back.to_dict(), allow_nan=False)) == data


@pytest.mark.parametrize("name", ["mean", "nikolsky", "temperature", "estimate", "design", "check"])
def test_frozen(name):
    r = _results()[name]
    with pytest.raises(dataclasses.FrozenInstanceError):
        r.model = "x"  # type: ignore[misc]


def test_arrays_and_mappings_inside_results_are_read_only():
    res = _results()
    with pytest.raises(ValueError):
        res["check"].error_mv[0] = 0.0
    with pytest.raises(TypeError):
        res["nikolsky"].contributions["Cl-"] = 0.0  # type: ignore[index]
    with pytest.raises(ValueError):
        res["solution"].molality_array[0, 0] = 1.0
    assert isinstance(res["standard"], StandardRecipe) and np.isfinite(res["standard"].grams_per_litre)


def test_batch_results_display_briefly():
    # a 20 000-sample result is a line in a console and a small table in a notebook
    import warnings

    import ionact as ia

    n = 20_000
    sol = ia.Solution({"Na+": np.full(n, 0.1), "Cl-": np.full(n, 0.1)})
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ia.ValidityRangeWarning)
        cal = ia.calibrate("F-", [1e-5, 1e-4, 1e-3, 1e-2], [120.1, 61.0, 2.1, -56.9], model="davies")
        design = ia.design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, samples=ia.SamplePopulation(ionic_strength=(0, 0.05)),
                                    analyte_range=(1e-5, 1e-3), budget=ia.Budget(mv=1.0), solve="none",
                                    model="davies")
        results = [
            ia.activity_coefficients(sol, "davies"),
            ia.speciate(sol, model="davies", pH=7.0),
            ia.quantify(cal, np.linspace(0.0, 100.0, n)),
            ia.activity_from_concentration("F-", np.full(n, 1e-4), model="davies"),
            ia.ionic_strength_from_conductivity(np.full(n, 500.0)),
            ia.check_samples({"analyte": [1e-4] * n, "ionic_strength": [0.01] * n}, design),
            cal,
            design,
        ]
    for r in results:
        assert len(repr(r)) < 1200, type(r).__name__
        assert 0 < len(r._repr_html_()) < 20_000, type(r).__name__
