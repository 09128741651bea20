"""One path: conversion, activity coefficients, adjuster design and batch check give the same γ
for the same treated composition and model."""

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
