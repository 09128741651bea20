"""Activity ↔ concentration, solved self-consistently with the matrix.

An electrode calibrated in activity (or a pX reading) gives a; the concentration that
produces it depends on γ, which depends on the ionic strength the analyte itself adds.
The analyte is taken to be present with an electroneutral counter-ion (default Cl- for a
cation, Na+ for an anion) in a background ``matrix`` (a :class:`~ionact.Solution`, or
pure water). The molality m solves

    ln m + ln γ(m) = ln a

by a vectorised, safeguarded Newton iteration on ln m (no Python loop over samples),
converged to a relative 1e-12 in m; the smallest root is taken, and where no molality
under the model's formula reaches the activity an error says so and gives the largest
reachable activity.
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass
from typing import Any

import numpy as np

from ._frozen import Record
from .constants import LN10
from .equilibrium import Step, species_step
from .errors import InputError, ValidityRangeWarning, warn_range
from .models.registry import Batch
from .models.resolver import ModelChoice, choice_for
from .solution import Solution
from .species import Ion, Salt, resolve_ion
from .units import MOLAL, Amount, convert_amount, parse_amount

__all__ = [
    "ActivityConversion",
    "default_counter_ion",
    "concentration_from_activity",
    "activity_from_concentration",
    "standard_for_activity",
    "activity_from_px",
    "px_from_activity",
]

MAX_IONIC_STRENGTH = 10.0  # mol/kg: the search for a root stops here
_TOL = 1e-12


def default_counter_ion(ion: Ion, counter_ion: Any = None) -> Ion | None:
    """The ion an analyte is added with: the one given (of the opposite charge), else Cl- for
    a cation and Na+ for an anion; None for a neutral species."""
    return _counter(ion, counter_ion)


def _counter(ion: Ion, counter_ion) -> Ion | None:
    if ion.charge == 0:
        if counter_ion is not None:
            raise InputError(f"{ion.name} is neutral and takes no counter-ion (got {counter_ion!r})")
        return None
    if counter_ion is None:
        counter_ion = "Cl-" if ion.charge > 0 else "Na+"
    c = resolve_ion(counter_ion)
    if c.charge * ion.charge >= 0:
        raise InputError(
            f"counter-ion {c.name} has charge {c.charge:+d}, the same sign as (or neutral with) {ion.name}; "
            f"it must carry the opposite charge"
        )
    return c


@dataclass(frozen=True)
class _Problem:
    names: tuple[str, ...]
    ions: tuple[Ion, ...]
    z: np.ndarray
    base: np.ndarray  # (n, N) background molalities
    stoich: np.ndarray  # (n,) molality added per unit analyte molality
    k: int  # analyte index
    t: np.ndarray  # (N,)
    shape: tuple[int, ...]
    equilibrium: bool | None = None
    ph: np.ndarray | None = None  # (N,) held pH, or None
    species: tuple[Any, ...] | None = None


def _problem(ion: Ion, counter: Ion | None, matrix: Solution | None, shape_in, temperature,
             equilibrium: bool | None = None, pH: Any = None, species: Any = None) -> _Problem:
    if matrix is not None:
        if not isinstance(matrix, Solution):
            raise InputError(f"matrix must be a Solution or None, got {type(matrix).__name__}")
        if ion.name in matrix.ions and np.any(np.asarray(matrix.molality(ion.name)) > 0):
            raise InputError(
                f"the matrix already contains the analyte {ion.name}; give the background without it"
            )
        names = list(matrix.ions)
        ions = [matrix.ion(n) for n in names]
        shape = np.broadcast_shapes(matrix.shape, shape_in)
        m_arr = np.asarray(matrix.molality_array).reshape(
            (len(names),) + (1,) * (len(shape) - len(matrix.shape)) + tuple(matrix.shape))
        base_m = np.broadcast_to(m_arr, (len(names), *shape))  # a single matrix serves every analyte level
        t = np.broadcast_to(np.asarray(matrix.temperature, dtype=float), shape)
    else:
        names, ions, shape = [], [], tuple(shape_in)
        t_arr = np.asarray(25.0 if temperature is None else temperature, dtype=float)
        shape = np.broadcast_shapes(shape, t_arr.shape)
        base_m = np.zeros((0, *shape))
        t = np.broadcast_to(t_arr, shape)
    for extra in (ion, counter):
        if extra is not None and extra.name not in names:
            names.append(extra.name)
            ions.append(extra)
    n = len(names)
    size = int(np.prod(shape))
    base = np.zeros((n, size))
    if base_m.shape[0]:
        base[: base_m.shape[0]] = np.asarray(base_m).reshape(base_m.shape[0], size)
    stoich = np.zeros(n)
    k = names.index(ion.name)
    stoich[k] = 1.0
    if counter is not None:
        stoich[names.index(counter.name)] += abs(ion.charge) / abs(counter.charge)
    z = np.array([i.charge for i in ions], dtype=float)
    from .equilibrium import held_ph

    ph = held_ph(pH, shape)
    return _Problem(tuple(names), tuple(ions), z, base, stoich, k, np.asarray(t, dtype=float).reshape(size), shape,
                    equilibrium, ph, None if species is None else tuple(species))


def _batch(p: _Problem, m_analyte: np.ndarray, rows: np.ndarray | None = None) -> Batch:
    base = p.base if rows is None else p.base[:, rows]
    t = p.t if rows is None else p.t[rows]
    m = base + p.stoich[:, None] * m_analyte[None, :]
    return Batch.of(p.ions, m, t)


def _step(p: _Problem, choice: ModelChoice | None, m_analyte: np.ndarray, rows=None, *, model: str = "auto",
          opts: Any = None, fallback: str | None = None, checks: bool = False, batch: Batch | None = None) -> Step:
    """Steps 2–3 of the path (speciation where it applies, then the model) for the problem's batch
    (``batch``, when the caller has built it for the same molalities)."""
    b = batch if batch is not None else _batch(p, m_analyte, rows)
    ph = None if p.ph is None else (p.ph if rows is None else p.ph[rows])
    if choice is not None:
        model, opts, fallback = choice.requested, choice.options, choice.fallback
    return species_step(p.ions, b.m, b.t, model, opts, fallback, equilibrium=p.equilibrium, ph=ph,
                        species=p.species, choice=choice, checks=checks, batch=b)


def _ln_gamma(p: _Problem, choice: ModelChoice, m_analyte: np.ndarray, rows=None) -> np.ndarray:
    """ln of the analyte's stoichiometric γ: a(free analyte) / m(total analyte)."""
    return _step(p, choice, m_analyte, rows).log10_gamma[p.k] * LN10


