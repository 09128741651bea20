"""The analyst's job: check a batch against a method before measuring it, and plan dilutions.

For every sample, ``check_samples`` takes its ionic strength (stated, from its ions, or
from conductivity or dissolved solids by a named rule) and its expected analyte level, and
for every allowed pre-dilution computes the treated analyte level, the treated ionic
strength and the γ error against the method's calibration standards — through the same
evaluation path and the very model choice the design was proven with. A sample is
"inside" when undiluted it sits in the calibrated range, inside the ionic-strength
envelope the adjuster was proven for, inside the electrode's linear range, and within the
error budget; "needs dilution" when a larger allowed dilution achieves all of that (the
smallest one is reported); "cannot be brought into range" when none does; "invalid input"
when a value is missing or impossible. Every input row comes out, in order.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from .._pandas import is_frame
from .._progress import Progress
from ..adjuster import AdjusterDesign
from ..density import water_per_litre
from ..electrode import nernst_slope
from ..equilibrium import Complex, free_fraction_of, species_step
from ..errors import InputError
from ..models.registry import Batch
from ..models.resolver import ModelChoice, resolve_model
from ..species import Ion, Salt, resolve_ion
from ..units import MOLAR, parse_amount
from .columns import DEFAULT_CHARGE_BALANCE_PERCENT, RowValues, column_specs, row_values
from .result import CANNOT, DILUTE, INSIDE, INVALID, SampleCheck
from .table import CHUNK_ROWS, SampleTable

__all__ = ["Method", "check_samples", "DEFAULT_DILUTIONS", "CHUNK"]

DEFAULT_DILUTIONS = (1, 2, 5, 10, 20, 50, 100)
CHUNK = CHUNK_ROWS  # samples evaluated at a time, for the same reason as a streamed chunk's size
BOUND_SHARE = 0.99  # a sample whose free analyte share is below this × the standards' gets it named


@dataclass(frozen=True)
class Method:
    """What a batch check needs from an adjuster design (built from the design or its JSON)."""

    analyte: Ion
    counter_ion: Ion
    stock_ions: dict[Ion, float]  # mol/L in the stock
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
    equilibrium: bool | None = None
    complexes: tuple[Any, ...] | None = None

    @classmethod
    def from_design(cls, design: Any) -> Method:
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
            density=design.density, selectivity=design.selectivity, equilibrium=design.equilibrium,
            complexes=tuple(Complex.from_dict(c, species) for c in design.complexes) or None,
        )


def _columns(samples: Any) -> tuple[dict[str, list[Any]], list[str | None], str | None, bool | None, dict[str, str]]:
    """Columns, per-row reader errors, delimiter, decimal-comma rule and units from any accepted input."""
    if isinstance(samples, SampleTable):
        return samples.columns, list(samples.row_errors), samples.delimiter, samples.decimal_comma, dict(samples.units)
    if is_frame(samples):
        cols = {str(k): list(samples[k]) for k in samples.columns}
    elif isinstance(samples, Mapping):
        cols = {}
        for k, v in samples.items():
            if isinstance(v, str | bytes) or not isinstance(v, Sequence | np.ndarray):
                raise InputError(f"sample column {k!r} must be a sequence of values, got {type(v).__name__}")
            cols[str(k)] = list(np.asarray(v, dtype=object)) if isinstance(v, np.ndarray) else list(v)
    elif isinstance(samples, Sequence) and not isinstance(samples, str):
        keys: list[str] = []
        for row in samples:
            if not isinstance(row, Mapping):
                raise InputError("samples must be columns (a mapping) or rows (a sequence of mappings)")
            keys += [str(k) for k in row if str(k) not in keys]
        cols = {k: [row.get(k) for row in samples] for k in keys}
    else:
        raise InputError(f"samples must be a mapping of columns or a sequence of rows, got {type(samples).__name__}")
    lens = {len(v) for v in cols.values()}
    if len(lens) > 1:
        raise InputError(f"sample columns have different lengths: {sorted(lens)}")
    if not cols or lens == {0}:
        raise InputError("the batch is empty: give at least one sample")
    n = lens.pop()
    return cols, [None] * n, None, None, {}


def _dilutions(dilutions: Any) -> np.ndarray:
    if isinstance(dilutions, str) or not isinstance(dilutions, Sequence | np.ndarray):
        raise InputError(f"dilutions {dilutions!r} must be a sequence of factors ≥ 1 (e.g. (1, 2, 5, 10))")
    try:
        dil = np.array(sorted(float(x) for x in dilutions))
    except (TypeError, ValueError):
        raise InputError(f"dilutions {tuple(dilutions)!r} must be numbers ≥ 1") from None
    if dil.size == 0 or not np.all(np.isfinite(dil)) or np.any(dil < 1) or dil.max() > 1e6:
        raise InputError(f"dilutions {tuple(dilutions)!r} must be factors ≥ 1 (at most 1e6)")
    return np.unique(dil)


def _calibration(calibration_range: Any, method: Method) -> tuple[float, float]:
    if calibration_range is None:
        return float(min(method.standards)), float(max(method.standards))
    if hasattr(calibration_range, "calibrated_range") and hasattr(calibration_range, "analyte"):
        if calibration_range.analyte != method.analyte.name:  # a calibration result, for this analyte only
            raise InputError(f"the calibration is for {calibration_range.analyte}, the design for "
                             f"{method.analyte.name}", field="calibration_range")
        lo_hi = calibration_range.calibrated_range  # the same range quantify reports in
        return float(lo_hi[0]), float(lo_hi[1])
    if isinstance(calibration_range, str) or not isinstance(calibration_range, Sequence) or len(calibration_range) != 2:
        raise InputError(f"calibration_range {calibration_range!r} must be a pair (low, high)")
    lo, hi = (parse_amount(x, method.analyte, default_basis=MOLAR) for x in calibration_range)
    if lo.basis != MOLAR or hi.basis != MOLAR:
        raise InputError(f"calibration_range {calibration_range!r} must be concentrations per volume")
    cal = (float(lo.value), float(hi.value))
    if not (0 < cal[0] < cal[1]):
        raise InputError(f"calibration_range {calibration_range!r} must satisfy 0 < low < high")
    return cal


@dataclass(frozen=True)
class _Core:
    """The arrays every chunk of a batch shares: ions, adjuster, standards, model."""

    ions: tuple[Ion, ...]
    names: tuple[str, ...]
    k: int
    stoich: np.ndarray
    isa: np.ndarray  # mol/L in the stock
    bg: tuple[tuple[int, int], ...]  # (ion index, count) of the background salt
    bg_factor: float  # ionic strength per mol of background salt
    choice: ModelChoice
    note: str
    lg_std: np.ndarray  # log10 γ of the analyte in the treated standards
    free_std: float  # median free share of the analyte's total in the treated standards (1 without speciation)


def _core(method: Method, values_ions: Mapping[str, tuple[Ion, np.ndarray]], background: str | None) -> _Core:
    bg = Salt.parse(background or method.background)
    ions: list[Ion] = []

    def add(ion: Ion) -> int:
        if ion.name not in [i.name for i in ions]:
            ions.append(ion)
        return [i.name for i in ions].index(ion.name)

    bg_idx = tuple((add(resolve_ion(i)), nu) for i, nu in bg.ions)
    for ion, _ in values_ions.values():
        add(ion)
    k = add(method.analyte)
    add(method.counter_ion)
    for ion in method.stock_ions:
        add(ion)
    names = tuple(i.name for i in ions)
    stoich = np.zeros(len(ions))
    stoich[k] = 1.0
    stoich[names.index(method.counter_ion.name)] += abs(method.analyte.charge) / abs(method.counter_ion.charge)
    isa = np.zeros(len(ions))
    for ion, c in method.stock_ions.items():
        isa[names.index(ion.name)] = c
    choice, note = _batch_model(method, tuple(ions), isa)
    r = method.volume_ratio
    std = np.array(method.standards)
    c_std = (stoich[:, None] * std[None, :] + r * isa[:, None]) / (1 + r)
    lg, _, free = _lg(choice, tuple(ions), c_std, method)
    return _Core(tuple(ions), names, k, stoich, isa, bg_idx, bg.ionic_strength_factor, choice, note, lg[k],
                 float(np.median(free)))


def _batch_model(method: Method, ions: tuple[Ion, ...], isa: np.ndarray) -> tuple[ModelChoice, str]:
    """The design's model, reused as it is; another only when the batch brings ions it lacks (and said so)."""
    info = method.choice.info
    opts = method.choice.options
    lacking = info.needs(ions, opts) if opts.missing == "error" else []
    if not lacking:
        return method.choice, ""
    r = method.volume_ratio
    m = (isa * r / (1 + r))[:, None]
    alt = resolve_model(Batch.of(ions, m, method.temperature), "auto", options=opts)
    return alt, f" (the design's model {info.name} lacks {'; '.join(lacking)} for the batch's ions; using {alt.name})"


