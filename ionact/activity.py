"""Activity coefficients of the ions in a :class:`~ionact.Solution`, by a named model.

``activity_coefficients(sol, model="davies")`` returns a mapping ion -> γ (arrays for a
batch) that also records the model, its single-ion convention, notes on any fallback,
and why ``model="auto"`` chose what it chose.
"""

from __future__ import annotations

import math
import warnings
from collections.abc import Iterator, Mapping
from dataclasses import dataclass

import numpy as np

from . import water
from .errors import InputError, MissingParameterError, ValidityRangeWarning, is_strict, warn_range
from .models import pitzer as pz
from .models.registry import MODELS, Batch, ModelInfo, Options, get_model, log10_gamma, missing_for
from .solution import Solution
from .species import Ion, Salt

__all__ = [
    "ActivityCoefficients",
    "MeanActivityCoefficient",
    "ModelComparison",
    "activity_coefficients",
    "mean_activity_coefficient",
    "compare_models",
    "osmotic_coefficient",
    "water_activity",
    "select_model",
]


def _options(sizes=None, davies_coefficient=0.3, bdot=0.041, setschenow=None, missing="error",
             unsymmetrical=True) -> Options:
    if missing not in ("error", "zero"):
        raise InputError(f"missing={missing!r}: allowed 'error', 'zero', or a fallback model name")
    if not (isinstance(davies_coefficient, int | float) and 0 <= davies_coefficient <= 1):
        raise InputError(f"davies_coefficient {davies_coefficient!r} is outside 0–1")
    sz = {Ion.parse(k).name: float(v) for k, v in (sizes or {}).items()}
    for k, v in sz.items():
        if not (0 < v < 20):
            raise InputError(f"size of {k} {v!r} Å is outside (0, 20) Å")
    if isinstance(setschenow, int | float):
        ks, kd = {}, float(setschenow)
    else:
        ks, kd = {Ion.parse(k).name: float(v) for k, v in (setschenow or {}).items()}, 0.1
    return Options(sizes=sz, davies_coefficient=float(davies_coefficient), bdot=float(bdot),
                   setschenow=ks, setschenow_default=kd, missing=missing, unsymmetrical=bool(unsymmetrical))


def _batch(sol: Solution) -> Batch:
    n = len(sol.ions)
    size = sol.size
    m = np.asarray(sol.molality_array).reshape(n, size)
    t = np.asarray(sol._t).reshape(size)
    ionic = np.asarray(sol._ionic_strength).reshape(size)
    return Batch(sol.ions, tuple(sol.ion(x) for x in sol.ions), sol.charges, m, t, ionic)


def select_model(ions: tuple[Ion, ...], max_ionic_strength: float, options: Options | None = None) -> tuple[str, str]:
    """The most accurate registered model whose parameters and range cover these ions.

    Returns
    -------
    (name, reason)
    """
    options = options or Options()
    ranked = sorted((m for m in MODELS.values() if m.in_auto), key=lambda m: -m.rank)
    covered = [m for m in ranked if not missing_for(m, ions, options)]
    for m in covered:
        if max_ionic_strength <= m.max_ionic_strength:
            lacking = [x.name for x in ranked if x.rank > m.rank and x not in covered]
            why = (f"{m.name}: parameters cover every ion and I = {max_ionic_strength:.3g} ≤ "
                   f"{m.max_ionic_strength:g} mol/kg")
            if lacking:
                why += f" (more accurate {', '.join(lacking)} lack parameters)"
            return m.name, why
    widest = max(covered, key=lambda m: m.max_ionic_strength)
    return widest.name, (
        f"{widest.name}: no model with parameters covers I = {max_ionic_strength:.3g} mol/kg; "
        f"the widest range available is {widest.max_ionic_strength:g} mol/kg"
    )


