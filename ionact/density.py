"""The one solution-density model: molar (mol/L) ↔ molal (mol/kg) for any composition.

Every job converts between the laboratory's mol/L and the models' mol/kg through this
module, with one policy.

Model
-----
The solution's density is built from ion-additive apparent molar volumes,

    ρ = ρ_w + Σ_j c_j (M_j − ρ_w V_j) / 1000            (g/cm³, c in mol/L, M in g/mol)
    V_j = V°_j + S_j √I_c                                 (cm³/mol, I_c the molar ionic strength)

V°_j is the infinite-dilution value (Millero 1972, convention V°(H+) = 0) and S_j the
ion's share of Masson's √c law, fitted to single-salt densities (``tools/
fit_apparent_volumes.py``; within 0.15 % of the recalled CRC table from 1 % to
saturation). An ion without a fitted S_j takes the Debye–Hückel limiting value
(A_v/2)·z_j², A_v = 1.868 cm³ L^½ mol^-3/2 at 25 °C (Redlich & Rosenfeld 1931, from
memory), which the fitted values approach. The kilograms of water per litre are then
w = ρ − Σ c_j M_j/1000 = ρ_w (1 − Σ c_j V_j/1000).

Policy
------
An ion present in a non-zero amount without a tabulated V°_j is an error
(:class:`~ionact.errors.MissingParameterError` naming it); the caller then chooses
``density="water"`` (w = ρ_w, a dilute-solution approximation) or gives the solution's own
density in kg/L. Nothing falls back silently. The volumes are 25 °C (V°) and 20 °C (S)
values used at every temperature; water's own density follows the temperature.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from . import water
from .errors import InputError, MissingParameterError
from .species import Ion

__all__ = ["DensitySpec", "LIMITING_VOLUME_SLOPE", "check_density", "water_per_litre", "solution_density"]

LIMITING_VOLUME_SLOPE = 1.868  # A_v, cm³ L^½ mol^-3/2 at 25 °C (Redlich & Rosenfeld 1931, from memory)
_MIN_DENSITY, _MAX_DENSITY = 0.5, 3.0  # kg/L: the range of a given solution density

DensitySpec = None | str | float | np.ndarray


def check_density(density: object) -> DensitySpec:
    """Validate a density choice: None (the model), "water", or a solution density in kg/L.

    Raises
    ------
    InputError
        Anything else, or a number outside 0.5–3 kg/L.
    """
    if density is None:
        return None
    if isinstance(density, str):
        if density == "water":
            return "water"
        raise InputError(f"density {density!r} must be None (the model), 'water', or a number in kg/L")
    if isinstance(density, bool):
        raise InputError(f"density {density!r} must be None, 'water', or a number in kg/L")
    try:
        arr = np.asarray(density, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"density {density!r} must be None, 'water', or a number in kg/L") from None
    if not np.all(np.isfinite(arr)) or np.any(arr < _MIN_DENSITY) or np.any(arr > _MAX_DENSITY):
        raise InputError(f"density {density!r} kg/L is outside {_MIN_DENSITY:g}–{_MAX_DENSITY:g} kg/L")
    return float(arr) if arr.ndim == 0 else arr


def _volumes(ions: Sequence[Ion], amounts: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """V° and S per ion; MissingParameterError for a present ion without V°."""
    v0, s = [], []
    for i, ion in enumerate(ions):
        if ion.volume is None:
            if np.any(amounts[i] > 0):
                raise MissingParameterError(
                    f"no apparent molar volume for {ion.name}: the density model cannot convert between "
                    "mol/L and mol/kg; pass density=<kg/L> or density='water'"
                )
            v0.append(0.0)
            s.append(0.0)
            continue
        v0.append(ion.volume)
        s.append(ion.masson if ion.masson is not None else 0.5 * LIMITING_VOLUME_SLOPE * ion.charge**2)
    return np.array(v0), np.array(s)


def water_per_litre(
    ions: Sequence[Ion],
    temperature: float | np.ndarray,
    *,
    molal: np.ndarray | None = None,
    molar: np.ndarray | None = None,
    density: DensitySpec = None,
) -> np.ndarray:
    """Kilograms of water per litre of solution for a composition given in mol/kg, mol/L or both.

    Parameters
    ----------
    ions : sequence of Ion
        The species, in the order of the first axis of the amounts.
    temperature : float or ndarray
        °C, broadcast against the batch shape.
    molal, molar : ndarray, optional
        Amounts of shape (n_ions, *batch): mol/kg of water and mol/L of solution. The total
        composition is ``molal + molar / w``.
    density : None, "water" or float/ndarray
        None uses the apparent-molar-volume model, "water" takes w = ρ_w, a number is the
        solution's own density in kg/L.

    Returns
    -------
    ndarray
        kg/L, of the batch shape.

    Raises
    ------
    MissingParameterError
        An ion present without an apparent molar volume (model only).
    InputError
        The molar amounts exceed what a litre can hold (w ≤ 0).

    Notes
    -----
    With only molar amounts w is explicit. Otherwise w solves
    w = ρ_w (1 − Σ (m_j w + c_j) V_j / 1000) with V_j = V°_j + S_j √I_c, by Newton's method
    on w (analytic derivative; a few iterations to 1e-14).
    """
    n = len(ions)
    shape = np.broadcast_shapes(*(np.shape(a)[1:] for a in (molal, molar) if a is not None), np.shape(temperature))
    m = None if molal is None else np.broadcast_to(np.asarray(molal, dtype=float), (n, *shape))
    c = None if molar is None else np.broadcast_to(np.asarray(molar, dtype=float), (n, *shape))
    rho_w = np.broadcast_to(water.density(temperature) / 1000.0, shape)
    spec = check_density(density)
    masses = np.array([ion.molar_mass for ion in ions])
    if isinstance(spec, str):
        w = np.array(rho_w, dtype=float)
    elif spec is not None:
        # rho = w (1 + Σ m M/1000) + Σ c M/1000
        solute_molar = 0.0 if c is None else np.tensordot(masses, c, axes=(0, 0)) / 1000.0
        solute_molal = 0.0 if m is None else np.tensordot(masses, m, axes=(0, 0)) / 1000.0
        w = np.array(np.broadcast_to((spec - solute_molar) / (1.0 + solute_molal), shape))
    elif m is None and c is not None:
        w = _model_water_molar(ions, c, rho_w)
    else:
        w = _model_water(ions, np.zeros((n, *shape)) if m is None else m,
                         np.zeros((n, *shape)) if c is None else c, rho_w)
    w = np.asarray(w, dtype=float)
    if np.any(w <= 0):
        raise InputError("the molar amounts exceed what a litre of solution can hold (water per litre ≤ 0)")
    return w


def _model_water_molar(ions: Sequence[Ion], c: np.ndarray, rho_w: np.ndarray) -> np.ndarray:
    """The model's water per litre for molar amounts alone, where it is explicit:
    w = ρ_w (1 − Σ c_j (V°_j + S_j √I_c) / 1000), I_c the molar ionic strength."""
    v0, s = _volumes(ions, c)
    z2 = np.array([ion.charge**2 for ion in ions], dtype=float)
    vc0 = np.tensordot(v0, c, axes=(0, 0)) / 1000.0
    sc = np.tensordot(s, c, axes=(0, 0)) / 1000.0
    sq = np.sqrt(np.maximum(0.5 * np.tensordot(z2, c, axes=(0, 0)), 0.0))
    return np.asarray(rho_w * (1.0 - vc0 - sq * sc))


def _model_water(ions: Sequence[Ion], m: np.ndarray, c: np.ndarray, rho_w: np.ndarray) -> np.ndarray:
    v0, s = _volumes(ions, m + c)
    z2 = np.array([ion.charge**2 for ion in ions], dtype=float)
    vm0 = np.tensordot(v0, m, axes=(0, 0)) / 1000.0  # Σ m V° / 1000
    vc0 = np.tensordot(v0, c, axes=(0, 0)) / 1000.0
    sm = np.tensordot(s, m, axes=(0, 0)) / 1000.0
    sc = np.tensordot(s, c, axes=(0, 0)) / 1000.0
    im = 0.5 * np.tensordot(z2, m, axes=(0, 0))  # molal ionic strength of the molal part
    ic = 0.5 * np.tensordot(z2, c, axes=(0, 0))
    w = rho_w * (1.0 - vc0) / (1.0 + rho_w * vm0)  # the closed form without the √I term
    w = np.where(w > 0, w, rho_w)
    for _ in range(50):
        i_c = np.maximum(im * w + ic, 0.0)
        sq = np.sqrt(i_c)
        f = w - rho_w * (1.0 - (vm0 * w + vc0) - sq * (sm * w + sc))
        with np.errstate(divide="ignore", invalid="ignore"):
            dsq = np.where(sq > 0, 0.5 * im / sq, 0.0)
        df = 1.0 + rho_w * (vm0 + dsq * (sm * w + sc) + sq * sm)
        step = f / df
        w = w - step
        if np.all(np.abs(step) <= 1e-14 * np.abs(w)):
            break
    return w


def solution_density(
    ions: Sequence[Ion], temperature: float | np.ndarray, molal: np.ndarray, water_kg_per_l: np.ndarray
) -> np.ndarray:
    """Density in kg/L from the molalities and the water per litre: ρ = w (1 + Σ m_j M_j / 1000)."""
    masses = np.array([ion.molar_mass for ion in ions])
    return np.asarray(water_kg_per_l * (1.0 + np.tensordot(masses, molal, axes=(0, 0)) / 1000.0))
