"""Step 3 of the evaluation path: one resolver for the activity model, used by every job.

``resolve_model`` turns what a caller asked for (a model name or "auto", options, a policy
for missing parameters) into a :class:`ModelChoice`: the model used, why, and every
fallback, recorded once. ``evaluate`` runs the chosen model on a :class:`Batch` and
returns log10 γ with the model's notes and the places where the batch leaves the model's
validity. Callers decide whether those become warnings (the public functions) or notes
(auxiliary computations inside a design); nothing is dropped.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from .. import water
from ..errors import InputError, MissingParameterError
from ..species import Ion
from .registry import DH_FAMILY, MODELS, Batch, ModelInfo, Options, Violation, get_model, make_options

__all__ = ["ModelChoice", "Evaluation", "resolve_model", "evaluate", "log10_gamma", "parse_missing", "choice_for",
           "ASSOCIATION_CHARGE_PRODUCT", "ASSOCIATION_IONIC_STRENGTH"]

# "auto" warns when a Debye–Hückel-family model meets oppositely charged ions whose charge
# product is 3 or more (2:2, 3:1 …) above this ionic strength: they pair, and a free-ion
# model then misses the stoichiometric γ by 25–60 % at 0.1 mol/kg (Robinson & Stokes 1959).
ASSOCIATION_CHARGE_PRODUCT = 3
ASSOCIATION_IONIC_STRENGTH = 0.01


MODEL_OPTIONS = frozenset({"sizes", "davies_coefficient", "bdot", "setschenow", "setschenow_default", "unsymmetrical"})


def parse_missing(missing: object) -> tuple[str, str | None]:
    """The one meaning of ``missing=``: "error", "zero", or a fallback model name.

    Returns
    -------
    (policy, fallback) : ("error" | "zero", model name or None)
    """
    if not isinstance(missing, str):
        raise InputError(f"missing={missing!r}: allowed 'error', 'zero', or a fallback model name")
    if missing in ("error", "zero"):
        return missing, None
    try:
        return "error", get_model(missing).name
    except (InputError, KeyError):
        raise InputError(f"missing={missing!r}: allowed 'error', 'zero', or a fallback model name") from None


@dataclass(frozen=True)
class ModelChoice:
    """The activity model a job uses, why, and what it lacked — resolved once, stored in full.

    Attributes
    ----------
    requested : str
        What the caller asked for ("auto" or a model name).
    name : str
        The model used.
    reason : str
        Why: "requested", the selection rule of "auto", or the fallback taken.
    options : Options
        Model options (ion sizes, Davies coefficient, missing-parameter policy …).
    fallback : str or None
        The fallback model allowed when the requested one lacks parameters.
    lacking : tuple of str
        Parameters that more accurate (or the requested) models lacked, naming the ion or pair.
    """

    requested: str
    name: str
    reason: str
    options: Options = field(default_factory=Options)
    fallback: str | None = None
    lacking: tuple[str, ...] = ()

    @property
    def info(self) -> ModelInfo:
        return MODELS[self.name]

    def to_dict(self) -> dict[str, Any]:
        return {"requested": self.requested, "name": self.name, "reason": self.reason,
                "options": self.options.to_dict(), "fallback": self.fallback, "lacking": list(self.lacking)}

    @classmethod
    def from_dict(cls, d: Mapping[str, Any]) -> ModelChoice:
        if not isinstance(d, Mapping):
            raise InputError(f"a model choice must be a mapping, got {type(d).__name__}")
        try:
            name = get_model(d["name"]).name
            requested = str(d.get("requested", name))
            if requested != "auto":
                requested = get_model(requested).name
            fb = d.get("fallback")
            return cls(requested=requested, name=name, reason=str(d.get("reason", "")),
                       options=Options.from_dict(d.get("options") or {}),
                       fallback=get_model(fb).name if fb else None,
                       lacking=tuple(str(x) for x in d.get("lacking", ())))
        except KeyError as exc:
            raise InputError(f"model choice lacks the field {exc}") from None


def choice_for(model: str = "auto", *, missing: str = "error", **options: Any) -> tuple[str, Options, str | None]:
    """Validate a caller's model name, options and missing policy before any batch exists."""
    policy, fallback = parse_missing(missing)
    if model != "auto":
        model = get_model(model).name
    unknown = sorted(set(options) - MODEL_OPTIONS)
    if unknown:
        raise InputError(f"unknown option(s) {', '.join(unknown)}; model options are "
                         f"{', '.join(sorted(MODEL_OPTIONS))}")
    return model, make_options(missing=policy, **options), fallback


