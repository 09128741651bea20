"""Ionic strength adjuster design: the method developer's job."""

import json
import math
import warnings

import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

import ionact as ia
from ionact.adjuster import Buffer, compare_adjusters, design_adjuster
from ionact.errors import InfeasibleDesignError, InputError, UnknownSpeciesError


def test_common_practice_nitrate_ammonium_sulfate():
    # Common practice (DOMAIN §6): a nitrate method adds 2 mol/L (NH4)2SO4, 2 mL per 100 mL.
    # Hand calculation on the molar basis, Davies, 25 °C, A = 0.51080:
    #   ISA after mixing: 2 × 0.02/1.02 = 0.039216 mol/L (NH4)2SO4 → I = 3 × 0.039216 = 0.117647
    #   worst sample: I_sample 0.02/1.02 = 0.019608 plus the analyte 1e-3/1.02 → I = 0.138235
    #   lowest standard: 1e-5/1.02 of NaNO3 → I = 0.117657
    #   log10 γ(0.138235) = −0.117260; log10 γ(0.117657) = −0.112431
    #   |ΔE| = 59.159 × (0.117260 − 0.112431) = 0.2856 mV  — "a few tenths of a mV"
    d = design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, sample_ionic_strength=(0.0, 0.02),
                        analyte_range=(1e-5, 1e-3), volume_ratio=0.02, tolerance_mv=1.0, solve="none",
                        model="davies")
    # the library works on molalities through the density model: within 0.01 mV of the hand value
    assert d.worst_error_mv == pytest.approx(0.2856, abs=0.01)
    assert d.worst_error_percent == pytest.approx((10 ** (d.worst_error_mv / ia.nernst_slope(1)) - 1) * 100, rel=1e-9)
    assert d.recipe["(NH4)2SO4"] == pytest.approx(2.0 * 132.14, rel=1e-3)
    lo, hi = d.final_ionic_strength
    assert 0.115 < lo < 0.12 and 0.135 < hi < 0.142
    assert any("ammonia" in c for c in d.cautions)
    assert any("not a validated method" in c for c in d.cautions)


SCENARIOS = {
    "NO3-": ["(NH4)2SO4", "Na2SO4"],
    "F-": ["NaCl", "KCl"],
    "Ca^2+": ["KCl", "NaCl"],
    "K+": ["NaCl", "NH4Cl"],
}


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much])
@given(st.sampled_from(sorted(SCENARIOS)), st.integers(0, 1), st.floats(0.002, 0.05), st.floats(0.2, 1.0),
       st.sampled_from(["stock", "ratio"]), st.sampled_from(["davies", "auto"]))
def test_forward_verification(analyte, which, i_hi, budget, solve, model):
    salt = SCENARIOS[analyte][which]
    common = dict(sample_ionic_strength=(0.0, i_hi), analyte_range=(1e-5, 1e-3), tolerance_mv=budget, levels=4)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ia.ValidityRangeWarning)
        try:
            d = design_adjuster(analyte, {salt: 1.0}, volume_ratio=0.02, solve=solve, model=model, **common)
        except InfeasibleDesignError:
            assume(False)
        again = design_adjuster(analyte, d.stock, volume_ratio=d.volume_ratio, solve="none", model=d.model,
                                **common)
        assert again.worst_error_mv <= budget * (1 + 1e-9)
        assume(not any("already agree" in w for w in d.warnings))
        if solve == "stock":
            weaker = design_adjuster(analyte, {k: 0.9 * v for k, v in d.stock.items()}, volume_ratio=d.volume_ratio,
                                     solve="none", model=d.model, **common)
        else:
            weaker = design_adjuster(analyte, d.stock, volume_ratio=0.9 * d.volume_ratio, solve="none",
                                     model=d.model, **common)
        assert weaker.worst_error_mv > budget


def test_solve_ratio_and_stock_agree_on_budget():
    kw = dict(sample_ionic_strength=(0.0, 0.01), analyte_range=(1e-5, 1e-3), tolerance_mv=0.5, model="davies")
    d1 = design_adjuster("F-", {"NaCl": 1.0}, volume_ratio=0.05, solve="stock", **kw)
    d2 = design_adjuster("F-", {"NaCl": 1.0}, volume_ratio=0.05, solve="ratio", **kw)
    assert d1.worst_error_mv == pytest.approx(0.5, rel=1e-6)
    assert d2.worst_error_mv == pytest.approx(0.5, rel=1e-6)
    # the ISA dose (stock × ratio/(1+ratio)) needed is about the same either way
    dose1 = d1.stock["NaCl"] * d1.volume_ratio / (1 + d1.volume_ratio)
    dose2 = d2.stock["NaCl"] * d2.volume_ratio / (1 + d2.volume_ratio)
    assert dose1 == pytest.approx(dose2, rel=0.05)


