"""Activity ↔ concentration in a matrix, and electrode arithmetic."""

import math
import warnings

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

import ionact as ia
from ionact.conversion import (
    activity_from_concentration,
    activity_from_px,
    concentration_from_activity,
    px_from_activity,
    standard_for_activity,
)
from ionact.electrode import mv_to_relative_error, nikolsky_eisenman, relative_error_to_mv, temperature_error
from ionact.errors import InputError, UnknownSpeciesError


def test_davies_hand_calculation_na_in_kcl():
    # Na+ at 0.01 mol/kg (with Cl-) in 0.05 mol/kg KCl, 25 °C, Davies, by hand:
    #   I = 0.05 + 0.01 = 0.06; √I = 0.2449490; √I/(1+√I) = 0.1967542; − 0.3·0.06 → 0.1787542
    #   A(25 °C) = 0.510802 (this library, from Kell 1975 and Malmberg & Maryott 1956)
    #   log10 γ = −0.510802 × 0.1787542 = −0.0913080; γ = 0.810386; a = 0.00810386
    matrix = ia.Solution.from_salts({"KCl": 0.05})
    r = activity_from_concentration("Na+", 0.01, matrix=matrix, model="davies")
    assert r.gamma == pytest.approx(0.810386, abs=1e-6)
    assert r.activity == pytest.approx(0.00810386, rel=1e-6)
    back = concentration_from_activity("Na+", 0.00810386, matrix=matrix, model="davies")
    assert back.molality == pytest.approx(0.01, rel=1e-6)
    assert back.counter_ion == "Cl-" and back.ionic_strength == pytest.approx(0.06, rel=1e-6)


matrices = st.builds(
    lambda na, ca, no3: ia.Solution.from_salts({"NaCl": na, "CaCl2": ca, "KNO3": no3}),
    st.floats(0, 0.3), st.floats(0, 0.05), st.floats(0, 0.2),
)


@given(matrices, st.floats(1e-7, 0.3), st.sampled_from(["F-", "NO3-", "Ca^2+", "K+", "NH4+"]),
       st.sampled_from(["davies", "extended", "sit", "auto", "truesdell-jones"]))
def test_round_trip(matrix, m, ion, model):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ia.ValidityRangeWarning)
        if ion in matrix.ions:
            return
        try:
            fwd = activity_from_concentration(ion, m, matrix=matrix, model=model, missing="zero")
        except ia.MissingParameterError:
            return
        back = concentration_from_activity(ion, fwd.activity, matrix=matrix, model=model, missing="zero")
    assert back.molality == pytest.approx(m, rel=1e-9)
    assert back.model == fwd.model


def test_vectorised_over_activities_and_batch_matrix():
    a = np.geomspace(1e-6, 1e-2, 7)
    r = concentration_from_activity("F-", a, model="davies")
    assert r.molality.shape == (7,)
    for k in (0, 6):
        one = concentration_from_activity("F-", a[k], model="davies")
        assert r.molality[k] == pytest.approx(one.molality, rel=1e-11)
    batch = ia.Solution.from_salts({"NaCl": np.array([0.0, 0.01, 0.1])})
    rb = concentration_from_activity("F-", 1e-4, matrix=batch, model="davies")
    assert rb.molality.shape == (3,)
    assert rb.molality[2] > rb.molality[1] > rb.molality[0]


def test_units_out_and_in():
    r = activity_from_concentration("NO3-", "10 mg/L as N", model="davies")
    assert r.concentration("mg/L as N") == pytest.approx(10.0, rel=1e-12)
    # 1 mg/L NO3-N = 4.427 mg/L NO3- (common practice)
    assert r.concentration("mg/L") == pytest.approx(10.0 * 4.4268, rel=1e-3)
    r = concentration_from_activity("F-", 1e-4, model="davies")
    assert r.concentration("mg/L") == pytest.approx(r.molality * r.solution.water_per_litre * 18998.4, rel=1e-4)


def test_px_round_trip():
    assert px_from_activity(activity_from_px(4.25)) == pytest.approx(4.25)
    with pytest.raises(InputError):
        px_from_activity(0.0)


def test_standard_for_activity():
    r = standard_for_activity("CaCl2", "Ca^2+", 1e-3, model="davies")
    g = ia.models.davies(2, 3 * r.salt_molality)
    assert r.salt_molality * g == pytest.approx(1e-3, rel=1e-9)
    assert r.grams_per_kg_water == pytest.approx(r.salt_molality * 110.98, rel=1e-3)  # M(CaCl2), common practice
    with pytest.raises(InputError, match="not one of"):
        standard_for_activity("NaCl", "F-", 1e-3)


@pytest.mark.parametrize(
    "kwargs,err,fragment",
    [
        (dict(analyte="Na+", activity=-1e-3), InputError, "-0.001"),
        (dict(analyte="Na+", activity=0.0), InputError, "positive"),
        (dict(analyte="Na+", activity=float("nan")), InputError, "nan"),
        (dict(analyte="Xe+", activity=1e-3), UnknownSpeciesError, "Xe+"),
        (dict(analyte="Qq+", activity=1e-3), InputError, "Qq"),
        (dict(analyte="Na+", activity=1e-3, counter_ion="K+"), InputError, "same sign"),
        (dict(analyte="F-", activity=1e-3, counter_ion="Cl-"), InputError, "opposite"),
        (dict(analyte="Na+", activity=0.5, model="limiting"), InputError, "largest reachable activity"),
    ],
)
def test_bad_input(kwargs, err, fragment):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ia.ValidityRangeWarning)
        with pytest.raises(err) as info:
            concentration_from_activity(**kwargs)
    assert fragment in str(info.value)


