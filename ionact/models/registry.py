"""The model registry: names, validity checks, parameter coverage and array kernels.

Every kernel takes a :class:`Batch` (ions, charges, molalities (n, N), temperature (N,),
ionic strength (N,)) and :class:`Options`, and returns log10 γ of shape (n, N) plus notes.
Each model also says what parameters it lacks for a set of ions (``needs``) and where a
batch leaves its validity range (``violations``: ionic strength, per-salt molality limits,
temperature). Nothing here warns or loops over samples: the resolver
(:mod:`ionact.models.resolver`) turns violations into warnings or notes.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from .. import water
from ..constants import LN10, PARAMETER_WINDOW
from ..errors import InputError, MissingParameterError, UnknownSpeciesError
from ..species import Ion
from . import debye_huckel as dh
from . import pitzer as pz
from . import sit as sit_mod

__all__ = [
    "Batch",
    "Options",
    "Violation",
    "make_options",
    "ModelInfo",
    "MODELS",
    "get_model",
    "model_names",
    "MISSING_POLICIES",
    "PAIR_SHARE_FOR_LIMITS",
]

MISSING_POLICIES = ("error", "zero")
PAIR_SHARE_FOR_LIMITS = 0.05  # a Pitzer pair's limits apply when it holds ≥ 5 % of the equivalents


@dataclass(frozen=True)
class Batch:
    """Plain arrays for the kernels: n species × N samples."""

    names: tuple[str, ...]
    ions: tuple[Ion, ...]
    z: np.ndarray  # (n,)
    m: np.ndarray  # (n, N) mol/kg
    t: np.ndarray  # (N,) °C
    ionic: np.ndarray  # (N,) mol/kg

    @classmethod
    def of(cls, ions: tuple[Ion, ...], m: np.ndarray, t: np.ndarray | float) -> Batch:
        """A batch from ions and molalities (n, N); the ionic strength is computed here."""
        z = np.array([i.charge for i in ions], dtype=float)
        m = np.asarray(m, dtype=float)
        ionic = 0.5 * (z**2) @ m if len(ions) else np.zeros(m.shape[1:])
        tt = np.broadcast_to(np.asarray(t, dtype=float), ionic.shape)
        return cls(tuple(i.name for i in ions), tuple(ions), z, m, tt, ionic)

    def take(self, rows: Sequence[int]) -> Batch:
        """The species at ``rows`` in the same solutions: the ionic strength stays the whole
        batch's (for models of z² and I alone, a species' γ needs nothing else)."""
        idx = list(rows)
        step = idx[1] - idx[0] if len(idx) > 1 else 1
        evenly = step > 0 and idx == list(range(idx[0], idx[-1] + 1, step)) if idx else False
        m = self.m[idx[0]:idx[-1] + 1:step] if evenly else self.m[idx]  # a view where the rows allow
        return Batch(tuple(self.names[i] for i in idx), tuple(self.ions[i] for i in idx), self.z[idx], m, self.t,
                     self.ionic)


@dataclass(frozen=True)
class Options:
    """Model options shared by all kernels (see :func:`ionact.activity_coefficients`).

    Mapping-like options are stored as sorted tuples of pairs, so an ``Options`` is
    immutable, hashable and compares by value.
    """

    sizes: tuple[tuple[str, float], ...] = ()
    davies_coefficient: float = dh.DAVIES_COEFFICIENT
    bdot: float = dh.B_DOT
    setschenow: tuple[tuple[str, float], ...] = ()
    setschenow_default: float = dh.SETSCHENOW_DEFAULT
    missing: str = "error"
    unsymmetrical: bool = True

    def size_of(self, ion: Ion) -> float | None:
        """The ion-size parameter å (Å): the caller's override, else Kielland's value."""
        return dict(self.sizes).get(ion.name, ion.size)

    def to_dict(self) -> dict[str, Any]:
        return {"sizes": dict(self.sizes), "davies_coefficient": self.davies_coefficient, "bdot": self.bdot,
                "setschenow": dict(self.setschenow), "setschenow_default": self.setschenow_default,
                "missing": self.missing, "unsymmetrical": self.unsymmetrical}

    @classmethod
    def from_dict(cls, d: Mapping[str, Any]) -> Options:
        return make_options(sizes=d.get("sizes"), davies_coefficient=d.get("davies_coefficient", 0.3),
                            bdot=d.get("bdot", dh.B_DOT), setschenow=d.get("setschenow") or None,
                            setschenow_default=d.get("setschenow_default", dh.SETSCHENOW_DEFAULT),
                            missing=d.get("missing", "error"), unsymmetrical=d.get("unsymmetrical", True))


def _finite(value: object, what: str, lo: float, hi: float) -> float:
    if isinstance(value, bool) or not isinstance(value, int | float | np.floating | np.integer):
        raise InputError(f"{what} {value!r} is not a number; allowed: {lo:g}–{hi:g}")
    v = float(value)
    if not (math.isfinite(v) and lo <= v <= hi):
        raise InputError(f"{what} {value!r} is outside the allowed range {lo:g}–{hi:g}")
    return v


def make_options(
    sizes: Mapping[str, float] | None = None,
    davies_coefficient: float = dh.DAVIES_COEFFICIENT,
    bdot: float = dh.B_DOT,
    setschenow: float | Mapping[str, float] | None = None,
    setschenow_default: float = dh.SETSCHENOW_DEFAULT,
    missing: str = "error",
    unsymmetrical: bool = True,
) -> Options:
    """Validated :class:`Options` from the keyword arguments the public functions take.

    Raises
    ------
    InputError
        A value outside its range (sizes 0–20 Å, Davies coefficient 0–1, …) or an unknown
        missing-parameter policy.
    """
    if missing not in MISSING_POLICIES:
        raise InputError(f"missing={missing!r}: allowed 'error', 'zero', or a fallback model name")
    if sizes is not None and not isinstance(sizes, Mapping):
        raise InputError(f"sizes {str(sizes)[:40]} must be a mapping of ion -> ion-size parameter (Å)")
    if setschenow is not None and not isinstance(setschenow, Mapping | int | float):
        raise InputError(f"setschenow {str(setschenow)[:40]} must be a number or a mapping of species -> k")
    sz = {}
    for k, v in (sizes or {}).items():
        name = Ion.parse(k).name
        sz[name] = _finite(v, f"size of {name} (Å)", 1e-9, 20.0)
    if isinstance(setschenow, bool):
        raise InputError(f"setschenow {setschenow!r} must be a number or a mapping of species -> k")
    if isinstance(setschenow, int | float):
        ks: dict[str, float] = {}
        kd = _finite(setschenow, "setschenow (kg/mol)", -2.0, 2.0)
    else:
        ks = {Ion.parse(k).name: _finite(v, f"setschenow of {k} (kg/mol)", -2.0, 2.0)
              for k, v in (setschenow or {}).items()}
        kd = _finite(setschenow_default, "setschenow_default (kg/mol)", -2.0, 2.0)
    if not isinstance(unsymmetrical, bool):
        raise InputError(f"unsymmetrical {unsymmetrical!r} must be True or False")
    return Options(sizes=tuple(sorted(sz.items())),
                   davies_coefficient=_finite(davies_coefficient, "davies_coefficient", 0.0, 1.0),
                   bdot=_finite(bdot, "bdot (kg/mol)", -1.0, 1.0), setschenow=tuple(sorted(ks.items())),
                   setschenow_default=kd, missing=missing, unsymmetrical=unsymmetrical)


@dataclass(frozen=True)
class Violation:
    """Where a batch leaves a model's validity: ``kind`` is "ionic-strength", "temperature"
    or "association"; ``message`` names the model, the limit and the value."""

    kind: str
    message: str

    def __str__(self) -> str:
        return self.message


Kernel = Callable[[Batch, Options], tuple[np.ndarray, list[str]]]
Needs = Callable[[tuple[Ion, ...], Options], list[str]]
Violations = Callable[[Batch, Options, float], list[Violation]]


@dataclass(frozen=True)
class ModelInfo:
    """A registered activity model."""

    name: str
    title: str
    max_ionic_strength: float
    rank: int  # higher = more accurate where it applies (used by model="auto")
    convention: str
    reference: str
    kernel: Kernel = field(repr=False)
    needs: Needs = field(repr=False)
    in_auto: bool = True
    extra_violations: Violations | None = field(default=None, repr=False)
    charge_only: bool = False  # γ of a charged ion depends on it only through z² (and I, T)

    def violations(self, batch: Batch, options: Options) -> list[Violation]:
        """Where this batch leaves the model's validity (ionic strength, salt limits, temperature)."""
        imax = float(np.fmax.reduce(batch.ionic, axis=None)) if batch.ionic.size else 0.0  # NaN skipped, one pass
        if not np.isfinite(imax):
            finite = batch.ionic[np.isfinite(batch.ionic)]
            imax = float(finite.max()) if finite.size else 0.0
        if self.extra_violations is not None:
            return self.extra_violations(batch, options, imax)
        return _range(self.name, self.max_ionic_strength, imax)


