"""The columns of a sample batch: what each header means, its unit, and every cell's value.

Column names are ionact's own: ``sample_id``, ``analyte``, ``ionic_strength``,
``conductivity``, ``tds``, and ion columns named by the ion with its charge
(``Na+ [mg/L]``). A unit in brackets (or in a units row, or in ``units=``) is parsed
and converted; an unknown unit, one of the wrong dimension, an ion column without a
unit, and a column with a unit that is not one of these, are errors naming the column.
Other columns without a unit are carried past untouched.

Cells are read by a strict number grammar (a point as the decimal mark, no ``1_5``, no
``nan``); a decimal comma is read only where the table's rules allow it. Every bad cell
marks its row invalid with its own reason; rows are never dropped or re-ordered.
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..density import water_per_litre
from ..errors import InputError, IonactError, UnitError
from ..estimates import ionic_strength_from_conductivity, ionic_strength_from_tds
from ..species import Ion
from ..units import MOLAR, parse_amount, parse_scalar, unit_kind

__all__ = ["ColumnSpec", "RowValues", "column_specs", "cell_numbers", "row_values", "KNOWN_COLUMNS",
           "DEFAULT_CHARGE_BALANCE_PERCENT", "MAX_ANALYTE", "MAX_IONIC_STRENGTH"]

KNOWN_COLUMNS = ("sample_id", "analyte", "ionic_strength", "conductivity", "tds")
DEFAULT_CHARGE_BALANCE_PERCENT = 5.0  # ion balance of a water analysis, % of total equivalents (common practice)
MAX_ANALYTE = 20.0  # mol/L: beyond any real solution
MAX_IONIC_STRENGTH = 25.0  # mol/kg: beyond any real water sample
_RE_NUMBER = re.compile(r"^\s*[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?\s*$")
_RE_COMMA_NUMBER = re.compile(r"^\s*[+-]?\d+,\d+(?:[eE][+-]?\d+)?\s*$")
_RE_THOUSANDS = re.compile(r"^\s*[+-]?\d{1,3},\d{3}\s*$")


@dataclass(frozen=True)
class ColumnSpec:
    """One column: its role, unit, and the factor to the role's base unit.

    Bases: analyte and ions mol/L; ionic strength mol/kg; conductivity µS/cm; tds mg/L.
    """

    header: str
    name: str
    role: str  # "id", "analyte", "ionic_strength", "conductivity", "tds", "ion", "other"
    unit: str | None
    factor: float = 1.0
    ion: Ion | None = None


def split_header(h: str) -> tuple[str, str | None]:
    """``"name [unit]"`` -> ("name", "unit"); a header without brackets has no unit."""
    h = h.strip()
    if h.endswith("]") and "[" in h:
        name, _, unit = h[:-1].partition("[")
        return name.strip(), unit.strip() or None
    return h, None


def _concentration_factor(unit: str, ion: Ion, header: str) -> float:
    try:
        a = parse_amount(f"1 {unit}", ion, default_basis=MOLAR)
    except IonactError as exc:
        raise InputError(f"column {header!r}: {exc}") from None
    if a.basis != MOLAR:
        raise InputError(f"column {header!r}: unit {unit!r} must be a concentration per volume (mg/L, mmol/L …)")
    return float(a.value)


def _spec(header: str, unit: str | None, analyte: Ion, analyte_unit: str | None) -> ColumnSpec:
    name, head_unit = split_header(header)
    unit = head_unit or unit
    if name == "sample_id":
        if unit:
            raise InputError(f"column {header!r}: a sample id has no unit")
        return ColumnSpec(header, name, "id", None)
    if name == "analyte":
        u = unit or analyte_unit or "mol/L"
        return ColumnSpec(header, name, "analyte", u, _concentration_factor(u, analyte, header))
    if name == "ionic_strength":
        u = unit or "mol/kg"
        try:
            kind, f = unit_kind(u)
        except UnitError as exc:
            raise InputError(f"column {header!r}: {exc}") from None
        if kind != "molal":
            raise InputError(f"column {header!r}: unit {u!r} is not a molal ionic strength unit (mol/kg, mmol/kg)")
        return ColumnSpec(header, name, "ionic_strength", u, f)
    if name == "conductivity":
        u = unit or "uS/cm"
        return ColumnSpec(header, name, "conductivity", u, parse_scalar(f"1 {u}", "uS/cm", f"column {header!r}"))
    if name == "tds":
        u = unit or "mg/L"
        try:
            kind, f = unit_kind(u)
        except UnitError as exc:
            raise InputError(f"column {header!r}: {exc}") from None
        if kind != "mass-molar":
            raise InputError(f"column {header!r}: unit {u!r} is not a mass concentration (mg/L, g/L)")
        return ColumnSpec(header, name, "tds", u, f * 1e3)
    try:
        ion = Ion.parse(name)
    except IonactError:
        ion = None
    if ion is None or ion.charge == 0:
        if unit:
            raise InputError(f"column {header!r} has a unit but is not a column ionact reads: name an ion with its "
                             f"charge (e.g. 'Na+ [mg/L]') or use one of {', '.join(KNOWN_COLUMNS)}")
        return ColumnSpec(header, name, "other", None)
    from ..species import resolve_ion

    try:
        ion = resolve_ion(ion.name)
    except IonactError as exc:
        raise InputError(f"column {header!r}: {exc}") from None
    if ion.name == analyte.name:
        raise InputError(f"column {header!r} is the analyte: its expected level goes in the 'analyte' column")
    if not unit:
        raise InputError(f"ion column {header!r} needs a unit, e.g. '{name} [mg/L]'")
    return ColumnSpec(header, name, "ion", unit, _concentration_factor(unit, ion, header), ion)


def column_specs(headers: Sequence[str], units: Mapping[str, str], analyte: Ion, analyte_unit: str | None
                 ) -> list[ColumnSpec]:
    """The meaning of every column; InputError naming a column whose header cannot be used."""
    specs = []
    for h in headers:
        name, _ = split_header(h)
        specs.append(_spec(h, units.get(h) or units.get(name), analyte, analyte_unit))
    names = [s.name for s in specs if s.role != "other"]
    dup = sorted({n for n in names if names.count(n) > 1})
    if dup:
        raise InputError(f"columns {dup} are given more than once (with different units?)")
    if "analyte" not in names:
        raise InputError("the samples need an 'analyte' column (expected level, e.g. 'analyte [mg/L as N]')")
    if not any(s.role in ("ionic_strength", "conductivity", "tds", "ion") for s in specs):
        raise InputError("the samples need a source of ionic strength: an 'ionic_strength', 'conductivity' or 'tds' "
                         "column, or ion columns such as 'Na+ [mg/L]'")
    return specs


def _cell(c: Any, delimiter: str | None, decimal_comma: bool | None) -> tuple[float, str | None]:
    if c is None:
        return math.nan, "missing"
    if isinstance(c, bool | np.bool_):
        return math.nan, f"{c!r} is not a number"
    if isinstance(c, int | float | np.integer | np.floating):
        v = float(c)
        return (v, None) if math.isfinite(v) else (math.nan, f"{c!r} is not a finite number")
    text = str(c)
    if not text.strip():
        return math.nan, "missing"
    if _RE_NUMBER.match(text):
        return float(text), None
    if _RE_COMMA_NUMBER.match(text):
        semi = delimiter in (";", "\t")
        if decimal_comma is True or (decimal_comma is None and semi and not _RE_THOUSANDS.match(text)):
            return float(text.replace(",", ".")), None
        if decimal_comma is None and semi:
            return math.nan, (f"{text.strip()!r} is ambiguous (a decimal comma or a thousands separator); read the "
                              "file with decimal_comma=True or write the number without the comma")
        return math.nan, (f"{text.strip()!r} has a decimal comma; write it with a point, or read a semicolon-"
                          "separated file with decimal_comma=True")
    shown = text.strip()[:30]
    return math.nan, f"{shown!r} is not a number"


# the grammar of a column of plain numbers, one a line (the reference the fast conversion in
# _all_plain_numbers is tested against), and the characters such a column may hold
_NUM = r"[ \t]*[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?[ \t]*"
_RE_ALL_NUMBERS = re.compile(rf"(?:{_NUM}\n)*{_NUM}")
_RE_NUMBER_CHARS = re.compile(r"[0-9.eE+\-\n \t]+")


def _all_plain_numbers(cells: Sequence[Any]) -> np.ndarray | None:
    """The column as floats when every cell is a number by the grammar (text) or a finite float; else None."""
    if not cells:
        return np.zeros(0)
    if set(map(type, cells)) == {str}:
        joined = "\n".join(cells)
        if joined.count("\n") != len(cells) - 1 or not _RE_NUMBER_CHARS.fullmatch(joined):  # a cell with a newline
            return None
        # only digits, signs, points, exponents and blanks: within these characters the conversion
        # to float accepts a cell exactly when the grammar (_RE_ALL_NUMBERS) does (tested), and it is
        # several times faster than matching the grammar
        try:
            return np.array(cells, dtype=float)
        except ValueError:
            return None
    if all(type(c) in (float, int) for c in cells):
        arr = np.array(cells, dtype=float)
        return arr if np.all(np.isfinite(arr)) else None
    return None


def cell_numbers(cells: Sequence[Any], delimiter: str | None, decimal_comma: bool | None
                 ) -> tuple[np.ndarray, list[str | None]]:
    """Numbers of a column's cells (NaN where none) and, per cell, why it is not a number."""
    fast = _all_plain_numbers(cells)
    if fast is not None:
        return fast, [None] * len(cells)
    n = len(cells)
    vals = np.full(n, np.nan)
    why: list[str | None] = [None] * n
    for i, c in enumerate(cells):
        v, w = _cell(c, delimiter, decimal_comma)
        vals[i] = v
        why[i] = w
    return vals, why


