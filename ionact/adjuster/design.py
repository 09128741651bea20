"""The design as a value: one frozen record that the report, the JSON, the recipe and the
figure all read, and that a design file turns back into."""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

from .._frozen import frozen_map, plain
from ..errors import InputError
from ..models.resolver import ModelChoice
from ..species import Ion, typeset
from .checks import Check
from .inputs import Budget

__all__ = ["RecipeLine", "AdjusterDesign", "DESIGN_FORMAT", "DESIGN_VERSION", "CAUTIONS", "EXIT_OK", "EXIT_FAILED"]

DESIGN_FORMAT = "ionact-adjuster-design"
DESIGN_VERSION = 2
EXIT_OK, EXIT_FAILED = 0, 1

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
class RecipeLine:
    """One component of the stock as it is made up: amount, mass and, for liquids, volume per litre."""

    component: str
    role: str
    mol_per_l: float
    g_per_l: float
    ml_per_l: float | None = None
    liquid_density: float | None = None  # g/mL (common practice values)

    def to_dict(self) -> dict[str, Any]:
        return {"component": self.component, "role": self.role, "mol_per_l": self.mol_per_l,
                "g_per_l": self.g_per_l, "ml_per_l": self.ml_per_l, "liquid_density_g_per_ml": self.liquid_density}

    @classmethod
    def from_dict(cls, d: Mapping[str, Any]) -> RecipeLine:
        try:
            return cls(str(d["component"]), str(d["role"]), number_field(d["mol_per_l"], "mol_per_l"),
                       number_field(d["g_per_l"], "g_per_l"), _opt(d.get("ml_per_l"), "ml_per_l"),
                       _opt(d.get("liquid_density_g_per_ml"), "liquid_density_g_per_ml"))
        except (KeyError, TypeError) as exc:
            raise InputError(f"recipe line {d!r} is malformed ({exc})") from None


def number_field(v: Any, what: str, lo: float = 0.0, hi: float = math.inf) -> float:
    bad = InputError(f"design field {what} {str(v)[:40]!r} must be a finite number in {lo:g}–{hi:g}", value=v,
                     allowed=f"{lo:g}–{hi:g}", field=what)
    if isinstance(v, bool) or not isinstance(v, int | float):
        raise bad
    try:
        f = float(v)
    except OverflowError:
        raise bad from None
    if not math.isfinite(f) or not lo <= f <= hi:
        raise bad
    return f


def _opt(v: Any, what: str) -> float | None:
    return None if v is None else number_field(v, what)


def pair_field(v: Any, what: str, lo: float = 0.0, hi: float = math.inf) -> tuple[float, float]:
    if not isinstance(v, list | tuple) or len(v) != 2:
        raise InputError(f"design field {what} {v!r} must be a pair [low, high]")
    a, b = number_field(v[0], what, lo, hi), number_field(v[1], what, lo, hi)
    if a > b:
        raise InputError(f"design field {what} {v!r} must satisfy low ≤ high")
    return a, b


