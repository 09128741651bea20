"""Calibration, quantitation, standard addition, selectivity and junction potentials.

Synthetic data are generated here from stated parameters (E⁰, slope, background,
selectivity) through the library's own activity path, and the fits must give them back;
formulas are checked against hand calculations written beside each test; the junction
potential against the textbook Henderson value.
"""

import math

import numpy as np
import pytest

import ionact as ia
from ionact.calibration import DriftCheck, measurement_for

C_STD = np.array([1e-6, 3e-6, 1e-5, 3e-5, 1e-4, 3e-4, 1e-3, 1e-2])
E0, S, B = 150.0, -58.6, 2e-6


def _potentials(c, background=0.0, e0=E0, s=S, noise=None):
    a = measurement_for("F-").activity(c)
    e = e0 + s * np.log10(a + background)
    return e if noise is None else e + noise


def test_noise_free_nernstian_fit_recovers_the_parameters():
    c = C_STD[3:]
    cal = ia.calibrate("F-", c, _potentials(c))
    assert cal.fit == "nernst" and cal.status == "ok"
    assert cal.e0_mv == pytest.approx(E0, abs=1e-9) and cal.slope_mv == pytest.approx(S, abs=1e-9)
    theory = ia.nernst_slope(-1, 25.0)
    assert cal.slope_percent == pytest.approx(100 * S / theory, rel=1e-12)
    assert math.isnan(cal.detection_limit)  # no curvature: below the lowest standard
    assert cal.linear_range == (pytest.approx(c.min()), pytest.approx(c.max()))


def test_noise_free_nikolsky_fit_and_the_detection_limit_by_its_definition():
    # the asymptotes E0 + S log a and E0 + S log b meet at a = b: the IUPAC detection limit, to 1e-6
    cal = ia.calibrate("F-", C_STD, _potentials(C_STD, B))
    assert cal.fit == "nikolsky"
    assert cal.background == pytest.approx(B, rel=1e-6)
    assert cal.detection_limit_activity == pytest.approx(B, rel=1e-6)
    assert cal.slope_mv == pytest.approx(S, rel=1e-8) and cal.e0_mv == pytest.approx(E0, abs=1e-6)
    # the concentration at the limit converts back to the same activity through the same path
    assert float(cal.measurement.activity(np.array([cal.detection_limit]))[0]) == pytest.approx(B, rel=1e-9)
    # linear range: the curve is within 1 mV of the line where S·log10((a + b)/a) ≤ 1 (hand: a ≥ b/(10^(1/|S|) − 1))
    low_a = B / (10 ** (1.0 / abs(S)) - 1)
    assert float(cal.measurement.activity(np.array([cal.linear_range[0]]))[0]) == pytest.approx(low_a, rel=1e-6)


@pytest.mark.parametrize("seed", range(5))
def test_fit_with_noise_recovers_within_its_standard_errors(seed):
    rng = np.random.default_rng(seed)
    sd = 0.3
    cal = ia.calibrate("F-", C_STD, _potentials(C_STD, B, noise=rng.normal(0, sd, C_STD.size)), fit="nikolsky")
    se = np.sqrt(np.diag(cal.covariance))
    assert abs(cal.e0_mv - E0) < 5 * se[0] and abs(cal.slope_mv - S) < 5 * se[1]
    assert cal.residual_sd_mv == pytest.approx(sd, rel=1.0)


def test_intervals_cover_the_true_value_at_the_stated_rate():
    # over many seeded calibrations, the 95 % inverse-prediction interval holds the true concentration
    rng = np.random.default_rng(42)
    c_true, sd, hits, n = 2e-4, 0.4, 0, 300
    c = C_STD[3:]
    meas = measurement_for("F-")
    e_true = E0 + S * np.log10(meas.activity(np.array([c_true])))
    for _ in range(n):
        cal = ia.calibrate("F-", c, _potentials(c, noise=rng.normal(0, sd, c.size)), fit="nernst")
        q = ia.quantify(cal, e_true + rng.normal(0, sd, 1))
        hits += int(q.interval[0, 0] <= c_true <= q.interval[1, 0])
    assert 0.91 <= hits / n <= 0.985  # binomial spread of 300 draws around 0.95


