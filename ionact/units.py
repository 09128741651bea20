"""Units at the edge: a strict amount grammar, the trade's units, and one lazy pint registry.

Inside the library every amount is a plain float in mol/kg (molal) or mol/L (molar).
This module turns what users write into one of those, and back.

The amount grammar (our own; nothing is handed to an expression evaluator)::

    amount    := number [ unit [ "as" reference ] ]
    number    := [+|-] digits [ "." digits ] [ (e|E) [+|-] digits ]      ("." is the decimal mark)
    unit      := a unit of the trade's table (mol/L, mM, mg/L, µg/L, meq/L, mol/kg, g/kg, ppm …),
                 or one unit expression of letters joined by "/" (≤ 40 characters) that the
                 unit library reads as an amount per volume or per mass
    reference := an element ("N", "P") or "CaCO3"

A decimal comma, two numbers, operators, booleans and dimensionless amounts ("1 %") are
refused with a message that names the value and, for a decimal comma, shows the
corrected string. Strings longer than 100 characters are refused before any parsing.
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
from .species import Ion, formula_atoms

__all__ = ["registry", "Amount", "parse_amount", "convert_amount", "format_amount", "parse_scalar",
           "unit_kind", "temperature_celsius", "TRADE_UNITS", "MAX_AMOUNT_LENGTH", "MAX_UNIT_LENGTH"]

MOLAL = "molal"
MOLAR = "molar"
MAX_AMOUNT_LENGTH = 100
MAX_UNIT_LENGTH = 40
_CACO3_EQUIVALENT = 50.04  # g per equivalent, "as CaCO3" (common practice)

# unit -> (kind, factor to the kind's base unit). Kinds and their bases: molal mol/kg,
# molar mol/L, mass-molar g/L, mass-molal g/kg, eq-molar eq/L, eq-molal eq/kg.
TRADE_UNITS: dict[str, tuple[str, float]] = {}
for _p, _f in (("", 1.0), ("m", 1e-3), ("u", 1e-6), ("n", 1e-9), ("p", 1e-12)):
    TRADE_UNITS[f"{_p}mol/L"] = ("molar", _f)
    TRADE_UNITS[f"{_p}mol/dm3"] = ("molar", _f)
    TRADE_UNITS[f"{_p}M"] = ("molar", _f)
    TRADE_UNITS[f"{_p}mol/kg"] = ("molal", _f)
    TRADE_UNITS[f"{_p}g/L"] = ("mass-molar", _f)
    TRADE_UNITS[f"{_p}g/dm3"] = ("mass-molar", _f)
    TRADE_UNITS[f"{_p}g/kg"] = ("mass-molal", _f)
    TRADE_UNITS[f"{_p}eq/L"] = ("eq-molar", _f)
    TRADE_UNITS[f"{_p}eq/kg"] = ("eq-molal", _f)
TRADE_UNITS["molal"] = ("molal", 1.0)
TRADE_UNITS["ppm"] = ("mass-molar", 1e-3)  # read as mg/L, with a warning
TRADE_UNITS["ppb"] = ("mass-molar", 1e-6)  # read as µg/L, with a warning
_BASE = {"molal": "mol/kg", "molar": "mol/L", "mass-molar": "g/L", "mass-molal": "g/kg", "eq-molar": "eq/L",
         "eq-molal": "eq/kg"}

_RE_NUMBER = r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?"
_RE_AMOUNT = re.compile(rf"^\s*(?P<num>{_RE_NUMBER})(?:\s*(?P<unit>[^\s].*?))?\s*$")
_RE_AS = re.compile(r"^(?P<unit>.*?)\s+as\s+(?P<ref>[A-Z][A-Za-z0-9()]{0,15})$")
_RE_UNIT_EXPR = re.compile(r"^[A-Za-z]+[23]?(?:\s*/\s*[A-Za-z]+[23]?)*$")
_RE_DECIMAL_COMMA = re.compile(r"^\s*[+-]?\d+,\d")


@lru_cache(maxsize=1)
def registry() -> Any:
    """The one shared pint UnitRegistry, created on first use (keeps ``import ionact`` light)."""
    import pint

    ureg: Any = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    ureg.define("equivalent = [charge_equivalent] = eq")
    ureg.define("molal = mol / kg")
    return ureg


@dataclass(frozen=True, slots=True)
class Amount:
    """An amount of one species on one basis: ``value`` in mol/kg (molal) or mol/L (molar)."""

    value: float | np.ndarray
    basis: str  # "molal" or "molar"


def _normalise_unit(unit: str) -> str:
    u = unit.strip().replace("µ", "u").replace("μ", "u")
    u = re.sub(r"\s*/\s*", "/", u)
    if u.endswith("/l"):
        u = u[:-2] + "/L"
    return u


@lru_cache(maxsize=1024)
def unit_kind(unit: str) -> tuple[str, float]:
    """The kind of a concentration unit and its factor to the kind's base unit.

    Kinds: "molal" (mol/kg), "molar" (mol/L), "mass-molar" (g/L), "mass-molal" (g/kg),
    "eq-molar" (eq/L), "eq-molal" (eq/kg). The trade's table is consulted first; otherwise
    one unit expression (letters joined by "/", at most 40 characters) is read by pint.

    Raises
    ------
    UnitError
        Unknown, too long, an expression with arithmetic, dimensionless, or not an amount
        per volume or mass.

    Examples
    --------
    >>> unit_kind("mM"), unit_kind("µg/L")
    (('molar', 0.001), ('mass-molar', 1e-06))
    """
    if not isinstance(unit, str):
        raise UnitError(f"a unit must be text, got {unit!r}")
    u = _normalise_unit(unit)
    if u in TRADE_UNITS:
        return TRADE_UNITS[u]
    if len(u) > MAX_UNIT_LENGTH:
        raise UnitError(f"unit {unit[:40]!r}… is longer than {MAX_UNIT_LENGTH} characters")
    if u.endswith("M") and "/" not in u:
        raise UnitError(f"unit {unit!r} is not one of the molar units M, mM, uM, nM, pM (write mol/L forms otherwise)")
    if u in ("%", "percent", "dimensionless", "ppt") or not _RE_UNIT_EXPR.match(u):
        raise UnitError(f"unit {unit!r} is not a concentration unit; allowed: mol/L, mmol/L, mM, µmol/L, mol/kg, "
                        "mg/L, µg/L, g/kg, meq/L, ppm (as mg/L), 'mg/L as N', 'mg/L as CaCO3'")
    ureg = registry()
    try:
        q = ureg.Quantity(1.0, u)
    except Exception:
        raise UnitError(f"unknown unit {unit!r}") from None
    for kind, base in _BASE.items():
        try:
            return kind, float(q.to(base).magnitude)
        except Exception:  # pint raises DimensionalityError and others: this kind does not fit
            continue
    raise UnitError(f"unit {unit!r} is not an amount per volume or per mass (allowed: mol/L, mol/kg, mg/L, µg/L, "
                    "meq/L, 'mg/L as N', 'mg/L as CaCO3')")


@lru_cache(maxsize=256)
def _reference_factor(ion: Ion, ref: str) -> float:
    """Moles of ion per gram of the reference in "mg/L as REF" (cached: formula parsing is costly)."""
    if ref == "CaCO3":
        if ion.charge == 0:
            raise UnitError(f"'as CaCO3' needs a charged species; {ion.name} is neutral")
        return 1.0 / (_CACO3_EQUIVALENT * abs(ion.charge))
    import periodictable

    try:
        atoms = formula_atoms(ref)
        ion_atoms = formula_atoms(ion.formula)
        masses = {el: float(periodictable.elements.symbol(el).mass) for el in atoms}
    except Exception:  # not a formula, or an unknown element
        raise UnitError(f"unknown reference {ref!r} in 'as {ref}'") from None
    if len(atoms) == 1:
        ((el, n_ref),) = atoms.items()
        n_ion = ion_atoms.get(el, 0)
        if n_ion == 0:
            raise UnitError(f"'as {ref}': {ion.name} contains no {el}")
        return float(n_ref / (masses[el] * n_ref * n_ion))
    if atoms == ion_atoms:
        return 1.0 / ion.molar_mass
    raise UnitError(f"'as {ref}' is not a reference for {ion.name}; use an element or CaCO3")


def _refuse_text(text: str, label: str) -> None:
    if len(text) > MAX_AMOUNT_LENGTH:
        raise InputError(f"amount{label} {text[:40]!r}… is longer than {MAX_AMOUNT_LENGTH} characters")
    if _RE_DECIMAL_COMMA.match(text):
        fixed = re.sub(r"^(\s*[+-]?\d+),(\d)", r"\1.\2", text, count=1).strip()
        if re.match(r"^\s*[+-]?\d{1,3},\d{3}(?!\d)", text):
            raise InputError(f"amount{label} {text!r} has a comma in its number: write it with a point as the decimal "
                             "mark and no thousands separator")
        raise InputError(f"amount{label} {text!r} uses a decimal comma; write {fixed!r} (a point as the decimal mark)",
                         value=text, allowed="a point as the decimal mark")


def _split(text: str, label: str) -> tuple[float, str | None, str | None]:
    """Number, unit and reference of an amount string, by the grammar (no evaluation)."""
    _refuse_text(text, label)
    m = _RE_AMOUNT.match(text)
    if m is None:
        raise UnitError(f"cannot read amount{label} {text!r}; expected a number, a unit and optionally 'as N' — "
                        "e.g. '0.1 mol/kg', '35 mg/L', '10 mg/L as N'")
    num = float(m["num"])
    unit = m["unit"]
    if unit is None:
        return num, None, None
    ref = None
    m_as = _RE_AS.match(unit)
    if m_as:
        unit, ref = m_as["unit"], m_as["ref"]
    if re.search(r"\d\s+\d|^[\d.]", unit) or re.search(r"\*\*|[+*=^(),;]|\s-|-\s|^-", unit):
        raise InputError(f"amount{label} {text!r} is not one number and one unit (no arithmetic, no second number)")
    return num, unit, ref


def _to_basis(values: np.ndarray, kind: str, factor: float, ion: Ion | None, molar_mass: float | None,
              ref: str | None, text: str, label: str) -> Amount:
    v = values * factor
    if ref is not None:
        if kind != "mass-molar" or ion is None:
            raise UnitError(f"amount{label} {text!r}: 'as {ref}' needs a mass per volume and an ion")
        return _amount(v * _reference_factor(ion, ref), MOLAR)
    if kind in ("molal", "molar"):
        return _amount(v, MOLAL if kind == "molal" else MOLAR)
    basis = MOLAR if kind.endswith("molar") else MOLAL
    if kind.startswith("mass"):
        mass = molar_mass if molar_mass is not None else (ion.molar_mass if ion is not None else None)
        if mass is None:
            raise UnitError(f"amount {text!r} is a mass; name the ion (or salt) to convert it")
        return _amount(v / mass, basis)
    if ion is None or ion.charge == 0:
        raise UnitError(f"amount {text!r} is in equivalents; name a charged ion")
    return _amount(v / abs(ion.charge), basis)


def parse_amount(value: object, ion: Ion | str | None = None, default_basis: str = MOLAL, *,
                 molar_mass: float | None = None, what: str | None = None) -> Amount:
    """Read an amount of one species into mol/kg or mol/L.

    Parameters
    ----------
    value : float, array_like, str or pint.Quantity
        A bare number (or array) is taken in ``default_basis`` units (mol/kg or mol/L).
        Strings follow the module's grammar: "0.1 mol/kg", "2 mmol/kg", "0.05 mol/L",
        "5 mM", "35 mg/L", "12 µg/L", "3 meq/L", "10 mg/L as N", "120 mg/L as CaCO3",
        "50 ppm" (taken as mg/L, with a warning: valid only for dilute water). A pint
        Quantity from any registry is converted by its units.
    ion : Ion or str, optional
        Needed for mass and equivalent units.
    default_basis : {"molal", "molar"}
        The basis of bare numbers: mol/kg of water or mol/L of solution.
    molar_mass : float, optional
        g/mol for mass units when the amount is of a salt rather than of ``ion``.
    what : str, optional
        How to name the amount in messages (default "amount of <ion>").

    Returns
    -------
    Amount
        The value in mol/kg (basis "molal") or mol/L (basis "molar"), with the unit read.

    Raises
    ------
    UnitError
        Unknown unit, wrong dimension, a mass unit without an ion, a string without a unit.
    InputError
        Negative, NaN or infinite values, booleans, a decimal comma, two numbers or operators.

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
    label = f" of {what}" if what else (f" of {ion_obj.name}" if ion_obj else "")
    if isinstance(value, str):
        return _parse_string(value, ion_obj, label, molar_mass)
    if hasattr(value, "magnitude") and hasattr(value, "units"):
        return _from_quantity(value, ion_obj, label, molar_mass)
    return _from_number(value, label, default_basis)


