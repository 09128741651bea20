"""The analyst's job: check a batch against a method before measuring it, and plan dilutions.

For every sample, ``check_samples`` takes its ionic strength (stated, from its ions, or
from conductivity or dissolved solids by a named rule) and its expected analyte level, and
for every allowed pre-dilution computes the treated analyte level, the treated ionic
strength and the γ error against the method's calibration standards. A sample is
"inside" when undiluted it sits in the calibrated range, inside the ionic-strength
envelope the adjuster was proven for, inside the electrode's linear range, and within the
error budget; "needs dilution" when a larger allowed dilution achieves all of that (the
smallest one is reported); "cannot be brought into range" when none does; "invalid input"
when a value is missing or impossible. Every input row comes out, in order.

The γ arithmetic is vectorised over samples × dilutions: no Python loop over samples.
"""

from __future__ import annotations

import csv
import io
import math
import sys
import warnings
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from . import water
from .adjuster import AdjusterDesign
from .density import water_per_litre
from .errors import InputError, IonactError, ValidityRangeWarning
from .models.registry import Batch
from .models.resolver import ModelChoice, log10_gamma, resolve_model
from .solution import ionic_strength_from_conductivity, ionic_strength_from_tds
from .species import Ion, Salt, resolve_ion
from .units import MOLAR, parse_amount

__all__ = ["Method", "SampleCheck", "check_samples", "read_samples_csv", "write_report_csv", "read_report_csv",
           "STATUSES"]

INSIDE, DILUTE, CANNOT, INVALID = "inside", "needs dilution", "cannot be brought into range", "invalid input"
STATUSES = (INSIDE, DILUTE, CANNOT, INVALID)
DEFAULT_DILUTIONS = (1, 2, 5, 10, 20, 50, 100)
CHUNK = 20000
MAX_ANALYTE = 20.0  # mol/L: beyond any real solution
MAX_IONIC_STRENGTH = 25.0  # mol/kg: beyond any real water sample


@dataclass(frozen=True)
class Method:
    """What a batch check needs from an adjuster design (built from the design or its JSON)."""

    analyte: Ion
    counter_ion: Ion
    stock_ions: dict  # Ion -> mol/L in the stock
    volume_ratio: float
    standards: tuple[float, ...]  # mol/L in the untreated standards
    choice: ModelChoice
    temperature: float
    budget_mv: float
    envelope: tuple[float, float]  # untreated sample ionic strength the design was proven for, mol/kg
    analyte_range: tuple[float, float]
    linear_range: tuple[float, float] | None
    background: str = "NaCl"
    density: str | None = None
    selectivity: Mapping[str, float] | None = None

    @classmethod
    def from_design(cls, design) -> Method:
        """From an :class:`~ionact.AdjusterDesign` or the dict its ``to_dict()`` gives (JSON)."""
        if not isinstance(design, AdjusterDesign):
            if not isinstance(design, Mapping):
                raise InputError(f"a design must be an AdjusterDesign or its JSON dict, got {type(design).__name__}")
            design = AdjusterDesign.from_dict(design)
        species = design.custom_ions()

        def ion(name: str) -> Ion:
            return species[name] if name in species else resolve_ion(name)

        return cls(
            analyte=ion(design.analyte), counter_ion=ion(design.counter_ion),
            stock_ions={ion(k): float(v) for k, v in design.stock_ions.items()},
            volume_ratio=design.volume_ratio, standards=design.standards, choice=design.model,
            temperature=design.temperature, budget_mv=design.budget_mv, envelope=design.envelope,
            analyte_range=design.analyte_range, linear_range=design.linear_range, background=design.background,
            density=design.density, selectivity=design.selectivity,
        )


