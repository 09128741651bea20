"""The plain-text report of a design, read from the design record only."""

from __future__ import annotations

from ..species import typeset
from .design import AdjusterDesign

__all__ = ["design_report"]


def _recipe_lines(d: AdjusterDesign) -> list[str]:
    out = ["Stock recipe (per litre of stock, made up to volume with water):"]
    for r in d.recipe:
        amount = f"{r.g_per_l:10.4g} g"
        if r.ml_per_l is not None:
            amount += f"  = {r.ml_per_l:.4g} mL (density {r.liquid_density:g} g/mL, common practice)"
        out.append(f"  {r.component:<20} {r.mol_per_l:10.4g} mol/L  {amount}   [{r.role}]")
    out.append(f"Mixing: {d.volume_ratio * 100:.4g} mL of stock per 100 mL of sample and of every standard "
               f"(volume ratio {d.volume_ratio:.4g})")
    return out


def _error_lines(d: AdjusterDesign) -> list[str]:
    lo, hi = d.final_ionic_strength
    wc = d.worst_case
    return [
        f"Untreated samples: ionic strength {d.envelope[0]:.4g}–{d.envelope[1]:.4g} mol/kg; analyte "
        f"{d.analyte_range[0]:.4g}–{d.analyte_range[1]:.4g} mol/L",
        f"Treated samples and standards: ionic strength {lo:.4g}–{hi:.4g} mol/kg",
        f"Worst residual error: {d.worst_error_mv:.4g} mV = {d.worst_error_percent:.4g} % "
        f"(budget {d.budget_mv:.4g} mV)",
        f"  at sample '{wc.get('sample')}' with analyte {wc.get('analyte', float('nan')):.4g} mol/L against the "
        f"standard of {wc.get('standard', float('nan')):.4g} mol/L",
    ]


def _buffer_lines(d: AdjusterDesign) -> list[str]:
    b = d.buffer
    if not b:
        return []
    lines = ["", f"pH buffer {b['acid']}/{b['base']}: pKa {b['pka']:.3f}, target pH {b['pH']:.2f} "
             f"(pH {b['pH_range'][0]:.3f}–{b['pH_range'][1]:.3f} across treated samples)",
             f"  in the stock: {b['acid']} {b['acid_stock_mol_l']:.4g} mol/L, {b['base']} "
             f"{b['base_stock_mol_l']:.4g} mol/L; buffer capacity {b['capacity_mol_l_ph']:.3g} mol/(L·pH) after mixing"]
    if b.get("drift") is not None:
        lines.append(f"  pH drift over the stated sample acidity range: {b['drift'][0]:+.3f} to {b['drift'][1]:+.3f}")
    return lines


def design_report(d: AdjusterDesign) -> str:
    """A plain-text report: recipe, mixing, errors, buffer, checks, notes, cautions."""
    title = f"Ionic strength adjuster for {typeset(d.analyte)}" + (f" — {d.name}" if d.name else "")
    lines = [title, "=" * len(title),
             f"solve: {d.solve};  model: {d.model.name} "
             f"({'requested' if d.model.reason == 'requested' else 'see notes'});  "
             f"temperature {d.temperature:g} °C", ""]
    lines += _recipe_lines(d) + [""] + _error_lines(d) + _buffer_lines(d)
    lines += ["", "Checks:"]
    for c in d.checks:
        lines.append(f"  [{c.status.upper():^12}] {c.name}: {c.message}")
    failed = [c.name for c in d.checks if c.status == "fail"]
    lines.append(f"Result: {'FAILED — ' + ', '.join(failed) if failed else 'no check failed'}")
    if d.notes:
        lines += ["", "Notes:"] + [f"  - {x}" for x in d.notes]
    lines += ["", "Cautions:"] + [f"  - {x}" for x in d.cautions]
    return "\n".join(lines)
