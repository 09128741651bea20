"""Short text and HTML displays of result records, so that a batch result shows as a few
lines in a console and as a small table in a notebook, whatever the batch size."""

from __future__ import annotations

import dataclasses
import html
from collections.abc import Mapping, Sequence
from typing import Any

import numpy as np

__all__ = ["summarise", "record_repr", "record_html", "html_table"]

_SHOW = 6  # sequences up to this length are shown whole


def summarise(v: Any) -> str:
    """One short text for a field's value: numbers with 4 significant digits, arrays and long
    sequences by their shape and range, records by their own short form."""
    if isinstance(v, np.ndarray) or isinstance(v, np.generic):
        a = np.asarray(v)
        if a.ndim == 0:
            return summarise(a.item())
        if a.size <= _SHOW and a.ndim == 1:
            return "[" + ", ".join(summarise(x) for x in a.tolist()) + "]"
        if a.dtype.kind in "fiu" and a.size:
            fin = a[np.isfinite(a)] if a.dtype.kind == "f" else a
            rng = f" {fin.min():.4g}…{fin.max():.4g}" if fin.size else " all NaN"
            return f"array{a.shape}{rng}"
        return f"array{a.shape}"
    if isinstance(v, float):
        return f"{v:.4g}"
    if isinstance(v, str):
        return repr(v) if len(v) <= 60 else repr(v[:57] + "…")
    if isinstance(v, Mapping):
        items = list(v.items())
        body = ", ".join(f"{k}: {summarise(x)}" for k, x in items[:_SHOW])
        return "{" + body + (f", … {len(items) - _SHOW} more" if len(items) > _SHOW else "") + "}"
    if isinstance(v, Sequence) and not isinstance(v, str | bytes):
        if len(v) > _SHOW:
            return f"({len(v)} items)"
        return "(" + ", ".join(summarise(x) for x in v) + ("," if len(v) == 1 else "") + ")"
    if dataclasses.is_dataclass(v) and not isinstance(v, type):
        return type(v).__name__ + "(…)"
    return repr(v)


def record_repr(obj: Any) -> str:
    """``Name(field=short value, …)`` over the dataclass fields."""
    parts = [f"{f.name}={summarise(getattr(obj, f.name))}" for f in dataclasses.fields(obj) if f.repr]
    return f"{type(obj).__name__}(" + ", ".join(parts) + ")"


def html_table(headers: Sequence[str], rows: Sequence[Sequence[Any]], caption: str = "",
               limit: int = 20) -> str:
    """An HTML table of at most ``limit`` rows (the rest counted below it)."""
    head = "".join(f"<th>{html.escape(str(h))}</th>" for h in headers)
    body = "".join("<tr>" + "".join(f"<td>{html.escape(c if isinstance(c, str) else summarise(c))}</td>"
                                    for c in r) + "</tr>" for r in rows[:limit])
    more = f"<p>… {len(rows) - limit} more rows</p>" if len(rows) > limit else ""
    cap = f"<p>{html.escape(caption)}</p>" if caption else ""
    return f"{cap}<table><tr>{head}</tr>{body}</table>{more}"


def record_html(obj: Any) -> str:
    """A two-column table (field, short value) of a record."""
    rows = [(f.name, getattr(obj, f.name)) for f in dataclasses.fields(obj) if f.repr]
    return html_table(("field", "value"), rows, type(obj).__name__)
