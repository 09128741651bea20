"""pandas in and out, without importing pandas unless a DataFrame or Series is in hand.

A DataFrame's columns name ions (``Solution``) or salts (``Solution.from_salts``); a unit
goes in brackets in the column name (``"Ca^2+ [mg/L]"``) or in a ``units=`` mapping; bare
columns take the call's basis (mol/kg, or mol/L with ``basis="molar"``). Every unit is
linear in the amount, so one conversion factor per column serves every row. The frame's
index is kept and given back by the results' ``to_pandas()``.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from typing import Any

import numpy as np

from .errors import InputError

__all__ = ["is_frame", "is_series", "frame_amounts", "to_frame"]


def is_frame(x: Any) -> bool:
    return type(x).__module__.startswith("pandas") and type(x).__name__ == "DataFrame"


def is_series(x: Any) -> bool:
    return type(x).__module__.startswith("pandas") and type(x).__name__ == "Series"


def frame_amounts(df: Any, units: Mapping[str, str] | None, unit_amount: Callable[[str, str], Any],
                  bare: Callable[[str, np.ndarray], Any]) -> tuple[dict[str, Any], Any]:
    """Column name (without its unit) -> amount, and the frame's index.

    ``unit_amount(name, unit)`` gives the Amount of one unit of the column's species;
    ``bare(name, values)`` the Amount of unit-less values.
    """
    from .samples.columns import split_header
    from .units import Amount

    units = dict(units or {})
    unknown = sorted(set(units) - {str(c) for c in df.columns} - {split_header(str(c))[0] for c in df.columns})
    if unknown:
        raise InputError(f"units= names columns the frame does not have: {', '.join(unknown)}", field="units")
    out: dict[str, Any] = {}
    for col in df.columns:
        name, unit = split_header(str(col))
        unit = units.get(str(col), units.get(name, unit))
        try:
            values = df[col].to_numpy(dtype=float)
        except (TypeError, ValueError):
            raise InputError(f"column {col!r} holds values that are not numbers; give numbers and the unit in the "
                             "column name ('Ca^2+ [mg/L]') or in units=", value=str(col), field=str(col)) from None
        if name in out:
            raise InputError(f"column {name!r} appears twice", value=name, field=str(col))
        if unit is None:
            out[name] = bare(name, values)
        else:
            one = unit_amount(name, unit)
            out[name] = Amount(values * float(np.asarray(one.value)), one.basis)
    return out, df.index


def to_frame(columns: Mapping[str, Any], index: Any = None) -> Any:
    """A DataFrame of these columns on ``index`` (pandas imported here only)."""
    import pandas as pd

    return pd.DataFrame({k: np.asarray(v) if isinstance(v, np.ndarray) else v for k, v in columns.items()},
                        index=index)