@dataclass
class RowValues:
    """Per-row values of a batch, in the bases of :class:`ColumnSpec`, and each row's problem."""

    ids: list[str]
    analyte: np.ndarray  # mol/L
    ionic: np.ndarray  # mol/kg, untreated
    sources: list[str]
    ions: dict[str, tuple[Ion, np.ndarray]]  # mol/L, for rows whose ionic strength comes from ions (0 elsewhere)
    reasons: list[str | None]

    @property
    def valid(self) -> np.ndarray:
        return np.array([r is None for r in self.reasons], dtype=bool)


def _first_reason(reasons: list[str | None], i: int, text: str) -> None:
    if reasons[i] is None:
        reasons[i] = text


def row_values(specs: list[ColumnSpec], columns: Mapping[str, Sequence[Any]], row_errors: Sequence[str | None],
               *, delimiter: str | None, decimal_comma: bool | None, temperature: float,
               conductivity_rule: str, tds_rule: str, charge_tolerance_percent: float,
               density: str | None = None, id_offset: int = 0) -> RowValues:
    """Every row's analyte, ionic strength and its source, or the reason it is invalid."""
    n = len(row_errors)
    reasons: list[str | None] = list(row_errors)
    by_role = {s.role: s for s in specs if s.role not in ("ion", "other")}
    nums: dict[str, tuple[np.ndarray, list[str | None]]] = {}
    for s in specs:
        if s.role in ("analyte", "ionic_strength", "conductivity", "tds", "ion"):
            v, why = cell_numbers(columns[s.header], delimiter, decimal_comma)
            nums[s.header] = (v * s.factor, why)
            if why.count(None) < len(why):
                for i, w in enumerate(why):
                    if w is not None and w != "missing":
                        _first_reason(reasons, i, f"{s.header} {w}")
            for i in np.flatnonzero(v < 0).tolist():
                _first_reason(reasons, i, f"{s.header} {v[i]:g} is negative")
    ids = _ids(columns, by_role.get("id"), n, id_offset)
    a_spec = by_role["analyte"]
    analyte, a_why = nums[a_spec.header]
    for i, w in enumerate(a_why if a_why.count(None) < len(a_why) else ()):
        if w == "missing":
            _first_reason(reasons, i, f"{a_spec.header} is empty: give the expected level (a screening value or a "
                                      "previous result)")
    for i in np.flatnonzero(analyte == 0).tolist():
        _first_reason(reasons, i, "analyte is zero: give the expected level (a screening value or a previous result)")
    for i in np.flatnonzero(analyte > MAX_ANALYTE).tolist():
        _first_reason(reasons, i, f"analyte {analyte[i]:.4g} mol/L is impossible (above {MAX_ANALYTE:g} mol/L)")
    ionic, sources, ions = _ionic_strength(specs, nums, by_role, reasons, n, temperature, conductivity_rule, tds_rule,
                                           charge_tolerance_percent, density)
    return RowValues(ids, analyte, ionic, sources, ions, reasons)


