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
