"""Electrode arithmetic: Nernst slopes, mV ↔ relative error, Nikolsky–Eisenman bias,
and the error of measuring at a temperature other than the calibration's.

Conventions: E = E° + S(T)/z · log10 a with S = ln(10) R T / F (59.16 mV at 25 °C); a
positive ΔE therefore means a higher apparent activity for a cation and a lower one for
an anion. Relative errors are fractions (0.039 = 3.9 %).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np

from ._frozen import Record, frozen_map
from .errors import InputError
from .species import resolve_ion
from .water import FARADAY, GAS_CONSTANT, ZERO_CELSIUS, checked_temperature

__all__ = [
    "nernst_slope",
    "mv_to_relative_error",
    "relative_error_to_mv",
    "NikolskyResult",
    "nikolsky_eisenman",
    "TemperatureError",
    "temperature_error",
]


def _out(x):
    x = np.asarray(x)
    return float(x) if x.ndim == 0 else x


def nernst_slope(charge: object = 1, temperature: object = 25.0) -> float | np.ndarray:
    """Nernst slope ln(10) R T / (z F) in mV per decade of activity, signed by the charge.

    Parameters
    ----------
    charge : int or array_like
        Signed charge number of the measured ion (not zero), dimensionless.
    temperature : float, array_like, str or pint.Quantity
        °C for bare numbers.

    Returns
    -------
    float or numpy.ndarray
        Slope, mV per decade (59.16 mV at 25 °C for z = +1; negative for anions).

    Raises
    ------
    InputError
        A charge of zero or not a number, or a temperature outside liquid water's range.

    References
    ----------
    CODATA 2018 values of R and F; the Nernst equation as in IUPAC, *Quantities, Units and
    Symbols in Physical Chemistry* (2007).

    Examples
    --------
    >>> round(nernst_slope(1, 25.0), 3)
    59.159
    >>> round(nernst_slope(-2, 25.0), 3)
    -29.58
    """
    if isinstance(charge, bool | str):
        raise InputError(f"nernst_slope: charge {charge!r} is not a signed charge number")
    try:
        z = np.asarray(charge, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"nernst_slope: charge {charge!r} is not a signed charge number") from None
    if np.any(z == 0):
        raise InputError("nernst_slope: charge 0 has no Nernst slope; allowed: non-zero charges")
    t = checked_temperature(temperature, "Nernst slope")
    return _out(math.log(10) * GAS_CONSTANT * (t + ZERO_CELSIUS) / (z * FARADAY) * 1e3)


def mv_to_relative_error(mv, charge, temperature=25.0):
    """Relative error in activity (or concentration) that a potential error of ``mv`` implies.

    ratio = 10^(ΔE / (S/z)); returns ratio − 1.

    Parameters
    ----------
    mv : float or array_like
        Potential error ΔE, mV.
    charge : int or array_like
        Signed charge number of the measured ion, dimensionless.
    temperature : float, array_like, str or pint.Quantity
        °C for bare numbers.

    Returns
    -------
    float or numpy.ndarray
        Relative error as a fraction (0.0397 = 3.97 %).

    Raises
    ------
    InputError
        A charge of zero, or a temperature outside liquid water's range.

    References
    ----------
    The Nernst equation; "1 mV ≈ 4 % for a monovalent ion" is common practice.

    Examples
    --------
    >>> round(mv_to_relative_error(1.0, 1) * 100, 2)   # 1 mV ≈ 3.9 % for z = 1 (common practice)
    3.97
    >>> round(mv_to_relative_error(1.0, 2) * 100, 1)   # ≈ 8 % for z = 2
    8.1
    """
    s = nernst_slope(charge, temperature)
    return _out(np.power(10.0, np.asarray(mv, dtype=float) / s) - 1.0)


def relative_error_to_mv(relative_error, charge, temperature=25.0):
    """Potential error (mV) equivalent to a relative error in activity: (S/z)·log10(1 + e).

    Parameters
    ----------
    relative_error : float or array_like
        Relative error as a fraction (> −1).
    charge : int or array_like
        Signed charge number of the measured ion, dimensionless.
    temperature : float, array_like, str or pint.Quantity
        °C for bare numbers.

    Returns
    -------
    float or numpy.ndarray
        Potential error, mV.

    Raises
    ------
    InputError
        A relative error at or below −1, a charge of zero, or a temperature outside liquid
        water's range.

    References
    ----------
    The Nernst equation (see :func:`nernst_slope`).

    Examples
    --------
    >>> round(relative_error_to_mv(0.01, 1), 4)
    0.2556
    """
    e = np.asarray(relative_error, dtype=float)
    if np.any(e <= -1):
        raise InputError(f"relative error {relative_error!r} must be > −1 (i.e. above −100 %)")
    return _out(nernst_slope(charge, temperature) * np.log10(1.0 + e))


@dataclass(frozen=True, repr=False)
class NikolskyResult(Record):
    """Apparent activity under interference and the resulting bias."""

    analyte: str
    activity: float | np.ndarray
    apparent_activity: float | np.ndarray
    bias_relative: float | np.ndarray
    bias_mv: float | np.ndarray
    contributions: Mapping[str, float | np.ndarray]  # interferent -> K a^(z_i/z_j)

    def __post_init__(self) -> None:
        object.__setattr__(self, "contributions", frozen_map(self.contributions))


def nikolsky_eisenman(analyte: str, activity, interferents: Mapping[str, tuple], *, temperature=25.0) -> NikolskyResult:
    """Nikolsky–Eisenman apparent activity a_i + Σ K_ij a_j^(z_i/z_j) and the bias it causes.

    Parameters
    ----------
    analyte : str
        The electrode's primary ion (the analyte), e.g. "NO3-".
    activity : float or array_like
        Its activity (> 0), molal scale.
    interferents : mapping
        Ion -> (activity, K_ij): the interferent's activity and the caller's selectivity
        coefficient for this electrode, dimensionless (they are electrode-specific; ionact
        ships none).
    temperature : float, array_like, str or pint.Quantity
        °C for bare numbers (sets the slope of the bias in mV).

    Returns
    -------
    NikolskyResult
        Apparent activity, relative bias (fraction), bias in mV and each interferent's
        contribution.

    Raises
    ------
    InputError
        A neutral analyte, an interferent of the other sign of charge, a negative or
        non-finite activity or selectivity coefficient, or a malformed interferent entry.
    UnknownSpeciesError
        An ion name that is not known.

    References
    ----------
    E. Bakker, E. Pretsch and P. Bühlmann, Anal. Chem. 72 (2000) 1127; Y. Umezawa et al.,
    Pure Appl. Chem. 72 (2000) 1851 (IUPAC report on selectivity coefficients; from memory).

    Examples
    --------
    >>> r = nikolsky_eisenman("NO3-", 1e-4, {"Cl-": (1e-2, 5e-3)})
    >>> round(r.bias_relative * 100, 1), round(r.bias_mv, 3)
    (50.0, -10.417)
    """
    ion = resolve_ion(analyte)
    if not isinstance(interferents, Mapping):
        raise InputError(f"interferents {interferents!r} must be a mapping of ion -> (activity, "
                         "selectivity coefficient)")
    for name, spec in interferents.items():
        if isinstance(spec, str | bytes) or not isinstance(spec, tuple | list) or len(spec) != 2:
            raise InputError(f"interferent {name!r} needs (activity, selectivity coefficient), got {spec!r}")
    if ion.charge == 0:
        raise InputError(f"primary ion {ion.name} is neutral; an ion-selective electrode needs a charged ion")
    a = np.asarray(activity, dtype=float)
    if not np.all(np.isfinite(a)) or np.any(a <= 0):
        raise InputError(f"activity {activity!r} of {ion.name} must be positive and finite")
    total = np.zeros(np.broadcast_shapes(a.shape, *[np.shape(v[0]) for v in interferents.values()]))
    contrib = {}
    for name, spec in interferents.items():
        j = resolve_ion(name)
        try:
            aj, k = spec
        except (TypeError, ValueError):
            raise InputError(f"interferent {name!r} needs (activity, selectivity coefficient), got {spec!r}") from None
        aj = np.asarray(aj, dtype=float)
        k = float(k)
        if j.charge == 0 or np.sign(j.charge) != np.sign(ion.charge):
            raise InputError(f"interferent {j.name} must carry the same sign of charge as {ion.name}")
        if not (k >= 0 and np.isfinite(k)):
            raise InputError(f"selectivity coefficient {k!r} for {j.name} must be finite and ≥ 0")
        if np.any(aj < 0) or not np.all(np.isfinite(aj)):
            raise InputError(f"activity {spec[0]!r} of interferent {j.name} must be finite and ≥ 0")
        c = k * np.power(aj, ion.charge / j.charge)
        contrib[j.name] = _out(c)
        total = total + c
    apparent = a + total
    rel = apparent / a - 1.0
    mv = nernst_slope(ion.charge, temperature) * np.log10(apparent / a)
    return NikolskyResult(ion.name, _out(a), _out(apparent), _out(rel), _out(mv), contrib)


@dataclass(frozen=True, repr=False)
class TemperatureError(Record):
    """Error from measuring at T2 with a calibration made at T1.

    Attributes
    ----------
    slope_ratio : float
        S(T2)/S(T1).
    activity_ratio : float or ndarray
        Activity read with the T1 calibration over the true activity at T2.
    gamma_ratio : float or ndarray
        γ(T2)/γ(T1) at the sample's ionic strength (a concentration calibration carries γ(T1)).
    concentration_ratio : float or ndarray
        Reported over true concentration, activity_ratio × gamma_ratio.
    error_percent, error_mv : float or ndarray
        The same as a percentage and as the equivalent potential at the calibration slope.
    """

    slope_ratio: float
    activity_ratio: float | np.ndarray
    gamma_ratio: float | np.ndarray
    concentration_ratio: float | np.ndarray
    error_percent: float | np.ndarray
    error_mv: float | np.ndarray


def temperature_error(activity, charge, *, calibration_temperature, measurement_temperature, ionic_strength=0.0,
                      isopotential_activity=1.0, model: str = "davies") -> TemperatureError:
    """The error when a sample is measured at a temperature other than the calibration's.

    The electrode is taken to have an isothermal intersection (isopotential point) at
    ``isopotential_activity`` (default 1 mol/kg, i.e. E° independent of temperature):
    E(T) = E_iso + (S(T)/z) log10(a/a_iso). Reading a T2 potential with the T1 line gives
    log10(a_read/a_iso) = (S2/S1) log10(a/a_iso). A concentration calibration also carries
    γ(T1); the sample has γ(T2) at the same ionic strength (by ``model``), so reported/true
    concentration is (a_read/a) · γ(T2)/γ(T1).

    Parameters
    ----------
    activity : float or array_like
        The sample's activity (> 0), molal scale.
    charge : int
        Signed charge number of the measured ion.
    calibration_temperature, measurement_temperature : float, str or pint.Quantity
        °C for bare numbers.
    ionic_strength : float or array_like
        The sample's ionic strength, mol/kg.
    isopotential_activity : float
        Activity at the isothermal intersection, molal scale (> 0).
    model : {"davies", "limiting", "guntelberg"}
        The activity model for γ(T1) and γ(T2).

    Returns
    -------
    TemperatureError
        Slope ratio, activity and γ ratios, reported/true concentration, error in % and mV.

    Raises
    ------
    InputError
        A non-positive activity or isopotential activity, a charge of zero, an unknown model,
        or a temperature outside liquid water's range.

    References
    ----------
    R. G. Bates, *Determination of pH*, 2nd ed., Wiley (1973), ch. 10 (isothermal
    intersection, from memory).

    Examples
    --------
    >>> e = temperature_error(1e-4, -1, calibration_temperature=25.0, measurement_temperature=30.0, ionic_strength=0.1)
    >>> round(e.slope_ratio, 5), round(e.error_percent, 2)
    (1.01677, -14.49)
    """
    a = np.asarray(activity, dtype=float)
    if not np.all(np.isfinite(a)) or np.any(a <= 0):
        raise InputError(f"activity {activity!r} must be positive and finite")
    if isopotential_activity <= 0:
        raise InputError(f"isopotential activity {isopotential_activity!r} must be > 0")
    s1 = nernst_slope(charge, calibration_temperature)
    s2 = nernst_slope(charge, measurement_temperature)
    ratio = s2 / s1
    log_rel = np.log10(a / isopotential_activity)
    act_ratio = np.power(10.0, (ratio - 1.0) * log_rel)
    from . import models

    fn = {"davies": models.davies, "limiting": models.limiting, "guntelberg": models.guntelberg}.get(model)
    if fn is None:
        raise InputError(f"temperature_error model {model!r}: allowed davies, limiting, guntelberg")
    g1 = fn(charge, ionic_strength, calibration_temperature)
    g2 = fn(charge, ionic_strength, measurement_temperature)
    gr = np.asarray(g2) / np.asarray(g1)
    conc = act_ratio * gr
    mv = s1 * np.log10(conc)
    return TemperatureError(float(ratio), _out(act_ratio), _out(gr), _out(conc), _out((conc - 1) * 100), _out(mv))

