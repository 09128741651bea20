"""Several candidate adjusters for the same job, designed and ranked side by side."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from .._frozen import Record, frozen_map
from ..errors import InfeasibleDesignError, InputError
from .design import AdjusterDesign

__all__ = ["AdjusterComparison", "CandidateRow", "compare_adjusters"]


@dataclass(frozen=True, repr=False)
class CandidateRow(Record):
    """One candidate's standing, read from its design's check fields (never from text)."""

    candidate: str
    feasible: bool
    total_stock: float | None = None  # mol/L of the inert salts
    saturation: float | None = None  # largest fraction of saturation among the salts
    worst_error_mv: float | None = None
    interference_mv: float | None = None  # largest assessed interference
    not_assessed: tuple[str, ...] = ()
    failed: tuple[str, ...] = ()
    note: str = ""

    def rank_key(self) -> tuple[Any, ...]:
        return (not self.feasible, bool(self.failed), bool(self.not_assessed), self.interference_mv or 0.0,
                self.total_stock or 0.0, self.saturation or 0.0)


def _row(name: str, d: AdjusterDesign) -> CandidateRow:
    sats = [c.value / 100.0 for c in d.checks if c.name.startswith("solubility of") and c.value is not None
            and c.unit == "% of saturation"]
    interf = [c.value for c in d.checks if c.name.startswith("interference") and c.value is not None]
    na = tuple(c.name for c in d.checks if c.status == "not assessed")
    failed = tuple(c.name for c in d.checks if c.status == "fail")
    note = ("fails: " + ", ".join(failed)) if failed else ("not assessed: " + ", ".join(na)) if na else "ok"
    total = sum(r.mol_per_l for r in d.recipe if r.role == "inert")
    return CandidateRow(name, True, total, max(sats) if sats else None, d.worst_error_mv,
                        max(interf) if interf else None, na, failed, note)


@dataclass(frozen=True)
class AdjusterComparison:
    """Candidates ranked: feasible first, then no failed check, then fully assessed (an ion
    without a selectivity coefficient is never ranked as clean), then by interference,
    stock strength and solubility margin."""

    rows: tuple[CandidateRow, ...]
    designs: Mapping[str, AdjusterDesign]

    def __post_init__(self) -> None:
        object.__setattr__(self, "designs", frozen_map(self.designs))

    @property
    def best(self) -> str | None:
        ok = [r for r in self.rows if r.feasible and not r.failed and not r.not_assessed]
        return ok[0].candidate if ok else None

    def table(self) -> str:
        head = (f"{'rank':<5}{'candidate':<28}{'stock mol/L':>12}{'sat. used':>11}{'worst mV':>10}"
                f"{'interf. mV':>11}  note")
        lines = [head, "-" * len(head)]
        for k, r in enumerate(self.rows, 1):
            if not r.feasible:
                lines.append(f"{k:<5}{r.candidate:<28}{'—':>12}{'—':>11}{'—':>10}{'—':>11}  {r.note}")
                continue
            sat = f"{r.saturation:.1%}" if r.saturation is not None else "n/a"
            inter = f"{r.interference_mv:.3g}" if r.interference_mv is not None else "n/a"
            lines.append(f"{k:<5}{r.candidate:<28}{r.total_stock or 0.0:>12.4g}{sat:>11}"
                         f"{r.worst_error_mv or 0.0:>10.3g}{inter:>11}  {r.note}")
        return "\n".join(lines)

    def to_dict(self) -> dict[str, Any]:
        return {"rows": [r.to_dict() for r in self.rows], "best": self.best,
                "designs": {k: v.to_dict() for k, v in self.designs.items()}}


def compare_adjusters(candidates: Mapping[str, Any], **job: Any) -> AdjusterComparison:
    """Design each candidate stock for the same job and rank them.

    Parameters
    ----------
    candidates : mapping
        Name -> stock (as :func:`~ionact.design_adjuster` takes it).
    **job
        Everything else :func:`~ionact.design_adjuster` takes (``solve`` defaults to "stock").

    Returns
    -------
    AdjusterComparison
        One row per candidate (feasible, total stock mol/L, saturation, worst error mV,
        interference, what was not assessed), the designs, and the best fully assessed one.

    Raises
    ------
    InputError
        An empty or malformed mapping of candidates, or a job argument that
        :func:`~ionact.design_adjuster` refuses.

    Examples
    --------
    >>> import ionact as ia
    >>> c = ia.compare_adjusters({"A": {"(NH4)2SO4": 2.0}, "B": {"Na2SO4": 1.0}}, analyte="NO3-",
    ...                          samples=ia.SamplePopulation(ionic_strength=(0, 0.02)),
    ...                          analyte_range=(1e-5, 1e-3), budget=ia.Budget(mv=1.0), model="davies")
    >>> [(r.candidate, r.feasible) for r in c.rows]
    [('A', True), ('B', True)]
    """
    from .api import design_adjuster

    if not isinstance(candidates, Mapping) or not candidates:
        raise InputError("compare_adjusters needs a non-empty mapping of candidate -> stock")
    job.setdefault("solve", "stock")
    rows, designs = [], {}
    for name, stock in candidates.items():
        try:
            d = design_adjuster(stock=stock, **job)
        except InfeasibleDesignError as exc:
            rows.append(CandidateRow(str(name), False, note=str(exc)))
            continue
        designs[str(name)] = d
        rows.append(_row(str(name), d))
    rows.sort(key=CandidateRow.rank_key)
    return AdjusterComparison(tuple(rows), designs)