def _lacking(info: ModelInfo, ions: tuple[Ion, ...], options: Options) -> list[str]:
    if options.missing != "error":
        return []
    return info.needs(ions, options)


def _select(batch: Batch, options: Options) -> tuple[str, str, tuple[str, ...]]:
    """The most accurate registered model whose parameters cover the ions and whose range
    covers the batch; else the covered one with the fewest range problems (widest range)."""
    ranked = sorted((m for m in MODELS.values() if m.in_auto), key=lambda m: -m.rank)
    lacking: list[str] = []
    covered = []
    for m in ranked:
        need = _lacking(m, batch.ions, options)
        if need:
            lacking.append(f"{m.name} lacks {'; '.join(need)}")
        else:
            covered.append(m)
    finite = batch.ionic[np.isfinite(batch.ionic)]
    imax = float(finite.max()) if finite.size else 0.0
    for m in covered:
        if not any(v.kind == "ionic-strength" for v in m.violations(batch, options)):
            why = f"{m.name}: parameters cover every ion and the batch is inside its range (I ≤ {imax:.3g} mol/kg)"
            if lacking:
                why += " — more accurate models lack parameters: " + "; ".join(lacking)
            return m.name, why, tuple(lacking)
    widest = max(covered, key=lambda m: m.max_ionic_strength)
    why = (f"{widest.name}: no model with parameters for every ion covers the batch (I up to {imax:.3g} "
           f"mol/kg); {widest.name} has the widest range ({widest.max_ionic_strength:g} mol/kg)")
    if lacking:
        why += " — " + "; ".join(lacking)
    return widest.name, why, tuple(lacking)


def resolve_model(batch: Batch, model: str = "auto", *, options: Options | None = None,
                  fallback: str | None = None) -> ModelChoice:
    """Choose the model for a batch: "auto" selects; a named model is used, or its fallback
    when it lacks parameters (recorded with what it lacked).

    Raises
    ------
    MissingParameterError
        A named model lacks parameters, ``options.missing == "error"`` and no fallback.
    """
    options = options or Options()
    if model == "auto":
        name, why, lacking = _select(batch, options)
        return ModelChoice("auto", name, why, options, fallback, lacking)
    info = get_model(model)
    need = _lacking(info, batch.ions, options)
    if need and fallback is not None:
        return ModelChoice(info.name, get_model(fallback).name,
                           f"requested {info.name}; it lacks {'; '.join(need)}; fell back to {fallback}",
                           options, fallback, tuple(f"{info.name} lacks {x}" for x in need))
    if need:
        raise MissingParameterError(f"model {info.name} lacks parameters: {'; '.join(need)}; choose another "
                                    "model, allow missing='zero', or name a fallback model with missing=")
    return ModelChoice(info.name, info.name, "requested", options, fallback, ())


@dataclass(frozen=True)
class Evaluation:
    """log10 γ (n, N) of a batch by a chosen model, with its notes and range problems."""

    log10_gamma: np.ndarray
    notes: tuple[str, ...]
    violations: tuple[Violation, ...]


def log10_gamma(choice: ModelChoice, batch: Batch) -> np.ndarray:
    """log10 γ (n, N) only, for inner loops (no notes, no range checks)."""
    return choice.info.kernel(batch, choice.options)[0]


