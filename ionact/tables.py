"""Load the parameter tables under ``ionact/data`` once, into frozen records.

Every table row carries a ``source`` key (one or several, ``;``-separated) that
resolves to a full citation in :mod:`ionact.references`.
"""

from __future__ import annotations

import csv
import re
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

from .constants import PARAMETER_WINDOW

_DATA = Path(__file__).parent / "data"  # the package's own tables (importlib.resources costs 6 ms of import)

__all__ = [
    "IonRecord",
    "SaltRecord",
    "PitzerBinary",
    "ion_table",
    "salt_table",
    "sit_table",
    "pitzer_binary_table",
    "pitzer_mixing_table",
    "canonical_name",
    "acid_table",
    "ksp_table",
    "ComplexRecord",
    "complex_table",
    "ReagentRecord",
    "reagent_table",
    "charge_of_name",
]


def canonical_name(formula: str, charge: int) -> str:
    """Canonical text of an ion in the IUPAC order: ``Na+``, ``Cl-``, ``Ca^2+``, ``SO4^2-``, neutral ``NH3``.

    The number comes before the sign, and a caret separates a charge above one from the
    formula (so that ``SO4^2-`` cannot be read as a subscript).
    """
    if charge == 0:
        return formula
    sign = "+" if charge > 0 else "-"
    n = abs(charge)
    return f"{formula}{sign}" if n == 1 else f"{formula}^{n}{sign}"


def _rows(name: str) -> list[dict[str, str]]:
    text = (_DATA / name).read_text(encoding="utf-8")
    return list(csv.DictReader(text.splitlines()))


def _opt(value: str) -> float | None:
    value = value.strip()
    return float(value) if value else None


@dataclass(frozen=True, slots=True)
class IonRecord:
    """One row of ``ions.csv``: an ion's tabulated parameters (25 °C)."""

    formula: str
    charge: int
    aliases: tuple[str, ...]
    size: float | None  # Kielland ion-size parameter, Å
    tj_a: float | None  # Truesdell–Jones a, Å
    tj_b: float | None  # Truesdell–Jones b, kg/mol
    volume: float | None  # apparent molar volume at infinite dilution, cm³/mol
    masson: float | None  # S of V = V° + S √I_c, cm³ L^½ mol^-3/2
    source: tuple[str, ...]

    @property
    def name(self) -> str:
        return canonical_name(self.formula, self.charge)


@dataclass(frozen=True, slots=True)
class SaltRecord:
    """One row of ``salts.csv``: stoichiometry, solubility and hazard keys."""

    formula: str
    ions: tuple[tuple[str, int], ...]
    solubility: tuple[tuple[float, float], ...]  # (°C, g anhydrous salt per 100 g water)
    hazards: tuple[str, ...]
    source: tuple[str, ...]


@dataclass(frozen=True, slots=True)
class PitzerBinary:
    """Binary Pitzer parameters of one cation–anion pair at 25 °C."""

    cation: str
    anion: str
    beta0: float
    beta1: float
    beta2: float
    cphi: float
    alpha1: float
    alpha2: float
    dbeta0_dT: float | None
    dbeta1_dT: float | None
    dcphi_dT: float | None
    max_molality: float
    t_range: tuple[float, float]  # °C over which the parameters (with any derivatives) hold
    source: tuple[str, ...]


def _src(text: str) -> tuple[str, ...]:
    return tuple(s.strip() for s in text.split(";") if s.strip())


@lru_cache(maxsize=1)
def ion_table() -> dict[str, IonRecord]:
    """All tabulated ions keyed by canonical name (``"Ca^2+"``)."""
    out: dict[str, IonRecord] = {}
    for r in _rows("ions.csv"):
        rec = IonRecord(
            formula=r["formula"],
            charge=int(r["charge"]),
            aliases=tuple(a for a in r["aliases"].split(";") if a),
            size=_opt(r["kielland_size_angstrom"]),
            tj_a=_opt(r["tj_a_angstrom"]),
            tj_b=_opt(r["tj_b_kg_per_mol"]),
            volume=_opt(r["volume_cm3_per_mol"]),
            masson=_opt(r["masson_cm3_l05_per_mol15"]),
            source=_src(r["source"]),
        )
        out[rec.name] = rec
    return out


