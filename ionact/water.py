"""Properties of liquid water at 1 atm and the Debye–Hückel parameters derived from them.

All functions take the temperature in °C (float or array), broadcast, and return the
input's shape (a float for a float). The correlations are valid 0–100 °C; outside that
range a :class:`~ionact.errors.ValidityRangeWarning` is issued (an error in strict mode).

Constants are the exact SI values (CODATA 2018) plus the 2018 CODATA vacuum permittivity.
"""

from __future__ import annotations

import math

import numpy as np

from .errors import InputError, warn_range

__all__ = [
    "checked_temperature",
    "bjerrum_kappa",
    "dh_a_array",
    "dh_b_array",
    "density",
    "permittivity",
    "debye_huckel_a",
    "debye_huckel_b",
    "pitzer_aphi",
    "ELEMENTARY_CHARGE",
    "BOLTZMANN",
    "AVOGADRO",
    "GAS_CONSTANT",
    "FARADAY",
    "VACUUM_PERMITTIVITY",
    "ZERO_CELSIUS",
    "WATER_MOLAR_MASS",
]

ELEMENTARY_CHARGE = 1.602176634e-19  # C, exact
BOLTZMANN = 1.380649e-23  # J/K, exact
AVOGADRO = 6.02214076e23  # 1/mol, exact
GAS_CONSTANT = BOLTZMANN * AVOGADRO  # J/(mol K)
FARADAY = ELEMENTARY_CHARGE * AVOGADRO  # C/mol
VACUUM_PERMITTIVITY = 8.8541878128e-12  # F/m, CODATA 2018
ZERO_CELSIUS = 273.15  # K
WATER_MOLAR_MASS = 18.01528  # g/mol

T_MIN, T_MAX = 0.0, 100.0
# Liquid water at 1 atm: the correlations are used with a range warning in these narrow
# margins (supercooled water to −5 °C, superheated to 105 °C) and refused beyond them.
T_MARGIN_LOW, T_MARGIN_HIGH = -5.0, 105.0
KELVIN_HINT = 200.0  # °C: a value above this is most likely a temperature in kelvin


def checked_temperature(t: object, what: str) -> np.ndarray:
    """Temperatures (°C, or unit strings / Quantities) checked against liquid water's range.

    NaN passes through (NaN in that position of the result); a value outside
    −5…105 °C is an error, with a hint when it looks like kelvin; 0–100 °C is silent and the
    margins warn.

    Parameters
    ----------
    t : float, array_like, str or pint.Quantity
        Temperature; bare numbers are °C, strings and Quantities carry their own unit
        ("298.15 K", "77 degF").
    what : str
        What the temperature is for, named in errors and warnings.

    Returns
    -------
    numpy.ndarray
        The temperatures in °C, float, of the input's shape.

    Raises
    ------
    InputError
        A value outside −5…105 °C, or one that is not a temperature.
    UnitError
        A unit that is not a temperature unit.

    Examples
    --------
    >>> float(checked_temperature("298.15 K", "example"))
    25.0
    """
    from .units import temperature_celsius

    arr = np.asarray(temperature_celsius(t, what), dtype=float)
    finite = arr[np.isfinite(arr)]
    if finite.size and (finite.min() < T_MARGIN_LOW or finite.max() > T_MARGIN_HIGH):
        bad = float(finite.min() if finite.min() < T_MARGIN_LOW else finite.max())
        hint = (f"; it looks like kelvin — {bad:g} K is {bad - ZERO_CELSIUS:.2f} °C" if bad > KELVIN_HINT
                else "")
        raise InputError(f"{what}: temperature {bad:g} °C is outside liquid water's {T_MIN:g}–{T_MAX:g} °C "
                         f"(allowed with a warning down to {T_MARGIN_LOW:g} and up to {T_MARGIN_HIGH:g} °C){hint}",
                         value=bad, allowed=f"{T_MIN:g}–{T_MAX:g} °C", field=what)
    if finite.size and (finite.min() < T_MIN or finite.max() > T_MAX):
        bad = float(finite.min() if finite.min() < T_MIN else finite.max())
        warn_range(f"{what}: temperature {bad:g} °C is outside 0–100 °C")
    return arr


def _out(x: np.ndarray):
    return float(x) if np.ndim(x) == 0 else x


def _density(t: np.ndarray) -> np.ndarray:
    num = (
        999.83952
        + 16.945176 * t
        - 7.9870401e-3 * t**2
        - 46.170461e-6 * t**3
        + 105.56302e-9 * t**4
        - 280.54253e-12 * t**5
    )
    return num / (1.0 + 16.879850e-3 * t)


