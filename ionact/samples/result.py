"""The result of a batch check: every input row, in order, with its status and numbers."""

from __future__ import annotations

import html
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from .._frozen import frozen_map, plain, readonly

__all__ = ["SampleCheck", "STATUSES", "INSIDE", "DILUTE", "CANNOT", "INVALID", "REPORT_FORMAT", "REPORT_VERSION"]

INSIDE, DILUTE, CANNOT, INVALID = "inside", "needs dilution", "cannot be brought into range", "invalid input"
STATUSES = (INSIDE, DILUTE, CANNOT, INVALID)
REPORT_FORMAT = "ionact-batch-report"
REPORT_VERSION = 1


@dataclass(frozen=True)
class SampleCheck:
    """Per-sample results of :func:`check_samples`, every input row in order.

    Arrays (read-only) have one entry per sample; ``by_dilution`` arrays have shape
    (n_samples, n_dilutions). Concentrations are mol/L; ``unit`` and ``unit_factor``
    (mol/L per unit) give the report's unit for the analyte.
    """

    sample_id: tuple[str, ...]
    status: tuple[str, ...]
    reason: tuple[str, ...]
    dilution: np.ndarray  # smallest allowed dilution that works (NaN if none / invalid)
    ionic_strength: np.ndarray  # untreated, mol/kg
    ionic_strength_source: tuple[str, ...]
    analyte: np.ndarray  # untreated, mol/L
    treated_analyte: np.ndarray  # at the chosen dilution (or undiluted), mol/L
    treated_ionic_strength: np.ndarray
    error_mv: np.ndarray
    error_percent: np.ndarray
    gamma: np.ndarray  # γ of the analyte in the treated sample at the chosen dilution
    dilutions: tuple[float, ...]
    by_dilution: Mapping[str, np.ndarray] = field(repr=False)
    calibration_range: tuple[float, float] = (0.0, 0.0)
    envelope: tuple[float, float] = (0.0, 0.0)
    model: str = ""
    unit: str = "mol/L"
    unit_factor: float = 1.0

    def __post_init__(self) -> None:
        for name in ("dilution", "ionic_strength", "analyte", "treated_analyte", "treated_ionic_strength",
                     "error_mv", "error_percent", "gamma"):
            object.__setattr__(self, name, readonly(getattr(self, name)))
        by = {}
        for k, v in self.by_dilution.items():
            a = np.array(v, copy=True)
            a.setflags(write=False)
            by[k] = a
        object.__setattr__(self, "by_dilution", frozen_map(by))

    def __len__(self) -> int:
        return len(self.status)

    def counts(self) -> dict[str, int]:
        """Number of samples per status."""
        return {s: self.status.count(s) for s in STATUSES}

    def summary(self) -> str:
        c = self.counts()
        lines = [f"{len(self)} samples checked with model {self.model}:"]
        lines += [f"  {s:<30} {c[s]}" for s in STATUSES]
        return "\n".join(lines)

    def __repr__(self) -> str:
        c = ", ".join(f"{k}: {v}" for k, v in self.counts().items() if v)
        return f"SampleCheck({len(self)} samples — {c}; model {self.model})"

    def _repr_html_(self) -> str:
        rows = self.rows(20)
        head = "".join(f"<th>{html.escape(h)}</th>" for h, _ in self.columns())
        body = "".join("<tr>" + "".join(f"<td>{html.escape(_fmt(v))}</td>" for v in r.values()) + "</tr>"
                       for r in rows)
        more = f"<p>… {len(self) - 20} more rows</p>" if len(self) > 20 else ""
        return f"<p>{html.escape(repr(self))}</p><table><tr>{head}</tr>{body}</table>{more}"

    def columns(self) -> list[tuple[str, Any]]:
        """The report columns in order: (header, values) with numbers as float arrays."""
        f, u = self.unit_factor, self.unit
        return [
            ("sample_id", self.sample_id),
            ("status", self.status),
            ("dilution", np.asarray(self.dilution, dtype=float)),
            (f"analyte [{u}]", self.analyte / f),
            (f"treated_analyte [{u}]", self.treated_analyte / f),
            ("ionic_strength [mol/kg]", np.asarray(self.ionic_strength, dtype=float)),
            ("ionic_strength_source", self.ionic_strength_source),
            ("treated_ionic_strength [mol/kg]", np.asarray(self.treated_ionic_strength, dtype=float)),
            ("gamma_error [mV]", np.asarray(self.error_mv, dtype=float)),
            ("gamma_error [%]", np.asarray(self.error_percent, dtype=float)),
            ("reason", self.reason),
        ]

    def rows(self, limit: int | None = None) -> list[dict[str, Any]]:
        """One dict per sample with the report columns (numbers as floats, NaN where none);
        only the first ``limit`` samples when it is given."""
        n = len(self) if limit is None else max(0, min(limit, len(self)))
        cols = [(h, v[:n].tolist() if isinstance(v, np.ndarray) else list(v[:n])) for h, v in self.columns()]
        return [{h: v[i] for h, v in cols} for i in range(n)]

    def to_dict(self) -> dict[str, Any]:
        """Strict-JSON description (keys do not depend on the chosen unit; null for NaN)."""
        f = self.unit_factor
        rows = [{"sample_id": self.sample_id[i], "status": self.status[i], "dilution": float(self.dilution[i]),
                 "analyte": float(self.analyte[i] / f), "treated_analyte": float(self.treated_analyte[i] / f),
                 "ionic_strength": float(self.ionic_strength[i]),
                 "ionic_strength_source": self.ionic_strength_source[i],
                 "treated_ionic_strength": float(self.treated_ionic_strength[i]),
                 "gamma_error_mv": float(self.error_mv[i]), "gamma_error_percent": float(self.error_percent[i]),
                 "gamma": float(self.gamma[i]),
                 "reason": self.reason[i]} for i in range(len(self))]
        return plain({"format": REPORT_FORMAT, "version": REPORT_VERSION, "model": self.model,
                      "analyte_unit": self.unit, "unit_factor_mol_per_l": self.unit_factor,
                      "ionic_strength_unit": "mol/kg", "counts": self.counts(),
                      "calibration_range_mol_per_l": list(self.calibration_range), "envelope": list(self.envelope),
                      "dilutions": list(self.dilutions), "rows": rows})

    @classmethod
    def from_dict(cls, d: Mapping[str, Any]) -> SampleCheck:
        """Read a report back from :meth:`to_dict` output (the ``--json`` of ``ionact check``)."""
        from ..errors import InputError

        if not isinstance(d, Mapping) or d.get("format") != REPORT_FORMAT or d.get("version") != REPORT_VERSION:
            raise InputError(f"not an ionact batch report of version {REPORT_VERSION}")
        rows = d.get("rows")
        if not isinstance(rows, list):
            raise InputError("batch report rows must be a list")
        unit = str(d.get("analyte_unit", "mol/L"))
        factor = float(d.get("unit_factor_mol_per_l", 1.0))

        def col(k: str) -> np.ndarray:
            return np.array([np.nan if r.get(k) is None else r[k] for r in rows], dtype=float)

        def text(k: str) -> tuple[str, ...]:
            return tuple(str(r.get(k, "")) for r in rows)

        return cls(text("sample_id"), text("status"), text("reason"), col("dilution"), col("ionic_strength"),
                   text("ionic_strength_source"), col("analyte") * factor, col("treated_analyte") * factor,
                   col("treated_ionic_strength"), col("gamma_error_mv"), col("gamma_error_percent"), col("gamma"),
                   tuple(float(x) for x in d.get("dilutions", ())), {},
                   tuple(d.get("calibration_range_mol_per_l", (0.0, 0.0))), tuple(d.get("envelope", (0.0, 0.0))),
                   str(d.get("model", "")), unit, factor)

    def to_pandas(self, index: Any = None) -> Any:
        """The report as a pandas DataFrame (pandas is imported only here): on ``index`` if
        given, else on the index of the DataFrame the samples came in."""
        import pandas as pd

        return pd.DataFrame({h: list(v) if not isinstance(v, np.ndarray) else v for h, v in self.columns()},
                            index=index if index is not None else getattr(self, "_index", None))

    def plot(self, path: Any = None, *, ax: Any = None) -> Any:
        """Each sample on ionic strength vs analyte level; the design's envelope and the
        calibration range drawn; status by marker shape and colour with a legend in words.

        Returns the matplotlib Figure (drawn into ``ax`` when given; written to ``path`` when given).
        """
        from ..plotting import MARKERS, PALETTE, new_figure, save

        if ax is None:
            fig, (ax,) = new_figure(1, (8.5, 5.0))
        else:
            fig = ax.figure
        f = self.unit_factor
        lo, hi = self.calibration_range
        e_hi = self.envelope[1]
        x = np.where(self.ionic_strength > 0, self.ionic_strength, np.nan)
        y = np.where(self.analyte > 0, self.analyte / f, np.nan)
        finite = np.isfinite(x)
        xmin = np.nanmin(x) / 3 if finite.any() else 1e-5
        ax.fill_between([xmin, e_hi], lo / f, hi / f, color=PALETTE[2], alpha=0.15,
                        label="inside: calibrated range × proven ionic strength")
        ax.axvline(e_hi, color=PALETTE[2], lw=0.8, ls="--", label=f"proven sample I ≤ {e_hi:.3g} mol/kg")
        styles = {INSIDE: (MARKERS[0], PALETTE[0]), DILUTE: (MARKERS[1], PALETTE[1]),
                  CANNOT: (MARKERS[6], PALETTE[3]), INVALID: (MARKERS[2], "0.5")}
        st = np.array(self.status)
        for s, (mk, col) in styles.items():
            sel = st == s
            if np.any(sel & np.isfinite(x) & np.isfinite(y)):
                ax.scatter(x[sel], y[sel], marker=mk, color=col, label=f"{s} ({int(sel.sum())})", alpha=0.8)
            elif np.any(sel):
                ax.scatter([], [], marker=mk, color=col, label=f"{s} ({int(sel.sum())}, not plottable)")
        ax.set_xscale("log")
        ax.set_yscale("log")
        ax.set_xlabel("sample ionic strength / mol kg$^{-1}$")
        ax.set_ylabel(f"expected analyte / {self.unit}")
        ax.set_title("batch range check")
        ax.legend(fontsize=8, loc="center left", bbox_to_anchor=(1.01, 0.5))
        if path is not None:
            save(fig, path)
        return fig


def _fmt(v: Any) -> str:
    if isinstance(v, float):
        return "" if v != v else f"{v:.4g}"
    return str(v)