def _ids(columns: Mapping[str, Sequence[Any]], spec: ColumnSpec | None, n: int, offset: int) -> list[str]:
    cells = columns[spec.header] if spec else [None] * n
    stripped = ["" if x is None else str(x).strip() for x in cells]
    return [x or f"row {offset + i + 1}" for i, x in enumerate(stripped)]


def _ionic_strength(specs: list[ColumnSpec], nums: dict[str, tuple[np.ndarray, list[str | None]]],
                    by_role: dict[str, ColumnSpec], reasons: list[str | None], n: int, temperature: float,
                    conductivity_rule: str, tds_rule: str, tolerance: float, density: str | None
                    ) -> tuple[np.ndarray, list[str], dict[str, tuple[Ion, np.ndarray]]]:
    ionic = np.full(n, np.nan)
    sources = [""] * n
    have = np.zeros(n, dtype=bool)
    if "ionic_strength" in by_role:
        v, _ = nums[by_role["ionic_strength"].header]
        ok = np.isfinite(v) & (v >= 0)
        ionic[ok], have[ok] = v[ok], True
        for i in np.flatnonzero(ok).tolist():
            sources[i] = "stated"
    ion_specs = [s for s in specs if s.role == "ion"]
    ions: dict[str, tuple[Ion, np.ndarray]] = {}
    if ion_specs:
        use = _ion_rows(ion_specs, nums, have, reasons)
        c = np.array([np.where(use, np.nan_to_num(nums[s.header][0]), 0.0) for s in ion_specs])
        ion_objs = [s.ion for s in ion_specs if s.ion is not None]
        _balance(ion_objs, c, use, reasons, tolerance)
        w = water_per_litre(ion_objs, temperature, molar=c, density=density)
        z2 = np.array([i.charge**2 for i in ion_objs], dtype=float)
        i_ions = 0.5 * (z2 @ (c / w))
        ionic[use], have[use] = i_ions[use], True
        for i in np.flatnonzero(use).tolist():
            sources[i] = "ions"
        ions = {s.name: (s.ion, c[k]) for k, s in enumerate(ion_specs) if s.ion is not None}
    for role, fn, rule in (("conductivity", ionic_strength_from_conductivity, conductivity_rule),
                           ("tds", ionic_strength_from_tds, tds_rule)):
        if role not in by_role:
            continue
        v, _ = nums[by_role[role].header]
        use = ~have & np.isfinite(v) & (v >= 0)
        if np.any(use):
            import warnings

            from ..errors import ValidityRangeWarning

            with warnings.catch_warnings():
                warnings.simplefilter("ignore", ValidityRangeWarning)
                est = fn(v[use], rule)
            ionic[use], have[use] = est.value, True
            for i in np.flatnonzero(use).tolist():
                sources[i] = f"{role} ({est.rule})"
    for i in np.flatnonzero(~have).tolist():
        _first_reason(reasons, i, "no ionic strength: every source column is empty for this row")
    for i in np.flatnonzero(np.isfinite(ionic) & (ionic > MAX_IONIC_STRENGTH)).tolist():
        _first_reason(reasons, i, f"ionic strength {ionic[i]:.4g} mol/kg ({sources[i]}) is impossible for a water "
                                  f"sample (above {MAX_IONIC_STRENGTH:g})")
    return ionic, sources, ions


