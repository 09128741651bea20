"""Ionic strength adjuster design: the method developer's job."""

import json
import math
import warnings

import numpy as np
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

import ionact as ia
from ionact import Budget, Buffer, Electrode, SamplePopulation, StockComponent, compare_adjusters, design_adjuster
from ionact.errors import InfeasibleDesignError, InputError, UnknownSpeciesError


def pop(lo=0.0, hi=0.01, **kw):
    return SamplePopulation(ionic_strength=(lo, hi), **kw)


def test_common_practice_nitrate_ammonium_sulfate():
    # Common practice: a nitrate method adds 2 mol/L (NH4)2SO4, 2 mL per 100 mL.
    # Hand calculation on the molar basis, Davies, 25 °C, A = 0.51080:
    #   ISA after mixing: 2 × 0.02/1.02 = 0.039216 mol/L (NH4)2SO4 → I = 3 × 0.039216 = 0.117647
    #   worst sample: I_sample 0.02/1.02 = 0.019608 plus the analyte 1e-3/1.02 → I = 0.138235
    #   lowest standard: 1e-5/1.02 of NaNO3 → I = 0.117657
    #   log10 γ(0.138235) = −0.117260; log10 γ(0.117657) = −0.112431
    #   |ΔE| = 59.159 × (0.117260 − 0.112431) = 0.2856 mV  — "a few tenths of a mV"
    d = design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, samples=pop(0.0, 0.02), analyte_range=(1e-5, 1e-3),
                        volume_ratio=0.02, budget=Budget(mv=1.0), solve="none", model="davies", equilibrium=False)
    # free ions as in the hand calculation (equilibrium=False: no NaSO4- pairing);
    # the library works on molalities through the density model: within 0.01 mV of the hand value
    assert d.worst_error_mv == pytest.approx(0.2856, abs=0.01)
    assert d.worst_error_percent == pytest.approx((10 ** (d.worst_error_mv / ia.nernst_slope(1)) - 1) * 100, rel=1e-9)
    assert d.grams["(NH4)2SO4"] == pytest.approx(2.0 * 132.14, rel=1e-3)
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
    common = dict(samples=pop(0.0, i_hi), analyte_range=(1e-5, 1e-3), budget=Budget(mv=budget), levels=4)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ia.ValidityRangeWarning)
        try:
            d = design_adjuster(analyte, {salt: 1.0}, volume_ratio=0.02, solve=solve, model=model, **common)
        except InfeasibleDesignError:
            assume(False)
        again = design_adjuster(analyte, dict(d.stock), volume_ratio=d.volume_ratio, solve="none",
                                model=d.model.name, **common)
        assert again.worst_error_mv <= budget * (1 + 1e-9)
        assume(not any("already agree" in w for w in d.notes))
        if solve == "stock":
            weaker = design_adjuster(analyte, {k: 0.9 * v for k, v in d.stock.items()}, volume_ratio=d.volume_ratio,
                                     solve="none", model=d.model.name, **common)
        else:
            weaker = design_adjuster(analyte, dict(d.stock), volume_ratio=0.9 * d.volume_ratio, solve="none",
                                     model=d.model.name, **common)
        assert weaker.worst_error_mv > budget


def test_solve_ratio_and_stock_agree_on_budget():
    kw = dict(samples=pop(0.0, 0.01), analyte_range=(1e-5, 1e-3), budget=Budget(mv=0.5), model="davies")
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
        design_adjuster("F-", {"NaCl": 1.0}, samples=pop(0.0, 0.5), analyte_range=(1e-5, 1e-2), volume_ratio=0.01,
                        budget=Budget(mv=0.001), solve="stock", model="davies", max_ratio=1.0)
    assert "solubility" in str(info.value) or "minimum" in str(info.value)
    with pytest.raises(InfeasibleDesignError, match="max_ratio"):
        design_adjuster("F-", {"NaCl": 0.05}, samples=pop(0.0, 0.05), analyte_range=(1e-5, 1e-3),
                        budget=Budget(mv=0.05), solve="ratio", model="davies", max_ratio=0.1)


