"""Amount strings and conversions."""

import warnings

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from ionact.errors import InputError, UnitAssumptionWarning, UnitError
from ionact.units import convert_amount, parse_amount


@pytest.mark.parametrize(
    "text,ion,value,basis",
    [
        ("0.1 mol/kg", None, 0.1, "molal"),
        ("2 mmol/kg", None, 0.002, "molal"),
        ("0.05 mol/L", None, 0.05, "molar"),
        ("5 mM", None, 0.005, "molar"),
        ("250 umol/L", None, 2.5e-4, "molar"),
        ("35.45 mg/L", "Cl-", 1e-3, "molar"),
        ("19 µg/L", "F-", 1e-6, "molar"),
        ("2 meq/L", "Ca^2+", 1e-3, "molar"),
        # common practice: 1 mg/L NO3-N is 1/14.007 mmol/L of nitrate
        ("14.007 mg/L as N", "NO3-", 1e-3, "molar"),
        ("14.007 mg/L as N", "NH4+", 1e-3, "molar"),
        # 50.04 g CaCO3 per equivalent (common practice): 100.08 mg/L as CaCO3 = 1 mmol/L Ca
        ("100.08 mg/L as CaCO3", "Ca^2+", 1e-3, "molar"),
    ],
)
def test_parse_amounts(text, ion, value, basis):
    a = parse_amount(text, ion)
    assert a.basis == basis
    assert a.value == pytest.approx(value, rel=2e-4)


def test_nitrate_as_n_factor():
    # common practice: 1 mg/L NO3-N = 4.427 mg/L NO3-
    as_n = parse_amount("1 mg/L as N", "NO3-").value
    plain = parse_amount("4.427 mg/L", "NO3-").value
    assert as_n == pytest.approx(plain, rel=1e-3)


def test_ppm_warns_and_reads_mg_per_l():
    with pytest.warns(UnitAssumptionWarning, match="ppm"):
        a = parse_amount("35.45 ppm", "Cl-")
    assert a.value == pytest.approx(1e-3, rel=1e-3)


def test_pint_quantity_accepted():
    from ionact.units import registry

    q = registry().Quantity(3.0, "mmol/L")
    assert parse_amount(q).value == pytest.approx(0.003)


def test_convert_back():
    assert convert_amount(1e-3, "molar", "mg/L", "Cl-") == pytest.approx(35.45, rel=1e-3)
    assert convert_amount(1e-3, "molar", "meq/L", "Ca^2+") == pytest.approx(2.0)
    assert convert_amount(0.01, "molal", "mol/L", "Na+", water_per_litre=0.99) == pytest.approx(0.0099)
    with pytest.raises(UnitError, match="density"):
        convert_amount(0.01, "molal", "mol/L", "Na+")


@pytest.mark.parametrize(
    "text,ion,err,fragment",
    [
        ("3 furlongs", "Na+", UnitError, "furlong"),
        ("3 m/s", "Na+", UnitError, "m/s"),
        ("abc", "Na+", UnitError, "abc"),
        ("-1 mol/L", "Na+", InputError, "-1 mol/L"),
        ("5", "Na+", UnitError, "no unit"),
        ("35 mg/L", None, UnitError, "mass"),
        ("2 meq/L", "NH3", UnitError, "charged"),
        ("1 mg/L as N", "Cl-", UnitError, "no N"),
    ],
)
def test_bad_units(text, ion, err, fragment):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        with pytest.raises(err) as info:
            parse_amount(text, ion)
    assert fragment in str(info.value)


def test_nan_and_negative_numbers():
    with pytest.raises(InputError, match="NaN"):
        parse_amount(float("nan"))
    with pytest.raises(InputError, match="negative"):
        parse_amount([0.1, -0.2])


