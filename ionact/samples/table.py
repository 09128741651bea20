"""Reading a batch of samples from CSV: strict, bounded, streaming, and losing no row.

Rules (documented in the README):

- UTF-8 text (a byte-order mark is allowed). The delimiter is read off the header line
  (comma, semicolon or tab) unless given; a header that splits on more than one of them
  is an error asking for ``delimiter=``.
- Every data line is one row: a quoted field that runs past its line, or past the cell
  size limit, is an error naming the line. A row with the wrong number of cells is kept
  and marked invalid with that reason — never padded, cut or re-aligned.
- Decimal commas are read only in semicolon- or tab-separated files: always with
  ``decimal_comma=True``, never with ``False``, and by default only when unambiguous (a
  comma followed by other than exactly three digits; "1,234" is marked ambiguous).
- A units row (first cell ``units``, every other non-empty cell a unit) is read only
  right under the header; a sample named "units" with numbers stays a sample.
- Limits: lines of at most 64 KiB, 1000 columns, cells of 1000 characters; a file that
  breaks them (``/dev/zero``) is a one-line error, not a memory error.
"""

from __future__ import annotations

import csv
import io
import re
import sys
from collections.abc import Iterator
from dataclasses import dataclass, field
from pathlib import Path
from typing import IO, Any

from ..errors import InputError

__all__ = ["SampleTable", "read_samples_csv", "iter_samples_csv", "MAX_LINE_BYTES", "MAX_COLUMNS", "MAX_CELL",
           "DELIMITERS"]

MAX_LINE_BYTES = 64 * 1024
MAX_COLUMNS = 1000
MAX_CELL = 1000
DELIMITERS = {",": "comma", ";": "semicolon", "\t": "tab"}
# a cell of a units row: letters first (a unit, not a number), e.g. "mg/L as N", "uS/cm", "µS/cm"
_RE_UNIT_CELL = re.compile(r"[A-Za-zµμ°][A-Za-z0-9µμ°/ .]*")
# rows a streamed check reads, checks and writes at a time: its arrays (rows × 7 dilutions ×
# ions) stay small enough to be reused from the heap (no fresh pages each chunk) and in cache
CHUNK_ROWS = 2_000


@dataclass(frozen=True)
class SampleTable:
    """Rows of a sample file as text cells, with what the reader found out about them.

    Attributes
    ----------
    columns : dict
        Header -> list of cell texts, one per row (rows in file order).
    units : dict
        Column name -> unit from a units row (headers may carry their own "[unit]").
    row_errors : list of str or None
        Per row, why the reader could not take it (wrong number of cells), else None.
    lines : list of int
        The file line of each row.
    delimiter : str
    decimal_comma : bool or None
        True/False as given, None for "when unambiguous" (semicolon and tab files only).
    source : str
        The file's name, for messages.
    first_row : int
        Position of this table's first row among the file's sample rows (0 for a whole
        file; a chunk of a streamed file starts further on), so rows are numbered as in
        the file.
    """

    columns: dict[str, list[str]]
    units: dict[str, str] = field(default_factory=dict)
    row_errors: list[str | None] = field(default_factory=list)
    lines: list[int] = field(default_factory=list)
    delimiter: str = ","
    decimal_comma: bool | None = None
    source: str = ""
    first_row: int = 0

    def __len__(self) -> int:
        return len(self.row_errors)


class _LineReader:
    """Lines of at most MAX_LINE_BYTES from a text stream, with their numbers."""

    def __init__(self, fh: IO[str], src: str) -> None:
        self.fh = fh
        self.src = src
        self.number = 0

    def next(self) -> str | None:
        line = self.fh.readline(MAX_LINE_BYTES + 1)
        if line == "":
            return None
        self.number += 1
        self._check(line, self.number)
        return line

    def block(self, k: int) -> list[str]:
        """Up to ``k`` lines (fewer at the end of the text), each checked as :meth:`next` checks it."""
        readline, limit = self.fh.readline, MAX_LINE_BYTES + 1
        lines = []
        for _ in range(k):
            line = readline(limit)
            if not line:
                break
            lines.append(line)
            if len(line) > MAX_LINE_BYTES:  # stop at once: the text may be one endless line
                self._check(line, self.number + len(lines))
        if "\x00" in "".join(lines):
            for i, line in enumerate(lines):  # the first line holding one, named
                self._check(line, self.number + i + 1)
        self.number += len(lines)
        return lines

    def _check(self, line: str, number: int) -> None:
        if len(line) > MAX_LINE_BYTES and not line.endswith("\n"):
            raise InputError(f"{self.src}: line {number} is longer than {MAX_LINE_BYTES} characters "
                             "(not a sample table?)")
        if "\x00" in line:
            raise InputError(f"{self.src}: line {number} contains NUL bytes (not a text file?)")