def test_salt_above_saturation():
    # CRC (from memory): KNO3 38.3 g/100 g at 25 °C ≈ 3.8 mol/kg; 5 mol/L is far above it
    kw = dict(samples=pop(), analyte_range=(1e-5, 1e-3), budget=Budget(mv=1.0), solve="none")
    with pytest.raises(InfeasibleDesignError, match=r"KNO3 .* exceeds its solubility [0-9.]+ mol/kg at 25 °C"):
        design_adjuster("F-", {"KNO3": 5.0}, **kw)
    # a cold lab lowers the ceiling: 2.5 mol/L KNO3 is fine at 25 °C but not at 5 °C
    d = design_adjuster("F-", {"KNO3": 2.5}, model="davies", **kw)
    assert d.check("solubility of KNO3").status != "fail"
    with pytest.raises(InfeasibleDesignError, match="at 5 °C"):
        design_adjuster("F-", {"KNO3": 2.5}, lowest_temperature=5.0, **kw)


@pytest.mark.parametrize(
    "kwargs,err,fragment",
    [
        (dict(stock={"NaQq": 1.0}), UnknownSpeciesError, "NaQq"),
        (dict(budget=Budget(mv=0.5), volume_ratio=0.0), InputError, "volume_ratio 0.0"),
        (dict(volume_ratio=-0.1), InputError, "volume_ratio -0.1"),
        (dict(volume_ratio=1e300), InputError, "volume_ratio 1e+300"),
        (dict(stock={"NaF": 1.0}), InputError, "analyte F- is one of the ISA's ions"),
        (dict(solve="maybe"), InputError, "maybe"),
        (dict(analyte_range=(1e-3, 1e-5)), InputError, "low ≤ high"),
        (dict(budget=0.5), InputError, "Budget"),
        (dict(temperature=True), InputError, "temperature"),
    ],
)
def test_bad_design_inputs(kwargs, err, fragment):
    base = dict(analyte="F-", stock={"NaCl": 1.0}, samples=pop(), analyte_range=(1e-5, 1e-3),
                budget=Budget(mv=0.5), solve="none")
    base.update(kwargs)
    with pytest.raises(err) as info:
        design_adjuster(**base)
    assert fragment in str(info.value)


@pytest.mark.parametrize("kwargs,fragment", [
    (dict(mv=0.0), "budget mv 0.0"), (dict(percent=-1), "budget percent -1"), (dict(mv=1, percent=1), "exactly one"),
    (dict(mv=float("nan")), "budget mv nan"), (dict(mv=True), "budget mv True"),
])
def test_bad_budgets(kwargs, fragment):
    with pytest.raises(InputError, match=fragment):
        Budget(**kwargs)


def test_model_moves_when_out_of_range():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ia.ValidityRangeWarning)
        d = design_adjuster("F-", {"NaCl": 4.0}, samples=pop(0, 0.05), analyte_range=(1e-5, 1e-3), volume_ratio=0.5,
                            budget=Budget(mv=1.0), solve="none", model="davies")
    assert d.model.name != "davies"
    assert any("davies" in n and "moved" in n for n in d.notes)


def _ph_from_recipe(d, pka, model):
    """The treated solution made from the printed recipe, and its pH by the activity-corrected
    Henderson–Hasselbalch equation, computed here from the grams alone."""
    moles = {r.component: r.g_per_l / ia.StockComponent.of(r.component, 1.0).molar_mass for r in d.recipe}
    r = d.volume_ratio
    acid = moles["CH3COOH"] * r / (1 + r)
    base = moles["CH3COONa"] * r / (1 + r)
    nacl = moles["NaCl"] * r / (1 + r)
    sol = ia.Solution.from_salts({"NaCl": f"{nacl} mol/L", "CH3COONa": f"{base} mol/L"},
                                 extra={"CH3COOH": f"{acid} mol/L"})
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ia.ValidityRangeWarning)
        g = ia.activity_coefficients(sol, model=model)
    m = sol.molalities
    return pka + math.log10(g["CH3COO-"] * m["CH3COO-"] / (g["CH3COOH"] * m["CH3COOH"]))


