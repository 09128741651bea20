"""Reading a design file back: every field checked for type, range and consistency."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from ..errors import InputError, IonactError, UnknownSpeciesError
from ..models.resolver import ModelChoice
from ..species import Ion, resolve_ion
from .checks import Check
from .design import DESIGN_FORMAT, DESIGN_VERSION, AdjusterDesign, RecipeLine, number_field, pair_field
from .inputs import MAX_VOLUME_RATIO, Budget

__all__ = ["design_from_dict"]

_REQUIRED = ("analyte", "counter_ion", "recipe", "volume_ratio", "temperature_c", "budget", "budget_mv",
             "worst_error_mv", "worst_error_percent", "final_ionic_strength", "envelope", "analyte_range_mol_per_l",
             "standards_mol_per_l", "model", "checks", "stock_ions_mol_per_l", "background")


def _mapping(v: Any, what: str) -> Mapping[str, Any]:
    if not isinstance(v, Mapping):
        raise InputError(f"design field {what} must be a mapping, got {type(v).__name__}")
    return v


def _list(v: Any, what: str, min_len: int = 0) -> list[Any]:
    if not isinstance(v, list | tuple) or len(v) < min_len:
        raise InputError(f"design field {what} must be a list of at least {min_len} item(s), got {v!r}"[:300])
    return list(v)


def _ion(name: Any, what: str, species: Mapping[str, Ion]) -> Ion:
    if not isinstance(name, str):
        raise InputError(f"design field {what} {name!r} must be an ion notation")
    if name in species:
        return species[name]
    try:
        return resolve_ion(name)
    except UnknownSpeciesError as exc:
        raise InputError(f"design field {what}: {exc}", value=name, field=what) from None


def design_from_dict(d: Mapping[str, Any]) -> AdjusterDesign:
    """Validate a design file's content and build the :class:`AdjusterDesign` it describes."""
    d = _mapping(d, "(top level)")
    fmt, ver = d.get("format"), d.get("version")
    if fmt != DESIGN_FORMAT:
        raise InputError(f"not an ionact adjuster design (format {fmt!r}, expected {DESIGN_FORMAT!r})")
    if ver != DESIGN_VERSION:
        raise InputError(f"design file version {ver!r} is not supported (this ionact reads version {DESIGN_VERSION}); "
                         "re-run 'ionact design'")
    missing = [k for k in _REQUIRED if k not in d]
    if missing:
        raise InputError(f"design file lacks {', '.join(missing)}")
    try:
        return _build(d)
    except IonactError:
        raise
    except (TypeError, ValueError, KeyError, AttributeError, RecursionError) as exc:
        raise InputError(f"design file has a malformed value ({type(exc).__name__}: {str(exc)[:200]})") from None