def test_infeasible_budget_names_constraint():
    with pytest.raises(InfeasibleDesignError, match=r"best reachable worst error is [0-9.]+ mV") as info:
        design_adjuster("F-", {"NaF": 0.0 + 1.0} if False else {"NaCl": 1.0}, sample_ionic_strength=(0.0, 0.5),
                        analyte_range=(1e-5, 1e-2), volume_ratio=0.01, tolerance_mv=0.001, solve="stock",
                        model="davies", max_ratio=1.0)
    assert "solubility" in str(info.value) or "minimum" in str(info.value)
    with pytest.raises(InfeasibleDesignError, match="max_ratio"):
        design_adjuster("F-", {"NaCl": 0.05}, sample_ionic_strength=(0.0, 0.05), analyte_range=(1e-5, 1e-3),
                        tolerance_mv=0.05, solve="ratio", model="davies", max_ratio=0.1)


def test_salt_above_saturation():
    # CRC (from memory): KNO3 38.3 g/100 g at 25 °C ≈ 3.8 mol/kg; 5 mol/L is far above it
    with pytest.raises(InfeasibleDesignError, match=r"KNO3 .* exceeds its solubility [0-9.]+ mol/kg at 25 °C"):
        design_adjuster("F-", {"KNO3": 5.0}, sample_ionic_strength=(0, 0.01), analyte_range=(1e-5, 1e-3),
                        tolerance_mv=1.0, solve="none")
    # a cold lab lowers the ceiling: 2.5 mol/L KNO3 is fine at 25 °C but not at 5 °C
    d = design_adjuster("F-", {"KNO3": 2.5}, sample_ionic_strength=(0, 0.01), analyte_range=(1e-5, 1e-3),
                        tolerance_mv=1.0, solve="none", model="davies")
    assert any(c.name == "solubility of KNO3" and c.status != "fail" for c in d.checks)
    with pytest.raises(InfeasibleDesignError, match="at 5 °C"):
        design_adjuster("F-", {"KNO3": 2.5}, sample_ionic_strength=(0, 0.01), analyte_range=(1e-5, 1e-3),
                        tolerance_mv=1.0, solve="none", lowest_temperature=5.0)


@pytest.mark.parametrize(
    "kwargs,err,fragment",
    [
        (dict(salts={"NaQq": 1.0}), UnknownSpeciesError, "NaQq"),
        (dict(tolerance_mv=0.0), InputError, "tolerance_mv 0.0"),
        (dict(tolerance_mv=None, tolerance_percent=-1), InputError, "tolerance_percent -1"),
        (dict(volume_ratio=0.0), InputError, "volume_ratio 0.0"),
        (dict(volume_ratio=-0.1), InputError, "volume_ratio -0.1"),
        (dict(salts={"NaF": 1.0}), InputError, "analyte F- is one of the ISA's ions"),
        (dict(solve="maybe"), InputError, "maybe"),
        (dict(analyte_range=(1e-3, 1e-5)), InputError, "low ≤ high"),
        (dict(tolerance_percent=1.0), InputError, "exactly one"),
    ],
)
def test_bad_design_inputs(kwargs, err, fragment):
    base = dict(analyte="F-", salts={"NaCl": 1.0}, sample_ionic_strength=(0, 0.01), analyte_range=(1e-5, 1e-3),
                tolerance_mv=0.5, solve="none")
    base.update(kwargs)
    with pytest.raises(err) as info:
        design_adjuster(**base)
    assert fragment in str(info.value)


def test_model_moves_when_out_of_range():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ia.ValidityRangeWarning)
        d = design_adjuster("F-", {"NaCl": 4.0}, sample_ionic_strength=(0, 0.05), analyte_range=(1e-5, 1e-3),
                            volume_ratio=0.5, tolerance_mv=1.0, solve="none", model="davies")
    assert d.model != "davies"
    assert any("davies" in w and "instead" in w for w in d.warnings)


def test_buffer_fluoride_acetate():
    # acetic acid pKa 4.756 (CRC, from memory); HF pKa 3.17 (CRC, from memory)
    buf = Buffer(acid="CH3COOH", base="CH3COONa", pH=5.5, total=1.0)
    d = design_adjuster("F-", {"NaCl": 1.0}, buffer=buf, sample_ionic_strength=(0, 0.01),
                        analyte_range=("0.1 mg/L", "10 mg/L"), volume_ratio=1.0, tolerance_mv=0.5, solve="none",
                        sample_acidity=(-0.005, 0.005))
    b = d.buffer
    assert b["pH_range"][0] == pytest.approx(5.5, abs=0.02) and b["pH_range"][1] == pytest.approx(5.5, abs=0.02)
    assert b["acid_stock"] + b["base_stock"] == pytest.approx(1.0)
    assert b["base_stock"] > b["acid_stock"]  # pH above pKa
    assert abs(b["drift"][0]) < 0.05 and abs(b["drift"][1]) < 0.05
    measured = next(c for c in d.checks if c.name == "F- in the measured form")
    assert measured.status == "ok" and "99" in measured.message
    assert any("acetic" in c.lower() for c in d.cautions)
    low = design_adjuster("F-", {"NaCl": 1.0}, buffer=Buffer("CH3COOH", "CH3COONa", pH=4.0, total=1.0),
                          sample_ionic_strength=(0, 0.01), analyte_range=("0.1 mg/L", "10 mg/L"), volume_ratio=1.0,
                          tolerance_mv=0.5, solve="none")
    assert next(c for c in low.checks if c.name == "F- in the measured form").status == "warning"


