"""Chemical equilibrium against published buffer pH values, tabulated mean activity coefficients,
and hand calculations."""

import math
import warnings

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import ionact as ia
from ionact.errors import ConvergenceError, InputError

# pH(S) of the primary standard buffers (Buck et al., IUPAC Recommendations 2002, Pure Appl. Chem. 74, 2169,
# table of pH(S) against temperature; values from memory). The buffers as their ions, mol/kg.
BUFFERS = [
    ("phosphate 1:1", {"K+": 0.025, "H2PO4-": 0.025, "Na+": 0.05, "HPO4^2-": 0.025}, 25.0, 6.865),
    ("phosphate 1:3.5", {"K+": 0.008695, "H2PO4-": 0.008695, "Na+": 2 * 0.03043, "HPO4^2-": 0.03043}, 25.0, 7.413),
    ("hydrogen phthalate", {"K+": 0.05, "C8H5O4-": 0.05}, 25.0, 4.005),
    # borax Na2B4O7 dissolves as 2 Na+ + 2 B(OH)3 + 2 B(OH)4- (common practice)
    ("borax", {"Na+": 0.02, "H3BO3": 0.02, "B(OH)4-": 0.02}, 25.0, 9.180),
    ("carbonate", {"Na+": 0.075, "HCO3-": 0.025, "CO3^2-": 0.025}, 25.0, 10.012),
    ("phosphate 1:1 at 37 °C", {"K+": 0.025, "H2PO4-": 0.025, "Na+": 0.05, "HPO4^2-": 0.025}, 37.0, 6.840),
]


@pytest.mark.parametrize("name,ions,t,ph", BUFFERS, ids=[b[0] for b in BUFFERS])
def test_primary_standard_buffers(name, ions, t, ph):
    # the Bates–Guggenheim convention for every charged species, pH from the proton balance
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ia.ValidityRangeWarning)
        s = ia.speciate(ia.Solution(ions, temperature=t), model="bates-guggenheim")
    assert float(s.pH) == pytest.approx(ph, abs=0.02)


# Stoichiometric mean activity coefficients: ZnSO4 (Harned & Owen 1958 / Robinson & Stokes 1959 appendix 8.10,
# from memory) and the three sulfates at 0.1 mol/kg (Robinson & Stokes 1959, appendix 8.10, from memory).
SULFATES = [("ZnSO4", "Zn^2+", m, g) for m, g in [(0.001, 0.700), (0.005, 0.477), (0.01, 0.387), (0.05, 0.202),
                                                  (0.1, 0.150)]]
SULFATES += [("MgSO4", "Mg^2+", 0.1, 0.150), ("CuSO4", "Cu^2+", 0.1, 0.150)]


@pytest.mark.parametrize("salt,cation,m,gamma", SULFATES, ids=[f"{s[0]}-{s[2]}" for s in SULFATES])
def test_two_two_sulfates_with_ion_pairing(salt, cation, m, gamma):
    s = ia.speciate(ia.Solution({cation: m, "SO4^2-": m}), model="extended")
    g = math.sqrt(float(s.activity_of(cation)) * float(s.activity_of("SO4^2-"))) / m
    assert g == pytest.approx(gamma, rel=0.05)
    # and through the public mean activity coefficient, which pairs where the table has it
    assert float(ia.mean_activity_coefficient(ia.Solution({cation: m, "SO4^2-": m}), salt, model="extended")) == \
        pytest.approx(g, rel=1e-9)