def _charged(ions: tuple[Ion, ...]) -> list[Ion]:
    return [i for i in ions if i.charge != 0]


def _neutral_lg(b: Batch, o: Options, lg: np.ndarray, notes: list[str]) -> np.ndarray:
    neutral = b.z == 0
    if np.any(neutral):
        given = dict(o.setschenow)
        idx = np.flatnonzero(neutral)
        ks = np.array([given.get(b.names[i], o.setschenow_default) for i in idx])
        if not (isinstance(lg, np.ndarray) and lg.dtype == float and lg.flags.owndata and lg.flags.writeable
                and lg.shape == b.m.shape):
            lg = np.array(np.broadcast_to(lg, b.m.shape), dtype=float)
        # the kernel's own fresh array: the neutral rows are replaced in place (no pass over the others)
        lg[idx] = ks[:, None] * b.ionic[None, :]
        used = [b.names[i] for i in idx]
        notes.append(
            "neutral species " + ", ".join(used) + " use Setschenow log10 γ = k·I "
            f"(k = {o.setschenow_default} kg/mol unless given; common practice)"
        )
    return lg


def _lacking_sizes(ions: tuple[Ion, ...], o: Options) -> list[str]:
    return [i.name for i in _charged(ions) if o.size_of(i) is None]


def _sizes(b: Batch, o: Options, notes: list[str]) -> np.ndarray:
    lacking = _lacking_sizes(b.ions, o)
    if lacking:
        if o.missing != "zero":
            raise MissingParameterError(
                "no Kielland ion size å for " + ", ".join(lacking)
                + "; pass sizes={ion: Å}, use another model, or allow missing='zero'"
            )
        notes.append("ion size taken as zero (limiting law) for " + ", ".join(lacking))
    return np.array([o.size_of(i) or 0.0 for i in b.ions], dtype=float)


