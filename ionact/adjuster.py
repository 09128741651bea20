"""Ionic strength adjuster (ISA) design: the method developer's job, end to end.

An ISA is a concentrated, inert electrolyte added in a fixed volume ratio to every sample
and standard so that the analyte's activity coefficient is (nearly) the same in all of
them. :func:`design_adjuster` proves it: it mixes every sample of the population (an
ionic-strength range with a background salt, explicit matrices, or conductivity /
dissolved-solids figures) at every analyte level with the ISA, does the same for the
calibration standards, and finds the largest potential error

    |ΔE| = (S/|z|) · |log10(γ_sample / γ_standard)|

over samples × analyte levels × standards. It then solves for the smallest stock
strength (``solve="stock"``) or volume ratio (``solve="ratio"``) that meets the budget,
or evaluates a given design (``solve="none"``), and checks the design: solubility at the
coldest lab temperature, the model's ionic-strength range, the electrode's linear range,
the ISA's own ions as interferents, precipitation with stated matrix ions, and the pH
buffer. The result carries a recipe in grams per litre and the cautions that apply.

Mixing is on the molar basis with volume additivity; molalities for the activity model
come from the solution-density model (apparent molar volumes), or ρ_w when
``density="water"``.
"""

from __future__ import annotations

import math
import warnings
from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

from . import water
from .activity import _options, select_model
from .errors import InfeasibleDesignError, InputError, IonactError, MissingParameterError, ValidityRangeWarning
from .models.registry import MODELS, Batch, get_model, log10_gamma
from .references import cite
from .solution import Solution, ionic_strength_from_conductivity, ionic_strength_from_tds
from .species import Ion, Salt, resolve_ion
from .tables import acid_table, ksp_table
from .units import MOLAR, parse_amount

__all__ = [
    "Buffer",
    "Check",
    "Component",
    "AdjusterDesign",
    "AdjusterComparison",
    "design_adjuster",
    "compare_adjusters",
    "CAUTIONS",
    "DESIGN_FORMAT",
    "DESIGN_VERSION",
]

DESIGN_FORMAT = "ionact-adjuster-design"
DESIGN_VERSION = 1
LN10 = math.log(10.0)

CAUTIONS = {
    "general": (
        "Prepare and handle the stock following the supplier's safety data sheet (SDS) for every "
        "component; wear eye protection and gloves when handling concentrated reagents."
    ),
    "oxidiser": "{name} is an oxidiser: keep it away from organic material and reducing agents.",
    "perchlorate": "{name}: perchlorates are strong oxidisers; residues with organic matter can be hazardous.",
    "ammonium": "{name}: ammonium salts release ammonia with strong base; do not mix the stock with alkalis.",
    "fluoride": "{name} is toxic (fluoride): avoid ingestion and skin contact; acidified fluoride forms HF.",
    "corrosive": "{name} is corrosive: add it slowly, with eye protection and gloves.",
    "acetic": "Glacial acetic acid is corrosive and its vapour irritant: dispense it in a fume hood.",
    "regulatory": (
        "This design is an aid, not a validated method: results for regulatory reporting follow the "
        "governing standard method and the laboratory's accreditation, and local codes and licensed "
        "practice take precedence."
    ),
}


@dataclass(frozen=True)
class Component:
    """One stock component: a salt (hydrates as written) or a neutral species."""

    label: str
    ions: tuple[tuple[str, int], ...]
    molar_mass: float
    role: str  # "salt" (scaled by solve="stock"), "buffer-acid", "buffer-base"
    hazards: tuple[str, ...] = ()
    salt: Salt | None = None


@dataclass(frozen=True)
class Buffer:
    """A pH buffer pair added to the stock.

    Parameters
    ----------
    acid, base : str
        The acid and conjugate-base carriers: a neutral species ("CH3COOH", "NH3") or a
        salt ("CH3COONa", "NH4Cl"); the pair must be in the acid table (or give ``pka``).
    pH : float
        The target pH of the treated solutions (activity scale, pH = −log10 a_H).
    total : float or str
        Total buffer (acid + base) in the stock, mol/L.
    pka : float, optional
        Overrides the tabulated pKa (25 °C, I = 0).
    """

    acid: str
    base: str
    pH: float
    total: float | str = 1.0
    pka: float | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "pH", _num(self.pH, "buffer pH", 0.0, 14.0, lo_open=True))
        if self.pka is not None:
            object.__setattr__(self, "pka", _num(self.pka, "buffer pka", -2.0, 16.0))
        for name in ("acid", "base"):
            if not isinstance(getattr(self, name), str):
                raise InputError(f"buffer {name} {getattr(self, name)!r} must be a species or salt formula")


@dataclass(frozen=True)
class Check:
    """One check on a design: ``status`` is "ok", "warning" or "fail"."""

    name: str
    status: str
    message: str


def _component(key) -> Component:
    if isinstance(key, Salt):
        return Component(key.text, key.ions, key.molar_mass, "salt", key.hazards, key)
    if not isinstance(key, str):
        raise InputError(f"a stock component must be a salt formula or Salt, got {key!r}")
    try:
        s = Salt.parse(key)
        return Component(s.text, s.ions, s.molar_mass, "salt", s.hazards, s)
    except Exception as exc_salt:
        try:
            ion = resolve_ion(key)
        except Exception:
            raise exc_salt from None
        if ion.charge != 0:
            raise InputError(f"stock component {key!r} is a single ion; give the salt that carries it") from None
        hazards = ("corrosive", "acetic") if ion.formula == "CH3COOH" else ()
        return Component(ion.name, ((ion.name, 1),), ion.molar_mass, "salt", hazards)


def _mol_per_l(value, what: str) -> float:
    amt = parse_amount(value, None, default_basis=MOLAR) if isinstance(value, str) else None
    if amt is not None:
        if amt.basis != MOLAR:
            raise InputError(f"{what} {value!r} must be a molar amount (mol/L)")
        v = float(amt.value)
    else:
        try:
            v = float(value)
        except (TypeError, ValueError):
            raise InputError(f"{what} {value!r} is not a number of mol/L") from None
    if not (math.isfinite(v) and v >= 0):
        raise InputError(f"{what} {value!r} must be finite and ≥ 0 mol/L")
    return v


def _analyte_levels(spec, ion: Ion, what: str, n: int) -> np.ndarray:
    if spec is None:
        raise InputError(f"{what} is required: (low, high) in mol/L or unit strings such as '1 mg/L as N'")
    try:
        lo, hi = spec
    except (TypeError, ValueError):
        raise InputError(f"{what} {spec!r} must be a pair (low, high)") from None
    vals = []
    for v in (lo, hi):
        a = parse_amount(v, ion, default_basis=MOLAR)
        if a.basis != MOLAR:
            raise InputError(f"{what}: {v!r} must be a concentration per volume (mol/L, mg/L …)")
        vals.append(float(a.value))
    lo_v, hi_v = vals
    if not (0 < lo_v <= hi_v):
        raise InputError(f"{what} ({lo!r}, {hi!r}) must satisfy 0 < low ≤ high")
    return np.unique(np.geomspace(lo_v, hi_v, n)) if hi_v > lo_v else np.array([lo_v])


