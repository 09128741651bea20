"""Units at the edge: one lazily created pint registry and the trade's amount notations.

Inside the library every amount is a plain float in mol/kg (molal) or mol/L (molar).
This module turns what users write ("2 mmol/kg", "35 mg/L", "10 mg/L as N",
"120 mg/L as CaCO3", "3 meq/L", a pint Quantity) into one of those, and back.
"""

from __future__ import annotations

import math
import re
import warnings
from dataclasses import dataclass
from functools import lru_cache
from typing import Any

import numpy as np

from .errors import InputError, UnitAssumptionWarning, UnitError, caller_stacklevel
from .species import Ion

__all__ = ["registry", "Amount", "parse_amount", "convert_amount", "format_amount", "parse_scalar"]

MOLAL = "molal"
MOLAR = "molar"

_CACO3_EQUIVALENT = 50.04  # g per equivalent, "as CaCO3" (common practice)


@lru_cache(maxsize=1)
def registry():
    """The one shared pint UnitRegistry, created on first use (keeps ``import ionact`` light)."""
    import pint

    ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    ureg.define("equivalent = [charge_equivalent] = eq")
    ureg.define("molal = mol / kg")
    return ureg


@dataclass(frozen=True, slots=True)
class Amount:
    """An amount of one species on one basis: ``value`` in mol/kg (molal) or mol/L (molar)."""

    value: float | np.ndarray
    basis: str  # "molal" or "molar"


_RE_AS = re.compile(r"^(?P<u>.*?)\s+as\s+(?P<ref>[A-Za-z0-9()]+)\s*$")
_RE_NUM_UNIT = re.compile(r"^\s*(?P<num>[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(?P<unit>.*)$")


def _normalise_unit(unit: str) -> tuple[str, bool]:
    u = unit.strip().replace("µ", "u").replace("μ", "u")
    ppm = False
    if re.fullmatch(r"ppm", u, re.I):
        u, ppm = "mg/L", True
    elif re.fullmatch(r"ppb", u, re.I):
        u, ppm = "ug/L", True
    u = re.sub(r"\bM\b", "mol/L", u) if re.fullmatch(r"[munp]?M", u) else u
    if re.fullmatch(r"[munp]M", unit.strip()):
        u = unit.strip()[0] + "mol/L"
    u = re.sub(r"\bl\b", "L", u)
    return u, ppm


def _reference_factor(ion: Ion, ref: str) -> float:
    """Moles of ion per gram of the reference in "mg/L as REF"."""
    ref = ref.strip()
    if ref == "CaCO3":
        if ion.charge == 0:
            raise UnitError(f"'as CaCO3' needs a charged species; {ion.name} is neutral")
        return 1.0 / (_CACO3_EQUIVALENT * abs(ion.charge))
    import periodictable

    try:
        ref_formula = periodictable.formula(ref)
        ion_formula = periodictable.formula(ion.formula)
    except Exception:
        raise UnitError(f"unknown reference {ref!r} in 'as {ref}'") from None
    atoms = ref_formula.atoms
    if len(atoms) == 1:
        (el, n_ref), = atoms.items()
        n_ion = ion_formula.atoms.get(el, 0)
        if n_ion == 0:
            raise UnitError(f"'as {ref}': {ion.name} contains no {el}")
        return n_ref / (float(el.mass) * n_ref * n_ion)
    if ref_formula.atoms == ion_formula.atoms:
        return 1.0 / ion.molar_mass
    raise UnitError(f"'as {ref}' is not a reference for {ion.name}; use an element or CaCO3")


