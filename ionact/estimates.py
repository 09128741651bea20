"""Ionic strength estimated from field measurements, by named rules of thumb.

When a sample's composition is unknown, its ionic strength can be estimated from its
electrical conductivity or its dissolved solids. These are rules of thumb for fresh
waters; the result names the rule, its factor and its source.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ._frozen import Record
from .errors import InputError, warn_range
from .references import cite
from .units import parse_scalar

__all__ = ["IonicStrengthEstimate", "ionic_strength_from_conductivity", "ionic_strength_from_tds", "EC_RULES",
           "TDS_RULES"]


def _out(x: object) -> float | np.ndarray:
    a = np.asarray(x)
    return float(a) if a.ndim == 0 else a


EC_RULES = {
    "russell": (1.6e-5, "russell1976-mem"),
    "griffin-jurinak": (1.3e-5, "griffin-jurinak1973-mem"),
}
TDS_RULES = {"langelier": (2.5e-5, "langelier1936-mem")}
EC_FRESH_LIMIT = 5000.0  # µS/cm; beyond it the rules of thumb are not for "fresh" water (common practice)
TDS_FRESH_LIMIT = 3000.0  # mg/L (common practice)


@dataclass(frozen=True, repr=False)
class IonicStrengthEstimate(Record):
    """An ionic strength estimated by a rule of thumb, with the rule named.

    Attributes
    ----------
    value : float or ndarray
        mol/L (the rules do not distinguish molar from molal; fresh waters are dilute).
    rule : str
        The rule's name, e.g. ``"russell"``.
    coefficient : float
        The factor applied to the measurement.
    source : str
        Full citation.
    """

    value: float | np.ndarray
    rule: str
    coefficient: float
    source: str

    def __float__(self) -> float:
        return float(self.value)


def _values(x: object, unit: str, what: str) -> np.ndarray:
    """Numbers in ``unit``; unit strings and Quantities converted (each element of a sequence)."""
    if isinstance(x, str) or (hasattr(x, "magnitude") and hasattr(x, "units")):
        mag = getattr(x, "magnitude", None)
        if mag is not None and np.ndim(mag) > 0:
            factor = parse_scalar(type(x)(1.0, x.units), unit, what)  # type: ignore[call-arg]
            return np.asarray(mag, dtype=float) * factor
        return np.asarray(parse_scalar(x, unit, what))
    if isinstance(x, list | tuple) and any(isinstance(v, str) for v in x):
        return np.array([parse_scalar(v, unit, what) for v in x])
    if isinstance(x, bool) or (isinstance(x, np.ndarray) and x.dtype == bool):
        raise InputError(f"{what} {x!r} is not a number")
    try:
        return np.asarray(x, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"{what} {x!r} is not a number of {unit}") from None


def _estimate(x, rules, rule: str, what: str, unit: str, limit: float) -> IonicStrengthEstimate:
    if rule not in rules:
        raise InputError(f"unknown {what} rule {rule!r}; allowed: {', '.join(sorted(rules))}")
    arr = _values(x, unit.replace("µ", "u"), what)
    if np.any(arr < 0) or np.any(np.isinf(arr)):
        bad = arr[(arr < 0) | np.isinf(arr)].flat[0]
        raise InputError(f"{what} {bad:g} {unit} is negative or infinite; allowed: finite ≥ 0")
    finite = arr[np.isfinite(arr)]
    if finite.size and finite.max() > limit:
        warn_range(
            f"ionic strength from {what}: {finite.max():g} {unit} is above {limit:g} {unit}, "
            f"where the '{rule}' rule of thumb for fresh waters no longer holds",
        )
    k, src = rules[rule]
    return IonicStrengthEstimate(_out(k * arr), rule, k, cite(src))


def ionic_strength_from_conductivity(conductivity, rule: str = "russell") -> IonicStrengthEstimate:
    """Estimate ionic strength from electrical conductivity at 25 °C.

    Parameters
    ----------
    conductivity : float, array_like, str or pint.Quantity
        µS/cm for bare numbers; unit strings ("0.85 mS/cm") and Quantities are converted.
    rule : {"russell", "griffin-jurinak"}
        I ≈ 1.6e-5 × EC (Russell 1976) or I ≈ 1.3e-5 × EC (Griffin & Jurinak 1973);
        rules of thumb for fresh waters.

    Returns
    -------
    IonicStrengthEstimate
        I in mol/kg (float or array), the rule, its coefficient and source.

    Raises
    ------
    InputError
        A negative or non-finite conductivity, or an unknown rule.
    UnitError
        A unit that is not a conductivity.

    Warns
    -----
    ValidityRangeWarning
        Above 5000 µS/cm (common practice: no longer a fresh water).

    References
    ----------
    L. L. Russell, PhD thesis, University of California, Berkeley (1976); R. A. Griffin and
    J. J. Jurinak, Soil Sci. 116 (1973) 26 (both from memory).

    Examples
    --------
    >>> e = ionic_strength_from_conductivity(500.0)
    >>> round(e.value, 6), e.rule
    (0.008, 'russell')
    """
    return _estimate(conductivity, EC_RULES, rule, "conductivity", "µS/cm", EC_FRESH_LIMIT)


def ionic_strength_from_tds(tds, rule: str = "langelier") -> IonicStrengthEstimate:
    """Estimate ionic strength from total dissolved solids: I ≈ 2.5e-5 × TDS in mg/L.

    Parameters
    ----------
    tds : float, array_like, str or pint.Quantity
        mg/L for bare numbers; unit strings ("1.2 g/L") and Quantities are converted.
    rule : {"langelier"}
        The rule of thumb (Langelier 1936).

    Returns
    -------
    IonicStrengthEstimate
        I in mol/kg (float or array), the rule, its coefficient and source.

    Raises
    ------
    InputError
        A negative or non-finite value, or an unknown rule.
    UnitError
        A unit that is not a mass concentration.

    References
    ----------
    W. F. Langelier, J. Am. Water Works Assoc. 28 (1936) 1500 (from memory).

    Examples
    --------
    >>> round(ionic_strength_from_tds(400.0).value, 6)
    0.01
    """
    return _estimate(tds, TDS_RULES, rule, "total dissolved solids", "mg/L", TDS_FRESH_LIMIT)