@dataclass(frozen=True)
class SampleCheck:
    """Per-sample results of :func:`check_samples`, every input row in order.

    Arrays have one entry per sample; ``by_dilution`` arrays have shape (n_samples, n_dilutions).
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
    dilutions: tuple[float, ...]
    by_dilution: dict
    calibration_range: tuple[float, float]
    envelope: tuple[float, float]
    model: str
    unit: str
    unit_factor: float  # mol/L per display unit

    def __len__(self) -> int:
        return len(self.status)

    def counts(self) -> dict:
        return {s: self.status.count(s) for s in STATUSES}

    def summary(self) -> str:
        c = self.counts()
        lines = [f"{len(self)} samples checked with model {self.model}:"]
        lines += [f"  {s:<30} {c[s]}" for s in STATUSES]
        return "\n".join(lines)

    def columns(self) -> list[tuple[str, object]]:
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

    def rows(self) -> list[dict]:
        """One dict per sample with the report columns (numbers as floats, NaN where none)."""
        cols = [(h, v.tolist() if isinstance(v, np.ndarray) else list(v))  # type: ignore[call-overload]
                for h, v in self.columns()]
        return [{h: v[i] for h, v in cols} for i in range(len(self))]

    def plot(self, path=None, *, ax=None):
        """Each sample on ionic strength vs analyte level; the design's envelope and the
        calibration range drawn; status by marker shape and colour with a legend in words.

        Returns the matplotlib Figure (drawn into ``ax`` when given; written to ``path`` when given).
        """
        from .plotting import MARKERS, PALETTE, new_figure, save

        if ax is None:
            fig, (ax,) = new_figure(1, (7.5, 5.0))
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
        styles = {INSIDE: (MARKERS[0], PALETTE[0]), DILUTE: (MARKERS[1], PALETTE[1]), CANNOT: (MARKERS[6], PALETTE[3]),
                  INVALID: (MARKERS[2], "0.5")}
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


def _unit_factor(unit: str, ion: Ion) -> float:
    """mol/L per unit of ``unit`` for this ion ("mg/L as N", "mmol/L", …)."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        a = parse_amount(f"1 {unit}", ion, default_basis=MOLAR)
    if a.basis != MOLAR:
        raise InputError(f"unit {unit!r} for {ion.name} must be a concentration per volume (mg/L, mol/L …)")
    return float(a.value)


def _to_float(cells) -> tuple[np.ndarray, list[str | None]]:
    """Parse cells to floats; NaN and a reason for empty, unparseable, negative or infinite cells."""
    fast = _to_float_fast(cells)
    if fast is not None:
        return fast
    return _to_float_slow(cells)


def _to_float_fast(cells):
    """Whole-column parse when every non-empty cell is a plain finite, non-negative number."""
    try:
        arr = np.array(cells, dtype=object)
        if arr.ndim != 1:
            return None
        empty = np.array([c is None or (isinstance(c, str) and not c.strip()) for c in cells], dtype=bool) \
            if arr.dtype == object else np.zeros(len(cells), dtype=bool)
        vals = np.full(len(cells), np.nan)
        if np.any(~empty):
            vals[~empty] = np.asarray(arr[~empty], dtype=float)
    except (ValueError, TypeError):
        return None
    bad = ~empty & (~np.isfinite(vals) | (vals < 0))
    if np.any(bad):
        return None
    why: list[str | None] = [None] * len(cells)
    for i in np.flatnonzero(empty).tolist():
        why[i] = "missing"
    return vals, why


def _to_float_slow(cells) -> tuple[np.ndarray, list[str | None]]:
    vals = np.full(len(cells), np.nan)
    why: list[str | None] = [None] * len(cells)
    for i, c in enumerate(cells):
        if c is None:
            why[i] = "missing"
            continue
        if isinstance(c, int | float | np.floating | np.integer):
            v = float(c)
        else:
            text = str(c).strip()
            if not text:
                why[i] = "missing"
                continue
            try:
                v = float(text)
            except ValueError:
                why[i] = f"not a number: {text[:30]!r}"
                continue
        if math.isnan(v):
            why[i] = "missing (NaN)"
        elif math.isinf(v):
            why[i] = f"infinite: {v}"
        elif v < 0:
            why[i] = f"negative: {v:g}"
        else:
            vals[i] = v
    return vals, why


def _split_header(h: str) -> tuple[str, str | None]:
    h = h.strip()
    if h.endswith("]") and "[" in h:
        name, _, unit = h[:-1].partition("[")
        return name.strip(), unit.strip() or None
    return h, None