@dataclass
class _System:
    names: list[str]
    ions: list[Ion]
    comps: list[Component]
    comp_c: np.ndarray  # (n_comp,) mol/L in stock at scale 1
    cmat: np.ndarray  # (n_ions, n_comp)
    sample_c: np.ndarray  # (n_ions, J) untreated samples, mol/L
    sample_labels: list[str]
    sample_I: np.ndarray  # (J,) untreated ionic strength, mol/kg
    an_levels: np.ndarray  # (K,) mol/L in the untreated sample
    std_levels: np.ndarray  # (L,) mol/L in the untreated standard
    stoich: np.ndarray  # (n_ions,) analyte + counter per unit analyte
    k: int
    t: float
    density: str | None
    model: object = None
    opts: object = None

    def index(self, name: str) -> int:
        return self.names.index(name)

    @property
    def z(self) -> np.ndarray:
        return np.array([i.charge for i in self.ions], dtype=float)

    def water_per_litre(self, c: np.ndarray) -> np.ndarray:
        rho_w = float(water._density(np.asarray(self.t))) / 1000.0
        if self.density == "water":
            return np.full(c.shape[1:], rho_w)
        vol = []
        for i, ion in enumerate(self.ions):
            if ion.volume is None:
                if np.any(c[i] > 0):
                    raise MissingParameterError(
                        f"no apparent molar volume for {ion.name}: the density model cannot convert the "
                        "mixtures to molality; pass density='water'"
                    )
                vol.append(0.0)
            else:
                vol.append(ion.volume)
        w = rho_w * (1.0 - np.tensordot(np.array(vol), c, axes=(0, 0)) / 1000.0)
        if np.any(w <= 0):
            raise InputError("a mixture is more concentrated than the density model allows (water per litre ≤ 0)")
        return w

    def stock_c(self, scale: np.ndarray) -> np.ndarray:
        """Ion molarities of the stock, (n_ions, G)."""
        role = np.array([c.role == "salt" for c in self.comps])
        cc = self.comp_c[:, None] * np.where(role[:, None], scale[None, :], 1.0)
        return self.cmat @ cc

    def treated(self, scale: np.ndarray, ratio: np.ndarray):
        """Molar compositions of treated samples (n, G, J, K) and standards (n, G, L)."""
        isa = self.stock_c(scale)  # (n, G)
        r = ratio[None, :]
        an = self.stoich[:, None, None] * self.an_levels[None, None, :]  # (n, 1, K)
        samp = self.sample_c[:, :, None] + an  # (n, J, K)
        ts = (samp[:, None, :, :] + (r * isa)[:, :, None, None]) / (1.0 + r)[:, :, None, None]
        std = self.stoich[:, None] * self.std_levels[None, :]  # (n, L)
        tstd = (std[:, None, :] + (r * isa)[:, :, None]) / (1.0 + r)[:, :, None]
        return ts, tstd

    def log10_gammas(self, c_flat: np.ndarray, model=None) -> tuple[np.ndarray, np.ndarray]:
        """All log10 γ (n, N) and ionic strength (N,) for molar compositions (n, N)."""
        w = self.water_per_litre(c_flat)
        m = c_flat / w
        z = self.z
        ionic = 0.5 * (z**2) @ m
        t = np.full(m.shape[1], self.t)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", ValidityRangeWarning)
            lg, _ = log10_gamma(model or self.model, Batch(tuple(self.names), tuple(self.ions), z, m, t, ionic),
                                self.opts)
        return lg, ionic

    def evaluate(self, scale, ratio):
        """Worst |log10 γ ratio| per design (G,), plus the pieces for reports."""
        scale = np.atleast_1d(np.asarray(scale, dtype=float))
        ratio = np.atleast_1d(np.asarray(ratio, dtype=float))
        scale, ratio = np.broadcast_arrays(scale, ratio)
        ts, tstd = self.treated(scale, ratio)
        n, G, J, K = ts.shape
        L = tstd.shape[2]
        flat = np.concatenate([ts.reshape(n, -1), tstd.reshape(n, -1)], axis=1)
        lg, ionic = self.log10_gammas(flat)
        lga = lg[self.k]
        ls = lga[: G * J * K].reshape(G, J, K)
        lstd = lga[G * J * K:].reshape(G, L)
        hi_s, lo_s = ls.reshape(G, -1).max(axis=1), ls.reshape(G, -1).min(axis=1)
        hi_t, lo_t = lstd.max(axis=1), lstd.min(axis=1)
        worst = np.maximum(hi_s - lo_t, hi_t - lo_s)
        return dict(worst=worst, ls=ls, lstd=lstd, lg=lg, ionic_s=ionic[: G * J * K].reshape(G, J, K),
                    ionic_std=ionic[G * J * K:].reshape(G, L), flat=flat)


@dataclass(frozen=True)
class AdjusterDesign:
    """An evaluated or solved ISA design. Immutable; ``report()`` and ``to_dict()`` for output.

    Attributes
    ----------
    analyte, counter_ion : str
    stock : dict
        Component -> mol/L in the stock.
    volume_ratio : float
        Volume of ISA per volume of sample (or standard).
    recipe : dict
        Component -> grams per litre of stock (hydrate forms as written).
    final_ionic_strength : (float, float)
        Lowest and highest ionic strength (mol/kg) over treated samples and standards.
    worst_error_mv, worst_error_percent : float
        The largest |ΔE| over samples × analyte levels × standards, and the relative
        concentration error it implies.
    budget_mv : float
    model, model_reason : str
    checks : tuple of Check
    warnings : tuple of str
    cautions : tuple of str
    """

    analyte: str
    counter_ion: str | None
    stock: dict
    volume_ratio: float
    recipe: dict
    final_ionic_strength: tuple[float, float]
    worst_error_mv: float
    worst_error_percent: float
    budget_mv: float
    model: str
    model_reason: str
    solve: str
    temperature: float
    checks: tuple[Check, ...]
    warnings: tuple[str, ...]
    cautions: tuple[str, ...]
    notes: tuple[str, ...]
    sample_ionic_strength: tuple[float, float]
    analyte_range: tuple[float, float]
    standards: tuple[float, ...]
    stock_ions: dict
    worst_case: dict
    scan: dict = field(repr=False, default_factory=dict)
    gamma_profile: dict = field(repr=False, default_factory=dict)
    buffer: dict | None = None
    name: str = ""
    linear_range: tuple[float, float] | None = None
    background: str = "NaCl"

    def report(self) -> str:
        """A plain-text report of the design."""
        lines = []
        w = lines.append
        title = f"Ionic strength adjuster for {self.analyte}" + (f" — {self.name}" if self.name else "")
        w(title)
        w("=" * len(title))
        w(f"solve: {self.solve};  model: {self.model} ({self.model_reason});  temperature {self.temperature:g} °C")
        w("")
        w("Stock recipe (per litre of stock, made up to volume with water):")
        for label, c in self.stock.items():
            w(f"  {label:<20} {c:10.4g} mol/L  {self.recipe[label]:10.4g} g")
        per100 = self.volume_ratio * 100
        w(f"Mixing: {per100:.4g} mL of stock per 100 mL of sample and of every standard "
          f"(volume ratio {self.volume_ratio:.4g})")
        w("")
        lo, hi = self.final_ionic_strength
        w(f"Untreated samples: ionic strength {self.sample_ionic_strength[0]:.4g}–{self.sample_ionic_strength[1]:.4g}"
          f" mol/kg; analyte {self.analyte_range[0]:.4g}–{self.analyte_range[1]:.4g} mol/L")
        w(f"Treated samples and standards: ionic strength {lo:.4g}–{hi:.4g} mol/kg")
        wc = self.worst_case
        w(f"Worst residual error: {self.worst_error_mv:.4g} mV = {self.worst_error_percent:.4g} % "
          f"(budget {self.budget_mv:.4g} mV)")
        w(f"  at sample '{wc['sample']}' with analyte {wc['analyte']:.4g} mol/L against the standard "
          f"of {wc['standard']:.4g} mol/L")
        if self.buffer:
            b = self.buffer
            w("")
            w(f"pH buffer {b['acid']}/{b['base']}: pKa {b['pka']:.3f}, target pH {b['pH']:.2f} "
              f"(pH {b['pH_range'][0]:.3f}–{b['pH_range'][1]:.3f} across treated samples)")
            w(f"  in the stock: {b['acid']} {b['acid_stock']:.4g} mol/L, {b['base']} {b['base_stock']:.4g} mol/L; "
              f"buffer capacity {b['capacity']:.3g} mol/(L·pH) after mixing")
            if b.get("drift") is not None:
                w(f"  pH drift over the stated sample acidity range: {b['drift'][0]:+.3f} to {b['drift'][1]:+.3f}")
        w("")
        w("Checks:")
        for c in self.checks:
            w(f"  [{c.status.upper():^7}] {c.name}: {c.message}")
        if self.notes:
            w("")
            w("Notes:")
            for x in self.notes:
                w(f"  - {x}")
        if self.warnings:
            w("")
            w("Warnings:")
            for x in self.warnings:
                w(f"  - {x}")
        w("")
        w("Cautions:")
        for x in self.cautions:
            w(f"  - {x}")
        return "\n".join(lines)

    def to_dict(self) -> dict:
        """JSON-ready description of the design (what ``ionact design --json`` writes)."""
        return {
            "format": DESIGN_FORMAT,
            "version": DESIGN_VERSION,
            "name": self.name,
            "analyte": self.analyte,
            "counter_ion": self.counter_ion,
            "stock_mol_per_l": dict(self.stock),
            "stock_ions_mol_per_l": dict(self.stock_ions),
            "recipe_g_per_l": dict(self.recipe),
            "volume_ratio": self.volume_ratio,
            "final_ionic_strength": list(self.final_ionic_strength),
            "sample_ionic_strength": list(self.sample_ionic_strength),
            "analyte_range_mol_per_l": list(self.analyte_range),
            "standards_mol_per_l": list(self.standards),
            "linear_range_mol_per_l": list(self.linear_range) if self.linear_range else None,
            "background": self.background,
            "worst_error_mv": self.worst_error_mv,
            "worst_error_percent": self.worst_error_percent,
            "budget_mv": self.budget_mv,
            "model": self.model,
            "model_reason": self.model_reason,
            "solve": self.solve,
            "temperature": self.temperature,
            "worst_case": dict(self.worst_case),
            "buffer": self.buffer,
            "checks": [{"name": c.name, "status": c.status, "message": c.message} for c in self.checks],
            "warnings": list(self.warnings),
            "notes": list(self.notes),
            "cautions": list(self.cautions),
        }

    def plot(self, path=None):
        """Figure: worst error against stock strength (or ratio) with the budget and the design
        marked, and γ of the analyte across the sample range with and without the ISA."""
        import matplotlib

        if path is not None:
            matplotlib.use("Agg")
        import matplotlib.pyplot as plt

        fig, (a1, a2) = plt.subplots(1, 2, figsize=(11, 4.2))
        s = self.scan
        if s:
            x, y = np.asarray(s["x"]), np.asarray(s["worst_mv"])
            valid = np.asarray(s.get("valid", np.ones_like(x, dtype=bool)), dtype=bool)
            a1.plot(x[valid], y[valid], "-", color="C0", label="worst |ΔE|")
            if not valid.all():
                a1.plot(x[~valid], y[~valid], ":", color="C0", label="outside the model's range")
            a1.axhline(self.budget_mv, color="C3", ls="--", label=f"budget {self.budget_mv:g} mV")
            a1.plot([s["chosen"]], [self.worst_error_mv], "o", color="k", label="this design")
            a1.set_xscale("log")
            a1.set_yscale("log")
            a1.set_xlabel(s["label"])
            a1.set_ylabel("worst |ΔE| / mV")
            a1.legend(fontsize=8)
            a1.set_title("residual error against the adjuster")
        g = self.gamma_profile
        if g:
            a2.plot(g["ionic_strength"], g["without"], "--", color="C1", label="samples without ISA")
            a2.plot(g["ionic_strength"], g["with"], "-", color="C0", label="samples with ISA")
            a2.axhspan(min(g["standards"]), max(g["standards"]), color="C2", alpha=0.25,
                       label="standards with ISA")
            a2.set_xscale("log")
            a2.set_xlabel("untreated sample ionic strength / mol kg$^{-1}$")
            a2.set_ylabel(f"γ({self.analyte})")
            a2.legend(fontsize=8)
            a2.set_title(f"γ of {self.analyte} across the sample range ({self.model})")
        fig.tight_layout()
        if path is not None:
            fig.savefig(path, dpi=110)
            plt.close(fig)
        return fig