def _from_number(value: object, label: str, basis: str) -> Amount:
    if isinstance(value, bool | np.bool_) or (isinstance(value, np.ndarray) and value.dtype == bool):
        raise InputError(f"amount{label} {value!r} is a boolean, not a number")
    if isinstance(value, np.ma.MaskedArray):
        raise InputError(f"amount{label}: masked arrays are not read (a masked value has no amount); fill or drop "
                         "the masked entries first")
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError, OverflowError):
        raise InputError(f"amount{label} {value!r} is not a number or a unit string") from None
    _check_values(arr, label, value)
    return Amount(float(arr) if arr.ndim == 0 else arr, basis)


def _check_values(arr: np.ndarray, label: str, original: object) -> None:
    if not np.all(np.isfinite(arr)):
        bad = arr[~np.isfinite(arr)].flat[0]
        shown = repr(original) if isinstance(original, str) else f"{float(bad):g}"
        raise InputError(f"amount{label} {shown} is NaN or infinite; allowed: finite, ≥ 0", value=original,
                         allowed="finite, ≥ 0")
    if np.any(arr < 0):
        bad = arr[arr < 0].flat[0]
        shown = repr(original) if isinstance(original, str) else f"{float(bad):g}"
        raise InputError(f"amount{label} {shown} is negative; allowed: ≥ 0", value=original, allowed="≥ 0")


