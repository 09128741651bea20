"""Read-only views for the mappings and arrays inside frozen result records."""

from __future__ import annotations

from collections.abc import Mapping
from types import MappingProxyType
from typing import Any, TypeVar

import numpy as np

__all__ = ["frozen_map", "readonly", "plain"]

K = TypeVar("K")
V = TypeVar("V")


def frozen_map(d: Mapping[K, V] | None) -> Mapping[K, V]:
    """A read-only copy of a mapping (changes to the original do not show through)."""
    return MappingProxyType(dict(d or {}))


def readonly(a: Any) -> np.ndarray:
    """A read-only float copy of an array."""
    out = np.array(a, dtype=float, copy=True)
    out.setflags(write=False)
    return out


def plain(x: Any) -> Any:
    """Plain Python values (dict, list, float, str, None) for JSON, from records, arrays and mappings.

    Non-finite floats become None (strict JSON has no NaN or Infinity).
    """
    if hasattr(x, "to_dict") and callable(x.to_dict):
        return plain(x.to_dict())
    if isinstance(x, Mapping):
        return {str(k): plain(v) for k, v in x.items()}
    if isinstance(x, list | tuple):
        return [plain(v) for v in x]
    if isinstance(x, np.ndarray):
        return plain(x.tolist())
    if isinstance(x, np.generic):
        return plain(x.item())
    if isinstance(x, float) and not np.isfinite(x):
        return None
    return x


def _coerce(hint: Any, v: Any) -> Any:
    """A JSON value turned back into the field type it came from (arrays, tuples, records)."""
    import types
    import typing

    if v is None:
        if hint is float or (isinstance(hint, types.UnionType) and float in hint.__args__ and type(None)
                             not in hint.__args__):
            return float("nan")
        return None
    origin = typing.get_origin(hint)
    args = typing.get_args(hint)
    if isinstance(hint, types.UnionType) or origin is typing.Union:
        if isinstance(v, list) and any(a is np.ndarray for a in args):
            return np.array([np.nan if x is None else x for x in _flat_none(v)], dtype=float).reshape(np.shape(v))
        for a in args:
            if a is type(None):
                continue
            if hasattr(a, "from_dict") and isinstance(v, Mapping):
                return a.from_dict(v)
        if isinstance(v, int | float) and float in args:
            return float(v)
        if isinstance(v, list) and any(typing.get_origin(a) is tuple for a in args):
            return tuple(v)
        return v
    if hint is np.ndarray:
        return np.array([np.nan if x is None else x for x in _flat_none(v)], dtype=float).reshape(np.shape(v))
    if origin is tuple:
        inner = args[0] if args else Any
        return tuple(_coerce(inner, x) for x in v)
    if hasattr(hint, "from_dict") and isinstance(v, Mapping):
        return hint.from_dict(v)
    if hint is float and isinstance(v, int | float):
        return float(v)
    return v


def _flat_none(v: Any) -> list[Any]:
    if isinstance(v, list):
        out: list[Any] = []
        for x in v:
            out += _flat_none(x)
        return out
    return [v]


class Record:
    """``to_dict``/``from_dict`` for frozen dataclass results: plain JSON-ready values out,
    the field types (arrays, tuples, nested records) back in; a short ``repr`` (arrays by
    shape and range) and an HTML table for notebooks, whatever the batch size. Subclasses
    are declared ``@dataclass(frozen=True, repr=False)`` so that these displays apply."""

    def __repr__(self) -> str:
        from ._display import record_repr

        return record_repr(self)

    def _repr_html_(self) -> str:
        from ._display import record_html

        return record_html(self)

    def to_dict(self) -> dict[str, Any]:
        import dataclasses

        out = {f.name: getattr(self, f.name) for f in dataclasses.fields(self)}  # type: ignore[arg-type]
        return dict(plain(out))

    @classmethod
    def from_dict(cls, d: Mapping[str, Any]) -> Any:
        import dataclasses
        import typing

        from .errors import InputError

        if not isinstance(d, Mapping):
            raise InputError(f"{cls.__name__} must be read from a mapping, got {type(d).__name__}")
        hints = typing.get_type_hints(cls)
        kwargs = {}
        for f in dataclasses.fields(cls):  # type: ignore[arg-type]
            if f.name not in d:
                if f.default is dataclasses.MISSING and f.default_factory is dataclasses.MISSING:
                    raise InputError(f"{cls.__name__} lacks the field {f.name!r}")
                continue
            kwargs[f.name] = _coerce(hints.get(f.name, Any), d[f.name])
        return cls(**kwargs)