def test_analyte_in_matrix_refused():
    with pytest.raises(InputError, match="already contains"):
        concentration_from_activity("Na+", 1e-3, matrix=ia.Solution.from_salts({"NaCl": 0.1}))


# Nernst slope S = ln(10) R T / F with CODATA 2018 exact constants; 59.16 mV at 25 °C (common practice)
@pytest.mark.parametrize("t,s", [(0.0, 54.199), (25.0, 59.159), (37.0, 61.540)])
def test_nernst_slopes(t, s):
    assert ia.nernst_slope(1, t) == pytest.approx(s, abs=1e-3)


def test_mv_relative_error_rules_of_thumb():
    # 1 mV ≈ 3.9 % for a monovalent ion and ≈ 8 % for a divalent one (common practice)
    assert mv_to_relative_error(1.0, 1) == pytest.approx(0.039, abs=0.001)
    assert mv_to_relative_error(1.0, 2) == pytest.approx(0.08, abs=0.002)
    assert relative_error_to_mv(mv_to_relative_error(0.37, -2), -2) == pytest.approx(0.37)


def test_nikolsky_eisenman_hand_case():
    # a_app = a_i + K a_j^(z_i/z_j): 1e-4 + 5e-3 × 1e-2 = 1.5e-4 → +50 %, ΔE = −59.159·log10(1.5) mV
    r = nikolsky_eisenman("NO3-", 1e-4, {"Cl-": (1e-2, 5e-3)})
    assert r.apparent_activity == pytest.approx(1.5e-4)
    assert r.bias_mv == pytest.approx(-59.159 * math.log10(1.5), rel=1e-4)
    # divalent primary, monovalent interferent: exponent z_i/z_j = 2
    r = nikolsky_eisenman("Ca^2+", 1e-3, {"Na+": (0.1, 1e-3)})
    assert r.apparent_activity == pytest.approx(1e-3 + 1e-3 * 0.01)
    with pytest.raises(InputError, match="same sign"):
        nikolsky_eisenman("F-", 1e-4, {"Na+": (0.1, 1e-3)})
    with pytest.raises(InputError, match="≥ 0"):
        nikolsky_eisenman("F-", 1e-4, {"OH-": (1e-5, -1)})


def test_temperature_error():
    # calibrated and measured at the same temperature: no error
    e = temperature_error(1e-3, 1, calibration_temperature=25.0, measurement_temperature=25.0, ionic_strength=0.1)
    assert e.error_percent == pytest.approx(0.0, abs=1e-12)
    # at the isopotential point only γ changes
    e = temperature_error(1.0, 1, calibration_temperature=20.0, measurement_temperature=30.0, ionic_strength=0.1)
    assert e.activity_ratio == pytest.approx(1.0)
    g = ia.models.davies(1, 0.1, 30.0) / ia.models.davies(1, 0.1, 20.0)
    assert e.concentration_ratio == pytest.approx(g)


@pytest.mark.parametrize("model", ["limiting", "guntelberg", "davies", "bates-guggenheim"])
def test_single_charge_forms_and_their_slopes(model):
    # the analytic log10 γ of a singly charged ion equals the model's own value, and its
    # derivative equals a central difference (the conversion's Newton relies on both)
    from ionact.models.debye_huckel import unit_log_gamma

    i = np.geomspace(1e-4, 0.5, 30)
    a = ia.water.debye_huckel_a(25.0)
    f, df = unit_log_gamma(model, i, a)
    own = getattr(ia.models, model.replace("-", "_"))(1, i, 25.0)
    np.testing.assert_allclose(10**f, own, rtol=1e-13)
    h = i * 1e-6
    numeric = (unit_log_gamma(model, i + h, a)[0] - unit_log_gamma(model, i - h, a)[0]) / (2 * h)
    np.testing.assert_allclose(df, numeric, rtol=1e-6)


@pytest.mark.parametrize("analyte", ["F-", "Ca^2+"])
def test_fast_conversion_equals_the_general_path(analyte):
    # Newton with the analytic derivative (free ions, a model of charge and I alone) and the
    # general root finder through the whole evaluation path agree to 1e-12
    from ionact import conversion as cv

    acts = np.geomspace(1e-7, 0.01, 200)
    mat = ia.Solution.from_salts({"KNO3": np.geomspace(1e-4, 0.3, 200)})
    an = ia.species.resolve_ion(analyte)
    p = cv._problem(an, cv._counter(an, None), mat, acts.shape, None, False, None, None)
    name, opts, fb = cv.choice_for("davies")
    choice = cv._choose(p, name, opts, fb, acts)
    fast = cv._solve_by_charge(p, choice, np.log(acts))
    assert fast is not None and bool(np.all(fast[1]))
    general, ok = cv._solve_general(p, choice, np.log(acts))
    assert bool(np.all(ok))
    np.testing.assert_allclose(np.exp(fast[0]), np.exp(general), rtol=1e-12)


def test_fast_conversion_steps_aside_where_ions_react():
    from ionact import conversion as cv

    an = ia.species.resolve_ion("F-")
    p = cv._problem(an, cv._counter(an, None), None, (3,), None, None, None, None)  # NaF pairs: speciated
    name, opts, fb = cv.choice_for("davies")
    acts = np.array([1e-5, 1e-4, 1e-3])
    assert cv._solve_by_charge(p, cv._choose(p, name, opts, fb, acts), np.log(acts)) is None