def _parse_string(text: str, ion: Ion | None, label: str, molar_mass: float | None) -> Amount:
    num, unit, ref = _split(text, label)
    if unit is None:
        raise UnitError(f"amount{label} {text!r} has no unit; write e.g. '{num:g} mol/kg'")
    kind, factor = unit_kind(unit)
    if _normalise_unit(unit) in ("ppm", "ppb"):
        warnings.warn(f"amount{label} {text!r}: ppm read as mg/L (ppb as µg/L), valid only for dilute water of "
                      "density ≈ 1 kg/L", UnitAssumptionWarning, stacklevel=caller_stacklevel())
    arr = np.asarray(num)
    _check_values(arr, label, text)
    return _to_basis(arr, kind, factor, ion, molar_mass, ref, text, label)


def _from_quantity(q: Any, ion: Ion | None, label: str, molar_mass: float | None) -> Amount:
    ureg = registry()
    try:
        units = str(q.units)
        mine = ureg.Quantity(1.0, units)
    except Exception:
        raise UnitError(f"amount{label} {q!r}: its unit {getattr(q, 'units', '?')!s} is not known here") from None
    arr = np.asarray(q.magnitude, dtype=float)
    _check_values(arr, label, str(q))
    for kind, base in _BASE.items():
        try:
            factor = float(mine.to(base).magnitude)
        except Exception:  # not this kind
            continue
        return _to_basis(arr, kind, factor, ion, molar_mass, None, str(q), label)
    raise UnitError(f"amount{label} {q!s} is not an amount per volume or per mass")