def _lg(choice: ModelChoice, ions: tuple[Ion, ...], c: np.ndarray, method: Method
        ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Steps 1–3 of the evaluation path on molar compositions (n, N): stoichiometric log10 γ, I,
    and the analyte's free share of its total (ones where nothing was speciated)."""
    w = water_per_litre(ions, method.temperature, molar=c, density=method.density)
    b = Batch.of(ions, c / w, method.temperature)
    step = species_step(ions, b.m, b.t, choice.requested, choice.options, choice.fallback, choice=choice,
                        equilibrium=method.equilibrium, species=method.complexes, checks=False)
    free = free_fraction_of(step, method.analyte.name)
    return (step.log10_gamma, (step.state.ionic if step.state is not None else b.ionic),
            np.ones(b.m.shape[1]) if free is None else free)


def _errors(core: _Core, method: Method, vals: RowValues, dil: np.ndarray
            ) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """γ error (mV), treated analyte (mol/L), treated I (mol/kg), log10 γ and the analyte's free share
    per sample × dilution."""
    n, D = len(vals.ids), dil.size
    valid = vals.valid
    nI = len(core.ions)
    cm = np.zeros((nI, n))
    from_ions = np.array([s == "ions" for s in vals.sources])
    i_bg = np.where(valid & ~from_ions, vals.ionic, 0.0)
    # the background salt at the sample's ionic strength, mol/kg -> mol/L through the one density model
    bg_ions = [core.ions[idx] for idx, _ in core.bg]
    m_bg = np.array([nu * i_bg / core.bg_factor for _, nu in core.bg])
    w_bg = water_per_litre(bg_ions, method.temperature, molal=m_bg, density=method.density)
    for (idx, _), m in zip(core.bg, m_bg, strict=True):
        cm[idx] += m * w_bg
    for name, (_ion, c) in vals.ions.items():
        cm[core.names.index(name)] += np.where(valid & from_ions, c, 0.0)
    an = np.where(valid, vals.analyte, 0.0)
    r = method.volume_ratio
    c = ((cm[:, :, None] + core.stoich[:, None, None] * an[None, :, None]) / dil[None, None, :]
         + r * core.isa[:, None, None]) / (1 + r)
    lg, ionic, free = _lg(core.choice, core.ions, c.reshape(nI, -1), method)
    lga = lg[core.k].reshape(n, D)
    slope = abs(float(nernst_slope(method.analyte.charge, method.temperature)))
    err = slope * np.maximum(np.abs(lga - core.lg_std.min()), np.abs(lga - core.lg_std.max()))
    return err, an[:, None] / dil[None, :] / (1 + r), ionic.reshape(n, D), lga, free.reshape(n, D)


def check_samples(
    samples: Any,
    design: Any,
    *,
    calibration_range: Any = None,
    dilutions: Sequence[float] = DEFAULT_DILUTIONS,
    analyte_unit: str | None = None,
    units: Mapping[str, str] | None = None,
    rule: str | Mapping[str, str] | None = None,
    background: str | None = None,
    charge_tolerance_percent: float = DEFAULT_CHARGE_BALANCE_PERCENT,
    progress: bool = False,
) -> SampleCheck:
    """Check a batch of samples against an adjuster method, sample by sample.

    Parameters
    ----------
    samples : SampleTable, mapping of column -> sequence, sequence of row dicts, or DataFrame
        Columns (our own names; a unit may follow in brackets, e.g. ``"analyte [mg/L as N]"``):
        ``sample_id``; ``analyte`` (the expected level); and one source of ionic strength per
        row: ``ionic_strength`` (mol/kg), ion columns such as ``"Na+ [mg/L]"``,
        ``conductivity`` (µS/cm) or ``tds`` (mg/L). The first non-empty source in that
        order is used for each row and named in the result.
    design : AdjusterDesign or dict
        The method: a design from :func:`ionact.design_adjuster` or the JSON it writes;
        its model choice is reused exactly.
    calibration_range : (low, high) or a calibration result, optional
        The calibrated range in the untreated samples (mol/L or unit strings); default the
        design's standards.
    dilutions : sequence of float
        Allowed pre-dilution factors (≥ 1), tried from the smallest.
    analyte_unit : str, optional
        Unit of an ``analyte`` column without one (default mol/L); also the report's unit.
    units : mapping, optional
        Column -> unit, as an alternative to units in the headers.
    rule : str or mapping, optional
        The rule of thumb for conductivity ("russell", "griffin-jurinak") and/or dissolved
        solids ("langelier"): one name, or {"conductivity": …, "tds": …}.
    background : str, optional
        Salt that stands for the matrix where only the ionic strength is known (default:
        the design's).
    charge_tolerance_percent : float
        Largest ion-balance error, % of total equivalents, for rows whose ionic strength
        comes from their ions (default 5 %, common practice).
    progress : bool
        A progress display on standard error (only when it is a terminal).

    Returns
    -------
    SampleCheck
        Every row in input order with its status, reason, ionic strength and its source,
        treated analyte activity, residual error (mV and %), dilution, and free fraction.

    Raises
    ------
    InputError
        Only for the inputs as a whole (no analyte column, no source of ionic strength, a
        column whose unit cannot be read, an unreadable design, bad dilutions). Problems
        in single rows mark those rows "invalid input" with their reason.

    Examples
    --------
    >>> import ionact as ia
    >>> d = ia.design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, samples=ia.SamplePopulation(ionic_strength=(0, 0.05)),
    ...                        analyte_range=(1e-5, 1e-3), budget=ia.Budget(mv=1.0), solve="none", model="davies")
    >>> r = ia.check_samples({"sample_id": ["a", "b", "c"], "analyte": [1e-4, 5e-3, 1e-6],
    ...                       "ionic_strength": [0.01, 0.01, 0.01]}, d)
    >>> r.status
    ('inside', 'needs dilution', 'cannot be brought into range')
    >>> float(r.dilution[1])
    5.0
    """
    method = Method.from_design(design)
    dil = _dilutions(dilutions)
    cal = _calibration(calibration_range, method)
    cols, row_errors, delim, dec, file_units = _columns(samples)
    specs = column_specs(list(cols), {**file_units, **dict(units or {})}, method.analyte, analyte_unit)
    rules = _rules(rule)
    vals = row_values(specs, cols, row_errors, delimiter=delim, decimal_comma=dec, temperature=method.temperature,
                      conductivity_rule=rules["conductivity"], tds_rule=rules["tds"],
                      charge_tolerance_percent=_percent(charge_tolerance_percent), density=method.density,
                      id_offset=samples.first_row if isinstance(samples, SampleTable) else 0)
    _duplicates(vals)
    core = _core(method, vals.ions, background)
    n = len(vals.ids)
    err = np.full((n, dil.size), np.nan)
    t_an = np.full((n, dil.size), np.nan)
    t_i = np.full((n, dil.size), np.nan)
    lg = np.full((n, dil.size), np.nan)
    free = np.full((n, dil.size), np.nan)
    with Progress(n, "checking samples", enabled=progress) as bar:
        for start in range(0, n, CHUNK):
            sl = slice(start, min(n, start + CHUNK))
            part = RowValues(vals.ids[sl], vals.analyte[sl], vals.ionic[sl], vals.sources[sl],
                             {k: (ion, c[sl]) for k, (ion, c) in vals.ions.items()}, vals.reasons[sl])
            err[sl], t_an[sl], t_i[sl], lg[sl], free[sl] = _errors(core, method, part, dil)
            bar.advance(sl.stop - sl.start)
    unit = next(s.unit for s in specs if s.role == "analyte") or "mol/L"
    factor = next(s.factor for s in specs if s.role == "analyte")
    result = _classify(vals, method, dil, cal, err, t_an, t_i, lg, free, core, unit, factor)
    if is_frame(samples):  # the rows come back on the frame's index (not part of the JSON record)
        object.__setattr__(result, "_index", samples.index)
    return result


def _rules(rule: str | Mapping[str, str] | None) -> dict[str, str]:
    from ..estimates import EC_RULES as _EC_RULES
    from ..estimates import TDS_RULES as _TDS_RULES

    out = {"conductivity": "russell", "tds": "langelier"}
    if rule is None:
        return out
    if isinstance(rule, str):
        if rule in _EC_RULES:
            out["conductivity"] = rule
        elif rule in _TDS_RULES:
            out["tds"] = rule
        else:
            raise InputError(f"rule {rule!r} is not one of {', '.join(sorted({*_EC_RULES, *_TDS_RULES}))}")
        return out
    if isinstance(rule, Mapping):
        for k, v in rule.items():
            if k not in out:
                raise InputError(f"rule key {k!r} must be 'conductivity' or 'tds'")
            out[k] = v
        return out
    raise InputError(f"rule {rule!r} must be a rule name or a mapping")


def _percent(x: object) -> float:
    if isinstance(x, bool) or not isinstance(x, int | float) or not (0 < float(x) <= 100):
        raise InputError(f"charge_tolerance_percent {x!r} must be a number in (0, 100]")
    return float(x)


def _duplicates(vals: RowValues) -> None:
    if len(set(vals.ids)) == len(vals.ids):
        return
    seen: dict[str, int] = {}
    for i, s in enumerate(vals.ids):
        if s in seen:
            if vals.reasons[i] is None:
                vals.reasons[i] = f"duplicate sample id {s!r} (first at row {seen[s] + 1})"
        else:
            seen[s] = i


def _classify(vals: RowValues, method: Method, dil: np.ndarray, cal: tuple[float, float], err: np.ndarray,
              t_an: np.ndarray, t_i: np.ndarray, lg: np.ndarray, free: np.ndarray, core: _Core, unit: str,
              factor: float) -> SampleCheck:
    """Statuses and reasons in words; every number was computed for the whole batch at once."""
    valid = vals.valid
    analyte, i_val = vals.analyte, vals.ionic
    diluted = analyte[:, None] / dil[None, :]
    i_dil = i_val[:, None] / dil[None, :]
    env_hi = method.envelope[1]
    in_cal = (diluted >= cal[0] * (1 - 1e-12)) & (diluted <= cal[1] * (1 + 1e-12))
    in_env = i_dil <= env_hi * (1 + 1e-12)
    in_err = err <= method.budget_mv * (1 + 1e-9)
    in_lin = np.ones_like(in_cal)
    if method.linear_range:
        in_lin = (t_an >= method.linear_range[0]) & (t_an <= method.linear_range[1])
    good = in_cal & in_env & in_err & in_lin & valid[:, None]
    first = np.where(good.any(axis=1), good.argmax(axis=1), -1)
    rows = np.arange(len(vals.ids))
    idx = np.where(first >= 0, first, 0)
    arrays = {"in_cal": in_cal, "in_env": in_env, "in_err": in_err, "in_lin": in_lin, "err": err, "free": free}
    flags = _Flags(analyte.tolist(), i_val.tolist(), _Column.at(np.zeros(len(rows), dtype=int), rows, dil, **arrays),
                   _Column.at(np.full(len(rows), dil.size - 1), rows, dil, **arrays), cal, env_hi, method.budget_mv,
                   factor, unit, core.free_std, method.analyte.name)
    kind = np.where(~valid, 0, np.where(first == 0, 1, np.where(first > 0, 2, 3)))
    status = np.array([INVALID, INSIDE, DILUTE, CANNOT], dtype=object)[kind].tolist()
    reason = np.empty(len(rows), dtype=object)
    bad = np.flatnonzero(kind == 0)
    reason[bad] = [vals.reasons[i] or "invalid input" for i in bad.tolist()]
    inside = np.flatnonzero(kind == 1)
    reason[inside] = flags.inside(inside.tolist())
    dilute = np.flatnonzero(kind == 2)
    at = idx[dilute]
    reason[dilute] = flags.dilute(dilute.tolist(), dil[at].tolist(), diluted[dilute, at].tolist(),
                                  i_dil[dilute, at].tolist(), err[dilute, at].tolist(), free[dilute, at].tolist())
    cannot = np.flatnonzero(kind == 3)
    reason[cannot] = [flags.cannot(i) for i in cannot.tolist()]
    chosen = np.where((kind == 1) | (kind == 2), dil[idx], np.nan)
    slope = abs(float(nernst_slope(method.analyte.charge, method.temperature)))
    e = np.where(valid, err[rows, idx], np.nan)
    return SampleCheck(
        sample_id=tuple(vals.ids), status=tuple(status), reason=tuple(reason.tolist()), dilution=chosen,
        ionic_strength=i_val, ionic_strength_source=tuple(vals.sources),
        analyte=analyte, treated_analyte=np.where(valid, t_an[rows, idx], np.nan),
        treated_ionic_strength=np.where(valid, t_i[rows, idx], np.nan), error_mv=e,
        gamma=np.where(valid, np.power(10.0, lg[rows, idx]), np.nan),
        error_percent=np.where(valid, (np.power(10.0, e / slope) - 1) * 100, np.nan),
        dilutions=tuple(float(x) for x in dil),
        by_dilution={"treated_analyte": t_an, "treated_ionic_strength": t_i, "error_mv": err, "ok": good},
        calibration_range=cal, envelope=method.envelope, model=core.choice.name + core.note, unit=unit,
        unit_factor=factor)


@dataclass(frozen=True)
class _Column:
    """One dilution's flags and numbers for every row, as Python lists (list items format
    several times faster than numpy scalars, and the reasons are words built row by row)."""

    d: float
    in_cal: list[bool]
    in_env: list[bool]
    in_err: list[bool]
    in_lin: list[bool]
    err: list[float]
    free: list[float]  # the analyte's free share of its total

    @classmethod
    def at(cls, j: np.ndarray, rows: np.ndarray, dil: np.ndarray, **arrays: np.ndarray) -> _Column:
        """The column ``j`` of each row (one index per row), gathered from (rows × dilutions) arrays."""
        return cls(d=float(dil[j[0]]) if j.size else 1.0,
                   **{k: v[rows, j].tolist() for k, v in arrays.items()})


@dataclass(frozen=True)
class _Flags:
    """What the reasons in words are built from: each row's values as Python lists (list items
    format several times faster than numpy scalars) and the batch's constants."""

    analyte: list[float]
    i_val: list[float]
    undiluted: _Column
    strongest: _Column  # the largest allowed dilution
    cal: tuple[float, float]
    env_hi: float
    budget: float
    fu: float
    unit: str
    free_std: float  # the analyte's free share in the standards
    analyte_name: str

    def bound(self, f: float) -> str:
        """Words for a sample whose own ions bind the analyte more than the standards' do."""
        if not f < BOUND_SHARE * self.free_std:
            return ""
        return (f" (free {self.analyte_name} {f:.1%} of its total against {self.free_std:.1%} in the standards: "
                "the sample's ions bind it)")

    def inside(self, rows: list[int]) -> list[str]:
        """Reasons of the rows that need no dilution."""
        fu, cal, a, iv, e = self.fu, self.cal, self.analyte, self.i_val, self.undiluted.err
        p1 = f" {self.unit} within {cal[0] / fu:.4g}–{cal[1] / fu:.4g}, I "
        p2 = f" ≤ {self.env_hi:.4g} mol/kg, γ error "
        p3 = f" mV ≤ {self.budget:.3g}"
        return [f"undiluted: analyte {a[i] / fu:.4g}{p1}{iv[i]:.4g}{p2}{e[i]:.3g}{p3}" for i in rows]

    def dilute(self, rows: list[int], d: list[float], a: list[float], iv: list[float], e: list[float],
               f: list[float]) -> list[str]:
        """Reasons of the rows that need a dilution, with the values at the one chosen."""
        fu, unit = self.fu, self.unit
        return [f"{self.why_not(i, self.undiluted)}; dilute ×{dk:g}: analyte {ak / fu:.4g} {unit}, I {ik:.4g} "
                f"mol/kg, γ error {ek:.3g} mV{self.bound(fk)}"
                for i, dk, ak, ik, ek, fk in zip(rows, d, a, iv, e, f, strict=True)]

    def cannot(self, i: int) -> str:
        """The reason of a row that no allowed dilution brings into range."""
        fu, cal = self.fu, self.cal
        if self.analyte[i] < cal[0]:
            return (f"analyte {self.analyte[i] / fu:.4g} {self.unit} is below the calibrated low end "
                    f"{cal[0] / fu:.4g} even undiluted; use a lower calibration or another method")
        return "no allowed dilution works; " + self.why_not(i, self.strongest)

    def why_not(self, i: int, c: _Column) -> str:
        parts = []
        d = c.d
        a = self.analyte[i] / d
        if not c.in_cal[i]:
            side = "above" if a > self.cal[1] else "below"
            parts.append(f"analyte {a / self.fu:.4g} {self.unit} {side} the calibrated "
                         f"{self.cal[0] / self.fu:.4g}–{self.cal[1] / self.fu:.4g}")
        if not c.in_env[i]:
            parts.append(f"I {self.i_val[i] / d:.4g} mol/kg above the design's {self.env_hi:.4g}")
        if not c.in_err[i]:
            parts.append(f"γ error {c.err[i]:.3g} mV above the budget {self.budget:.3g}{self.bound(c.free[i])}")
        if not c.in_lin[i]:
            parts.append("treated analyte outside the electrode's linear range")
        prefix = "undiluted" if d == 1 else f"at ×{d:g}"
        return f"{prefix}: " + ", ".join(parts)