class ActivityCoefficients(Mapping):
    """Ion -> γ from one model, with the model's name, convention and notes.

    Attributes
    ----------
    model : str
        The model used (the one chosen when ``model="auto"`` was asked).
    title, convention : str
    reason : str
        Why this model was used (for "auto", the selection; else "requested").
    notes : tuple of str
        Fallbacks and assumptions (parameters taken as zero, Setschenow for neutrals…).
    ionic_strength : float or ndarray
        mol/kg.
    in_range : bool
        Whether every sample is inside the model's ionic-strength range.
    """

    def __init__(self, gammas, model: ModelInfo, reason, notes, ionic_strength, in_range):
        self._g = gammas
        self.model = model.name
        self.title = model.title
        self.convention = model.convention
        self.max_ionic_strength = model.max_ionic_strength
        self.reason = reason
        self.notes = tuple(notes)
        self.ionic_strength = ionic_strength
        self.in_range = in_range

    def __getitem__(self, key):
        if key in self._g:
            return self._g[key]
        return self._g[Ion.parse(key).name]

    def __iter__(self) -> Iterator[str]:
        return iter(self._g)

    def __len__(self) -> int:
        return len(self._g)

    @property
    def log10(self) -> dict:
        """Ion -> log10 γ."""
        return {k: np.log10(v) for k, v in self._g.items()}

    def __repr__(self) -> str:
        body = ", ".join(
            f"{k!r}: {v:.4f}" if np.ndim(v) == 0 else f"{k!r}: array{np.shape(v)}" for k, v in self._g.items()
        )
        return f"ActivityCoefficients(model={self.model!r}, {{{body}}})"

    def to_dict(self) -> dict:
        """JSON-ready dict."""
        def conv(v):
            return float(v) if np.ndim(v) == 0 else np.asarray(v).tolist()

        return {"model": self.model, "convention": self.convention, "reason": self.reason,
                "notes": list(self.notes), "ionic_strength": conv(self.ionic_strength),
                "in_range": self.in_range, "gamma": {k: conv(v) for k, v in self._g.items()}}


def activity_coefficients(
    solution: Solution,
    model: str = "auto",
    *,
    sizes: Mapping[str, float] | None = None,
    davies_coefficient: float = 0.3,
    bdot: float = 0.041,
    setschenow: float | Mapping[str, float] | None = None,
    missing: str = "error",
    unsymmetrical: bool = True,
) -> ActivityCoefficients:
    """Activity coefficients of every species in a solution (or batch) by a named model.

    Parameters
    ----------
    solution : Solution
    model : str
        "limiting", "extended", "guntelberg", "davies", "truesdell-jones", "b-dot",
        "bates-guggenheim", "sit", "pitzer", or "auto" (the most accurate model whose
        parameters and validity range cover the solution; the choice is in ``.reason``).
    sizes : mapping, optional
        Ion-size parameters å (Å) overriding Kielland's for the extended and B-dot forms.
    davies_coefficient : float
        The Davies linear coefficient (0.3; 0.2 in some texts).
    bdot : float
        Ḃ for the B-dot model (kg/mol).
    setschenow : float or mapping, optional
        Setschenow k (kg/mol) for neutral species: one value, or per species (default 0.1).
    missing : str
        What to do when the model lacks a parameter: "error" (MissingParameterError
        naming the ion or pair), "zero" (take it as zero; recorded in ``.notes``), or a
        fallback model name (used instead; recorded).
    unsymmetrical : bool
        Pitzer only: include the E-θ unsymmetrical mixing terms (default True).

    Returns
    -------
    ActivityCoefficients
        Mapping ion -> γ (float, or array of the batch shape).

    Raises
    ------
    MissingParameterError
        A parameter the model needs is not tabulated and ``missing="error"``.
    ValidityRangeError
        In strict mode, when the ionic strength is outside the model's range.

    Warns
    -----
    ValidityRangeWarning
        The ionic strength is outside the model's range, or the temperature outside the
        range of 25 °C parameters.

    Examples
    --------
    >>> import ionact as ia
    >>> sol = ia.Solution({"Na+": 0.1, "Cl-": 0.1})
    >>> g = ia.activity_coefficients(sol, model="davies")
    >>> round(g["Na+"], 4), g.model
    (0.7809, 'davies')
    >>> ia.activity_coefficients(sol).model
    'pitzer'
    """
    if not isinstance(solution, Solution):
        raise InputError(f"activity_coefficients needs a Solution, got {type(solution).__name__}")
    fallback = None
    if missing not in ("error", "zero"):
        fallback = get_model(missing)
        missing = "error"
    opts = _options(sizes, davies_coefficient, bdot, setschenow, missing, unsymmetrical)
    batch = _batch(solution)
    finite = batch.ionic[np.isfinite(batch.ionic)]
    imax = float(finite.max()) if finite.size else 0.0
    notes: list[str] = []
    if model == "auto":
        name, reason = select_model(batch.ions, imax, opts)
        info = MODELS[name]
    else:
        info = get_model(model)
        reason = "requested"
        if fallback is not None:
            lacking = missing_for(info, batch.ions, opts)
            if lacking:
                notes.append(f"{info.name} lacks parameters ({'; '.join(lacking)}); fell back to {fallback.name}")
                reason = f"requested {info.name}; fell back to {fallback.name}"
                info = fallback
    in_range = imax <= info.max_ionic_strength
    if not in_range:
        warn_range(
            f"model {info.name}: ionic strength {imax:.4g} mol/kg is above its range "
            f"0–{info.max_ionic_strength:g} mol/kg" + (f" (auto: {reason})" if model == "auto" else ""),
            stacklevel=3,
        )
    lg, knotes = log10_gamma(info, batch, opts)
    notes.extend(knotes)
    shape = solution.shape
    gam = {}
    for k, n in enumerate(batch.names):
        g = np.power(10.0, lg[k]).reshape(shape)
        gam[n] = float(g) if g.ndim == 0 else g
    return ActivityCoefficients(gam, info, reason, notes, solution.ionic_strength, in_range)


