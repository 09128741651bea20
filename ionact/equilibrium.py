"""Step 2 of the evaluation path: chemical equilibrium — complexes, ion pairs, acid–base, solids.

An electrode answers to the activity of its *free* ion; laboratories report totals. This
module relates the two by the tableau method (Morel & Hering 1993; Stumm & Morgan 1996):
every species i is a product of components j (free Na+, Ca^2+, F-, H+, …) with
stoichiometry ν_ij and an overall formation constant β_i at I = 0,

    m_i γ_i = β_i Π_j (m_j γ_j)^ν_ij,

and every component closes its mass balance T_j = Σ_i ν_ij m_i (the free component
included). Newton–Raphson runs on x_j = ln m_j with the Jacobian ∂T_j/∂x_k = Σ_i ν_ij ν_ik m_i,
damped to at most one decade per step, vectorised over the batch (a stack of small
Jacobians solved together), with the activity coefficients of every species updated from
the chosen model at each step until the ionic strength and every balance settle.

H+ is a component: with ``pH`` given its activity is held; otherwise its own balance
(the proton balance, from what the inputs bring) closes the system, water's ionisation
being the species OH- = H2O − H+. Constants are 25 °C values moved with temperature by
van 't Hoff where the reaction enthalpy is tabulated; elsewhere a range notice beyond
25 ± 5 °C. Saturation indices, SI = log10 IAP − log10 Ksp, are reported for every solid
of the table whose ions are present.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from functools import lru_cache
from typing import Any

import numpy as np

from ._frozen import frozen_map, plain, readonly
from .constants import LN10, PARAMETER_WINDOW, REFERENCE_TEMPERATURE
from .errors import ConvergenceError, InputError, UnknownSpeciesError, warn_range
from .models.debye_huckel import unit_log_gamma
from .models.registry import Batch, Violation
from .models.resolver import ModelChoice, choice_for, evaluate, resolve_model
from .species import Ion, Salt, resolve_ion
from .tables import complex_table, ksp_table
from .water import GAS_CONSTANT, ZERO_CELSIUS, dh_a_array

__all__ = ["Complex", "Network", "Speciation", "speciate", "ph_of", "network_for", "equilibrate", "State",
           "free_fraction_of", "held_ph", "PAIR_KINDS", "MAX_ITERATIONS", "TOLERANCE"]

PAIR_KINDS = frozenset({"pair"})  # weak ion pairs: left out when the model (Pitzer) already holds them
MAX_ITERATIONS = 200
TOLERANCE = 1e-10  # relative mass-balance residual
_MAX_STEP = LN10  # at most one decade per Newton step
_PCF_STEPS = 4  # at most this many positive-continued-fraction steps, then Newton
_BLOCK = 4096  # samples per block: a block's arrays fit in cache
_SWITCH = 0.5  # a sample switches to Newton once every balance is within 50 %
_NEAR = 0.5  # activity coefficients follow once every balance is within 50 %
_NOTHING = 1e-100  # mol/kg: a component total at or below this is absent (no balance to close)
_H = "H+"


@dataclass(frozen=True)
class Complex:
    """A species for the equilibrium network, given by the caller (or overriding the table).

    Parameters
    ----------
    formula : str
        The species' notation, e.g. "AlC14H18N2O8-" with ``charge``, or "AlF^2+".
    components : mapping
        Component (free ion, or another species of the network) -> count; H+ may be negative
        (hydrolysis). E.g. {"Al^3+": 1, "F-": 1}.
    log_k : float
        log10 of the overall formation constant from these components at 25 °C and I = 0.
    delta_h : float, optional
        Reaction enthalpy, kJ/mol, for the van 't Hoff temperature dependence.
    charge : int, optional
        When ``formula`` carries no charge notation.
    size : float, optional
        Ion-size parameter å (Å) for the Debye–Hückel-family models.
    kind : str
        "complex" (default), "acid", "pair" or "hydrolysis".
    source : str
        Where the constant comes from.
    """

    formula: str
    components: Mapping[str, int]  # keys: ion notation, or Ion objects (stored by name)
    log_k: float
    delta_h: float | None = None
    charge: int | None = None
    size: float | None = None
    kind: str = "complex"
    source: str = "given by the caller"

    def __post_init__(self) -> None:
        if not isinstance(self.formula, str) or not self.formula:
            raise InputError(f"a complex needs a formula, got {self.formula!r}")
        if isinstance(self.log_k, bool) or not isinstance(self.log_k, int | float) or not math.isfinite(self.log_k):
            raise InputError(f"log_k {self.log_k!r} of {self.formula} must be a finite number")
        if self.delta_h is not None and (isinstance(self.delta_h, bool) or not isinstance(self.delta_h, int | float)
                                         or not math.isfinite(self.delta_h)):
            raise InputError(f"delta_h {self.delta_h!r} of {self.formula} must be a finite number of kJ/mol")
        if not isinstance(self.components, Mapping) or not self.components:
            raise InputError(f"components of {self.formula} must be a non-empty mapping of species -> count")
        comps = {}
        for k, n in self.components.items():
            if isinstance(n, bool) or not isinstance(n, int) or n == 0:
                raise InputError(f"count {n!r} of {k} in {self.formula} must be a non-zero integer")
            comps[resolve_ion(k).name if not isinstance(k, Ion) else k.name] = int(n)
        object.__setattr__(self, "components", frozen_map(comps))
        if self.kind not in ("complex", "acid", "pair", "hydrolysis", "water"):
            raise InputError(f"kind {self.kind!r} of {self.formula} must be complex, acid, pair or hydrolysis")

    def to_dict(self) -> dict[str, Any]:
        ion = self.ion
        return {"formula": ion.formula, "charge": ion.charge, "components": dict(self.components),
                "log_k": self.log_k, "delta_h": self.delta_h, "size": self.size, "kind": self.kind,
                "source": self.source}

    @classmethod
    def from_dict(cls, d: Mapping[str, Any], species: Mapping[str, Ion] | None = None) -> Complex:
        """From :meth:`to_dict`'s mapping; ``species`` resolves component names the tables lack
        (a design's own ions)."""
        if not isinstance(d, Mapping):
            raise InputError(f"a complex must be a mapping, got {type(d).__name__}")
        missing = [k for k in ("formula", "components", "log_k") if k not in d]
        if missing:
            raise InputError(f"a complex lacks {', '.join(missing)}")
        comps = d["components"]
        if species and isinstance(comps, Mapping):
            comps = {species.get(k, k) if isinstance(k, str) else k: n for k, n in comps.items()}
        return cls(d["formula"], comps, d["log_k"], d.get("delta_h"), d.get("charge"), d.get("size"),
                   d.get("kind", "complex"), str(d.get("source", "given by the caller")))

    @property
    def ion(self) -> Ion:
        if self.charge is None:
            ion = Ion.parse(self.formula)
        else:
            from .species import formula_mass

            ion = Ion(formula=self.formula, charge=self.charge, molar_mass=formula_mass(self.formula),
                      size=self.size, aq=self.charge == 0)
        return ion if self.size is None else Ion(formula=ion.formula, charge=ion.charge, molar_mass=ion.molar_mass,
                                                 size=self.size, aq=ion.aq, tabulated=ion.tabulated)


@dataclass(frozen=True)
class Network:
    """Components, species and their stoichiometry, for one set of input species."""

    components: tuple[Ion, ...]  # free components; H+ among them
    species: tuple[Ion, ...]  # components first, then the formed species
    nu: np.ndarray  # (n_species, n_components)
    log_k: np.ndarray  # (n_species,) overall log10 β at 25 °C (0 for components)
    delta_h: np.ndarray  # (n_species,) kJ/mol, NaN where some step is unknown
    partial_h: np.ndarray  # (n_species,) kJ/mol summed over the steps that have one
    kinds: tuple[str, ...]
    sources: tuple[str, ...]
    inputs: tuple[str, ...]  # the input species, in the order of ``input_nu``
    input_nu: np.ndarray  # (n_inputs, n_components)
    h: int  # index of H+ among the components

    @property
    def names(self) -> tuple[str, ...]:
        return tuple(s.name for s in self.species)

    @property
    def component_names(self) -> tuple[str, ...]:
        return tuple(c.name for c in self.components)

    @property
    def paired(self) -> frozenset[frozenset[str]]:
        """The pairs of components that form a species together (their association is solved)."""
        n_c = len(self.components)
        out: set[frozenset[str]] = set()
        for row in self.nu[n_c:]:
            held = [self.components[j].name for j in np.flatnonzero(row > 0)]
            out.update(frozenset((a, b)) for a in held for b in held if a != b)
        return frozenset(out)

    @property
    def z2(self) -> np.ndarray:
        """Squared charge of every species."""
        return np.array([s.charge**2 for s in self.species], dtype=float)

    def log_k_at(self, t: np.ndarray) -> np.ndarray:
        """log10 β (n_species, N) at temperatures t (°C) by van 't Hoff (unknown enthalpies: 25 °C values)."""
        inv = 1.0 / (np.asarray(t, dtype=float) + ZERO_CELSIUS) - 1.0 / (REFERENCE_TEMPERATURE + ZERO_CELSIUS)
        return np.asarray(self.log_k[:, None] - (self.partial_h[:, None] * 1e3 / (GAS_CONSTANT * LN10)) * inv[None, :])

    def temperature_notes(self, t: np.ndarray) -> list[str]:
        lo, hi = PARAMETER_WINDOW
        far = (t < lo) | (t > hi)
        if not np.any(far):
            return []
        unknown = [s.name for s, h in zip(self.species[len(self.components):],
                                          self.delta_h[len(self.components):], strict=True) if not np.isfinite(h)]
        if not unknown:
            return []
        return [f"equilibrium constants of {', '.join(unknown[:8])}{' …' if len(unknown) > 8 else ''} have no "
                f"tabulated reaction enthalpy: their 25 °C values are used at {float(t[far][0]):g} °C (outside "
                f"{lo:g}–{hi:g} °C)"]


@lru_cache(maxsize=1)
def _table_species() -> dict[str, tuple[dict[str, int], float, float, float, str, str]]:
    """Every table species expanded to components: name -> (components, log β, ΔH (NaN if any step unknown),
    ΔH summed over known steps, kind, sources)."""
    table = complex_table()
    out: dict[str, tuple[dict[str, int], float, float, float, str, str]] = {}

    def expand(name: str) -> tuple[dict[str, int], float, float, float, str, str]:
        if name in out:
            return out[name]
        rec = table[name]
        comps: dict[str, int] = {}
        logk, dh, part = rec.log_k, (rec.delta_h if rec.delta_h is not None else math.nan), rec.delta_h or 0.0
        if rec.base:
            if rec.base in table:
                bc, bk, bh, bp, _, _ = expand(rec.base)
                for c, n in bc.items():
                    comps[c] = comps.get(c, 0) + n
                logk, dh, part = logk + bk, dh + bh, part + bp
            else:
                comps[rec.base] = comps.get(rec.base, 0) + 1
        for a, n in rec.adds:
            if a in table:
                ac, ak, ah, ap, _, _ = expand(a)
                for c, m in ac.items():
                    comps[c] = comps.get(c, 0) + m * n
                logk, dh, part = logk + n * ak, dh + n * ah, part + n * ap
            else:
                comps[a] = comps.get(a, 0) + n
        comps = {c: n for c, n in comps.items() if n != 0}
        own = rec.delta_h if rec.delta_h is not None else math.nan  # the notes name the steps without one
        out[name] = (comps, logk, own, part, rec.kind, ";".join(rec.source))
        return out[name]

    for name in table:
        expand(name)
    return out


def _user_species(species: Iterable[Complex] | None) -> dict[str, tuple[dict[str, int], float, float, float, str,
                                                                         str, Ion]]:
    out = {}
    for c in species or ():
        if not isinstance(c, Complex):
            raise InputError(f"species must be ionact.Complex records, got {type(c).__name__}")
        ion = c.ion
        dh = c.delta_h if c.delta_h is not None else math.nan
        out[ion.name] = (dict(c.components), float(c.log_k), dh, c.delta_h or 0.0, c.kind, c.source, ion)
    return out


def network_for(inputs: Sequence[Ion], *, species: Iterable[Complex] | None = None,
                exclude_kinds: Iterable[str] = (), strict: bool = True) -> Network:
    """The network for these input species: their components, and every table (or given)
    species whose components are all present. ``exclude_kinds`` leaves out kinds of species
    (e.g. the weak ion pairs for a model whose parameters already hold them). A given species
    whose components are absent is an error when ``strict``, else left out (a job's
    standards lack the matrix ions its samples carry)."""
    table = _table_species()
    user = _user_species(species)
    known_ions = {i.name: i for i in inputs}
    user_ions = {k: v[6] for k, v in user.items()}
    exclude = set(exclude_kinds)

    def expand(name: str) -> dict[str, int]:
        if name in user:
            comps: dict[str, int] = {}
            for c, n in user[name][0].items():
                for cc, m in expand(c).items():
                    comps[cc] = comps.get(cc, 0) + m * n
            return comps
        if name in table:
            return dict(table[name][0])
        return {name: 1}

    input_comps = [expand(i.name) for i in inputs]
    comp_names = [_H]
    for d in input_comps:
        for c in d:
            if c not in comp_names:
                comp_names.append(c)
    comp_ions = []
    for c in comp_names:
        comp_ions.append(known_ions.get(c) or user_ions.get(c) or resolve_ion(c))
    formed = []
    candidates = [(n, v[0], v[1], v[2], v[3], v[4], v[5]) for n, v in table.items() if n not in user]
    candidates += [(n, expand(n), v[1] + _sum_logk(v[0], table, user), v[2], v[3], v[4], v[5])
                   for n, v in user.items()]
    for name, comps, lk_c, dh_c, part_c, kind, src in candidates:
        if kind in exclude or name in comp_names:
            continue
        if all(c in comp_names for c in comps):
            formed.append((name, comps, lk_c, dh_c, part_c, kind, src))
        elif name in user and strict:
            absent = sorted(c for c in comps if c not in comp_names)
            raise InputError(f"species {name} is formed from {', '.join(absent)}, which the solution does not contain")
    all_names = comp_names + [f[0] for f in formed]
    sp_ions = comp_ions + [known_ions.get(f[0]) or user_ions.get(f[0]) or resolve_ion(f[0]) for f in formed]
    nu = np.zeros((len(all_names), len(comp_names)))
    for i in range(len(comp_names)):
        nu[i, i] = 1.0
    logk = np.zeros(len(all_names))
    dh = np.zeros(len(all_names))
    part = np.zeros(len(all_names))
    kinds, srcs = ["component"] * len(comp_names), [""] * len(comp_names)
    for k, (_name, comps, lk, h, p, kind, src) in enumerate(formed, start=len(comp_names)):
        for c, n in comps.items():
            nu[k, comp_names.index(c)] = n
        logk[k], dh[k], part[k] = lk, h, p
        kinds.append(kind)
        srcs.append(src)
    in_nu = np.zeros((len(inputs), len(comp_names)))
    for r, d in enumerate(input_comps):
        for c, n in d.items():
            in_nu[r, comp_names.index(c)] = n
    charges = np.array([s.charge for s in sp_ions], dtype=float)
    comp_z = np.array([c.charge for c in comp_ions], dtype=float)
    bad = np.flatnonzero(np.abs(nu @ comp_z - charges) > 1e-9)
    if bad.size:
        raise InputError(f"species {all_names[int(bad[0])]} does not carry the charge of its components")
    return Network(tuple(comp_ions), tuple(sp_ions), nu, logk, dh, part, tuple(kinds), tuple(srcs),
                   tuple(i.name for i in inputs), in_nu, 0)


def _sum_logk(comps: Mapping[str, int], table: Mapping[str, Any], user: Mapping[str, Any]) -> float:
    """log β of user species given on top of other species: add the log β of the species it names."""
    total = 0.0
    for c, n in comps.items():
        if c in user:
            total += n * (user[c][1] + _sum_logk(user[c][0], table, user))
        elif c in table:
            total += n * table[c][1]
    return total


@dataclass(frozen=True)
class State:
    """The solved equilibrium of a batch (arrays over species × samples)."""

    molality: np.ndarray  # (n_species, N) mol/kg
    log10_gamma: np.ndarray  # (n_species, N)
    ionic: np.ndarray  # (N,)
    totals: np.ndarray  # (n_components, N) mol/kg
    converged: np.ndarray  # (N,) bool
    residual: np.ndarray  # (n_components, N) relative
    iterations: int
    choice: ModelChoice
    notes: tuple[str, ...]


def _molalities(net: Network, logk: np.ndarray, x: np.ndarray, lg: np.ndarray, log_ah: np.ndarray | None,
                alive: np.ndarray) -> np.ndarray:
    """Molalities of every species (n_s, N), mol/kg, from ln m of the components (n_c, N) and
    log10 γ; zero where ``alive`` is zero. log10 m = log K + ν·log10 a(components) − log10 γ,
    capped at 30 (nothing exceeds 10^30 mol/kg mid-iteration); computed in place, as this runs
    several times an iteration on the whole batch."""
    la = x / LN10
    la += lg[: len(net.components)]
    if log_ah is not None:
        la[net.h] = log_ah
    out = np.asarray(net.nu @ la)
    out += logk
    out -= lg
    np.minimum(out, 30.0, out=out)
    out *= LN10
    np.exp(out, out=out)
    out *= alive
    return out


def _alive(net: Network, absent: np.ndarray) -> np.ndarray:
    """1.0 for every species that can exist, 0.0 for an absent component and every species holding one."""
    n_c = len(net.components)
    holds = (net.nu != 0).astype(float)  # (n_s, n_c)
    holds[:n_c] = np.eye(n_c)
    return np.asarray(holds @ absent.astype(float) == 0.0, dtype=float)


class _Work:
    """The columns still iterating, gathered once and compacted as samples converge."""

    def __init__(self, cols: np.ndarray, **arrays: np.ndarray) -> None:
        self.cols = cols
        self.arrays = arrays

    def __getitem__(self, key: str) -> np.ndarray:
        return self.arrays[key]

    def __setitem__(self, key: str, value: np.ndarray) -> None:
        self.arrays[key] = value

    def keep(self, mask: np.ndarray) -> None:
        self.cols = self.cols[mask]
        self.arrays = {k: v[..., mask] for k, v in self.arrays.items()}


def equilibrate(net: Network, totals: np.ndarray, temperature: np.ndarray, choice: ModelChoice, *,
                ph: np.ndarray | None = None, max_iterations: int = MAX_ITERATIONS,
                start: np.ndarray | None = None) -> State:
    """Solve the network for component totals (n_c, N) mol/kg; ``ph`` holds a_H where given.

    The batch is solved in blocks of :data:`_BLOCK` samples so that each block's arrays stay
    in the processor's cache (the Jacobian stack is N × n_c² numbers); every block is
    vectorised, and a block's result does not depend on the others.
    """
    N = totals.shape[1]
    if N <= _BLOCK:
        return _equilibrate_block(net, totals, temperature, choice, ph=ph, max_iterations=max_iterations,
                                  start=start)
    t = np.broadcast_to(np.asarray(temperature, dtype=float), (N,))
    p = None if ph is None else np.broadcast_to(np.asarray(ph, dtype=float), (N,))
    parts = [_equilibrate_block(net, totals[:, i:i + _BLOCK], t[i:i + _BLOCK], choice,
                                ph=None if p is None else p[i:i + _BLOCK], max_iterations=max_iterations,
                                start=None if start is None else start[:, i:i + _BLOCK])
             for i in range(0, N, _BLOCK)]
    return State(np.concatenate([s.molality for s in parts], axis=1),
                 np.concatenate([s.log10_gamma for s in parts], axis=1),
                 np.concatenate([s.ionic for s in parts]), totals,
                 np.concatenate([s.converged for s in parts]),
                 np.concatenate([s.residual for s in parts], axis=1),
                 max(s.iterations for s in parts), choice, ())


def _equilibrate_block(net: Network, totals: np.ndarray, temperature: np.ndarray, choice: ModelChoice, *,
                       ph: np.ndarray | None, max_iterations: int, start: np.ndarray | None) -> State:
    """Solve one block of samples (see :func:`equilibrate`).

    Each sample takes positive-continued-fraction steps while far from its balances and
    damped Newton steps on ln m once within :data:`_SWITCH`; the activity coefficients start
    from the stoichiometric composition and follow the species once every balance is within
    :data:`_NEAR`, extrapolated each iteration to the self-consistent ionic strength, and the
    Newton Jacobian carries their dependence on I, so convergence stays quadratic. A sample
    is converged when every balance closes to :data:`TOLERANCE` and its ionic strength no
    longer moves; converged samples leave the working set, so the cost falls as the batch
    converges.
    """
    n_c = len(net.components)
    N = totals.shape[1]
    t = np.array(np.broadcast_to(np.asarray(temperature, dtype=float), (N,)))
    logk = net.log_k_at(t)
    log_ah = None if ph is None else -np.array(np.broadcast_to(np.asarray(ph, dtype=float), (N,)))
    unknown = np.ones(n_c, dtype=bool)
    if ph is not None:
        unknown[net.h] = False
    absent = (totals <= _NOTHING) & unknown[:, None]
    absent[net.h] = False
    alive = _alive(net, absent)
    x = np.where(totals > _NOTHING, np.log(np.maximum(totals, 1e-300)), -700.0) if start is None else np.array(start)
    if start is None:
        x[net.h] = math.log(1e-7)
    lg = _start_gammas(net, totals, t, choice)
    converged = np.zeros(N, dtype=bool)
    res = np.full((n_c, N), np.inf)
    z2 = net.z2
    cap = np.where(totals > 0, np.log(np.maximum(totals, 1e-300)), -700.0)
    cap[~unknown | (np.arange(n_c) == net.h)] = np.inf
    open_ = (unknown[:, None] & ~absent).astype(float)  # balances that must close
    extra = {} if log_ah is None else {"ah": log_ah}
    w = _Work(np.arange(N), x=x.copy(), lg=lg.copy(), tot=totals, logk=logk, alive=alive, cap=cap, open=open_,
              absent=absent, t=t, near=np.zeros(N, dtype=bool), ionic=np.full(N, np.inf),
              slope=np.zeros((len(net.species), N)), **extra)
    abs_nu_t = np.abs(net.nu.T)
    it = 0
    r = res
    for it in range(1, max_iterations + 1):
        m = _molalities(net, w["logk"], w["x"], w["lg"], w.arrays.get("ah"), w["alive"])
        ionic = 0.5 * z2 @ m
        near = w["near"]
        if np.any(near):  # γ from the composition at this x, made self-consistent, then the species again
            if np.all(near):  # (the usual case: no gathering and scattering of every column)
                lg_now, w["slope"] = _gammas_and_slopes(net, m, w["t"], ionic, choice)
                w["lg"] = np.require(lg_now, requirements=["O", "W"])  # moved in place below: never a kernel's own
            else:
                w["lg"][:, near], w["slope"][:, near] = _gammas_and_slopes(net, m[:, near], w["t"][near],
                                                                            ionic[near], choice)
            m = _molalities(net, w["logk"], w["x"], w["lg"], w.arrays.get("ah"), w["alive"])
            e = _gamma_shift(net, w["slope"], unknown)
            delta = (0.5 * z2 @ m - ionic) / np.maximum(1.0 - 0.5 * z2 @ (m * e), 0.1) * near
            w["lg"] += w["slope"] * (delta / LN10)
            m = _molalities(net, w["logk"], w["x"], w["lg"], w.arrays.get("ah"), w["alive"])
        tot = net.nu.T @ m
        r = w["open"] * (tot - w["tot"]) / (abs_nu_t @ m + np.abs(w["tot"]) + 1e-300)
        rmax = np.max(np.abs(r), axis=0)
        settled = np.abs(ionic - w["ionic"]) <= 1e-12 * np.maximum(ionic, 1e-300)
        conv = (rmax <= TOLERANCE) & settled & w["near"]
        done = w.cols[conv]
        x[:, done], lg[:, done], res[:, done], converged[done] = w["x"][:, conv], w["lg"][:, conv], r[:, conv], True
        if np.all(conv):
            break
        go = ~conv
        if not np.all(go):  # converged samples leave the working set
            w.keep(go)
            m, tot, r, rmax, ionic = m[:, go], tot[:, go], r[:, go], rmax[go], ionic[go]
        w["near"], w["ionic"] = rmax < _NEAR, ionic
        newton = (rmax < _SWITCH) | (it > _PCF_STEPS)
        if np.all(newton):
            w["x"] = np.minimum(_newton_step(net, m, tot, w["tot"], w["x"], unknown, w["absent"], w["slope"]),
                                w["cap"])
            continue
        nw, pc = newton, ~newton
        if np.any(nw):
            w["x"][:, nw] = np.minimum(_newton_step(net, m[:, nw], tot[:, nw], w["tot"][:, nw], w["x"][:, nw],
                                                    unknown, w["absent"][:, nw], w["slope"][:, nw]),
                                       w["cap"][:, nw])
        w["x"][:, pc] = _pcf_step(net, m[:, pc], w["tot"][:, pc], w["x"][:, pc], unknown, w["absent"][:, pc])
    else:
        x[:, w.cols], lg[:, w.cols], res[:, w.cols] = w["x"], w["lg"], r
    m = _molalities(net, logk, x, lg, log_ah, alive)
    ionic = 0.5 * z2 @ m
    return State(m, lg, ionic, totals, converged, res, it, choice, ())


def _pcf_step(net: Network, m: np.ndarray, totals: np.ndarray, x: np.ndarray, unknown: np.ndarray,
              absent: np.ndarray) -> np.ndarray:
    """A positive-continued-fraction step: each balance's free amount scaled toward its total.

    The balance of component j splits into the species that hold it (ν > 0) and those that
    take it away (ν < 0, e.g. OH- for H+): Σ⁺ − Σ⁻ = T. The free amount is scaled by
    ((T + Σ⁻)/Σ⁺)^(1/ν̄) — robust far from the answer, where Newton's linearisation is not.
    """
    pos = np.where(net.nu > 0, net.nu, 0.0)
    neg = np.where(net.nu < 0, -net.nu, 0.0)
    sp, sn = pos.T @ m, neg.T @ m  # (n_c, N)
    nbar = np.maximum((pos**2).T @ m / np.maximum(sp, 1e-300), 1.0)  # mean stoichiometry, weighted
    up = totals + sn
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        step = np.where(up > 0, np.log(up / np.maximum(sp, 1e-300)) / nbar,
                        -np.log(np.maximum(sp - totals, 1e-300) / np.maximum(sn, 1e-300)))
    step = np.clip(np.nan_to_num(step), -_MAX_STEP, _MAX_STEP)
    if unknown[net.h]:  # the proton balance is solved in one dimension instead (see _proton_shift)
        step[net.h] = _proton_shift(net, m, totals[net.h])
    keep = ~unknown[:, None] | absent
    return np.asarray(np.where(keep, x, x + step))


def _proton_shift(net: Network, m: np.ndarray, total_h: np.ndarray) -> np.ndarray:
    """The change of ln m(H+) that closes the proton balance with every other free amount held.

    Raising ln h by δ scales species i by exp(ν_iH δ), so the balance is the one-dimensional
    f(δ) = Σ_i ν_iH m_i exp(ν_iH δ) − T_H, strictly increasing (f′ = Σ ν_iH² m_i exp(ν_iH δ) > 0).
    A bracketed Newton iteration on δ solves it for every sample at once. The positive
    continued fraction handles the other balances well but a buffered proton balance (large
    amounts on both sides, a total near zero) slowly; this start puts the pH near its answer.
    """
    rows = np.flatnonzero(net.nu[:, net.h])
    nu = net.nu[rows, net.h][:, None]
    mh = m[rows]
    delta = np.zeros(m.shape[1])
    lo = np.full_like(delta, -np.inf)
    hi = np.full_like(delta, np.inf)
    with np.errstate(over="ignore", invalid="ignore"):
        for _ in range(60):
            terms = nu * mh * np.exp(np.minimum(nu * delta, 700.0))
            f = terms.sum(axis=0) - total_h
            df = (nu * terms).sum(axis=0)
            lo = np.where(f < 0, delta, lo)
            hi = np.where(f > 0, delta, hi)
            step = np.clip(-f / np.maximum(df, 1e-300), -_MAX_STEP, _MAX_STEP)
            new = delta + step
            outside = (new <= lo) | (new >= hi)
            both = np.isfinite(lo) & np.isfinite(hi)
            new = np.where(outside & both, 0.5 * (lo + hi), new)
            moved = np.abs(new - delta)
            delta = np.where(np.isfinite(new), new, delta)
            if np.all(moved < 1e-12):
                break
    return np.clip(delta, -8 * _MAX_STEP, 8 * _MAX_STEP)


def _gammas(net: Network, m: np.ndarray, t: np.ndarray, choice: ModelChoice) -> np.ndarray:
    return np.asarray(choice.info.kernel(Batch.of(net.species, m, t), choice.options)[0])


def _start_gammas(net: Network, totals: np.ndarray, t: np.ndarray, choice: ModelChoice) -> np.ndarray:
    """log10 γ with every component free at its total: the start, so that switching the
    activity coefficients on near the answer does not throw the balances back."""
    m0 = np.zeros((len(net.species), totals.shape[1]))
    m0[: len(net.components)] = np.maximum(totals, 0.0)
    m0[net.h] = 1e-7
    return _gammas(net, m0, t, choice)


_RAISE = 1e-5  # relative rise of every molality for the numerical ∂ln γ/∂I


def _gammas_and_slopes(net: Network, m: np.ndarray, t: np.ndarray, ionic: np.ndarray,
                       choice: ModelChoice) -> tuple[np.ndarray, np.ndarray]:
    """log10 γ of every species and ∂ln γ/∂I (kg/mol): analytic for models of the charge alone,
    else from every molality raised by :data:`_RAISE` (exact for models of I alone; along the
    composition for the others)."""
    lg = _gammas(net, m, t, choice)
    if choice.info.charge_only:  # analytic: ln10·z²·f′(I) for ions, ln10·k = ln10·lg/I for neutral species
        i_s = np.maximum(ionic, 1e-300)
        _, df = unit_log_gamma(choice.name, i_s, dh_a_array(t), choice.options.davies_coefficient)
        z2 = net.z2[:, None]
        return lg, np.where(z2 > 0, (LN10 * z2) * df, lg * LN10 / i_s)
    up = _gammas(net, m * (1.0 + _RAISE), t, choice)
    return lg, (up - lg) * LN10 / (_RAISE * np.maximum(ionic, 1e-300))


def _newton_step(net: Network, m: np.ndarray, tot: np.ndarray, totals: np.ndarray, x: np.ndarray,
                 unknown: np.ndarray, absent: np.ndarray, slope: np.ndarray) -> np.ndarray:
    """One damped Newton step on ln m of the unknown components, all samples at once.

    The Jacobian of the balances at fixed γ, A_jk = Σ_i ν_ij ν_ik m_i, is one matrix product
    for the whole batch; it is symmetric and positive semi-definite. Activity coefficients
    move with the ionic strength: with ``slope`` = ∂ln γ/∂I, ln m_i moves by e_i·dI/dx_k where
    e_i = Σ_k ν_ik ∂ln γ_k/∂I − ∂ln γ_i/∂I and dI/dx_k = q_k/(1 − ½Σ_i z_i² m_i e_i),
    q_k = ½ Σ_i z_i² ν_ik m_i (the denominator is the feedback of γ on I). The full Jacobian is
    J = A + p qᵀ with p_j = Σ_i ν_ij m_i e_i, which keeps the convergence quadratic where γ
    changes (exact for models of I alone, checked against finite differences in the tests);
    it is solved by the Sherman–Morrison identity from A's solutions for r and p, so the
    elimination runs on the symmetric A. Components that no formed species holds have a
    diagonal row in A and are solved by a division, the others by elimination. An absent
    component's row and column are zero (no species holds it) and get a unit diagonal, so
    every matrix is solvable; diagonal scaling keeps the stack well conditioned across twenty
    decades of concentration.
    """
    u = np.flatnonzero(unknown)
    nu = net.nu[:, u]
    fixed = absent[u].astype(float)  # (k, N)
    me = m * _gamma_shift(net, slope, unknown)
    feedback = 1.0 - 0.5 * net.z2 @ me  # I moves γ, which moves I again: dI/dx = q / (1 − ½Σz²m e)
    q = (0.5 * (net.z2[:, None] * nu).T @ m) / np.maximum(feedback, 0.1)
    p = nu.T @ me
    r = (tot[u] - totals[u]) * (1.0 - fixed)
    rhs = np.stack([r, p], axis=1)  # (k, 2, N): both right-hand sides through one elimination
    sol = np.empty_like(rhs)
    alone, coupled = _split(net, unknown)
    if alone.size:
        diag = (nu[:, alone] ** 2).T @ m + fixed[alone] + 1e-300
        sol[alone] = rhs[alone] / diag[:, None, :]
    if coupled.size:
        a, d = _scaled_jacobian(net, unknown, coupled, m, fixed[coupled])
        b = rhs[coupled] * d[:, None, :]
        xs, bad = _solve_stack(a, b)
        if bad.size:  # rare: samples whose unpivoted elimination failed get the pseudo-inverse
            a_bad, _ = _scaled_jacobian(net, unknown, coupled, m[:, bad], fixed[coupled][:, bad])
            fin = np.all(np.isfinite(a_bad), axis=(0, 1)) & np.all(np.isfinite(b[:, :, bad]), axis=(0, 1))
            if np.any(fin):  # a non-finite system keeps no step (zeros below)
                xs[:, :, bad[fin]] = np.einsum("nij,jrn->irn", np.linalg.pinv(a_bad[:, :, fin].transpose(2, 0, 1)),
                                               b[:, :, bad[fin]])
        sol[coupled] = np.nan_to_num(xs, nan=0.0, posinf=0.0, neginf=0.0) * d[:, None, :] if bad.size else \
            xs * d[:, None, :]
    y, w = sol[:, 0], sol[:, 1]
    den = 1.0 + np.einsum("kn,kn->n", q, w)
    ok = np.abs(den) > 1e-8  # else the step at fixed γ
    dx = -(y - w * np.where(ok, np.einsum("kn,kn->n", q, y) / np.where(ok, den, 1.0), 0.0))
    big = np.max(np.abs(dx), axis=0)
    dx *= np.minimum(1.0, _MAX_STEP / np.maximum(big, 1e-300))
    out = np.array(x)
    out[u] += dx
    return out


def _gamma_shift(net: Network, slope: np.ndarray, unknown: np.ndarray) -> np.ndarray:
    """∂ln m_i/∂I at fixed free components: e_i = Σ_k ν_ik ∂ln γ_k/∂I − ∂ln γ_i/∂I over the
    unknown components k (a held a(H+) fixes m(H+)·γ(H+) instead)."""
    return np.asarray(net.nu[:, unknown] @ slope[: len(net.components)][unknown] - slope)


def _scaled_jacobian(net: Network, unknown: np.ndarray, coupled: np.ndarray, m: np.ndarray, fixed: np.ndarray
                     ) -> tuple[np.ndarray, np.ndarray]:
    """The fixed-γ Jacobian of the coupled unknown components, (k, k, N) with the samples last,
    scaled to a unit diagonal, and the scale d (k, N): the matrix is D A D (+1e-13 on the
    diagonal so that none is singular); an absent component (``fixed`` 1) gets a unit diagonal."""
    kc = coupled.size
    a = (_pairs(net, unknown, coupled).T @ m).reshape(kc, kc, -1)
    dg = np.einsum("jjn->jn", a)
    dg += fixed + 1e-300
    d = 1.0 / np.sqrt(dg)
    a *= d[:, None, :]
    a *= d[None, :, :]
    a[np.arange(kc), np.arange(kc)] += 1e-13
    return a, d


def _solve_stack(a: np.ndarray, b: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Solve a stack of small symmetric systems, a (k, k, N) and b (k, R, N), samples last.

    Gaussian elimination vectorised over the stack, faster than a LAPACK call per matrix
    for k ≲ 10; ``a`` is overwritten. The matrices are diagonally scaled symmetric positive
    (semi-)definite Jacobians with a unit diagonal, so no pivoting is needed, and the trailing
    block stays symmetric: only its upper triangle is updated, and each step's multipliers
    come from the pivot's row (its column by symmetry). Returns the solutions and the samples
    whose elimination broke down (a non-finite result), for the caller to solve otherwise.
    """
    k = b.shape[0]
    y = np.array(b)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        for c in range(k - 1):
            f = a[c, c + 1:] / a[c, c]
            for i in range(c + 1, k):
                a[i, i:] -= f[i - c - 1] * a[c, i:]
            y[c + 1:] -= f[:, None, :] * y[c][None]
        x = np.empty_like(y)
        for c in range(k - 1, -1, -1):
            x[c] = (y[c] - np.einsum("jn,jrn->rn", a[c, c + 1:], x[c + 1:])) / a[c, c]
    bad = np.flatnonzero(~np.isfinite(x.sum(axis=(0, 1))))
    return x, bad


def _split(net: Network, unknown: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Positions among the unknown components of those no formed species holds (their row of
    the Jacobian at fixed γ is diagonal) and of the others."""
    n_c = len(net.components)
    held = np.any(net.nu[n_c:, unknown] != 0, axis=0)
    return np.flatnonzero(~held), np.flatnonzero(held)


def _pairs(net: Network, unknown: np.ndarray, which: np.ndarray) -> np.ndarray:
    """ν_ij ν_ik over the unknown components at positions ``which`` for every species,
    flattened to (n_species, k²)."""
    nu = net.nu[:, unknown][:, which]
    return (nu[:, :, None] * nu[:, None, :]).reshape(len(net.species), -1)



@dataclass(frozen=True)
class Speciation:
    """The equilibrium of a solution (or batch): every species, its activity, the pH and the
    saturation indices.

    Attributes
    ----------
    species : tuple of str
        Every species, components (free ions) first.
    molality, activity, gamma : ndarray
        ``(n_species, *shape)``: mol/kg, molal-scale activity, activity coefficient.
    ionic_strength : ndarray
        From all species, mol/kg.
    pH : ndarray
        −log10 a(H+), given and held or solved from the proton balance.
    saturation_index : mapping
        Solid -> SI = log10 IAP − log10 Ksp, for every tabulated solid whose ions are present.
    fractions : mapping
        Component -> {species: fraction of the component's total in that species}.
    model : ModelChoice
    notes : tuple of str
    iterations : int
    converged : ndarray
        Per sample; a batch keeps every sample and marks the ones that did not converge
        (``status``/``reason``), a single solution raises instead.
    """

    species: tuple[str, ...]
    components: tuple[str, ...]
    molality: np.ndarray
    gamma: np.ndarray
    ionic_strength: np.ndarray
    pH: np.ndarray
    saturation_index: Mapping[str, np.ndarray]
    fractions: Mapping[str, Mapping[str, np.ndarray]]
    totals: Mapping[str, np.ndarray]
    model: ModelChoice
    notes: tuple[str, ...]
    iterations: int
    converged: np.ndarray
    status: tuple[str, ...] = field(default=())
    reason: tuple[str, ...] = field(default=())

    def __post_init__(self) -> None:
        for name in ("molality", "gamma", "ionic_strength", "pH", "converged"):
            a = np.array(getattr(self, name), copy=True)
            a.setflags(write=False)
            object.__setattr__(self, name, a)
        object.__setattr__(self, "saturation_index", frozen_map({k: readonly(v) for k, v in
                                                                 self.saturation_index.items()}))
        object.__setattr__(self, "fractions", frozen_map({k: frozen_map({s: readonly(f) for s, f in v.items()})
                                                          for k, v in self.fractions.items()}))
        object.__setattr__(self, "totals", frozen_map({k: readonly(v) for k, v in self.totals.items()}))

    @property
    def activity(self) -> np.ndarray:
        return np.asarray(self.gamma * self.molality)

    def _row(self, name: str) -> int:
        key = name if name in self.species else Ion.parse(name).name
        if key not in self.species:
            raise UnknownSpeciesError(f"{name} is not a species of this equilibrium ({', '.join(self.species)})")
        return self.species.index(key)

    def free(self, name: str) -> float | np.ndarray:
        """Free molality of a species (mol/kg)."""
        return _out(self.molality[self._row(name)])

    def activity_of(self, name: str) -> float | np.ndarray:
        """Activity of a species (molal scale)."""
        i = self._row(name)
        return _out(self.gamma[i] * self.molality[i])

    def free_fraction(self, component: str) -> float | np.ndarray:
        """Fraction of a component's total that is free."""
        key = component if component in self.fractions else Ion.parse(component).name
        if key not in self.fractions:
            raise UnknownSpeciesError(f"{component} is not a component here ({', '.join(self.fractions)})")
        return _out(self.fractions[key][key])

    def table(self, limit: int = 40) -> str:
        """A plain-text table of species (first sample of a batch)."""
        from .species import typeset

        idx: tuple[int, ...] = (0,) * (self.molality.ndim - 1)
        lines = [f"pH {float(self.pH[idx]):.3f}   I = {float(self.ionic_strength[idx]):.4g} mol/kg   model "
                 f"{self.model.name}", f"{'species':<14}{'mol/kg':>12}{'γ':>9}{'activity':>12}"]
        order = np.argsort(-self.molality.reshape(len(self.species), -1)[:, 0])
        for i in order[:limit]:
            lines.append(f"{typeset(self.species[i]):<14}{self.molality[(i, *idx)]:>12.4g}"
                         f"{self.gamma[(i, *idx)]:>9.4f}{self.activity[(i, *idx)]:>12.4g}")
        if self.saturation_index:
            lines.append("saturation indices: " + ", ".join(f"{k} {float(np.asarray(v)[idx]):+.2f}"
                                                            for k, v in self.saturation_index.items()))
        lines += [f"note: {n}" for n in self.notes]
        return "\n".join(lines)

    def _repr_html_(self) -> str:
        from ._display import html_table

        rows = [(s, self.molality[i], self.gamma[i], self.activity[i]) for i, s in enumerate(self.species)]
        return html_table(("species", "molality / mol kg⁻¹", "γ", "activity"), rows, repr(self), limit=40)

    def __repr__(self) -> str:
        shape = self.molality.shape[1:]
        return (f"Speciation({len(self.species)} species{f', batch {shape}' if shape else ''}, model "
                f"{self.model.name}, pH {float(np.nanmean(self.pH)):.3f})")

    def to_dict(self) -> dict[str, Any]:
        return dict(plain({"format": "ionact-speciation", "version": 1, "species": list(self.species),
                           "components": list(self.components), "molality": self.molality,
                           "gamma": self.gamma, "ionic_strength": self.ionic_strength, "pH": self.pH,
                           "saturation_index": dict(self.saturation_index),
                           "fractions": {k: dict(v) for k, v in self.fractions.items()},
                           "totals": dict(self.totals), "model": self.model, "notes": list(self.notes),
                           "iterations": self.iterations, "converged": self.converged, "status": list(self.status),
                           "reason": list(self.reason)}))

    @classmethod
    def from_dict(cls, d: Mapping[str, Any]) -> Speciation:
        if not isinstance(d, Mapping) or d.get("format") != "ionact-speciation":
            raise InputError("not an ionact speciation")

        def arr(v: Any) -> np.ndarray:
            return np.array(np.asarray(v, dtype=object).tolist(), dtype=float)

        return cls(tuple(d["species"]), tuple(d["components"]), arr(d["molality"]), arr(d["gamma"]),
                   arr(d["ionic_strength"]), arr(d["pH"]), {k: arr(v) for k, v in d["saturation_index"].items()},
                   {k: {s: arr(f) for s, f in v.items()} for k, v in d["fractions"].items()},
                   {k: arr(v) for k, v in d["totals"].items()}, ModelChoice.from_dict(d["model"]),
                   tuple(d.get("notes", ())), int(d["iterations"]), np.asarray(d["converged"], dtype=bool),
                   tuple(d.get("status", ())), tuple(d.get("reason", ())))


def _out(x: np.ndarray) -> float | np.ndarray:
    a = np.asarray(x)
    return float(a) if a.ndim == 0 else a


def _solids(net: Network, solids: Mapping[str, float] | None) -> list[tuple[str, list[tuple[int, int]], float]]:
    table = {k: v[0] for k, v in ksp_table().items()}
    if solids is not None:
        if not isinstance(solids, Mapping):
            raise InputError("solids must be a mapping of solid formula -> log10 Ksp")
        for k, v in solids.items():
            if isinstance(v, bool) or not isinstance(v, int | float) or not math.isfinite(v):
                raise InputError(f"log10 Ksp of {k} {v!r} must be a finite number")
            table[k] = float(v)
    out = []
    names = net.names
    for solid, log_ksp in table.items():
        s = Salt.parse(solid)
        if all(i in names for i, _ in s.ions):
            out.append((solid, [(names.index(i), n) for i, n in s.ions], log_ksp))
    return out


def _pairless(choice: ModelChoice) -> tuple[str, ...]:
    return tuple(PAIR_KINDS) if choice.name == "pitzer" else ()


def speciate(solution: Any, *, pH: Any = None, model: str = "auto", temperature: Any = None,
             species: Iterable[Complex] | None = None, solids: Mapping[str, float] | None = None,
             missing: str = "error", max_iterations: int = MAX_ITERATIONS, **model_options: Any) -> Speciation:
    """The equilibrium speciation of a solution (or batch) of total amounts.

    Parameters
    ----------
    solution : Solution
        Totals: each species given is expanded into its components (CH3COOH → CH3COO- + H+,
        HPO4^2- → PO4^3- + H+ …).
    pH : float or array_like, optional
        Held (activity scale); None solves it from the proton balance.
    model : str
        Activity model or "auto" (resolved on the species, complexes included). With Pitzer
        the weak ion pairs of the table are left out (its parameters already hold them).
    temperature : float, optional
        °C; default the solution's.
    species : iterable of Complex, optional
        Species to add or to override table values (complexing agents, their protonation).
    solids : mapping, optional
        Solid formula -> log10 Ksp, added to (or overriding) the table's.
    missing : str
        Missing model parameters: "error", "zero", or a fallback model name.
    max_iterations : int
        Newton iterations allowed per sample before it is reported as not converged.
    **model_options
        Passed to the activity model (sizes, davies_coefficient, …).

    Returns
    -------
    Speciation
        Molalities (mol/kg), activities and γ of every species, ionic strength, pH,
        saturation indices, each component's fractions, iterations and per-sample status.

    Raises
    ------
    ConvergenceError
        A single solution that does not converge (naming the balance); a batch marks the
        sample in ``status`` instead and keeps every row.
    InputError, UnknownSpeciesError
        A pH outside 0–14, a non-finite constant, an unknown species.

    References
    ----------
    F. M. M. Morel and J. G. Hering, *Principles and Applications of Aquatic Chemistry*,
    Wiley (1993), ch. 2 (the tableau); F. M. M. Morel and J. J. Morgan, Environ. Sci.
    Technol. 6 (1972) 58 (Newton on the free components); J. Carrayrou, R. Mosé and
    P. Behra, AIChE J. 48 (2002) 894 (the positive continued fraction start); formation
    constants from the compilations named in each table row (all from memory).

    Examples
    --------
    >>> import ionact as ia
    >>> s = ia.speciate(ia.Solution({"Na+": 0.001, "F-": 0.001}), pH=3.17, model="davies")
    >>> 0.5 < float(s.free_fraction("F-")) < 0.6
    True
    """
    from .solution import Solution

    if not isinstance(solution, Solution):
        raise InputError(f"speciate needs a Solution of totals, got {type(solution).__name__}")
    sol = solution if temperature is None else solution.with_temperature(temperature)
    name, opts, fallback = choice_for(model, missing=missing, **model_options)
    ph = held_ph(pH, sol.shape)
    inputs = tuple(sol.ion(n) for n in sol.ions)
    N = sol.size
    m_in = np.asarray(sol.molality_array).reshape(len(inputs), N)
    t = np.asarray(sol.temperature, dtype=float).reshape(N)
    net = network_for(inputs, species=species)
    choice = _resolve(net, m_in, t, name, opts, fallback)
    if _pairless(choice):
        net = network_for(inputs, species=species, exclude_kinds=_pairless(choice))
    state = _solve(net, m_in, t, choice, ph, max_iterations)
    if name == "auto":
        again = resolve_model(Batch.of(net.species, state.molality, t), "auto", options=opts, fallback=fallback)
        if again.name != choice.name:
            net = network_for(inputs, species=species, exclude_kinds=_pairless(again))
            choice = again
            state = _solve(net, m_in, t, choice, ph, max_iterations)
    return _result(net, state, sol.shape, t, solids, ph)


def held_ph(pH: Any, shape: tuple[int, ...]) -> np.ndarray | None:
    """A held pH broadcast over a batch of ``shape`` (flattened), or None; checked to lie in 0–14."""
    if pH is None:
        return None
    if isinstance(pH, bool) or isinstance(pH, str):
        raise InputError(f"pH {pH!r} must be a number (activity scale)")
    arr = np.asarray(pH, dtype=float)
    if not np.all(np.isfinite(arr)) or np.any(arr < 0) or np.any(arr > 14):
        raise InputError(f"pH {pH!r} is outside 0–14")
    try:
        return np.broadcast_to(arr, shape).reshape(-1)
    except ValueError:
        raise InputError(f"pH of shape {arr.shape} does not match the batch {shape}") from None


def _resolve(net: Network, m_in: np.ndarray, t: np.ndarray, name: str, opts: Any, fallback: str | None
             ) -> ModelChoice:
    guess = np.zeros((len(net.species), m_in.shape[1]))
    guess[: len(net.components)] = np.maximum(net.input_nu.T @ m_in, 0.0)
    return resolve_model(Batch.of(net.species, guess, t), name, options=opts, fallback=fallback)


def _solve(net: Network, m_in: np.ndarray, t: np.ndarray, choice: ModelChoice, ph: np.ndarray | None,
           max_iterations: int) -> State:
    totals = net.input_nu.T @ m_in
    return equilibrate(net, totals, t, choice, ph=ph, max_iterations=max_iterations,
                       start=_start_from_inputs(net, m_in, totals, t, ph))


def _start_from_inputs(net: Network, m_in: np.ndarray, totals: np.ndarray, t: np.ndarray,
                       ph: np.ndarray | None) -> np.ndarray:
    """ln m of the components to start from: each input species present at its own amount.

    A component given only inside an input species (carbonate in HCO3-, phosphate in
    H2PO4-) starts where that species holds its total at the held or a neutral pH, not at
    the total itself, which would put the species many decades too high and cost the
    solver its first iterations. Every other component starts at its total.
    """
    n_c = len(net.components)
    la = np.log10(np.maximum(totals, 1e-300))
    la[net.h] = -7.0 if ph is None else -np.asarray(ph, dtype=float)
    given = {net.names.index(n) for n in net.inputs if n in net.names}
    logk = net.log_k_at(t)
    picked = np.full(la.shape, -np.inf)
    for r, name in enumerate(net.inputs):
        i = net.names.index(name) if name in net.names else -1
        row = net.input_nu[r]
        held = [j for j in np.flatnonzero(row) if j != net.h]
        if i < n_c or len(held) != 1 or held[0] in given or row[held[0]] <= 0:
            continue
        j = held[0]
        with np.errstate(divide="ignore"):
            cand = (np.log10(m_in[r]) - logk[i] - row[net.h] * la[net.h]) / row[j]
        picked[j] = np.maximum(picked[j], np.minimum(cand, la[j]))
    la = np.where(np.isfinite(picked), picked, la)
    return np.asarray(np.where((totals > _NOTHING) | (np.arange(n_c) == net.h)[:, None], LN10 * la, -700.0))


def _result(net: Network, state: State, shape: tuple[int, ...], t: np.ndarray,
            solids: Mapping[str, float] | None, ph: np.ndarray | None) -> Speciation:
    n_c = len(net.components)
    m, lg = state.molality, state.log10_gamma
    ev = evaluate(state.choice, Batch.of(net.species, m, t), paired=net.paired)
    problems = [str(v) for v in ev.violations] + net.temperature_notes(t)
    for problem in dict.fromkeys(problems):  # range problems warn (or raise under strict) and stay in the notes
        warn_range(problem)
    notes = list(ev.notes) + problems
    status, reason = _statuses(net, state)
    if not shape and not bool(state.converged[0]):
        raise ConvergenceError(reason[0], value=None, field="equilibrium")
    log_a = lg + np.log10(np.maximum(m, 1e-300))
    ph_out = -log_a[net.h] if ph is None else ph
    si = {}
    for solid, parts, log_ksp in _solids(net, solids):
        si[solid] = (sum(n * log_a[i] for i, n in parts) - log_ksp).reshape(shape)
    fractions: dict[str, dict[str, np.ndarray]] = {}
    for j, comp in enumerate(net.components):
        if j == net.h:
            continue
        tot = state.totals[j]
        with np.errstate(invalid="ignore", divide="ignore"):
            fr = {net.species[i].name: np.where(tot > _NOTHING, net.nu[i, j] * m[i] / tot, np.nan).reshape(shape)
                  for i in np.flatnonzero(net.nu[:, j] > 0)}
        fractions[comp.name] = fr
    bad = ~state.converged
    m_out = np.where(bad[None, :], np.nan, m)
    g_out = np.where(bad[None, :], np.nan, np.power(10.0, lg))
    totals = {c.name: state.totals[j].reshape(shape) for j, c in enumerate(net.components) if j < n_c}
    return Speciation(net.names, net.component_names, m_out.reshape(len(net.species), *shape),
                      g_out.reshape(len(net.species), *shape), np.where(bad, np.nan, state.ionic).reshape(shape),
                      np.where(bad, np.nan, ph_out).reshape(shape), si, fractions, totals, state.choice,
                      tuple(dict.fromkeys(notes)), state.iterations, state.converged.reshape(shape),
                      tuple(status), tuple(reason))


def _statuses(net: Network, state: State) -> tuple[list[str], list[str]]:
    """Per sample: "converged", or "not converged" with the balance that stayed open."""
    ok = np.asarray(state.converged, dtype=bool)
    status = np.where(ok, "converged", "not converged").tolist()
    reason = np.where(ok, "converged", "").astype(object)
    for k in np.flatnonzero(~ok):  # messages only for the samples that failed
        j = int(np.argmax(np.abs(state.residual[:, k])))
        reason[k] = (f"sample {k}: the {net.components[j].name} balance did not close after {state.iterations} "
                     f"iterations (relative residual {float(state.residual[j, k]):.2g}); the sample is left out")
    return status, reason.tolist()


def ph_of(solution: Any, *, model: str = "auto", **kwargs: Any) -> float | np.ndarray:
    """pH (activity scale) of a composition from its proton balance, amphiprotic species included.

    Parameters
    ----------
    solution : Solution
        Totals of the composition (acids, bases and salts as given).
    model : str
        Activity model or "auto".
    **kwargs
        Passed to :func:`speciate` (``temperature``, ``species``, ``missing`` …).

    Returns
    -------
    float or numpy.ndarray
        pH = −log10 a(H+), one per sample.

    Raises
    ------
    ConvergenceError
        A single solution whose proton balance does not close.
    InputError
        An unknown species or a bad constant.

    References
    ----------
    F. M. M. Morel and J. G. Hering, *Principles and Applications of Aquatic Chemistry*,
    Wiley (1993), ch. 3 (the proton balance; from memory).

    Examples
    --------
    >>> import ionact as ia
    >>> round(ia.ph_of(ia.Solution({"Na+": 0.01, "CH3COO-": 0.01, "CH3COOH": 0.01}), model="davies"), 2)
    4.71
    """
    return _out(speciate(solution, model=model, **kwargs).pH)


@lru_cache(maxsize=512)
def _cached_network(inputs: tuple[Ion, ...], exclude: tuple[str, ...]) -> Network:
    return network_for(inputs, exclude_kinds=exclude)


def _network(inputs: tuple[Ion, ...], species: Iterable[Complex] | None, exclude: tuple[str, ...]) -> Network:
    if species is None:
        return _cached_network(inputs, exclude)
    return network_for(inputs, species=species, exclude_kinds=exclude, strict=False)


ASSOCIATING_KINDS = frozenset({"pair", "complex", "hydrolysis"})


def reacts(net: Network) -> bool:
    """Whether ions of the inputs associate (pairs, complexes, hydrolysis) — the case where free and
    total differ enough to speciate by default. Protonation alone (an acid with its conjugate base)
    is speciated when a pH is held, species are given, or ``equilibrium=True``."""
    n_c = len(net.components)
    return any(kind in ASSOCIATING_KINDS for kind in net.kinds[n_c:])


@dataclass(frozen=True)
class Step:
    """Steps 2–3 of the path for a batch of input species: the model, the inputs' stoichiometric
    log10 γ (a_free / m_total for components; the species' own γ otherwise), and the equilibrium."""

    choice: ModelChoice
    log10_gamma: np.ndarray  # (n_inputs, N) stoichiometric
    state: State | None
    network: Network | None
    notes: tuple[str, ...]
    violations: tuple[Any, ...]
    rows: np.ndarray | None = None  # given: log10_gamma has a row per z² (and per neutral); input k's is rows[k]


def species_step(inputs: tuple[Ion, ...], m_in: np.ndarray, t: np.ndarray, model: str, opts: Any,
                 fallback: str | None, *, equilibrium: bool | None = None, ph: np.ndarray | None = None,
                 species: Iterable[Complex] | None = None, choice: ModelChoice | None = None,
                 max_iterations: int = MAX_ITERATIONS, checks: bool = True, batch: Batch | None = None,
                 by_charge: bool = False) -> Step:
    """Speciate where the inputs react (or as asked) and evaluate the model: one call for every job.

    ``checks=False`` skips the model's notes and range checks (for inner loops that call it
    many times; the final evaluation of a job makes them). ``batch`` is the inputs' Batch when
    the caller has built it already. ``by_charge``: where nothing is speciated and the model
    depends on z² and I alone, evaluate one species per z² (and every neutral one) and say in
    ``Step.rows`` which row is each input's.
    """
    batch = batch if batch is not None else Batch.of(inputs, m_in, t)
    free_choice = choice or resolve_model(batch, model, options=opts, fallback=fallback)
    if equilibrium is False or (equilibrium is None and ph is None and species is None
                                and not reacts(_network(inputs, None, _pairless(free_choice)))):
        if not checks:
            return Step(free_choice, free_choice.info.kernel(batch, free_choice.options)[0], None, None, (), ())
        if by_charge and free_choice.info.charge_only:
            reps, rows = _one_per_charge(batch.z)
            ev = evaluate(free_choice, batch, rows=reps)
            return Step(free_choice, ev.log10_gamma, None, None, ev.notes, ev.violations, rows)
        ev = evaluate(free_choice, batch)
        return Step(free_choice, ev.log10_gamma, None, None, ev.notes, ev.violations)
    net = _network(inputs, species, ())
    ch = choice or _resolve(net, m_in, t, model, opts, fallback)
    if _pairless(ch):
        net = _network(inputs, species, _pairless(ch))
    state = _solve(net, m_in, t, ch, ph, max_iterations)
    if choice is None and model == "auto":
        again = resolve_model(Batch.of(net.species, state.molality, t), "auto", options=opts, fallback=fallback)
        if again.name != ch.name:
            ch = again
            net = _network(inputs, species, _pairless(ch))
            state = _solve(net, m_in, t, ch, ph, max_iterations)
    lg = _stoichiometric(net, state, inputs)
    if not checks:
        return Step(ch, lg, state, net, (), ())
    ev = evaluate(ch, Batch.of(net.species, state.molality, t), paired=net.paired)
    far = tuple(Violation("temperature", n) for n in net.temperature_notes(t))
    return Step(ch, lg, state, net, ev.notes, ev.violations + far)


def _one_per_charge(z: np.ndarray) -> tuple[list[int], np.ndarray]:
    """The first species of each z² (every neutral species on its own), and each species' place
    among them."""
    reps: list[int] = []
    seen: dict[float, int] = {}
    rows = np.empty(len(z), dtype=int)
    for k, zk in enumerate(z.tolist()):
        key = zk * zk
        if key == 0 or key not in seen:
            seen[key] = len(reps)
            rows[k] = len(reps)
            reps.append(k)
        else:
            rows[k] = seen[key]
    return reps, rows


def free_fraction_of(step: Step, name: str) -> np.ndarray | None:
    """Free share of a component's total in every column of a step (None without speciation)."""
    st, net = step.state, step.network
    if st is None or net is None or name not in net.names:
        return None
    i = net.names.index(name)
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.asarray(np.where(st.totals[i] > 0, st.molality[i] / st.totals[i], 1.0))


def _stoichiometric(net: Network, state: State, inputs: tuple[Ion, ...]) -> np.ndarray:
    names = net.names
    out = np.empty((len(inputs), state.molality.shape[1]))
    for k, ion in enumerate(inputs):
        i = names.index(ion.name)
        if i < len(net.components) and i != net.h:
            with np.errstate(divide="ignore", invalid="ignore"):
                frac = np.where(state.totals[i] > 0, state.molality[i] / state.totals[i], 1.0)
            out[k] = state.log10_gamma[i] + np.log10(np.maximum(frac, 1e-300))
        else:
            out[k] = state.log10_gamma[i]
    return out


def speciation_of(step: Step, shape: tuple[int, ...], t: np.ndarray, solids: Mapping[str, float] | None = None
                  ) -> Speciation | None:
    """The Speciation record of a step that speciated (None when the inputs did not react)."""
    if step.state is None or step.network is None:
        return None
    return _result(step.network, step.state, shape, t, solids, None)