def test_fluoride_aluminium_by_hand():
    # Hand calculation, ideal solution (γ = 1), pH held at 5.0 (a_H = 1e-5). Cumulative log β
    # (Nordstrom et al. 1990, from memory): AlF 7.0, AlF2 12.7, AlF3 16.8, AlF4 19.4; HF 3.17;
    # AlOH^2+ −4.99 (with H+ released); NaF(aq) −0.2 (the sodium the fluoride came with).
    # Free F x, free Al y and free Na w solve
    #   T_Al = y (1 + Σ β_n x^n + β_OH / a_H),   T_Na = w (1 + β_NaF x)
    #   T_F  = x (1 + β_HF a_H + β_NaF w) + y Σ n β_n x^n
    # bisection on x below.
    t_al, t_f, ah = 2e-5, 1e-4, 1e-5
    b = [10**7.0, 10**12.7, 10**16.8, 10**19.4]
    b_oh, b_hf, b_naf = 10**-4.99, 10**3.17, 10**-0.2

    def f_of(x):
        y = t_al / (1 + sum(bn * x ** (n + 1) for n, bn in enumerate(b)) + b_oh / ah)
        w = t_f / (1 + b_naf * x)
        return x * (1 + b_hf * ah + b_naf * w) + y * sum((n + 1) * bn * x ** (n + 1) for n, bn in enumerate(b)) - t_f

    lo, hi = 1e-20, t_f
    for _ in range(200):
        mid = math.sqrt(lo * hi)
        lo, hi = (mid, hi) if f_of(mid) < 0 else (lo, mid)
    x_hand = math.sqrt(lo * hi)
    sol = ia.Solution({"Na+": t_f, "F-": t_f, "Al^3+": t_al, "Cl-": 3 * t_al})
    s = ia.speciate(sol, pH=5.0, model="ideal")
    assert float(s.free("F-")) == pytest.approx(x_hand, rel=1e-6)
    assert float(s.free_fraction("F-")) == pytest.approx(x_hand / t_f, rel=1e-6)


def _cdta():
    # trans-1,2-diaminocyclohexane-N,N,N',N'-tetraacetate and its aluminium complex, as a user would give
    # them (cumulative protonation log β 12.3, 18.42, 21.94, 24.37; AlCDTA- 19.5; values from memory of
    # the critical compilations, for this test only)
    cdta = ia.Ion(formula="C14H18N2O8", charge=-4, molar_mass=342.30)
    return cdta, [
        ia.Complex("HC14H18N2O8", charge=-3, components={cdta: 1, "H+": 1}, log_k=12.3, kind="acid"),
        ia.Complex("H2C14H18N2O8", charge=-2, components={cdta: 1, "H+": 2}, log_k=18.42, kind="acid"),
        ia.Complex("H3C14H18N2O8", charge=-1, components={cdta: 1, "H+": 3}, log_k=21.94, kind="acid"),
        ia.Complex("H4C14H18N2O8", charge=0, components={cdta: 1, "H+": 4}, log_k=24.37, kind="acid"),
        ia.Complex("AlC14H18N2O8", charge=-1, components={"Al^3+": 1, cdta: 1}, log_k=19.5),
    ]


def test_a_complexing_agent_frees_fluoride():
    sample = {"Na+": 1e-4, "F-": 1e-4, "Al^3+": 2e-5, "Cl-": 6e-5}
    bound = ia.speciate(ia.Solution(sample), pH=5.5, model="davies")
    assert float(bound.free_fraction("F-")) < 0.7
    cdta, species = _cdta()
    treated = ia.Solution({**sample, "K+": 4 * 5e-3, cdta: 5e-3})  # added as its potassium salt
    freed = ia.speciate(treated, pH=5.5, model="davies", species=species)
    assert float(freed.free_fraction("F-")) > 0.99


def test_a_user_constant_changes_the_answer_as_by_hand():
    # NaCl(aq) with log K = 0.5 in an ideal 0.1 mol/kg NaCl: K x² + x − 0.1 = 0 for free Na+ x (hand, quadratic)
    pair = ia.Complex("NaCl", charge=0, components={"Na+": 1, "Cl-": 1}, log_k=0.5, kind="pair")
    s = ia.speciate(ia.Solution({"Na+": 0.1, "Cl-": 0.1}), pH=7.0, model="ideal", species=[pair])
    k = 10**0.5
    x = (-1 + math.sqrt(1 + 4 * k * 0.1)) / (2 * k)
    assert float(s.free("Na+")) == pytest.approx(x, rel=1e-10)


def test_overriding_a_table_constant():
    weak = ia.Complex("CaSO4(aq)", components={"Ca^2+": 1, "SO4^2-": 1}, log_k=1.0, kind="pair")
    sol = ia.Solution({"Ca^2+": 0.01, "SO4^2-": 0.01})
    table = ia.speciate(sol, model="davies")
    mine = ia.speciate(sol, model="davies", species=[weak])
    assert float(mine.free_fraction("Ca^2+")) > float(table.free_fraction("Ca^2+"))