def test_quantify_keeps_every_row_with_its_status():
    cal = ia.calibrate("F-", C_STD, _potentials(C_STD, B))
    e = _potentials(np.array([1e-4, 1e-3]), B)
    q = ia.quantify(cal, [e[0], float("nan"), e[1], E0 + S * math.log10(B) + 30.0, E0 + S * -1.5])
    assert q.status == ("ok", "invalid input", "ok", "below the detection limit", "outside the calibrated range")
    assert q.concentration[0] == pytest.approx(1e-4, rel=1e-9) and q.concentration[2] == pytest.approx(1e-3, rel=1e-9)
    assert len(q) == 5 and math.isnan(q.concentration[1])
    mg, _ = q.in_unit("mg/L")
    assert mg[0] == pytest.approx(1e-4 * 18998.4032, rel=1e-6)


def test_drift_from_a_check_standard_is_measured_flagged_and_corrected():
    cal = ia.calibrate("F-", C_STD[3:], _potentials(C_STD[3:]))
    c_check = 1e-4
    e_check = float(_potentials(np.array([c_check]))[0])
    # the electrode drifts linearly by +3 mV over 60 minutes
    check = DriftCheck(c_check, np.array([0.0, 60.0]), np.array([e_check, e_check + 3.0]))
    t = np.array([10.0, 30.0, 50.0])
    e = _potentials(np.array([2e-4, 2e-4, 2e-4])) + 3.0 * t / 60.0
    raw = ia.quantify(cal, e, times=t, check=check)
    assert raw.drift_mv == pytest.approx(3.0 * t / 60.0, abs=1e-9)
    assert raw.status == ("ok", "ok", "drift beyond the limit")
    fixed = ia.quantify(cal, e, times=t, check=check, correct_drift=True)
    assert fixed.concentration == pytest.approx(np.full(3, 2e-4), rel=1e-9)


def test_calibration_with_a_design_reads_treated_activities():
    from ionact.method import load_method

    design = ia.design_adjuster(**load_method("example:nitrate_irrigation"))
    c = np.array([1e-5, 1e-4, 1e-3])
    meas = measurement_for("NO3-", design=design)
    assert meas.dilution == pytest.approx(1 + design.volume_ratio)
    a = meas.activity(c)
    cal = ia.calibrate("NO3-", c, 200.0 - 57.0 * np.log10(a), design=design)
    q = ia.quantify(cal, [200.0 - 57.0 * math.log10(a[1])])
    assert q.concentration[0] == pytest.approx(1e-4, rel=1e-8)
    assert cal.measurement.model == design.model.name


@pytest.mark.parametrize("kwargs,needle", [
    (dict(concentrations=[1e-4], potentials_mv=[100.0]), "at least two standards"),
    (dict(concentrations=[1e-4, 1e-4, 1e-3], potentials_mv=[1, 2, 3]), "appears twice"),
    (dict(concentrations=[1e-5, 1e-3, 1e-4], potentials_mv=[1, 2, 3]), "order"),
    (dict(concentrations=[1e-5, 1e-4], potentials_mv=[1.0, "high"]), "high"),
    (dict(concentrations=[1e-5, 1e-4], potentials_mv=[1.0]), "potentials"),
    (dict(concentrations=[1e-5, "0,1 mg/L"], potentials_mv=[1.0, 2.0]), "0.1 mg/L"),
    (dict(concentrations=[1e-5, -1e-4], potentials_mv=[1.0, 2.0]), "negative"),
    (dict(concentrations=[1e-5, 1e-4], potentials_mv=[1.0, 2.0], fit="cubic"), "cubic"),
])
def test_calibration_bad_input_is_named(kwargs, needle):
    with pytest.raises(ia.IonactError, match=needle):
        ia.calibrate("F-", **kwargs)