def _num(value, name: str, lo: float = -math.inf, hi: float = math.inf, lo_open: bool = False) -> float:
    """A finite float within [lo, hi] (or (lo, hi] with lo_open), else InputError naming the value."""
    try:
        v = float(value)
    except (TypeError, ValueError):
        raise InputError(f"{name} {value!r} is not a number") from None
    bad_lo = v <= lo if lo_open else v < lo
    if not math.isfinite(v) or bad_lo or v > hi:
        rng = f"{'(' if lo_open else '['}{lo:g}, {hi:g}]"
        raise InputError(f"{name} {value!r} is outside the allowed range {rng}")
    return v


def _budget(tolerance_mv, tolerance_percent, z: int, t: float) -> float:
    """The error budget as |ΔE| in mV (a percentage is converted with the Nernst slope)."""
    if (tolerance_mv is None) == (tolerance_percent is None):
        raise InputError("give exactly one error budget: tolerance_mv=… or tolerance_percent=…")
    if tolerance_mv is not None:
        return _num(tolerance_mv, "tolerance_mv", 0.0, 1e3, lo_open=True)
    pct = _num(tolerance_percent, "tolerance_percent", 0.0, 1e3, lo_open=True)
    return abs(float(water.nernst_slope(z, t))) * math.log10(1.0 + pct / 100.0)


def _samples(sample_ionic_strength, samples, conductivity, tds, background, rule, t, n_levels, ion_of):
    given = [x is not None for x in (sample_ionic_strength, samples, conductivity, tds)]
    if sum(given) != 1:
        raise InputError("describe the samples once: sample_ionic_strength=(lo, hi), samples=Solution, "
                         "conductivity=(lo, hi) or tds=(lo, hi)")
    notes = []
    if samples is not None:
        if not isinstance(samples, Solution):
            raise InputError(f"samples must be a Solution (batch), got {type(samples).__name__}")
        flat = samples if samples.shape else samples.with_temperature(np.array([samples.temperature]))
        if len(flat.shape) > 1:
            raise InputError("samples must be a one-dimensional batch")
        labels = [f"matrix {i}" for i in range(flat.shape[0])]
        ts = np.unique(np.asarray(flat._t))
        if ts.size > 1 or abs(float(ts[0]) - t) > 1e-9:
            notes.append(f"the explicit samples are given at {', '.join(f'{x:g}' for x in ts[:5])} °C; their "
                         f"compositions are used as they are and γ is evaluated at the method's {t:g} °C")
        return flat, labels, notes
    if conductivity is not None or tds is not None:
        spec = conductivity if conductivity is not None else tds
        vals = np.atleast_1d(np.asarray(spec, dtype=float))
        est = (ionic_strength_from_conductivity(vals, rule or "russell") if conductivity is not None
               else ionic_strength_from_tds(vals, rule or "langelier"))
        lo, hi = float(np.min(est.value)), float(np.max(est.value))
        notes.append(f"sample ionic strength {lo:.4g}–{hi:.4g} estimated by the '{est.rule}' rule "
                     f"(×{est.coefficient:g}; {est.source})")
    else:
        try:
            lo, hi = (float(x) for x in sample_ionic_strength)
        except (TypeError, ValueError):
            raise InputError(f"sample_ionic_strength {sample_ionic_strength!r} must be a pair (lo, hi) in mol/kg"
                             ) from None
    if not (0 <= lo <= hi and math.isfinite(hi)):
        raise InputError(f"sample ionic strength range ({lo!r}, {hi!r}) must satisfy 0 ≤ lo ≤ hi")
    bg = Salt.parse(background)
    for i, _ in bg.ions:
        if i == ion_of:
            raise InputError(f"the background salt {bg.text} contains the analyte {ion_of}; choose another")
    levels = np.unique(np.concatenate([[lo, hi], np.geomspace(max(lo, hi * 1e-3, 1e-7), max(hi, 1e-7), n_levels)]))
    levels = levels[(levels >= lo) & (levels <= hi)] if hi > 0 else np.array([0.0])
    sol = Solution.from_ionic_strength(levels, bg.text, t)
    labels = [f"I = {x:.4g} ({bg.text})" for x in levels]
    notes.append(f"samples modelled as {bg.text} solutions at {len(levels)} ionic strengths from {lo:g} to {hi:g}")
    return sol, labels, notes


def _buffer_pair(buf: Buffer):
    acid_c, base_c = _component(buf.acid), _component(buf.base)
    acids = acid_table()
    acid_species = [i for i, _ in acid_c.ions]
    base_species = [i for i, _ in base_c.ions]
    for (a, b), (pka, src) in acids.items():
        if a in acid_species and b in base_species:
            return acid_c, base_c, a, b, (buf.pka if buf.pka is not None else pka), src
    if buf.pka is not None:
        raise InputError(f"cannot tell which species of {buf.acid} and {buf.base} form the acid–base pair; "
                         "use a tabulated pair")
    raise InputError(f"{buf.acid}/{buf.base} is not a tabulated acid–base pair; give pka= with a tabulated pair")