def _cells(line: str, delimiter: str, src: str, number: int) -> list[str]:
    try:
        rows = list(csv.reader([line], delimiter=delimiter, strict=True))
    except csv.Error as exc:
        raise InputError(f"{src}: line {number}: {exc} — a quoted field runs past its line (a stray quote?)") from None
    cells = rows[0] if rows else []
    if len(cells) > MAX_COLUMNS:
        raise InputError(f"{src}: line {number} has {len(cells)} cells; at most {MAX_COLUMNS} columns are read")
    for c in cells:
        if len(c) > MAX_CELL:
            raise InputError(f"{src}: line {number} has a cell of {len(c)} characters; at most {MAX_CELL} are read")
    return cells


def _delimiter(header: str, src: str) -> str:
    counts = {d: len(_cells(header, d, src, 1)) for d in DELIMITERS}
    splitting = [d for d, n in counts.items() if n > 1]
    if len(splitting) == 1:
        return splitting[0]
    if not splitting:
        return ","
    raise InputError(f"{src}: the header splits on more than one delimiter "
                     f"({', '.join(DELIMITERS[d] for d in splitting)}); pass delimiter=")


def _header(cells: list[str], src: str) -> list[str]:
    header = [h.strip() for h in cells]
    if not any(header):
        raise InputError(f"{src}: the first row (the header) is empty")
    seen: set[str] = set()
    dup: set[str] = set()
    for h in header:
        if h and h in seen:
            dup.add(h)
        seen.add(h)
    if dup:
        raise InputError(f"{src}: duplicate column names {sorted(dup)}")
    if "" in header:
        raise InputError(f"{src}: column {header.index('') + 1} has no name in the header")
    return header


def _is_units_row(cells: list[str], header: list[str]) -> bool:
    if not cells or cells[0].strip().lower() != "units" or len(cells) != len(header):
        return False
    return all(_RE_UNIT_CELL.fullmatch(c.strip()) for c in cells[1:] if c.strip())


def _open(path: Any, src: str) -> tuple[IO[str], bool]:
    if path == "-":
        return io.TextIOWrapper(sys.stdin.buffer, encoding="utf-8-sig", newline=""), False
    if hasattr(path, "read") and not isinstance(path, str | Path):
        return path, False
    try:
        p = Path(path)
        if p.is_dir():
            raise InputError(f"cannot read {src}: it is a folder")
        return open(p, encoding="utf-8-sig", newline=""), True
    except OSError as exc:
        raise InputError(f"cannot read {src}: {exc.strerror or exc}") from None


def iter_samples_csv(path: Any, *, delimiter: str | None = None, decimal_comma: bool | None = None,
                     chunk_rows: int = CHUNK_ROWS) -> Iterator[SampleTable]:
    """Read a sample file in chunks of ``chunk_rows`` rows (memory does not grow with the file).

    Raises
    ------
    InputError
        Unreadable, not UTF-8, empty, no header, a delimiter that cannot be told, a stray
        quote or a line/cell/column beyond the limits (naming the line).
    """
    src = "standard input" if path == "-" else str(path)
    if delimiter is not None and delimiter not in DELIMITERS:
        raise InputError(f"delimiter {delimiter!r} must be one of comma, semicolon or tab")
    if decimal_comma is not None and not isinstance(decimal_comma, bool):
        raise InputError(f"decimal_comma {decimal_comma!r} must be True, False or None")
    fh, own = _open(path, src)
    try:
        yield from _chunks(_LineReader(fh, src), src, delimiter, decimal_comma, chunk_rows)
    except UnicodeDecodeError:
        raise InputError(f"{src} is not UTF-8 text; save it as UTF-8 CSV") from None
    finally:
        if own:
            fh.close()