def _needs_size(ions: tuple[Ion, ...], o: Options) -> list[str]:
    return [f"ion size å of {n}" for n in _lacking_sizes(ions, o)]


def _needs_nothing(ions: tuple[Ion, ...], o: Options) -> list[str]:
    return []


def _needs_tj(ions: tuple[Ion, ...], o: Options) -> list[str]:
    return [f"Truesdell–Jones a, b of {i.name}" for i in _charged(ions) if i.tj_a is None or i.tj_b is None]


def _needs_sit(ions: tuple[Ion, ...], o: Options) -> list[str]:
    charged = _charged(ions)
    _, lacking = sit_mod.epsilon_matrix(tuple(i.name for i in charged), tuple(i.charge for i in charged), "zero")
    return [f"SIT ε of {', '.join(lacking)}"] if lacking else []


def _needs_pitzer(ions: tuple[Ion, ...], o: Options) -> list[str]:
    cat = [i for i in ions if i.charge > 0]
    an = [i for i in ions if i.charge < 0]
    p = pz.pitzer_set(tuple(i.name for i in cat), tuple(i.name for i in an),
                      tuple(i.charge for i in cat), tuple(i.charge for i in an), "zero")
    return [f"Pitzer β0, β1, Cφ of {', '.join(p.missing_pairs)}"] if p.missing_pairs else []