def design_adjuster(
    analyte: str,
    salts: Mapping,
    *,
    sample_ionic_strength=None,
    samples: Solution | None = None,
    conductivity=None,
    tds=None,
    background: str = "NaCl",
    estimate_rule: str | None = None,
    analyte_range=None,
    standards=None,
    standard_salt: str | None = None,
    volume_ratio: float = 0.02,
    tolerance_mv: float | None = None,
    tolerance_percent: float | None = None,
    solve: str = "stock",
    model: str = "auto",
    temperature: float = 25.0,
    lowest_temperature: float | None = None,
    solubility_margin: float = 0.1,
    max_ratio: float = 1.0,
    linear_range=None,
    selectivity: Mapping[str, float] | None = None,
    matrix_ions: Mapping[str, object] | None = None,
    buffer: Buffer | None = None,
    sample_acidity=None,
    sample_ph: float | None = None,
    density: str | None = None,
    levels: int = 7,
    name: str = "",
    sample_labels=None,
    **model_options,
) -> AdjusterDesign:
    """Design (or evaluate) an ionic strength adjuster for an ion-selective electrode method.

    Parameters
    ----------
    analyte : str
        The measured ion, e.g. "NO3-", "F-", "Ca^2+".
    salts : mapping
        Stock components -> mol/L: salt formulas (hydrates as they will be weighed, e.g.
        "CH3COONa·3H2O"), :class:`~ionact.Salt` objects for custom salts, or neutral species
        ("CH3COOH"). With ``solve="stock"`` they are scaled together from these proportions.
    sample_ionic_strength : (lo, hi), optional
        Untreated samples as an ionic-strength range (mol/kg) of ``background`` salt.
    samples : Solution, optional
        Explicit untreated sample matrices (a batch), without the analyte.
    conductivity, tds : (lo, hi) or array, optional
        Samples from EC (µS/cm) or TDS (mg/L) by a named rule of thumb (``estimate_rule``).
    analyte_range : (lo, hi)
        The analyte in the untreated samples, mol/L or unit strings ("0.5 mg/L as N").
    standards : sequence, optional
        Calibration standard concentrations (mol/L or unit strings); by default ``levels``
        standards spanning ``analyte_range``, made of ``standard_salt`` in pure water.
    standard_salt : str, optional
        The analyte's salt in the standards (and the counter-ion assumed in samples);
        default: analyte with Cl- (cation) or Na+ (anion).
    volume_ratio : float
        ISA volume per sample volume (0.02 = 2 mL per 100 mL); the starting point for
        ``solve="ratio"``.
    tolerance_mv, tolerance_percent : float
        The error budget (exactly one), as |ΔE| in mV or the relative concentration error.
    solve : {"stock", "ratio", "none"}
        Smallest stock strength at the given ratio, smallest ratio for the given stock, or
        evaluate the given design.
    model : str
        Activity model, or "auto". If the final ionic strength is outside the named model's
        range, the design moves to a model that covers it and says so.
    temperature, lowest_temperature : float
        °C of measurement, and the coldest the stock will be stored at (solubility).
    solubility_margin : float
        Keep each salt below (1 − margin) of its saturation (default 10 %).
    max_ratio : float
        Largest volume ratio ``solve="ratio"`` may use (default 1, equal volumes).
    linear_range : (lo, hi), optional
        The electrode's linear range in the treated solution (mol/L or unit strings).
    selectivity : mapping, optional
        Ion -> selectivity coefficient K of this electrode for interferent ions (the caller's
        own values); the ISA's ions are checked through Nikolsky–Eisenman.
    matrix_ions : mapping, optional
        Highest levels of matrix ions (e.g. {"Ca^2+": "200 mg/L"}) for the precipitation check.
    buffer : Buffer, optional
        A pH buffer pair in the stock; amounts are solved for the target pH at the final
        ionic strength (activity-corrected).
    sample_acidity : (lo, hi), optional
        Strong acid (+) or base (−) the samples bring, mol/L, for the pH drift.
    sample_ph : float, optional
        Without a buffer: the treated solutions' pH for the analyte protonation check.
    density : None or "water"
        Density model for the mixtures (apparent molar volumes, or ρ_w).
    levels : int
        Number of analyte levels (and default standards) across the range.
    sample_labels : sequence of str, optional
        Names of the explicit ``samples`` for the report.

    Returns
    -------
    AdjusterDesign

    Raises
    ------
    InfeasibleDesignError
        No design within solubility, the ratio limit and model validity meets the budget
        (the message names the binding constraint and the best reachable error), or a given
        stock is above saturation.
    InputError, UnknownSpeciesError
        Bad inputs: a tolerance ≤ 0, a ratio ≤ 0, the analyte among the ISA's ions, …

    Examples
    --------
    >>> import ionact as ia
    >>> d = ia.design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, sample_ionic_strength=(0.0, 0.02),
    ...                        analyte_range=(1e-5, 1e-3), volume_ratio=0.02, tolerance_mv=1.0,
    ...                        solve="none", model="davies")
    >>> 0.2 < d.worst_error_mv < 0.4
    True
    """
    if solve not in ("stock", "ratio", "none"):
        raise InputError(f"solve={solve!r}: allowed 'stock', 'ratio', 'none'")
    from scipy import optimize  # imported here to keep `import ionact` light

    an = resolve_ion(analyte)
    if an.charge == 0:
        raise InputError(f"analyte {an.name} is neutral; an ion-selective electrode measures an ion")
    try:
        r0 = float(volume_ratio)
    except (TypeError, ValueError):
        raise InputError(f"volume_ratio {volume_ratio!r} is not a number") from None
    if not (r0 > 0 and math.isfinite(r0)):
        raise InputError(f"volume_ratio {volume_ratio!r} must be > 0 (ISA volume per sample volume)")
    max_ratio = _num(max_ratio, "max_ratio", 0.0, 100.0, lo_open=True)
    solubility_margin = _num(solubility_margin, "solubility_margin", 0.0, 0.99)
    t = _num(temperature, "temperature (°C)", 0.0, 100.0)
    t_low = t if lowest_temperature is None else _num(lowest_temperature, "lowest_temperature (°C)", -10.0, 100.0)
    if sample_ph is not None:
        sample_ph = _num(sample_ph, "sample_ph", 0.0, 14.0)
    budget = _budget(tolerance_mv, tolerance_percent, an.charge, t)
    if not isinstance(salts, Mapping) or not salts:
        raise InputError("salts must be a non-empty mapping of stock component -> mol/L")
    if not (isinstance(levels, int) and 2 <= levels <= 50):
        raise InputError(f"levels {levels!r} must be an integer in 2–50")
    if density not in (None, "water"):
        raise InputError(f"density {density!r} must be None or 'water'")

    comps, comp_c = [], []
    for key, value in salts.items():
        c = _component(key)
        comps.append(c)
        comp_c.append(_mol_per_l(value, f"stock amount of {c.label}"))
        for ion_name, _ in c.ions:
            if ion_name == an.name:
                raise InputError(f"the analyte {an.name} is one of the ISA's ions (in {c.label}); "
                                 "an adjuster must not contain the analyte")
    if not any(v > 0 for v in comp_c):
        raise InputError("every stock amount is zero")

    # counter-ion and standards
    if standard_salt is not None:
        ss = Salt.parse(standard_salt)
        names = [n for n, _ in ss.ions]
        if an.name not in names or len(names) != 2:
            raise InputError(f"standard_salt {ss.text} is not a salt of {an.name}")
        counter = resolve_ion(next(n for n in names if n != an.name))
    else:
        counter = resolve_ion("Cl-" if an.charge > 0 else "Na+")
    an_levels = _analyte_levels(analyte_range, an, "analyte_range", levels)
    if standards is None:
        std_levels = an_levels.copy()
    else:
        vals = []
        for v in standards:
            a = parse_amount(v, an, default_basis=MOLAR)
            if a.basis != MOLAR or not float(a.value) > 0:
                raise InputError(f"standard {v!r} must be a positive concentration per volume")
            vals.append(float(a.value))
        if not vals:
            raise InputError("standards is empty")
        std_levels = np.array(sorted(vals))

    sol, labels, notes = _samples(sample_ionic_strength, samples, conductivity, tds, background,
                                  estimate_rule, t, 9, an.name)
    if sample_labels is not None:
        if samples is None or len(sample_labels) != len(labels):
            raise InputError(f"sample_labels needs one label per explicit sample ({len(labels)}), "
                             f"got {len(sample_labels)}")
        labels = [str(x) for x in sample_labels]
    if an.name in sol.ions and np.any(np.asarray(sol.molality(an.name)) > 0):
        raise InputError(f"the sample matrices contain the analyte {an.name}; give the matrices without it "
                         "and its range as analyte_range")

    # assemble the ion list
    names: list[str] = []
    ions: list[Ion] = []

    def add(ion: Ion):
        if ion.name not in names:
            names.append(ion.name)
            ions.append(ion)

    for n in sol.ions:
        add(sol.ion(n))
    add(an)
    add(counter)
    for c in comps:
        for i, _ in c.ions:
            add(resolve_ion(i))
    buf_info = None
    if buffer is not None:
        if not isinstance(buffer, Buffer):
            raise InputError(f"buffer must be an ionact Buffer, got {type(buffer).__name__}")
        acid_c, base_c, acid_sp, base_sp, pka, bsrc = _buffer_pair(buffer)
        for c in (acid_c, base_c):
            for i, _ in c.ions:
                add(resolve_ion(i))
        total = _mol_per_l(buffer.total, "buffer total")
        if total <= 0:
            raise InputError("buffer total must be > 0 mol/L")
        comps += [Component(acid_c.label, acid_c.ions, acid_c.molar_mass, "buffer-acid", acid_c.hazards,
                            acid_c.salt),
                  Component(base_c.label, base_c.ions, base_c.molar_mass, "buffer-base", base_c.hazards,
                            base_c.salt)]
        comp_c += [total / 2, total / 2]
        buf_info = dict(acid=acid_sp, base=base_sp, pka=pka, source=bsrc, total=total)
    n = len(names)
    cmat = np.zeros((n, len(comps)))
    for j, c in enumerate(comps):
        for i, nu in c.ions:
            cmat[names.index(i), j] += nu
    # samples on the molar basis
    try:
        molar = sol.molarities
    except MissingParameterError:
        if density != "water":
            raise
        molar = {k: np.asarray(v) * np.asarray(sol.water_per_litre) for k, v in sol.molalities.items()}
    J = sol.shape[0]
    sample_c = np.zeros((n, J))
    for k_, v in molar.items():
        sample_c[names.index(k_)] = np.asarray(v).reshape(J)
    stoich = np.zeros(n)
    stoich[names.index(an.name)] = 1.0
    stoich[names.index(counter.name)] += abs(an.charge) / abs(counter.charge)
    system = _System(names, ions, comps, np.array(comp_c), cmat, sample_c, labels,
                     np.asarray(sol.ionic_strength).reshape(J), an_levels, std_levels, stoich,
                     names.index(an.name), t, density)
    fallback = None
    opts_kw = dict(model_options)
    if "missing" in opts_kw and opts_kw["missing"] not in ("error", "zero"):
        fallback = opts_kw.pop("missing")
    system.opts = _options(**opts_kw)

    # the solubility bound on the stock scale
    salt_comps = [(j, c) for j, c in enumerate(comps) if c.salt is not None]
    warns: list[str] = []

    def stock_molalities(scale: float) -> dict[str, float]:
        cc = np.array([comp_c[j] * (scale if comps[j].role == "salt" else 1.0) for j in range(len(comps))])
        c_ions = cmat @ cc
        w = system.water_per_litre(c_ions[:, None])[0]
        return {comps[j].label: cc[j] / w for j in range(len(comps))}, float(w)

    def sat_ratio(scale: float) -> dict[str, float]:
        mol, _ = stock_molalities(scale)
        out = {}
        for _j, c in salt_comps:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore", ValidityRangeWarning)
                sat = c.salt.saturation_molality(t_low)
            if sat is not None and mol[c.label] > 0:
                out[c.label] = mol[c.label] / sat
        return out

    max_scale = np.inf
    if solve == "stock":
        ratios = sat_ratio(1.0)
        if ratios:
            # scale at which the most soluble-limited salt reaches (1 - margin) of saturation
            def g(s):
                return max(sat_ratio(s).values()) - (1.0 - solubility_margin)

            hi_s = 1.0
            while g(hi_s) < 0 and hi_s < 1e4:
                hi_s *= 2
            if g(hi_s) >= 0:
                lo_s = hi_s / 2 if hi_s > 1.0 else 1e-9
                try:
                    max_scale = optimize.brentq(g, lo_s, hi_s, xtol=1e-12, rtol=1e-10)
                except ValueError:
                    max_scale = hi_s
        else:
            max_scale = 1e3
            warns.append("no solubility data for the stock salts: the stock strength search stops at 1000× the "
                         "given amounts; check the supplier's solubility data")
    else:
        for label, ratio in sat_ratio(1.0).items():
            if ratio > 1.0:
                mol, _ = stock_molalities(1.0)
                raise InfeasibleDesignError(
                    f"the stock is above saturation: {label} at {mol[label]:.4g} mol/kg water exceeds its "
                    f"solubility {mol[label] / ratio:.4g} mol/kg at {t_low:g} °C"
                )

    # choose the model
    def choose(scale_hi: float, ratio_hi: float):
        ev_ts, ev_std = system.treated(np.array([scale_hi]), np.array([ratio_hi]))
        flat = np.concatenate([ev_ts.reshape(n, -1), ev_std.reshape(n, -1)], axis=1)
        w = system.water_per_litre(flat)
        imax = float(np.max(0.5 * (system.z**2) @ (flat / w)))
        if model == "auto":
            nm, why = select_model(tuple(ions), imax, system.opts)
            return MODELS[nm], why
        info = get_model(model)
        if fallback is not None:
            from .models.registry import missing_for

            lacking = missing_for(info, tuple(ions), system.opts)
            if lacking:
                fb = get_model(fallback)
                warns.append(f"{info.name} lacks parameters ({'; '.join(lacking)}); fell back to {fb.name}")
                return fb, f"requested {info.name}; fell back to {fb.name}"
        return info, "requested"

    if solve == "stock":
        x_lo, x_hi = 1e-5, float(max_scale)
    elif solve == "ratio":
        x_lo, x_hi = min(1e-5, r0), float(max_ratio)
    else:
        x_lo = x_hi = 1.0

    def to_sr(x):
        x = np.atleast_1d(np.asarray(x, dtype=float))
        if solve == "stock":
            return x, np.full_like(x, r0)
        if solve == "ratio":
            return np.ones_like(x), x
        return np.ones_like(x), np.full_like(x, r0)

    info, reason = choose(*(v[0] for v in to_sr(x_hi)))
    system.model = info

    def worst_mv(x):
        s, r = to_sr(x)
        return system.evaluate(s, r)["worst"] * abs(water.nernst_slope(an.charge, t))

    def worst_and_imax(x):
        s, r = to_sr(x)
        ev_ = system.evaluate(s, r)
        imax_ = np.maximum(ev_["ionic_s"].reshape(len(s), -1).max(axis=1), ev_["ionic_std"].max(axis=1))
        return ev_["worst"] * abs(water.nernst_slope(an.charge, t)), imax_

    scan = {}
    x_best = 1.0
    for _attempt in range(3):
        if buffer is not None:
            _solve_buffer(system, buffer, buf_info, to_sr, x_best if solve != "none" else 1.0)
        if solve == "none":
            x_best = 1.0
            break
        grid = np.geomspace(x_lo, x_hi, 49)
        wg, ig = worst_and_imax(grid)
        valid = ig <= info.max_ionic_strength * (1 + 1e-12)
        scan = {"x": grid, "worst_mv": wg, "valid": valid}
        ok = np.flatnonzero((wg <= budget) & valid)
        what = "stock scale" if solve == "stock" else "volume ratio"
        if ok.size == 0 and not np.all(valid) and model != "auto":
            nm, why = select_model(tuple(ions), float(ig.max()), system.opts)
            if nm != info.name and MODELS[nm].max_ionic_strength > info.max_ionic_strength:
                warns.append(f"model {info.name} (I ≤ {info.max_ionic_strength:g} mol/kg) cannot cover a design "
                             f"that meets the budget: moved to {nm}")
                info, reason = MODELS[nm], why
                system.model = info
                continue
        if ok.size == 0:
            if not np.any(valid):
                raise InfeasibleDesignError(
                    f"no design meets the budget of {budget:.4g} mV: even the smallest {what} searched gives an "
                    f"ionic strength {float(ig.min()):.4g} mol/kg beyond model {info.name}'s range "
                    f"0–{info.max_ionic_strength:g} mol/kg"
                )
            wv = np.where(valid, wg, np.inf)
            k_best = int(np.argmin(wv))
            best_x, best = float(grid[k_best]), float(wg[k_best])
            last_valid = int(np.flatnonzero(valid)[-1])
            if k_best == last_valid and last_valid < grid.size - 1:
                bind = (f"model validity: {info.name} covers I ≤ {info.max_ionic_strength:g} mol/kg and a larger "
                        f"{what} leaves it (no model with a wider range has parameters for every ion)")
            elif k_best == grid.size - 1:
                if solve == "stock" and np.isfinite(max_scale):
                    lim = ", ".join(f"{c.label} {comp_c[j] * best_x:.4g} mol/L" for j, c in salt_comps)
                    bind = (f"solubility at {t_low:g} °C (with a {solubility_margin:.0%} margin) limits the stock "
                            f"to {lim}")
                elif solve == "ratio":
                    bind = f"the volume ratio is limited to max_ratio = {max_ratio:g}"
                else:
                    bind = "the search limit"
            else:
                bind = (f"under model {info.name} the worst error has a minimum at {what} {best_x:.4g} "
                        "and rises on either side")
            raise InfeasibleDesignError(
                f"no design meets the budget of {budget:.4g} mV: {bind}; the best reachable worst error is "
                f"{best:.4g} mV at {what} {best_x:.4g}"
            )
        i = int(ok[0])
        if i == 0:
            x_best = float(grid[0])
            warns.append("the budget is met even at the smallest adjuster searched: samples and standards "
                         "already agree closely")
        else:
            def f(lx):
                return float(worst_mv(math.exp(lx))[0]) - budget

            lx = optimize.brentq(f, math.log(grid[i - 1]), math.log(grid[i]), xtol=1e-12, rtol=1e-12)
            x_best = math.exp(lx)
            # land on the feasible side of the crossing
            for _ in range(60):
                if float(worst_mv(x_best)[0]) <= budget:
                    break
                x_best *= 1 + 1e-11
        scan["chosen"] = x_best
        # does the model cover the solved design?
        s_b, r_b = to_sr(x_best)
        ev = system.evaluate(s_b, r_b)
        imax = float(max(ev["ionic_s"].max(), ev["ionic_std"].max()))
        if imax > info.max_ionic_strength or model == "auto":
            nm, why = select_model(tuple(ions), imax, system.opts)
            if nm != info.name:
                if imax > info.max_ionic_strength:
                    warns.append(f"the final ionic strength {imax:.4g} mol/kg is outside model {info.name}'s "
                                 f"range 0–{info.max_ionic_strength:g}: the design moved to {nm}")
                info, reason = MODELS[nm], why
                system.model = info
                continue
            if model == "auto":
                reason = why
        break

    s_b, r_b = to_sr(x_best)
    ev = system.evaluate(s_b, r_b)
    slope = abs(water.nernst_slope(an.charge, t))
    worst_log = float(ev["worst"][0])
    wmv = worst_log * slope
    wpct = (10**worst_log - 1.0) * 100.0
    imin = float(min(ev["ionic_s"].min(), ev["ionic_std"].min()))
    imax = float(max(ev["ionic_s"].max(), ev["ionic_std"].max()))
    if solve == "none" and imax > info.max_ionic_strength:
        nm, why = select_model(tuple(ions), imax, system.opts)
        if nm != info.name:
            warns.append(f"the final ionic strength {imax:.4g} mol/kg is outside model {info.name}'s range "
                         f"0–{info.max_ionic_strength:g}: evaluated with {nm} instead")
            info, reason = MODELS[nm], why
            system.model = info
            ev = system.evaluate(s_b, r_b)
            worst_log = float(ev["worst"][0])
            wmv, wpct = worst_log * slope, (10**worst_log - 1.0) * 100.0
    # where is the worst case?
    ls, lstd = ev["ls"][0], ev["lstd"][0]
    if ls.max() - lstd.min() >= lstd.max() - ls.min():
        jk = np.unravel_index(np.argmax(ls), ls.shape)
        li = int(np.argmin(lstd))
    else:
        jk = np.unravel_index(np.argmin(ls), ls.shape)
        li = int(np.argmax(lstd))
    worst_case = {"sample": labels[jk[0]], "analyte": float(an_levels[jk[1]]), "standard": float(std_levels[li])}

    scale_b, ratio_b = float(s_b[0]), float(r_b[0])
    stock = {}
    for j, c in enumerate(comps):
        stock[c.label] = stock.get(c.label, 0.0) + comp_c[j] * (scale_b if c.role == "salt" else 1.0)
    recipe = {}
    molar_mass = {c.label: c.molar_mass for c in comps}
    for label, cval in stock.items():
        recipe[label] = cval * molar_mass[label]
    stock_ions = {nm: float(v) for nm, v in zip(names, system.stock_c(np.array([scale_b]))[:, 0], strict=True)
                  if v > 0}

    checks: list[Check] = []
    _check_solubility(checks, comps, comp_c, scale_b, system, t_low, solubility_margin)
    checks.append(Check("model range", "ok" if imax <= info.max_ionic_strength else "warning",
                        f"final ionic strength {imin:.4g}–{imax:.4g} mol/kg; {info.name} covers "
                        f"0–{info.max_ionic_strength:g} mol/kg"))
    checks.append(Check("error budget", "ok" if wmv <= budget * (1 + 1e-9) else "fail",
                        f"worst {wmv:.4g} mV ({wpct:.3g} %) against the budget {budget:.4g} mV"))
    lin = None
    if linear_range is not None:
        lin = tuple(float(x) for x in _analyte_levels(linear_range, an, "linear_range", 2)[[0, -1]])
        lo_t, hi_t = an_levels[0] / (1 + ratio_b), an_levels[-1] / (1 + ratio_b)
        slo, shi = std_levels[0] / (1 + ratio_b), std_levels[-1] / (1 + ratio_b)
        lo_all, hi_all = min(lo_t, slo), max(hi_t, shi)
        ok_lo, ok_hi = lo_all >= lin[0], hi_all <= lin[1]
        checks.append(Check("linear range", "ok" if ok_lo and ok_hi else "warning",
                            f"treated analyte {lo_all:.4g}–{hi_all:.4g} mol/L; electrode linear "
                            f"{lin[0]:.4g}–{lin[1]:.4g} mol/L"
                            + ("" if ok_lo else "; the lowest level falls below the linear range")
                            + ("" if ok_hi else "; the highest level exceeds the linear range")))
    if matrix_ions:
        _check_precipitation(checks, system, ev, matrix_ions, ratio_b, t)
    buf_out = None
    if buffer is not None:
        buf_out = _buffer_report(checks, system, buffer, buf_info, ev, ratio_b, sample_acidity)
    ph_for_analyte = buf_out["pH"] if buf_out else sample_ph
    if selectivity:
        _check_interference(checks, system, ev, an, selectivity, budget, slope, ph_for_analyte)
    _check_protonation(checks, system, ev, an, ph_for_analyte, warns)

    for c in checks:
        if c.status != "ok":
            warns.append(f"{c.name}: {c.message}")
    cautions = [CAUTIONS["general"]]
    for c in comps:
        for h in c.hazards:
            text = CAUTIONS.get(h)
            if text and text.format(name=c.label) not in cautions:
                cautions.append(text.format(name=c.label))
    cautions.append(CAUTIONS["regulatory"])

    # γ profile across the sample range, for the figure
    profile = {}
    try:
        profile = _gamma_profile(system, ev)
    except Exception:  # the figure is an extra; never let it break a design
        profile = {}
    if not scan:  # solve="none": show the neighbourhood of the given stock for the figure
        grid = np.geomspace(0.01, 10.0, 41)
        try:
            ev_ = system.evaluate(grid, np.full_like(grid, r0))
            wg = ev_["worst"] * slope
            ig = np.maximum(ev_["ionic_s"].reshape(grid.size, -1).max(axis=1), ev_["ionic_std"].max(axis=1))
            scan = {"x": grid, "worst_mv": wg, "valid": ig <= info.max_ionic_strength * (1 + 1e-12)}
        except IonactError:  # e.g. the density model leaves its range far above the given stock
            scan = {}
        x_best = 1.0
    if scan:
        # stock scans are shown as the total strength of the scaled salts, mol/L
        total_salt = sum(comp_c[j] for j, c in enumerate(comps) if c.role == "salt")
        unit = 1.0 if solve == "ratio" else total_salt
        scan = {"x": (np.asarray(scan["x"]) * unit).tolist(), "worst_mv": np.asarray(scan["worst_mv"]).tolist(),
                "valid": np.asarray(scan["valid"]).tolist(), "chosen": x_best * unit,
                "label": ("volume ratio (ISA per sample)" if solve == "ratio"
                          else "stock strength, sum of the salts / mol L$^{-1}$")}
    return AdjusterDesign(
        analyte=an.name, counter_ion=counter.name, stock=stock, volume_ratio=ratio_b, recipe=recipe,
        final_ionic_strength=(imin, imax), worst_error_mv=wmv, worst_error_percent=wpct, budget_mv=budget,
        model=info.name, model_reason=reason, solve=solve, temperature=t, checks=tuple(checks),
        warnings=tuple(warns), cautions=tuple(cautions), notes=tuple(notes),
        sample_ionic_strength=(float(system.sample_I.min()), float(system.sample_I.max())),
        analyte_range=(float(an_levels[0]), float(an_levels[-1])), standards=tuple(float(x) for x in std_levels),
        stock_ions=stock_ions, worst_case=worst_case, scan=scan, gamma_profile=profile, buffer=buf_out,
        name=name, linear_range=lin, background=Salt.parse(background).text,
    )