@pytest.mark.parametrize("target", [4.5, 5.5])
def test_buffered_recipe_is_the_design_that_was_computed(target):
    # Issue: the recipe printed 0.5/0.5 mol/L whatever the target pH. The recipe must carry the solved
    # split: made as printed and mixed at the printed ratio, the pH is the target (acetic acid pKa 4.756,
    # CRC, from memory; the pH is recomputed here from the recipe's grams).
    buf = Buffer(acid="CH3COOH", base="CH3COONa", pH=target, total=1.0)
    d = design_adjuster("F-", {"NaCl": 1.0}, buffer=buf, samples=pop(0, 0.01), analyte_range=("0.1 mg/L", "10 mg/L"),
                        volume_ratio=1.0, budget=Budget(mv=0.5), solve="none", model="davies")
    assert _ph_from_recipe(d, 4.756, d.model.name) == pytest.approx(target, abs=0.01)
    line = next(r for r in d.recipe if r.component == "CH3COOH")
    assert line.ml_per_l == pytest.approx(line.g_per_l / 1.049)  # glacial acetic acid 1.049 g/mL (common practice)
    data = json.loads(json.dumps(d.to_dict()))
    acid_line = next(r for r in data["recipe"] if r["component"] == "CH3COOH")
    assert acid_line["mol_per_l"] == pytest.approx(d.buffer["acid_stock_mol_l"])
    assert "mL" in d.report() and f"{line.g_per_l:.4g}" in d.report()


def test_buffer_fluoride_acetate():
    # acetic acid pKa 4.756 (CRC, from memory); HF pKa 3.17 (CRC, from memory)
    buf = Buffer(acid="CH3COOH", base="CH3COONa", pH=5.5, total=1.0)
    d = design_adjuster("F-", {"NaCl": 1.0}, buffer=buf, samples=pop(0, 0.01, acidity=(-0.005, 0.005)),
                        analyte_range=("0.1 mg/L", "10 mg/L"), volume_ratio=1.0, budget=Budget(mv=0.5), solve="none")
    b = d.buffer
    assert b["pH_range"][0] == pytest.approx(5.5, abs=0.02) and b["pH_range"][1] == pytest.approx(5.5, abs=0.02)
    assert b["acid_stock_mol_l"] + b["base_stock_mol_l"] == pytest.approx(1.0)
    assert b["base_stock_mol_l"] > b["acid_stock_mol_l"]  # pH above pKa
    assert abs(b["drift"][0]) < 0.05 and abs(b["drift"][1]) < 0.05
    # the buffer makes the design speciate: the free fraction of fluoride is reported (HF pKa 3.17 and
    # NaF(aq) pairing in the NaCl, Nordstrom et al. 1990 from memory), the same in samples and standards
    free = d.check("free fraction of F-")
    assert free.status == "ok" and 50 < free.value < 100 and "NaF(aq)" in free.detail
    assert any("acetic" in c.lower() for c in d.cautions)
    low = design_adjuster("F-", {"NaCl": 1.0}, buffer=Buffer("CH3COOH", "CH3COONa", pH=4.0, total=1.0),
                          samples=pop(0, 0.01), analyte_range=("0.1 mg/L", "10 mg/L"), volume_ratio=1.0,
                          budget=Budget(mv=0.5), solve="none")
    # at pH 4 some 7 % of the fluoride is HF (0.2 % at pH 5.5): less of it is free
    assert low.check("free fraction of F-").value < free.value and "HF 6." in low.check("free fraction of F-").detail


