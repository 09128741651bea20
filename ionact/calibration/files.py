"""Calibration, sample and addition files: columns of our own, read strictly.

Standards (``ionact calibrate``)
    ``concentration [unit]`` (required; mol/L when the header has no unit, any per-litre
    unit otherwise: ``mg/L``, ``µmol/L``, ``mg/L as N``), ``potential [mV]`` (required; mV or
    V), ``sd [mV]`` (optional replicate standard deviation), ``id`` (optional).
Samples (``ionact quantify``)
    ``sample_id``, ``potential [mV]`` (required), ``time [unit]`` (optional, any one unit
    for the whole file), ``check [unit]`` (optional: a row with a value there is a reading
    of the check standard at that concentration, not a sample).
Additions (``ionact addition``)
    ``volume [mL]`` (cumulative volume of spike added; the first row 0) and
    ``potential [mV]``.

The sample-file rules of :mod:`ionact.samples.table` apply (delimiter from the header,
decimal commas only where unambiguous or declared, a units row, length limits). A bad
cell in a standards or additions file is an error naming its line; in a samples file the
row is kept and marked.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from ..errors import InputError
from ..species import Ion
from ..units import MOLAR, parse_amount, parse_scalar

__all__ = ["read_standards_csv", "read_samples_for_quantity", "read_additions_csv", "SampleReadings",
           "check_standard", "quantity_rows"]


def _table(path: Any, delimiter: str | None, decimal_comma: bool | None) -> Any:
    from ..samples.table import read_samples_csv

    return read_samples_csv(path, delimiter=delimiter, decimal_comma=decimal_comma)


def _find(table: Any, name: str, required: bool = True) -> tuple[str | None, str | None]:
    """The header whose name (before any "[unit]") is ``name``, and its unit."""
    from ..samples.columns import split_header

    hits = []
    for h in table.columns:
        base, unit = split_header(h)
        if base.lower() == name:
            hits.append((h, unit or table.units.get(h)))
    if len(hits) > 1:
        raise InputError(f"{table.source}: more than one '{name}' column", field=name)
    if not hits:
        if required:
            raise InputError(f"{table.source}: no '{name} [unit]' column (columns: {', '.join(table.columns)})",
                             field=name)
        return None, None
    return hits[0]


def _numbers(table: Any, header: str) -> tuple[np.ndarray, list[str | None]]:
    from ..samples.columns import cell_numbers

    return cell_numbers(table.columns[header], table.delimiter, table.decimal_comma)


def _strict(table: Any, header: str) -> np.ndarray:
    vals, why = _numbers(table, header)
    for i, w in enumerate(why):
        err = table.row_errors[i] if i < len(table.row_errors) else None
        if err or w or not math.isfinite(vals[i]):
            line = table.lines[i] if i < len(table.lines) else i + 2
            raise InputError(f"{table.source} line {line}: {header}: {err or w or 'empty cell'}",
                             value=table.columns[header][i], field=header)
    return vals


def _conc_factor(unit: str | None, ion: Ion, header: str) -> float:
    if unit is None:
        return 1.0
    amt = parse_amount(f"1 {unit}", ion, MOLAR, what=header)
    if amt.basis != MOLAR:
        raise InputError(f"column '{header}': give a per-litre unit (a series is prepared by volume)",
                         value=unit, allowed="mol/L, mmol/L, mg/L, µg/L, …", field=header)
    return float(np.asarray(amt.value))


def _mv_factor(unit: str | None, header: str) -> float:
    return 1.0 if unit is None else parse_scalar(f"1 {unit}", "mV", header)


def read_standards_csv(path: Any, analyte: Ion, *, delimiter: str | None = None,
                       decimal_comma: bool | None = None) -> dict[str, Any]:
    """Concentrations (mol/L), potentials (mV) and optional sd (mV) of a standards file."""
    t = _table(path, delimiter, decimal_comma)
    hc, uc = _find(t, "concentration")
    hp, up = _find(t, "potential")
    hs, us = _find(t, "sd", required=False)
    assert hc is not None and hp is not None
    out: dict[str, Any] = {"concentrations": _strict(t, hc) * _conc_factor(uc, analyte, hc),
                           "potentials_mv": _strict(t, hp) * _mv_factor(up, hp), "sd_mv": None}
    if hs is not None:
        out["sd_mv"] = _strict(t, hs) * _mv_factor(us, hs)
    return out


class SampleReadings:
    """A samples file read for quantitation: every row, in order."""

    def __init__(self, ids: list[str], potentials: np.ndarray, times: np.ndarray | None, check: np.ndarray,
                 reasons: list[str | None]) -> None:
        self.ids, self.potentials, self.times, self.check, self.reasons = ids, potentials, times, check, reasons

    @property
    def is_check(self) -> np.ndarray:
        return np.asarray(np.isfinite(self.check))


def read_samples_for_quantity(path: Any, analyte: Ion, *, delimiter: str | None = None,
                              decimal_comma: bool | None = None) -> SampleReadings:
    """Sample ids, potentials (NaN with a reason where a cell is bad), times and check rows."""
    t = _table(path, delimiter, decimal_comma)
    hp, up = _find(t, "potential")
    assert hp is not None
    n = len(t.columns[hp])
    reasons: list[str | None] = [t.row_errors[i] if i < len(t.row_errors) else None for i in range(n)]
    e, why = _numbers(t, hp)
    e = e * _mv_factor(up, hp)
    for i, w in enumerate(why):
        if reasons[i] is None and (w or not math.isfinite(e[i])):
            reasons[i] = f"{hp}: {w or 'empty cell'}"
    hid, _ = _find(t, "sample_id", required=False)
    ids = [str(x) for x in t.columns[hid]] if hid is not None else [str(i + 1) for i in range(n)]
    times = None
    ht, _ = _find(t, "time", required=False)
    if ht is not None:
        times, twhy = _numbers(t, ht)
        for i, w in enumerate(twhy):
            if reasons[i] is None and w:
                reasons[i] = f"{ht}: {w}"
    check = np.full(n, np.nan)
    hc, uc = _find(t, "check", required=False)
    if hc is not None:
        raw = t.columns[hc]
        vals, cwhy = _numbers(t, hc)
        f = _conc_factor(uc, analyte, hc)
        for i in range(n):
            if str(raw[i]).strip():
                if cwhy[i] or not vals[i] > 0:
                    reasons[i] = reasons[i] or f"{hc}: {cwhy[i] or 'not a positive concentration'}"
                else:
                    check[i] = vals[i] * f
    for i in range(n):
        if reasons[i] is not None:
            e[i] = math.nan
    return SampleReadings(ids, e, times, check, reasons)


def read_additions_csv(path: Any, *, delimiter: str | None = None, decimal_comma: bool | None = None
                       ) -> tuple[np.ndarray, np.ndarray]:
    """Cumulative spike volumes (mL) and potentials (mV) of an additions file."""
    t = _table(path, delimiter, decimal_comma)
    hv, uv = _find(t, "volume")
    hp, up = _find(t, "potential")
    assert hv is not None and hp is not None
    fv = 1.0 if uv is None else parse_scalar(f"1 {uv}", "mL", hv)
    return _strict(t, hv) * fv, _strict(t, hp) * _mv_factor(up, hp)


def check_standard(readings: SampleReadings) -> tuple[float, np.ndarray, np.ndarray] | None:
    """The check standard's concentration, times and potentials, when the file has check rows."""
    rows = np.flatnonzero(readings.is_check & np.isfinite(readings.potentials))
    if rows.size == 0:
        return None
    conc = readings.check[rows]
    if np.ptp(conc) > 1e-9 * conc.max():
        raise InputError("the check rows name more than one concentration; use one check standard per file",
                         field="check")
    if readings.times is None or not np.all(np.isfinite(readings.times[rows])):
        raise InputError("check-standard rows need a time each ('time [min]' column)", field="time")
    return float(conc[0]), readings.times[rows], readings.potentials[rows]


def quantity_rows(q: Any, readings: SampleReadings, unit: str, factor: float) -> tuple[list[str], list[list[Any]]]:
    """The report's header and rows: every row of the file, in order (check rows included)."""
    header = ["sample_id", "potential_mv", "drift_mv", "corrected_mv", f"concentration [{unit}]",
              f"low [{unit}]", f"high [{unit}]", "status", "reason"]
    rows: list[list[Any]] = []
    k = 0
    sample_rows = np.flatnonzero(~readings.is_check)
    where = {int(i): j for j, i in enumerate(sample_rows)}
    for i, sid in enumerate(readings.ids):
        if i in where:
            k = where[i]
            reason = readings.reasons[i] or q.reason[k]
            rows.append([sid, q.potentials_mv[k], q.drift_mv[k], q.corrected_mv[k], q.concentration[k] * factor,
                         q.interval[0, k] * factor, q.interval[1, k] * factor, q.status[k], reason])
        else:
            rows.append([sid, readings.potentials[i], math.nan, math.nan, math.nan, math.nan, math.nan,
                         "check standard", readings.reasons[i] or f"check standard at {readings.check[i] * factor:.4g} "
                         f"{unit}"])
    return header, rows

