"""Activity coefficients of the ions in a :class:`~ionact.Solution`, by a named model.

``activity_coefficients(sol, model="davies")`` returns a mapping ion -> γ (arrays for a
batch) that also records the model, its single-ion convention, notes on any fallback,
and why ``model="auto"`` chose what it chose.
"""

from __future__ import annotations

import warnings
from collections.abc import Iterator, Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from . import water
from ._frozen import Record
from .constants import LN10
from .electrode import nernst_slope
from .errors import InputError, MissingParameterError, ValidityRangeWarning, strict, warn_range
from .models import pitzer as pz
from .models.registry import MODELS, Batch, ModelInfo, get_model
from .models.resolver import ModelChoice, choice_for, resolve_model
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
    "batch_of",
]


def batch_of(sol: Solution) -> Batch:
    """The plain arrays of a solution (n ions × N samples) for the model kernels."""
    n = len(sol.ions)
    size = sol.size
    m = np.asarray(sol.molality_array).reshape(n, size)
    t = np.asarray(sol.temperature, dtype=float).reshape(size)
    ions = tuple(sol.ion(x) for x in sol.ions)
    z = np.array([i.charge for i in ions], dtype=float)
    ionic = np.asarray(sol.ionic_strength, dtype=float).reshape(size)  # the solution's own, computed once
    return Batch(tuple(i.name for i in ions), ions, z, m, t, ionic)


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

    def __init__(self, gammas, choice: ModelChoice, notes, ionic_strength, violations):
        info: ModelInfo = choice.info
        self._g = gammas
        self.choice = choice
        self.model = info.name
        self.title = info.title
        self.convention = info.convention
        self.max_ionic_strength = info.max_ionic_strength
        self.reason = choice.reason
        self.notes = tuple(notes)
        self.ionic_strength = ionic_strength
        self.violations = tuple(str(v) for v in violations)
        self.in_range = not any(getattr(v, "kind", "ionic-strength") == "ionic-strength" for v in violations)
        self.free: dict[str, Any] = dict(gammas)  # free-ion γ (the same as the values without equilibrium)
        self.speciation: Any = None
        self.index: Any = None  # the DataFrame index of the solution, when it came from one

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

    def _repr_html_(self) -> str:
        from ._display import html_table

        return html_table(("ion", "γ"), [(k, v) for k, v in self._g.items()], repr(self))

    def to_pandas(self) -> Any:
        """γ of every ion as a DataFrame (one row per solution, on the solution's DataFrame
        index when it was built from one), with the ionic strength."""
        from ._pandas import to_frame

        cols: dict[str, Any] = {k: np.atleast_1d(np.asarray(v, dtype=float)).reshape(-1) for k, v in self._g.items()}
        cols["ionic_strength"] = np.atleast_1d(np.asarray(self.ionic_strength, dtype=float)).reshape(-1)
        return to_frame(cols, getattr(self, "index", None))

    def to_dict(self) -> dict:
        """JSON-ready dict."""
        def conv(v):
            return float(v) if np.ndim(v) == 0 else np.asarray(v).tolist()

        return {"model": self.model, "convention": self.convention, "reason": self.reason,
                "choice": self.choice.to_dict(), "notes": list(self.notes),
                "ionic_strength": conv(self.ionic_strength), "in_range": self.in_range,
                "violations": list(self.violations), "gamma": {k: conv(v) for k, v in self._g.items()}}

    @classmethod
    def from_dict(cls, d: Mapping[str, Any]) -> ActivityCoefficients:
        """Read back :meth:`to_dict` output."""
        if not isinstance(d, Mapping) or "gamma" not in d or "choice" not in d:
            raise InputError("activity coefficients must be read from the mapping to_dict() gives")

        def arr(v: Any) -> float | np.ndarray:
            return float(v) if not isinstance(v, list) else np.asarray(v, dtype=float)

        obj = cls({k: arr(v) for k, v in d["gamma"].items()}, ModelChoice.from_dict(d["choice"]), d.get("notes", ()),
                  arr(d["ionic_strength"]), ())
        obj.violations = tuple(d.get("violations", ()))
        obj.in_range = bool(d.get("in_range", True))
        return obj


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
    equilibrium: bool | None = None,
    pH: Any = None,
    species: Any = None,
) -> ActivityCoefficients:
    """Activity coefficients of every species in a solution (or batch) by a named model.

    Where the solution's species react (ion pairs, complexes, acid–base: see
    :func:`ionact.speciate`), the values are *stoichiometric*: γ = a(free) / m(total) for
    each ion given, so that γ·m is the activity of the free ion an electrode reads and the
    mean values compare with tabulated γ±; ``.free`` holds the free ions' own γ and
    ``.speciation`` the equilibrium.

    Parameters
    ----------
    solution : Solution
        The solution or batch (molal amounts, temperature, density model).
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
    equilibrium : bool, optional
        Speciate first: True, False, or None (default) for "where the table has reactions
        for these species".
    pH : float or array_like, optional
        Held during speciation (default: solved from the proton balance).
    species : iterable of Complex, optional
        Extra or overriding species for the equilibrium.

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
    UnknownSpeciesError
        An unknown model name.

    Warns
    -----
    ValidityRangeWarning
        The ionic strength is outside the model's range, or the temperature outside the
        range of 25 °C parameters.

    References
    ----------
    The models and their sources: :mod:`ionact.models` (Debye and Hückel 1923; Davies 1962;
    Truesdell and Jones 1974; Helgeson 1969); SIT: I. Grenthe, A. V. Plyasunov and
    K. Spahiu, in *Modelling in Aquatic Chemistry*, OECD NEA (1997), ch. IX; Pitzer:
    K. S. Pitzer, *Activity Coefficients in Electrolyte Solutions*, 2nd ed., CRC (1991),
    and Harvie, Møller and Weare, Geochim. Cosmochim. Acta 48 (1984) 723.

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
    name, opts, fallback = choice_for(model, missing=missing, sizes=sizes, davies_coefficient=davies_coefficient,
                                      bdot=bdot, setschenow=setschenow, unsymmetrical=unsymmetrical)
    batch = batch_of(solution)
    from .equilibrium import held_ph, speciation_of, species_step

    step = species_step(batch.ions, batch.m, batch.t, name, opts, fallback, equilibrium=equilibrium,
                        ph=held_ph(pH, solution.shape), species=species, batch=batch, by_charge=True)
    choice = step.choice
    for problem in step.violations:
        warn_range(str(problem) + (f" (auto: {choice.reason})" if choice.requested == "auto" else ""))
    notes = list(choice.lacking and [choice.reason] or []) + list(step.notes)
    shape = solution.shape
    gam = _gammas(batch.names, step.log10_gamma, shape, step.rows, batch.z)
    out = ActivityCoefficients(gam, choice, notes, solution.ionic_strength, step.violations)
    out.index = solution.index
    out.speciation = speciation_of(step, shape, batch.t)
    if out.speciation is not None:
        sp = out.speciation
        out.free = {n: _plain(sp.gamma[sp.species.index(n)]) for n in batch.names}
        out.notes = out.notes + ("stoichiometric γ = a(free)/m(total): ions pair or complex here (see "
                                 ".speciation)",)
    return out


def _gammas(names: Sequence[str], lg: np.ndarray, shape: tuple[int, ...], rows: np.ndarray | None,
            z: np.ndarray) -> dict[str, float | np.ndarray]:
    """γ = 10^lg of every ion in the solution's shape, each a row of one block (one allocation
    for the batch). ``rows`` (models of z² and I alone): ``lg`` has one row per z², ion k's is
    ``rows[k]``; the exponential is taken once per z² and copied to the other ions of that z².
    There log10 γ(z² = 4) is exactly 4·log10 γ(z² = 1) (a product by a power of two), so where
    both occur γ(z² = 4) is γ(z² = 1)⁴, two squarings instead of a second exponential (equal to
    it within a few units in the last place)."""
    lg = np.asarray(lg, dtype=float)
    lg = lg.reshape(lg.shape[0], -1)
    order = list(range(len(names))) if rows is None else rows.tolist()
    z2 = (np.asarray(z, dtype=float) ** 2).tolist()
    block = np.empty((len(names), lg.shape[1]))
    first: dict[int, int] = {}
    one = next((k for k in range(len(names)) if rows is not None and z2[k] == 1.0), None)
    if one is not None:  # the singly charged row first: the doubly charged ones follow from it
        _exp10(lg[order[one]], block[one])
        first[order[one]] = one
    for k, r in enumerate(order):
        if r in first:
            if first[r] != k:
                block[k] = block[first[r]]
            continue
        if one is not None and z2[k] == 4.0:
            np.square(block[one], out=block[k])
            np.square(block[k], out=block[k])
        else:
            _exp10(lg[r], block[k])
        first[r] = k
    return {n: float(block[k, 0]) if not shape else block[k].reshape(shape) for k, n in enumerate(names)}


def _exp10(lg: np.ndarray, out: np.ndarray) -> None:
    np.multiply(lg, LN10, out=out)
    np.exp(out, out=out)


def _plain(a: Any) -> float | np.ndarray:
    arr = np.asarray(a)
    return float(arr) if arr.ndim == 0 else arr


@dataclass(frozen=True, repr=False)
class MeanActivityCoefficient(Record):
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

    Parameters
    ----------
    solution : Solution
        The solution (or batch), molal amounts.
    salt : str
        The salt's formula, e.g. "NaCl", "MgSO4".
    model : str
        Activity model name or "auto".
    **options
        Passed to :func:`activity_coefficients` (``missing``, ``sizes``, ``equilibrium`` …).

    Returns
    -------
    MeanActivityCoefficient
        γ± (dimensionless; a float-like record, or an array for a batch) with the model used.

    Raises
    ------
    UnknownSpeciesError
        A salt that is not a formula of known ions.
    MissingParameterError
        The model lacks a parameter and ``missing="error"``.

    References
    ----------
    R. A. Robinson and R. H. Stokes, *Electrolyte Solutions*, 2nd ed. (1959), ch. 2
    (definition of γ±).

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


def _pitzer_for(solution: Solution, missing: str = "error"):
    if not isinstance(solution, Solution):
        raise InputError(f"needs a Solution, got {type(solution).__name__}")
    name, opts, fallback = choice_for("pitzer", missing=missing)
    if fallback is not None:
        raise InputError(f"missing={missing!r}: the osmotic coefficient and water activity come from the Pitzer "
                         "model only; allowed 'error' or 'zero'")
    b = batch_of(solution)
    choice = resolve_model(b, name, options=opts)
    for problem in choice.info.violations(b, opts):
        warn_range(str(problem))
    ci = np.flatnonzero(b.z > 0)
    ai = np.flatnonzero(b.z < 0)
    ni = np.flatnonzero(b.z == 0)
    p = pz.pitzer_set(tuple(b.names[i] for i in ci), tuple(b.names[i] for i in ai),
                      tuple(int(b.z[i]) for i in ci), tuple(int(b.z[i]) for i in ai), opts.missing)
    aphi = water.dh_a_array(b.t) * LN10 / 3
    phi = pz.osmotic(p, b.m[ci], b.m[ai], b.m[ni].sum(axis=0), b.t, aphi, opts.unsymmetrical)
    total = b.m.sum(axis=0)
    return phi.reshape(solution.shape), total.reshape(solution.shape)


def osmotic_coefficient(solution: Solution, model: str = "pitzer", missing: str = "error"):
    """Osmotic coefficient φ of a solution (Pitzer model).

    Parameters
    ----------
    solution : Solution
        The solution (or batch), molal amounts.
    model : {"pitzer"}
        Only Pitzer gives φ here.
    missing : str
        "error" or "zero" for missing Pitzer parameters.

    Returns
    -------
    float or numpy.ndarray
        φ, dimensionless.

    Raises
    ------
    InputError
        A model other than Pitzer.
    MissingParameterError
        Pitzer parameters missing and ``missing="error"``.

    References
    ----------
    K. S. Pitzer, *Activity Coefficients in Electrolyte Solutions*, 2nd ed., CRC (1991),
    ch. 3; Harvie, Møller and Weare, Geochim. Cosmochim. Acta 48 (1984) 723.

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

    Parameters
    ----------
    solution : Solution
        The solution (or batch), molal amounts.
    model : {"pitzer"}
        Only Pitzer gives φ here.
    missing : str
        "error" or "zero" for missing Pitzer parameters.

    Returns
    -------
    float or numpy.ndarray
        a_w, dimensionless (mole-fraction scale).

    Raises
    ------
    InputError
        A model other than Pitzer.
    MissingParameterError
        Pitzer parameters missing and ``missing="error"``.

    References
    ----------
    R. A. Robinson and R. H. Stokes, *Electrolyte Solutions*, 2nd ed. (1959), ch. 2
    (a_w from φ); Pitzer (1991), ch. 3.

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