def _common(b: Batch) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """z² (n, 1), √I (1, N) and A: (1, N), or (1, 1) when every sample has the same
    temperature (then the scalar factors of a model combine before they meet the batch)."""
    z2 = (b.z**2)[:, None]
    sq = np.sqrt(b.ionic)[None, :]
    a = water.dh_a_array(b.t)
    a = a[:1][None, :] if a.size > 1 and a.strides[0] == 0 else a[None, :]
    return z2, sq, a


def _k_limiting(b: Batch, o: Options) -> tuple[np.ndarray, list[str]]:
    z2, sq, a = _common(b)
    notes: list[str] = []
    return _neutral_lg(b, o, dh._lg_limiting(z2, sq, a), notes), notes


def _k_extended(b: Batch, o: Options) -> tuple[np.ndarray, list[str]]:
    z2, sq, a = _common(b)
    bb = water.dh_b_array(b.t)[None, :]
    notes: list[str] = []
    size = _sizes(b, o, notes)[:, None]
    return _neutral_lg(b, o, dh._lg_extended(z2, sq, a, bb, size), notes), notes


def _k_guntelberg(b: Batch, o: Options) -> tuple[np.ndarray, list[str]]:
    z2, sq, a = _common(b)
    notes: list[str] = []
    return _neutral_lg(b, o, dh._lg_guntelberg(z2, sq, a), notes), notes


def _k_davies(b: Batch, o: Options) -> tuple[np.ndarray, list[str]]:
    z2, sq, a = _common(b)
    notes: list[str] = []
    if o.davies_coefficient != dh.DAVIES_COEFFICIENT:
        notes.append(f"Davies linear coefficient {o.davies_coefficient} (default {dh.DAVIES_COEFFICIENT})")
    f = dh._lg_davies(1.0, sq, b.ionic[None, :], a, o.davies_coefficient)  # (1, N): the z² = 1 value
    return _neutral_lg(b, o, z2 * f, notes), notes


def _k_tj(b: Batch, o: Options) -> tuple[np.ndarray, list[str]]:
    z2, sq, a = _common(b)
    bb = water.dh_b_array(b.t)[None, :]
    notes: list[str] = []
    lacking = [i.name for i in _charged(b.ions) if i.tj_a is None or i.tj_b is None]
    if lacking and o.missing != "zero":
        raise MissingParameterError(
            "no Truesdell–Jones a, b for " + ", ".join(lacking) + "; use another model, or allow missing='zero'"
        )
    if lacking:
        notes.append("Truesdell–Jones a, b taken as zero for " + ", ".join(lacking))
    aa = np.array([i.tj_a or 0.0 for i in b.ions])[:, None]
    bj = np.array([i.tj_b or 0.0 for i in b.ions])[:, None]
    lg = dh._lg_truesdell_jones(z2, sq, b.ionic[None, :], a, bb, aa, bj)
    return _neutral_lg(b, o, lg, notes), notes


def _k_bdot(b: Batch, o: Options) -> tuple[np.ndarray, list[str]]:
    z2, sq, a = _common(b)
    bb = water.dh_b_array(b.t)[None, :]
    notes: list[str] = []
    size = _sizes(b, o, notes)[:, None]
    lg = dh._lg_b_dot(z2, sq, b.ionic[None, :], a, bb, size, o.bdot)
    return _neutral_lg(b, o, lg, notes), notes


