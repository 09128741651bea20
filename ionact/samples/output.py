"""Batch reports out: spreadsheet-safe CSV written safely, a readable text table, and the
streaming check of a sample file of any length.

A report is written to a temporary file in the same folder and renamed over the target
only when everything asked for (the figure too) has been produced, so a failed run never
leaves a half-written report over a good one. ``--out`` may not be the input file.
"""

from __future__ import annotations

import csv
import io
import math
import os
import re
import tempfile
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass, field
from pathlib import Path
from typing import IO, Any

import numpy as np

from .._progress import Progress
from ..errors import InputError
from .check import DEFAULT_DILUTIONS, check_samples
from .columns import DEFAULT_CHARGE_BALANCE_PERCENT
from .result import STATUSES, SampleCheck
from .table import CHUNK_ROWS, iter_samples_csv

__all__ = ["write_report_csv", "read_report_csv", "report_to_text", "check_csv", "BatchSummary", "safe_cell",
           "printable", "FIGURE_FORMATS", "atomic_output"]

FIGURE_FORMATS = (".png", ".pdf", ".svg")
_TEXT_COLUMNS = ("sample_id", "status", "reason", "ionic_strength_source")


def safe_cell(v: Any) -> str:
    """Spreadsheet-safe text: numbers stay numbers; text that would start a formula is neutralised."""
    if isinstance(v, float | int | np.floating | np.integer) and not isinstance(v, bool):
        f = float(v)
        return "" if math.isnan(f) else repr(f)
    s = "" if v is None else str(v)
    if s and s[0] in "=+-@\t\r":
        return "'" + s
    return s


def printable(s: str) -> str:
    """Text with terminal control characters shown escaped (\\x1b …), for reports on a screen."""
    return "".join(c if c.isprintable() else f"\\x{ord(c):02x}" for c in s)


def _few_distinct(values: list[Any]) -> set[Any] | None:
    """The distinct values of a long column that holds few of them (worth formatting each
    once), else None."""
    if len(values) <= 64:
        return None
    distinct = set(values)
    return distinct if len(distinct) * 8 < len(values) else None


def _num_column(values: np.ndarray) -> list[str]:
    """Shortest round-trip text of each float (Python's repr); empty for NaN. A column of few
    distinct values (the dilutions) formats each value once."""
    listed = values.tolist()
    distinct = _few_distinct(listed)
    if distinct is not None:
        memo = {x: repr(x) for x in distinct if x == x}
        # NaN is empty; zeros are written each for itself (0.0 and -0.0 are one key of the memo)
        return [memo[x] if x and x == x else ("" if x != x else repr(x)) for x in listed]
    return ["" if x != x else repr(x) for x in listed]


_FORMULA = frozenset("=+-@\t\r")
_FORMULA_START = re.compile(r"\n[=+\-@\t\r]")
_QUOTE_CHARS = re.compile(r'[,"\r\n]')


def _text_cell(v: Any) -> str:
    s = "" if v is None else str(v)
    return "'" + s if s and s[0] in _FORMULA else s


def _text_column(values: Any) -> list[str]:
    """Cells of a text column with formula-leading text neutralised (not yet quoted). A column
    of few distinct values (statuses, sources) converts each value once; a column of text in
    which no cell starts like a formula is taken as it is."""
    values = list(values)
    distinct = _few_distinct(values)
    if distinct is not None:
        memo = {v: _text_cell(v) for v in distinct}
        return list(map(memo.__getitem__, values))
    if len(values) > 64 and set(map(type, values)) == {str} and not _FORMULA_START.search("\n" + "\n".join(values)):
        return values
    return [_text_cell(v) for v in values]


def _quoted(cells: list[str]) -> list[str]:
    """Cells as the csv module writes them by default (minimal quoting, doubled quotes)."""
    if not _QUOTE_CHARS.search("".join(cells)):
        return cells
    return ['"' + c.replace('"', '""') + '"' if ("," in c or '"' in c or "\n" in c or "\r" in c) else c
            for c in cells]


def _csv_text(result: SampleCheck, header: bool) -> str:
    """The report's rows (and header) as CSV text, byte for byte what ``csv.writer`` writes,
    built column by column: only text columns can need quotes, numbers never do. The cells
    are laid out row by row between their separators in one list and joined once."""
    heads, cols = [], []
    for h, v in result.columns():
        heads.append(h)
        cols.append(_num_column(np.asarray(v, dtype=float)) if isinstance(v, np.ndarray)
                    else _quoted(_text_column(v)))
    n, k = len(cols[0]), len(cols)
    parts: list[str] = [""] * (2 * n * k)
    for j, col in enumerate(cols):
        parts[2 * j::2 * k] = col
    parts[1::2] = ([","] * (k - 1) + ["\r\n"]) * n
    head = ",".join(_quoted(heads)) + "\r\n" if header else ""
    return head + "".join(parts)