# -- the strict amount grammar ---------------------------------------------------------------
@pytest.mark.parametrize("text,fragment", [
    ("0,1 mol/kg", "'0.1 mol/kg'"),        # read as 0 before: the ",1" was dropped
    ("2,1 mg/L", "'2.1 mg/L'"),
    ("0,5 g/L", "decimal comma"),
    ("1,000 mg/L", "thousands separator"),
])
def test_decimal_commas_are_refused_with_the_corrected_string(text, fragment):
    with pytest.raises(InputError, match=fragment):
        parse_amount(text, "Cl-")


@pytest.mark.parametrize("text,err", [
    ("9**9**9", InputError), ("9**9**9 mol/L", InputError), ("2 3 mol/L", InputError), ("0.1=2", InputError),
    ("1+2 mol/L", InputError), ("2*3 mmol/L", InputError), ("1 %", UnitError), ("1 dimensionless", UnitError),
    ("1 MM", UnitError), ("1 mol/L/L/L", UnitError), ("nan mol/L", UnitError), ("inf mg/L", UnitError),
    ("1 mol/(L)", InputError), ("1 mmol/dm^3", InputError), ("x" * 30000, InputError), ("1 " + "m" * 50, UnitError),
])
def test_arithmetic_and_non_amounts_are_refused(text, err):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        with pytest.raises(err):
            parse_amount(text, "Cl-")


@pytest.mark.parametrize("value", [True, False, np.bool_(True), np.array([True, False])])
def test_booleans_are_not_amounts(value):
    with pytest.raises(InputError, match="boolean"):
        parse_amount(value)


def test_masked_arrays_are_refused():
    with pytest.raises(InputError, match="masked"):
        parse_amount(np.ma.array([0.1, 0.2], mask=[False, True]))


@pytest.mark.parametrize("unit,expected", [("mM", 1.0), ("mmol/L", 1.0), ("nmol/L", 1e6), ("g/L", 0.035453),
                                           ("mg/kg", 1e-3 / 0.997 * 35453), ("µg/L", 35453), ("meq/L", 1.0)])
def test_any_input_unit_can_be_asked_for_on_output(unit, expected):
    # 1 mmol/L of chloride (35.453 g/mol) in each unit; mg/kg goes through 0.997 kg water per litre
    v = convert_amount(1e-3, "molar", unit, "Cl-", water_per_litre=0.997)
    assert v == pytest.approx(expected, rel=1e-4)
    back = parse_amount(f"{v!r} {unit}", "Cl-")
    assert back.value == pytest.approx(1e-3 if back.basis == "molar" else 1e-3 / 0.997, rel=1e-9)


UNITS = {"mol/L": 1.0, "mmol/L": 1e-3, "mM": 1e-3, "µM": 1e-6, "umol/L": 1e-6, "mol/kg": 1.0, "mmol/kg": 1e-3,
         "M": 1.0, "nM": 1e-9}


@given(st.floats(0, 1e6, allow_nan=False, allow_infinity=False), st.sampled_from(sorted(UNITS)),
       st.sampled_from(["", " ", "  "]))
def test_valid_strings_read_exactly_what_a_person_reads(x, unit, sep):
    text = f"{x!r}{sep}{unit}"
    assert parse_amount(text).value == pytest.approx(x * UNITS[unit], rel=1e-15, abs=0)


@given(st.text(max_size=60))
def test_any_string_parses_or_raises_a_named_error_quickly(text):
    import time

    t0 = time.perf_counter()
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            a = parse_amount(text, "NO3-")
    except (InputError, UnitError):
        pass
    else:
        assert np.isfinite(a.value) and a.value >= 0
    assert time.perf_counter() - t0 < 0.05  # bounded (< 10 ms typical; the first pint call builds the registry)


def test_common_unit_table_agrees_with_pint():
    # the units converted without the registry (for a light first command) against pint itself
    from ionact.units import _COMMON_UNITS, registry

    ureg = registry()
    for table in _COMMON_UNITS:
        for a, fa in table.items():
            for b, fb in table.items():
                if a and b:
                    assert fa / fb == pytest.approx(float(ureg.Quantity(1.0, a).to(b).magnitude), rel=1e-12), (a, b)