def _cdta():
    return ia.Ion(formula="C14H18N2O8", charge=-4, molar_mass=342.30)


def test_fixed_components_are_not_scaled():
    # Issue: with solve="stock" a complexing agent was scaled with the inert salts down to ~1e-7 mol/L.
    agent = StockComponent.of("Na4CDTA", 0.01, role="fixed", ions={"Na+": 4, _cdta(): 1})
    stock = [StockComponent.of("NaCl", 1.0), agent]
    d = design_adjuster("F-", stock, samples=pop(0, 0.01), analyte_range=("0.1 mg/L", "10 mg/L"), volume_ratio=0.1,
                        budget=Budget(mv=0.5), solve="stock", density="water", model="davies")
    assert d.stock["Na4CDTA"] == pytest.approx(0.01, rel=1e-12)
    assert d.stock["NaCl"] != pytest.approx(1.0, rel=1e-3)  # the inert salt was solved
    assert {r.component: r.role for r in d.recipe} == {"NaCl": "inert", "Na4CDTA": "fixed"}
    # a component with an ion outside the tables must say what it is
    with pytest.raises(InputError, match="state its role"):
        StockComponent.of("Na4CDTA", 0.01, ions={"Na+": 4, _cdta(): 1})


def test_custom_component_needs_a_density_choice():
    agent = StockComponent.of("Na4CDTA", 0.01, role="fixed", ions={"Na+": 4, _cdta(): 1})
    job = dict(samples=pop(0, 0.01), analyte_range=("0.1 mg/L", "10 mg/L"), volume_ratio=1.0, budget=Budget(mv=0.5),
               solve="none", buffer=Buffer("CH3COOH", "CH3COONa", pH=5.5, total=1.0))
    # its apparent molar volume is unknown: the density model says so rather than guess
    with pytest.raises(ia.MissingParameterError, match=r"C14H18N2O8\^4-.*density='water'"):
        design_adjuster("F-", [StockComponent.of("NaCl", 1.0), agent], **job)
    d = design_adjuster("F-", [StockComponent.of("NaCl", 1.0), agent], density="water", **job)
    assert d.grams["Na4CDTA"] == pytest.approx(0.01 * (4 * 22.98977 + 342.30), rel=1e-6)
    assert d.check("solubility of Na4CDTA").status == "not assessed"
    # Issue: the fallback hid its cause. The model note names the ion and the missing parameter.
    assert d.model.name == "davies"
    assert any("ion size å of C14H18N2O8^4-" in x for x in d.model.lacking)
    assert any("C14H18N2O8^4-" in n and "lacks" in n for n in d.notes)
    assert "C14H18N2O8^4-" in json.dumps(d.to_dict()["model"])


def test_design_that_fails_a_check_says_so():
    # Issue: a design with a failed check looked like success. KCl brings Cl- with K = 0.5 to a
    # nitrate electrode: at 2 mol/L and 2 mL per 100 mL it dominates the low standards.
    d = design_adjuster("NO3-", {"KCl": 2.0}, samples=pop(0, 0.01), analyte_range=(1e-5, 1e-3),
                        budget=Budget(mv=0.5), solve="none", model="davies",
                        electrode=Electrode(selectivity={"Cl-": 0.5}))
    assert d.check("interference by Cl-").status == "fail"
    assert d.status == "fail" and d.exit_status == 1
    assert "FAILED" in d.report() and d.to_dict()["status"] == "fail"