@contextmanager
def atomic_output(path: Any, *, inputs: tuple[Any, ...] = ()) -> Iterator[IO[str]]:
    """A text file that replaces ``path`` only if the block finishes without an error."""
    target = Path(path)
    for inp in inputs:
        try:
            if inp != "-" and Path(inp).exists() and target.exists() and os.path.samefile(inp, target):
                raise InputError(f"--out {target} is the input file; choose another name")
        except OSError:
            continue
    folder = target.parent if str(target.parent) else Path(".")
    if not folder.is_dir():
        raise InputError(f"cannot write {target}: folder {folder} does not exist")
    fd, tmp = tempfile.mkstemp(dir=folder, prefix=f".{target.name}.", suffix=".part")
    ok = False
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as fh:
            yield fh
        os.replace(tmp, target)
        ok = True
    finally:
        if not ok and os.path.exists(tmp):
            os.unlink(tmp)


def write_report_csv(result: SampleCheck, path_or_file: Any) -> None:
    """Write the per-sample report as CSV (columns documented in the README).

    Numbers are written in their shortest exact form, so reading the file back gives the
    same floats; text that a spreadsheet would take for a formula is neutralised. A path
    is written through a temporary file and renamed when complete.
    """
    text = _csv_text(result, header=True)
    if isinstance(path_or_file, str | bytes) or hasattr(path_or_file, "__fspath__"):
        with atomic_output(path_or_file) as fh:
            fh.write(text)
        return
    path_or_file.write(text)


def read_report_csv(path: Any) -> list[dict[str, Any]]:
    """Read a report written by :func:`write_report_csv` back into rows (numbers as floats)."""
    with open(path, encoding="utf-8", newline="") as fh:
        out = []
        for row in csv.DictReader(fh):
            r: dict[str, Any] = {}
            for k, v in row.items():
                if k in _TEXT_COLUMNS:
                    r[k] = v[1:] if v.startswith("'") and v[1:2] in ("=", "+", "-", "@", "\t", "\r") else v
                else:
                    r[k] = float(v) if v != "" else float("nan")
            out.append(r)
    return out


def _table_lines(result: SampleCheck, limit: int) -> list[str]:
    u = result.unit
    lines = [f"{'sample':<16}{'status':<30}{'dil.':>6}{'analyte ' + u:>20}{'I mol/kg':>10}{'err mV':>8}  reason"]
    for r in result.rows(limit):
        d = "" if math.isnan(r["dilution"]) else f"×{r['dilution']:g}"
        a = r[f"analyte [{u}]"]
        lines.append(f"{printable(r['sample_id'])[:15]:<16}{r['status']:<30}{d:>6}{a:>20.4g}"
                     f"{r['ionic_strength [mol/kg]']:>10.4g}{r['gamma_error [mV]']:>8.3g}  {printable(r['reason'])}")
    return lines


def report_to_text(result: SampleCheck, limit: int = 50) -> str:
    """A readable table of the first ``limit`` samples plus the summary (control characters escaped)."""
    buf = io.StringIO()
    buf.write("\n".join(_table_lines(result, limit)) + "\n")
    if len(result) > limit:
        buf.write(f"… {len(result) - limit} more rows in the CSV report\n")
    buf.write("\n" + result.summary() + "\n")
    return buf.getvalue()


@dataclass
class BatchSummary:
    """What a streamed check keeps: counts, the first rows as text, and the figure's points."""

    counts: dict[str, int] = field(default_factory=lambda: dict.fromkeys(STATUSES, 0))
    model: str = ""
    unit: str = "mol/L"
    calibration_range: tuple[float, float] = (0.0, 0.0)
    envelope: tuple[float, float] = (0.0, 0.0)
    head: list[str] = field(default_factory=list)
    rows_json: list[dict[str, Any]] = field(default_factory=list)
    total: int = 0
    _points: list[tuple[np.ndarray, np.ndarray, np.ndarray, float]] = field(default_factory=list, repr=False)

    def add(self, r: SampleCheck, keep_rows: bool, limit: int, points: bool = True) -> None:
        for k, v in r.counts().items():
            self.counts[k] += v
        self.model, self.unit = r.model, r.unit
        self.calibration_range, self.envelope = r.calibration_range, r.envelope
        if len(self.head) < limit + 1:
            lines = _table_lines(r, limit - max(len(self.head) - 1, 0))
            self.head += lines if not self.head else lines[1:]
        if keep_rows:
            self.rows_json += r.to_dict()["rows"]
        if points:  # the figure's points, only when a figure is asked for
            status = np.array([STATUSES.index(s) for s in r.status], dtype=np.int8)
            self._points.append((np.asarray(r.ionic_strength), np.asarray(r.analyte), status, r.unit_factor))
        self.total += len(r)

    def text(self, limit: int = 50) -> str:
        out = "\n".join(self.head[: limit + 1]) + "\n"
        if self.total > limit:
            out += f"… {self.total - limit} more rows in the CSV report\n"
        out += f"\n{self.total} samples checked with model {self.model}:\n"
        out += "\n".join(f"  {s:<30} {self.counts[s]}" for s in STATUSES) + "\n"
        return out

    def figure(self) -> Any:
        """The batch figure from the kept points (the same as :meth:`SampleCheck.plot`); a
        streamed check keeps them only when it was asked for a figure (``plot=``)."""
        n = self.total
        i = np.concatenate([p[0] for p in self._points]) if self._points else np.zeros(0)
        a = np.concatenate([p[1] for p in self._points]) if self._points else np.zeros(0)
        s = np.concatenate([p[2] for p in self._points]) if self._points else np.zeros(0, dtype=np.int8)
        f = self._points[0][3] if self._points else 1.0
        nan = np.full(n, np.nan)
        fake = SampleCheck(tuple([""] * n), tuple(STATUSES[k] for k in s), tuple([""] * n), nan, i,
                           tuple([""] * n), a, nan, nan, nan, nan, nan, (), {}, self.calibration_range, self.envelope,
                           self.model, self.unit, f)
        return fake.plot()


