"""``design_adjuster``: the method developer's job, as a sequence of named steps.

inputs → stock components → standards and counter-ion → samples → system → solubility
ceiling → model → search → the design point → recipe → checks → cautions → figure data.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from typing import Any

import numpy as np

from ..errors import InputError, UnknownSpeciesError
from ..models.resolver import ModelChoice, choice_for
from ..species import Ion, resolve_ion
from ..tables import acid_table
from ..units import MOLAR, parse_amount
from .checks import (
    Check,
    check_budget,
    check_buffer,
    check_interference,
    check_linear_range,
    check_model_range,
    check_precipitation,
    check_protonation,
    check_solubility,
)
from .design import CAUTIONS, AdjusterDesign, RecipeLine
from .inputs import MAX_VOLUME_RATIO, Budget, Buffer, Electrode, SamplePopulation, StockComponent, number
from .solve import BufferPlan, Job, SearchResult, initial_choice, points, search, solubility_ceiling
from .system import Evaluated, System, analyte_levels, counter_ion, log_slope, sample_set

__all__ = ["design_adjuster", "stock_components"]

SOLVE_MODES = ("stock", "ratio", "none")


def _analyte(analyte: object) -> Ion:
    an = analyte if isinstance(analyte, Ion) else resolve_ion(analyte)  # type: ignore[arg-type]
    if an.charge == 0:
        raise InputError(f"analyte {an.name} is neutral; an ion-selective electrode measures an ion")
    return an


def stock_components(stock: object, analyte: Ion) -> list[StockComponent]:
    """The stock as components: a mapping name -> mol/L (or -> {amount, role, ions}), or StockComponents."""
    if isinstance(stock, Mapping):
        comps = []
        for key, value in stock.items():
            if isinstance(value, Mapping):
                extra = set(value) - {"amount", "role", "ions"}
                if extra or "amount" not in value:
                    raise InputError(f"stock component {key!r}: give {{amount, role, ions}}, got keys {sorted(value)}")
                comps.append(StockComponent.of(key, value["amount"], value.get("role"), value.get("ions")))
            else:
                comps.append(StockComponent.of(key, value))
    elif isinstance(stock, Sequence) and not isinstance(stock, str) and all(
            isinstance(c, StockComponent) for c in stock):
        comps = list(stock)
    else:
        raise InputError("stock must be a non-empty mapping of component -> mol/L, or a list of StockComponent")
    if not comps:
        raise InputError("stock must have at least one component")
    names = [c.name for c in comps]
    if len(set(names)) != len(names):
        raise InputError(f"stock components {names} are not all different")
    for c in comps:
        if c.role.startswith("buffer"):
            raise InputError(f"{c.name}: buffer components are given with buffer=Buffer(...), not in the stock")
        if any(ion.name == analyte.name for ion, _ in c.ions):
            raise InputError(f"the analyte {analyte.name} is one of the ISA's ions (in {c.name}); "
                             "an adjuster must not contain the analyte")
    if not any(c.amount > 0 for c in comps):
        raise InputError("every stock amount is zero")
    return comps


def _buffer_components(buffer: Buffer, n_before: int) -> tuple[list[StockComponent], BufferPlan]:
    total = float(buffer.total)
    acid = StockComponent.of(buffer.acid, total / 2)
    base = StockComponent.of(buffer.base, total / 2)
    acid_sp = [ion.name for ion, _ in acid.ions]
    base_sp = [ion.name for ion, _ in base.ions]
    for (a, b), (pka, src) in acid_table().items():
        if a in acid_sp and b in base_sp:
            comps = [StockComponent(acid.name, acid.amount, "buffer-acid", acid.ions, acid.molar_mass, acid.hazards,
                                    acid.salt, acid.liquid_density),
                     StockComponent(base.name, base.amount, "buffer-base", base.ions, base.molar_mass, base.hazards,
                                    base.salt, base.liquid_density)]
            plan = BufferPlan(n_before, n_before + 1, a, b, buffer.pka if buffer.pka is not None else pka, src,
                              buffer.pH, float(buffer.total))
            return comps, plan
    raise InputError(f"{buffer.acid}/{buffer.base} is not a tabulated acid–base pair; use a pair from the acid "
                     "table (pka= overrides its value)")


def _standards(standards: object, an: Ion, an_levels: np.ndarray) -> np.ndarray:
    if standards is None:
        return an_levels.copy()
    if isinstance(standards, str) or not isinstance(standards, Sequence | np.ndarray) or len(standards) == 0:
        raise InputError(f"standards {standards!r} must be a non-empty list of concentrations")
    vals = []
    for v in standards:
        a = parse_amount(v, an, default_basis=MOLAR)
        if a.basis != MOLAR or not 0 < float(a.value) <= 20.0:
            raise InputError(f"standard {v!r} must be a positive concentration per volume (≤ 20 mol/L)")
        vals.append(float(a.value))
    return np.array(sorted(vals))


def _settings(volume_ratio: object, max_ratio: object, solubility_margin: object, temperature: object,
              lowest_temperature: object, solve: str, levels: object, density: object) -> tuple[float, ...]:
    if solve not in SOLVE_MODES:
        raise InputError(f"solve={solve!r}: allowed {', '.join(SOLVE_MODES)}")
    r0 = number(volume_ratio, "volume_ratio", 0.0, MAX_VOLUME_RATIO, lo_open=True)
    rmax = number(max_ratio, "max_ratio", 0.0, MAX_VOLUME_RATIO, lo_open=True)
    margin = number(solubility_margin, "solubility_margin", 0.0, 0.99)
    t = number(temperature, "temperature (°C)", 0.0, 100.0)
    t_low = t if lowest_temperature is None else number(lowest_temperature, "lowest_temperature (°C)", -10.0, 100.0)
    if isinstance(levels, bool) or not isinstance(levels, int) or not 2 <= levels <= 50:
        raise InputError(f"levels {levels!r} must be an integer in 2–50")
    if density not in (None, "water"):
        raise InputError(f"density {density!r} must be None (the model) or 'water'")
    return r0, rmax, margin, t, t_low


def _worst_case(system: System, ev: Evaluated) -> dict[str, Any]:
    ls, lstd = ev.ls[0], ev.lstd[0]
    if ls.max() - lstd.min() >= lstd.max() - ls.min():
        jk = np.unravel_index(np.argmax(ls), ls.shape)
        li = int(np.argmin(lstd))
    else:
        jk = np.unravel_index(np.argmin(ls), ls.shape)
        li = int(np.argmax(lstd))
    return {"sample": system.sample_labels[int(jk[0])], "analyte": float(system.an_levels[int(jk[1])]),
            "standard": float(system.std_levels[li])}


def _recipe(system: System, amounts: np.ndarray) -> tuple[RecipeLine, ...]:
    lines = []
    for c, a in zip(system.components, amounts, strict=True):
        g = float(a) * c.molar_mass
        ml = g / c.liquid_density if c.liquid_density else None
        lines.append(RecipeLine(c.name, c.role, float(a), g, ml, c.liquid_density))
    return tuple(lines)


def _cautions(system: System) -> tuple[str, ...]:
    out = [CAUTIONS["general"]]
    for c in system.components:
        for h in c.hazards:
            text = CAUTIONS.get(h)
            if text and text.format(name=c.name) not in out:
                out.append(text.format(name=c.name))
    out.append(CAUTIONS["regulatory"])
    return tuple(out)


def _sample_profile(system: System, ev: Evaluated, slope: float) -> dict[str, Any]:
    ls, lstd = ev.ls[0], ev.lstd[0]
    err = np.maximum(np.abs(ls - lstd.min()), np.abs(ls - lstd.max())).max(axis=1) * slope
    return {"labels": list(system.sample_labels), "ionic_strength": system.sample_ionic.tolist(),
            "error_mv": err.tolist(), "gamma_treated": np.power(10.0, ls[:, 0]).tolist(),
            "gamma_standards": np.power(10.0, lstd).tolist()}


def _scan_for_figure(system: System, job: Job, result: SearchResult, slope: float) -> dict[str, Any]:
    scan = dict(result.scan)
    if not scan:  # an evaluated design: show the neighbourhood of the given stock
        grid = np.geomspace(0.01, 10.0, 41)
        j2 = Job("stock", job.ratio, job.max_ratio, job.base_amounts, job.budget_mv, job.slope, job.buffer,
                 job.requested, job.fallback, math.inf)
        try:
            ev = system.evaluate(*points(system, j2, grid))
        except InputError:  # the density model leaves its range far above the given stock
            return {}
        scan = {"x": grid, "worst_mv": ev.worst * slope, "valid": np.ones(grid.size, dtype=bool), "chosen": 1.0}
    total = sum(a for c, a in zip(system.components, job.base_amounts, strict=True) if c.role == "inert")
    unit = 1.0 if job.solve == "ratio" else total
    out = {"x": (np.asarray(scan["x"]) * unit).tolist(), "worst_mv": np.asarray(scan["worst_mv"]).tolist(),
           "valid": np.asarray(scan["valid"], dtype=bool).tolist(), "chosen": float(scan["chosen"]) * unit,
           "label": ("volume ratio (ISA per sample)" if job.solve == "ratio"
                     else "stock strength, sum of the inert salts / mol L$^{-1}$"),
           "solubility_limit": (job.max_scale * unit if job.solve == "stock" and math.isfinite(job.max_scale)
                                else None)}
    return out


def _checks(system: System, ev: Evaluated, result: SearchResult, an: Ion, samples: SamplePopulation,
            electrode: Electrode, plan: BufferPlan | None, job: Job, t_low: float, margin: float,
            linear: tuple[float, float] | None, worst: tuple[float, float], declared: tuple[str, ...]
            ) -> tuple[list[Check], dict[str, Any] | None]:
    checks = check_solubility(system, result.amounts, t_low, margin)
    checks.append(check_model_range(system, ev))
    checks.append(check_budget(worst[0], worst[1], job.budget_mv))
    if linear is not None:
        checks.append(check_linear_range(system, result.ratio, linear))
    checks += check_precipitation(system, ev, an, samples, result.ratio)
    buffer_info = None
    if plan is not None:
        more, buffer_info = check_buffer(system, ev, plan, result.amounts, result.ratio, samples.acidity)
        checks += more
    ph = plan.pH if plan is not None else samples.ph
    checks += check_interference(system, ev, an, electrode, samples, result.ratio, job.budget_mv, ph, declared)
    checks += check_protonation(system, ev, an, ph, samples, result.ratio, job.budget_mv)[0]
    return checks, buffer_info


def design_adjuster(
    analyte: str | Ion,
    stock: Mapping[str, Any] | Sequence[StockComponent],
    *,
    samples: SamplePopulation | Any,
    analyte_range: tuple[Any, Any],
    budget: Budget,
    volume_ratio: float = 0.02,
    solve: str = "stock",
    buffer: Buffer | None = None,
    electrode: Electrode | None = None,
    standards: Sequence[Any] | None = None,
    standard_salt: str | None = None,
    model: str = "auto",
    missing: str = "error",
    temperature: float = 25.0,
    lowest_temperature: float | None = None,
    solubility_margin: float = 0.1,
    max_ratio: float = 1.0,
    density: str | None = None,
    levels: int = 7,
    name: str = "",
    equilibrium: bool | None = None,
    complexes: Sequence[Any] | None = None,
    **model_options: Any,
) -> AdjusterDesign:
    """Design (or evaluate) an ionic strength adjuster for an ion-selective electrode method.

    Every sample of the population, at every analyte level, and every calibration standard
    are mixed with the adjuster; the largest ``|ΔE| = (S/|z|)·|log10(γ_sample/γ_standard)|``
    over samples × levels × standards is held against the budget. The smallest stock
    strength (``solve="stock"``) or volume ratio (``solve="ratio"``) that meets it is
    found by bracketing on a grid and refining the first crossing (the error is not
    monotonic everywhere), or a given design is evaluated (``solve="none"``). The design
    is then checked: solubility at the coldest temperature, the model's range, the error
    budget, the electrode's linear range, precipitation (every solid with a solubility
    product whose ions meet), interference (every ion of the analyte's sign, "not
    assessed" without a coefficient), the buffer's pH and drift, and the analyte's
    measured form.

    Parameters
    ----------
    analyte : str or Ion
        The measured ion, e.g. "NO3-", "F-", "Ca^2+".
    stock : mapping or list of StockComponent
        Component -> mol/L (salt formulas, hydrates as weighed, neutral reagents), or
        -> {"amount": …, "role": …, "ions": {…}} for custom components; or
        :class:`StockComponent` objects. Inert salts are scaled when ``solve="stock"``;
        ``role="fixed"`` components (complexing agents) are kept as given.
    samples : SamplePopulation or Solution
        The untreated samples (a Solution is taken as explicit matrices).
    analyte_range : (low, high)
        The analyte in the untreated samples, mol/L or unit strings ("0.5 mg/L as N").
    budget : Budget
        ``Budget(mv=…)`` or ``Budget(percent=…)``.
    volume_ratio : float
        Stock volume per sample volume (0.02 = 2 mL per 100 mL), 0 < ratio ≤ 10; the start
        for ``solve="ratio"``.
    solve : {"stock", "ratio", "none"}
        What to find: the smallest stock strength, the smallest volume ratio, or nothing
        (evaluate the design as given).
    buffer : Buffer, optional
        A pH buffer pair in the stock, solved for the target pH at each design point.
    electrode : Electrode, optional
        Linear range and this electrode's selectivity coefficients.
    standards : sequence, optional
        Calibration standards (mol/L or unit strings); default: ``levels`` across the range.
    standard_salt : str, optional
        The analyte's salt in the standards (its other ion is the counter-ion).
    model : str
        Activity model or "auto"; resolved once and stored in the design with its reason.
    missing : str
        "error", "zero", or a fallback model name, when a model lacks parameters.
    temperature, lowest_temperature : float
        °C of measurement, and the coldest the stock will be stored at (solubility).
    solubility_margin : float
        Keep each inert salt below (1 − margin) of saturation (default 10 %).
    max_ratio : float
        Largest ratio ``solve="ratio"`` may use (default 1, equal volumes).
    density : None or "water"
        The density model (apparent molar volumes), or ρ_w for components without volumes.
    levels : int
        Analyte levels (and default standards) across the range.
    name : str
        A name for the report.
    equilibrium : bool, optional
        Speciate the treated solutions (ion pairs, complexes, acid–base) so that the error is
        on the free analyte the electrode reads: None (default) where the ions associate, or
        always when the stock holds a buffer; True or False to force it.
    complexes : sequence of Complex, optional
        Species to add to the equilibrium (a complexing agent and its protonation, say).
    **model_options
        Passed to the model (sizes, davies_coefficient, …).

    Returns
    -------
    AdjusterDesign
        The stock and ratio, the worst residual error (mV and %) and where it occurs, the
        model and its reason, every check with its status, and the recipe.

    Raises
    ------
    InfeasibleDesignError
        No design within solubility, the ratio limit and model validity meets the budget
        (the message names the binding constraint and the best reachable error).
    InputError, UnknownSpeciesError, MissingParameterError
        Bad inputs, named.

    Examples
    --------
    >>> import ionact as ia
    >>> d = ia.design_adjuster("NO3-", {"(NH4)2SO4": 2.0},
    ...                        samples=ia.SamplePopulation(ionic_strength=(0.0, 0.02)),
    ...                        analyte_range=(1e-5, 1e-3), budget=ia.Budget(mv=1.0), solve="none",
    ...                        model="davies")
    >>> 0.2 < d.worst_error_mv < 0.4, d.status
    (True, 'ok')
    """
    an = _analyte(analyte)
    r0, rmax, margin, t, t_low = _settings(volume_ratio, max_ratio, solubility_margin, temperature,
                                           lowest_temperature, solve, levels, density)
    if not isinstance(budget, Budget):
        raise InputError(f"budget must be ionact.Budget(mv=…) or Budget(percent=…), got {budget!r}")
    pop = samples if isinstance(samples, SamplePopulation) else SamplePopulation(matrices=samples)
    electrode = electrode if electrode is not None else Electrode()
    if not isinstance(electrode, Electrode):
        raise InputError(f"electrode must be ionact.Electrode(...), got {type(electrode).__name__}")
    if buffer is not None and not isinstance(buffer, Buffer):
        raise InputError(f"buffer must be ionact.Buffer(...), got {type(buffer).__name__}")
    requested, opts, fallback = choice_for(model, missing=missing, **model_options)
    comps = stock_components(stock, an)
    plan = None
    if buffer is not None:
        more, plan = _buffer_components(buffer, len(comps))
        comps += more
    counter = counter_ion(an, standard_salt)
    an_levels = analyte_levels(analyte_range, an, "analyte_range", levels)
    std_levels = _standards(standards, an, an_levels)
    sset = sample_set(pop, t, an)
    provisional = ModelChoice(requested if requested != "auto" else "davies", "davies", "provisional", opts)
    if equilibrium is not None and not isinstance(equilibrium, bool):
        raise InputError(f"equilibrium {equilibrium!r} must be True, False or None")
    eq = True if (equilibrium is None and buffer is not None) else equilibrium
    system = System.build(an, counter, comps, sset, an_levels, std_levels, t, density, provisional, eq,
                          tuple(complexes) if complexes else None)
    base = np.array([c.amount for c in comps])
    max_scale = solubility_ceiling(system.components, base, t, density, t_low, margin) if solve == "stock" else math.inf
    slope = log_slope(an.charge, t)
    job = Job(solve, r0, rmax, base, budget.in_mv(an.charge, t), slope, plan, requested, fallback, max_scale)
    if solve == "none":
        _refuse_supersaturated(system, base, t_low)
    system = system.with_choice(initial_choice(system, job))
    result = search(system, job)
    return _assemble(result, job, an, counter, pop, electrode, plan, budget, sset, t_low, margin, name)


def _refuse_supersaturated(system: System, amounts: np.ndarray, t_low: float) -> None:
    from ..errors import InfeasibleDesignError
    from .solve import stock_saturation

    for c, (m, sat) in stock_saturation(system.components, amounts, system.temperature, system.density,
                                        t_low).items():
        if sat is not None and m > sat:
            raise InfeasibleDesignError(f"the stock is above saturation: {c} at {m:.4g} mol/kg water exceeds its "
                                        f"solubility {sat:.4g} mol/kg at {t_low:g} °C")


def _assemble(result: SearchResult, job: Job, an: Ion, counter: Ion, pop: SamplePopulation, electrode: Electrode,
              plan: BufferPlan | None, budget: Budget, sset: Any, t_low: float, margin: float,
              name: str) -> AdjusterDesign:
    system = result.system
    ev = system.evaluate(result.amounts[:, None], np.array([result.ratio]))
    worst_log = float(ev.worst[0])
    wmv, wpct = worst_log * job.slope, (10**worst_log - 1.0) * 100.0
    linear = None
    if electrode.linear_range is not None:
        lv = analyte_levels(electrode.linear_range, an, "linear_range", 2)
        linear = (float(lv[0]), float(lv[-1]))
    declared = tuple(pop.matrices.ions) if pop.matrices is not None else ()
    checks, buffer_info = _checks(system, ev, result, an, pop, electrode, plan, job, t_low, margin, linear,
                                  (wmv, wpct), declared)
    notes = list(sset.notes) + list(result.notes) + list(ev.result.notes)
    if system.choice.reason != "requested":
        notes.append(f"model {system.choice.name}: {system.choice.reason}")
    stock_ions = {nm: float(v) for nm, v in zip(system.names, system.stock_ions(result.amounts[:, None])[:, 0],
                                                 strict=True) if v > 0}
    species = {i.name: i.to_dict() for i in system.ions if not i.tabulated}
    return AdjusterDesign(
        name=name, analyte=an.name, counter_ion=counter.name, recipe=_recipe(system, result.amounts),
        volume_ratio=result.ratio, solve=job.solve, temperature=system.temperature, budget=budget,
        budget_mv=job.budget_mv, worst_error_mv=wmv, worst_error_percent=wpct, worst_case=_worst_case(system, ev),
        final_ionic_strength=(float(ev.ionic_min[0]), float(ev.ionic_max[0])), envelope=sset.envelope,
        analyte_range=(float(system.an_levels[0]), float(system.an_levels[-1])),
        standards=tuple(float(x) for x in system.std_levels), linear_range=linear,
        selectivity=dict(electrode.selectivity), model=system.choice, checks=tuple(checks), notes=tuple(notes),
        cautions=_cautions(system), stock_ions=stock_ions, species=species, background=pop.background,
        density=system.density, buffer=buffer_info, samples=pop.to_dict(),
        scan=_scan_for_figure(system, job, result, job.slope), gamma_profile=_sample_profile(system, ev, job.slope),
        equilibrium=system.equilibrium, complexes=_kept_complexes(system),
    )


def _kept_complexes(system: System) -> tuple[dict[str, Any], ...]:
    """The given complexes a design file can carry: those whose components are tabulated or
    among the design's ions (one formed from an ion of a component left out of the stock
    cannot form, and the file could not name that ion)."""
    names = set(system.names)
    out = []
    for c in system.species or ():
        if all(k in names or _tabulated(k) for k in c.components):
            out.append(c.to_dict())
    return tuple(out)


def _tabulated(name: str) -> bool:
    try:
        return resolve_ion(name).tabulated
    except UnknownSpeciesError:
        return False
