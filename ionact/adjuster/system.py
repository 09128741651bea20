"""The design's fixed system: every ion, the stock's components, the samples and standards.

A :class:`System` is immutable. A design point is a vector of stock amounts (mol/L, one
per component) and a volume ratio; :meth:`System.evaluate` mixes every sample at every
analyte level, and every standard, with the adjuster at a batch of design points and
runs the evaluation path on them: composition (mol/L) → molalities through the one
density model (:mod:`ionact.density`) → species (identity; chemical equilibrium plugs in
here) → log10 γ by the design's :class:`~ionact.models.resolver.ModelChoice`.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from ..density import water_per_litre
from ..equilibrium import Complex, Step, free_fraction_of, species_step
from ..errors import InputError
from ..estimates import ionic_strength_from_conductivity, ionic_strength_from_tds
from ..models.registry import Batch
from ..models.resolver import ModelChoice
from ..solution import Solution
from ..species import Ion, Salt, resolve_ion
from ..units import MOLAR, parse_amount
from .inputs import SamplePopulation, StockComponent, pair_of

__all__ = ["System", "Evaluated", "SampleSet", "sample_set", "analyte_levels", "SAMPLE_LEVELS"]

SAMPLE_LEVELS = 9  # ionic strengths modelled across a stated range


@dataclass(frozen=True)
class SampleSet:
    """The untreated samples as a batch Solution, with labels and how they were obtained."""

    solution: Solution
    labels: tuple[str, ...]
    notes: tuple[str, ...]
    envelope: tuple[float, float]  # untreated ionic strength, mol/kg


def _estimated_range(pop: SamplePopulation) -> tuple[float, float, str]:
    if pop.conductivity is not None:
        est = ionic_strength_from_conductivity(np.asarray(pop.conductivity), rule=pop.rule or "russell")
        what = "conductivity"
    else:
        est = ionic_strength_from_tds(np.asarray(pop.tds), rule=pop.rule or "langelier")
        what = "dissolved solids"
    lo, hi = (float(x) for x in np.asarray(est.value))
    return lo, hi, (f"sample ionic strength {lo:.4g}–{hi:.4g} estimated from {what} by the '{est.rule}' rule "
                    f"(×{est.coefficient:g}; {est.source})")


def sample_set(pop: SamplePopulation, temperature: float, analyte: Ion) -> SampleSet:
    """The samples a design is proven for, as a one-dimensional batch without the analyte."""
    notes: list[str] = []
    if pop.matrices is not None:
        sol = pop.matrices if pop.matrices.shape else Solution.from_arrays(
            [pop.matrices.ion(n) for n in pop.matrices.ions], pop.matrices.molality_array[:, None],
            np.array([pop.matrices.temperature]))
        if analyte.name in sol.ions and np.any(np.asarray(sol.molality(analyte.name)) > 0):
            raise InputError(f"the sample matrices contain the analyte {analyte.name}; give the matrices without it "
                             "and its range as analyte_range")
        labels = pop.labels or tuple(f"matrix {i}" for i in range(sol.shape[0]))
        ts = np.unique(np.asarray(sol.temperature))
        if ts.size > 1 or abs(float(ts[0]) - temperature) > 1e-9:
            notes.append(f"the explicit samples are given at {', '.join(f'{x:g}' for x in ts[:5])} °C; their "
                         f"compositions are used as they are and γ is evaluated at the method's {temperature:g} °C")
        ionic = np.asarray(sol.ionic_strength).reshape(-1)
        return SampleSet(sol, tuple(labels), tuple(notes), (float(ionic.min()), float(ionic.max())))
    if pop.ionic_strength is not None:
        lo, hi = pop.ionic_strength
    else:
        lo, hi, note = _estimated_range(pop)
        notes.append(note)
    bg = Salt.parse(pop.background)
    if any(i == analyte.name for i, _ in bg.ions):
        raise InputError(f"the background salt {bg.text} contains the analyte {analyte.name}; choose another")
    grid = np.geomspace(max(lo, hi * 1e-3, 1e-7), max(hi, 1e-7), SAMPLE_LEVELS)
    levels = np.unique(np.concatenate([[lo, hi], grid]))
    levels = levels[(levels >= lo) & (levels <= hi)] if hi > 0 else np.array([0.0])
    sol = Solution.from_ionic_strength(levels, bg.text, temperature)
    notes.append(f"samples modelled as {bg.text} solutions at {len(levels)} ionic strengths from {lo:g} to {hi:g} "
                 "mol/kg")
    return SampleSet(sol, tuple(f"I = {x:.4g} ({bg.text})" for x in levels), tuple(notes), (lo, hi))


def analyte_levels(spec: object, ion: Ion, what: str, n: int) -> np.ndarray:
    """``n`` levels spaced evenly in log between a (low, high) pair of concentrations (mol/L)."""
    if spec is None:
        raise InputError(f"{what} is required: (low, high) in mol/L or unit strings such as '1 mg/L as N'")
    lo, hi = pair_of(spec, what)
    vals = []
    for v in (lo, hi):
        a = parse_amount(v, ion, default_basis=MOLAR)
        if a.basis != MOLAR:
            raise InputError(f"{what}: {v!r} must be a concentration per volume (mol/L, mg/L …)")
        vals.append(float(a.value))
    lo_v, hi_v = vals
    if not (0 < lo_v <= hi_v <= 20.0):
        raise InputError(f"{what} ({lo!r}, {hi!r}) must satisfy 0 < low ≤ high ≤ 20 mol/L")
    return np.unique(np.geomspace(lo_v, hi_v, n)) if hi_v > lo_v else np.array([lo_v])


@dataclass(frozen=True)
class Evaluated:
    """The evaluation of G design points: worst |log10 γ ratio| and the pieces behind it."""

    worst: np.ndarray  # (G,)
    ls: np.ndarray  # (G, J, K) log10 γ of the analyte in treated samples
    lstd: np.ndarray  # (G, L) in treated standards
    ionic_s: np.ndarray  # (G, J, K) mol/kg
    ionic_std: np.ndarray  # (G, L)
    batch: Batch  # every treated solution, (n, G·J·K + G·L) — totals, mol/kg
    result: Step  # the model and, where the ions react, the equilibrium of every treated solution

    @property
    def ph(self) -> np.ndarray | None:
        """pH of every treated solution when they were speciated (None otherwise)."""
        st, net = self.result.state, self.result.network
        if st is None or net is None:
            return None
        return np.asarray(-(st.log10_gamma[net.h] + np.log10(np.maximum(st.molality[net.h], 1e-300))))

    def free_fraction(self, name: str) -> np.ndarray | None:
        """Free share of a component's total in every treated solution (None without speciation)."""
        return free_fraction_of(self.result, name)

    @property
    def ionic_max(self) -> np.ndarray:
        """Largest ionic strength per design point (G,)."""
        return np.maximum(self.ionic_s.reshape(self.ionic_s.shape[0], -1).max(axis=1), self.ionic_std.max(axis=1))

    @property
    def ionic_min(self) -> np.ndarray:
        return np.minimum(self.ionic_s.reshape(self.ionic_s.shape[0], -1).min(axis=1), self.ionic_std.min(axis=1))


