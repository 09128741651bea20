"""Write notebooks/fluoride_aluminium.ipynb (the cells live here so that diffs stay readable)."""

from pathlib import Path

import nbformat as nbf

nb = nbf.v4.new_notebook()
md, code = nbf.v4.new_markdown_cell, nbf.v4.new_code_cell
cells = []
cells.append(md("""# A fluoride method in water that carries aluminium

An invented scenario: a laboratory measures fluoride with an ion-selective electrode in
spring water from the (invented) Brightwater catchment, where some springs carry dissolved
aluminium. All sample data here are invented; the formation constants are the library's
table values (recalled from the critical compilations, marked *from memory* in
`ionact/data/complexes.csv`) and the complexing agent's constants come from the method file.

The electrode reads the activity of **free** fluoride. Aluminium binds fluoride as
AlF²⁺, AlF₂⁺, AlF₃(aq)…, and hydrogen binds it as HF, so the same total fluoride reads
lower in a sample with aluminium — unless the adjuster frees it. This notebook shows the
binding, designs an adjuster whose complexing agent removes it, and proves it."""))
cells.append(code("""import warnings
import numpy as np
import ionact as ia
from ionact.plotting import new_figure, PALETTE
from ionact.method import load_method

warnings.simplefilter("ignore", ia.ValidityRangeWarning)   # range notes are printed where they matter

f_total = 1.0 / 18998.4          # 1 mg/L fluoride, mol/L ≈ mol/kg in fresh water
ph = np.linspace(3.0, 8.0, 51)
al_levels = {"no aluminium": 0.0, "0.1 mg/L Al": 0.1 / 26982.0, "0.3 mg/L Al": 0.3 / 26982.0}

def water(al, n):
    # fluoride as NaF, aluminium as AlCl3, in a little NaCl; one sample per pH value
    return ia.Solution({"Na+": np.full(n, 1e-3 + f_total), "F-": np.full(n, f_total),
                        "Al^3+": np.full(n, al), "Cl-": np.full(n, 1e-3 + 3 * al)})

free = {label: ia.speciate(water(al, ph.size), pH=ph).free_fraction("F-") for label, al in al_levels.items()}
for label, f in free.items():
    print(f"{label:>14}: free fluoride {f[ph == 5.5][0]:.1%} of the total at pH 5.5")"""))