def evaluate(choice: ModelChoice, batch: Batch, *, paired: frozenset[frozenset[str]] = frozenset(),
             rows: Sequence[int] | None = None) -> Evaluation:
    """Run the chosen model on a batch: log10 γ, the model's notes, and range problems.

    ``paired`` names the cation–anion pairs whose association the equilibrium step already
    solves; the free-ion association warning leaves them out. ``rows`` (models of z² and I
    alone) evaluates only those species, the range checks still on the whole batch.
    """
    info = choice.info
    if rows is not None and not info.charge_only:
        raise InputError(f"model {info.name} depends on more than the charge: evaluate every species")
    lg, notes = info.kernel(batch if rows is None else batch.take(rows), choice.options)
    problems = info.violations(batch, choice.options)
    if info.name in DH_FAMILY and choice.requested == "auto":
        problems += _association_warning(batch, lg, info.name, paired)
    return Evaluation(lg, tuple(notes), tuple(problems))


def _association_warning(batch: Batch, lg: np.ndarray, model: str,
                         paired: frozenset[frozenset[str]] = frozenset()) -> list[Violation]:
    """A free-ion model meets ions that pair: say so, with an estimate of the error.

    The local estimate uses Fuoss's (1958) association constant for contact pairs,
    K_A = (4π N_A a³/3) exp(|z+ z−| l_B / a) with a the mean of the two ion sizes (4 Å
    when unknown) and l_B the Bjerrum length, γ± by the Güntelberg form, and the free
    fraction of the scarcer ion of the pair from K_A γ+ γ− (m+ − x)(m− − x) = x.
    """
    if not batch.ions or batch.ionic.size == 0 or np.nanmax(batch.ionic) <= ASSOCIATION_IONIC_STRENGTH:
        return []
    cat = [k for k, z in enumerate(batch.z) if z > 0]
    an = [k for k, z in enumerate(batch.z) if z < 0]
    worst: tuple[float, str] | None = None
    for i in cat:
        for j in an:
            if batch.z[i] * -batch.z[j] < ASSOCIATION_CHARGE_PRODUCT or \
                    frozenset((batch.names[i], batch.names[j])) in paired:
                continue
            mi, mj = batch.m[i], batch.m[j]
            sel = (batch.ionic > ASSOCIATION_IONIC_STRENGTH) & (mi > 0) & (mj > 0)
            if not np.any(sel):
                continue
            a = 0.5 * ((batch.ions[i].size or 4.0) + (batch.ions[j].size or 4.0)) * 1e-10
            lb = water.bjerrum_kappa(batch.t[sel])[0]
            k_a = 4.0 / 3.0 * math.pi * a**3 * water.AVOGADRO * 1000.0 * np.exp(batch.z[i] * -batch.z[j] * lb / a)
            # γ by the Güntelberg form (bounded at any I) so the estimate does not inherit a model's extrapolation
            sq = np.sqrt(batch.ionic[sel])
            a_dh = water.dh_a_array(batch.t[sel])
            g = np.power(10.0, -a_dh * (batch.z[i] ** 2 + batch.z[j] ** 2) * sq / (1.0 + sq))
            kk = k_a * g
            s = mi[sel] + mj[sel] + 1.0 / kk
            x = 0.5 * (s - np.sqrt(np.maximum(s * s - 4.0 * mi[sel] * mj[sel], 0.0)))
            free = 1.0 - x / np.minimum(mi[sel], mj[sel])
            err = float(np.max(1.0 - free))
            if worst is None or err > worst[0]:
                worst = (err, f"{batch.names[i]}–{batch.names[j]}")
    if worst is None:
        return []
    return [Violation("association", f"model {model} treats every ion as free, but the {worst[1]} pair (charge "
                      f"product ≥ {ASSOCIATION_CHARGE_PRODUCT}) meets above I = {ASSOCIATION_IONIC_STRENGTH:g} "
                      "mol/kg: free-ion models miss the mean activity coefficients of 2:2 and 3:1 salts by "
                      "25–60 % at 0.1 mol/kg (against Robinson & Stokes 1959), and an ion-association estimate "
                      f"(Fuoss 1958) puts {worst[0]:.0%} of the scarcer ion in pairs here; use a model with "
                      "parameters for these salts")]