def test_a_slope_of_the_wrong_sign_is_a_failed_check_with_its_number():
    c = C_STD[3:]
    cal = ia.calibrate("F-", c, 100.0 + 58.0 * np.log10(measurement_for("F-").activity(c)))
    slope = next(k for k in cal.checks if k.name == "slope")
    assert cal.status == "fail" and slope.status == "fail" and "wrong sign" in slope.detail


def test_two_point_calibration():
    c = np.array([1e-4, 1e-3])
    cal = ia.calibrate("F-", c, _potentials(c))
    assert cal.fit == "two-point" and cal.slope_mv == pytest.approx(S, abs=1e-9)
    q = ia.quantify(cal, _potentials(np.array([3e-4])))
    assert q.concentration[0] == pytest.approx(3e-4, rel=1e-9) and np.all(np.isnan(q.interval))


def test_calibration_round_trips_through_json():
    import json

    cal = ia.calibrate("F-", C_STD, _potentials(C_STD, B))
    back = ia.Calibration.from_dict(json.loads(json.dumps(cal.to_dict())))
    assert back.slope_mv == cal.slope_mv and back.background == cal.background
    e = _potentials(np.array([5e-4]), B)
    assert ia.quantify(back, e).concentration[0] == ia.quantify(cal, e).concentration[0]


# Standard addition. Hand-worked with γ = 1 (model "ideal"): molality = c / (kg water per litre), so the
# density model's tiny change of the water per litre with the spike separates the two by < 2e-4 relative.

def test_known_addition_against_the_hand_formula():
    # Vx = 50 mL, Vs = 0.5 mL of 0.01 mol/L, ΔE = −17.0 mV, S = −59.16 (Nernstian, 25 °C):
    # c = Cs·Vs/(Vx+Vs) / (10^(ΔE/S) − Vx/(Vx+Vs)) = 9.90099e-5 / (1.93870 − 0.990099) = 1.04375e-4 mol/L
    s = float(ia.nernst_slope(-1, 25.0))
    hand = 0.01 * 0.5 / 50.5 / (10 ** (-17.0 / s) - 50 / 50.5)
    r = ia.known_addition("F-", sample_volume=50, spike_volume="0.5 mL", spike_concentration=0.01, delta_mv=-17.0,
                          model="ideal")
    assert r.concentration == pytest.approx(hand, rel=2e-4)
    assert 0 < r.uncertainty < 0.05 * r.concentration


def test_known_addition_corrects_for_the_ionic_strength_the_spike_brings():
    # a strong spike into a dilute sample: γ falls after the spike, so the classical formula (γ constant)
    # reads low; the activity-corrected answer reproduces the concentration the data were made from
    meas = measurement_for("F-", model="davies")
    cx, vx, vs, cs = 1e-3, 25.0, 2.5, 0.1
    a0 = meas.activity(np.array([cx]))[0]
    a1 = meas.activity(np.array([(cx * vx + cs * vs) / (vx + vs)]))[0]
    s = float(ia.nernst_slope(-1, 25.0))
    de = s * math.log10(a1 / a0)
    r = ia.known_addition("F-", sample_volume=vx, spike_volume=vs, spike_concentration=cs, delta_mv=de,
                          model="davies")
    classical = cs * vs / (vx + vs) / (10 ** (de / s) - vx / (vx + vs))
    assert r.concentration == pytest.approx(cx, rel=1e-8)
    assert abs(classical / cx - 1) > 0.01