def _k_ideal(b: Batch, o: Options) -> tuple[np.ndarray, list[str]]:
    return np.zeros_like(b.m), ["ideal solution: every activity coefficient taken as 1 (no activity correction)"]


def _k_bates(b: Batch, o: Options) -> tuple[np.ndarray, list[str]]:
    z2, sq, a = _common(b)
    notes: list[str] = []
    return _neutral_lg(b, o, dh._lg_bates_guggenheim(z2, sq, a), notes), notes


def _outside_window(model: str, what: str, t: np.ndarray) -> list[Violation]:
    lo, hi = PARAMETER_WINDOW
    far = (t < lo) | (t > hi)
    if not np.any(far):
        return []
    return [Violation("temperature", f"model {model}: {what} are 25 °C values; temperature {float(t[far][0]):g} °C "
                                     f"is outside {lo:g}–{hi:g} °C")]


def _range(name: str, limit: float, imax: float) -> list[Violation]:
    if imax > limit:
        return [Violation("ionic-strength",
                          f"model {name}: ionic strength {imax:.4g} mol/kg is above its range 0–{limit:g} mol/kg")]
    return []


def _v_bdot(b: Batch, o: Options, imax: float) -> list[Violation]:
    return _range("b-dot", dh.RANGES["b-dot"], imax) + _outside_window("b-dot", f"Ḃ = {o.bdot} kg/mol", b.t)


def _v_sit(b: Batch, o: Options, imax: float) -> list[Violation]:
    return _range("sit", sit_mod.SIT_MAX_IONIC_STRENGTH, imax) + _outside_window("sit", "ε coefficients", b.t)


def _k_sit(b: Batch, o: Options) -> tuple[np.ndarray, list[str]]:
    notes: list[str] = []
    charged = np.array([i.charge != 0 for i in b.ions])
    names = tuple(n for n, c in zip(b.names, charged, strict=True) if c)
    zs = tuple(i.charge for i in b.ions if i.charge != 0)
    eps, lacking = sit_mod.epsilon_matrix(names, zs, o.missing)
    if lacking:
        notes.append("SIT ε taken as zero for " + ", ".join(lacking))
    z2, sq, a = _common(b)
    d = a * sq / (1.0 + sit_mod.SIT_BA * sq)
    lg = -z2 * d
    idx = np.flatnonzero(charged)
    if idx.size:
        lg[idx] = lg[idx] + eps @ b.m[idx]
    return _neutral_lg(b, o, lg, notes), notes


def _pitzer_split(b: Batch, o: Options) -> tuple[np.ndarray, np.ndarray, pz.PitzerSet]:
    ci = np.flatnonzero(b.z > 0)
    ai = np.flatnonzero(b.z < 0)
    p = pz.pitzer_set(tuple(b.names[i] for i in ci), tuple(b.names[i] for i in ai),
                      tuple(int(b.z[i]) for i in ci), tuple(int(b.z[i]) for i in ai), o.missing)
    return ci, ai, p


def _k_pitzer(b: Batch, o: Options) -> tuple[np.ndarray, list[str]]:
    notes: list[str] = []
    ci, ai, p = _pitzer_split(b, o)
    if p.missing_pairs:
        notes.append("Pitzer binary parameters taken as zero for " + ", ".join(p.missing_pairs))
    if p.zero_mixing:
        shown = ", ".join(p.zero_mixing[:6])
        more = f" and {len(p.zero_mixing) - 6} more" if len(p.zero_mixing) > 6 else ""
        notes.append(f"untabulated Pitzer mixing terms taken as zero (the usual convention): {shown}{more}")
    if not o.unsymmetrical:
        notes.append("unsymmetrical mixing (E-θ) terms switched off")
    aphi = water.dh_a_array(b.t) * LN10 / 3.0
    lg = np.zeros_like(b.m)
    if ci.size and ai.size:
        ln_c, ln_a = pz.log_gamma(p, b.m[ci], b.m[ai], b.t, aphi, o.unsymmetrical)
        lg[ci] = ln_c / LN10
        lg[ai] = ln_a / LN10
    elif ci.size or ai.size:
        idx = ci if ci.size else ai
        sq = np.sqrt(b.ionic)
        f = -aphi * (sq / (1 + pz.PITZER_B * sq) + (2 / pz.PITZER_B) * np.log1p(pz.PITZER_B * sq))
        lg[idx] = (b.z[idx, None] ** 2) * f / LN10
    return _neutral_lg(b, o, lg, notes), notes