def _parse_block(lines: list[str], first: int, delim: str, src: str, into: _Rows) -> None:
    """The rows of a block of lines (line numbers from ``first``) added to ``into``; a quoted
    field may not leave its line, and blank rows are skipped."""
    # no line of the block is long enough to hold a cell or a row beyond the limits: skip those checks
    short = max(map(len, lines), default=0) < min(MAX_CELL, MAX_COLUMNS)
    rows, numbers = into.rows, into.numbers
    if short:  # the common block: one row per line, none blank, taken whole
        try:
            parsed = list(csv.reader(lines, delimiter=delim, strict=True))
        except csv.Error:
            parsed = []  # the row-by-row reading below names the line
        if len(parsed) == len(lines) and all(map(str.strip, map("".join, parsed))):
            rows.extend(map(tuple, parsed))
            numbers.extend(range(first, first + len(lines)))
            return
    rdr = csv.reader(lines, delimiter=delim, strict=True)
    prev = 0
    try:
        for cells in rdr:
            if rdr.line_num - prev > 1:
                raise InputError(f"{src}: line {first + prev}: a quoted field runs past its line (a stray quote?); "
                                 "no row is read across lines")
            prev = rdr.line_num
            if not cells or not "".join(cells).strip():
                continue
            if not short:
                if len(cells) > MAX_COLUMNS:
                    raise InputError(f"{src}: line {first + prev - 1} has {len(cells)} cells; at most {MAX_COLUMNS} "
                                     "columns are read")
                if max(map(len, cells)) > MAX_CELL:
                    raise InputError(f"{src}: line {first + prev - 1} has a cell longer than {MAX_CELL} characters")
            rows.append(tuple(cells))
            numbers.append(first + prev - 1)
    except csv.Error as exc:
        raise InputError(f"{src}: line {first + prev}: {exc} — a quoted field runs past its line (a stray quote?)"
                         ) from None


class _Rows:
    """Sample rows read and not yet handed on, each a tuple of its cells with its line number.
    (Tuples of strings are let go by the garbage collector's tracking after its first look;
    millions of kept lists would wake its full passes over the whole heap.)"""

    def __init__(self) -> None:
        self.rows: list[tuple[str, ...]] = []
        self.numbers: list[int] = []

    def __len__(self) -> int:
        return len(self.rows)

    def take(self, k: int, header: list[str], units: dict[str, str], delim: str, decimal_comma: bool | None,
             src: str, first_row: int) -> SampleTable:
        """The first ``k`` rows as a table (columns by header); a row of the wrong width is kept
        (padded or cut) and marked, never re-aligned."""
        rows, numbers = self.rows[:k], self.numbers[:k]
        del self.rows[:k], self.numbers[:k]
        width = len(header)
        errors: list[str | None] = [None] * len(rows)
        widths = list(map(len, rows))
        if widths.count(width) != len(widths):
            for i, w in enumerate(widths):
                if w != width:
                    errors[i] = (f"line {numbers[i]} has {w} cells for {width} columns (a delimiter or a decimal "
                                 "comma inside a cell?); the row is not re-aligned")
                    rows[i] = (rows[i] + ("",) * width)[:width]
        cols = dict(zip(header, map(list, zip(*rows, strict=True)), strict=True))
        return SampleTable(cols, dict(units), errors, numbers, delim, decimal_comma, src, first_row)


def _chunks(reader: _LineReader, src: str, delimiter: str | None, decimal_comma: bool | None,
            chunk_rows: int) -> Iterator[SampleTable]:
    first = reader.next()
    while first is not None and not first.strip():
        first = reader.next()
    if first is None:
        raise InputError(f"{src} is empty")
    delim = delimiter or _delimiter(first, src)
    if decimal_comma and delim == ",":
        raise InputError(f"{src}: decimal commas cannot be read in a comma-separated file; use ';' as delimiter")
    header = _header(_cells(first, delim, src, reader.number), src)
    units: dict[str, str] = {}
    any_rows = False
    expect_units = True
    block = min(chunk_rows, CHUNK_ROWS)
    pending = _Rows()
    done = 0  # sample rows in the tables already yielded
    while True:
        start = reader.number + 1
        lines = reader.block(block)
        if not lines:
            break
        _parse_block(lines, start, delim, src, pending)
        if expect_units and pending.rows:
            expect_units = False
            cells = list(pending.rows[0])
            if _is_units_row(cells, header):
                units.update({h: u.strip() for h, u in zip(header[1:], cells[1:], strict=True) if u.strip()})
                del pending.rows[0], pending.numbers[0]
        any_rows = any_rows or len(pending) > 0
        while len(pending) >= chunk_rows:
            yield pending.take(chunk_rows, header, units, delim, decimal_comma, src, done)
            done += chunk_rows
    if not any_rows:
        raise InputError(f"{src} has a header but no sample rows")
    if len(pending):
        yield pending.take(len(pending), header, units, delim, decimal_comma, src, done)


def read_samples_csv(path: Any, *, delimiter: str | None = None, decimal_comma: bool | None = None) -> SampleTable:
    """Read a whole sample file (see :func:`iter_samples_csv` for large files and the rules)."""
    parts = list(iter_samples_csv(path, delimiter=delimiter, decimal_comma=decimal_comma, chunk_rows=sys.maxsize))
    return parts[0]
