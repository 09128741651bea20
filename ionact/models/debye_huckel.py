"""The Debye–Hückel family, Davies, Truesdell–Jones, B-dot, Bates–Guggenheim, Setschenow.

Each public function broadcasts over charge, ionic strength (mol/kg), ion-size and
temperature (°C) arrays and returns γ (the input's shape; a float for scalars). The
``_lg_*`` kernels return log10 γ on plain arrays with no checks, for the hot paths.
"""

from __future__ import annotations

import numpy as np

from .. import water
from ..errors import InputError, warn_range

__all__ = [
    "limiting",
    "extended_debye_huckel",
    "guntelberg",
    "davies",
    "truesdell_jones",
    "b_dot",
    "bates_guggenheim",
    "setschenow",
    "RANGES",
    "DAVIES_COEFFICIENT",
    "B_DOT",
    "SETSCHENOW_DEFAULT",
]

# Usual upper ionic strengths, mol/kg (common practice, not sharp limits).
RANGES = {
    "limiting": 0.005,
    "extended": 0.1,
    "guntelberg": 0.1,
    "davies": 0.5,
    "truesdell-jones": 2.0,
    "b-dot": 1.0,
    "bates-guggenheim": 0.1,
}
DAVIES_COEFFICIENT = 0.3
B_DOT = 0.041  # kg/mol at 25 °C (Helgeson 1969, from memory)
SETSCHENOW_DEFAULT = 0.1  # kg/mol, common practice when unknown
BATES_GUGGENHEIM_BA = 1.5  # kg^½ mol^-½ (IUPAC 2002 pH recommendations)


def _lg_limiting(z2, sqrt_i, a):
    return -a * z2 * sqrt_i


def _lg_extended(z2, sqrt_i, a, b, size):
    return -a * z2 * sqrt_i / (1.0 + b * size * sqrt_i)


def _lg_guntelberg(z2, sqrt_i, a):
    return -a * z2 * sqrt_i / (1.0 + sqrt_i)


def _lg_davies(z2, sqrt_i, i, a, c=DAVIES_COEFFICIENT):
    if not (isinstance(sqrt_i, np.ndarray) and sqrt_i.ndim
            and np.broadcast_shapes(np.shape(z2), sqrt_i.shape, np.shape(i), np.shape(a)) == sqrt_i.shape):
        return -a * z2 * (sqrt_i / (1.0 + sqrt_i) - c * i)
    f = 1.0 + sqrt_i  # the same operations on one buffer of the result's shape
    np.divide(sqrt_i, f, out=f)
    f -= c * i
    f *= -a * z2
    return f


def _lg_truesdell_jones(z2, sqrt_i, i, a, b, size, bj):
    return -a * z2 * sqrt_i / (1.0 + b * size * sqrt_i) + bj * i


def _lg_b_dot(z2, sqrt_i, i, a, b, size, bdot=B_DOT):
    return -a * z2 * sqrt_i / (1.0 + b * size * sqrt_i) + bdot * i


def _lg_bates_guggenheim(z2, sqrt_i, a):
    return -a * z2 * sqrt_i / (1.0 + BATES_GUGGENHEIM_BA * sqrt_i)


def unit_log_gamma(model: str, ionic: np.ndarray, a: np.ndarray, coefficient: float = DAVIES_COEFFICIENT
                   ) -> tuple[np.ndarray, np.ndarray]:
    """log10 γ of a singly charged ion, and its derivative with respect to I (kg/mol), under a
    model whose γ depends on the charge alone (log10 γ_z = z² × this); I > 0 mol/kg.

    The same expressions as the models' kernels, with their analytic derivatives, for
    root finders that need both (e.g. the total concentration for a measured activity).
    """
    s = np.sqrt(ionic)
    if model == "limiting":
        return -a * s, -a / (2.0 * s)
    if model == "guntelberg":
        return -a * s / (1.0 + s), -a / (2.0 * s * (1.0 + s) ** 2)
    if model == "davies":
        return (_lg_davies(1.0, s, ionic, a, coefficient),
                -a * (1.0 / (2.0 * s * (1.0 + s) ** 2) - coefficient))
    if model == "bates-guggenheim":
        b = BATES_GUGGENHEIM_BA
        return -a * s / (1.0 + b * s), -a / (2.0 * s * (1.0 + b * s) ** 2)
    raise InputError(f"model {model!r} has no single-charge form; allowed: limiting, guntelberg, davies, "
                     "bates-guggenheim")