def check_samples(
    samples,
    design,
    calibration_range=None,
    dilutions: Sequence[float] = DEFAULT_DILUTIONS,
    *,
    analyte_unit: str | None = None,
    units: Mapping[str, str] | None = None,
    rule_conductivity: str = "russell",
    rule_tds: str = "langelier",
    background: str | None = None,
    progress: bool = False,
) -> SampleCheck:
    """Check a batch of samples against an adjuster method, sample by sample.

    Parameters
    ----------
    samples : mapping of column -> sequence, or sequence of row dicts
        Columns (our own names; a unit may follow in brackets, e.g. ``"analyte [mg/L as N]"``):
        ``sample_id``; ``analyte`` (the expected level from a previous result or screening);
        and one source of ionic strength per row: ``ionic_strength`` (mol/kg),
        ion columns such as ``"Na+ [mg/L]"``, ``conductivity`` (µS/cm) or ``tds`` (mg/L).
        The first available source in that order is used for each row and named in the result.
    design : AdjusterDesign or dict
        The method: a design from :func:`ionact.design_adjuster` or the JSON it writes.
    calibration_range : (lo, hi), optional
        The calibrated range in the untreated samples (mol/L or unit strings); default: the
        design's standards.
    dilutions : sequence of float
        Allowed pre-dilution factors (≥ 1), tried from the smallest.
    analyte_unit : str, optional
        Unit of a bare ``analyte`` column (default mol/L); also the unit of the report.
    units : mapping, optional
        Column -> unit, as an alternative to units in the headers.
    progress : bool
        Print a progress bar on standard error.

    Returns
    -------
    SampleCheck

    Raises
    ------
    InputError
        Only for problems with the inputs as a whole (no analyte column, no source of ionic
        strength at all, an unreadable design, bad dilutions). Problems in single rows
        mark those rows "invalid input" with a reason.

    Examples
    --------
    >>> import ionact as ia
    >>> d = ia.design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, samples=ia.SamplePopulation(ionic_strength=(0, 0.05)),
    ...                        analyte_range=(1e-5, 1e-3), budget=ia.Budget(mv=1.0), solve="none", model="davies")
    >>> r = ia.check_samples({"sample_id": ["a", "b", "c"], "analyte": [1e-4, 5e-3, 1e-6],
    ...                       "ionic_strength": [0.01, 0.01, 0.01]}, d)
    >>> r.status
    ('inside', 'needs dilution', 'cannot be brought into range')
    >>> r.dilution[1]
    np.float64(5.0)
    """
    method = Method.from_design(design)
    an = method.analyte
    rho_w = float(water._density(np.asarray(method.temperature))) / 1000.0  # kg/L, used throughout
    dil = np.array(sorted(float(x) for x in dilutions))
    if dil.size == 0 or not np.all(np.isfinite(dil)) or np.any(dil < 1):
        raise InputError(f"dilutions {tuple(dilutions)!r} must be factors ≥ 1")
    cols = _columns(samples)
    units = dict(units or {})
    parsed = {}
    for key, values in cols.items():
        name, unit = _split_header(key)
        unit = unit or units.get(name) or units.get(key)
        parsed[name] = (unit, values)
    n = len(next(iter(cols.values()))) if cols else 0
    if "analyte" not in parsed:
        raise InputError("the samples need an 'analyte' column (expected level, e.g. 'analyte [mg/L as N]')")
    unit = parsed["analyte"][0] or analyte_unit or "mol/L"
    factor = _unit_factor(unit, an)
    ids = [str(x) if x is not None and str(x).strip() else f"row {i + 1}"
           for i, x in enumerate(parsed.get("sample_id", (None, [None] * n))[1])]
    reasons: list[str | None] = [None] * n
    seen: dict[str, int] = {}
    for i, s in enumerate(ids):
        if s in seen:
            reasons[i] = f"duplicate sample id {s!r} (first at row {seen[s] + 1})"
        else:
            seen[s] = i
    a_vals, a_why = _to_float(parsed["analyte"][1])
    analyte = a_vals * factor
    for i, w in enumerate(a_why):
        if w and reasons[i] is None:
            reasons[i] = f"analyte {w}"
    for i in range(n):
        if reasons[i] is None and analyte[i] == 0:
            reasons[i] = "analyte is zero: give the expected level (a screening value or a previous result)"

    # ionic strength and matrix composition, row by row source
    ion_cols = {}
    for name, (u, values) in parsed.items():
        if name in ("sample_id", "analyte", "ionic_strength", "conductivity", "tds"):
            continue
        try:
            ion = resolve_ion(name)
        except IonactError:
            continue  # unrelated column: carried through untouched
        if ion.name == an.name:
            continue
        if not u:
            raise InputError(f"ion column {name!r} needs a unit, e.g. '{name} [mg/L]'")
        ion_cols[ion.name] = (ion, _unit_factor(u, ion), values)
    bg = Salt.parse(background or method.background)
    sources = [""] * n
    i_val = np.full(n, np.nan)
    have = np.zeros(n, dtype=bool)
    if "ionic_strength" in parsed:
        u, values = parsed["ionic_strength"]
        if u not in (None, "mol/kg", "mol/L", "M", "molal"):
            raise InputError(f"ionic_strength unit {u!r}: give mol/kg")
        v, why = _to_float(values)
        ok = np.isfinite(v)
        i_val[ok] = v[ok]
        have |= ok
        for i in np.flatnonzero(ok).tolist():
            sources[i] = "stated"
    matrix_c = {}
    if ion_cols:
        comp = {}
        bad_ion: list[str | None] = [None] * n
        for name, (ion, fct, values) in ion_cols.items():
            v, why = _to_float(values)
            for i, w in enumerate(why):
                if w and w != "missing" and bad_ion[i] is None:
                    bad_ion[i] = f"{name} {w}"
            comp[name] = (ion, np.where(np.isfinite(v), v, 0.0) * fct, np.isfinite(v))
        any_ion = np.zeros(n, dtype=bool)
        for _, (_, _c, okm) in comp.items():
            any_ion |= okm
        use = ~have & any_ion
        ionic = np.zeros(n)
        for name, (ion, c, _) in comp.items():
            ionic += 0.5 * ion.charge**2 * c / rho_w
            matrix_c[name] = (ion, np.where(use, c, 0.0))
        i_val[use] = ionic[use]
        have |= use
        for i in np.flatnonzero(use).tolist():
            sources[i] = "ions"
            if bad_ion[i] and reasons[i] is None:
                reasons[i] = bad_ion[i]
    for col, fn, rule in (("conductivity", ionic_strength_from_conductivity, rule_conductivity),
                          ("tds", ionic_strength_from_tds, rule_tds)):
        if col in parsed:
            u, values = parsed[col]
            v, why = _to_float(values)
            use = ~have & np.isfinite(v)
            if np.any(use):
                with warnings.catch_warnings():
                    warnings.simplefilter("ignore", ValidityRangeWarning)
                    est = fn(v[use], rule)
                i_val[use] = est.value
                have |= use
                for i in np.flatnonzero(use).tolist():
                    sources[i] = f"{col} ({est.rule})"
            for i in np.flatnonzero(~have).tolist():
                if why[i] not in (None, "missing") and reasons[i] is None:
                    reasons[i] = f"{col} {why[i]}"
    if not any(k in parsed for k in ("ionic_strength", "conductivity", "tds")) and not ion_cols:
        raise InputError("the samples need a source of ionic strength: an 'ionic_strength', 'conductivity' or "
                         "'tds' column, or ion columns such as 'Na+ [mg/L]'")
    for i in np.flatnonzero(~have).tolist():
        if reasons[i] is None:
            reasons[i] = "no ionic strength: every source column is empty for this row"
    # physically impossible values are input errors, not samples to dilute
    for i in np.flatnonzero(np.isfinite(analyte) & (analyte > MAX_ANALYTE)).tolist():
        if reasons[i] is None:
            reasons[i] = f"analyte {analyte[i]:.4g} mol/L is impossible (above {MAX_ANALYTE:g} mol/L)"
    for i in np.flatnonzero(np.isfinite(i_val) & (i_val > MAX_IONIC_STRENGTH)).tolist():
        if reasons[i] is None:
            reasons[i] = (f"ionic strength {i_val[i]:.4g} mol/kg ({sources[i]}) is impossible for a water sample "
                          f"(above {MAX_IONIC_STRENGTH:g})")
    valid = np.array([r is None for r in reasons]) & np.isfinite(analyte) & np.isfinite(i_val)

    # background salt supplies the matrix where only I is known
    bg_ions = [(resolve_ion(i), nu) for i, nu in bg.ions]
    i_bg = np.where(valid, i_val, 0.0)
    from_ions = np.array([s == "ions" for s in sources])
    bg_c = np.where(from_ions, 0.0, i_bg / bg.ionic_strength_factor) * rho_w

    names: list[str] = []
    ions: list[Ion] = []

    def add(ion: Ion) -> int:
        if ion.name not in names:
            names.append(ion.name)
            ions.append(ion)
        return names.index(ion.name)

    for ion, _ in bg_ions:
        add(ion)
    for ion, _ in matrix_c.values():
        add(ion)
    add(an)
    add(method.counter_ion)
    for stock_ion in method.stock_ions:
        add(stock_ion)
    nI = len(names)
    cm = np.zeros((nI, n))
    for ion, nu in bg_ions:
        cm[names.index(ion.name)] += nu * bg_c
    for name, (_ion, c) in matrix_c.items():
        cm[names.index(name)] += np.where(valid, c, 0.0)
    stoich = np.zeros(nI)
    stoich[names.index(an.name)] = 1.0
    stoich[names.index(method.counter_ion.name)] += abs(an.charge) / abs(method.counter_ion.charge)
    isa = np.zeros(nI)
    for stock_ion, c in method.stock_ions.items():
        isa[names.index(stock_ion.name)] = c
    r = method.volume_ratio
    t = method.temperature
    choice, model_note = _batch_model(method, tuple(ions), isa, r, rho_w)

    def lg_of(c):
        w = water_per_litre(ions, t, molar=c, density=method.density)
        b = Batch.of(tuple(ions), c / w, t)
        return log10_gamma(choice, b)[names.index(an.name)], b.ionic

    std = np.array(method.standards)
    c_std = (stoich[:, None] * std[None, :] + r * isa[:, None]) / (1 + r)
    lg_std, _ = lg_of(c_std)
    lo_s, hi_s = float(lg_std.min()), float(lg_std.max())
    slope = abs(float(water.nernst_slope(an.charge, t)))

    D = dil.size
    err = np.full((n, D), np.nan)
    t_an = np.full((n, D), np.nan)
    t_I = np.full((n, D), np.nan)
    an_safe = np.where(valid, analyte, 0.0)
    for start in range(0, n, CHUNK):
        sl = slice(start, min(n, start + CHUNK))
        k = sl.stop - sl.start
        c = ((cm[:, sl, None] + stoich[:, None, None] * an_safe[None, sl, None]) / dil[None, None, :]
             + r * isa[:, None, None]) / (1 + r)
        lg, ionic = lg_of(c.reshape(nI, -1))
        lg = lg.reshape(k, D)
        err[sl] = slope * np.maximum(np.abs(lg - lo_s), np.abs(lg - hi_s))
        t_an[sl] = an_safe[sl, None] / dil[None, :] / (1 + r)
        t_I[sl] = ionic.reshape(k, D)
        if progress:
            _progress(sl.stop, n)
    if progress and n:
        sys.stderr.write("\n")
    if calibration_range is None:
        cal = (float(std.min()), float(std.max()))
    else:
        try:
            lo, hi = calibration_range
        except (TypeError, ValueError):
            raise InputError(f"calibration_range {calibration_range!r} must be a pair (lo, hi)") from None
        cal = (float(parse_amount(lo, an, default_basis=MOLAR).value),
               float(parse_amount(hi, an, default_basis=MOLAR).value))
        if not (0 < cal[0] < cal[1]):
            raise InputError(f"calibration_range {calibration_range!r} must satisfy 0 < lo < hi")
    env_hi = method.envelope[1]
    diluted = analyte[:, None] / dil[None, :]
    i_dil = i_val[:, None] / dil[None, :]
    in_cal = (diluted >= cal[0] * (1 - 1e-12)) & (diluted <= cal[1] * (1 + 1e-12))
    in_env = i_dil <= env_hi * (1 + 1e-12)
    in_err = err <= method.budget_mv * (1 + 1e-9)
    in_lin = np.ones_like(in_cal)
    if method.linear_range:
        in_lin = (t_an >= method.linear_range[0]) & (t_an <= method.linear_range[1])
    good = in_cal & in_env & in_err & in_lin & valid[:, None]
    first = np.where(good.any(axis=1), good.argmax(axis=1), -1)

    status, reason, chosen = [], [], np.full(n, np.nan)
    rows = np.arange(n)
    fu = factor
    for i in range(n):  # wording only; every number above was computed for the whole batch at once
        if not valid[i]:
            status.append(INVALID)
            reason.append(reasons[i] or "invalid input")
            continue
        j = first[i]
        if j == 0:
            status.append(INSIDE)
            reason.append(f"undiluted: analyte {analyte[i] / fu:.4g} {unit} within {cal[0] / fu:.4g}–"
                          f"{cal[1] / fu:.4g}, I {i_val[i]:.4g} ≤ {env_hi:.4g} mol/kg, γ error "
                          f"{err[i, 0]:.3g} mV ≤ {method.budget_mv:.3g}")
            chosen[i] = dil[0]
        elif j > 0:
            status.append(DILUTE)
            why0 = _why_not(i, 0, analyte, i_val, in_cal, in_env, in_err, in_lin, cal, env_hi, err, method, fu,
                            unit, dil)
            reason.append(f"{why0}; dilute ×{dil[j]:g}: analyte {diluted[i, j] / fu:.4g} {unit}, "
                          f"I {i_dil[i, j]:.4g} mol/kg, γ error {err[i, j]:.3g} mV")
            chosen[i] = dil[j]
        else:
            status.append(CANNOT)
            reason.append(_cannot(i, analyte, i_val, in_cal, in_env, in_err, in_lin, cal, env_hi, err, method, fu,
                                  unit, dil))
    idx = np.where(first >= 0, first, 0)  # the chosen dilution, or undiluted when none works
    return SampleCheck(
        sample_id=tuple(ids), status=tuple(status), reason=tuple(reason), dilution=chosen,
        ionic_strength=i_val, ionic_strength_source=tuple(s if valid[i] or s else "" for i, s in enumerate(sources)),
        analyte=analyte, treated_analyte=np.where(valid, t_an[rows, idx], np.nan),
        treated_ionic_strength=np.where(valid, t_I[rows, idx], np.nan),
        error_mv=np.where(valid, err[rows, idx], np.nan),
        error_percent=np.where(valid, (np.power(10.0, err[rows, idx] / slope) - 1) * 100, np.nan),
        dilutions=tuple(float(x) for x in dil),
        by_dilution={"treated_analyte": t_an, "treated_ionic_strength": t_I, "error_mv": err, "ok": good},
        calibration_range=cal, envelope=method.envelope, model=choice.name + model_note, unit=unit,
        unit_factor=factor,
    )