cells.append(md("""Across pH: below pH 5 hydrogen takes fluoride as HF; between 5 and 7 aluminium takes it;
above 7 hydroxide begins to take the aluminium from fluoride. A fluoride method therefore
buffers near pH 5.5 — where aluminium binds most."""))
cells.append(code("""fig, (ax,) = new_figure()
for k, (label, f) in enumerate(free.items()):
    ax.plot(ph, 100 * f, color=PALETTE[k], label=label)
ax.axvline(5.5, color="0.5", ls=":", lw=1)
ax.set_xlabel("pH")
ax.set_ylabel("free fluoride, % of total")
ax.set_title("1 mg/L fluoride in fresh water")
ax.legend(frameon=False)
fig"""))
cells.append(md("""## The method and its complexing agent

The method file `fluoride_buffered` buffers with acetate at pH 5.5, adds sodium chloride
for ionic strength, and a complexing agent (CDTA) whose protonation and aluminium and
calcium complexes it states in `[complexes.*]` tables. The samples declare up to
0.3 mg/L aluminium (`[samples.matrix_ions]`). The design speciates every treated sample and
standard; the *free fraction* check speciates the worst sample with its declared
aluminium and reports the bias it leaves."""))
cells.append(code("""job = load_method("example:fluoride_buffered")
design = ia.design_adjuster(**job)
check = next(c for c in design.checks if c.name == "free fraction of F-")
print(f"{check.status}: {check.value:.1f} % free in the worst sample; {check.detail}")"""))
cells.append(md("""The same method without the complexing agent: aluminium keeps most of the fluoride at the
low end of the range, the check fails, and the design with it."""))
cells.append(code("""bare = ia.design_adjuster(**{**job, "stock": [c for c in job["stock"] if c.name != "Na4CDTA"]})
bad = next(c for c in bare.checks if c.name == "free fraction of F-")
print(f"{bad.status}: {bad.value:.1f} % free in the worst sample; {bad.detail}")
print("design exit status:", bare.exit_status, "(with the agent:", design.exit_status, ")")"""))
cells.append(md("""How much agent? The free fluoride in the treated worst case (sample at the low end of the
range with 0.3 mg/L aluminium and 120 mg/L calcium, which competes for the agent, mixed 1:1
with the stock) against the agent's concentration
in the stock — computed with the same species step the design uses, through
`ia.speciate` and the method's own constants."""))
cells.append(code("""cdta = next(c for c in job["stock"] if c.name == "Na4CDTA")
ligand = next(ion for ion, _count in cdta.ions if ion.charge == -4)
agent = np.geomspace(1e-5, 2e-2, 30)            # mol/L in the stock
n = agent.size
half = 0.5                                        # 1 + 1 mixing
f_low = 0.05 / 18998.4                            # the range's low end, mol/L
al, ca = 0.3 / 26982.0, 120.0 / 40078.0         # the declared highest aluminium and calcium
treated = ia.Solution({"Na+": half * (1.0 + 0.8826 + f_low + 4 * agent), "Cl-": half * (1.0 + 3 * al + 2 * ca),
                       "Ca^2+": np.full(n, half * ca),
                       "CH3COO-": np.full(n, half * 0.8826), "CH3COOH": np.full(n, half * 0.1174),
                       "F-": np.full(n, half * f_low), "Al^3+": np.full(n, half * al),
                       ligand: half * agent}, density="water", charge_tolerance=1e-3)
s = ia.speciate(treated, pH=5.5, species=job["complexes"], model="davies")
fig, (ax,) = new_figure()
ax.semilogx(agent * 1e3, 100 * s.free_fraction("F-"), color=PALETTE[0], marker="o", ms=3)
ax.axvline(10.0, color="0.5", ls=":", lw=1)
ax.set_xlabel("complexing agent in the stock, mmol/L")
ax.set_ylabel("free fluoride, % of total")
ax.set_title("worst treated sample: 0.3 mg/L Al, 120 mg/L Ca, 0.05 mg/L F, pH 5.5")
fig"""))
cells.append(md("""The method's 10 mmol/L sits well on the plateau: aluminium is held by the agent and the
fluoride that remains bound is the small share the standards share too (ion pairs with
sodium at the adjuster's ionic strength).

## Checking a batch

An analyst's batch with an aluminium column: each sample's free share of fluoride comes
from the same species step; a sample whose own ions bind the analyte more than the
standards' do has it named."""))
cells.append(code("""cols = {"sample_id": ["spring A", "spring B (Al)", "spring C (Al, high)"],
        "analyte [mg/L]": [0.4, 0.4, 0.12],
        "Na+ [mg/L]": [12.0, 12.0, 12.0],
        "Cl- [mg/L]": [18.5, 18.5 + 3 * 0.2 / 26.98 * 35.45, 18.5 + 3 * 1.0 / 26.98 * 35.45],
        "Al^3+ [mg/L]": [0.0, 0.2, 1.0]}
for name, d in (("with the agent", design), ("without", bare)):
    r = ia.check_samples(cols, d)
    print(name)
    for sid, st, e in zip(r.sample_id, r.status, r.error_mv):
        print(f"  {sid:<20} {st:<28} {e:8.3f} mV")"""))
cells.append(md("""Cautions: CDTA salts, acetic acid and fluoride standards are handled following each
supplier's safety data sheet; results reported for compliance follow the governing
standard method and the laboratory's accreditation."""))
nb.cells = cells
nb.metadata = {"kernelspec": {"display_name": "Python 3", "language": "python", "name": "python3"},
               "language_info": {"name": "python"}}
nbf.write(nb, str(Path(__file__).resolve().parent.parent / "notebooks" / "fluoride_aluminium.ipynb"))