def parse_amount(value, ion: Ion | str | None = None, default_basis: str = MOLAL) -> Amount:
    """Read an amount of one species into mol/kg or mol/L.

    Parameters
    ----------
    value : float, array_like, str or pint.Quantity
        A bare number (or array) is taken in ``default_basis`` units (mol/kg or mol/L).
        Strings: "0.1 mol/kg", "2 mmol/kg", "0.05 mol/L", "5 mM", "35 mg/L", "12 ug/L",
        "3 meq/L", "10 mg/L as N", "120 mg/L as CaCO3", "50 ppm" (taken as mg/L, with a
        warning: valid only for dilute water).
    ion : Ion or str, optional
        Needed for mass and equivalent units.
    default_basis : {"molal", "molar"}

    Returns
    -------
    Amount

    Raises
    ------
    UnitError
        Unknown unit, wrong dimension, or a mass unit without an ion.
    InputError
        Negative, NaN or infinite values.

    Examples
    --------
    >>> parse_amount("2 mmol/kg").value
    0.002
    >>> a = parse_amount("14.007 mg/L as N", "NO3-")
    >>> a.basis, round(a.value, 9)
    ('molar', 0.001)
    """
    if default_basis not in (MOLAL, MOLAR):
        raise InputError(f"default_basis {default_basis!r} must be 'molal' or 'molar'")
    ion_obj = Ion.parse(ion) if ion is not None else None
    label = f" of {ion_obj.name}" if ion_obj else ""
    if isinstance(value, str):
        return _parse_string(value, ion_obj, label)
    if hasattr(value, "magnitude") and hasattr(value, "units"):
        return _from_quantity(value.magnitude, value.units, ion_obj, label, str(value))
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"amount{label} {value!r} is not a number or a unit string") from None
    _check_values(arr, label, value)
    return Amount(float(arr) if arr.ndim == 0 else arr, default_basis)


def _check_values(arr: np.ndarray, label: str, original) -> None:
    if not np.all(np.isfinite(arr)):
        bad = arr[~np.isfinite(arr)].flat[0]
        shown = repr(original) if isinstance(original, str) else f"{float(bad):g}"
        raise InputError(f"amount{label} {shown} is NaN or infinite; allowed: finite, ≥ 0")
    if np.any(arr < 0):
        bad = arr[arr < 0].flat[0]
        shown = repr(original) if isinstance(original, str) else f"{float(bad):g}"
        raise InputError(f"amount{label} {shown} is negative; allowed: ≥ 0")


def _parse_string(text: str, ion: Ion | None, label: str) -> Amount:
    m = _RE_NUM_UNIT.match(text)
    if not m:
        raise UnitError(f"cannot read amount{label} {text!r}; expected e.g. '0.1 mol/kg' or '35 mg/L'")
    num = float(m["num"])
    unit = m["unit"].strip()
    ref = None
    m_as = _RE_AS.match(unit)
    if m_as:
        unit, ref = m_as["u"], m_as["ref"]
    if not unit:
        raise UnitError(f"amount{label} {text!r} has no unit; write e.g. '{num:g} mol/kg'")
    unit, ppm = _normalise_unit(unit)
    if ppm:
        warnings.warn(
            f"amount{label} {text!r}: ppm read as mg/L (ppb as µg/L), valid only for dilute "
            "water of density ≈ 1 kg/L",
            UnitAssumptionWarning,
            stacklevel=caller_stacklevel(),
        )
    _check_values(np.asarray(num), label, text)
    ureg = registry()
    try:
        units = ureg.parse_units(unit)
    except Exception:
        raise UnitError(f"unknown unit {unit!r} in amount{label} {text!r}") from None
    return _from_quantity(num, units, ion, label, text, ref)


def _from_quantity(mag, units, ion: Ion | None, label: str, text: str, ref: str | None = None) -> Amount:
    ureg = registry()
    arr = np.asarray(mag, dtype=float)
    _check_values(arr, label, text)
    q = ureg.Quantity(arr, units)

    def as_(target: str) -> np.ndarray | None:
        try:
            return np.asarray(q.to(target).magnitude, dtype=float)
        except Exception:
            return None

    if ref is not None:
        grams = as_("g/L")
        if grams is None or ion is None:
            raise UnitError(f"amount{label} {text!r}: 'as {ref}' needs a mass per volume and an ion")
        return _amount(grams * _reference_factor(ion, ref), MOLAR)
    for target, basis in (("mol/kg", MOLAL), ("mol/L", MOLAR)):
        v = as_(target)
        if v is not None:
            return _amount(v, basis)
    for target, basis in (("g/L", MOLAR), ("g/kg", MOLAL)):
        v = as_(target)
        if v is not None:
            if ion is None:
                raise UnitError(f"amount {text!r} is a mass; name the ion to convert it")
            return _amount(v / ion.molar_mass, basis)
    for target, basis in (("eq/L", MOLAR), ("eq/kg", MOLAL)):
        v = as_(target)
        if v is not None:
            if ion is None or ion.charge == 0:
                raise UnitError(f"amount {text!r} is in equivalents; name a charged ion")
            return _amount(v / abs(ion.charge), basis)
    raise UnitError(
        f"amount{label} {text!r} has unit '{units}', not an amount per volume or per mass "
        "(allowed: mol/L, mol/kg, mg/L, µg/L, meq/L, 'mg/L as N', 'mg/L as CaCO3')"
    )