def _amount(v: np.ndarray, basis: str) -> Amount:
    v = np.asarray(v, dtype=float)
    return Amount(float(v) if v.ndim == 0 else v, basis)


def convert_amount(value: object, from_basis: str, unit: str, ion: Ion | str | None = None,
                   water_per_litre: object = None) -> float | np.ndarray:
    """Express an amount given in mol/kg (``from_basis="molal"``) or mol/L in ``unit``.

    Any unit that :func:`parse_amount` accepts can be asked for ("mmol/L", "mM", "g/L",
    "nmol/L", "mg/kg", "meq/L", "mg/L as N" …).

    Parameters
    ----------
    value : float or array_like
        The amount, mol/kg or mol/L according to ``from_basis``.
    from_basis : {"molal", "molar"}
        The basis of ``value``.
    unit : str
        The unit wanted.
    ion : Ion or str, optional
        The species; needed for mass and equivalent units.
    water_per_litre : float or array_like, optional
        kg of water per litre of solution; required when the bases differ.

    Returns
    -------
    float or numpy.ndarray
        The amount in ``unit``.

    Raises
    ------
    UnitError
        An unknown unit, a mass or equivalent unit without a (charged) ion, or a basis
        change without the solution's water per litre.

    Examples
    --------
    >>> round(convert_amount(0.001, "molar", "mg/L as N", "NO3-"), 4)
    14.007
    >>> convert_amount(0.002, "molar", "mM")
    2.0
    """
    if from_basis not in (MOLAL, MOLAR):
        raise InputError(f"from_basis {from_basis!r} must be 'molal' or 'molar'")
    if not isinstance(unit, str):
        raise UnitError(f"output unit {unit!r} must be text")
    ion_obj = Ion.parse(ion) if ion is not None else None
    v = np.asarray(_from_number(value, "", from_basis).value, dtype=float)
    ref = None
    m_as = _RE_AS.match(unit.strip())
    if m_as:
        unit, ref = m_as["unit"], m_as["ref"]
    kind, factor = unit_kind(unit)
    target = MOLAR if kind.endswith("molar") else MOLAL
    if target != from_basis:
        if water_per_litre is None:
            raise UnitError(f"converting {from_basis} to {unit!r} needs the solution density (water per litre)")
        w = np.asarray(water_per_litre, dtype=float)
        v = v * w if target == MOLAR else v / w
    if ref is not None:
        if not kind.startswith("mass") or ion_obj is None:
            raise UnitError(f"'as {ref}' needs a mass unit and an ion")
        v = v / _reference_factor(ion_obj, ref)
    elif kind.startswith("mass"):
        if ion_obj is None:
            raise UnitError(f"unit {unit!r} needs the ion's molar mass; name the ion")
        v = v * ion_obj.molar_mass
    elif kind.startswith("eq"):
        if ion_obj is None or ion_obj.charge == 0:
            raise UnitError(f"unit {unit!r} needs a charged ion")
        v = v * abs(ion_obj.charge)
    v = v / factor
    return float(v) if v.ndim == 0 else v