def _choose(p: _Problem, model: str, opts, fallback, m_guess: np.ndarray) -> ModelChoice:
    """The model for the problem: "auto" chooses on the whole batch; a named model (or its
    fallback) depends on the species alone, so one sample settles it."""
    if model != "auto":
        return _step(p, None, m_guess[:1], np.array([0]), model=model, opts=opts, fallback=fallback).choice
    return _step(p, None, m_guess, model=model, opts=opts, fallback=fallback).choice


def _solve(p: _Problem, choice: ModelChoice, ln_a: np.ndarray):
    """Smallest root of x + ln γ(e^x) − ln a = 0 for every sample; returns x and a status mask.

    Models whose γ depends on the charge and I alone, on free ions, take Newton's method with
    the analytic derivative (:func:`_solve_by_charge`); every other case, and any sample that
    fast path leaves unconverged, the general safeguarded Newton–secant below through the
    whole evaluation path.
    """
    fast = _solve_by_charge(p, choice, ln_a)
    if fast is not None and bool(np.all(fast[1])):
        return fast
    return _solve_general(p, choice, ln_a)


def _solve_by_charge(p: _Problem, choice: ModelChoice, ln_a: np.ndarray) -> tuple[np.ndarray, np.ndarray] | None:
    """Newton on x = ln m with the analytic derivative, for free ions under a model whose γ
    depends on the charge alone: I = I_matrix + q·m, ln γ = ln10·z²·f(I), F′ = 1 + ln10·z²·f′(I)·q·m.
    None where it does not apply (a neutral analyte, another model, or ions that react)."""
    z2 = float(p.z[p.k] ** 2)
    if not choice.info.charge_only or z2 == 0:
        return None
    if _step(p, choice, np.exp(ln_a[:1]), np.array([0])).state is not None:
        return None  # the analyte or its matrix speciates: the general path
    from .models.debye_huckel import unit_log_gamma
    from .water import dh_a_array

    i0 = 0.5 * (p.z**2) @ p.base
    q = 0.5 * float((p.z**2) @ p.stoich)
    x_cap = math.log(MAX_IONIC_STRENGTH / (q or 1.0))
    a = dh_a_array(p.t)
    c = choice.options.davies_coefficient
    k = LN10 * z2
    x = ln_a.copy()
    for _ in range(60):
        m = np.exp(x)
        f, df = unit_log_gamma(choice.name, i0 + q * m, a, c)
        res = x + k * f - ln_a
        d = k * q * m * df
        d += 1.0
        if not float(d.min(initial=np.inf)) > 0.05:
            return None  # near a turning point of a·γ: the safeguarded general path
        res /= d
        x -= res  # the last Newton step is the most accurate iterate
        if float(np.abs(res).max(initial=0.0)) < _TOL:
            break
    if float(x.max(initial=-np.inf)) > x_cap:
        return None
    f, _ = unit_log_gamma(choice.name, i0 + q * np.exp(x), a, c)
    return x, np.abs(x + k * f - ln_a) < 1e-9


