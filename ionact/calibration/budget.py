"""The error budget of one reported concentration, every term in mV and in %.

Terms (each computed by the library's own steps, never re-derived here):

* **calibration** — the inverse-prediction standard uncertainty of the reading
  (:func:`quantify`), a standard uncertainty;
* **residual γ mismatch** — the design's worst residual activity-coefficient error between
  samples and standards (:attr:`AdjusterDesign.worst_error_mv`), a bound;
* **model choice** — the spread over the activity models (:func:`compare_models`) of the
  ratio of the analyte's γ in the treated sample to that in a treated standard of the same
  level (what does not cancel between calibration and reading), a bound;
* **temperature** — measuring at another temperature than the calibration
  (:func:`temperature_error`), a bound;
* **interference** — the Nikolsky–Eisenman bias of the stated interferents
  (:func:`nikolsky_eisenman`), a bound;
* **liquid junction** — the change of the Henderson junction potential against the
  reference electrode's bridge electrolyte between the top standard and the sample
  (:func:`junction_potential`), a bound.

They are combined by the law of propagation of uncertainty for independent inputs (the
GUM, JCGM 100:2008, §5.1): bounds are read as rectangular distributions, u = b/√3 (GUM
§4.3.7), and u_c = √Σu². The expanded uncertainty is U = k·u_c with k = 2 (about 95 %
coverage for a normal distribution). A term that cannot be computed is listed as not
assessed, with the reason, and left out of the sum.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np

from .._frozen import Record
from ..electrode import mv_to_relative_error, nernst_slope
from ..errors import InputError, IonactError
from .fit import Calibration

__all__ = ["BudgetTerm", "ErrorBudget", "error_budget", "COVERAGE_FACTOR", "DEFAULT_BRIDGE"]

COVERAGE_FACTOR = 2.0
DEFAULT_BRIDGE = {"K+": 3.0, "Cl-": 3.0}  # mol/L: the usual reference-electrode filling (common practice)


@dataclass(frozen=True, repr=False)
class BudgetTerm(Record):
    """One term: ``kind`` is "standard" (a standard uncertainty) or "bound" (a largest error,
    read as rectangular); ``u_mv`` is its standard uncertainty; "not assessed" terms carry NaN."""

    name: str
    kind: str
    value_mv: float
    u_mv: float
    percent: float
    detail: str


@dataclass(frozen=True, repr=False)
class ErrorBudget(Record):
    """Every term, and their combination (mV and % of the concentration)."""

    analyte: str
    concentration: float
    terms: tuple[BudgetTerm, ...]
    combined_mv: float
    combined_percent: float
    expanded_mv: float
    expanded_percent: float
    coverage_factor: float
    statement: str

    def table(self) -> str:
        lines = [f"Error budget for {self.concentration:.4g} mol/L {self.analyte}",
                 f"  {'term':<24}{'kind':<10}{'value mV':>10}{'u mV':>9}{'u %':>8}  detail"]
        for t in self.terms:
            if math.isnan(t.u_mv):
                lines.append(f"  {t.name:<24}{'—':<10}{'—':>10}{'—':>9}{'—':>8}  not assessed: {t.detail}")
            else:
                lines.append(f"  {t.name:<24}{t.kind:<10}{t.value_mv:>10.3f}{t.u_mv:>9.3f}{t.percent:>8.2f}  "
                             f"{t.detail}")
        lines.append(f"  {'combined (u_c)':<34}{'':>10}{self.combined_mv:>9.3f}{self.combined_percent:>8.2f}")
        lines.append(f"  {f'expanded (k = {self.coverage_factor:g})':<34}{'':>10}{self.expanded_mv:>9.3f}"
                     f"{self.expanded_percent:>8.2f}")
        lines.append(self.statement)
        return "\n".join(lines)


def error_budget(calibration: Calibration, potential_mv: Any, *, design: Any = None, sample: Any = None,
                 measurement_temperature: float | None = None, interferents: Mapping[str, tuple] | None = None,
                 bridge: Mapping[str, float] | None = None) -> ErrorBudget:
    """The error budget of the concentration read from one potential.

    Parameters
    ----------
    calibration : Calibration
        The fitted calibration.
    potential_mv : float
        The sample's reading, mV.
    design : AdjusterDesign, optional
        Its residual γ mismatch is a term.
    sample : Solution, optional
        The sample's own background (without the analyte), for the model spread and the
        junction potential; without it, the calibration's matrix stands for the sample.
    measurement_temperature : float, optional
        °C of the sample when it differs from the calibration's.
    interferents : mapping, optional
        Ion -> (activity in the measured solution, selectivity coefficient).
    bridge : mapping, optional
        The reference electrode's bridge electrolyte, ion -> mol/L (default 3 mol/L KCl).

    Returns
    -------
    ErrorBudget
        Each term in mV and %, standard or bound, the combined and expanded uncertainty.

    Raises
    ------
    InputError
        A potential that is not a finite number, or malformed interferents.

    References
    ----------
    JCGM 100:2008, *Evaluation of measurement data — Guide to the expression of uncertainty
    in measurement* (bounds as rectangular distributions, §4.3.7).

    Examples
    --------
    >>> import ionact as ia
    >>> cal = ia.calibrate("F-", [1e-5, 1e-4, 1e-3, 1e-2], [120.1, 61.0, 2.1, -56.9], model="davies")
    >>> b = ia.error_budget(cal, 30.0)
    >>> b.terms[0].name, round(b.terms[0].u_mv, 2)
    ('calibration', 0.87)
    """
    from .quantitation import quantify

    if not isinstance(calibration, Calibration):
        raise InputError(f"error_budget needs a Calibration, got {type(calibration).__name__}")
    q = quantify(calibration, [potential_mv], coverage=0.6826894921370859)  # ±1 standard deviation
    c = float(q.concentration[0])
    if not (math.isfinite(c) and c > 0):
        raise InputError(f"the reading {potential_mv!r} mV gives no reportable concentration ({q.status[0]})",
                         value=potential_mv, field="potential_mv")
    meas = calibration.measurement
    z = meas.ion.charge
    t = meas.temperature
    slope = abs(calibration.slope_mv)
    terms = [_calibration_term(q, c, slope, z, t)]
    terms.append(_design_term(design, z, t))
    terms.append(_model_term(meas, c, sample, z, t))
    terms.append(_temperature_term(meas, c, measurement_temperature, z))
    terms.append(_interference_term(meas, float(q.activity[0]), interferents, z, t))
    terms.append(_junction_term(meas, calibration, c, sample, bridge, z, t))
    u = [x.u_mv for x in terms if math.isfinite(x.u_mv)]
    uc = math.sqrt(sum(v * v for v in u))
    pct = 100.0 * abs(float(mv_to_relative_error(uc, z, t)))
    big = COVERAGE_FACTOR * uc
    statement = ("Combined by the law of propagation of uncertainty for independent inputs (GUM, JCGM 100:2008, "
                 "§5.1): bounds read as rectangular distributions (u = b/√3, §4.3.7), u_c = √Σu²; expanded "
                 f"U = {COVERAGE_FACTOR:g}·u_c (about 95 % for a normal distribution). Terms not assessed are not "
                 "in the sum.")
    return ErrorBudget(meas.analyte, c, tuple(terms), uc, pct, big,
                       100.0 * abs(float(mv_to_relative_error(big, z, t))), COVERAGE_FACTOR, statement)


def _pct(mv: float, z: int, t: float) -> float:
    return 100.0 * abs(float(mv_to_relative_error(mv, z, t)))


def _bound(name: str, b: float, z: int, t: float, detail: str) -> BudgetTerm:
    u = abs(b) / math.sqrt(3.0)
    return BudgetTerm(name, "bound", b, u, _pct(u, z, t), detail)


def _missing(name: str, why: str) -> BudgetTerm:
    return BudgetTerm(name, "bound", math.nan, math.nan, math.nan, why)


def _calibration_term(q: Any, c: float, slope: float, z: int, t: float) -> BudgetTerm:
    lo, hi = float(q.interval[0, 0]), float(q.interval[1, 0])
    if not (math.isfinite(lo) and math.isfinite(hi) and lo > 0):
        return _missing("calibration", "no uncertainty from a two-point calibration")
    u = slope * 0.5 * (math.log10(hi) - math.log10(lo))
    return BudgetTerm("calibration", "standard", u, u, _pct(u, z, t),
                      "inverse prediction from the fit's covariance and one reading's scatter")


def _design_term(design: Any, z: int, t: float) -> BudgetTerm:
    if design is None:
        return _missing("residual γ mismatch", "no design given")
    from ..adjuster import AdjusterDesign

    d = design if isinstance(design, AdjusterDesign) else AdjusterDesign.from_dict(design)
    return _bound("residual γ mismatch", d.worst_error_mv, z, t,
                  f"the design's worst case between samples and standards ({d.model.name})")


def _treated(meas: Any, c: float, sample: Any) -> Any:
    """The measured solution: the calibration's matrix, the sample's background diluted by the
    adjuster, and the analyte with its counter-ion."""
    from ..conversion import default_counter_ion
    from ..solution import Solution
    from ..units import MOLAL, MOLAR, Amount

    parts: list[tuple[Any, Any]] = []
    for k, v in (meas.matrix or {}).items():
        parts.append((meas.ion_of(k), Amount(np.asarray(v), MOLAL)))
    if sample is not None:
        if not isinstance(sample, Solution) or sample.shape:
            raise InputError("sample must be one Solution (the sample's background)", field="sample")
        for k, v in sample.molalities.items():
            parts.append((sample.ion(k), Amount(np.asarray(float(v) / meas.dilution), MOLAL)))
    ca = c / meas.dilution
    parts.append((meas.ion, Amount(np.asarray(ca), MOLAR)))
    counter = default_counter_ion(meas.ion, meas.counter_ion)
    if counter is not None:
        parts.append((counter, Amount(np.asarray(ca * abs(meas.ion.charge) / abs(counter.charge)), MOLAR)))
    return Solution.from_parts(parts, meas.temperature, charge_tolerance=0.05, density=meas.density)


def _model_term(meas: Any, c: float, sample: Any, z: int, t: float) -> BudgetTerm:
    """The spread over the activity models of what does not cancel: the ratio of the
    analyte's γ in the treated sample to its γ in a treated standard of the same level
    (the calibration and the reading go through the same model, so an error common to
    both drops out)."""
    import warnings

    from ..activity import compare_models

    try:
        smp = _treated(meas, c, sample)
        ref = _treated(meas, c, None)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            cs, cr = compare_models(smp), compare_models(ref)
    except IonactError as exc:
        return _missing("model choice", str(exc))
    both = [m for m in cs.gammas if m in cr.gammas]
    inside = [m for m in both if cs.in_range[m] and cr.in_range[m]] or both
    ratios = [math.log10(float(np.mean(cs.gammas[m][meas.analyte])) / float(np.mean(cr.gammas[m][meas.analyte])))
              for m in inside]
    if not ratios:
        return _missing("model choice", "no model has parameters for both the sample and the standards")
    spread = abs(float(nernst_slope(z, t))) * (max(ratios) - min(ratios))
    return _bound("model choice", spread, z, t, f"spread of γ(sample)/γ(standard) over {len(inside)} models "
                  f"({', '.join(inside)}) at I = {smp.ionic_strength:.3g} mol/kg")


def _temperature_term(meas: Any, c: float, t2: float | None, z: int) -> BudgetTerm:
    from ..electrode import temperature_error

    if t2 is None or t2 == meas.temperature:
        return _bound("temperature", 0.0, z, meas.temperature, "sample measured at the calibration's temperature")
    a = float(meas.activity(np.array([c]))[0])
    e = temperature_error(a, z, calibration_temperature=meas.temperature, measurement_temperature=t2)
    return _bound("temperature", float(e.error_mv), z, meas.temperature,
                  f"measured at {t2:g} °C against a calibration at {meas.temperature:g} °C (isopotential at a = 1)")


def _interference_term(meas: Any, a: float, interferents: Mapping[str, tuple] | None, z: int, t: float
                       ) -> BudgetTerm:
    from ..electrode import nikolsky_eisenman

    if not interferents:
        return _missing("interference", "no interferents stated")
    r = nikolsky_eisenman(meas.analyte, a, interferents, temperature=t)
    return _bound("interference", float(r.bias_mv), z, t,
                  "Nikolsky–Eisenman bias of " + ", ".join(interferents))


def _junction_term(meas: Any, cal: Calibration, c: float, sample: Any, bridge: Mapping[str, float] | None,
                   z: int, t: float) -> BudgetTerm:
    from ..solution import Solution
    from .junction import junction_potential

    br = Solution(dict(bridge or DEFAULT_BRIDGE), t, basis="molar", density="water")
    try:
        e_std = junction_potential(br, _treated(meas, float(cal.concentrations.max()), None), t)
        e_smp = junction_potential(br, _treated(meas, c, sample), t)
    except IonactError as exc:
        return _missing("liquid junction", str(exc))
    bridge_text = ", ".join(f"{k} {v:g} mol/L" for k, v in (bridge or DEFAULT_BRIDGE).items())
    return _bound("liquid junction", e_smp - e_std, z, t,
                  f"Henderson, against the bridge {bridge_text}: {e_std:.3f} mV at the top standard, "
                  f"{e_smp:.3f} mV in the sample")