def _permittivity(t: np.ndarray) -> np.ndarray:
    return 87.740 - 0.40008 * t + 9.398e-4 * t**2 - 1.410e-6 * t**3


def density(temperature=25.0):
    """Density of liquid water at 1 atm, kg/m³.

    Parameters
    ----------
    temperature : float, array_like, str or pint.Quantity
        °C for bare numbers, valid 0–100 °C (warned to −5 and 105 °C).

    Returns
    -------
    float or numpy.ndarray
        Density, kg/m³ (a float for a scalar input).

    Raises
    ------
    InputError
        A temperature outside −5…105 °C or not a number.

    Notes
    -----
    Kell's (1975) rational function, ρ = (999.83952 + 16.945176 t − 7.9870401e-3 t² −
    46.170461e-6 t³ + 105.56302e-9 t⁴ − 280.54253e-12 t⁵)/(1 + 16.879850e-3 t).
    It agrees with IAPWS-95 to about 15 ppm over 0–95 °C (checked in the tests).

    References
    ----------
    G. S. Kell, J. Chem. Eng. Data 20 (1975) 97 (coefficients from memory).

    Examples
    --------
    >>> round(density(25.0), 2)
    997.04
    """
    return _out(_density(checked_temperature(temperature, "water density")))


def permittivity(temperature=25.0):
    """Relative permittivity (dielectric constant) of water at 1 atm.

    Parameters
    ----------
    temperature : float, array_like, str or pint.Quantity
        °C for bare numbers, valid 0–100 °C (warned to −5 and 105 °C).

    Returns
    -------
    float or numpy.ndarray
        ε_r, dimensionless.

    Raises
    ------
    InputError
        A temperature outside −5…105 °C or not a number.

    Notes
    -----
    Malmberg & Maryott (1956): ε = 87.740 − 0.40008 t + 9.398e-4 t² − 1.410e-6 t³; within
    about 0.35 % of the IAPWS R8-97 formulation (checked in the tests).

    References
    ----------
    C. G. Malmberg and A. A. Maryott, J. Res. Natl. Bur. Stand. 56 (1956) 1 (coefficients
    from memory).

    Examples
    --------
    >>> round(permittivity(25.0), 2)
    78.3
    """
    return _out(_permittivity(checked_temperature(temperature, "water permittivity")))