def _solve_general(p: _Problem, choice: ModelChoice, ln_a: np.ndarray):
    """The safeguarded Newton–secant root finder through the whole evaluation path."""
    # cap: the analyte alone (with its counter-ion) would reach MAX_IONIC_STRENGTH
    i_per_m = 0.5 * float((p.z**2) @ p.stoich) or 1.0
    x_cap = math.log(MAX_IONIC_STRENGTH / i_per_m)
    x = ln_a.copy()
    lo = np.full_like(x, -np.inf)
    hi = np.full_like(x, np.inf)
    done = np.zeros(x.shape, dtype=bool)
    h = 1e-6
    x_prev = np.full_like(x, np.nan)  # the previous iterate and residual: a secant slope, one γ evaluation a step
    f_prev = np.full_like(x, np.nan)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityRangeWarning)
        for _ in range(100):
            act = ~done
            if not np.any(act):
                break
            xa = x[act]
            rows = np.flatnonzero(act)
            f = xa + _ln_gamma(p, choice, np.exp(xa), rows) - ln_a[act]
            dxp = xa - x_prev[act]
            secant = np.isfinite(dxp) & (np.abs(dxp) > 1e-9)
            if np.all(secant):
                d = (f - f_prev[act]) / dxp
            else:  # a forward difference where no usable previous step exists
                f2 = (xa + h) + _ln_gamma(p, choice, np.exp(xa + h), rows) - ln_a[act]
                d = np.where(secant, (f - f_prev[act]) / np.where(secant, dxp, 1.0), (f2 - f) / h)
            x_prev[act], f_prev[act] = xa, f
            lo_a, hi_a = lo[act], hi[act]
            lo_a = np.where(f < 0, np.maximum(lo_a, xa), lo_a)
            hi_a = np.where(f > 0, np.minimum(hi_a, xa), hi_a)
            step = np.where(d > 0.05, -f / np.where(d > 0.05, d, 1.0), -np.sign(f) * LN10)
            step = np.clip(step, -2 * LN10, 2 * LN10)
            xn = xa + step
            bracketed = np.isfinite(lo_a) & np.isfinite(hi_a)
            outside = bracketed & ((xn <= lo_a) | (xn >= hi_a))
            xn = np.where(outside, 0.5 * (lo_a + hi_a), xn)
            xn = np.minimum(xn, x_cap)
            conv = (np.abs(xn - xa) < _TOL) | (np.abs(f) < 1e-14)
            stuck = (xa >= x_cap) & (f < 0)
            x[act] = xn  # converged samples keep their last Newton step, the most accurate iterate
            lo[act], hi[act] = lo_a, hi_a
            idx = np.flatnonzero(act)
            done[idx[conv | stuck]] = True
        final = x + _ln_gamma(p, choice, np.exp(x)) - ln_a
    ok = np.abs(final) < 1e-9
    return x, ok


