"""The model registry: names, validity ranges, parameter coverage and array kernels.

Every kernel takes a :class:`Batch` (ions, charges, molalities (n, N), temperature (N,),
ionic strength (N,)) and :class:`Options`, and returns log10 γ of shape (n, N) plus
notes. Nothing here loops over samples.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from .. import water
from ..errors import InputError, MissingParameterError, UnknownSpeciesError
from ..species import Ion
from . import debye_huckel as dh
from . import pitzer as pz
from . import sit as sit_mod

__all__ = ["Batch", "Options", "ModelInfo", "MODELS", "get_model", "model_names", "log10_gamma", "missing_for"]

LN10 = math.log(10.0)


@dataclass(frozen=True)
class Batch:
    """Plain arrays for the kernels: n species × N samples."""

    names: tuple[str, ...]
    ions: tuple[Ion, ...]
    z: np.ndarray  # (n,)
    m: np.ndarray  # (n, N) mol/kg
    t: np.ndarray  # (N,) °C
    ionic: np.ndarray  # (N,) mol/kg


@dataclass(frozen=True)
class Options:
    """Model options shared by all kernels (see :func:`ionact.activity_coefficients`)."""

    sizes: dict[str, float] = field(default_factory=dict)
    davies_coefficient: float = dh.DAVIES_COEFFICIENT
    bdot: float = dh.B_DOT
    setschenow: dict[str, float] = field(default_factory=dict)
    setschenow_default: float = dh.SETSCHENOW_DEFAULT
    missing: str = "error"
    unsymmetrical: bool = True


@dataclass(frozen=True)
class ModelInfo:
    """A registered activity model."""

    name: str
    title: str
    max_ionic_strength: float
    rank: int  # higher = more accurate where it applies (used by model="auto")
    convention: str
    reference: str
    kernel: Callable[[Batch, Options], tuple[np.ndarray, list[str]]] = field(repr=False)
    needs: Callable[[tuple[Ion, ...], Options], list[str]] = field(repr=False)
    in_auto: bool = True


def _charged(ions):
    return [i for i in ions if i.charge != 0]


def _neutral_lg(b: Batch, o: Options, lg: np.ndarray, notes: list[str]) -> np.ndarray:
    neutral = b.z == 0
    if np.any(neutral):
        ks = np.array([o.setschenow.get(n, o.setschenow_default) for n in b.names])
        lg = np.where(neutral[:, None], ks[:, None] * b.ionic[None, :], lg)
        used = [n for n, is_n in zip(b.names, neutral, strict=True) if is_n]
        notes.append(
            "neutral species " + ", ".join(used) + " use Setschenow log10 γ = k·I "
            f"(k = {o.setschenow_default} kg/mol unless given; common practice)"
        )
    return lg


def _sizes(b: Batch, o: Options, attr: str = "size") -> np.ndarray:
    out = []
    for ion in b.ions:
        v = o.sizes.get(ion.name, getattr(ion, attr)) if attr == "size" else getattr(ion, attr)
        if v is None:
            v = 0.0 if (ion.charge == 0 or o.missing == "zero") else None
        if v is None:
            raise MissingParameterError(f"no {attr} parameter for {ion.name}")
        out.append(v)
    return np.array(out, dtype=float)


def _needs_size(ions, o: Options):
    return [f"ion size å of {i.name}" for i in _charged(ions) if i.size is None and i.name not in o.sizes]


def _needs_nothing(ions, o):
    return []


def _needs_tj(ions, o):
    return [f"Truesdell–Jones a, b of {i.name}" for i in _charged(ions) if i.tj_a is None or i.tj_b is None]


def _needs_sit(ions, o):
    charged = _charged(ions)
    try:
        sit_mod.epsilon_matrix(tuple(i.name for i in charged), tuple(i.charge for i in charged))
    except MissingParameterError as exc:
        return [str(exc)]
    return []


def _needs_pitzer(ions, o):
    cat = [i for i in ions if i.charge > 0]
    an = [i for i in ions if i.charge < 0]
    try:
        pz.pitzer_set(tuple(i.name for i in cat), tuple(i.name for i in an),
                      tuple(i.charge for i in cat), tuple(i.charge for i in an))
    except MissingParameterError as exc:
        return [str(exc)]
    return []


def _common(b: Batch):
    z2 = (b.z**2)[:, None]
    sq = np.sqrt(b.ionic)[None, :]
    a = water._dh_a(b.t)[None, :]
    return z2, sq, a


def _k_limiting(b, o):
    z2, sq, a = _common(b)
    notes: list[str] = []
    return _neutral_lg(b, o, dh._lg_limiting(z2, sq, a), notes), notes


def _k_extended(b, o):
    z2, sq, a = _common(b)
    bb = water._dh_b(b.t)[None, :]
    notes: list[str] = []
    _check_sizes(b, o, notes)
    size = _sizes(b, o)[:, None]
    return _neutral_lg(b, o, dh._lg_extended(z2, sq, a, bb, size), notes), notes


def _check_sizes(b, o, notes):
    lacking = [i.name for i in _charged(b.ions) if i.size is None and i.name not in o.sizes]
    if lacking:
        if o.missing != "zero":
            raise MissingParameterError(
                "no Kielland ion size å for " + ", ".join(lacking)
                + "; pass sizes={ion: Å}, use another model, or allow missing='zero'"
            )
        notes.append("ion size taken as zero (limiting law) for " + ", ".join(lacking))


def _k_guntelberg(b, o):
    z2, sq, a = _common(b)
    notes: list[str] = []
    return _neutral_lg(b, o, dh._lg_guntelberg(z2, sq, a), notes), notes


def _k_davies(b, o):
    z2, sq, a = _common(b)
    notes: list[str] = []
    if o.davies_coefficient != dh.DAVIES_COEFFICIENT:
        notes.append(f"Davies linear coefficient {o.davies_coefficient} (default 0.3)")
    lg = dh._lg_davies(z2, sq, b.ionic[None, :], a, o.davies_coefficient)
    return _neutral_lg(b, o, lg, notes), notes


def _k_tj(b, o):
    z2, sq, a = _common(b)
    bb = water._dh_b(b.t)[None, :]
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


def _k_bdot(b, o):
    z2, sq, a = _common(b)
    bb = water._dh_b(b.t)[None, :]
    notes: list[str] = []
    _check_sizes(b, o, notes)
    if np.any(np.abs(b.t - 25.0) > 5.0):
        from ..errors import warn_range

        warn_range(f"model b-dot: Ḃ = {o.bdot} kg/mol is a 25 °C value; temperature outside 20–30 °C", stacklevel=5)
    size = _sizes(b, o)[:, None]
    lg = dh._lg_b_dot(z2, sq, b.ionic[None, :], a, bb, size, o.bdot)
    return _neutral_lg(b, o, lg, notes), notes


def _k_bates(b, o):
    z2, sq, a = _common(b)
    notes: list[str] = []
    return _neutral_lg(b, o, dh._lg_bates_guggenheim(z2, sq, a), notes), notes


def _warn_25(model: str, t: np.ndarray, what: str):
    far = np.abs(t - 25.0) > 5.0
    if np.any(far):
        from ..errors import warn_range

        warn_range(f"model {model}: {what} are 25 °C values; temperature {float(t[far][0]):g} °C is "
                   "outside 20–30 °C", stacklevel=5)


def _k_sit(b, o):
    notes: list[str] = []
    charged = np.array([i.charge != 0 for i in b.ions])
    names = tuple(n for n, c in zip(b.names, charged, strict=True) if c)
    zs = tuple(i.charge for i in b.ions if i.charge != 0)
    eps, lacking = sit_mod.epsilon_matrix(names, zs, o.missing)
    if lacking:
        notes.append("SIT ε taken as zero for " + ", ".join(lacking))
    _warn_25("sit", b.t, "ε coefficients")
    z2, sq, a = _common(b)
    d = a * sq / (1.0 + sit_mod.SIT_BA * sq)
    lg = -z2 * d
    idx = np.flatnonzero(charged)
    if idx.size:
        lg[idx] = lg[idx] + eps @ b.m[idx]
    return _neutral_lg(b, o, lg, notes), notes


def _pitzer_split(b: Batch, o: Options):
    ci = np.flatnonzero(b.z > 0)
    ai = np.flatnonzero(b.z < 0)
    p = pz.pitzer_set(tuple(b.names[i] for i in ci), tuple(b.names[i] for i in ai),
                      tuple(int(b.z[i]) for i in ci), tuple(int(b.z[i]) for i in ai), o.missing)
    return ci, ai, p


def _k_pitzer(b, o):
    notes: list[str] = []
    ci, ai, p = _pitzer_split(b, o)
    if p.missing_pairs:
        notes.append("Pitzer binary parameters taken as zero for " + ", ".join(p.missing_pairs))
    if p.zero_mixing:
        notes.append("untabulated mixing terms taken as zero: " + ", ".join(p.zero_mixing))
    if not o.unsymmetrical:
        notes.append("unsymmetrical mixing (E-θ) terms switched off")
    aphi = water._dh_a(b.t) * LN10 / 3.0
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


_DH_CONV = "single-ion values from the model's own form; only mean (salt) values are measurable"
MODELS: dict[str, ModelInfo] = {
    m.name: m
    for m in [
        ModelInfo("limiting", "Debye–Hückel limiting law", dh.RANGES["limiting"], 10, _DH_CONV,
                  "Debye & Hückel 1923", _k_limiting, _needs_nothing),
        ModelInfo("extended", "extended Debye–Hückel (Kielland sizes)", dh.RANGES["extended"], 50, _DH_CONV,
                  "Kielland 1937", _k_extended, _needs_size),
        ModelInfo("guntelberg", "Güntelberg", dh.RANGES["guntelberg"], 30, _DH_CONV, "Güntelberg 1926",
                  _k_guntelberg, _needs_nothing),
        ModelInfo("davies", "Davies", dh.RANGES["davies"], 40, _DH_CONV, "Davies 1962", _k_davies, _needs_nothing),
        ModelInfo("truesdell-jones", "Truesdell–Jones", dh.RANGES["truesdell-jones"], 70, _DH_CONV,
                  "Truesdell & Jones 1974", _k_tj, _needs_tj),
        ModelInfo("b-dot", "B-dot (Helgeson)", dh.RANGES["b-dot"], 60, _DH_CONV, "Helgeson 1969", _k_bdot,
                  _needs_size),
        ModelInfo("bates-guggenheim", "Bates–Guggenheim convention", dh.RANGES["bates-guggenheim"], 20,
                  "Bates–Guggenheim convention for single-ion activity (IUPAC 2002 pH recommendations)",
                  "Buck et al. 2002", _k_bates, _needs_nothing, in_auto=False),
        ModelInfo("sit", "specific ion interaction theory", sit_mod.SIT_MAX_IONIC_STRENGTH, 80,
                  "SIT (NEA) single-ion form; mean values are the measurable quantity",
                  "NEA TDB reviews", _k_sit, _needs_sit),
        ModelInfo("pitzer", "Pitzer (Harvie–Møller–Weare form)", 6.0, 90,
                  "Pitzer single-ion values in the Harvie–Møller–Weare convention; mean values are "
                  "convention-free", "Pitzer 1991; Harvie, Møller & Weare 1984", _k_pitzer, _needs_pitzer),
    ]
}


def model_names() -> tuple[str, ...]:
    """Registered model names (plus "auto")."""
    return (*MODELS, "auto")


def get_model(name: str) -> ModelInfo:
    """Look up a model by name (case- and underscore-insensitive)."""
    if not isinstance(name, str):
        raise InputError(f"model must be a name, got {name!r}")
    key = name.strip().lower().replace("_", "-").replace(" ", "-")
    aliases = {"debye-huckel": "extended", "extended-debye-huckel": "extended", "bdot": "b-dot",
               "truesdell": "truesdell-jones", "tj": "truesdell-jones", "dh": "extended",
               "limiting-law": "limiting", "bates": "bates-guggenheim"}
    key = aliases.get(key, key)
    if key not in MODELS:
        raise UnknownSpeciesError(f"unknown model {name!r}; allowed: {', '.join(model_names())}")
    return MODELS[key]


def missing_for(model: ModelInfo, ions: tuple[Ion, ...], options: Options) -> list[str]:
    """What parameters ``model`` lacks for these ions (empty when it covers them)."""
    if options.missing != "error":
        return []
    return model.needs(ions, options)


def log10_gamma(model: ModelInfo, batch: Batch, options: Options) -> tuple[np.ndarray, list[str]]:
    """Run a model kernel on plain arrays: log10 γ (n, N) and notes."""
    return model.kernel(batch, options)