@lru_cache(maxsize=1)
def salt_table() -> dict[str, SaltRecord]:
    """Tabulated salts keyed by formula as written in the table."""
    out: dict[str, SaltRecord] = {}
    temps = (0.0, 10.0, 20.0, 25.0, 30.0)
    for r in _rows("salts.csv"):
        sol = tuple(
            (t, float(r[f"sol_{int(t)}C"])) for t in temps if r[f"sol_{int(t)}C"].strip()
        )
        out[r["formula"]] = SaltRecord(
            formula=r["formula"],
            ions=((r["cation"], int(r["nu_cation"])), (r["anion"], int(r["nu_anion"]))),
            solubility=sol,
            hazards=tuple(h for h in r["hazards"].split(";") if h),
            source=_src(r["source"]),
        )
    return out


@lru_cache(maxsize=1)
def sit_table() -> dict[frozenset[str], tuple[float, tuple[str, ...]]]:
    """SIT ε(j, k) in kg/mol at 25 °C keyed by the unordered ion pair."""
    return {
        frozenset((r["cation"], r["anion"])): (float(r["epsilon_kg_per_mol"]), _src(r["source"]))
        for r in _rows("sit.csv")
    }


@lru_cache(maxsize=1)
def pitzer_binary_table() -> dict[tuple[str, str], PitzerBinary]:
    """Binary Pitzer parameters keyed by (cation, anion)."""
    out: dict[tuple[str, str], PitzerBinary] = {}
    for r in _rows("pitzer_binary.csv"):
        rec = PitzerBinary(
            cation=r["cation"],
            anion=r["anion"],
            beta0=float(r["beta0"]),
            beta1=float(r["beta1"]),
            beta2=float(r["beta2"]),
            cphi=float(r["cphi"]),
            alpha1=float(r["alpha1"]),
            alpha2=float(r["alpha2"]),
            dbeta0_dT=_opt(r["dbeta0_dT"]),
            dbeta1_dT=_opt(r["dbeta1_dT"]),
            dcphi_dT=_opt(r["dcphi_dT"]),
            max_molality=float(r["max_molality"]),
            t_range=((float(r["t_min_C"]), float(r["t_max_C"])) if r["t_min_C"].strip() else PARAMETER_WINDOW),
            source=_src(r["source"]),
        )
        out[(rec.cation, rec.anion)] = rec
    return out


_RE_CHARGE = re.compile(r"(?:\^(\d+))?([+-])$")


def charge_of_name(name: str) -> int:
    """The charge written in a canonical name (``"SO4^2-"`` → −2, ``"NH3"`` → 0)."""
    if name.endswith("(aq)"):
        return 0
    m = _RE_CHARGE.search(name)
    if m is None:
        return 0
    n = int(m[1]) if m[1] else 1
    return n if m[2] == "+" else -n


@lru_cache(maxsize=1)
def pitzer_mixing_table() -> tuple[dict[frozenset[str], float], dict[tuple[frozenset[str], str], float]]:
    """θ keyed by the unordered like-sign pair; ψ keyed by (like-sign pair, ion of the other sign).

    A ψ row may name its three ions in any order: the two of the same sign form the pair.
    A row that does not describe a like-sign pair (θ) or such a pair with one ion of the
    other sign (ψ) is an error at load time, so no row can sit in the table unreachable.
    """
    theta: dict[frozenset[str], float] = {}
    psi: dict[tuple[frozenset[str], str], float] = {}
    for k, r in enumerate(_rows("pitzer_mixing.csv"), start=2):
        ions = [r["ion1"], r["ion2"]] + ([r["ion3"]] if r["ion3"].strip() else [])
        zs = [charge_of_name(i) for i in ions]
        if r["kind"] == "theta":
            if len(ions) != 2 or zs[0] * zs[1] <= 0 or ions[0] == ions[1]:
                raise ValueError(f"pitzer_mixing.csv line {k}: θ needs two different ions of the same sign")
            theta[frozenset(ions)] = float(r["value"])
        elif r["kind"] == "psi":
            pos = [i for i, z in zip(ions, zs, strict=True) if z > 0]
            neg = [i for i, z in zip(ions, zs, strict=True) if z < 0]
            if len(ions) != 3 or {len(pos), len(neg)} != {1, 2} or len(set(ions)) != 3:
                raise ValueError(f"pitzer_mixing.csv line {k}: ψ needs two ions of one sign and one of the other")
            pair, third = (pos, neg[0]) if len(pos) == 2 else (neg, pos[0])
            psi[(frozenset(pair), third)] = float(r["value"])
        else:
            raise ValueError(f"pitzer_mixing.csv line {k}: kind {r['kind']!r} is not theta or psi")
    return theta, psi


