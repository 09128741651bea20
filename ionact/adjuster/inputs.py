"""The records a design job is made of: the budget, the samples, the electrode, the stock.

Each maps one to one onto a table of the method file (``[budget]``, ``[samples]``,
``[electrode]``, ``[adjuster.stock]``, ``[adjuster.buffer]``). They validate their values
when made, so a design only ever sees checked inputs.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from .._frozen import frozen_map
from ..electrode import nernst_slope
from ..errors import InputError
from ..solution import Solution
from ..species import Ion, Salt, resolve_ion
from ..tables import reagent_table
from ..units import MOLAR, parse_amount, parse_scalar

__all__ = [
    "Budget",
    "SamplePopulation",
    "Electrode",
    "StockComponent",
    "Buffer",
    "ROLES",
    "MAX_VOLUME_RATIO",
    "number",
    "mol_per_l",
    "pair_of",
]

ROLES = ("inert", "fixed", "buffer-acid", "buffer-base")
# Volumes of adjuster per volume of sample: beyond 10 the "adjuster" is the sample's solvent.
MAX_VOLUME_RATIO = 10.0


def number(value: object, name: str, lo: float = -math.inf, hi: float = math.inf, lo_open: bool = False) -> float:
    """A finite float within [lo, hi] (or (lo, hi] with lo_open), else InputError naming the value."""
    rng = f"{'(' if lo_open else '['}{lo:g}, {hi:g}]"
    if isinstance(value, bool) or not isinstance(value, int | float | np.integer | np.floating):
        raise InputError(f"{name} {value!r} is not a number", value=value, allowed=rng, field=name)
    try:
        v = float(value)
    except OverflowError:
        raise InputError(f"{name} {str(value)[:20]}… is far outside the allowed range {rng}", value=value,
                         allowed=rng, field=name) from None
    bad_lo = v <= lo if lo_open else v < lo
    if not math.isfinite(v) or bad_lo or v > hi:
        raise InputError(f"{name} {value!r} is outside the allowed range {rng}", value=value, allowed=rng, field=name)
    return v


def mol_per_l(value: object, what: str) -> float:
    """A non-negative molar amount: a number (mol/L) or a unit string of amount per volume."""
    if isinstance(value, str):
        amt = parse_amount(value, None, default_basis=MOLAR)
        if amt.basis != MOLAR:
            raise InputError(f"{what} {value!r} must be an amount per litre (mol/L, mmol/L …)")
        v = float(amt.value)
    else:
        v = number(value, what, 0.0, 50.0)
    return v


def pair_of(value: object, what: str) -> tuple[Any, Any]:
    """A (low, high) pair, else InputError naming the value."""
    if isinstance(value, str | bytes | Mapping) or not isinstance(value, Sequence | np.ndarray):
        raise InputError(f"{what} {value!r} must be a pair (low, high)")
    if len(value) != 2:
        raise InputError(f"{what} {value!r} must be a pair (low, high), got {len(value)} values")
    return value[0], value[1]


@dataclass(frozen=True)
class Budget:
    """The error budget between standards and the worst sample: exactly one of mv or percent.

    Parameters
    ----------
    mv : float, optional
        Largest allowed ``|ΔE|`` in mV (0 < mv ≤ 100).
    percent : float, optional
        Largest allowed relative concentration error in % (0 < percent ≤ 100); converted to
        mV with the Nernst slope at the method's temperature.
    """

    mv: float | None = None
    percent: float | None = None

    def __post_init__(self) -> None:
        if (self.mv is None) == (self.percent is None):
            raise InputError("give exactly one error budget: Budget(mv=…) or Budget(percent=…)")
        if self.mv is not None:
            object.__setattr__(self, "mv", number(self.mv, "budget mv", 0.0, 100.0, lo_open=True))
        else:
            object.__setattr__(self, "percent", number(self.percent, "budget percent", 0.0, 100.0, lo_open=True))

    def in_mv(self, charge: int, temperature: float) -> float:
        """The budget as ``|ΔE|`` in mV for an ion of this charge at this temperature (°C)."""
        if self.mv is not None:
            return self.mv
        assert self.percent is not None
        return abs(float(nernst_slope(charge, temperature))) * math.log10(1.0 + self.percent / 100.0)

    def to_dict(self) -> dict[str, float | None]:
        return {"mv": self.mv, "percent": self.percent}

    @classmethod
    def from_dict(cls, d: Mapping[str, Any]) -> Budget:
        if not isinstance(d, Mapping) or set(d) - {"mv", "percent"}:
            raise InputError(f"budget {d!r} must be a mapping with mv or percent")
        return cls(mv=d.get("mv"), percent=d.get("percent"))


def _range_pair(value: object, what: str, unit: str, hi: float) -> tuple[float, float]:
    lo_v, hi_v = pair_of(value, what)
    lo = parse_scalar(lo_v, unit, what)
    up = parse_scalar(hi_v, unit, what)
    if not (0.0 <= lo <= up <= hi):
        raise InputError(f"{what} ({lo_v!r}, {hi_v!r}) must satisfy 0 ≤ low ≤ high ≤ {hi:g} {unit}")
    return lo, up


@dataclass(frozen=True)
class SamplePopulation:
    """The untreated samples a method must serve: one description of their ionic strength.

    Exactly one of ``ionic_strength``, ``conductivity``, ``tds`` or ``matrices``.

    Parameters
    ----------
    ionic_strength : (low, high), optional
        mol/kg; the samples are modelled as ``background`` salt solutions across the range.
    conductivity : (low, high), optional
        µS/cm at 25 °C (numbers) or unit strings ("0.85 mS/cm"), turned into ionic strength
        by the named ``rule`` (default "russell").
    tds : (low, high), optional
        Dissolved solids, mg/L or unit strings ("1.2 g/L"), by ``rule`` (default "langelier").
    matrices : Solution, optional
        Explicit sample matrices (a one-dimensional batch) without the analyte.
    labels : sequence of str, optional
        Names of the explicit matrices.
    background : str
        Salt that stands for the matrix when only the ionic strength is known (default NaCl).
    rule : str, optional
        The conductivity or dissolved-solids rule of thumb.
    matrix_ions : mapping, optional
        Ions known to occur in the samples with their highest levels (e.g. {"Ca^2+": "300 mg/L"});
        they enter the interference and precipitation checks.
    acidity : (low, high), optional
        Strong acid (+) or base (−) the samples bring, mol/L, for the buffer's pH drift.
    ph : float, optional
        Without a buffer: the treated solutions' pH, for the protonation and H+/OH- checks.
    """

    ionic_strength: tuple[float, float] | None = None
    conductivity: tuple[float, float] | None = None
    tds: tuple[float, float] | None = None
    matrices: Solution | None = None
    labels: tuple[str, ...] | None = None
    background: str = "NaCl"
    rule: str | None = None
    matrix_ions: Mapping[str, Any] = field(default_factory=dict)
    acidity: tuple[float, float] | None = None
    ph: float | None = None

    def __post_init__(self) -> None:
        given = [k for k in ("ionic_strength", "conductivity", "tds", "matrices") if getattr(self, k) is not None]
        if len(given) != 1:
            raise InputError("describe the samples once: ionic_strength=(lo, hi), conductivity=(lo, hi), "
                             f"tds=(lo, hi) or matrices=Solution (got {', '.join(given) or 'none'})")
        if self.ionic_strength is not None:
            object.__setattr__(self, "ionic_strength",
                               _range_pair(self.ionic_strength, "sample ionic_strength", "mol/kg", 20.0))
        if self.conductivity is not None:
            object.__setattr__(self, "conductivity",
                               _range_pair(self.conductivity, "sample conductivity", "uS/cm", 1e6))
        if self.tds is not None:
            object.__setattr__(self, "tds", _range_pair(self.tds, "sample tds", "mg/L", 1e6))
        if self.matrices is not None:
            if not isinstance(self.matrices, Solution):
                raise InputError(f"matrices must be a Solution batch, got {type(self.matrices).__name__}")
            if len(self.matrices.shape) > 1:
                raise InputError("matrices must be a one-dimensional batch")
            if self.matrices.size == 0:
                raise InputError("matrices is an empty batch")
        if self.labels is not None:
            labels = tuple(str(x) for x in self.labels)
            n = self.matrices.size if self.matrices is not None else None
            if n is None or len(labels) != n:
                raise InputError(f"labels needs one label per explicit matrix ({n}), got {len(labels)}")
            object.__setattr__(self, "labels", labels)
        if not isinstance(self.background, str):
            raise InputError(f"background {self.background!r} must be a salt formula")
        if self.rule is not None and not isinstance(self.rule, str):
            raise InputError(f"rule {self.rule!r} must be a rule name")
        if not isinstance(self.matrix_ions, Mapping):
            raise InputError(f"matrix_ions {self.matrix_ions!r} must be a mapping of ion -> highest level")
        levels = {}
        for k, v in self.matrix_ions.items():
            ion = resolve_ion(k)
            a = parse_amount(v, ion, default_basis=MOLAR)
            levels[ion.name] = (float(a.value), a.basis)
        object.__setattr__(self, "matrix_ions", frozen_map(levels))
        if self.acidity is not None:
            lo, hi = pair_of(self.acidity, "sample acidity")
            pair = (number(lo, "sample acidity low (mol/L)", -5, 5), number(hi, "sample acidity high (mol/L)", -5, 5))
            if pair[0] > pair[1]:
                raise InputError(f"sample acidity {self.acidity!r} must satisfy low ≤ high")
            object.__setattr__(self, "acidity", pair)
        if self.ph is not None:
            object.__setattr__(self, "ph", number(self.ph, "sample ph", 0.0, 14.0))

    def to_dict(self) -> dict[str, Any]:
        return {"ionic_strength": list(self.ionic_strength) if self.ionic_strength else None,
                "conductivity_us_cm": list(self.conductivity) if self.conductivity else None,
                "tds_mg_l": list(self.tds) if self.tds else None,
                "matrices": self.matrices is not None, "labels": list(self.labels) if self.labels else None,
                "background": self.background, "rule": self.rule,
                "matrix_ions": {k: {"amount": v[0], "basis": v[1]} for k, v in self.matrix_ions.items()},
                "acidity_mol_l": list(self.acidity) if self.acidity else None, "ph": self.ph}


@dataclass(frozen=True)
class Electrode:
    """What the method knows of its electrode.

    Parameters
    ----------
    linear_range : (low, high), optional
        The Nernstian range in the treated solution (mol/L or unit strings).
    selectivity : mapping, optional
        Ion -> selectivity coefficient K of *this* electrode (the caller's own values;
        ionact ships none). Ions of the analyte's sign without a coefficient are reported
        as "not assessed", never as clean.
    """

    linear_range: tuple[Any, Any] | None = None
    selectivity: Mapping[str, float] = field(default_factory=dict)

    def __post_init__(self) -> None:
        if self.linear_range is not None:
            object.__setattr__(self, "linear_range", pair_of(self.linear_range, "linear_range"))
        if not isinstance(self.selectivity, Mapping):
            raise InputError(f"selectivity {self.selectivity!r} must be a mapping of ion -> coefficient")
        sel = {}
        for k, v in self.selectivity.items():
            ion = resolve_ion(k)
            sel[ion.name] = number(v, f"selectivity coefficient for {ion.name}", 0.0, 1e6)
        object.__setattr__(self, "selectivity", frozen_map(sel))

    def to_dict(self) -> dict[str, Any]:
        return {"linear_range": list(self.linear_range) if self.linear_range else None,
                "selectivity": dict(self.selectivity)}


@dataclass(frozen=True)
class StockComponent:
    """One component of the adjuster stock, with its role.

    Roles: ``"inert"`` (an inert salt: scaled when the stock strength is solved),
    ``"fixed"`` (a complexing agent or any other addition kept as given), and
    ``"buffer-acid"`` / ``"buffer-base"`` (a pH buffer pair, solved for the target pH; made
    by :class:`Buffer`).

    Build one with :meth:`of`.
    """

    name: str
    amount: float
    role: str
    ions: tuple[tuple[Ion, int], ...]
    molar_mass: float
    hazards: tuple[str, ...] = ()
    salt: Salt | None = None
    liquid_density: float | None = None  # g/mL, for reagents dispensed by volume

    def __post_init__(self) -> None:
        if self.role not in ROLES:
            raise InputError(f"role {self.role!r} of {self.name} is not one of {', '.join(ROLES)}")

    @property
    def custom(self) -> bool:
        """Whether one of its ions is outside the ion table (a user-defined species)."""
        return any(not ion.tabulated for ion, _ in self.ions)

    @classmethod
    def of(cls, name: str | Salt, amount: object, role: str | None = None,
           ions: Mapping[Any, int] | None = None) -> StockComponent:
        """A component from a salt formula (hydrates as weighed), a neutral reagent, or a
        custom salt given by the ions it releases.

        Parameters
        ----------
        name : str or Salt
            "NaCl", "CH3COONa·3H2O", "CH3COOH", or any label with ``ions``.
        amount : float or str
            mol/L in the stock (proportions among the inert salts when solving the stock).
        role : str, optional
            "inert" (default for tabulated salts), "fixed", "buffer-acid", "buffer-base".
            A component with an ion outside the ion table must state its role.
        ions : mapping, optional
            Ion (notation or :class:`~ionact.Ion`) -> count per formula unit, for salts the
            ion table cannot build (a complexing agent's sodium salt, say).

        Raises
        ------
        InputError
            Unknown role, a custom component without a role, an unbalanced custom salt, an
            amount that is not a non-negative number of mol/L.
        """
        label = name.text if isinstance(name, Salt) else name
        if not isinstance(label, str) or not label.strip():
            raise InputError(f"a stock component needs a name, got {name!r}")
        amt = mol_per_l(amount, f"stock amount of {label}")
        if ions is not None:
            comp = cls._custom(label, amt, role, ions)
        else:
            comp = cls._tabulated(name, amt, role)
        return comp

    @classmethod
    def _custom(cls, label: str, amt: float, role: str | None, ions: Mapping[Any, int]) -> StockComponent:
        if not isinstance(ions, Mapping) or not ions:
            raise InputError(f"ions of {label} must be a non-empty mapping of ion -> count")
        parts: list[tuple[Ion, int]] = []
        for key, n in ions.items():
            ion = key if isinstance(key, Ion) else resolve_ion(key)
            count = number(n, f"count of {ion.name} in {label}", 1, 24)
            if not count.is_integer():
                raise InputError(f"count of {ion.name} in {label} must be a whole number, got {n!r}")
            parts.append((ion, int(count)))
        charge = sum(ion.charge * n for ion, n in parts)
        if charge != 0:
            raise InputError(f"stock component {label} is not electroneutral: its ions carry net charge {charge:+d}")
        custom = any(not ion.tabulated for ion, _ in parts)
        if role is None:
            if custom:
                raise InputError(f"stock component {label} has an ion outside the ion table; state its role "
                                 f"(one of {', '.join(ROLES[:2])}) so that it is not scaled by mistake")
            role = "inert"
        mass = sum(ion.molar_mass * n for ion, n in parts)
        return cls(label, amt, role, tuple(parts), mass)

    @classmethod
    def _tabulated(cls, name: str | Salt, amt: float, role: str | None) -> StockComponent:
        try:
            s = Salt.parse(name)
        except InputError:
            raise
        except KeyError as exc_salt:
            if not isinstance(name, str):
                raise
            try:
                ion = resolve_ion(name)
            except (InputError, KeyError):
                raise exc_salt from None
            if ion.charge != 0:
                raise InputError(f"stock component {name!r} is a single ion; give the salt that carries it") from None
            rec = reagent_table().get(ion.formula)
            return cls(ion.name, amt, role or "inert", ((ion, 1),), ion.molar_mass,
                       rec.hazards if rec else (), None, rec.density if rec and rec.liquid else None)
        parts = tuple((resolve_ion(i), n) for i, n in s.ions)
        return cls(s.text, amt, role or "inert", parts, s.molar_mass, s.hazards, s)

    def with_amount(self, amount: float) -> StockComponent:
        """The same component at another amount (mol/L)."""
        return StockComponent(self.name, float(amount), self.role, self.ions, self.molar_mass, self.hazards,
                              self.salt, self.liquid_density)


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
        object.__setattr__(self, "pH", number(self.pH, "buffer pH", 0.0, 14.0, lo_open=True))
        if self.pka is not None:
            object.__setattr__(self, "pka", number(self.pka, "buffer pka", -2.0, 16.0))
        for name in ("acid", "base"):
            if not isinstance(getattr(self, name), str):
                raise InputError(f"buffer {name} {getattr(self, name)!r} must be a species or salt formula")
        total = mol_per_l(self.total, "buffer total")
        if total <= 0:
            raise InputError(f"buffer total {self.total!r} must be > 0 mol/L")
        object.__setattr__(self, "total", total)

    def to_dict(self) -> dict[str, Any]:
        return {"acid": self.acid, "base": self.base, "pH": self.pH, "total": self.total, "pka": self.pka}