def _max_reachable(p: _Problem, choice: ModelChoice, row: int) -> float:
    """Largest activity the model reaches for one sample, scanning molality up to the cap."""
    i_per_m = 0.5 * float((p.z**2) @ p.stoich) or 1.0
    grid = np.geomspace(1e-12, MAX_IONIC_STRENGTH / i_per_m, 400)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityRangeWarning)
        lng = _ln_gamma(p, choice, grid, np.full(grid.size, row))
    return float(np.max(grid * np.exp(lng)))


@dataclass(frozen=True, repr=False)
class ActivityConversion(Record):
    """The analyte's molality, activity and γ in its matrix, and how they were obtained.

    Attributes
    ----------
    analyte, counter_ion : str
        The analyte and the counter-ion assumed to accompany it (None for a neutral).
    molality : float or ndarray
        Analyte molality, mol/kg.
    activity : float or ndarray
        Molal-scale activity a = γ m.
    gamma : float or ndarray
        Stoichiometric: a(free analyte) / m(total analyte); the free ion's own γ when nothing binds it.
    ionic_strength : float or ndarray
        Of the final solution (matrix + analyte + counter-ion, species after equilibrium), mol/kg.
    free_fraction : float or ndarray
        The share of the total analyte that is free (1 when nothing binds it).
    pH : float or ndarray
        Of the final solution when it was speciated (NaN otherwise).
    model, reason : str
    solution : Solution
        The final solution, for further conversions (molar units need its density model).
    """

    analyte: str
    counter_ion: str | None
    molality: float | np.ndarray
    activity: float | np.ndarray
    gamma: float | np.ndarray
    ionic_strength: float | np.ndarray
    model: str
    reason: str
    solution: Solution
    choice: ModelChoice | None = None
    notes: tuple[str, ...] = ()
    free_fraction: float | np.ndarray = 1.0
    pH: float | np.ndarray = float("nan")

    def concentration(self, unit: str = "mol/kg"):
        """The analyte concentration in ``unit`` (mol/kg, mmol/kg, mol/L, mmol/L, mg/L, µg/L,
        meq/L, "mg/L as N", …); molar units use the final solution's density model."""
        w = None if unit in ("mol/kg", "mmol/kg") else self.solution.water_per_litre
        return convert_amount(self.molality, MOLAL, unit, self.solution.ion(self.analyte), water_per_litre=w)


def _out(x, shape):
    x = np.asarray(x).reshape(shape)
    return float(x) if x.ndim == 0 else x


def _final(ion, counter, p, m_an, choice: ModelChoice, density=None) -> ActivityConversion:
    batch = _batch(p, m_an)
    step = _step(p, choice, m_an, checks=True, batch=batch)
    for problem in step.violations:
        warn_range(str(problem))
    gamma = np.exp(LN10 * step.log10_gamma[p.k])
    free = np.ones(batch.m.shape[1])
    ionic = batch.ionic
    ph = np.full(batch.m.shape[1], np.nan)
    if step.state is not None and step.network is not None:
        i = step.network.names.index(ion.name)
        with np.errstate(invalid="ignore", divide="ignore"):
            free = np.where(step.state.totals[i] > 0, step.state.molality[i] / step.state.totals[i], 1.0)
        ionic = step.state.ionic
        ph = -(step.state.log10_gamma[step.network.h] + np.log10(step.state.molality[step.network.h]))
    sol = Solution.from_arrays(p.ions, batch.m.reshape(len(p.names), *p.shape), p.t.reshape(p.shape),
                               density=density)
    return ActivityConversion(ion.name, counter.name if counter else None, _out(m_an, p.shape),
                              _out(gamma * m_an, p.shape), _out(gamma, p.shape), _out(ionic, p.shape),
                              choice.name, choice.reason, sol, choice, tuple(step.notes), _out(free, p.shape),
                              _out(ph, p.shape))


