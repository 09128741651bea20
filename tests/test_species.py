"""Ion and salt parsing, charges and molar masses."""

import pytest
from hypothesis import given
from hypothesis import strategies as st

import ionact as ia
from ionact.errors import InputError, IonactError, UnknownSpeciesError
from ionact.tables import ion_table

NOTATIONS = [
    ("Ca+2", "Ca^2+", 2),
    ("Ca2+", "Ca^2+", 2),
    ("Ca++", "Ca^2+", 2),
    ("Ca^2+", "Ca^2+", 2),
    ("Ca²⁺", "Ca^2+", 2),
    ("SO4-2", "SO4^2-", -2),
    ("SO4^2-", "SO4^2-", -2),
    ("SO4--", "SO4^2-", -2),
    ("SO42-", "SO4^2-", -2),
    ("H2PO4-", "H2PO4-", -1),
    ("HPO42-", "HPO4^2-", -2),
    ("PO43-", "PO4^3-", -3),
    ("CH3COO-", "CH3COO-", -1),
    ("OAc-", "CH3COO-", -1),
    ("NH4+", "NH4+", 1),
    ("NO3-", "NO3-", -1),
    ("Fe3+", "Fe^3+", 3),
    ("Fe2+", "Fe^2+", 2),
    ("Al+3", "Al^3+", 3),
    ("Ca^{2+}", "Ca^2+", 2),
    ("CH3COOH", "CH3COOH", 0),
    ("NH3", "NH3", 0),
    (" Na+ ", "Na+", 1),
    ("Cl-(aq)", "Cl-", -1),
]


@pytest.mark.parametrize("text,name,charge", NOTATIONS, ids=[n[0] for n in NOTATIONS])
def test_notations_give_one_canonical_form(text, name, charge):
    ion = ia.Ion.parse(text)
    assert ion.name == name
    assert ion.charge == charge


# Molar masses from IUPAC standard atomic weights (common practice values, 4-5 digits).
MASSES = [
    ("NaCl", 58.44),
    ("KCl", 74.55),
    ("CaCl2", 110.98),
    ("(NH4)2SO4", 132.14),
    ("KNO3", 101.10),
    ("CH3COONa·3H2O", 136.08),
    ("MgSO4.7H2O", 246.47),
    ("Na2SO4*10H2O", 322.20),
]


@pytest.mark.parametrize("formula,mass", MASSES, ids=[m[0] for m in MASSES])
def test_salt_molar_masses(formula, mass):
    # molar masses as printed on reagent labels (common practice), to 0.01 g/mol
    assert ia.Salt.parse(formula).molar_mass == pytest.approx(mass, abs=0.015)


def test_hydrate_water_counts_in_mass_not_ions():
    s = ia.Salt.parse("CH3COONa·3H2O")
    anhydrous = ia.Salt.parse("CH3COONa")
    assert s.ions == anhydrous.ions
    assert s.molar_mass - anhydrous.molar_mass == pytest.approx(3 * 18.015, abs=0.01)
    assert s.text == "CH3COONa·3H2O"


@pytest.mark.parametrize(
    "formula,ions",
    [
        ("NaCl", {"Na+": 1, "Cl-": 1}),
        ("CaCl2", {"Ca^2+": 1, "Cl-": 2}),
        ("(NH4)2SO4", {"NH4+": 2, "SO4^2-": 1}),
        ("Ca(NO3)2", {"Ca^2+": 1, "NO3-": 2}),
        ("Al2(SO4)3", {"Al^3+": 2, "SO4^2-": 3}),
        ("CH3COOK", {"K+": 1, "CH3COO-": 1}),
        ("LaCl3", {"La^3+": 1, "Cl-": 3}),
        ("MgSO4", {"Mg^2+": 1, "SO4^2-": 1}),
    ],
)
def test_salts_dissociate(formula, ions):
    assert dict(ia.Salt.parse(formula).ions) == ions


def test_explicit_ion_mapping():
    s = ia.Salt.parse("trisodium citrate", ions={"Na+": 3, "C6H5O7^3-": 1})
    assert s.ionic_strength_factor == pytest.approx(6.0)
    with pytest.raises(InputError, match="net charge"):
        ia.Salt.parse("bad", ions={"Na+": 2, "Cl-": 1})


def test_ionic_strength_factors():
    # common practice: 1:1 -> 1, 2:1 -> 3, 2:2 -> 4, 3:1 -> 6
    assert ia.Salt.parse("NaCl").ionic_strength_factor == 1
    assert ia.Salt.parse("CaCl2").ionic_strength_factor == 3
    assert ia.Salt.parse("Na2SO4").ionic_strength_factor == 3
    assert ia.Salt.parse("MgSO4").ionic_strength_factor == 4
    assert ia.Salt.parse("LaCl3").ionic_strength_factor == 6


def test_solubility_interpolates():
    # CRC Handbook, from memory: KNO3 13.3 g/100 g at 0 °C, 31.6 at 20 °C
    kno3 = ia.Salt.parse("KNO3")
    assert kno3.solubility(20.0) == pytest.approx(31.6)
    assert 13.3 < kno3.solubility(5.0) < 20.9
    assert kno3.saturation_molality(25.0) == pytest.approx(38.3 * 10 / 101.10, rel=1e-3)


@pytest.mark.parametrize(
    "bad,err,fragment",
    [
        ("", InputError, "empty"),
        ("Xq+", InputError, "Xq"),
        ("Ca+9", InputError, "+9"),
        ("Fe(CN)63-", InputError, "ambiguous"),
        ("Na+-", InputError, "Na+-"),
        (42, InputError, "42"),
    ],
)
def test_bad_ions(bad, err, fragment):
    with pytest.raises(err, match=None) as info:
        ia.Ion.parse(bad)
    assert fragment in str(info.value)


def test_unknown_salt_is_named():
    with pytest.raises(UnknownSpeciesError, match="NaXy"):
        ia.Salt.parse("NaXy")


@given(st.sampled_from(sorted(ion_table())))
def test_parse_canonical_parse_is_stable(name):
    ion = ia.Ion.parse(name)
    again = ia.Ion.parse(ion.name)
    assert again == ion


@given(st.text(max_size=20))
def test_ion_parser_raises_only_ionact_errors(text):
    try:
        ia.Ion.parse(text)
    except IonactError:
        pass


@given(st.text(alphabet="NaClSOH()2345·.*+-", max_size=16))
def test_salt_parser_raises_only_ionact_errors(text):
    try:
        ia.Salt.parse(text)
    except IonactError:
        pass


@pytest.mark.parametrize("formula", ["NaCl", "CuSO4(H2O)5", "(NH4)2SO4", "Ca(NO3)2", "KH2PO4", "Na2B4O7(H2O)10",
                                     "C8H5KO4", "CH3COOH", "C14H18N2O8", "Al2(SO4)3", "K4Fe(CN)6"])
def test_formula_mass_equals_periodictable(formula):
    # our element split with periodictable's atomic weights equals periodictable's own formula
    # parser (the reference library)
    import periodictable

    from ionact.species import formula_mass

    assert formula_mass(formula) == pytest.approx(periodictable.formula(formula).mass, rel=1e-14)


@pytest.mark.parametrize("bad", ["Xx2", "Ca(NO3", "CaNO3)2", "H0", "Ca[OH]2", "n"])
def test_formula_mass_refuses_what_is_not_a_formula(bad):
    from ionact.species import formula_mass

    with pytest.raises(ia.InputError, match="not a chemical formula"):
        formula_mass(bad)