def test_multiple_addition_gran_intercept_is_the_known_concentration():
    # ideal: (Vx + Vi)·10^((Ei − E0)/S) ∝ cx·Vx + Cs·Vi, a line crossing zero at Ve = −cx·Vx/Cs
    cx, vx, cs = 2e-4, 50.0, 0.01
    v = np.array([0.0, 0.2, 0.4, 0.6, 0.8, 1.0])
    s = float(ia.nernst_slope(-1, 25.0))
    meas = measurement_for("F-", model="ideal")
    e = 80.0 + s * np.log10(meas.activity((cx * vx + cs * v) / (vx + v)))
    r = ia.multiple_addition("F-", sample_volume=vx, spike_volumes=v, spike_concentration=cs, potentials_mv=e,
                             slope_mv=s, model="ideal")
    assert r.concentration == pytest.approx(cx, rel=2e-4)
    m, q = np.polyfit(r.gran_volumes_ml, r.gran_values, 1)
    assert -q / m == pytest.approx(-cx * vx / cs, rel=2e-4)


def test_double_known_addition_finds_concentration_and_slope():
    # two equal spikes: ΔE1 = S log((cx·Vx + Cs·Vs)/((Vx+Vs)·cx)), ΔE2 likewise with 2·Vs; S = −57.0
    cx, vx, vs, cs, s = 5e-5, 50.0, 0.5, 0.01, -57.0
    c1, c2 = (cx * vx + cs * vs) / (vx + vs), (cx * vx + 2 * cs * vs) / (vx + 2 * vs)
    d = (s * math.log10(c1 / cx), s * math.log10(c2 / cx))
    r = ia.double_addition("F-", sample_volume=vx, spike_volume=vs, spike_concentration=cs, delta_mv=d, model="ideal")
    assert r.concentration == pytest.approx(cx, rel=1e-3) and r.slope_mv == pytest.approx(s, rel=1e-3)


@pytest.mark.parametrize("kwargs,needle", [
    (dict(sample_volume=-50, spike_volume=0.5, spike_concentration=0.01, delta_mv=-17.0), "positive volume"),
    (dict(sample_volume=50, spike_volume=0.5, spike_concentration=0.01, delta_mv=-17.0, slope_mv=59.0),
     "wrong sign"),
    (dict(sample_volume=50, spike_volume=0.5, spike_concentration=0.01, delta_mv="x"), "x"),
])
def test_addition_bad_input_is_named(kwargs, needle):
    with pytest.raises(ia.IonactError, match=needle):
        ia.known_addition("F-", **kwargs)


# Selectivity: potentials generated from a stated K with activities; the method gives K back, and the
# concentration-based reading differs by the γ ratio (hand: K_c/K = (γ_B/γ_A)^... see each test).

def test_separate_solution_method_recovers_k_on_activities():
    k_true, s = 1e-3, 59.16
    pa, pb = measurement_for("K+"), measurement_for("Na+")
    ca, cb = 0.01, 0.1
    a_a, a_b = float(pa.activity(np.array([ca]))[0]), float(pb.activity(np.array([cb]))[0])
    ea, eb = 100 + s * math.log10(a_a), 100 + s * math.log10(k_true * a_b)
    r = ia.selectivity("K+", "Na+", method="separate", primary_concentration=ca, primary_mv=ea,
                       interferent_concentration=cb, interferent_mv=eb, slope_mv=s)
    assert r.coefficient == pytest.approx(k_true, rel=1e-9)
    # on concentrations: log Kc = log K + log(ca/a_a) − log(cb/a_b) = log K − log γ_A + log γ_B (z_A = z_B)
    assert r.coefficient_from_concentrations == pytest.approx(k_true * (ca / a_a) / (cb / a_b), rel=1e-9)
    assert r.electrode_entry == {"Na+": r.coefficient}