@dataclass(frozen=True, slots=True)
class ComplexRecord:
    """One row of ``complexes.csv``: a species formed stepwise from a base species and components.

    ``log_k`` and ``delta_h`` (kJ/mol, None when unknown) are those of the step
    base + adds → species at 25 °C and I = 0; overall constants follow by summing the steps.
    """

    species: str
    charge: int
    base: str  # "" when formed from the components alone
    adds: tuple[tuple[str, int], ...]
    log_k: float
    delta_h: float | None
    kind: str  # "water", "acid", "pair", "complex", "hydrolysis"
    size: float | None
    source: tuple[str, ...]


def _adds(text: str, where: str) -> tuple[tuple[str, int], ...]:
    out = []
    for part in text.split(";"):
        if not part.strip():
            continue
        name, _, n = part.rpartition(":")
        out.append((name.strip(), int(n)))
    if not out:
        raise ValueError(f"complexes.csv {where}: no components added")
    return tuple(out)


@lru_cache(maxsize=1)
def complex_table() -> dict[str, ComplexRecord]:
    """Aqueous species formed from components (complexes, ion pairs, acids), keyed by name.

    Each row's charge must equal its base's charge plus the charges it adds; a row whose
    base is not defined above it is an error at load time.
    """
    out: dict[str, ComplexRecord] = {}
    for k, r in enumerate(_rows("complexes.csv"), start=2):
        adds = _adds(r["adds"], f"line {k}")
        charge = int(r["charge"])
        base = r["base"].strip()
        base_charge = 0
        if base:
            base_charge = out[base].charge if base in out else charge_of_name(base)
        expect = base_charge + sum(charge_of_name(a) * n for a, n in adds)
        if expect != charge:
            raise ValueError(f"complexes.csv line {k}: {r['species']} has charge {charge}, its parts {expect}")
        out[r["species"]] = ComplexRecord(r["species"], charge, base, adds, float(r["log_k"]),
                                          _opt(r["delta_h_kj"]), r["kind"], _opt(r["size_angstrom"]),
                                          _src(r["source"]))
    return out


@dataclass(frozen=True, slots=True)
class ReagentRecord:
    """A neutral reagent added to stocks as such (not as a salt): its form and hazards."""

    formula: str
    liquid: bool
    density: float | None  # g/mL at 25 °C for liquids
    hazards: tuple[str, ...]
    source: tuple[str, ...]


@lru_cache(maxsize=1)
def reagent_table() -> dict[str, ReagentRecord]:
    """Neutral reagents keyed by formula (``reagents.csv``)."""
    out = {}
    for r in _rows("reagents.csv"):
        out[r["formula"]] = ReagentRecord(r["formula"], r["form"] == "liquid", _opt(r["density_g_per_ml"]),
                                          tuple(h for h in r["hazards"].split(";") if h), _src(r["source"]))
    return out


@lru_cache(maxsize=1)
def acid_table() -> dict[tuple[str, str], tuple[float, tuple[str, ...]]]:
    """pKa at 25 °C, I = 0, keyed by (acid species, conjugate base species)."""
    return {(r["acid"], r["base"]): (float(r["pka_25C"]), _src(r["source"])) for r in _rows("acids.csv")}


@lru_cache(maxsize=1)
def ksp_table() -> dict[str, tuple[float, tuple[str, ...]]]:
    """log10 Ksp at 25 °C keyed by salt formula."""
    return {r["salt"]: (float(r["log10_ksp_25C"]), _src(r["source"])) for r in _rows("ksp.csv")}


@lru_cache(maxsize=1)
def conductivity_table() -> dict[str, tuple[float, tuple[str, ...]]]:
    """Limiting molar conductivity λ° of each ion at 25 °C (S cm² mol⁻¹), keyed by ion name."""
    return {r["ion"]: (float(r["lambda_s_cm2_per_mol"]), _src(r["source"])) for r in _rows("conductivities.csv")}
