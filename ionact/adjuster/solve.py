"""The search: the smallest stock strength (or volume ratio) that holds the error budget.

Steps, each a function: the design points of a search variable (:func:`points`), the pH
buffer's split at each point (:func:`solve_buffer`), the solubility ceiling of the stock
(:func:`solubility_ceiling`), the grid and root (:func:`search`), and the model moves a
search may need when the final ionic strength leaves the model's range.
"""

from __future__ import annotations

import dataclasses
import math
import warnings
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..density import water_per_litre
from ..errors import InfeasibleDesignError, ValidityRangeWarning
from ..models.registry import MODELS, Batch
from ..models.resolver import ModelChoice
from ..species import Ion
from .inputs import StockComponent
from .system import Evaluated, System

__all__ = ["BufferPlan", "Job", "SearchResult", "points", "solve_buffer", "solubility_ceiling", "search",
           "GRID_POINTS", "SEARCH_FLOOR"]

GRID_POINTS = 49
SCAN_COLUMNS = 200_000  # treated solutions per evaluation in the grid scan (arrays of ~10 MB per ion set)
SEARCH_FLOOR = 1e-5  # smallest stock scale or ratio searched
SEARCH_CEILING = 1e3  # largest stock scale searched when no solubility bounds it
_MODEL_MOVES = 3


@dataclass(frozen=True)
class BufferPlan:
    """Where the buffer pair sits in the stock and what it must reach."""

    acid_index: int  # component index
    base_index: int
    acid_species: str
    base_species: str
    pka: float
    source: tuple[str, ...]
    pH: float
    total: float


@dataclass(frozen=True)
class Job:
    """The search's fixed settings (validated inputs)."""

    solve: str  # "stock", "ratio" or "none"
    ratio: float  # the given volume ratio
    max_ratio: float
    base_amounts: np.ndarray  # (C,) mol/L as given
    budget_mv: float
    slope: float  # |S/z|, mV per decade
    buffer: BufferPlan | None
    requested: str  # model name or "auto"
    fallback: str | None
    max_scale: float  # solubility ceiling of the inert scale (inf when no inert salt has data)


@dataclass(frozen=True)
class SearchResult:
    system: System  # with the final model choice
    x: float  # the solved variable (scale or ratio; 1 for "none")
    amounts: np.ndarray  # (C,) mol/L in the stock
    ratio: float
    scan: dict
    notes: tuple[str, ...]