def _array(x, what: str, model: str) -> np.ndarray:
    """A float array of a numeric argument; InputError naming it otherwise (NaN passes through)."""
    if isinstance(x, str) or (isinstance(x, np.ndarray) and x.dtype.kind in "USO"):
        raise InputError(f"{model}: {what} {x!r} is not a number")
    if isinstance(x, bool | np.bool_) or (isinstance(x, np.ndarray) and x.dtype == bool):
        raise InputError(f"{model}: {what} {x!r} is a boolean, not a number")
    if isinstance(x, np.ma.MaskedArray):
        raise InputError(f"{model}: {what} is a masked array; fill or drop the masked entries first")
    if hasattr(x, "magnitude") and hasattr(x, "units"):
        raise InputError(f"{model}: {what} must be a plain number or array in the documented unit, not a Quantity")
    try:
        return np.asarray(x, dtype=float)
    except (TypeError, ValueError, OverflowError):
        raise InputError(f"{model}: {what} {x!r} is not a number or an array of numbers") from None


def _prepare(charge, ionic_strength, temperature, model: str, warn: bool = True):
    z = _array(charge, "charge", model)
    i = _array(ionic_strength, "ionic strength", model)
    # fmin/fmax skip NaN (NaN out only when every entry is NaN): one pass each, no boolean temporaries
    lo, hi = (float(np.fmin.reduce(i, axis=None)), float(np.fmax.reduce(i, axis=None))) if i.size else (0.0, 0.0)
    if np.isnan(lo):
        lo = hi = 0.0
    if lo < 0:
        raise InputError(f"{model}: ionic strength {i[i < 0].flat[0]:g} mol/kg is negative; allowed: ≥ 0")
    t = water.checked_temperature(temperature, model)
    try:
        np.broadcast_shapes(z.shape, i.shape, t.shape)
    except ValueError:
        raise InputError(f"{model}: charge {z.shape}, ionic strength {i.shape} and temperature {t.shape} have shapes "
                         "that do not broadcast") from None
    a = water.dh_a_array(t)
    if warn and model in RANGES and hi > RANGES[model] and np.isfinite(hi):
        warn_range(
            f"model {model}: ionic strength {hi:.4g} mol/kg is above its range "
            f"0–{RANGES[model]:g} mol/kg"
        )
    return z, i, t, a


_LN10 = 2.302585092994046


def _gamma(lg):
    g = np.exp(_LN10 * lg)
    return float(g) if np.ndim(g) == 0 else g


def _size(size, model):
    """Ion sizes (Å): NaN passes through as NaN in that position; zero or negative is an error."""
    s = _array(size, "ion size", model)
    if s.size and float(np.fmin.reduce(s, axis=None)) <= 0:  # one pass, NaN skipped
        raise InputError(f"{model}: ion size {s[s <= 0].flat[0]:g} Å must be positive")
    return s


def limiting(charge, ionic_strength, temperature=25.0) -> float | np.ndarray:
    """Debye–Hückel limiting law (1923): log10 γ = −A z² √I.

    Parameters
    ----------
    charge : int or array_like
        Signed charge numbers, dimensionless.
    ionic_strength : float or array_like
        Ionic strength, mol/kg (≥ 0).
    temperature : float or array_like
        °C; A follows :func:`ionact.water.debye_huckel_a`.

    Returns
    -------
    float or numpy.ndarray
        γ, dimensionless (molal scale), broadcast over the inputs.

    Raises
    ------
    InputError
        A negative or non-numeric ionic strength, a Quantity or a
        masked array, or a temperature outside liquid water's range.

    Warns
    -----
    ValidityRangeWarning
        Above I = 0.005 mol/kg.

    References
    ----------
    P. Debye and E. Hückel, Phys. Z. 24 (1923) 185.

    Examples
    --------
    >>> round(limiting(1, 0.001), 4)
    0.9635
    """
    z, i, t, a = _prepare(charge, ionic_strength, temperature, "limiting")
    return _gamma(_lg_limiting(z * z, np.sqrt(i), a))


def extended_debye_huckel(charge, ionic_strength, size, *, temperature=25.0) -> float | np.ndarray:
    """Extended Debye–Hückel: log10 γ = −A z² √I / (1 + B å √I).

    Parameters
    ----------
    charge : int or array_like
        Signed charge numbers, dimensionless.
    ionic_strength : float or array_like
        Ionic strength, mol/kg (≥ 0).
    size : float or array_like
        Ion-size parameter å in Å (Kielland 1937 values are on :class:`ionact.Ion`).
    temperature : float or array_like
        °C; A and B follow :mod:`ionact.water`.

    Returns
    -------
    float or numpy.ndarray
        γ, dimensionless (molal scale), broadcast over the inputs.

    Raises
    ------
    InputError
        A negative or non-numeric ionic strength or size, a Quantity
        or a masked array, or a temperature outside liquid water's range.

    Warns
    -----
    ValidityRangeWarning
        Above I = 0.1 mol/kg.

    References
    ----------
    J. Kielland, J. Am. Chem. Soc. 59 (1937) 1675 (sizes and the table of γ).

    Examples
    --------
    >>> round(extended_debye_huckel(2, 0.01, 6.0), 3)  # Ca^2+; Kielland's table gives 0.675
    0.675
    """
    z, i, t, a = _prepare(charge, ionic_strength, temperature, "extended")
    b = water.dh_b_array(t)
    s = _size(size, "extended")
    shape = np.broadcast_shapes(z.shape, i.shape, s.shape, a.shape)
    if not shape:
        return _gamma(_lg_extended(z * z, np.sqrt(i), a, b, s))
    sq = np.sqrt(i)  # evaluated in place in one array of the result's shape: no temporaries of its size
    x = np.empty(shape)
    np.multiply(s, sq, out=x)
    x *= b
    x += 1.0
    np.divide(sq, x, out=x)
    x *= z
    x *= z
    x *= -_LN10 * a
    return np.exp(x, out=x)