def test_fixed_interference_method_recovers_k():
    # a primary series in 0.1 mol/L NaCl: E = E0 + S log10(a_K + K·a_Na) (Nikolsky–Eisenman)
    k_true, s = 2e-3, 58.5
    from ionact.solution import Solution

    bg = Solution.from_salts({"NaCl": "0.1 mol/L"}, density="water")
    a_na = float(ia.activity_coefficients(bg, "auto")["Na+"]) * float(bg.molality("Na+"))
    c = np.array([1e-6, 3e-6, 1e-5, 3e-5, 1e-4, 3e-4, 1e-3, 1e-2])
    a_k = measurement_for("K+", matrix=bg).activity(c)
    e = 120.0 + s * np.log10(a_k + k_true * a_na)
    r = ia.selectivity("K+", "Na+", method="fixed", concentrations=c, potentials_mv=e,
                       interferent_concentration=0.1)
    assert r.coefficient == pytest.approx(k_true, rel=1e-5)


def test_matched_potential_method():
    # K = Δa_A / a_B: hand with the activities the method reports
    r = ia.selectivity("K+", "Na+", method="matched", reference_concentration=1e-4, primary_added=1e-4,
                       interferent_concentration=0.05)
    acts = dict(r.activities)
    hand = (acts["K+ (after the step)"] - acts["K+ (reference)"]) / acts["Na+"]
    assert r.coefficient == pytest.approx(hand, rel=1e-12)
    assert r.coefficient_from_concentrations == pytest.approx(1e-4 / 0.05, rel=1e-12)


def test_selectivity_bad_input():
    with pytest.raises(ia.InputError, match="method"):
        ia.selectivity("K+", "Na+", method="guess")
    with pytest.raises(ia.InputError, match="charge sign"):
        ia.selectivity("K+", "Cl-", primary_concentration=1e-3, primary_mv=1, interferent_concentration=1e-3,
                       interferent_mv=1)
    with pytest.raises(ia.InputError, match="interferent_mv"):
        ia.selectivity("K+", "Na+", primary_concentration=1e-3, primary_mv=1, interferent_concentration=1e-3)


# Junction potentials by the Henderson equation, limiting conductivities from the CRC tables (from memory).
# 0.1 mol/L HCl | 0.1 mol/L KCl: the classic Lewis–Sargent case, 26.8 mV calculated (Bard & Faulkner 2001,
# table 2.3.2, from memory). Hand: (RT/F)·ln((λH + λCl)/(λK + λCl)) = 25.693 mV · ln(425.96/149.79) = 26.85 mV.
@pytest.mark.parametrize("a,b,expected,tol", [
    ({"H+": 0.1, "Cl-": 0.1}, {"K+": 0.1, "Cl-": 0.1}, 26.8, 0.5),
    ({"K+": 0.1, "Cl-": 0.1}, {"H+": 0.1, "Cl-": 0.1}, -26.8, 0.5),
    ({"K+": 0.1, "Cl-": 0.1}, {"K+": 0.1, "Cl-": 0.1}, 0.0, 1e-12),
])
def test_henderson_junction_potential(a, b, expected, tol):
    sa = ia.Solution(a, basis="molar", density="water")
    sb = ia.Solution(b, basis="molar", density="water")
    assert ia.junction_potential(sa, sb) == pytest.approx(expected, abs=tol)


def test_henderson_concentration_junction_of_one_salt():
    # same salt, two concentrations: E = (RT/F)·(t+ − t−)·ln(c_a/c_b) with t± = λ±/(λ+ + λ−) (hand, HCl 0.1|0.01)
    lam_h, lam_cl = 349.65, 76.31
    rtf = 8.314462618 * 298.15 / 96485.33212 * 1e3
    hand = rtf * (lam_h - lam_cl) / (lam_h + lam_cl) * math.log(0.1 / 0.01) * -1
    sa = ia.Solution({"H+": 0.1, "Cl-": 0.1}, basis="molar", density="water")
    sb = ia.Solution({"H+": 0.01, "Cl-": 0.01}, basis="molar", density="water")
    assert ia.junction_potential(sa, sb) == pytest.approx(-hand, rel=1e-3)


def test_junction_needs_every_conductivity():
    with pytest.raises(ia.MissingParameterError, match="La"):
        ia.junction_potential(ia.Solution.from_salts({"LaCl3": 0.01}), ia.Solution.from_salts({"KCl": 0.1}))