components = st.fixed_dictionaries({
    "Na+": st.floats(1e-6, 0.5), "Ca^2+": st.floats(1e-7, 0.05), "Mg^2+": st.floats(1e-7, 0.05),
    "SO4^2-": st.floats(1e-7, 0.05), "F-": st.floats(1e-7, 0.01), "HCO3-": st.floats(1e-7, 0.01),
    "CH3COOH": st.floats(0, 0.1),
})


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(components)
def test_balances_close_in_every_converged_sample(amounts):
    # balance the cations and anions with chloride (or sodium) so the inputs are electroneutral
    charge = amounts["Na+"] + 2 * amounts["Ca^2+"] + 2 * amounts["Mg^2+"] - 2 * amounts["SO4^2-"] \
        - amounts["F-"] - amounts["HCO3-"]
    ions = dict(amounts)
    if charge >= 0:
        ions["Cl-"] = charge
    else:
        ions["Na+"] += -charge
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ia.ValidityRangeWarning)
        s = ia.speciate(ia.Solution(ions, charge_tolerance=1e-9), model="davies")
    assert bool(s.converged)
    names = s.species
    m = np.asarray(s.molality)
    z = np.array([ia.Ion.parse(n).charge for n in names])
    assert abs(float(z @ m)) <= 1e-9 * float(np.abs(z) @ m)
    for comp, total in s.totals.items():
        if comp == "H+" or float(total) <= 1e-100:  # no balance to close for an absent component
            continue
        held = sum(f for f in s.fractions[comp].values())
        assert float(held) == pytest.approx(1.0, rel=1e-9), comp


def test_batch_equals_row_by_row():
    na = np.array([0.01, 0.1, 0.3])
    ca = np.array([0.001, 0.01, 0.02])
    so4 = np.array([0.002, 0.005, 0.03])
    cl = na + 2 * ca - 2 * so4
    batch = ia.speciate(ia.Solution({"Na+": na, "Ca^2+": ca, "SO4^2-": so4, "Cl-": cl}), model="davies")
    for k in range(3):
        one = ia.speciate(ia.Solution({"Na+": na[k], "Ca^2+": ca[k], "SO4^2-": so4[k], "Cl-": cl[k]}),
                          model="davies")
        np.testing.assert_allclose(batch.molality[:, k], one.molality, rtol=1e-8)
        assert float(batch.pH[k]) == pytest.approx(float(one.pH), abs=1e-9)


def test_saturation_index_of_gypsum():
    # 0.03 mol/kg CaSO4 is supersaturated (log Ksp −4.58, CRC, from memory); 0.001 is not
    s = ia.speciate(ia.Solution({"Ca^2+": [0.001, 0.03], "SO4^2-": [0.001, 0.03]}), model="davies")
    si = s.saturation_index["CaSO4"]
    assert si[0] < 0 < si[1]


def test_bad_inputs_are_named():
    sol = ia.Solution({"Na+": 0.1, "Cl-": 0.1})
    with pytest.raises(InputError, match="log_k"):
        ia.Complex("NaCl", charge=0, components={"Na+": 1, "Cl-": 1}, log_k=float("inf"))
    with pytest.raises(ia.UnknownSpeciesError, match="Xe\\+"):
        ia.Complex("XeCl", charge=0, components={"Xe+": 1, "Cl-": 1}, log_k=1.0)
    with pytest.raises(InputError, match="Ca\\^2\\+.*does not contain"):
        ia.speciate(sol, species=[ia.Complex("CaCl+", components={"Ca^2+": 1, "Cl-": 1}, log_k=0.4)])
    with pytest.raises(InputError, match="pH 15"):
        ia.speciate(sol, pH=15)
    with pytest.raises(ConvergenceError, match="balance did not close"):
        ia.speciate(ia.Solution({"Ca^2+": 0.01, "SO4^2-": 0.01}), model="davies", max_iterations=2)
    batch = ia.speciate(ia.Solution({"Ca^2+": [0.01, 0.02], "SO4^2-": [0.01, 0.02]}), model="davies",
                        max_iterations=2)
    assert batch.molality.shape[1] == 2 and all(s == "not converged" for s in batch.status[:1])
    assert np.all(np.isnan(batch.molality[:, ~batch.converged]))