def _batch_model(method: Method, ions: tuple[Ion, ...], isa: np.ndarray, ratio: float, rho_w: float
                 ) -> tuple[ModelChoice, str]:
    """The design's model, reused as it is; a named fallback only when the batch brings ions it lacks."""
    info = method.choice.info
    opts = method.choice.options
    lacking = info.needs(ions, opts) if opts.missing == "error" else []
    if not lacking:
        return method.choice, ""
    m = (isa * ratio / (1 + ratio) / rho_w)[:, None]
    alt = resolve_model(Batch.of(ions, m, method.temperature), "auto", options=opts)
    return alt, f" (the design's model {info.name} lacks {'; '.join(lacking)} for the batch's ions; using {alt.name})"


def _why_not(i, j, analyte, i_val, in_cal, in_env, in_err, in_lin, cal, env_hi, err, method, fu, unit, dil):
    parts = []
    d = dil[j]
    a = analyte[i] / d
    if not in_cal[i, j]:
        side = "above" if a > cal[1] else "below"
        parts.append(f"analyte {a / fu:.4g} {unit} {side} the calibrated "
                     f"{cal[0] / fu:.4g}–{cal[1] / fu:.4g}")
    if not in_env[i, j]:
        parts.append(f"I {i_val[i] / d:.4g} mol/kg above the design's {env_hi:.4g}")
    if not in_err[i, j]:
        parts.append(f"γ error {err[i, j]:.3g} mV above the budget {method.budget_mv:.3g}")
    if not in_lin[i, j]:
        parts.append("treated analyte outside the electrode's linear range")
    prefix = "undiluted" if d == 1 else f"at ×{d:g}"
    return f"{prefix}: " + ", ".join(parts)


