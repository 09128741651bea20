"""The one solution-density model against published single-salt densities."""

import csv
from pathlib import Path

import numpy as np
import pytest

import ionact as ia
from ionact.density import water_per_litre

REF = Path(__file__).parent / "reference" / "densities_crc_20C.csv"
# CRC Handbook of Chemistry and Physics, "Concentrative properties of aqueous solutions",
# density at 20 °C against mass percent (values from memory). The S_i were fitted to these
# rows (tools/fit_apparent_volumes.py), so this checks the shipped coefficients and the
# model's form, from 0.1 to about 5 mol/L.
ROWS = [(r["salt"], float(r["mass_percent"]), float(r["density_g_cm3"])) for r in csv.DictReader(REF.open())]


@pytest.mark.parametrize("salt,percent,rho", ROWS, ids=[f"{s}-{p:g}%" for s, p, _ in ROWS])
def test_density_and_molality_against_crc_table(salt, percent, rho):
    s = ia.Salt.parse(salt)
    molality = percent / (s.molar_mass * (100.0 - percent)) * 1000.0  # exact from the mass fraction
    sol = ia.Solution.from_salts({salt: molality}, temperature=20.0)
    assert sol.density == pytest.approx(rho, rel=2e-3)
    # and the other direction: the molar concentration read off the table gives the molality
    molar = rho * percent * 10.0 / s.molar_mass
    back = ia.Solution.from_salts({salt: f"{molar} mol/L"}, temperature=20.0)
    cation = s.ions[0][0]
    assert back.molality(cation) / s.ions[0][1] == pytest.approx(molality, rel=3e-3)


def test_concentrated_ammonium_sulfate_stock_molality():
    # 40 % (NH4)2SO4 at 20 °C, 1.2288 g/cm³ (CRC, from memory): 3.720 mol/L is 5.045 mol/kg.
    # The infinite-dilution volumes alone gave a molality 3–4 % low here.
    c = 1.2288 * 400.0 / ia.Salt.parse("(NH4)2SO4").molar_mass
    sol = ia.Solution.from_salts({"(NH4)2SO4": f"{c} mol/L"}, temperature=20.0)
    assert sol.molality("SO4^2-") == pytest.approx(400.0 / 132.14 / 0.6, rel=3e-3)


def test_one_model_for_both_directions():
    ions = [ia.Ion.parse(x) for x in ("Na+", "Ca^2+", "Cl-")]
    m = np.array([[0.5, 2.0], [0.3, 1.0], [1.1, 4.0]])
    w = water_per_litre(ions, 25.0, molal=m)
    w2 = water_per_litre(ions, 25.0, molar=m * w)
    np.testing.assert_allclose(w, w2, rtol=1e-12)
    # a mixed input: half of each ion given per litre, half per kilogram
    w3 = water_per_litre(ions, 25.0, molal=m / 2, molar=m * w / 2)
    np.testing.assert_allclose(w3, w, rtol=1e-12)


def test_missing_volume_is_an_error_naming_the_ion_and_water_is_a_choice():
    ions = [ia.Ion.parse("Ni^2+"), ia.Ion.parse("Cl-")]
    with pytest.raises(ia.MissingParameterError, match=r"Ni\^2\+.*density='water'"):
        water_per_litre(ions, 25.0, molal=np.array([0.1, 0.2]))
    w = water_per_litre(ions, 25.0, molal=np.array([0.1, 0.2]), density="water")
    assert float(w) == pytest.approx(ia.water.density(25.0) / 1000.0)