@dataclass(frozen=True)
class System:
    """Everything fixed in a design job, as arrays (immutable)."""

    ions: tuple[Ion, ...]
    components: tuple[StockComponent, ...]
    cmat: np.ndarray  # (n_ions, n_components) ions per formula unit
    sample_c: np.ndarray  # (n_ions, J) untreated samples, mol/L
    sample_labels: tuple[str, ...]
    sample_ionic: np.ndarray  # (J,) untreated, mol/kg
    an_levels: np.ndarray  # (K,) mol/L in the untreated sample
    std_levels: np.ndarray  # (L,) mol/L in the untreated standard
    stoich: np.ndarray  # (n_ions,) analyte + counter-ion per unit analyte
    k: int
    temperature: float
    density: str | None
    choice: ModelChoice
    equilibrium: bool | None = None
    species: tuple[Complex, ...] | None = None

    @property
    def names(self) -> tuple[str, ...]:
        return tuple(i.name for i in self.ions)

    def index(self, name: str) -> int:
        return self.names.index(name)

    def with_choice(self, choice: ModelChoice) -> System:
        return dataclasses.replace(self, choice=choice)

    @classmethod
    def build(cls, analyte: Ion, counter: Ion, components: Sequence[StockComponent], samples: SampleSet,
              an_levels: np.ndarray, std_levels: np.ndarray, temperature: float, density: str | None,
              choice: ModelChoice, equilibrium: bool | None = None,
              species: tuple[Complex, ...] | None = None) -> System:
        ions: list[Ion] = []

        def add(ion: Ion) -> None:
            if ion.name not in [i.name for i in ions]:
                ions.append(ion)

        sol = samples.solution
        for n in sol.ions:
            add(sol.ion(n))
        add(analyte)
        add(counter)
        for c in components:
            for ion, _ in c.ions:
                add(ion)
        names = [i.name for i in ions]
        cmat = np.zeros((len(ions), len(components)))
        for j, c in enumerate(components):
            for ion, nu in c.ions:
                cmat[names.index(ion.name), j] += nu
        J = sol.size
        m = np.asarray(sol.molality_array).reshape(len(sol.ions), J)
        w = water_per_litre([sol.ion(n) for n in sol.ions], temperature, molal=m, density=density)
        sample_c = np.zeros((len(ions), J))
        for i, n in enumerate(sol.ions):
            sample_c[names.index(n)] = m[i] * w
        stoich = np.zeros(len(ions))
        stoich[names.index(analyte.name)] = 1.0
        stoich[names.index(counter.name)] += abs(analyte.charge) / abs(counter.charge)
        return cls(tuple(ions), tuple(components), cmat, sample_c, samples.labels,
                   np.asarray(sol.ionic_strength, dtype=float).reshape(J), an_levels, std_levels, stoich,
                   names.index(analyte.name), temperature, density, choice, equilibrium, species)

    def stock_ions(self, amounts: np.ndarray) -> np.ndarray:
        """Ion molarities of the stock (n_ions, G) for component amounts (n_components, G)."""
        return self.cmat @ amounts

    def treated(self, amounts: np.ndarray, ratio: np.ndarray) -> tuple[np.ndarray, tuple[int, int, int, int]]:
        """Molar compositions of the treated samples and standards side by side, (n, G·J·K + G·L),
        and the shape (G, J, K, L): samples × analyte levels first, then the standards.

        Volumes are additive: one volume of sample plus ``ratio`` volumes of stock. The array is
        filled in place (the design search evaluates millions of treated solutions).
        """
        isa = self.stock_ions(amounts)  # (n, G)
        n, G = isa.shape
        J, K, L = self.sample_c.shape[1], self.an_levels.size, self.std_levels.size
        flat = np.empty((n, G * J * K + G * L))
        ts = flat[:, : G * J * K].reshape(n, G, J, K)
        tstd = flat[:, G * J * K:].reshape(n, G, L)
        r = ratio[None, :]
        part = (r * isa) / (1.0 + r)  # (n, G): the stock's share
        keep = 1.0 / (1.0 + ratio)  # (G,): the sample's share
        samp = self.sample_c[:, :, None] + self.stoich[:, None, None] * self.an_levels[None, None, :]  # (n, J, K)
        np.multiply(samp[:, None, :, :], keep[None, :, None, None], out=ts)
        ts += part[:, :, None, None]
        std = self.stoich[:, None] * self.std_levels[None, :]  # (n, L)
        np.multiply(std[:, None, :], keep[None, :, None], out=tstd)
        tstd += part[:, :, None]
        return flat, (G, J, K, L)

    def batch(self, c_flat: np.ndarray) -> Batch:
        """Step 1 of the path for molar compositions (n, N): molalities (totals)."""
        w = water_per_litre(self.ions, self.temperature, molar=c_flat, density=self.density)
        return Batch.of(self.ions, c_flat / w, self.temperature)

    def resolve(self, batch: Batch, model: str, fallback: str | None) -> ModelChoice:
        """The model for these treated solutions, resolved on their species (after equilibrium)."""
        return species_step(self.ions, batch.m, batch.t, model, self.choice.options, fallback,
                            equilibrium=self.equilibrium, species=self.species, checks=False).choice

    def step(self, batch: Batch, checks: bool = True) -> Step:
        """Steps 2–3: species where the ions react, then log10 γ by the design's model."""
        c = self.choice
        return species_step(self.ions, batch.m, batch.t, c.requested, c.options, c.fallback,
                            equilibrium=self.equilibrium, species=self.species, choice=c, checks=checks)

    def evaluate(self, amounts: np.ndarray, ratio: np.ndarray) -> Evaluated:
        """Evaluate G design points: amounts (n_components, G), ratio (G,)."""
        amounts = np.asarray(amounts, dtype=float).reshape(len(self.components), -1)
        ratio = np.broadcast_to(np.asarray(ratio, dtype=float).reshape(-1), amounts.shape[1:])
        flat, (G, J, K, L) = self.treated(amounts, ratio)
        batch = self.batch(flat)
        result = self.step(batch)
        lga = result.log10_gamma[self.k]  # log10 of a(free analyte) / m(total analyte): what the electrode sees
        ls = lga[: G * J * K].reshape(G, J, K)
        lstd = lga[G * J * K:].reshape(G, L)
        hi_s, lo_s = ls.reshape(G, -1).max(axis=1), ls.reshape(G, -1).min(axis=1)
        hi_t, lo_t = lstd.max(axis=1), lstd.min(axis=1)
        worst = np.maximum(hi_s - lo_t, hi_t - lo_s)
        ionic = result.state.ionic if result.state is not None else batch.ionic
        return Evaluated(worst, ls, lstd, ionic[: G * J * K].reshape(G, J, K), ionic[G * J * K:].reshape(G, L),
                         batch, result)

    def counter_of(self) -> str:
        """The counter-ion carried with the analyte (the other non-zero entry of stoich)."""
        idx = [i for i in np.flatnonzero(self.stoich) if i != self.k]
        return self.names[idx[0]] if idx else ""


def counter_ion(analyte: Ion, standard_salt: str | None) -> Ion:
    """The analyte's counter-ion: from its standard salt, or Cl- for a cation and Na+ for an anion."""
    if standard_salt is None:
        return resolve_ion("Cl-" if analyte.charge > 0 else "Na+")
    ss = Salt.parse(standard_salt)
    names = [n for n, _ in ss.ions]
    if analyte.name not in names or len(names) != 2:
        raise InputError(f"standard_salt {ss.text} is not a salt of {analyte.name}")
    return resolve_ion(next(n for n in names if n != analyte.name))


def log_slope(charge: int, temperature: float) -> float:
    """|S/z| in mV per decade."""
    from ..electrode import nernst_slope

    return abs(float(nernst_slope(charge, temperature)))