@dataclass(frozen=True, repr=False)
class ModelComparison(Record):
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

    Parameters
    ----------
    solution : Solution
        The solution (or batch), molal amounts.
    models : sequence of str, optional
        Model names (default every registered model).
    **options
        Passed to each model (``sizes``, ``davies_coefficient`` …).

    Returns
    -------
    ModelComparison
        γ of every ion by every model, whether each is in range, the skipped models, and the
        spread (max − min of γ over the models in range) per ion.

    Raises
    ------
    UnknownSpeciesError
        An unknown model name.

    Examples
    --------
    >>> import ionact as ia
    >>> c = ia.compare_models(ia.Solution.from_salts({"NaCl": 0.05}))
    >>> sorted(c.skipped) == [] and 0 < c.spread["Na+"] < 0.05
    True
    """
    names = list(models) if models is not None else [m for m in MODELS if m != "ideal"]
    gammas, in_range, skipped = {}, {}, {}
    for name in names:
        info = get_model(name)
        try:
            with warnings.catch_warnings(), strict(False):
                warnings.simplefilter("ignore", ValidityRangeWarning)
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
            mv = np.abs(nernst_slope(z, solution.temperature)) * np.log10(r)
            spread_mv[ion] = float(mv) if np.ndim(mv) == 0 else mv
        else:
            spread_mv[ion] = 0.0
    return ModelComparison(gammas, in_range, skipped, spread, spread_mv, solution.ionic_strength)
