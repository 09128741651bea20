"""Solutions: ionic strength, charge balance, molar/molal conversion, mixing."""

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

import ionact as ia
from ionact.errors import InputError, MissingParameterError, UnitError, UnknownSpeciesError


# Ionic strength of a salt solution of molality m: 1:1 -> m, 2:1 and 1:2 -> 3m, 2:2 -> 4m,
# 3:1 -> 6m (common practice; I = ½ Σ m z²).
@pytest.mark.parametrize(
    "salt,factor", [("NaCl", 1), ("KNO3", 1), ("CaCl2", 3), ("Na2SO4", 3), ("MgSO4", 4), ("LaCl3", 6), ("AlCl3", 6)]
)
def test_ionic_strength_of_salts(salt, factor):
    s = ia.Solution.from_salts({salt: 0.01})
    assert s.ionic_strength == pytest.approx(0.01 * factor)


def test_contract_examples():
    s = ia.Solution({"Na+": 0.1, "Cl-": 0.1}, temperature=25.0)
    assert s.ionic_strength == pytest.approx(0.1)
    s2 = ia.Solution.from_salts({"NaCl": 0.1, "CaCl2": "2 mmol/kg"}, temperature=25.0)
    assert s2.ionic_strength == pytest.approx(0.1 + 0.006)
    assert s2.molalities["Cl-"] == pytest.approx(0.104)


def test_molarity_to_molality_nacl():
    # 1.000 mol/L NaCl at 25 °C is 1.0206 mol/kg with density 1.0369 kg/L
    # (CRC Handbook concentrative properties table, from memory): within 0.3 %
    s = ia.Solution.from_salts({"NaCl": "1 mol/L"})
    assert s.molality("Na+") == pytest.approx(1.0206, rel=3e-3)
    assert s.density == pytest.approx(1.0369, rel=3e-3)


def test_density_model_salt_volume_sums():
    # Millero 1972 (from memory): V°(NaCl) = 16.6, V°(KCl) = 26.8, V°(KNO3) = 38.0
    for salt, v in [("NaCl", 16.6), ("KCl", 26.8), ("KNO3", 38.0)]:
        s = ia.Salt.parse(salt)
        total = sum(ia.Ion.parse(i).volume * n for i, n in s.ions)
        assert total == pytest.approx(v, abs=0.15)


def test_user_density_replaces_model():
    s = ia.Solution.from_salts({"NaF": "0.1 mol/L"}, density=1.003)
    w = 1.003 - 0.1 * ia.Salt.parse("NaF").molar_mass / 1000
    assert s.molality("F-") == pytest.approx(0.1 / w)
    # round trip: molarity back from the stored molality
    assert s.molarities["F-"] == pytest.approx(0.1)


def test_molar_molal_round_trip():
    s = ia.Solution.from_salts({"KNO3": "0.5 mol/L", "NaCl": "0.2 mol/L"})
    c = s.molarities
    assert c["K+"] == pytest.approx(0.5, rel=1e-12)
    assert c["Cl-"] == pytest.approx(0.2, rel=1e-12)


def test_missing_volume_needs_density():
    with pytest.raises(MissingParameterError, match=r"Ni\^2\+"):
        ia.Solution.from_salts({"NiCl2": "0.1 mol/L"})
    s = ia.Solution.from_salts({"NiCl2": "0.1 mol/L"}, density="water")
    assert s.molality("Ni^2+") == pytest.approx(0.1 / (ia.water.density(25.0) / 1000))


def test_batch_equals_rows():
    rng = np.random.default_rng(1)
    na = rng.uniform(0, 0.5, 50)
    ca = rng.uniform(0, 0.1, 50)
    t = rng.uniform(5, 40, 50)
    b = ia.Solution({"Na+": na, "Ca^2+": ca, "Cl-": na + 2 * ca}, temperature=t)
    assert b.shape == (50,)
    for i in (0, 17, 49):
        r = ia.Solution({"Na+": na[i], "Ca^2+": ca[i], "Cl-": na[i] + 2 * ca[i]}, temperature=t[i])
        assert b.ionic_strength[i] == pytest.approx(r.ionic_strength)
        assert b[i].ionic_strength == pytest.approx(r.ionic_strength)
        assert b.density[i] == pytest.approx(r.density)


@given(st.floats(1e-6, 1.0), st.floats(0.1, 10.0))
def test_ionic_strength_scales_linearly(m, k):  # up to I = 35 mol/kg; beyond 40 is refused as unreal
    a = ia.Solution.from_salts({"CaCl2": m, "NaNO3": m / 2})
    b = ia.Solution.from_salts({"CaCl2": m * k, "NaNO3": m * k / 2})
    assert b.ionic_strength == pytest.approx(a.ionic_strength * k, rel=1e-12)