@dataclass(frozen=True)
class MeanActivityCoefficient:
    """γ± of a salt from single-ion values, with the convention that applies.

    ``float(result)`` gives the value for a single solution; ``np.asarray(result)`` for a batch.
    """

    value: float | np.ndarray
    salt: str
    model: str
    convention: str
    notes: tuple[str, ...] = ()

    def __float__(self) -> float:
        return float(self.value)

    def __array__(self, dtype=None, copy=None):
        return np.asarray(self.value, dtype=dtype)


def mean_activity_coefficient(solution: Solution, salt: str, model: str = "auto", **options) -> MeanActivityCoefficient:
    """Mean activity coefficient γ± = (γ+^ν+ γ−^ν−)^(1/ν) of a salt in a solution.

    Ions of the salt that are absent from the solution are added at zero molality
    (trace γ). For Pitzer the mean value is convention-free; for the Debye–Hückel family it
    follows from the model's charge-symmetric single-ion form.

    Examples
    --------
    >>> import ionact as ia
    >>> sol = ia.Solution.from_salts({"NaCl": 1.0})
    >>> round(float(ia.mean_activity_coefficient(sol, "NaCl", model="pitzer")), 3)
    0.655
    """
    s = Salt.parse(salt)
    sol = solution
    for ion, _ in s.ions:
        if ion not in sol.ions:
            sol = sol.added(ion, 0.0)
    g = activity_coefficients(sol, model=model, **options)
    nu = sum(n for _, n in s.ions)
    ln = sum(n * np.log(np.asarray(g[i])) for i, n in s.ions) / nu
    v = np.exp(ln)
    conv = ("mean value: convention-free" if g.model == "pitzer"
            else f"mean value from single-ion values; {g.convention}")
    return MeanActivityCoefficient(float(v) if np.ndim(v) == 0 else v, s.text, g.model, conv, g.notes)


def _pitzer_for(solution: Solution, missing="error"):
    if not isinstance(solution, Solution):
        raise InputError(f"needs a Solution, got {type(solution).__name__}")
    b = _batch(solution)
    ci = np.flatnonzero(b.z > 0)
    ai = np.flatnonzero(b.z < 0)
    ni = np.flatnonzero(b.z == 0)
    p = pz.pitzer_set(tuple(b.names[i] for i in ci), tuple(b.names[i] for i in ai),
                      tuple(int(b.z[i]) for i in ci), tuple(int(b.z[i]) for i in ai), missing)
    finite = b.ionic[np.isfinite(b.ionic)]
    if finite.size and finite.max() > 6.0:
        warn_range(f"model pitzer: ionic strength {finite.max():.4g} mol/kg is above its range 0–6 mol/kg",
                   stacklevel=4)
    aphi = water._dh_a(b.t) * math.log(10) / 3
    phi = pz.osmotic(p, b.m[ci], b.m[ai], b.m[ni].sum(axis=0), b.t, aphi)
    total = b.m.sum(axis=0)
    return phi.reshape(solution.shape), total.reshape(solution.shape)


def osmotic_coefficient(solution: Solution, model: str = "pitzer", missing: str = "error"):
    """Osmotic coefficient φ of a solution (Pitzer model).

    Examples
    --------
    >>> import ionact as ia
    >>> round(ia.osmotic_coefficient(ia.Solution.from_salts({"NaCl": 1.0})), 3)
    0.936
    """
    if get_model(model).name != "pitzer":
        raise InputError(f"osmotic coefficient is available for model 'pitzer', not {model!r}")
    phi, _ = _pitzer_for(solution, missing)
    return float(phi) if np.ndim(phi) == 0 else phi