def _ion_rows(ion_specs: list[ColumnSpec], nums: dict[str, tuple[np.ndarray, list[str | None]]],
              have: np.ndarray, reasons: list[str | None]) -> np.ndarray:
    """Rows whose ionic strength comes from their ions: no stated value and an ion cell filled.
    Such a row needs every ion cell filled (an empty ion cell is not zero)."""
    filled = np.array([[w is None for w in nums[s.header][1]] for s in ion_specs])
    any_filled = filled.any(axis=0)
    use = ~have & any_filled
    for i in np.flatnonzero(use & ~filled.all(axis=0)).tolist():
        empty = [s.header for k, s in enumerate(ion_specs) if not filled[k, i]]
        _first_reason(reasons, i, f"ion column(s) {', '.join(empty)} empty in a row whose ionic strength comes from "
                                  "its ions; write 0 for an absent ion")
    return np.asarray(use & filled.all(axis=0))


def _balance(ions: list[Ion], c: np.ndarray, use: np.ndarray, reasons: list[str | None], tolerance: float) -> None:
    """Ion balance of each row whose I comes from its ions: (Σ cations − Σ anions)/(Σ both) in equivalents."""
    z = np.array([i.charge for i in ions], dtype=float)
    cat = (np.where(z > 0, z, 0.0) @ c) * 1e3
    an = (np.where(z < 0, -z, 0.0) @ c) * 1e3
    total = cat + an
    with np.errstate(invalid="ignore", divide="ignore"):
        err = np.where(total > 0, 100.0 * (cat - an) / total, 0.0)
    for i in np.flatnonzero(use & (np.abs(err) > tolerance)).tolist():
        _first_reason(reasons, i, f"ion balance error {err[i]:+.1f} % exceeds ±{tolerance:g} % (cations {cat[i]:.4g}, "
                                  f"anions {an[i]:.4g} meq/L): an ion is missing or mistyped")