def parse_scalar(value: object, unit: str, what: str) -> float:
    """A finite number in ``unit`` from a number, a "number unit" string or a Quantity.

    A bare number is taken in ``unit``; a string (by the same strict grammar as
    :func:`parse_amount`) or a pint Quantity is converted into it.

    Parameters
    ----------
    value : float, str or pint.Quantity
        The quantity.
    unit : str
        The unit to express it in (a pint unit string, e.g. "uS/cm").
    what : str
        How to name the value in messages.

    Returns
    -------
    float
        The value in ``unit``.

    Raises
    ------
    InputError
        Not a finite number (booleans included), a decimal comma, arithmetic.
    UnitError
        A unit that is unknown or cannot be converted to ``unit``.

    Examples
    --------
    >>> parse_scalar("0.85 mS/cm", "uS/cm", "conductivity")
    850.0
    """
    if isinstance(value, bool | np.bool_):
        raise InputError(f"{what} {value!r} is not a number")
    if isinstance(value, str):
        num, u, ref = _split(value, f" ({what})")
        if ref is not None:
            raise UnitError(f"{what} {value!r}: 'as …' does not apply here")
        if u is None:
            return _finite(num, value, what)
        return _finite(num * _unit_factor(u, unit, value, what), value, what)
    if hasattr(value, "magnitude") and hasattr(value, "units"):
        try:
            factor = _unit_factor(str(value.units), unit, value, what)
        except UnitError:
            raise
        return _finite(float(value.magnitude) * factor, value, what)
    try:
        v = float(value)  # type: ignore[arg-type]
    except (TypeError, ValueError, OverflowError):
        raise InputError(f"{what} {value!r} is not a number") from None
    return _finite(v, value, what)


def _finite(v: float, original: object, what: str) -> float:
    if not math.isfinite(v):
        raise InputError(f"{what} {original!r} is not finite")
    return v