def _check_solubility(checks, comps, comp_c, scale, system, t_low, margin):
    cc = np.array([comp_c[j] * (scale if comps[j].role == "salt" else 1.0) for j in range(len(comps))])
    c_ions = system.cmat @ cc
    w = float(system.water_per_litre(c_ions[:, None])[0])
    for j, c in enumerate(comps):
        if c.salt is None or cc[j] <= 0:
            continue
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", ValidityRangeWarning)
            sat = c.salt.saturation_molality(t_low)
        m = cc[j] / w
        if sat is None:
            checks.append(Check(f"solubility of {c.label}", "warning",
                                f"{m:.4g} mol/kg water in the stock; no solubility data — check the supplier's"))
            continue
        frac = m / sat
        status = "fail" if frac > 1 else ("warning" if frac > 1 - margin + 1e-9 else "ok")
        ts = [x for x, _ in c.salt.solubility_table]
        outside = not (ts[0] <= t_low <= ts[-1])
        if outside and status == "ok":
            status = "warning"
        checks.append(Check(f"solubility of {c.label}", status,
                            f"{m:.4g} mol/kg water = {frac:.1%} of saturation ({sat:.4g} mol/kg) at {t_low:g} °C "
                            "(each salt on its own; common-ion effects not included)"
                            + (f"; solubility is tabulated for {ts[0]:g}–{ts[-1]:g} °C only, the nearest value "
                               "was used" if outside else "")))