def _v_pitzer(b: Batch, o: Options, imax: float) -> list[Violation]:
    """Per-salt molality limits and temperature ranges of the pairs that matter in this batch."""
    ci, ai, p = _pitzer_split(b, o)
    if not (ci.size and ai.size):
        return _range("pitzer", pz.PITZER_MAX_IONIC_STRENGTH, imax)
    limit = pz.pair_ionic_strength_limits(p)  # (nc, na)
    t_lo, t_hi = float(np.nanmin(b.t)), float(np.nanmax(b.t))
    # only pairs that some sample takes past their limits need their shares (one (N,) pass each)
    past_i = np.isfinite(limit) & (imax > limit)
    past_t = (t_lo < p.t_range[..., 0]) | (t_hi > p.t_range[..., 1])
    out: list[Violation] = []
    if np.any(past_i | past_t):
        mc, ma = b.m[ci], b.m[ai]
        with np.errstate(divide="ignore", invalid="ignore"):  # 1/(Σ z m)² of each side; a side with none: 0
            inv = np.nan_to_num(1.0 / ((p.zc @ mc) * (p.za @ ma)), nan=0.0, posinf=0.0)

        def share(i: int, j: int) -> np.ndarray:  # y_c x_a of one pair, without every pair's fractions
            return mc[i] * ma[j] * (inv * (p.zc[i] * p.za[j]))

        for i, j in zip(*np.nonzero(past_i), strict=True):
            over = (share(i, j) >= PAIR_SHARE_FOR_LIMITS) & (b.ionic > limit[i, j])
            if np.any(over):
                k = int(np.argmax(np.where(over, b.ionic, -np.inf)))
                out.append(Violation("ionic-strength", f"model pitzer: the {p.cations[i]}–{p.anions[j]} parameters "
                                     f"hold to {p.max_molality[i, j]:g} mol/kg of the salt (I ≤ {limit[i, j]:.3g} "
                                     f"mol/kg); here I = {float(b.ionic[k]):.4g} mol/kg"))
        for i, j in zip(*np.nonzero(past_t), strict=True):
            lo, hi = p.t_range[i, j]
            far = ((b.t < lo) | (b.t > hi)) & (share(i, j) >= PAIR_SHARE_FOR_LIMITS)
            if np.any(far):
                what = ("linear temperature derivatives" if np.isfinite(p.dbeta0[i, j]) else "25 °C values")
                out.append(Violation("temperature", f"model pitzer: the {p.cations[i]}–{p.anions[j]} parameters "
                                     f"({what}) hold for {lo:g}–{hi:g} °C; temperature {float(b.t[far][0]):g} °C"))
    if not np.any(np.isfinite(limit)) and imax > pz.PITZER_MAX_IONIC_STRENGTH:
        out += _range("pitzer", pz.PITZER_MAX_IONIC_STRENGTH, imax)
    if (np.any(p.theta_c) or np.any(p.theta_a)):
        out += _outside_window("pitzer", "mixing terms θ, ψ", b.t)
    return out


