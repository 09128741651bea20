"""Specific ion interaction theory (Brønsted–Guggenheim–Scatchard), NEA form.

log10 γ_j = −z_j² D + Σ_k ε(j, k) m_k,  D = A √I / (1 + 1.5 √I)

with ε(j, k) = 0 for ions of the same sign and tabulated (``sit.csv``) for opposite signs.
ε values are 25 °C values; away from 25 ± 5 °C a range warning is issued.
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from ..errors import MissingParameterError
from ..tables import sit_table

__all__ = ["epsilon_matrix", "SIT_BA", "SIT_MAX_IONIC_STRENGTH"]

SIT_BA = 1.5  # kg^½ mol^-½ at 25 °C (NEA convention)
SIT_MAX_IONIC_STRENGTH = 3.5


@lru_cache(maxsize=256)
def epsilon_matrix(names: tuple[str, ...], charges: tuple[int, ...], missing: str = "error"):
    """ε(j, k) matrix (n, n) for these ions and the list of opposite-sign pairs without a value."""
    table = sit_table()
    n = len(names)
    eps = np.zeros((n, n))
    lacking = []
    for i in range(n):
        for j in range(i + 1, n):
            if charges[i] * charges[j] >= 0:
                continue
            rec = table.get(frozenset((names[i], names[j])))
            if rec is None:
                lacking.append(f"{names[i]}–{names[j]}")
                continue
            eps[i, j] = eps[j, i] = rec[0]
    if lacking and missing != "zero":
        raise MissingParameterError(
            "SIT: no interaction coefficient ε for " + ", ".join(lacking)
            + "; use another model, or allow missing='zero' to take them as zero"
        )
    return eps, tuple(lacking)
