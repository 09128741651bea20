"""Liquid-junction potential between two solutions by the Henderson equation.

E_j = φ(b) − φ(a) = (RT/F) · [Σ (λ_i/z_i)(c_i^b − c_i^a)] / [Σ λ_i (c_i^b − c_i^a)]
      · ln(Σ λ_i c_i^a / Σ λ_i c_i^b)

with λ_i the limiting molar conductivity of ion i (proportional to |z_i| u_i, its mobility
times its charge), and linear concentration profiles across the junction (Henderson's
assumption). Concentrations are molar; conductivities are the 25 °C limiting values of
``data/conductivities.csv`` at any temperature (their ratios change little; only RT/F is
taken at the temperature). When the two solutions have the same conductance-weighted
composition the limit of the expression is used.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from ..errors import InputError, MissingParameterError
from ..species import resolve_ion
from ..tables import conductivity_table
from ..water import FARADAY, GAS_CONSTANT, ZERO_CELSIUS

__all__ = ["junction_potential"]


def junction_potential(solution_a: Any, solution_b: Any, temperature: Any = None) -> float:
    """Henderson liquid-junction potential φ(b) − φ(a), mV.

    Parameters
    ----------
    solution_a, solution_b : Solution
        The two sides (single solutions); their molar concentrations are used.
    temperature : float, optional
        °C (default: solution a's).

    Returns
    -------
    float
        The junction potential, mV.

    Raises
    ------
    InputError
        A batch instead of a single solution, or an ion without a tabulated limiting
        conductivity.

    References
    ----------
    P. Henderson, Z. Phys. Chem. 59 (1907) 118; limiting conductivities from Robinson and
    Stokes, *Electrolyte Solutions* (1959), appendix 6.2 (from memory).

    Examples
    --------
    >>> import ionact as ia
    >>> hcl = ia.Solution({"H+": 0.1, "Cl-": 0.1}, basis="molar", density="water")
    >>> kcl = ia.Solution({"K+": 0.1, "Cl-": 0.1}, basis="molar", density="water")
    >>> round(ia.junction_potential(hcl, kcl), 1)
    26.9
    """
    from ..solution import Solution

    for name, s in (("solution_a", solution_a), ("solution_b", solution_b)):
        if not isinstance(s, Solution):
            raise InputError(f"{name} must be a Solution, got {type(s).__name__}", field=name)
        if s.shape:
            raise InputError(f"{name} must be one solution, not a batch", field=name)
    t = float(solution_a.temperature if temperature is None else temperature)
    table = conductivity_table()
    names = sorted(set(solution_a.ions) | set(solution_b.ions))
    lam, z, ca, cb = [], [], [], []
    for n in names:
        if n not in table:
            raise MissingParameterError(f"no limiting conductivity for {n}: the junction potential needs every "
                                        "ion's (data/conductivities.csv)", value=n, field="ions")
        lam.append(table[n][0])
        z.append(resolve_ion(n).charge)
        ca.append(_molar(solution_a, n))
        cb.append(_molar(solution_b, n))
    lam_a, z_a, c_a, c_b = np.array(lam), np.array(z, dtype=float), np.array(ca), np.array(cb)
    d = c_b - c_a
    num = float(np.sum(lam_a / z_a * d))
    den = float(np.sum(lam_a * d))
    ga, gb = float(np.sum(lam_a * c_a)), float(np.sum(lam_a * c_b))
    rt_f = GAS_CONSTANT * (t + ZERO_CELSIUS) / FARADAY * 1e3
    if ga <= 0 or gb <= 0:
        raise InputError("both solutions must hold ions for a junction potential")
    if abs(gb - ga) <= 1e-12 * max(ga, gb):  # equal conductance: the limit of ln(ga/gb)/den is −1/ga
        return -rt_f * num / ga if den != 0 else 0.0
    return rt_f * num / den * math.log(ga / gb)


def _molar(sol: Any, name: str) -> float:
    if name not in sol.ions:
        return 0.0
    return float(sol.molality(name)) * float(sol.water_per_litre)