def _nitrate_day():
    from ionact.method import load_method

    design = ia.design_adjuster(**load_method("example:nitrate_irrigation"))
    c = np.array([1e-5, 3e-5, 1e-4, 3e-4, 1e-3, 3e-3])
    meas = measurement_for("NO3-", design=design)
    rng = np.random.default_rng(1)
    cal = ia.calibrate("NO3-", c, 200 - 56.8 * np.log10(meas.activity(c)) + rng.normal(0, 0.3, c.size),
                       design=design)
    return design, cal, meas


def test_error_budget_terms_and_their_combination():
    design, cal, meas = _nitrate_day()
    e = float(200 - 56.8 * np.log10(meas.activity(np.array([2e-4])))[0])
    b = ia.error_budget(cal, e, design=design, sample=ia.Solution.from_salts({"NaCl": 0.02}),
                        measurement_temperature=22.0, interferents={"Cl-": (0.01, 4e-3)})
    names = [t.name for t in b.terms]
    assert names == ["calibration", "residual γ mismatch", "model choice", "temperature", "interference",
                     "liquid junction"]
    by = {t.name: t for t in b.terms}
    # a bound b enters as b/√3 (GUM 4.3.7); the design's worst error is the design's own number
    assert by["residual γ mismatch"].value_mv == design.worst_error_mv
    assert by["residual γ mismatch"].u_mv == pytest.approx(design.worst_error_mv / math.sqrt(3))
    # the interference term is the Nikolsky–Eisenman bias at the read activity, computed by that function
    bias = ia.nikolsky_eisenman("NO3-", float(ia.quantify(cal, [e]).activity[0]), {"Cl-": (0.01, 4e-3)}).bias_mv
    assert by["interference"].value_mv == pytest.approx(bias)
    u = [t.u_mv for t in b.terms if math.isfinite(t.u_mv)]
    assert b.combined_mv == pytest.approx(math.sqrt(sum(x * x for x in u)))
    assert b.expanded_mv == pytest.approx(2 * b.combined_mv)
    assert "GUM" in b.statement and "rectangular" in b.statement


def test_error_budget_lists_what_it_cannot_assess():
    _, cal, meas = _nitrate_day()
    e = float(200 - 56.8 * np.log10(meas.activity(np.array([2e-4])))[0])
    b = ia.error_budget(cal, e)
    missing = {t.name for t in b.terms if math.isnan(t.u_mv)}
    assert missing == {"residual γ mismatch", "interference"}
    # without a sample background the sample is the standard: the models' γ ratio is 1 in every model
    model = next(t for t in b.terms if t.name == "model choice")
    assert model.value_mv == pytest.approx(0.0, abs=1e-9)


def test_batch_check_takes_its_calibrated_range_from_a_calibration():
    design, cal, _ = _nitrate_day()
    r = ia.check_samples({"analyte": [2e-4], "ionic_strength": [0.01]}, design, calibration_range=cal)
    assert r.calibration_range == pytest.approx(cal.calibrated_range)
    other = ia.calibrate("F-", C_STD[3:], _potentials(C_STD[3:]))
    with pytest.raises(ia.InputError, match="the calibration is for F-"):
        ia.check_samples({"analyte": [2e-4], "ionic_strength": [0.01]}, design, calibration_range=other)


def test_standards_given_as_activities():
    c = C_STD[3:]
    a = measurement_for("F-").activity(c)
    by_a = ia.calibrate("F-", None, _potentials(c), activities=a)
    by_c = ia.calibrate("F-", c, _potentials(c))
    assert by_a.slope_mv == pytest.approx(by_c.slope_mv, rel=1e-9)
    assert by_a.concentrations == pytest.approx(c, rel=1e-9)
    with pytest.raises(ia.InputError, match="one of the two"):
        ia.calibrate("F-", c, _potentials(c), activities=a)