def bjerrum_kappa(t: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Bjerrum length and the Debye screening parameter per root ionic strength.

    l_B = e²/(4π ε0 ε k T) and κ/√I = √(8π l_B N_A ρ_w), with ε from :func:`permittivity`
    and ρ_w from :func:`density`; no range checks (the models' hot path).

    Parameters
    ----------
    t : numpy.ndarray
        Temperatures, °C.

    Returns
    -------
    l_B : numpy.ndarray
        Bjerrum length, m.
    kappa : numpy.ndarray
        κ/√I, m⁻¹ (mol/kg)^-½.

    Raises
    ------
    TypeError
        ``t`` that is not numeric.

    References
    ----------
    R. A. Robinson and R. H. Stokes, *Electrolyte Solutions*, 2nd ed., Butterworths (1959),
    ch. 4 (from memory).

    Examples
    --------
    >>> import numpy as np
    >>> lb, kappa = bjerrum_kappa(np.array([25.0]))
    >>> round(float(lb[0]) * 1e9, 3)  # nm
    0.716
    """
    eps = _permittivity(t)
    rho = _density(t)
    kt = BOLTZMANN * (t + ZERO_CELSIUS)
    lb = ELEMENTARY_CHARGE**2 / (4 * math.pi * VACUUM_PERMITTIVITY * eps * kt)
    kappa = np.sqrt(8 * math.pi * lb * AVOGADRO * rho)
    return lb, kappa


def _dh_a(t: np.ndarray) -> np.ndarray:
    lb, kappa = bjerrum_kappa(t)
    return lb * kappa / (2 * math.log(10))


def _dh_b(t: np.ndarray) -> np.ndarray:
    return bjerrum_kappa(t)[1] * 1e-10


def _once_per_temperature(fn, t: np.ndarray) -> np.ndarray:
    """Evaluate ``fn`` once when every temperature in ``t`` is the same (the usual batch)."""
    t = np.asarray(t, dtype=float)
    if t.size > 1:
        first = t.flat[0]
        # one value, broadcast (read-only) over the batch: no array to fill (a broadcast of one
        # temperature, as a Solution carries it, is seen from its strides without a pass)
        if (t.ndim == 1 and t.strides[0] == 0) or np.all(t == first):
            return np.broadcast_to(float(fn(np.asarray(first))), t.shape)
    return np.asarray(fn(t), dtype=float)


def dh_a_array(t: np.ndarray) -> np.ndarray:
    """Debye–Hückel A (log10 basis) for an array of temperatures, no range checks.

    Evaluated once per distinct temperature (the models' hot path); see
    :func:`debye_huckel_a` for the checked scalar form.

    Parameters
    ----------
    t : numpy.ndarray
        Temperatures, °C.

    Returns
    -------
    numpy.ndarray
        A, kg^½ mol^-½, of the shape of ``t`` (a read-only broadcast of one value when every
        temperature is the same).

    References
    ----------
    P. Debye and E. Hückel, Phys. Z. 24 (1923) 185; the expression in Robinson and Stokes,
    *Electrolyte Solutions* (1959), ch. 9 (from memory).

    Examples
    --------
    >>> import numpy as np
    >>> dh_a_array(np.array([25.0, 37.0])).round(4)
    array([0.5108, 0.5215])
    """
    return _once_per_temperature(_dh_a, t)


def dh_b_array(t: np.ndarray) -> np.ndarray:
    """Debye–Hückel B for an array of temperatures, no range checks.

    Parameters
    ----------
    t : numpy.ndarray
        Temperatures, °C.

    Returns
    -------
    numpy.ndarray
        B = κ/√I, Å⁻¹ kg^½ mol^-½, of the shape of ``t`` (read-only when broadcast, as for
        :func:`dh_a_array`).

    References
    ----------
    P. Debye and E. Hückel, Phys. Z. 24 (1923) 185; Robinson and Stokes, *Electrolyte
    Solutions* (1959), ch. 9 (from memory).

    Examples
    --------
    >>> import numpy as np
    >>> dh_b_array(np.array([25.0])).round(4)
    array([0.3287])
    """
    return _once_per_temperature(_dh_b, t)


def debye_huckel_a(temperature=25.0):
    """Debye–Hückel A on the log10 basis, kg^½ mol^-½.

    Parameters
    ----------
    temperature : float, array_like, str or pint.Quantity
        °C for bare numbers, valid 0–100 °C (warned to −5 and 105 °C).

    Returns
    -------
    float or numpy.ndarray
        A, kg^½ mol^-½.

    Raises
    ------
    InputError
        A temperature outside −5…105 °C or not a number.

    Notes
    -----
    A = l_B κ / (2 ln10 √I) with the Bjerrum length l_B = e²/(4π ε0 ε k T) and
    κ² = 8π l_B N_A ρ_w I, from :func:`density` and :func:`permittivity`.

    References
    ----------
    P. Debye and E. Hückel, Phys. Z. 24 (1923) 185; Robinson and Stokes, *Electrolyte
    Solutions* (1959), ch. 9 and appendix 7.1 (0.5115 at 25 °C, from memory).

    Examples
    --------
    >>> round(debye_huckel_a(25.0), 3)
    0.511
    """
    return _out(_dh_a(checked_temperature(temperature, "Debye–Hückel A")))


def debye_huckel_b(temperature=25.0):
    """Debye–Hückel B (κ/√I) in Å⁻¹ kg^½ mol^-½.

    Parameters
    ----------
    temperature : float, array_like, str or pint.Quantity
        °C for bare numbers, valid 0–100 °C (warned to −5 and 105 °C).

    Returns
    -------
    float or numpy.ndarray
        B, Å⁻¹ kg^½ mol^-½.

    Raises
    ------
    InputError
        A temperature outside −5…105 °C or not a number.

    References
    ----------
    P. Debye and E. Hückel, Phys. Z. 24 (1923) 185; Robinson and Stokes, *Electrolyte
    Solutions* (1959), appendix 7.1 (0.3291 at 25 °C, from memory).

    Examples
    --------
    >>> round(debye_huckel_b(25.0), 3)
    0.329
    """
    return _out(_dh_b(checked_temperature(temperature, "Debye–Hückel B")))


def pitzer_aphi(temperature=25.0):
    """Pitzer's Debye–Hückel osmotic coefficient parameter A_φ = A ln10 / 3 (natural-log basis).

    Parameters
    ----------
    temperature : float, array_like, str or pint.Quantity
        °C for bare numbers, valid 0–100 °C (warned to −5 and 105 °C).

    Returns
    -------
    float or numpy.ndarray
        A_φ, kg^½ mol^-½.

    Raises
    ------
    InputError
        A temperature outside −5…105 °C or not a number.

    References
    ----------
    K. S. Pitzer, *Activity Coefficients in Electrolyte Solutions*, 2nd ed., CRC (1991),
    ch. 3 (0.3915 at 25 °C, from memory).

    Examples
    --------
    >>> round(pitzer_aphi(25.0), 3)
    0.392
    """
    return _out(_dh_a(checked_temperature(temperature, "Pitzer A_phi")) * math.log(10) / 3)