def test_ph_of_a_composition():
    # acetic acid 0.01 mol/kg alone: pH ≈ ½(pKa − log c) = 3.38 before activity corrections (hand)
    ph = ia.ph_of(ia.Solution({"CH3COOH": 0.01}), model="davies")
    assert ph == pytest.approx(3.38, abs=0.02)


@pytest.mark.parametrize(("inputs", "free"), [
    (["K+", "H2PO4-", "Na+", "HPO4^2-"], [1e-7, 0.025, 1e-7, 0.05]),  # H+, K+, PO4^3-, Na+
    (["Mg^2+", "SO4^2-", "Cl-", "Br-"], [1e-7, 0.02, 0.03, 0.04, 0.001]),  # H+, Mg, SO4, Cl and Br held by nothing
])
def test_newton_jacobian_matches_finite_differences(inputs, free):
    # the solver's Jacobian (fixed-γ part plus the rank-one γ(I) term with its feedback) equals
    # central differences of the balances with γ iterated to self-consistency (Davies: γ of I alone);
    # the second network has components no species holds, which the solver treats by division
    from ionact.equilibrium import _gammas, _gammas_and_slopes, _molalities, _newton_step, network_for
    from ionact.models.registry import Batch
    from ionact.models.resolver import choice_for, resolve_model
    from ionact.species import resolve_ion

    net = network_for([resolve_ion(n) for n in inputs])
    n_c, n_s = len(net.components), len(net.species)
    t = np.array([25.0])
    name, opts, fb = choice_for("davies")
    choice = resolve_model(Batch.of(net.species, np.full((n_s, 1), 0.01), t), name, options=opts, fallback=fb)
    logk, alive = net.log_k_at(t), np.ones((n_s, 1))
    assert len(free) == n_c
    x = np.log(np.array(free))[:, None]  # free molalities of the components (pH ≈ 7)

    def balances(x):
        lg = np.zeros((n_s, 1))
        for _ in range(300):
            lg = _gammas(net, _molalities(net, logk, x, lg, None, alive), t, choice)
        m = _molalities(net, logk, x, lg, None, alive)
        return net.nu.T @ m, m

    tot, m = balances(x)
    numeric = np.column_stack([((balances(x + h)[0] - balances(x - h)[0]) / 2e-6)[:, 0]
                               for h in np.eye(n_c)[:, :, None] * 1e-6])
    _, slope = _gammas_and_slopes(net, m, t, 0.5 * net.z2 @ m, choice)
    # one Newton step from x towards totals tot + J·dx must be dx, for a chosen dx
    dx = np.array([[0.01], [-0.02], [0.015], [0.005], [-0.01]])[:n_c]
    step = _newton_step(net, m, tot, tot + numeric @ dx, x, np.ones(n_c, dtype=bool),
                        np.zeros((n_c, 1), dtype=bool), slope) - x
    assert step[:, 0] == pytest.approx(dx[:, 0], rel=1e-5)


def _fluoride_job():
    from ionact.method import load_method

    return load_method("example:fluoride_buffered")


def test_method_file_complexes_are_real_ligands():
    kw = _fluoride_job()
    names = {c.ion.name for c in kw["complexes"]}
    assert "AlC14H18N2O8-" in names and "HC14H18N2O8^3-" in names
    al = next(c for c in kw["complexes"] if c.ion.name == "AlC14H18N2O8-")
    assert dict(al.components) == {"Al^3+": 1, "C14H18N2O8^4-": 1} and al.log_k == 19.5


def test_the_fluoride_design_proves_its_complexing_agent():
    # with the stated aluminium in the samples and the complexing agent in the stock, the worst sample's free
    # fluoride matches the standards'; without the agent, aluminium binds it and the design fails on that check
    kw = _fluoride_job()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ia.ValidityRangeWarning)
        made = ia.design_adjuster(**kw)
        bare = ia.design_adjuster(**{**kw, "stock": [c for c in kw["stock"] if c.name != "Na4CDTA"]})
    ok = next(c for c in made.checks if c.name == "free fraction of F-")
    bad = next(c for c in bare.checks if c.name == "free fraction of F-")
    assert ok.status == "ok" and bad.status == "fail"
    assert "AlF" in bad.detail and bad.value < 0.5 * ok.value
    # the standards carry no matrix ions: their free share is the same with or without the agent's aluminium
    ref = float(ok.detail.split("against ")[1].split("%")[0])
    assert ref > 70.0