def _check_interference(checks, system, ev, an, selectivity, budget, slope, ph=None):
    """Nikolsky–Eisenman bias of each interferent, solution by solution, worst case reported.

    Interferents the ISA brings can fail the design; those that come with the samples are
    reported as warnings (the adjuster does not cause them, but the method must handle them).
    H+ and OH- are assessed from the buffered (or stated) pH.
    """
    lg = ev["lg"]
    flat = ev["flat"]
    w = system.water_per_litre(flat)
    m = flat / w
    a = np.power(10.0, lg) * m
    k = system.k
    a_an = a[k]
    for name, kval in selectivity.items():
        j_ion = resolve_ion(name)
        try:
            kf = float(kval)
        except (TypeError, ValueError):
            raise InputError(f"selectivity coefficient for {j_ion.name} {kval!r} is not a number") from None
        if not (kf >= 0 and math.isfinite(kf)):
            raise InputError(f"selectivity coefficient for {j_ion.name} {kval!r} must be finite and ≥ 0")
        if np.sign(j_ion.charge) != np.sign(an.charge):
            raise InputError(f"interferent {j_ion.name} must carry the same sign of charge as {an.name}")
        if j_ion.name in ("OH-", "H+") and (j_ion.name not in system.names or not np.any(m[system.index(j_ion.name)])):
            if ph is None:
                checks.append(Check(f"interference by {j_ion.name}", "warning",
                                    "not assessed: the pH is not fixed (add a buffer or state sample_ph)"))
                continue
            aj = np.full(a_an.shape, 10.0 ** ((ph - 14.0) if j_ion.name == "OH-" else -ph))
            origin = f" (at pH {ph:g}, pKw 14.00)"
            from_isa = True
        elif j_ion.name in system.names:
            aj = a[system.index(j_ion.name)]
            from_isa = bool(np.any(system.cmat[system.index(j_ion.name)] > 0))
            origin = " (from the ISA)" if from_isa else " (from the samples)"
        else:
            checks.append(Check(f"interference by {j_ion.name}", "warning",
                                f"not assessed: neither the ISA nor the described samples contain {j_ion.name}"))
            continue
        extra = kf * np.power(aj, an.charge / j_ion.charge)
        with np.errstate(divide="ignore", invalid="ignore"):
            rel = np.where(a_an > 0, extra / a_an, 0.0)
        col = int(np.argmax(rel))
        mv = slope * math.log10(1 + float(rel[col]))
        if from_isa:
            status = "fail" if mv > budget else ("warning" if mv > 0.2 * budget else "ok")
        else:
            status = "warning" if mv > 0.2 * budget else "ok"
        checks.append(Check(f"interference by {j_ion.name}{origin}", status,
                            f"K = {kf:g}: at worst adds {float(rel[col]):.3g} × the analyte activity "
                            f"(+{mv:.3g} mV; equivalent to {float(extra[col]):.3g} of analyte activity)"))