def _build(d: Mapping[str, Any]) -> AdjusterDesign:
    species = {str(k): Ion.from_dict(_mapping(v, f"species.{k}")) for k, v in
               _mapping(d.get("species") or {}, "species").items()}
    analyte = _ion(d["analyte"], "analyte", species)
    counter = _ion(d["counter_ion"], "counter_ion", species)
    if analyte.charge == 0 or counter.charge * analyte.charge >= 0:
        raise InputError(f"design field counter_ion {counter.name} must carry the charge opposite to the analyte "
                         f"{analyte.name}")
    recipe = tuple(RecipeLine.from_dict(_mapping(r, "recipe[]")) for r in _list(d["recipe"], "recipe", 1))
    ratio = number_field(d["volume_ratio"], "volume_ratio", 0.0, MAX_VOLUME_RATIO)
    if ratio <= 0:
        raise InputError(f"design field volume_ratio {d['volume_ratio']!r} must be > 0")
    t = number_field(d["temperature_c"], "temperature_c", 0.0, 100.0)
    budget = Budget.from_dict(_mapping(d["budget"], "budget"))
    budget_mv = number_field(d["budget_mv"], "budget_mv", 0.0, 100.0)
    if budget_mv <= 0:
        raise InputError("design field budget_mv must be > 0")
    stock_ions = {_ion(k, "stock_ions_mol_per_l", species).name: number_field(v, f"stock_ions_mol_per_l.{k}", 0.0, 50.0)
                  for k, v in _mapping(d["stock_ions_mol_per_l"], "stock_ions_mol_per_l").items()}
    standards = tuple(number_field(x, "standards_mol_per_l", 0.0, 20.0) for x in
                      _list(d["standards_mol_per_l"], "standards_mol_per_l", 1))
    if any(x <= 0 for x in standards):
        raise InputError("design field standards_mol_per_l must hold positive concentrations")
    analyte_range = pair_field(d["analyte_range_mol_per_l"], "analyte_range_mol_per_l", 0.0, 20.0)
    if analyte_range[0] <= 0:
        raise InputError("design field analyte_range_mol_per_l must start above zero")
    lin = d.get("linear_range_mol_per_l")
    linear = pair_field(lin, "linear_range_mol_per_l", 0.0, 20.0) if lin is not None else None
    sel = {_ion(k, "selectivity", species).name: number_field(v, f"selectivity.{k}", 0.0, 1e6)
           for k, v in _mapping(d.get("selectivity") or {}, "selectivity").items()}
    checks = tuple(Check.from_dict(_mapping(c, "checks[]")) for c in _list(d["checks"], "checks"))
    density = d.get("density")
    if density not in (None, "water"):
        raise InputError(f"design field density {density!r} must be null or 'water'")
    background = d["background"]
    if not isinstance(background, str):
        raise InputError(f"design field background {background!r} must be a salt formula")
    return AdjusterDesign(
        name=str(d.get("name", "")), analyte=analyte.name, counter_ion=counter.name, recipe=recipe,
        volume_ratio=ratio, solve=str(d.get("solve", "none")), temperature=t, budget=budget, budget_mv=budget_mv,
        worst_error_mv=number_field(d["worst_error_mv"], "worst_error_mv"),
        worst_error_percent=number_field(d["worst_error_percent"], "worst_error_percent"),
        worst_case=_mapping(d.get("worst_case") or {}, "worst_case"),
        final_ionic_strength=pair_field(d["final_ionic_strength"], "final_ionic_strength", 0.0, 30.0),
        envelope=pair_field(d["envelope"], "envelope", 0.0, 30.0), analyte_range=analyte_range, standards=standards,
        linear_range=linear, selectivity=sel, model=ModelChoice.from_dict(_mapping(d["model"], "model")),
        checks=checks, notes=tuple(str(x) for x in _list(d.get("notes", []), "notes")),
        cautions=tuple(str(x) for x in _list(d.get("cautions", []), "cautions")), stock_ions=stock_ions,
        species={k: v.to_dict() for k, v in species.items()}, background=background, density=density,
        buffer=_mapping(d["buffer"], "buffer") if d.get("buffer") is not None else None,
        samples=_mapping(d.get("samples") or {}, "samples"), scan=_mapping(d.get("scan") or {}, "scan"),
        gamma_profile=_mapping(d.get("gamma_profile") or {}, "gamma_profile"),
        equilibrium=_equilibrium(d.get("equilibrium")),
        complexes=tuple(_complex(c, species) for c in _list(d.get("complexes") or [], "complexes")),
    )


def _equilibrium(v: Any) -> bool | None:
    if v is not None and not isinstance(v, bool):
        raise InputError(f"design field equilibrium {v!r} must be true, false or null", field="equilibrium")
    return v


def _complex(c: Any, species: Mapping[str, Ion]) -> dict[str, Any]:
    from ..equilibrium import Complex

    try:
        return Complex.from_dict(_mapping(c, "complexes[]"), species).to_dict()
    except UnknownSpeciesError as exc:
        raise InputError(f"design field complexes: {exc}", field="complexes") from None