def test_interference_without_a_coefficient_is_not_assessed():
    # Issue: an ammonium salt offered for a potassium electrode showed "ok" and 0 mV.
    d = design_adjuster("K+", {"NH4Cl": 1.0}, samples=pop(0, 0.01, matrix_ions={"Na+": "50 mg/L"}),
                        analyte_range=(1e-5, 1e-3), budget=Budget(mv=0.5), solve="none", model="davies",
                        electrode=Electrode(selectivity={"Na+": 1e-3}))
    c = d.check("interference by NH4+")
    assert c.status == "not assessed" and c.value is None and "no selectivity coefficient" in c.detail
    # a declared matrix ion with a coefficient is assessed (it was "not assessed" although declared)
    na = d.check("interference by Na+")
    assert na.status in ("ok", "warning") and na.value is not None and "declared in the samples" in na.detail
    data = d.to_dict()
    assert data["selectivity"] == {"Na+": 1e-3}
    assert any(c["status"] == "not assessed" for c in data["checks"])
    c = compare_adjusters({"ammonium": {"NH4Cl": 1.0}, "sodium": {"NaCl": 1.0}}, analyte="K+",
                          samples=pop(0, 0.01), analyte_range=(1e-5, 1e-3), budget=Budget(mv=0.5), model="davies",
                          electrode=Electrode(selectivity={"Na+": 1e-6}))
    # NaCl is assessed (its Na+ has a coefficient); the ammonium salt is never ranked as clean
    assert c.rows[0].candidate == "sodium" and c.best == "sodium"
    assert c.rows[1].not_assessed and "not assessed" in c.table()


def test_precipitation_pairs_the_analyte_with_the_samples():
    # Issue: CaF2 was never screened. Fluoride at 0.1 mol/L (1900 mg/L) with 400 mg/L Ca in the samples:
    # Ksp(CaF2) = 10^-10.46 (CRC, from memory) is far exceeded, and the analyte itself precipitates.
    d = design_adjuster("F-", {"NaCl": 1.0}, samples=pop(0, 0.01, matrix_ions={"Ca^2+": "400 mg/L"}),
                        analyte_range=(1e-3, 0.1), budget=Budget(mv=1.0), solve="none", model="davies",
                        volume_ratio=0.1, equilibrium=False)  # free ions, as in the hand estimate below
    c = d.check("precipitation of CaF2")
    assert c.value > 0 and c.status == "fail" and "analyte F- itself" in c.detail
    # hand estimate of the SI at the highest fluoride level, with Davies γ at the treated ionic strength
    r = 0.1
    ca = 400e-3 / 40.078 / (1 + r)
    f = 0.1 / (1 + r)
    ionic = 1.0 * r / (1 + r) + 0.01 / (1 + r) + 0.1 / (1 + r)
    g1, g2 = ia.models.davies(-1, ionic), ia.models.davies(2, ionic)
    si = math.log10(ca * g2 * (f * g1) ** 2) + 10.46
    assert c.value == pytest.approx(si, abs=0.05)  # molal vs molar and the exact I differ slightly


def test_interference_and_precipitation_checks():
    job = dict(samples=pop(0, 0.02, matrix_ions={"Ca^2+": "400 mg/L"}), analyte_range=("1 mg/L as N", "50 mg/L as N"),
               budget=Budget(mv=1.0), solve="none", electrode=Electrode(selectivity={"SO4^2-": 1e-4, "Cl-": 4e-3},
                                                                     linear_range=("0.1 mg/L as N", "1400 mg/L as N")))
    free = design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, equilibrium=False, **job)
    d = design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, **job)
    # free ions: gypsum supersaturated; with CaSO4(aq) and NH4/Na sulfate pairing its SI is lower
    assert free.check("precipitation of CaSO4").status == "warning"
    assert d.check("precipitation of CaSO4").value < free.check("precipitation of CaSO4").value
    assert d.check("linear range").status == "ok"
    so4 = d.check("interference by SO4^2-")
    assert so4.unit == "mV" and so4.limit == pytest.approx(1.0) and "from the ISA" in so4.detail