def water_activity(solution: Solution, model: str = "pitzer", missing: str = "error"):
    """Activity of water, ln a_w = −φ M_w Σ m_i (Pitzer model).

    Examples
    --------
    >>> import ionact as ia
    >>> round(ia.water_activity(ia.Solution.from_salts({"NaCl": 1.0})), 4)
    0.9669
    """
    if get_model(model).name != "pitzer":
        raise InputError(f"water activity is available for model 'pitzer', not {model!r}")
    phi, total = _pitzer_for(solution, missing)
    aw = np.exp(-phi * total * water.WATER_MOLAR_MASS / 1000.0)
    return float(aw) if np.ndim(aw) == 0 else aw


@dataclass(frozen=True)
class ModelComparison:
    """Every applicable model's γ side by side, and how far they spread.

    Attributes
    ----------
    gammas : dict
        model -> {ion: γ}.
    in_range : dict
        model -> whether the solution is inside the model's ionic-strength range.
    skipped : dict
        model -> why it could not be applied (missing parameters).
    spread : dict
        ion -> max/min − 1 of γ over the in-range models (relative).
    spread_mv : dict
        ion -> the same spread as a potential, (S/z)·log10(max/min), mV at the solution's temperature.
    """

    gammas: dict
    in_range: dict
    skipped: dict
    spread: dict
    spread_mv: dict
    ionic_strength: float

    def table(self) -> str:
        """A plain-text table: one row per model, one column per ion."""
        ions = list(self.spread)
        head = f"{'model':<18}" + "".join(f"{i:>10}" for i in ions) + "  range"
        lines = [head, "-" * len(head)]
        for m, g in self.gammas.items():
            lines.append(f"{m:<18}" + "".join(f"{float(np.mean(g[i])):>10.4f}" for i in ions)
                         + ("  ok" if self.in_range[m] else "  OUTSIDE"))
        lines.append(f"{'spread %':<18}" + "".join(f"{100 * float(np.max(self.spread[i])):>10.2f}" for i in ions))
        lines.append(f"{'spread mV':<18}" + "".join(f"{float(np.max(self.spread_mv[i])):>10.3f}" for i in ions))
        for m, why in self.skipped.items():
            lines.append(f"{m}: skipped ({why})")
        return "\n".join(lines)


def compare_models(solution: Solution, models=None, **options) -> ModelComparison:
    """Apply every model (or those named) to a solution and report their spread.

    Models that lack parameters are listed in ``skipped`` with the reason; models used
    outside their range are computed without a warning but flagged in ``in_range`` and
    excluded from the spread.

    Examples
    --------
    >>> import ionact as ia
    >>> c = ia.compare_models(ia.Solution.from_salts({"NaCl": 0.05}))
    >>> sorted(c.skipped) == [] and 0 < c.spread["Na+"] < 0.05
    True
    """
    names = list(models) if models is not None else list(MODELS)
    gammas, in_range, skipped = {}, {}, {}
    for name in names:
        info = get_model(name)
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore", ValidityRangeWarning)
                if is_strict():
                    from .errors import strict

                    with strict(False):
                        g = activity_coefficients(solution, info.name, **options)
                else:
                    g = activity_coefficients(solution, info.name, **options)
        except MissingParameterError as exc:
            skipped[info.name] = str(exc)
            continue
        gammas[info.name] = dict(g)
        in_range[info.name] = g.in_range
    ok = [m for m in gammas if in_range[m]] or list(gammas)
    spread, spread_mv = {}, {}
    for ion in solution.ions:
        z = solution.ion(ion).charge
        vals = np.array([np.asarray(gammas[m][ion]) for m in ok])
        hi, lo = vals.max(axis=0), vals.min(axis=0)
        r = hi / lo
        spread[ion] = float(r - 1) if np.ndim(r) == 0 else r - 1
        if z != 0:
            mv = np.abs(water.nernst_slope(z, solution.temperature)) * np.log10(r)
            spread_mv[ion] = float(mv) if np.ndim(mv) == 0 else mv
        else:
            spread_mv[ion] = 0.0
    return ModelComparison(gammas, in_range, skipped, spread, spread_mv, solution.ionic_strength)
