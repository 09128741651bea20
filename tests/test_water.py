"""Water properties against IAPWS (via the `iapws` package) and published 25 °C values."""

import math

import numpy as np
import pytest
from iapws import IAPWS95

import ionact as ia
from ionact import water
from ionact.errors import ValidityRangeError, ValidityRangeWarning

TEMPS = [0.01, 5, 10, 20, 25, 37, 50, 60, 75, 90]


def _iapws(t):
    state = IAPWS95(T=t + 273.15, P=0.101325)
    return state.rho, state.epsilon


def _a_from(rho, eps, t):
    # Debye–Hückel A from density and permittivity, written independently of the library
    e, eps0, k, na = 1.602176634e-19, 8.8541878128e-12, 1.380649e-23, 6.02214076e23
    lb = e**2 / (4 * math.pi * eps0 * eps * k * (t + 273.15))
    return lb * math.sqrt(8 * math.pi * lb * na * rho) / (2 * math.log(10))


@pytest.mark.parametrize("t", TEMPS)
def test_density_against_iapws95(t):
    # IAPWS-95 (Wagner & Pruss 2002) via the iapws package: within 50 ppm
    rho, _ = _iapws(t)
    assert water.density(t) == pytest.approx(rho, rel=50e-6)


@pytest.mark.parametrize("t", TEMPS)
def test_permittivity_against_iapws_r8_97(t):
    # IAPWS R8-97 static dielectric constant via the iapws package: within 0.5 %
    _, eps = _iapws(t)
    assert water.permittivity(t) == pytest.approx(eps, rel=5e-3)


@pytest.mark.parametrize("t", TEMPS)
def test_debye_huckel_a_against_iapws(t):
    # A computed from IAPWS-95 density and R8-97 permittivity: within 0.5 %
    rho, eps = _iapws(t)
    assert water.debye_huckel_a(t) == pytest.approx(_a_from(rho, eps, t), rel=5e-3)


def test_published_25c_values():
    # A ≈ 0.510, B ≈ 0.328 1/Å at 25 °C (from IAPWS water)
    assert water.debye_huckel_a(25.0) == pytest.approx(0.510, abs=0.0015)
    assert water.debye_huckel_b(25.0) == pytest.approx(0.328, abs=0.0015)
    # Archer & Wang 1990 (from memory): A_phi = 0.3915 at 25 °C
    assert water.pitzer_aphi(25.0) == pytest.approx(0.3915, rel=3e-3)


@pytest.mark.parametrize("t,slope", [(0.0, 54.20), (25.0, 59.16), (37.0, 61.54)])
def test_nernst_slope(t, slope):
    # ln(10) R T / F from CODATA 2018 exact constants; 59.16 mV at 25 °C is common practice
    assert ia.nernst_slope(1, t) == pytest.approx(slope, abs=0.01)
    assert ia.nernst_slope(-2, t) == pytest.approx(-slope / 2, abs=0.01)


def test_vectorised_shapes():
    t = np.linspace(0, 100, 11)
    for f in (water.density, water.permittivity, water.debye_huckel_a, water.debye_huckel_b, water.pitzer_aphi):
        out = f(t)
        assert out.shape == t.shape
        assert out[3] == pytest.approx(f(float(t[3])))
        assert isinstance(f(25.0), float)


def test_range_warning_and_strict():
    # liquid water 0–100 °C; a narrow margin (−5…105 °C) warns, and strict mode refuses it
    with pytest.warns(ValidityRangeWarning, match="104 °C is outside 0–100 °C"):
        water.density(104.0)
    with ia.strict(), pytest.raises(ValidityRangeError, match="-5"):
        water.debye_huckel_a(-5.0)


@pytest.mark.parametrize("t,fragment", [(-300.0, "-300 °C is outside"), (120.0, "120 °C is outside"),
                                        (1000.0, "1000 K is 726.85 °C"), (298.15, "looks like kelvin")])
def test_temperatures_outside_liquid_water_are_errors(t, fragment):
    # Issue: water.density(1000) was −11 812 kg/m³, and 298.15 "°C" gave γ with exit 0.
    with pytest.raises(ia.InputError, match=fragment):
        water.density(t)


def test_temperature_units_and_nan():
    assert water.density("77 degF") == pytest.approx(water.density(25.0))
    assert water.density("298.15 K") == pytest.approx(water.density(25.0))
    out = water.density(np.array([25.0, np.nan]))
    assert np.isnan(out[1]) and out[0] == pytest.approx(997.045, abs=1e-3)  # Kell 1975 at 25 °C


def test_zero_charge():
    with pytest.raises(ia.InputError, match="charge 0"):
        ia.nernst_slope(0)