def concentration_from_activity(analyte, activity, *, matrix: Solution | None = None, counter_ion=None,
                                model: str = "auto", temperature=None, missing: str = "error",
                                equilibrium: bool | None = None, pH: Any = None, species: Any = None,
                                density: Any = None, **model_options) -> ActivityConversion:
    """The analyte concentration that gives a measured activity in a matrix.

    Parameters
    ----------
    analyte : str or Ion
        The analyte, e.g. "F-", "NO3-", "Ca^2+".
    activity : float or array_like
        Molal-scale activity (> 0); arrays give a batch (broadcast against a batch matrix).
    matrix : Solution, optional
        The background without the analyte; pure water when omitted.
    counter_ion : str, optional
        The ion that accompanies the analyte (default Cl- for a cation, Na+ for an anion);
        recorded in the result.
    model : str
        Activity model name, or "auto" (chosen for the converged ionic strength).
    temperature : float, optional
        °C; the matrix's own temperature when a matrix is given, else 25 °C.
    missing : str
        "error", "zero", or a fallback model name, when the model lacks a parameter.
    equilibrium : bool, optional
        Speciate the final solution (True, False, or None: where its ions associate); the
        activity is then that of the *free* analyte, and the result gives its free fraction.
    pH : float, optional
        Held during speciation (default: solved from the proton balance).
    species : iterable of Complex, optional
        Extra species (complexing agents) for the equilibrium.
    density : None, float or "water", optional
        How the result's molality becomes mol/L: the density model (default), a density
        in kg/L, or pure water's.
    **model_options
        Passed to the model (sizes, davies_coefficient, …).

    Returns
    -------
    ActivityConversion
        ``.molality`` (mol/kg), ``.concentration(unit)`` for other units, γ, I, model.

    Raises
    ------
    InputError
        Activity ≤ 0 or not finite, a counter-ion of the wrong sign, an analyte already in
        the matrix, or an activity no concentration reaches under the model (the message
        gives the largest reachable activity).

    References
    ----------
    IUPAC, *Quantities, Units and Symbols in Physical Chemistry*, 3rd ed. (2007), §2.11
    (activity on the molality scale); the activity models in :mod:`ionact.models`.

    Examples
    --------
    >>> import ionact as ia
    >>> r = ia.concentration_from_activity("Na+", 0.00810386, matrix=ia.Solution.from_salts({"KCl": 0.05}),
    ...                                    model="davies")
    >>> round(r.molality, 5), r.counter_ion
    (0.01, 'Cl-')
    """
    an = resolve_ion(analyte)
    counter = _counter(an, counter_ion)
    a = np.asarray(activity, dtype=float) if not isinstance(activity, str) else None
    if a is None:
        raise InputError(f"activity {activity!r} must be a number (molal-scale activity), not text")
    if not np.all(np.isfinite(a)) or np.any(a <= 0):
        bad = a[~(np.isfinite(a) & (a > 0))].flat[0]
        raise InputError(f"activity {float(bad):g} of {an.name} is not positive and finite; allowed: > 0")
    if (matrix is not None and temperature is not None
            and np.any(np.asarray(temperature) != np.asarray(matrix.temperature))):
        raise InputError(f"temperature {temperature!r} differs from the matrix's {matrix.temperature!r}; "
                         "set the temperature on the matrix")
    name, opts, fallback = choice_for(model, missing=missing, **model_options)
    p = _problem(an, counter, matrix, a.shape, temperature, equilibrium, pH, species)
    ln_a = np.log(np.broadcast_to(a, p.shape).reshape(-1))
    choice = _choose(p, name, opts, fallback, np.exp(ln_a))
    x, ok = _solve(p, choice, ln_a)
    if name == "auto":  # re-select on the converged ionic strength
        choice2 = _choose(p, "auto", opts, fallback, np.exp(x))
        if choice2.name != choice.name:
            choice = choice2
            x, ok = _solve(p, choice, ln_a)
    if not np.all(ok):
        rows = np.flatnonzero(~ok)
        best = _max_reachable(p, choice, int(rows[0]))
        where = f" (row {int(rows[0])})" if p.shape else ""
        raise InputError(
            f"no concentration of {an.name} gives activity {float(np.exp(ln_a[rows[0]])):.6g}{where} under model "
            f"{choice.name}: the largest reachable activity is {best:.4g} (up to I = {MAX_IONIC_STRENGTH:g} mol/kg)"
        )
    return _final(an, counter, p, np.exp(x), choice, density)