def guntelberg(charge, ionic_strength, temperature=25.0) -> float | np.ndarray:
    """Güntelberg (1926): log10 γ = −A z² √I / (1 + √I).

    Parameters
    ----------
    charge : int or array_like
        Signed charge numbers, dimensionless.
    ionic_strength : float or array_like
        Ionic strength, mol/kg (≥ 0).
    temperature : float or array_like
        °C.

    Returns
    -------
    float or numpy.ndarray
        γ, dimensionless (molal scale), broadcast over the inputs.

    Raises
    ------
    InputError
        A negative or non-numeric ionic strength, a Quantity or a
        masked array, or a temperature outside liquid water's range.

    Warns
    -----
    ValidityRangeWarning
        Above I = 0.1 mol/kg.

    References
    ----------
    E. Güntelberg, Z. Phys. Chem. 123 (1926) 199.

    Examples
    --------
    >>> round(guntelberg(1, 0.01), 4)
    0.8986
    """
    z, i, t, a = _prepare(charge, ionic_strength, temperature, "guntelberg")
    return _gamma(_lg_guntelberg(z * z, np.sqrt(i), a))


def davies(charge, ionic_strength, temperature=25.0, *, coefficient=DAVIES_COEFFICIENT) -> float | np.ndarray:
    """Davies (1962): log10 γ = −A z² (√I/(1 + √I) − c I), c = 0.3 by default.

    Parameters
    ----------
    charge : int or array_like
        Signed charge numbers, dimensionless.
    ionic_strength : float or array_like
        Ionic strength, mol/kg (≥ 0).
    temperature : float or array_like
        °C.
    coefficient : float
        The linear-term coefficient c, dimensionless (0.3; some authors use 0.2).

    Returns
    -------
    float or numpy.ndarray
        γ, dimensionless (molal scale), broadcast over the inputs.

    Raises
    ------
    InputError
        A negative or non-numeric ionic strength, a Quantity or a
        masked array, or a temperature outside liquid water's range.

    Warns
    -----
    ValidityRangeWarning
        Above I = 0.5 mol/kg.

    References
    ----------
    C. W. Davies, *Ion Association*, Butterworths (1962).

    Examples
    --------
    >>> round(davies(1, 0.1), 4)
    0.7809
    """
    z, i, t, a = _prepare(charge, ionic_strength, temperature, "davies")
    shape = np.broadcast_shapes(z.shape, i.shape, a.shape)
    if not shape:
        return _gamma(_lg_davies(z * z, np.sqrt(i), i, a, coefficient))
    sq = np.sqrt(i)  # evaluated in place in one array of the result's shape
    x = np.empty(shape)
    np.add(sq, 1.0, out=x)
    np.divide(sq, x, out=x)
    x -= coefficient * i
    x *= z
    x *= z
    x *= -_LN10 * a
    return np.exp(x, out=x)


def truesdell_jones(charge, ionic_strength, a_size, *, b_ion, temperature=25.0) -> float | np.ndarray:
    """Truesdell–Jones (1974): log10 γ = −A z² √I / (1 + B a √I) + b I.

    Parameters
    ----------
    charge : int or array_like
        Signed charge numbers, dimensionless.
    ionic_strength : float or array_like
        Ionic strength, mol/kg (≥ 0).
    a_size : float or array_like
        Truesdell–Jones a, Å.
    b_ion : float or array_like
        Truesdell–Jones b, kg/mol.
    temperature : float or array_like
        °C.

    Returns
    -------
    float or numpy.ndarray
        γ, dimensionless (molal scale), broadcast over the inputs.

    Raises
    ------
    InputError
        A negative or non-numeric ionic strength or size, a Quantity
        or a masked array, or a temperature outside liquid water's range.

    Warns
    -----
    ValidityRangeWarning
        Above I = 2 mol/kg.

    References
    ----------
    A. H. Truesdell and B. F. Jones, J. Res. U.S. Geol. Surv. 2 (1974) 233.

    Examples
    --------
    >>> round(truesdell_jones(1, 0.5, 4.0, b_ion=0.075), 3)  # Na+
    0.708
    """
    z, i, t, a = _prepare(charge, ionic_strength, temperature, "truesdell-jones")
    b = water.dh_b_array(t)
    return _gamma(_lg_truesdell_jones(z * z, np.sqrt(i), i, a, b, _size(a_size, "truesdell-jones"),
                                      np.asarray(b_ion, dtype=float)))