def test_interference_and_precipitation_checks():
    d = design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, sample_ionic_strength=(0, 0.02),
                        analyte_range=("1 mg/L as N", "50 mg/L as N"), tolerance_mv=1.0, solve="none",
                        selectivity={"SO4^2-": 1e-4, "Cl-": 4e-3}, matrix_ions={"Ca^2+": "400 mg/L"},
                        linear_range=("0.1 mg/L as N", "1400 mg/L as N"))
    names = {c.name: c for c in d.checks}
    assert "interference by SO4^2- (from the ISA)" in names
    assert "precipitation of CaSO4" in names
    assert names["precipitation of CaSO4"].status == "warning"
    assert names["linear range"].status == "ok"
    # hand check of the SO4 interference: K a_SO4^(1/2) against the lowest nitrate activity
    assert "mV" in names["interference by SO4^2- (from the ISA)"].message


def test_compare_adjusters_ranks_interferent_last():
    c = compare_adjusters({"ammonium sulfate": {"(NH4)2SO4": 2.0}, "potassium chloride": {"KCl": 2.0}},
                          analyte="NO3-", sample_ionic_strength=(0, 0.02), analyte_range=(1e-5, 1e-3),
                          tolerance_mv=0.5, selectivity={"Cl-": 4e-3}, model="davies")
    assert c.best == "ammonium sulfate"
    assert "potassium chloride" in c.table()


def test_to_dict_is_json_and_report_has_recipe():
    d = design_adjuster("Ca^2+", {"KCl": 4.0}, sample_ionic_strength=(0, 0.01), analyte_range=(1e-5, 1e-3),
                        tolerance_percent=4.0, solve="stock", volume_ratio=0.1)
    data = json.loads(json.dumps(d.to_dict()))
    assert data["format"] == "ionact-adjuster-design" and data["version"] == 1
    assert data["budget_mv"] == pytest.approx(29.58 * math.log10(1.04), rel=1e-3)
    rep = d.report()
    assert "g" in rep and "mL of stock per 100 mL" in rep and "KCl" in rep


def test_explicit_matrices_and_conductivity():
    mats = ia.Solution.from_salts({"NaCl": [0.001, 0.01, 0.02], "CaCl2": [0.0, 0.001, 0.003]})
    d = design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, samples=mats, analyte_range=(1e-5, 1e-3), tolerance_mv=1.0,
                        solve="none", model="davies")
    assert d.worst_case["sample"].startswith("matrix")
    e = design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, conductivity=(50, 1500), analyte_range=(1e-5, 1e-3),
                        tolerance_mv=1.0, solve="none", model="davies")
    assert any("russell" in n for n in e.notes)


def test_complexing_agent_as_custom_component():
    # a TISAB-like stock: NaCl, an acetate buffer, and a complexing agent the ion table lacks
    cdta = ia.register_ion(ia.Ion(formula="C14H18N2O8", charge=-4, molar_mass=342.30))
    na4 = ia.Salt.parse("Na4CDTA", ions={"Na+": 4, cdta.name: 1})
    assert na4.molar_mass == pytest.approx(4 * 22.990 + 342.30, rel=1e-4)
    job = dict(sample_ionic_strength=(0, 0.01), analyte_range=("0.1 mg/L", "10 mg/L"), volume_ratio=1.0,
               tolerance_mv=0.5, solve="none", buffer=Buffer("CH3COOH", "CH3COONa", pH=5.5, total=1.0))
    # its apparent molar volume is unknown: the density model says so rather than guess
    with pytest.raises(ia.MissingParameterError, match=r"C14H18N2O8\^4-.*density='water'"):
        design_adjuster("F-", {"NaCl": 1.0, na4: 0.01}, **job)
    d = design_adjuster("F-", {"NaCl": 1.0, na4: 0.01}, density="water", **job)
    assert "Na4CDTA" in d.recipe and d.recipe["Na4CDTA"] == pytest.approx(0.01 * na4.molar_mass)
    assert d.model == "davies"  # nothing else has parameters for the agent
    assert any("no solubility data" in c.message for c in d.checks if c.name == "solubility of Na4CDTA")
