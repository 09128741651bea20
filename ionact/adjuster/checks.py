"""The checks a design must pass, each a function returning :class:`Check` records.

A check carries its number, limit and unit as fields; its message is built from them, and
ranking and exit statuses read the fields, never the text. Statuses: "ok", "warning",
"fail", and "not assessed" (the check could not be made — a selectivity coefficient or a
solubility is missing — which is never the same as clean).

Auxiliary activities (an interferent or a precipitating ion the design itself does not
carry, the analyte's acid–base partner) come from the design's own model; when it lacks
parameters for them, the most accurate model that has them is used and the check says
so in its detail. Nothing here warns: what a check finds is in the check.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..constants import PARAMETER_WINDOW
from ..density import water_per_litre
from ..electrode import nernst_slope
from ..equilibrium import Step, free_fraction_of, species_step
from ..errors import InputError, MissingParameterError
from ..models.registry import Batch
from ..models.resolver import ModelChoice
from ..references import cite
from ..species import Ion, Salt, resolve_ion
from ..tables import acid_table, ksp_table
from .inputs import Electrode, SamplePopulation
from .solve import BufferPlan, stock_saturation
from .system import Evaluated, System

__all__ = ["Check", "STATUSES", "aux_step", "check_solubility", "check_model_range", "check_budget",
           "check_linear_range", "check_interference", "check_precipitation", "check_buffer", "check_protonation",
           "INTERFERENCE_WARNING_SHARE", "PH_DRIFT_LIMIT", "MEASURED_FORM_LIMIT", "PKW"]

STATUSES = ("ok", "warning", "fail", "not assessed")
INTERFERENCE_WARNING_SHARE = 0.2  # an interference above 20 % of the budget is worth a warning
PH_DRIFT_LIMIT = 0.1  # pH units over the stated sample acidity (common practice)
MEASURED_FORM_LIMIT = 0.99  # fraction of the analyte in the form the electrode measures
PKW = 14.00  # 25 °C, rounded (CRC 13.995, from memory)


@dataclass(frozen=True)
class Check:
    """One check on a design.

    Attributes
    ----------
    name : str
    status : {"ok", "warning", "fail", "not assessed"}
    value, limit : float or None
        The number found and the limit it is held against, in ``unit``.
    unit : str
    detail : str
        Words that go with the numbers (where, by what model, why not assessed).
    """

    name: str
    status: str
    value: float | None = None
    limit: float | None = None
    unit: str = ""
    detail: str = ""

    def __post_init__(self) -> None:
        if self.status not in STATUSES:
            raise InputError(f"check status {self.status!r} is not one of {', '.join(STATUSES)}")

    @property
    def message(self) -> str:
        """The check in words, built from its fields."""
        parts = []
        if self.value is not None:
            u = f" {self.unit}" if self.unit else ""
            parts.append(f"{self.value:.4g}{u}" + (f" (limit {self.limit:.4g}{u})" if self.limit is not None else ""))
        if self.detail:
            parts.append(self.detail)
        return "; ".join(parts)

    def to_dict(self) -> dict[str, Any]:
        return {"name": self.name, "status": self.status, "value": self.value, "limit": self.limit,
                "unit": self.unit, "detail": self.detail, "message": self.message}

    @classmethod
    def from_dict(cls, d: Mapping[str, Any]) -> Check:
        if not isinstance(d, Mapping):
            raise InputError(f"a check must be a mapping, got {type(d).__name__}")
        value, limit = d.get("value"), d.get("limit")
        return cls(str(d["name"]), str(d["status"]), None if value is None else float(value),
                   None if limit is None else float(limit), str(d.get("unit", "")), str(d.get("detail", "")))


def aux_step(system: System, batch: Batch, extra: Mapping[str, tuple[Ion, np.ndarray]]) -> tuple[
        Step, Batch, str]:
    """The path (species, then γ) for the treated solutions with extra ions added (molalities (N,) each).

    Returns the step (stoichiometric log10 γ of every input, and the equilibrium where the
    ions react), the augmented batch of totals, and a note naming the model used — another
    than the design's when it lacks parameters for the extra ions.
    """
    ions = list(batch.ions)
    m = [batch.m]
    for _name, (ion, mm) in extra.items():
        if ion.name in batch.names:
            continue
        ions.append(ion)
        m.append(np.broadcast_to(mm, batch.m.shape[1:])[None, :])
    aug = Batch.of(tuple(ions), np.concatenate(m, axis=0), batch.t)
    choice: ModelChoice = system.choice
    kw = dict(equilibrium=system.equilibrium, species=system.species, checks=False)
    try:
        step = species_step(aug.ions, aug.m, aug.t, choice.requested, choice.options, choice.fallback,
                            choice=choice, **kw)  # type: ignore[arg-type]
        note = f"activities by {choice.name}"
    except MissingParameterError:
        lacking = "; ".join(choice.info.needs(aug.ions, choice.options))
        step = species_step(aug.ions, aug.m, aug.t, "auto", choice.options, None, **kw)  # type: ignore[arg-type]
        note = f"activities by {step.choice.name} ({choice.name} lacks {lacking})"
    return step, aug, note


def check_solubility(system: System, amounts: np.ndarray, t_low: float, margin: float) -> list[Check]:
    """Each stock component against its saturation molality at the coldest temperature."""
    out = []
    sats = stock_saturation(system.components, amounts, system.temperature, system.density, t_low)
    for c, a in zip(system.components, amounts, strict=True):
        if a <= 0:
            continue
        m, sat = sats[c.name]
        name = f"solubility of {c.name}"
        if c.salt is None and c.liquid_density is not None:
            continue  # a miscible liquid reagent
        if sat is None:
            out.append(Check(name, "not assessed", m, None, "mol/kg",
                             "no solubility data in the tables — check the supplier's before relying on this stock"))
            continue
        frac = m / sat
        ts = [x for x, _ in c.salt.solubility_table] if c.salt else []
        outside = bool(ts) and not (ts[0] <= t_low <= ts[-1])
        status = "fail" if frac > 1 else ("warning" if frac > 1 - margin + 1e-9 or outside else "ok")
        detail = (f"{m:.4g} mol/kg water against saturation {sat:.4g} mol/kg at {t_low:g} °C (each salt on its own; "
                  "common-ion effects not included)")
        if outside:
            detail += f"; solubility is tabulated for {ts[0]:g}–{ts[-1]:g} °C only, the nearest value was used"
        out.append(Check(name, status, 100.0 * frac, 100.0 * (1 - margin), "% of saturation", detail))
    return out


def check_model_range(system: System, ev: Evaluated) -> Check:
    """The design's model against its validity range at the design (ionic strength, salt limits, temperature)."""
    problems = [str(v) for v in ev.result.violations]
    info = system.choice.info
    imin, imax = float(ev.ionic_min[0]), float(ev.ionic_max[0])
    return Check("model range", "warning" if problems else "ok", imax, info.max_ionic_strength, "mol/kg",
                 f"final ionic strength {imin:.4g}–{imax:.4g} mol/kg under {info.name}"
                 + ("; " + "; ".join(problems) if problems else ""))