def _cannot(i, analyte, i_val, in_cal, in_env, in_err, in_lin, cal, env_hi, err, method, fu, unit, dil):
    if analyte[i] < cal[0]:
        return (f"analyte {analyte[i] / fu:.4g} {unit} is below the calibrated low end {cal[0] / fu:.4g} even "
                "undiluted; use a lower calibration or another method")
    last = dil.size - 1
    return "no allowed dilution works; " + _why_not(i, last, analyte, i_val, in_cal, in_env, in_err, in_lin, cal,
                                                    env_hi, err, method, fu, unit, dil)


def _progress(done: int, total: int) -> None:
    width = 30
    frac = done / total if total else 1.0
    bar = "#" * int(width * frac)
    sys.stderr.write(f"\rchecking samples [{bar:<{width}}] {done}/{total}")
    sys.stderr.flush()


def _columns(samples) -> dict[str, list]:
    if isinstance(samples, Mapping):
        cols = {str(k): list(v) if not isinstance(v, np.ndarray) else v.tolist() for k, v in samples.items()}
        lens = {len(v) for v in cols.values()}
        if len(lens) > 1:
            raise InputError(f"sample columns have different lengths: {sorted(lens)}")
        return cols
    if isinstance(samples, Sequence) and not isinstance(samples, str):
        keys: list[str] = []
        for row in samples:
            if not isinstance(row, Mapping):
                raise InputError("samples must be columns (a mapping) or rows (a sequence of mappings)")
            for k in row:
                if k not in keys:
                    keys.append(str(k))
        return {k: [row.get(k) for row in samples] for k in keys}
    raise InputError(f"samples must be a mapping of columns or a sequence of rows, got {type(samples).__name__}")


