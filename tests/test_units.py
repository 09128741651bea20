"""Amount strings and conversions."""

import warnings

import pytest

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
        # DOMAIN §2 (common practice): 1 mg/L NO3-N is 1/14.007 mmol/L of nitrate
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
    # DOMAIN §2 (common practice): 1 mg/L NO3-N = 4.427 mg/L NO3-
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