def check_budget(worst_mv: float, worst_percent: float, budget_mv: float) -> Check:
    return Check("error budget", "ok" if worst_mv <= budget_mv * (1 + 1e-9) else "fail", worst_mv, budget_mv, "mV",
                 f"worst residual γ error {worst_percent:.3g} %")


def check_linear_range(system: System, ratio: float, linear: tuple[float, float]) -> Check:
    lo_all = min(system.an_levels[0], system.std_levels[0]) / (1 + ratio)
    hi_all = max(system.an_levels[-1], system.std_levels[-1]) / (1 + ratio)
    ok_lo, ok_hi = lo_all >= linear[0] * (1 - 1e-12), hi_all <= linear[1] * (1 + 1e-12)
    detail = (f"treated analyte {lo_all:.4g}–{hi_all:.4g} mol/L; electrode linear {linear[0]:.4g}–{linear[1]:.4g} mol/L"
              + ("" if ok_lo else "; the lowest level falls below the linear range")
              + ("" if ok_hi else "; the highest level exceeds the linear range"))
    return Check("linear range", "ok" if ok_lo and ok_hi else "warning", None, None, "", detail)


def _declared_molalities(system: System, batch: Batch, pop: SamplePopulation, ratio: float) -> dict[
        str, tuple[Ion, np.ndarray]]:
    """Declared matrix ions at their highest level, diluted by the adjuster, as molalities per column."""
    w = water_per_litre(batch.ions, system.temperature, molal=batch.m, density=system.density)
    out = {}
    for name, (level, basis) in pop.matrix_ions.items():
        ion = resolve_ion(name)
        c = level / (1 + ratio)
        out[name] = (ion, np.asarray(c / w if basis == "molar" else np.full(w.shape, c)))
    return out