# -- CSV in and out ------------------------------------------------------------------------
def read_samples_csv(path) -> tuple[dict[str, list], dict[str, str], list[str]]:
    """Read a samples CSV: columns, units (from a units row), and notes about ragged rows.

    A row whose first cell is ``units`` gives the units of the columns below it. Short rows
    are padded with empty cells (which mark those values missing); long rows are flagged.
    The file is streamed row by row.

    Raises
    ------
    InputError
        Unreadable file, not UTF-8, empty, or no header.
    """
    src = str(path)
    try:
        fh = open(path, encoding="utf-8-sig", newline="")
    except OSError as exc:
        raise InputError(f"cannot read {src}: {exc.strerror or exc}") from None
    cols: dict[str, list] = {}
    units: dict[str, str] = {}
    extra_rows: list[str] = []
    try:
        with fh:
            reader = csv.reader(fh)
            try:
                header = next(reader)
            except StopIteration:
                raise InputError(f"{src} is empty") from None
            header = [h.strip() for h in header]
            if not any(header):
                raise InputError(f"{src}: the first row (the header) is empty")
            dup = {h for h in header if header.count(h) > 1 and h}
            if dup:
                raise InputError(f"{src}: duplicate column names {sorted(dup)}")
            for h in header:
                cols[h] = []
            row_no = 1
            for row in reader:
                row_no += 1
                if not row or not any(c.strip() for c in row):
                    continue
                if row[0].strip().lower() == "units" and not any(cols[header[0]]):
                    for h, u in zip(header[1:], row[1:], strict=False):
                        if u.strip():
                            units[h] = u.strip()
                    continue
                if len(row) > len(header):
                    extra_rows.append(f"row {row_no} has {len(row)} cells for {len(header)} columns")
                    row = row[: len(header)]
                row = row + [""] * (len(header) - len(row))
                for h, c in zip(header, row, strict=True):
                    cols[h].append(c)
    except UnicodeDecodeError:
        raise InputError(f"{src} is not UTF-8 text; save it as UTF-8 CSV") from None
    except csv.Error as exc:
        raise InputError(f"{src}: malformed CSV ({exc})") from None
    if not cols or not any(len(v) for v in cols.values()):
        raise InputError(f"{src} has a header but no sample rows")
    return cols, units, extra_rows