def points(system: System, job: Job, x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Stock amounts (C, G) and ratios (G,) for search values x (G,): inert salts scale, the rest stays."""
    x = np.atleast_1d(np.asarray(x, dtype=float))
    inert = np.array([c.role == "inert" for c in system.components])
    base = job.base_amounts[:, None]
    if job.solve == "stock":
        amounts = np.where(inert[:, None], base * x[None, :], base)
        ratio = np.full(x.shape, job.ratio)
    elif job.solve == "ratio":
        amounts = np.repeat(base, x.size, axis=1)
        ratio = x
    else:
        amounts = np.repeat(base, x.size, axis=1)
        ratio = np.full(x.shape, job.ratio)
    if job.buffer is not None:
        amounts = solve_buffer(system, job.buffer, amounts, ratio)
    return amounts, ratio


def solve_buffer(system: System, plan: BufferPlan, amounts: np.ndarray, ratio: np.ndarray) -> np.ndarray:
    """The acid/base split of the buffer at each design point for the target pH.

    The activity-corrected Henderson–Hasselbalch split, pH = pKa + log10(γ_b m_b / (γ_a m_a)),
    is the start; the treated mixtures are then speciated and the split moved until their
    equilibrium pH (the median over samples and standards) is the target.
    """
    out = np.array(amounts, dtype=float)
    ia, ib = system.index(plan.acid_species), system.index(plan.base_species)
    need = 10.0 ** (plan.pH - plan.pka)
    G = out.shape[1]
    log_ratio = np.full(G, math.log10(need))
    for k in range(30):
        out = _split(out, plan, log_ratio)
        ev = system.evaluate(out, ratio)
        ph = ev.ph
        if ph is None:  # no equilibrium: Henderson–Hasselbalch with the model's γ
            lg = ev.result.log10_gamma
            new = math.log10(need) + _median_per_point(lg[ia], G, ev) - _median_per_point(lg[ib], G, ev)
        else:
            new = log_ratio + (plan.pH - _median_per_point(ph, G, ev))
        if np.all(np.abs(new - log_ratio) < 1e-10) and k > 0:
            break
        log_ratio = new
    return _split(out, plan, log_ratio)


def _split(amounts: np.ndarray, plan: BufferPlan, log_ratio: np.ndarray) -> np.ndarray:
    out = np.array(amounts, dtype=float)
    frac_b = 10.0**log_ratio
    cb = plan.total * frac_b / (1.0 + frac_b)
    out[plan.acid_index] = plan.total - cb
    out[plan.base_index] = cb
    return out


def _median_per_point(values: np.ndarray, G: int, ev: Evaluated) -> np.ndarray:
    n_s = ev.ls.size
    s = values[:n_s].reshape(G, -1)
    t = values[n_s:].reshape(G, -1)
    return np.asarray(np.median(np.concatenate([s, t], axis=1), axis=1))


def stock_saturation(components: tuple[StockComponent, ...], amounts: np.ndarray, temperature: float,
                     density: str | None, t_low: float) -> dict[str, tuple[float, float | None]]:
    """Molality of each component in the stock and its saturation molality at ``t_low`` (None if untabulated)."""
    ions: list[Ion] = []
    for c in components:
        for ion, _ in c.ions:
            if ion.name not in [i.name for i in ions]:
                ions.append(ion)
    names = [i.name for i in ions]
    conc = np.zeros(len(ions))
    for c, a in zip(components, amounts, strict=True):
        for ion, nu in c.ions:
            conc[names.index(ion.name)] += nu * a
    w = float(water_per_litre(ions, temperature, molar=conc, density=density))
    out = {}
    for c, a in zip(components, amounts, strict=True):
        sat = None
        if c.salt is not None:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore", ValidityRangeWarning)
                sat = c.salt.saturation_molality(t_low)
        out[c.name] = (float(a) / w, sat)
    return out


def solubility_ceiling(components: tuple[StockComponent, ...], amounts: np.ndarray, temperature: float,
                       density: str | None, t_low: float, margin: float) -> float:
    """The largest scale of the inert salts at which each stays below (1 − margin) of saturation.

    Returns inf when no inert salt has solubility data.
    """
    from scipy import optimize

    inert = np.array([c.role == "inert" for c in components])

    def worst(scale: float) -> float:
        a = np.where(inert, amounts * scale, amounts)
        sats = stock_saturation(components, a, temperature, density, t_low)
        fr = [m / s for (m, s), c in zip(sats.values(), components, strict=True)
              if s is not None and c.role == "inert" and m > 0]
        return max(fr) - (1.0 - margin) if fr else -math.inf

    if worst(1.0) == -math.inf:
        return math.inf
    hi = 1.0
    while worst(hi) < 0 and hi < 1e4:
        hi *= 2.0
    if worst(hi) < 0:
        return hi
    lo = hi / 2.0 if hi > 1.0 else 1e-9
    while worst(lo) >= 0 and lo > 1e-12:
        lo /= 2.0
    return float(optimize.brentq(worst, lo, hi, xtol=1e-12, rtol=1e-10))


def _valid(system: System, ev: Evaluated) -> np.ndarray:
    """Whether the model's ionic-strength range covers each design point (G,)."""
    G = ev.worst.size
    n_s = ev.ls.size // G
    n_t = ev.lstd.size // G
    ok = np.ones(G, dtype=bool)
    b = ev.batch
    info = system.choice.info
    for g in range(G):
        cols = np.r_[g * n_s:(g + 1) * n_s, G * n_s + g * n_t:G * n_s + (g + 1) * n_t]
        sub = Batch(b.names, b.ions, b.z, b.m[:, cols], b.t[cols], b.ionic[cols])
        ok[g] = not any(v.kind == "ionic-strength" for v in info.violations(sub, system.choice.options))
    return ok


def _resolve_at(system: System, job: Job, x: float, model: str | None = None) -> ModelChoice:
    amounts, ratio = points(system, job, np.array([x]))
    batch = system.batch(system.treated(amounts, ratio)[0])
    return system.resolve(batch, model or job.requested, job.fallback)


def _bounds(job: Job) -> tuple[float, float]:
    if job.solve == "stock":
        return SEARCH_FLOOR, float(min(job.max_scale, SEARCH_CEILING))
    if job.solve == "ratio":
        return min(SEARCH_FLOOR, job.ratio), float(job.max_ratio)
    return 1.0, 1.0


def initial_choice(system: System, job: Job) -> ModelChoice:
    """The model for the search: resolved at the strongest adjuster the search may reach."""
    return _resolve_at(system, job, _bounds(job)[1])


def search(system: System, job: Job) -> SearchResult:
    """Solve (or evaluate) the design; move to a model that covers the result when needed."""
    notes: list[str] = []
    if job.solve == "stock" and not math.isfinite(job.max_scale):
        notes.append(f"no solubility data for the inert stock salts: the stock strength search stops at "
                     f"{SEARCH_CEILING:g}× the given amounts; check the supplier's solubility data")
    for _ in range(_MODEL_MOVES):
        scan: dict[str, Any]
        if job.solve == "none":
            x, scan = 1.0, {}
        else:
            x, scan, moved = _root(system, job, notes)
            if moved is not None:
                system = system.with_choice(moved)
                continue
        ev = system.evaluate(*points(system, job, np.array([x])))
        outside = not _valid(system, ev)[0]
        after = _resolve_at(system, job, x, "auto" if outside else None)
        if after.name != system.choice.name and (outside or job.requested == "auto"):
            if outside:
                notes.append(f"the final ionic strength {float(ev.ionic_max[0]):.4g} mol/kg is outside model "
                             f"{system.choice.name}'s range: the design moved to {after.name} ({after.reason})")
            system = system.with_choice(after)
            continue
        if job.requested == "auto":
            system = system.with_choice(after)
        break
    amounts, ratio = points(system, job, np.array([x]))
    return SearchResult(system, x, amounts[:, 0], float(ratio[0]), scan, tuple(notes))


def _root(system: System, job: Job, notes: list[str]) -> tuple[float, dict, ModelChoice | None]:
    """Grid then Brent on the first crossing of the budget; the model to move to when the grid
    has no feasible point inside the current model's range."""
    from scipy import optimize

    lo, hi = _bounds(job)
    grid = np.geomspace(lo, hi, GRID_POINTS)
    worst, valid, ionic_max = _scan(system, job, grid)
    wg = worst * job.slope
    scan: dict[str, Any] = {"x": grid, "worst_mv": wg, "valid": valid}
    ok = np.flatnonzero((wg <= job.budget_mv) & valid)
    what = "stock scale" if job.solve == "stock" else "volume ratio"
    if ok.size == 0 and not np.all(valid) and job.requested != "auto":
        ev = system.evaluate(*points(system, job, grid))  # the whole grid at once: a model for all of it
        wider = system.resolve(ev.batch, "auto", None)
        if wider.name != system.choice.name and wider.info.max_ionic_strength > system.choice.info.max_ionic_strength:
            notes.append(f"model {system.choice.name} cannot cover a design that meets the budget: moved to "
                         f"{wider.name}")
            return 1.0, scan, wider
    if ok.size == 0:
        raise InfeasibleDesignError(_why_infeasible(system, job, grid, wg, valid, ionic_max, what))
    i = int(ok[0])
    if i == 0:
        notes.append("the budget is met even at the smallest adjuster searched: samples and standards already "
                     "agree closely")
        x = float(grid[0])
    else:
        def f(lx: float) -> float:
            e = system.evaluate(*points(system, job, np.array([math.exp(lx)])))
            return float(e.worst[0] * job.slope) - job.budget_mv

        x = math.exp(optimize.brentq(f, math.log(grid[i - 1]), math.log(grid[i]), xtol=1e-12, rtol=1e-12))
        for _ in range(60):  # land on the feasible side of the crossing
            if f(math.log(x)) <= 0:
                break
            x *= 1 + 1e-11
    scan["chosen"] = x
    return x, scan, None


def _scan(system: System, job: Job, grid: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Worst log10 γ ratio, model validity and the largest ionic strength at each grid point,
    evaluated a few grid points at a time so that no array holds more than about
    :data:`SCAN_COLUMNS` treated solutions (memory, and the time to touch it, stay bounded
    whatever the number of sample matrices)."""
    per_point = system.sample_c.shape[1] * system.an_levels.size + system.std_levels.size
    step = max(1, SCAN_COLUMNS // max(per_point, 1))
    worst, valid, ionic_max = [], [], []
    for start in range(0, grid.size, step):
        ev = system.evaluate(*points(system, job, grid[start:start + step]))
        worst.append(ev.worst)
        valid.append(_valid(system, ev))
        ionic_max.append(ev.ionic_max)
    return np.concatenate(worst), np.concatenate(valid), np.concatenate(ionic_max)


def _why_infeasible(system: System, job: Job, grid: np.ndarray, wg: np.ndarray, valid: np.ndarray,
                    ionic_max: np.ndarray, what: str) -> str:
    info = system.choice.info
    head = f"no design meets the budget of {job.budget_mv:.4g} mV: "
    if not np.any(valid):
        return (head + f"even the smallest {what} searched gives an ionic strength {float(ionic_max.min()):.4g} "
                f"mol/kg beyond model {info.name}'s range")
    wv = np.where(valid, wg, np.inf)
    k = int(np.argmin(wv))
    best_x, best = float(grid[k]), float(wg[k])
    last_valid = int(np.flatnonzero(valid)[-1])
    if k == last_valid and last_valid < grid.size - 1:
        bind = (f"model validity: {info.name} covers the treated solutions only up to this {what} and no model "
                "with a wider range has parameters for every ion")
    elif k == grid.size - 1:
        if job.solve == "stock" and math.isfinite(job.max_scale):
            lim = ", ".join(f"{c.name} {a * best_x:.4g} mol/L" for c, a in
                            zip(system.components, job.base_amounts, strict=True) if c.role == "inert")
            bind = f"solubility at the coldest temperature (with its margin) limits the stock to {lim}"
        elif job.solve == "ratio":
            bind = f"the volume ratio is limited to max_ratio = {job.max_ratio:g}"
        else:
            bind = "the search limit"
    else:
        bind = f"under model {info.name} the worst error has a minimum at {what} {best_x:.4g} and rises on either side"
    return head + f"{bind}; the best reachable worst error is {best:.4g} mV at {what} {best_x:.4g}"


def with_model(system: System, name: str) -> System:
    """The system with a named model (used by tests and comparisons)."""
    return system.with_choice(dataclasses.replace(system.choice, name=MODELS[name].name, reason="requested"))