def _mark_earlier_duplicates(table: Any, seen: dict[str, int], offset: int) -> None:
    """Mark rows whose id appeared in an earlier chunk, and remember this chunk's first rows of each id."""
    ids = table.columns.get("sample_id")
    if ids is None:
        return
    stripped = [raw.strip() for raw in ids]
    first = dict(zip(reversed(stripped), range(offset + len(stripped) - 1, offset - 1, -1), strict=True))
    first.pop("", None)
    earlier = first.keys() & seen.keys()
    if earlier:
        for i, sid in enumerate(stripped):
            if sid in earlier and table.row_errors[i] is None:
                table.row_errors[i] = f"duplicate sample id {sid!r} (first at row {seen[sid] + 1})"
        for sid in earlier:
            del first[sid]
    seen.update(first)


def check_csv(path: Any, design: Any, *, out: Any = None, plot: Any = None, calibration_range: Any = None,
              dilutions: Any = DEFAULT_DILUTIONS, analyte_unit: str | None = None, units: Any = None,
              rule: Any = None, background: str | None = None,
              charge_tolerance_percent: float = DEFAULT_CHARGE_BALANCE_PERCENT, delimiter: str | None = None,
              decimal_comma: bool | None = None, keep_rows: bool = False, limit: int = 50,
              chunk_rows: int = CHUNK_ROWS, progress: bool = False) -> BatchSummary:
    """Check a sample file of any length in chunks, writing the report as it goes.

    Memory does not grow with the file: each chunk is read, checked and written; the
    summary keeps the counts, the first ``limit`` rows as text and the figure's points.
    The report (and figure) replace their targets only when all of them are complete.
    ``progress`` shows the rows checked so far on standard error when it is a terminal.
    """
    if plot is not None and Path(plot).suffix.lower() not in FIGURE_FORMATS:
        raise InputError(f"--plot {plot}: the figure's file must end in {', '.join(FIGURE_FORMATS)}")
    summary = BatchSummary()
    seen: dict[str, int] = {}
    writer_cm = atomic_output(out, inputs=(path,)) if out is not None else None
    fh = writer_cm.__enter__() if writer_cm is not None else None
    try:
        offset = 0
        with Progress(None, f"checking {Path(str(path)).name}", unit="row", enabled=progress) as bar:
            for table in iter_samples_csv(path, delimiter=delimiter, decimal_comma=decimal_comma,
                                          chunk_rows=chunk_rows):
                _mark_earlier_duplicates(table, seen, offset)
                r = check_samples(table, design, calibration_range=calibration_range, dilutions=dilutions,
                                  analyte_unit=analyte_unit, units=units, rule=rule, background=background,
                                  charge_tolerance_percent=charge_tolerance_percent)
                if fh is not None:
                    fh.write(_csv_text(r, header=offset == 0))
                summary.add(r, keep_rows, limit, points=plot is not None)
                offset += len(r)
                bar.advance(len(r))
        if plot is not None:
            with atomic_binary(plot) as tmp:
                summary.figure().savefig(tmp, format=Path(plot).suffix[1:].lower(), dpi=110)
    except BaseException as exc:
        if writer_cm is not None:
            writer_cm.__exit__(type(exc), exc, exc.__traceback__)
        raise
    if writer_cm is not None:
        writer_cm.__exit__(None, None, None)
    return summary


@contextmanager
def atomic_binary(path: Any) -> Iterator[str]:
    """A temporary path next to ``path`` that replaces it when the block succeeds."""
    target = Path(path)
    folder = target.parent if str(target.parent) else Path(".")
    if not folder.is_dir():
        raise InputError(f"cannot write {target}: folder {folder} does not exist")
    fd, tmp = tempfile.mkstemp(dir=folder, prefix=f".{target.name}.", suffix=".part")
    os.close(fd)
    try:
        yield tmp
        os.replace(tmp, target)
    finally:
        if os.path.exists(tmp):
            os.unlink(tmp)