def activity_from_concentration(analyte, amount, *, matrix: Solution | None = None, counter_ion=None,
                                model: str = "auto", temperature=None, density=None, missing: str = "error",
                                equilibrium: bool | None = None, pH: Any = None, species: Any = None,
                                **model_options) -> ActivityConversion:
    """The activity an electrode will see for a given analyte concentration in a matrix.

    Parameters
    ----------
    analyte : str or Ion
        The analyte, e.g. "F-", "NO3-", "Ca^2+".
    amount : float, array_like, str or Quantity
        Bare numbers are mol/kg; strings such as "0.5 mmol/L", "19 mg/L", "10 mg/L as N".
        Molar amounts are converted with the density model of the final solution.
    matrix : Solution, optional
        The background without the analyte; pure water when omitted.
    counter_ion : str, optional
        The ion that accompanies the analyte (default Cl- for a cation, Na+ for an anion).
    model : str
        Activity model name, or "auto".
    temperature : float, optional
        °C; the matrix's own temperature when a matrix is given, else 25 °C.
    density : None, float or "water", optional
        How molar amounts become molal: the density model (default), a density in kg/L, or
        pure water's.
    missing : str
        "error", "zero", or a fallback model name, when the model lacks a parameter.
    equilibrium : bool, optional
        Speciate the final solution (True, False, or None: where its ions associate); the
        activity is then that of the *free* analyte.
    pH : float, optional
        Held during speciation (default: solved from the proton balance).
    species : iterable of Complex, optional
        Extra species (complexing agents) for the equilibrium.
    **model_options
        Passed to the model (sizes, davies_coefficient, …).

    Returns
    -------
    ActivityConversion
        ``.activity`` (molal scale), γ, molality (mol/kg), ionic strength, free fraction,
        model and notes.

    Raises
    ------
    InputError
        A negative or non-finite amount, a counter-ion of the wrong sign, an analyte already
        in the matrix.
    UnitError
        An amount with an unknown unit.

    References
    ----------
    IUPAC, *Quantities, Units and Symbols in Physical Chemistry*, 3rd ed. (2007), §2.11
    (activity on the molality scale).

    Examples
    --------
    >>> import ionact as ia
    >>> r = ia.activity_from_concentration("Na+", 0.01, matrix=ia.Solution.from_salts({"KCl": 0.05}),
    ...                                    model="davies")
    >>> round(r.activity, 6), round(r.gamma, 5)
    (0.008104, 0.81039)
    """
    an = resolve_ion(analyte)
    counter = _counter(an, counter_ion)
    amt = amount if isinstance(amount, Amount) else parse_amount(amount, an)
    value = np.asarray(amt.value, dtype=float)
    if amt.basis != MOLAL:
        parts = {}
        if matrix is not None:
            if not isinstance(matrix, Solution):
                raise InputError(f"matrix must be a Solution or None, got {type(matrix).__name__}")
            # the matrix keeps its molalities; the analyte salt is added on the molar basis
            for name, mm in matrix.molalities.items():
                parts[matrix.ion(name)] = Amount(np.asarray(mm), MOLAL)
        plist = list(parts.items()) + [(an, Amount(value, "molar"))]
        if counter is not None:
            plist.append((counter, Amount(value * abs(an.charge) / abs(counter.charge), "molar")))
        t = matrix.temperature if matrix is not None else (25.0 if temperature is None else temperature)
        sol = Solution.from_parts(plist, t, charge_tolerance=0.999, density=density)
        value = np.asarray(sol.molality(an.name))
    name, opts, fallback = choice_for(model, missing=missing, **model_options)
    p = _problem(an, counter, matrix, value.shape, temperature, equilibrium, pH, species)
    m_an = np.broadcast_to(value, p.shape).reshape(-1).astype(float)
    return _final(an, counter, p, m_an, _choose(p, name, opts, fallback, m_an), density)