def check_interference(system: System, ev: Evaluated, analyte: Ion, electrode: Electrode, pop: SamplePopulation,
                       ratio: float, budget_mv: float, ph: float | None, declared_ions: tuple[str, ...]
                       ) -> list[Check]:
    """Nikolsky–Eisenman bias of every ion of the analyte's sign in the ISA or declared in the samples.

    Ions the ISA brings can fail the design; those declared in the samples warn. An ion
    without this electrode's selectivity coefficient is "not assessed".
    """
    batch = ev.batch
    declared = _declared_molalities(system, batch, pop, ratio)
    step, aug, note = aux_step(system, batch, declared)
    a = np.power(10.0, step.log10_gamma) * aug.m  # free activities (stoichiometric γ × totals)
    a_an = a[aug.names.index(analyte.name)]
    isa = {system.names[i] for i in range(len(system.ions)) if np.any(system.cmat[i] > 0)}
    sign = np.sign(analyte.charge)
    candidates = [n for n in aug.names if n != analyte.name and np.sign(aug.z[aug.names.index(n)]) == sign
                  and (n in isa or n in declared or n in declared_ions)]
    for n in electrode.selectivity:
        if n not in candidates:
            candidates.append(n)
    slope = abs(float(nernst_slope(analyte.charge, system.temperature)))
    out = []
    known = {i.name: i for i in aug.ions}
    for name in candidates:
        ion = known[name] if name in known else resolve_ion(name)
        if name in isa:
            origin = "from the ISA"
        elif name in declared or name in declared_ions:
            origin = "declared in the samples"
        else:
            origin = f"from the background salt standing for the samples ({pop.background})"
        title = f"interference by {name}"
        k = electrode.selectivity.get(name)
        if np.sign(ion.charge) != sign:
            raise InputError(f"interferent {name} must carry the same sign of charge as {analyte.name}")
        if name in ("H+", "OH-") and name not in aug.names:
            if k is None:
                continue
            if ph is None:
                out.append(Check(title, "not assessed", None, None, "",
                                 "the pH is not fixed: add a buffer or state the samples' pH"))
                continue
            aj = np.full(a_an.shape, 10.0 ** ((ph - PKW) if name == "OH-" else -ph))
            origin = f"at pH {ph:g}, pKw {PKW:.2f}"
        elif name in aug.names:
            aj = a[aug.names.index(name)]
        else:
            out.append(Check(title, "not assessed", None, None, "",
                             f"neither the ISA nor the described samples contain {name}"))
            continue
        if k is None:
            out.append(Check(title, "not assessed", None, None, "",
                             f"{name} ({origin}) has the analyte's charge sign and no selectivity coefficient was "
                             "given for this electrode: give its K to assess it"))
            continue
        extra = k * np.power(aj, analyte.charge / ion.charge)
        with np.errstate(divide="ignore", invalid="ignore"):
            rel = np.where(a_an > 0, extra / a_an, 0.0)
        col = int(np.argmax(rel))
        mv = slope * math.log10(1 + float(rel[col]))
        if name in isa:
            status = "fail" if mv > budget_mv else ("warning" if mv > INTERFERENCE_WARNING_SHARE * budget_mv else "ok")
        else:
            status = "warning" if mv > INTERFERENCE_WARNING_SHARE * budget_mv else "ok"
        detail = (f"{origin}; K = {k:g}: at worst adds {float(rel[col]):.3g} × the analyte activity "
                  f"(equivalent to {float(extra[col]):.3g} of analyte activity); {note}")
        out.append(Check(title, status, mv, budget_mv, "mV", detail))
    return out


def _log_activities(step: Step, aug: Batch) -> tuple[tuple[str, ...], np.ndarray]:
    """log10 activities of every free species: from the equilibrium where there is one, else γ × totals."""
    if step.state is not None and step.network is not None:
        with np.errstate(divide="ignore"):
            return step.network.names, step.state.log10_gamma + np.log10(step.state.molality)
    with np.errstate(divide="ignore"):
        return aug.names, step.log10_gamma + np.log10(aug.m)


def check_precipitation(system: System, ev: Evaluated, analyte: Ion, pop: SamplePopulation, ratio: float
                        ) -> list[Check]:
    """Saturation index of every tabulated solid whose ions meet in the treated samples and standards,
    from the free ions' activities (after ion pairing and complexation where they apply)."""
    batch = ev.batch
    declared = _declared_molalities(system, batch, pop, ratio)
    step, aug, note = aux_step(system, batch, declared)
    names, log_a = _log_activities(step, aug)
    out = []
    for salt, (log_ksp, src) in ksp_table().items():
        s = Salt.parse(salt)
        if not all(i in names for i, _ in s.ions):
            continue
        rows = [names.index(i) for i, _ in s.ions]
        present = np.all(np.isfinite(log_a[rows]), axis=0)
        if not np.any(present):
            continue
        log_iap = sum(nu * log_a[r] for (_, nu), r in zip(s.ions, rows, strict=True))
        log_iap = np.where(present, log_iap, -np.inf)
        col = int(np.argmax(log_iap))
        si = float(log_iap[col]) - log_ksp
        has_analyte = any(i == analyte.name for i, _ in s.ions)
        status = ("fail" if has_analyte else "warning") if si > 0 else "ok"
        detail = (f"saturation index in the treated solutions (log Ksp {log_ksp:g}, {cite(src[0]) if src else ''}); "
                  f"{note}" + ("; free-ion activities after ion pairing" if step.state is not None else ""))
        if si > 0 and has_analyte:
            detail += f"; the analyte {analyte.name} itself would precipitate"
        out.append(Check(f"precipitation of {salt}", status, si, 0.0, "", detail))
    return out