@pytest.mark.parametrize("table,needle", [
    ('[complexes.X]\nformula = "AlF"\ncharge = 2\ncomponents = { "Al^3+" = 1, "F-" = 1 }\n', "log_k"),
    ('[complexes.X]\nformula = "AlF"\ncharge = 2\ncomponents = { "Al^3+" = 1 }\nlog_k = "high"\n', "log_k"),
    ('[complexes.X]\nformula = "AlF"\ncharge = 2\ncomponents = []\nlog_k = 7\n', "components"),
    ('[complexes.X]\nformula = "AlF"\ncharge = 2\ncomponents = { "Al^3+" = 1 }\nlog_k = 7\nbeta = 1\n', "beta"),
])
def test_method_file_complex_errors_are_named(tmp_path, table, needle):
    from ionact.method import example_path, load_method

    text = example_path("nitrate_irrigation").read_text(encoding="utf-8") + "\n" + table
    path = tmp_path / "m.toml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(ia.InputError, match=needle):
        load_method(path)


def test_batch_check_names_the_binding_of_stated_aluminium():
    # a sample with aluminium in its ion columns: freed by the design's complexing agent, bound without it;
    # the design (with its own species and complexes) survives its JSON file
    import json

    kw = _fluoride_job()
    cols = {"sample_id": ["clean", "aluminium"], "analyte [mg/L]": [0.2, 0.2], "Na+ [mg/L]": [20, 20],
            "Cl- [mg/L]": [30.84, 30.84 + 3 * 1.0 / 26.98 * 35.45], "Al^3+ [mg/L]": [0.0, 1.0]}
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ia.ValidityRangeWarning)
        made = ia.design_adjuster(**kw)
        bare = ia.design_adjuster(**{**kw, "stock": [c for c in kw["stock"] if c.name != "Na4CDTA"]})
        freed = ia.check_samples(cols, json.loads(json.dumps(made.to_dict())))
        bound = ia.check_samples(cols, bare)
    assert freed.status == ("inside", "inside")
    assert bound.status[0] == "inside" and bound.status[1] != "inside"
    assert "the sample's ions bind it" in bound.reason[1] and bound.error_mv[1] > 10 * bare.budget_mv


def test_constants_without_enthalpy_warn_beyond_the_window():
    # log K(T) by van 't Hoff where ΔH is tabulated; the 25 °C value with a warning where it is not
    sol = ia.Solution({"Na+": 1e-3, "F-": 1e-3, "Al^3+": 1e-5, "Cl-": 3e-5})
    with warnings.catch_warnings():
        warnings.simplefilter("error", ia.ValidityRangeWarning)
        ia.speciate(sol.with_temperature(27.0), pH=5.5, model="davies")
    with pytest.warns(ia.ValidityRangeWarning, match=r"AlF\^2\+.*no tabulated reaction enthalpy"):
        ia.speciate(sol.with_temperature(50.0), pH=5.5, model="davies")
    with ia.strict(), pytest.raises(ia.ValidityRangeError, match="enthalpy"):
        ia.speciate(sol.with_temperature(50.0), pH=5.5, model="davies")


def test_stack_solver_against_numpy_and_its_breakdowns():
    # the vectorised elimination equals numpy's solver on random symmetric positive definite
    # stacks, and names the samples whose elimination breaks down (a singular matrix) instead
    # of returning them silently
    from ionact.equilibrium import _solve_stack

    rng = np.random.default_rng(7)
    k, n = 6, 50
    g = rng.normal(size=(n, k, k))
    spd = g @ g.transpose(0, 2, 1) + k * np.eye(k)
    b = rng.normal(size=(k, 2, n))
    a = np.ascontiguousarray(spd.transpose(1, 2, 0))
    a[:, :, 3] = 1.0  # sample 3: a singular all-ones matrix
    x, bad = _solve_stack(a.copy(), b)
    assert bad.tolist() == [3]
    good = [i for i in range(n) if i != 3]
    expect = np.linalg.solve(spd[good], b[:, :, good].transpose(2, 0, 1))  # (n, k, 2)
    np.testing.assert_allclose(x[:, :, good].transpose(2, 0, 1), expect, rtol=1e-10, atol=1e-12)
