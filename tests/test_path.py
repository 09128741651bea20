"""One path: conversion, activity coefficients, adjuster design and batch check give the same γ
for the same treated composition and model."""

import warnings

import numpy as np
import pytest

import ionact as ia


def test_one_gamma_for_one_treated_composition():
    r = 0.05  # 5 mL of 1 mol/L NaCl stock per 100 mL
    d = ia.design_adjuster("F-", {"NaCl": 1.0}, samples=ia.SamplePopulation(ionic_strength=(0.0, 0.01)),
                           analyte_range=(1e-5, 1e-3), budget=ia.Budget(mv=2.0), volume_ratio=r, solve="none",
                           model="davies", standard_salt="NaF")
    j = len(d.gamma_profile["labels"]) - 1  # the sample at I = 0.01 mol/kg of NaCl
    assert d.gamma_profile["ionic_strength"][j] == pytest.approx(0.01)
    c_f = 1e-5  # the lowest analyte level, mol/L in the untreated sample
    # the same treated composition built by hand, in mol/L, through the one density model
    sample = ia.Solution.from_salts({"NaCl": 0.01})
    c_nacl = 0.01 * sample.water_per_litre
    treated = {"Na+": (c_nacl + c_f + r * 1.0) / (1 + r), "Cl-": (c_nacl + r * 1.0) / (1 + r), "F-": c_f / (1 + r)}
    sol = ia.Solution({k: f"{v!r} mol/L" for k, v in treated.items()})
    g_activity = ia.activity_coefficients(sol, "davies")["F-"]
    matrix = ia.Solution({"Na+": sol.molality("Na+") - sol.molality("F-"), "Cl-": sol.molality("Cl-")})
    g_conversion = ia.activity_from_concentration("F-", sol.molality("F-"), matrix=matrix, counter_ion="Na+",
                                                  model="davies").gamma
    g_design = d.gamma_profile["gamma_treated"][j]
    g_check = ia.check_samples({"analyte": [c_f], "ionic_strength": [0.01]}, d, dilutions=(1,)).gamma[0]
    np.testing.assert_allclose([g_conversion, g_design, g_check], g_activity, rtol=1e-10)


@pytest.mark.parametrize("model", ["limiting", "guntelberg", "davies", "bates-guggenheim"])
def test_one_model_evaluation_per_charge_number_equals_every_ion(model):
    # a model of z² and I alone is evaluated for one ion per z² (and each neutral species) and
    # copied to the others; every ion's γ must equal the model evaluated for that ion on its own
    # (the public single-ion function of the same model), and each ion's array is its own
    rng = np.random.default_rng(4)
    k = rng.uniform(0.001, 0.3, 50)
    sol = ia.Solution({"Na+": k, "K+": k / 3, "Ca^2+": k / 5, "Cl-": k * 1.2, "SO4^2-": k / 4, "PO4^3-": k / 50,
                       "CH3COOH": k / 10}, temperature=30.0, balance="Cl-")
    with warnings.catch_warnings():  # the limiting law is used beyond its range here, on purpose
        warnings.simplefilter("ignore", ia.ValidityRangeWarning)
        g = ia.activity_coefficients(sol, model, equilibrium=False, setschenow=0.1)
    single = getattr(ia.models, model.replace("-", "_"))
    for ion, z in [("Na+", 1), ("K+", 1), ("Ca^2+", 2), ("Cl-", -1), ("SO4^2-", -2), ("PO4^3-", -3)]:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", ia.ValidityRangeWarning)
            want = single(z, np.asarray(sol.ionic_strength), 30.0)
        np.testing.assert_allclose(g[ion], want, rtol=1e-13)
    np.testing.assert_allclose(g["CH3COOH"], 10 ** (0.1 * np.asarray(sol.ionic_strength)), rtol=1e-13)
    g["Na+"][0] = -1.0
    assert g["K+"][0] != -1.0 and g["Cl-"][0] != -1.0


def test_evaluating_some_species_only_for_models_of_the_charge():
    from ionact.errors import InputError
    from ionact.models.registry import Batch, get_model
    from ionact.models.resolver import choice_for, evaluate, resolve_model

    sol = ia.Solution({"Na+": 0.1, "Cl-": 0.1})
    b = Batch.of(tuple(sol.ion(n) for n in sol.ions), sol.molality_array.reshape(2, 1), np.array([25.0]))
    name, opts, fallback = choice_for("pitzer")
    with pytest.raises(InputError, match="depends on more than the charge"):
        evaluate(resolve_model(b, name, options=opts, fallback=fallback), b, rows=[0])
    assert get_model("davies").charge_only


@pytest.mark.parametrize("rows", [[0], [1, 2], [0, 2, 4], [4, 1], [0, 1, 3]])
def test_batch_take_keeps_the_rows_asked_for(rows):
    from ionact.models.registry import Batch

    sol = ia.Solution({"Na+": [0.1, 0.2], "K+": [0.01, 0.02], "Ca^2+": [0.03, 0.01], "Cl-": [0.17, 0.22],
                       "NO3-": [0.01, 0.02]}, balance="Cl-")
    b = Batch.of(tuple(sol.ion(n) for n in sol.ions), sol.molality_array.reshape(5, -1), np.array([25.0, 25.0]))
    t = b.take(rows)
    assert t.names == tuple(b.names[i] for i in rows)
    np.testing.assert_array_equal(t.m, b.m[rows])
    np.testing.assert_array_equal(t.z, b.z[rows])
    assert t.ionic is b.ionic