def check_buffer(system: System, ev: Evaluated, plan: BufferPlan, amounts: np.ndarray, ratio: float,
                 acidity: tuple[float, float] | None) -> tuple[list[Check], dict[str, Any]]:
    """The buffer's pH across treated solutions, its capacity, and its drift over the sample acidity."""
    b = ev.batch
    lg = ev.result.log10_gamma
    ia, ib = system.index(plan.acid_species), system.index(plan.base_species)
    ph = ev.ph if ev.ph is not None else (
        plan.pka + np.log10(np.power(10.0, lg[ib]) * b.m[ib] / (np.power(10.0, lg[ia]) * b.m[ia])))
    ca_stock, cb_stock = float(amounts[plan.acid_index]), float(amounts[plan.base_index])
    ca_f, cb_f = ca_stock * ratio / (1 + ratio), cb_stock * ratio / (1 + ratio)
    cap = math.log(10.0) * ca_f * cb_f / (ca_f + cb_f)
    out = []
    drift = None
    if acidity is not None:
        ga = float(np.power(10.0, np.median(_free_lg(ev, plan.acid_species, lg[ia]))))
        gb = float(np.power(10.0, np.median(_free_lg(ev, plan.base_species, lg[ib]))))
        shifts = []
        for d in acidity:
            delta = d / (1 + ratio)
            a2, b2 = ca_f + delta, cb_f - delta
            if a2 <= 0 or b2 <= 0:
                out.append(Check("pH buffer capacity", "fail", d, None, "mol/L",
                                 f"sample acidity {d:g} mol/L uses up the buffer's {'base' if b2 <= 0 else 'acid'}"))
                shifts.append(math.nan)
                continue
            shifts.append(plan.pka + math.log10(gb * b2 / (ga * a2)) - plan.pH)
        drift = (min(shifts), max(shifts))
        if all(math.isfinite(x) for x in shifts):
            worst = max(abs(x) for x in shifts)
            out.append(Check("pH drift", "ok" if worst <= PH_DRIFT_LIMIT else "warning", worst, PH_DRIFT_LIMIT, "pH",
                             f"{drift[0]:+.3f} to {drift[1]:+.3f} over sample acidity {acidity[0]:g} to "
                             f"{acidity[1]:g} mol/L (buffer capacity {cap:.3g} mol/(L·pH))"))
    lo, hi = PARAMETER_WINDOW
    far = not (lo <= system.temperature <= hi)
    spread = float(np.max(np.abs(ph - plan.pH)))
    out.append(Check("pH buffer", "warning" if far else "ok", spread, None, "pH",
                     f"{plan.acid_species}/{plan.base_species} pKa {plan.pka:.3f}: pH {float(ph.min()):.3f}–"
                     f"{float(ph.max()):.3f} across treated samples and standards (target {plan.pH:g})"
                     + (f"; the pKa is a 25 °C value and the method runs at {system.temperature:g} °C" if far else "")))
    info = {"acid": plan.acid_species, "base": plan.base_species, "pka": plan.pka, "pH": plan.pH,
            "pH_range": [float(ph.min()), float(ph.max())], "acid_stock_mol_l": ca_stock,
            "base_stock_mol_l": cb_stock, "capacity_mol_l_ph": cap, "drift": list(drift) if drift else None,
            "total_mol_l": plan.total}
    return out, info


def _free_lg(ev: Evaluated, name: str, fallback: np.ndarray) -> np.ndarray:
    """log10 γ of a free species in every treated solution (the equilibrium's, where there is one)."""
    st, net = ev.result.state, ev.result.network
    if st is None or net is None or name not in net.names:
        return fallback
    return np.asarray(st.log10_gamma[net.names.index(name)])