def _amount(v: np.ndarray, basis: str) -> Amount:
    return Amount(float(v) if v.ndim == 0 else v, basis)


_OUT_UNITS = {
    "mol/kg": (MOLAL, 1.0, None),
    "mmol/kg": (MOLAL, 1e3, None),
    "mol/L": (MOLAR, 1.0, None),
    "mmol/L": (MOLAR, 1e3, None),
    "umol/L": (MOLAR, 1e6, None),
    "µmol/L": (MOLAR, 1e6, None),
    "mg/L": (MOLAR, 1e3, "mass"),
    "ug/L": (MOLAR, 1e6, "mass"),
    "µg/L": (MOLAR, 1e6, "mass"),
    "meq/L": (MOLAR, 1e3, "eq"),
}


def convert_amount(value, from_basis: str, unit: str, ion: Ion | str | None = None, water_per_litre=None):
    """Express an amount given in mol/kg (``from_basis="molal"``) or mol/L in ``unit``.

    ``water_per_litre`` (kg of water per litre of solution) converts between the bases;
    it is required when the bases differ. Units: mol/kg, mmol/kg, mol/L, mmol/L, µmol/L,
    mg/L, µg/L, meq/L, and "mg/L as N" style references.

    Examples
    --------
    >>> round(convert_amount(0.001, "molar", "mg/L as N", "NO3-"), 4)
    14.007
    """
    ion_obj = Ion.parse(ion) if ion is not None else None
    v = np.asarray(value, dtype=float)
    ref = None
    m_as = _RE_AS.match(unit.strip())
    if m_as:
        unit, ref = m_as["u"].strip(), m_as["ref"]
    if unit not in _OUT_UNITS:
        raise UnitError(f"output unit {unit!r} is not one of {sorted(_OUT_UNITS)}")
    basis, scale, kind = _OUT_UNITS[unit]
    if basis != from_basis:
        if water_per_litre is None:
            raise UnitError(f"converting {from_basis} to {unit!r} needs the solution density")
        w = np.asarray(water_per_litre, dtype=float)
        v = v * w if basis == MOLAR else v / w
    if ref is not None:
        if kind != "mass" or ion_obj is None:
            raise UnitError(f"'as {ref}' needs a mass unit and an ion")
        v = v / _reference_factor(ion_obj, ref) / 1.0
    elif kind == "mass":
        if ion_obj is None:
            raise UnitError(f"unit {unit!r} needs the ion's molar mass; name the ion")
        v = v * ion_obj.molar_mass
    elif kind == "eq":
        if ion_obj is None or ion_obj.charge == 0:
            raise UnitError(f"unit {unit!r} needs a charged ion")
        v = v * abs(ion_obj.charge)
    v = v * scale
    return float(v) if v.ndim == 0 else v


def parse_scalar(value: object, unit: str, what: str) -> float:
    """A finite number in ``unit``: a bare number is taken in ``unit``; a string or pint
    Quantity is converted into it ("0.85 mS/cm" for unit "uS/cm" gives 850).

    Raises
    ------
    InputError
        Not a finite number (booleans included).
    UnitError
        A unit that is unknown or cannot be converted to ``unit``.
    """
    if isinstance(value, bool):
        raise InputError(f"{what} {value!r} is not a number")
    if isinstance(value, str) or (hasattr(value, "magnitude") and hasattr(value, "units")):
        ureg = registry()
        try:
            q: Any = ureg.Quantity(value) if isinstance(value, str) else value
            v = float(q.to(unit).magnitude)
        except Exception:
            raise UnitError(f"{what} {value!r} cannot be read in {unit}") from None
    else:
        try:
            v = float(value)  # type: ignore[arg-type]
        except (TypeError, ValueError):
            raise InputError(f"{what} {value!r} is not a number") from None
    if not math.isfinite(v):
        raise InputError(f"{what} {value!r} is not finite")
    return v


def format_amount(value: float, unit: str) -> str:
    """Format a number with its unit for reports (4 significant digits)."""
    if not math.isfinite(value):
        return f"{value} {unit}"
    return f"{value:.4g} {unit}"