def b_dot(charge, ionic_strength, size, *, temperature=25.0, bdot=B_DOT) -> float | np.ndarray:
    """B-dot (Helgeson 1969): extended Debye–Hückel plus Ḃ I, Ḃ = 0.041 kg/mol at 25 °C.

    Parameters
    ----------
    charge : int or array_like
        Signed charge numbers, dimensionless.
    ionic_strength : float or array_like
        Ionic strength, mol/kg (≥ 0).
    size : float or array_like
        Ion-size parameter å, Å.
    temperature : float or array_like
        °C.
    bdot : float
        Ḃ, kg/mol (0.041 at 25 °C).

    Returns
    -------
    float or numpy.ndarray
        γ, dimensionless (molal scale), broadcast over the inputs.

    Raises
    ------
    InputError
        A negative or non-numeric ionic strength or size, a Quantity
        or a masked array, or a temperature outside liquid water's range.

    Warns
    -----
    ValidityRangeWarning
        Above I = 1 mol/kg, or away from 25 ± 5 °C (Ḃ is a 25 °C value here).

    References
    ----------
    H. C. Helgeson, Am. J. Sci. 267 (1969) 729 (Ḃ from memory).

    Examples
    --------
    >>> round(b_dot(1, 0.1, 4.5), 4)
    0.7835
    """
    z, i, t, a = _prepare(charge, ionic_strength, temperature, "b-dot")
    if np.any(np.abs(t - 25.0) > 5.0):
        warn_range(f"model b-dot: Ḃ = {bdot} is a 25 °C value; temperature outside 20–30 °C")
    b = water.dh_b_array(t)
    return _gamma(_lg_b_dot(z * z, np.sqrt(i), i, a, b, _size(size, "b-dot"), bdot))


def bates_guggenheim(charge, ionic_strength, temperature=25.0) -> float | np.ndarray:
    """Bates–Guggenheim convention: log10 γ_Cl = −A √I / (1 + 1.5 √I), for I ≤ 0.1 mol/kg.

    The convention that fixes single-ion activity in the definition of pH. For other
    charges the same form with z².

    Parameters
    ----------
    charge : int or array_like
        Signed charge numbers, dimensionless.
    ionic_strength : float or array_like
        Ionic strength, mol/kg (≥ 0).
    temperature : float or array_like
        °C.

    Returns
    -------
    float or numpy.ndarray
        γ, dimensionless (molal scale), broadcast over the inputs.

    Raises
    ------
    InputError
        A negative or non-numeric ionic strength, a Quantity or a
        masked array, or a temperature outside liquid water's range.

    Warns
    -----
    ValidityRangeWarning
        Above I = 0.1 mol/kg.

    References
    ----------
    R. P. Buck et al., Pure Appl. Chem. 74 (2002) 2169 (IUPAC recommendations on pH).

    Examples
    --------
    >>> round(bates_guggenheim(-1, 0.1), 3)
    0.777
    """
    z, i, t, a = _prepare(charge, ionic_strength, temperature, "bates-guggenheim")
    return _gamma(_lg_bates_guggenheim(z * z, np.sqrt(i), a))


def setschenow(ionic_strength, k=SETSCHENOW_DEFAULT) -> float | np.ndarray:
    """Setschenow form for neutral solutes: log10 γ = k I (k ≈ 0.1 kg/mol when unknown).

    Parameters
    ----------
    ionic_strength : float or array_like
        Ionic strength, mol/kg (≥ 0).
    k : float or array_like
        Setschenow (salting-out) coefficient, kg/mol.

    Returns
    -------
    float or numpy.ndarray
        γ of the neutral solute, dimensionless.

    Raises
    ------
    InputError
        A negative ionic strength.

    References
    ----------
    J. Setschenow, Z. Phys. Chem. 4 (1889) 117; k = 0.1 kg/mol when unknown is common
    practice.

    Examples
    --------
    >>> round(setschenow(1.0), 4)
    1.2589
    """
    i = np.asarray(ionic_strength, dtype=float)
    if np.any(i < 0):
        raise InputError(f"setschenow: ionic strength {i[i < 0].flat[0]:g} mol/kg is negative")
    return _gamma(np.asarray(k, dtype=float) * i)