def check_protonation(system: System, ev: Evaluated, analyte: Ion, ph: float | None, pop: SamplePopulation,
                      ratio: float, budget_mv: float) -> tuple[list[Check], str]:
    """The analyte's free share in the treated solutions: protonation, ion pairs and complexes.

    With an equilibrium (a buffer, or ions that associate) the free fraction comes from the
    speciation of every treated sample — with the matrix ions the samples declare (aluminium,
    iron, calcium…) at their highest levels — and every standard; otherwise from the
    acid–base pair at the stated pH (activity-corrected Henderson–Hasselbalch).
    """
    step, note = ev.result, ""
    if pop.matrix_ions and ev.free_fraction(analyte.name) is not None:
        in_samples = np.arange(ev.batch.m.shape[1]) < ev.ls.size  # the standards carry no matrix ions
        declared = {k: (ion, np.where(in_samples, m, 0.0))
                    for k, (ion, m) in _declared_molalities(system, ev.batch, pop, ratio).items()}
        step, _aug, note = aux_step(system, ev.batch, declared)
    free = free_fraction_of(step, analyte.name)
    if free is not None:
        return [_free_fraction_check(system, ev, step, analyte, free, budget_mv, note)], ""
    pair = next(((a, b, pka) for (a, b), (pka, _) in acid_table().items() if analyte.name in (a, b)), None)
    if pair is None:
        return [], ""
    acid, base, pka = pair
    if ph is None:
        return [Check(f"{analyte.name} in the measured form", "not assessed", None, None, "",
                      f"{analyte.name} takes part in the {acid}/{base} equilibrium (pKa {pka:g}) and the adjuster "
                      "fixes no pH: add a buffer or state the samples' pH")], ""
    partner = resolve_ion(acid if analyte.name == base else base)
    batch = ev.batch
    step, aug, note = aux_step(system, batch, {partner.name: (partner, np.zeros(batch.m.shape[1]))})
    lg = step.log10_gamma
    ga = float(np.median(lg[aug.names.index(acid)]))
    gb = float(np.median(lg[aug.names.index(base)]))
    log_b_over_a = ph - pka + ga - gb
    frac_base = 1.0 / (1.0 + 10 ** (-log_b_over_a))
    frac = frac_base if analyte.name == base else 1.0 - frac_base
    lo, hi = PARAMETER_WINDOW
    far = not (lo <= system.temperature <= hi)
    status = "ok" if frac >= MEASURED_FORM_LIMIT and not far else "warning"
    detail = (f"as {analyte.name} at pH {ph:.2f} ({acid}/{base}, pKa {pka:g}, activity-corrected)"
              + ("" if frac >= MEASURED_FORM_LIMIT else "; below 99 %: move the pH")
              + (f"; the pKa is a 25 °C value and the method runs at {system.temperature:g} °C" if far else "")
              + f"; {note}")
    return [Check(f"{analyte.name} in the measured form", status, 100.0 * frac, 100.0 * MEASURED_FORM_LIMIT, "%",
                  detail)], note


def _free_fraction_check(system: System, ev: Evaluated, step: Step, analyte: Ion, free: np.ndarray,
                         budget_mv: float, note: str) -> Check:
    """The worst sample's free share of the analyte against the standards', and the bias it leaves in mV."""
    n_s = ev.ls.size
    samples, standards = free[:n_s], free[n_s:]
    k = int(np.argmin(samples))
    assert step.state is not None and step.network is not None
    net, st = step.network, step.state
    j = net.names.index(analyte.name)
    holders = [(float(net.nu[i, j] * st.molality[i, k] / st.totals[j, k]), net.names[i])
               for i in np.flatnonzero(net.nu[:, j] > 0) if i != j]
    holders.sort(reverse=True)
    bound = ", ".join(f"{name} {share:.1%}" for share, name in holders[:3] if share >= 1e-4)
    worst = float(samples[k])
    ref = float(np.median(standards))
    bias_mv = abs(float(nernst_slope(analyte.charge, system.temperature)) * math.log10(ref / worst))
    status = "fail" if bias_mv > budget_mv else ("ok" if worst >= MEASURED_FORM_LIMIT * ref else "warning")
    detail = (f"free {analyte.name} in the worst treated sample, against {ref:.2%} in the standards: a bias of "
              f"{bias_mv:.3g} mV (budget {budget_mv:.3g} mV) the adjuster does not remove"
              + (f"; bound as {bound}" if bound else "")
              + (f"; samples with their declared matrix ions, {note}" if note else "")
              + ("" if status == "ok" else "; the samples bind the analyte more than the standards do: a "
                 "complexing agent or another pH would free it"))
    return Check(f"free fraction of {analyte.name}", status, 100.0 * worst, 100.0 * MEASURED_FORM_LIMIT * ref, "%",
                 detail)