@dataclass(frozen=True)
class AdjusterDesign:
    """An evaluated or solved ISA design. Immutable; :meth:`report`, :meth:`to_dict` and
    :meth:`plot` all read these fields.

    Attributes
    ----------
    analyte, counter_ion : str
    recipe : tuple of RecipeLine
        Every stock component with its role, mol/L, g/L and (liquids) mL/L.
    volume_ratio : float
        Volume of stock per volume of sample (and of every standard).
    budget : Budget
        As given; ``budget_mv`` is it in mV at the method's temperature.
    worst_error_mv, worst_error_percent : float
        The largest ``|ΔE|`` over samples × analyte levels × standards, and the relative error it implies.
    worst_case : mapping
        Where it occurs: sample label, analyte level and standard (mol/L).
    final_ionic_strength : (float, float)
        Over treated samples and standards, mol/kg.
    envelope : (float, float)
        The untreated sample ionic strength the design was proven for, mol/kg.
    model : ModelChoice
        The activity model, why it was chosen, and what it lacked — reused by the batch check.
    checks : tuple of Check
    notes, cautions : tuple of str
    """

    name: str
    analyte: str
    counter_ion: str
    recipe: tuple[RecipeLine, ...]
    volume_ratio: float
    solve: str
    temperature: float
    budget: Budget
    budget_mv: float
    worst_error_mv: float
    worst_error_percent: float
    worst_case: Mapping[str, Any]
    final_ionic_strength: tuple[float, float]
    envelope: tuple[float, float]
    analyte_range: tuple[float, float]
    standards: tuple[float, ...]
    linear_range: tuple[float, float] | None
    selectivity: Mapping[str, float]
    model: ModelChoice
    checks: tuple[Check, ...]
    notes: tuple[str, ...]
    cautions: tuple[str, ...]
    stock_ions: Mapping[str, float]
    species: Mapping[str, Mapping[str, Any]]  # ions outside the tables, as Ion.to_dict()
    background: str
    density: str | None = None
    buffer: Mapping[str, Any] | None = None
    samples: Mapping[str, Any] = field(default_factory=dict)
    equilibrium: bool | None = None
    complexes: tuple[Mapping[str, Any], ...] = ()
    scan: Mapping[str, Any] = field(repr=False, default_factory=dict)
    gamma_profile: Mapping[str, Any] = field(repr=False, default_factory=dict)

    def __post_init__(self) -> None:
        for name in ("worst_case", "selectivity", "stock_ions", "species", "samples", "scan", "gamma_profile"):
            object.__setattr__(self, name, frozen_map(getattr(self, name)))
        if self.buffer is not None:
            object.__setattr__(self, "buffer", frozen_map(self.buffer))

    # -- views ------------------------------------------------------------------------
    @property
    def stock(self) -> Mapping[str, float]:
        """Component -> mol/L in the stock (read-only)."""
        return frozen_map({r.component: r.mol_per_l for r in self.recipe})

    @property
    def grams(self) -> Mapping[str, float]:
        """Component -> grams per litre of stock (read-only)."""
        return frozen_map({r.component: r.g_per_l for r in self.recipe})

    @property
    def status(self) -> str:
        """"fail" when any check failed, else "ok" (warnings and "not assessed" are reported, not failures)."""
        return "fail" if any(c.status == "fail" for c in self.checks) else "ok"

    @property
    def exit_status(self) -> int:
        """0 when no check failed, 1 when one did (the command line's exit status)."""
        return EXIT_FAILED if self.status == "fail" else EXIT_OK

    def check(self, name: str) -> Check:
        """The check of that name (KeyError naming the available ones when absent)."""
        for c in self.checks:
            if c.name == name:
                return c
        raise KeyError(f"no check {name!r}; checks: {', '.join(c.name for c in self.checks)}")

    def custom_ions(self) -> dict[str, Ion]:
        """The species outside the ion table that this design uses, as Ion objects."""
        return {k: Ion.from_dict(v) for k, v in self.species.items()}

    # -- output -----------------------------------------------------------------------
    def report(self) -> str:
        """A plain-text report of the design."""
        from .report import design_report

        return design_report(self)

    def plot(self, path: Any = None, *, ax: Any = None) -> Any:
        """The design figure (see :func:`ionact.adjuster.plot.plot_design`)."""
        from .plot import plot_design

        return plot_design(self, path, ax=ax)

    def _repr_html_(self) -> str:
        from .._display import html_table

        recipe = html_table(("component", "role", "mol/L", "g/L"),
                            [(r.component, r.role, r.mol_per_l, r.g_per_l) for r in self.recipe], repr(self))
        checks = html_table(("check", "status", "detail"), [(c.name, c.status, c.message) for c in self.checks])
        return recipe + checks

    def __repr__(self) -> str:
        stock = ", ".join(f"{r.component} {r.mol_per_l:.4g} mol/L" for r in self.recipe)
        return (f"AdjusterDesign({typeset(self.analyte)}: {stock}"
                f" at ratio {self.volume_ratio:.4g}; worst {self.worst_error_mv:.3g} mV of {self.budget_mv:.3g}; "
                f"{self.status})")

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready description of the design (what ``ionact design --out`` writes)."""
        return plain({
            "format": DESIGN_FORMAT, "version": DESIGN_VERSION, "name": self.name, "analyte": self.analyte,
            "counter_ion": self.counter_ion, "recipe": [r.to_dict() for r in self.recipe],
            "volume_ratio": self.volume_ratio, "solve": self.solve, "temperature_c": self.temperature,
            "budget": self.budget.to_dict(), "budget_mv": self.budget_mv, "worst_error_mv": self.worst_error_mv,
            "worst_error_percent": self.worst_error_percent, "worst_case": dict(self.worst_case),
            "final_ionic_strength": list(self.final_ionic_strength), "envelope": list(self.envelope),
            "analyte_range_mol_per_l": list(self.analyte_range), "standards_mol_per_l": list(self.standards),
            "linear_range_mol_per_l": list(self.linear_range) if self.linear_range else None,
            "selectivity": dict(self.selectivity), "model": self.model.to_dict(),
            "checks": [c.to_dict() for c in self.checks], "status": self.status, "notes": list(self.notes),
            "cautions": list(self.cautions), "stock_ions_mol_per_l": dict(self.stock_ions),
            "species": {k: dict(v) for k, v in self.species.items()}, "background": self.background,
            "density": self.density, "buffer": dict(self.buffer) if self.buffer else None,
            "samples": dict(self.samples), "scan": dict(self.scan), "gamma_profile": dict(self.gamma_profile),
            "equilibrium": self.equilibrium, "complexes": [dict(c) for c in self.complexes],
        })

    @classmethod
    def from_dict(cls, d: Mapping[str, Any]) -> AdjusterDesign:
        """Read a design back from :meth:`to_dict` output (a design file), validating every field.

        Raises
        ------
        InputError
            Not a design of this format and version, or a field of the wrong type or range
            (the message names the field).
        """
        from .validate import design_from_dict

        return design_from_dict(d)