@given(st.floats(1e-4, 1.0), st.floats(1e-4, 1.0), st.floats(0.0, 5.0))
def test_mixing_conserves_moles(ca, cb, r):
    a = ia.Solution.from_salts({"NaCl": f"{ca} mol/L"})
    b = ia.Solution.from_salts({"KNO3": f"{cb} mol/L"})
    m = a.mix(b, r)
    c = m.molarities
    # moles in (1 + r) litres of mix = moles in 1 L of a + r L of b
    assert c["Na+"] * (1 + r) == pytest.approx(ca, rel=1e-9)
    assert c["K+"] * (1 + r) == pytest.approx(cb * r, rel=1e-9, abs=1e-15)
    # mass is conserved too
    assert m.density * (1 + r) == pytest.approx(a.density + r * b.density, rel=1e-12)
    assert m.charge_balance == pytest.approx(0.0, abs=1e-12)


def test_dilution():
    s = ia.Solution.from_salts({"NaCl": "0.1 mol/L"})
    d = s.dilute(10)
    assert d.molarities["Na+"] == pytest.approx(0.01, rel=1e-9)
    with pytest.raises(InputError, match="0.5"):
        s.dilute(0.5)


def test_charge_balance_error_and_named_balance():
    with pytest.raises(InputError, match="charge imbalance.*balance="):
        ia.Solution({"Na+": 0.10, "Cl-": 0.09})
    s = ia.Solution({"Na+": 0.10, "Cl-": 0.09}, balance="Cl-")
    assert s.molalities["Cl-"] == pytest.approx(0.10)
    assert s.balanced_with[0] == "Cl-"
    assert s.balanced_with[1] == pytest.approx(0.01)
    s = ia.Solution({"Na+": 0.10, "Cl-": 0.09}, charge_tolerance=0.2)
    assert s.charge_balance == pytest.approx(0.01)
    with pytest.raises(InputError, match="negative amount"):
        ia.Solution({"Na+": 0.10, "Cl-": 0.09}, balance="K+")


def test_batch_imbalance_names_row():
    with pytest.raises(InputError, match="row 2"):
        ia.Solution({"Na+": [0.1, 0.1, 0.1], "Cl-": [0.1, 0.1, 0.05]})


@pytest.mark.parametrize(
    "amounts,err,fragment",
    [
        ({"Na+": -0.1, "Cl-": -0.1}, InputError, "negative"),
        ({"Na+": float("nan"), "Cl-": 0.1}, InputError, "NaN"),
        ({"Na+": float("inf"), "Cl-": 0.1}, InputError, "infinite"),
        ({"Na+": "0.1 furlong", "Cl-": 0.1}, UnitError, "furlong"),
        ({"Na+": 0.1, "Cl-": 0.1, "Na++": 0.0}, UnknownSpeciesError, "Na^2+"),
        ({"Ca2+": 0.1, "Ca^2+": 0.1, "Cl-": 0.4}, InputError, "twice"),
    ],
)
def test_bad_amounts(amounts, err, fragment):
    with pytest.raises(err) as info:
        ia.Solution(amounts)
    assert fragment in str(info.value)


def test_custom_ion_object():
    ce = ia.Ion(formula="Ce", charge=3, molar_mass=140.116)
    s = ia.Solution({ce: 0.001, "Cl-": 0.003})
    assert s.ionic_strength == pytest.approx(0.006)


def test_unknown_salt():
    with pytest.raises(UnknownSpeciesError, match="Qq"):
        ia.Solution.from_salts({"NaQq": 0.1})


def test_estimates_name_their_rule():
    # rules of thumb (from memory): Russell 1976 1.6e-5, Griffin & Jurinak 1973 1.3e-5 (per µS/cm),
    # Langelier 1936 2.5e-5 (per mg/L TDS); all from memory
    e = ia.ionic_strength_from_conductivity(1000.0)
    assert e.value == pytest.approx(0.016) and e.rule == "russell" and "Russell" in e.source
    g = ia.ionic_strength_from_conductivity([100.0, 1000.0], rule="griffin-jurinak")
    assert np.allclose(g.value, [0.0013, 0.013])
    assert ia.ionic_strength_from_tds(400.0).value == pytest.approx(0.01)
    with pytest.raises(InputError, match="nope"):
        ia.ionic_strength_from_conductivity(100.0, rule="nope")
    with pytest.raises(InputError, match="-3"):
        ia.ionic_strength_from_tds(-3.0)
    with pytest.warns(ia.ValidityRangeWarning, match="fresh"):
        ia.ionic_strength_from_conductivity(20000.0)


def test_immutable():
    s = ia.Solution({"Na+": 0.1, "Cl-": 0.1})
    with pytest.raises(ValueError):
        s.molality_array[0] = 3.0


def test_salt_amounts_in_mass_units_use_the_hydrate_mass():
    # 136.08 g of CH3COONa·3H2O per litre is 1 mol/L of sodium acetate (molar mass with its water)
    s = ia.Solution.from_salts({"CH3COONa·3H2O": "136.08 g/L"}, density="water")
    assert s.molarities["Na+"] == pytest.approx(1.0, rel=1e-3)
    s = ia.Solution.from_salts({"NaCl": "5.844 g/kg"})
    assert s.molality("Cl-") == pytest.approx(0.1, rel=1e-3)
    with pytest.raises(UnitError):
        ia.Solution.from_salts({"NaCl": "3 m/s"})