def _check_precipitation(checks, system, ev, matrix_ions, ratio, t):
    from .models import davies

    ionic = float(max(ev["ionic_s"].max(), ev["ionic_std"].max()))
    isa_ions = {nm for i, nm in enumerate(system.names) if np.any(system.cmat[i] > 0)}
    flat = ev["flat"]
    w = system.water_per_litre(flat)
    m_isa = {nm: float(np.max(flat[system.names.index(nm)] / w)) for nm in isa_ions}
    m_mat = {}
    for key, value in matrix_ions.items():
        ion = resolve_ion(key)
        a = parse_amount(value, ion, default_basis=MOLAR)
        c = float(a.value) / (1 + ratio)
        m_mat[ion.name] = c / float(np.min(w)) if a.basis == MOLAR else c
    for salt, (log_ksp, src) in ksp_table().items():
        s = Salt.parse(salt)
        ions_ = dict(s.ions)
        if not all(i in m_isa or i in m_mat for i in ions_):
            continue
        if not any(i in m_isa for i in ions_) or not any(i in m_mat for i in ions_):
            continue
        log_iap = 0.0
        for i, nu in ions_.items():
            mm = m_mat.get(i, 0.0) + m_isa.get(i, 0.0)
            z = resolve_ion(i).charge
            log_iap += nu * (math.log10(mm) + math.log10(davies(z, ionic, t)))
        si = log_iap - log_ksp
        checks.append(Check(f"precipitation of {salt}", "warning" if si > 0 else "ok",
                            f"saturation index {si:+.2f} in the treated samples (Davies activities, log Ksp "
                            f"{log_ksp:g}; {cite(src[0]) if src else ''})"))


def _solve_buffer(system, buffer, info, to_sr, x):
    """Set the acid/base amounts in the stock for the target pH at the final ionic strength."""
    ia_ = next(j for j, c in enumerate(system.comps) if c.role == "buffer-acid")
    ib_ = next(j for j, c in enumerate(system.comps) if c.role == "buffer-base")
    s, r = to_sr(x)
    ka = info["acid"]
    kb = info["base"]
    total = info["total"]
    ratio_needed = 10 ** (buffer.pH - info["pka"])
    for _ in range(8):
        ts, tstd = system.treated(s, r)
        n = ts.shape[0]
        flat = np.concatenate([ts.reshape(n, -1), tstd.reshape(n, -1)], axis=1)
        lg, _ = system.log10_gammas(flat)
        ga = 10 ** np.median(lg[system.index(ka)])
        gb = 10 ** np.median(lg[system.index(kb)])
        frac_b = ratio_needed * ga / gb
        cb = total * frac_b / (1 + frac_b)
        ca = total - cb
        system.comp_c[ia_], system.comp_c[ib_] = ca, cb