def _safe_cell(v) -> str:
    """Spreadsheet-safe text: numbers stay numbers; text that would start a formula is neutralised."""
    if isinstance(v, float | int | np.floating | np.integer) and not isinstance(v, bool):
        f = float(v)
        return "" if math.isnan(f) else repr(f)
    s = "" if v is None else str(v)
    if s and s[0] in "=+-@\t\r":
        return "'" + s
    return s




def _num_column(values: np.ndarray) -> list[str]:
    """Shortest round-trip text of each float (numpy's repr); empty for NaN."""
    arr = np.asarray(values, dtype=float)
    text = arr.astype(str)
    text[np.isnan(arr)] = ""
    return text.tolist()


def _text_column(values) -> list[str]:
    return [_safe_cell(v) for v in values]


def write_report_csv(result: SampleCheck, path_or_file) -> None:
    """Write the per-sample report as CSV (columns documented in the README).

    Numbers are written in their shortest exact form, so reading the file back gives the
    same floats; text that a spreadsheet would take for a formula is neutralised.
    """
    columns = [(h, _num_column(v) if isinstance(v, np.ndarray) else _text_column(v)) for h, v in result.columns()]
    own = isinstance(path_or_file, str | bytes) or hasattr(path_or_file, "__fspath__")
    fh = open(path_or_file, "w", encoding="utf-8", newline="") if own else path_or_file
    try:
        w = csv.writer(fh)
        w.writerow([c for c, _ in columns])
        w.writerows(zip(*(v for _, v in columns), strict=True))
    finally:
        if own:
            fh.close()