def activity_from_px(px):
    """Activity from pX = −log10 a.

    Parameters
    ----------
    px : float or array_like
        pX, dimensionless (any finite value).

    Returns
    -------
    float or numpy.ndarray
        a = 10^(−pX), molal scale.

    Raises
    ------
    InputError
        A pX that is not a finite number.

    References
    ----------
    IUPAC (2007), §2.13 (p-functions).

    Examples
    --------
    >>> activity_from_px(3.0)
    0.001
    """
    v = np.asarray(px, dtype=float)
    if not np.all(np.isfinite(v)):
        raise InputError(f"pX {px!r} must be finite")
    out = np.power(10.0, -v)
    return float(out) if out.ndim == 0 else out


def px_from_activity(activity):
    """pX = −log10 a, for an activity a > 0.

    Parameters
    ----------
    activity : float or array_like
        a, molal scale (> 0).

    Returns
    -------
    float or numpy.ndarray
        pX, dimensionless.

    Raises
    ------
    InputError
        An activity that is not positive and finite.

    References
    ----------
    IUPAC (2007), §2.13 (p-functions).

    Examples
    --------
    >>> px_from_activity(1e-4)
    4.0
    """
    a = np.asarray(activity, dtype=float)
    if not np.all(np.isfinite(a)) or np.any(a <= 0):
        raise InputError(f"activity {activity!r} must be positive and finite for pX")
    out = -np.log10(a)
    return float(out) if out.ndim == 0 else out


@dataclass(frozen=True, repr=False)
class StandardRecipe(Record):
    """How much salt makes a standard of a given analyte activity."""

    salt: str
    ion: str
    activity: float | np.ndarray
    salt_molality: float | np.ndarray  # mol salt per kg water
    grams_per_kg_water: float | np.ndarray
    grams_per_litre: float | np.ndarray  # of solution, via the density model
    gamma: float | np.ndarray
    model: str


def standard_for_activity(salt: str, analyte: str, activity, *, matrix: Solution | None = None, model: str = "auto",
                          temperature=None, **model_options) -> StandardRecipe:
    """The salt amount that gives a standard of the wanted activity of one of its ions.

    Parameters
    ----------
    salt : str
        The standard's salt, e.g. "NaF".
    analyte : str
        The ion of the salt whose activity is wanted, e.g. "F-".
    activity : float
        The wanted activity (molal scale, > 0).
    matrix : Solution, optional
        A background the standard is made up in (pure water when None).
    model : str
        Activity model name, or "auto".
    temperature : float, optional
        °C (default 25 °C, or the matrix's).
    **model_options
        Passed to the model.

    Returns
    -------
    StandardRecipe
        Salt molality (mol/kg), grams per kg of water and per litre, γ and the model.

    Raises
    ------
    InputError
        A salt that does not contain the analyte, or an activity no amount of it reaches.

    References
    ----------
    IUPAC (2007), §2.11 (activity on the molality scale); preparing standards of known
    activity is common practice.

    Examples
    --------
    >>> import ionact as ia
    >>> r = ia.standard_for_activity("NaF", "F-", 1e-3, model="davies")
    >>> round(r.salt_molality * 1e3, 4), round(r.grams_per_kg_water, 4)
    (1.0377, 0.0436)
    """
    s = Salt.parse(salt)
    an = resolve_ion(analyte)
    names = [n for n, _ in s.ions]
    if an.name not in names or len(names) != 2:
        raise InputError(f"{an.name} is not one of the two ions of {s.text} ({', '.join(names)})")
    counter = next(n for n in names if n != an.name)
    nu = dict(s.ions)[an.name]
    r = concentration_from_activity(an, activity, matrix=matrix, counter_ion=counter, model=model,
                                    temperature=temperature, **model_options)
    ms = np.asarray(r.molality) / nu
    gl = ms * np.asarray(r.solution.water_per_litre) * s.molar_mass
    def f(v):
        return float(v) if np.ndim(v) == 0 else v

    return StandardRecipe(s.text, an.name, r.activity, f(ms), f(ms * s.molar_mass), f(gl), r.gamma, r.model)