def _buffer_report(checks, system, buffer, info, ev, ratio, acidity):
    ka, kb = info["acid"], info["base"]
    flat = ev["flat"]
    w = system.water_per_litre(flat)
    m = flat / w
    lg = ev["lg"]
    ia_, ib_ = system.index(ka), system.index(kb)
    ph = info["pka"] + np.log10(np.power(10.0, lg[ib_]) * m[ib_] / (np.power(10.0, lg[ia_]) * m[ia_]))
    ca_stock = float(system.comp_c[next(j for j, c in enumerate(system.comps) if c.role == "buffer-acid")])
    cb_stock = float(system.comp_c[next(j for j, c in enumerate(system.comps) if c.role == "buffer-base")])
    ca_f, cb_f = ca_stock * ratio / (1 + ratio), cb_stock * ratio / (1 + ratio)
    cap = LN10 * ca_f * cb_f / (ca_f + cb_f)
    drift = None
    if acidity is not None:
        try:
            lo, hi = (float(x) for x in acidity)
        except (TypeError, ValueError):
            raise InputError(f"sample_acidity {acidity!r} must be a pair (lo, hi) in mol/L") from None
        shifts = []
        ga = float(np.power(10.0, np.median(lg[ia_])))
        gb = float(np.power(10.0, np.median(lg[ib_])))
        for d in (lo, hi):
            delta = d / (1 + ratio)
            a2, b2 = ca_f + delta, cb_f - delta
            if a2 <= 0 or b2 <= 0:
                checks.append(Check("pH buffer", "fail", f"sample acidity {d:g} mol/L exhausts the buffer "
                                    f"({'base' if b2 <= 0 else 'acid'} used up)"))
                shifts.append(float("nan"))
                continue
            shifts.append(info["pka"] + math.log10(gb * b2 / (ga * a2)) - buffer.pH)
        drift = (min(shifts), max(shifts))
        if all(math.isfinite(x) for x in shifts):
            status = "ok" if max(abs(x) for x in shifts) <= 0.1 else "warning"
            checks.append(Check("pH drift", status, f"{drift[0]:+.3f} to {drift[1]:+.3f} pH over sample acidity "
                                f"{lo:g} to {hi:g} mol/L (buffer capacity {cap:.3g} mol/(L·pH))"))
    far = abs(system.t - 25.0) > 5.0
    checks.append(Check("pH buffer", "warning" if far else "ok",
                        f"{ka}/{kb} pKa {info['pka']:.3f}: pH {float(ph.min()):.3f}–{float(ph.max()):.3f} across "
                        f"treated samples and standards (target {buffer.pH:g})"
                        + (f"; the pKa is a 25 °C value and the method runs at {system.t:g} °C" if far else "")))
    return dict(acid=ka, base=kb, pka=info["pka"], pH=buffer.pH, pH_range=(float(ph.min()), float(ph.max())),
                acid_stock=ca_stock, base_stock=cb_stock, capacity=cap, drift=drift, total=info["total"])


def _check_protonation(checks, system, ev, an, ph, warns):
    pair = None
    for (a, b), (pka, _) in acid_table().items():
        if b == an.name or a == an.name:
            pair = (a, b, pka)
            break
    if pair is None:
        return
    acid, base, pka = pair
    measured_is_base = base == an.name
    if ph is None:
        warns.append(f"{an.name} takes part in the {acid}/{base} equilibrium (pKa {pka:g}); the adjuster fixes no "
                     "pH — add a buffer or state sample_ph to check the measured fraction")
        return
    # γ of the measured ion from the design's model; a neutral partner by Setschenow (k = 0.1),
    # a charged partner by Davies (screening)
    ionic = float(np.median(np.concatenate([ev["ionic_s"].ravel(), ev["ionic_std"].ravel()])))
    g_an = float(10 ** np.median(ev["lg"][system.k]))
    from .models import davies

    def g(species):
        if species == an.name:
            return g_an
        ion = resolve_ion(species)
        if ion.charge == 0:
            return 10 ** (0.1 * ionic)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", ValidityRangeWarning)
            return davies(ion.charge, ionic, system.t)

    ga, gb = g(acid), g(base)
    log_b_over_a = ph - pka + math.log10(ga / gb)
    frac_base = 1.0 / (1.0 + 10 ** (-log_b_over_a))
    frac = frac_base if measured_is_base else 1.0 - frac_base
    far = abs(system.t - 25.0) > 5.0
    status = "ok" if frac >= 0.99 and not far else "warning"
    checks.append(Check(f"{an.name} in the measured form", status,
                        f"{frac:.2%} as {an.name} at pH {ph:.2f} ({acid}/{base}, pKa {pka:g}, activity-corrected)"
                        + ("" if frac >= 0.99 else "; below 99 %: move the pH")
                        + (f"; the pKa is a 25 °C value and the method runs at {system.t:g} °C" if far else "")))


def _gamma_profile(system, ev):
    ls = ev["ls"][0]
    lstd = ev["lstd"][0]
    # without ISA: the samples alone at the lowest analyte level
    n = len(system.names)
    raw = system.sample_c + system.stoich[:, None] * system.an_levels[0]
    lg_raw, _ = system.log10_gammas(raw.reshape(n, -1))
    order = np.argsort(system.sample_I)
    return {"ionic_strength": np.maximum(system.sample_I[order], 1e-7).tolist(),
            "without": np.power(10.0, lg_raw[system.k][order]).tolist(),
            "with": np.power(10.0, ls[order, 0]).tolist(),
            "standards": np.power(10.0, lstd).tolist()}


@dataclass(frozen=True)
class AdjusterComparison:
    """Several candidate adjusters for the same job, ranked."""

    rows: tuple[dict, ...]
    designs: dict

    @property
    def best(self) -> str | None:
        feasible = [r for r in self.rows if r["feasible"]]
        return feasible[0]["candidate"] if feasible else None

    def table(self) -> str:
        head = (f"{'rank':<5}{'candidate':<28}{'stock mol/L':>12}{'sat. used':>11}{'worst mV':>10}"
                f"{'interf. mV':>11}  note")
        lines = [head, "-" * len(head)]
        for k, r in enumerate(self.rows, 1):
            if r["feasible"]:
                lines.append(f"{k:<5}{r['candidate']:<28}{r['total_stock']:>12.4g}"
                             f"{(r['saturation'] if r['saturation'] is not None else float('nan')):>10.1%}"
                             f"{r['worst_error_mv']:>10.3g}{r['interference_mv']:>11.3g}  {r['note']}")
            else:
                lines.append(f"{k:<5}{r['candidate']:<28}{'—':>12}{'—':>11}{'—':>10}{'—':>11}  {r['note']}")
        return "\n".join(lines)


def compare_adjusters(candidates: Mapping[str, Mapping], **kwargs) -> AdjusterComparison:
    """Design each candidate stock for the same job and rank them side by side.

    Parameters
    ----------
    candidates : mapping
        Name -> salts mapping (as for :func:`design_adjuster`).
    **kwargs
        Everything else :func:`design_adjuster` takes (solve defaults to "stock").

    Returns
    -------
    AdjusterComparison
        Rows ranked: feasible designs first, then by interference (any failed
        interference check last), required stock strength and solubility margin.
    """
    kwargs.setdefault("solve", "stock")
    if not candidates:
        raise InputError("compare_adjusters needs at least one candidate")
    rows, designs = [], {}
    for name, salts in candidates.items():
        try:
            d = design_adjuster(salts=salts, **kwargs)
        except InfeasibleDesignError as exc:
            rows.append({"candidate": name, "feasible": False, "note": str(exc)})
            continue
        designs[name] = d
        sats = []
        for c in d.checks:
            if c.name.startswith("solubility of") and "% of saturation" in c.message:
                sats.append(float(c.message.split("=")[1].split("%")[0]) / 100)
        interf = []
        for c in d.checks:
            if c.name.startswith("interference") and "(from the samples)" not in c.name and "(+" in c.message:
                interf.append(float(c.message.split("(+")[1].split(" mV")[0]))
        bad = [c.name for c in d.checks if c.status == "fail"]
        rows.append({"candidate": name, "feasible": True, "total_stock": sum(d.stock.values()),
                     "saturation": max(sats) if sats else None, "worst_error_mv": d.worst_error_mv,
                     "interference_mv": max(interf) if interf else 0.0, "failed_checks": bad,
                     "note": ("fails: " + ", ".join(bad)) if bad else "ok"})
    rows.sort(key=lambda r: (not r["feasible"], bool(r.get("failed_checks")), r.get("interference_mv", 0.0),
                             r.get("total_stock", 0.0), r.get("saturation") or 0.0))
    return AdjusterComparison(tuple(rows), designs)