def read_report_csv(path) -> list[dict]:
    """Read a report written by :func:`write_report_csv` back into rows (numbers as floats)."""
    with open(path, encoding="utf-8", newline="") as fh:
        reader = csv.DictReader(fh)
        out = []
        for row in reader:
            r = {}
            for k, v in row.items():
                if k in ("sample_id", "status", "reason", "ionic_strength_source"):
                    r[k] = v[1:] if v.startswith("'") and v[1:2] in ("=", "+", "-", "@", "\t", "\r") else v
                else:
                    r[k] = float(v) if v != "" else float("nan")
            out.append(r)
    return out


def report_to_text(result: SampleCheck, limit: int = 50) -> str:
    """A readable table of the first ``limit`` samples plus the summary."""
    buf = io.StringIO()
    u = result.unit
    buf.write(f"{'sample':<16}{'status':<30}{'dil.':>6}{'analyte ' + u:>20}{'I mol/kg':>10}{'err mV':>8}  reason\n")
    for r in result.rows()[:limit]:
        d = "" if math.isnan(r["dilution"]) else f"×{r['dilution']:g}"
        a = r[f"analyte [{u}]"]
        buf.write(f"{r['sample_id'][:15]:<16}{r['status']:<30}{d:>6}{a:>20.4g}{r['ionic_strength [mol/kg]']:>10.4g}"
                  f"{r['gamma_error [mV]']:>8.3g}  {r['reason']}\n")
    if len(result) > limit:
        buf.write(f"… {len(result) - limit} more rows in the CSV report\n")
    buf.write("\n" + result.summary() + "\n")
    return buf.getvalue()