def test_auxiliary_computations_do_not_warn():
    # Issue: Davies range warnings leaked from the precipitation screen while the design used Pitzer.
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        d = design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, samples=pop(0, 0.02, matrix_ions={"Ca^2+": "400 mg/L"}),
                            analyte_range=(1e-5, 1e-3), budget=Budget(mv=1.0), solve="none", model="pitzer",
                            missing="zero")
    assert d.model.name == "pitzer"
    assert "activities by" in d.check("precipitation of CaSO4").detail


def test_comparison_ranks_on_check_fields_not_text():
    # Issue: the ranking parsed rounded numbers back out of the messages.
    c = compare_adjusters({"ammonium sulfate": {"(NH4)2SO4": 2.0}, "potassium chloride": {"KCl": 2.0}},
                          analyte="NO3-", samples=pop(0, 0.02), analyte_range=(1e-5, 1e-3), budget=Budget(mv=0.5),
                          electrode=Electrode(selectivity={"Cl-": 4e-3, "SO4^2-": 1e-6}), model="davies")
    assert c.best == "ammonium sulfate"
    for row in c.rows:
        d = c.designs[row.candidate]
        sats = [ch.value / 100 for ch in d.checks if ch.name.startswith("solubility of")]
        assert row.saturation == max(sats)  # the exact number, not a rounded one
        inter = [ch.value for ch in d.checks if ch.name.startswith("interference") and ch.value is not None]
        assert row.interference_mv == max(inter)


def test_to_dict_is_json_and_round_trips():
    d = design_adjuster("Ca^2+", {"KCl": 4.0}, samples=pop(0, 0.01), analyte_range=(1e-5, 1e-3),
                        budget=Budget(percent=4.0), solve="stock", volume_ratio=0.1)
    data = json.loads(json.dumps(d.to_dict(), allow_nan=False))
    assert data["format"] == "ionact-adjuster-design" and data["version"] == 2
    assert data["budget_mv"] == pytest.approx(29.58 * math.log10(1.04), rel=1e-3)
    back = ia.AdjusterDesign.from_dict(data)
    assert back.to_dict() == data
    rep = d.report()
    assert "g" in rep and "mL of stock per 100 mL" in rep and "KCl" in rep and "Ca²⁺" in rep


def test_design_record_is_read_only():
    d = design_adjuster("F-", {"NaCl": 1.0}, samples=pop(), analyte_range=(1e-5, 1e-3), budget=Budget(mv=0.5),
                        solve="none", model="davies")
    with pytest.raises(TypeError):
        d.stock["NaCl"] = 99  # type: ignore[index]
    with pytest.raises(TypeError):
        d.worst_case["sample"] = "x"  # type: ignore[index]


def test_explicit_matrices_and_conductivity():
    mats = ia.Solution.from_salts({"NaCl": [0.001, 0.01, 0.02], "CaCl2": [0.0, 0.001, 0.003]})
    d = design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, samples=mats, analyte_range=(1e-5, 1e-3), budget=Budget(mv=1.0),
                        solve="none", model="davies")
    assert d.worst_case["sample"].startswith("matrix")
    e = design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, samples=SamplePopulation(conductivity=(50, "1.5 mS/cm")),
                        analyte_range=(1e-5, 1e-3), budget=Budget(mv=1.0), solve="none", model="davies")
    assert any("russell" in n for n in e.notes)
    assert e.envelope[1] == pytest.approx(1.6e-5 * 1500)


def test_figure_has_the_budget_and_per_sample_errors(tmp_path):
    pytest.importorskip("matplotlib")
    d = design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, samples=pop(0, 0.02), analyte_range=(1e-5, 1e-3),
                        budget=Budget(mv=0.5), solve="stock", model="davies")
    fig = d.plot(tmp_path / "d.png")
    assert (tmp_path / "d.png").stat().st_size > 1000
    a1, a2 = fig.axes[:2]
    assert any("budget" in t.get_text() for t in a1.get_legend().get_texts())
    np.testing.assert_allclose(a2.lines[0].get_ydata(), d.gamma_profile["error_mv"])