# Common units of the quantities jobs take besides amounts, as factors to one unit of each
# dimension: they convert without building the unit registry (which costs a first command
# about half a second); anything else goes to pint.
_COMMON_UNITS: tuple[dict[str, float], ...] = (
    {"S/m": 1.0, "dS/m": 0.1, "mS/m": 1e-3, "uS/m": 1e-6, "S/cm": 100.0, "mS/cm": 0.1, "uS/cm": 1e-4},
    {"g/L": 1.0, "mg/L": 1e-3, "ug/L": 1e-6, "ng/L": 1e-9, "kg/L": 1e3},
    {"L": 1.0, "mL": 1e-3, "uL": 1e-6},
    {"V": 1.0, "mV": 1e-3},
    {"": 1.0},
)


@lru_cache(maxsize=256)
def _unit_factor_cached(u: str, unit: str) -> float:
    for table in _COMMON_UNITS:
        if u in table and unit in table:
            return table[u] / table[unit]
    ureg = registry()
    return float(ureg.Quantity(1.0, u).to(unit).magnitude)


def _unit_factor(u: str, unit: str, original: object, what: str) -> float:
    """Factor from unit ``u`` to ``unit`` (one unit expression, no arithmetic)."""
    un = _normalise_unit(u)
    if len(un) > MAX_UNIT_LENGTH or not (_RE_UNIT_EXPR.match(un) or re.fullmatch(r"[A-Za-z ]+(?: / [A-Za-z ]+)*", un)):
        raise UnitError(f"{what} {original!r}: unit {u!r} is not one unit expression")
    try:
        return _unit_factor_cached(un, unit)
    except Exception:
        raise UnitError(f"{what} {original!r} cannot be read in {unit}") from None


def format_amount(value: float, unit: str) -> str:
    """Format a number with its unit for reports (4 significant digits).

    Parameters
    ----------
    value : float
        The number, in ``unit``.
    unit : str
        The unit label printed after it.

    Returns
    -------
    str
        "value unit"; a non-finite value is printed as is ("nan mol/L").

    Raises
    ------
    TypeError
        A value that is not a real number.

    Examples
    --------
    >>> format_amount(0.0012345, "mol/L")
    '0.001234 mol/L'
    """
    if not math.isfinite(value):
        return f"{value} {unit}"
    return f"{value:.4g} {unit}"


def temperature_celsius(value: object, what: str = "temperature") -> float | np.ndarray:
    """A temperature in °C from a number, a "number unit" string or a Quantity.

    Numbers (and arrays) are °C; a string "25 degC", "77 degF", "298.15 K" or a pint
    Quantity is converted (offset units handled).

    Parameters
    ----------
    value : float, array_like, str or pint.Quantity
        The temperature.
    what : str
        How to name it in messages.

    Returns
    -------
    float or numpy.ndarray
        °C.

    Raises
    ------
    InputError
        Booleans, text that is not one number and one temperature unit.
    UnitError
        A unit that is not a temperature.

    Examples
    --------
    >>> round(temperature_celsius("77 degF"), 6)
    25.0
    """
    if isinstance(value, bool | np.bool_):
        raise InputError(f"{what} {value!r} is not a number")
    if isinstance(value, str) or (hasattr(value, "magnitude") and hasattr(value, "units")):
        if isinstance(value, str):
            num, u, ref = _split(value, f" ({what})")
            if u is None:
                return float(num)
            u = {"°C": "degC", "C": "degC", "°F": "degF", "F": "degF"}.get(u.strip(), u.strip())
            if ref is not None or not re.fullmatch(r"[A-Za-z]{1,20}", u):
                raise UnitError(f"{what} {value!r}: {u!r} is not a temperature unit (degC, degF, K)")
            mag: Any = num
        else:
            mag, u = value.magnitude, str(value.units)
        ureg = registry()
        try:
            out = np.asarray(ureg.Quantity(mag, u).to("degC").magnitude, dtype=float)
        except Exception:
            raise UnitError(f"{what} {value!r} is not a temperature (allowed units: degC, degF, K)") from None
        return float(out) if out.ndim == 0 else out
    if isinstance(value, np.ma.MaskedArray):
        raise InputError(f"{what}: masked arrays are not read; fill or drop the masked entries first")
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError, OverflowError):
        raise InputError(f"{what} {value!r} is not a number of °C") from None
    return float(arr) if arr.ndim == 0 else arr