_DH_CONV = "single-ion values from the model's own form; only mean (salt) values are measurable"
MODELS: dict[str, ModelInfo] = {
    m.name: m
    for m in [
        ModelInfo("limiting", "Debye–Hückel limiting law", dh.RANGES["limiting"], 10, _DH_CONV,
                  "Debye & Hückel 1923", _k_limiting, _needs_nothing, charge_only=True),
        ModelInfo("extended", "extended Debye–Hückel (Kielland sizes)", dh.RANGES["extended"], 50, _DH_CONV,
                  "Kielland 1937", _k_extended, _needs_size),
        ModelInfo("guntelberg", "Güntelberg", dh.RANGES["guntelberg"], 30, _DH_CONV, "Güntelberg 1926",
                  _k_guntelberg, _needs_nothing, charge_only=True),
        ModelInfo("davies", "Davies", dh.RANGES["davies"], 40, _DH_CONV, "Davies 1962", _k_davies, _needs_nothing,
                  charge_only=True),
        ModelInfo("truesdell-jones", "Truesdell–Jones", dh.RANGES["truesdell-jones"], 70, _DH_CONV,
                  "Truesdell & Jones 1974", _k_tj, _needs_tj),
        ModelInfo("b-dot", "B-dot (Helgeson)", dh.RANGES["b-dot"], 60, _DH_CONV, "Helgeson 1969", _k_bdot,
                  _needs_size, extra_violations=_v_bdot),
        ModelInfo("ideal", "ideal solution (γ = 1)", math.inf, 0, "no activity correction", "—", _k_ideal,
                  _needs_nothing, in_auto=False),
        ModelInfo("bates-guggenheim", "Bates–Guggenheim convention", dh.RANGES["bates-guggenheim"], 20,
                  "Bates–Guggenheim convention for single-ion activity (IUPAC 2002 pH recommendations)",
                  "Buck et al. 2002", _k_bates, _needs_nothing, in_auto=False, charge_only=True),
        ModelInfo("sit", "specific ion interaction theory", sit_mod.SIT_MAX_IONIC_STRENGTH, 80,
                  "SIT (NEA) single-ion form; mean values are the measurable quantity",
                  "NEA TDB reviews", _k_sit, _needs_sit, extra_violations=_v_sit),
        ModelInfo("pitzer", "Pitzer (Harvie–Møller–Weare form)", pz.PITZER_MAX_IONIC_STRENGTH, 90,
                  "Pitzer single-ion values in the Harvie–Møller–Weare convention; mean values are "
                  "convention-free", "Pitzer 1991; Harvie, Møller & Weare 1984", _k_pitzer, _needs_pitzer,
                  extra_violations=_v_pitzer),
    ]
}
DH_FAMILY = frozenset({"limiting", "extended", "guntelberg", "davies", "truesdell-jones", "b-dot",
                       "bates-guggenheim"})

_ALIASES = {"debye-huckel": "extended", "extended-debye-huckel": "extended", "bdot": "b-dot",
            "truesdell": "truesdell-jones", "tj": "truesdell-jones", "dh": "extended",
            "limiting-law": "limiting", "bates": "bates-guggenheim"}


def model_names() -> tuple[str, ...]:
    """Registered model names (plus "auto").

    Returns
    -------
    tuple of str
        The names :func:`ionact.activity_coefficients` and every job accept.

    Examples
    --------
    >>> "davies" in model_names() and "auto" in model_names()
    True
    """
    return (*MODELS, "auto")


def get_model(name: object) -> ModelInfo:
    """Look up a model by name (case- and underscore-insensitive).

    Parameters
    ----------
    name : str
        A registered model name (see :func:`model_names`), e.g. "davies", "Pitzer", "b_dot".

    Returns
    -------
    ModelInfo
        The model's record: title, validity limit in mol/kg, convention, reference, kernel.

    Raises
    ------
    UnknownSpeciesError
        Not a registered model name (the message lists the allowed names).

    Examples
    --------
    >>> get_model("Davies").max_ionic_strength
    0.5
    """
    if not isinstance(name, str):
        raise InputError(f"model must be a name, got {name!r}")
    key = name.strip().lower().replace("_", "-").replace(" ", "-")
    key = _ALIASES.get(key, key)
    if key not in MODELS:
        raise UnknownSpeciesError(f"unknown model {name!r}; allowed: {', '.join(model_names())}")
    return MODELS[key]
