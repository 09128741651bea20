"""Write notebooks/measurement_day.ipynb (the cells live here so that diffs stay readable)."""

from pathlib import Path

import nbformat as nbf

nb = nbf.v4.new_notebook()
md, code = nbf.v4.new_markdown_cell, nbf.v4.new_code_cell
cells = [
    md("""# A measurement day with the fluoride electrode

An invented day in the laboratory of the (invented) Brightwater catchment: the method
`fluoride_buffered` (acetate buffer at pH 5.5, sodium chloride, a complexing agent for
aluminium) is in use. The analyst calibrates, checks the batch, measures with a check
standard between the samples, quantifies with intervals, confirms one sample by standard
addition, and writes the error budget of a result. Every file and number is invented
(written by `tools/make_calibration_examples.py`)."""),
    code("""import warnings
from importlib import resources

import numpy as np
import ionact as ia
from ionact.calibration import DriftCheck
from ionact.calibration.files import check_standard, read_additions_csv, read_samples_for_quantity, read_standards_csv
from ionact.method import load_method
from ionact.plotting import PALETTE, new_figure
from ionact.samples import read_samples_csv

warnings.simplefilter("ignore", ia.ValidityRangeWarning)  # the design's model-range note is in its own report
examples = resources.files("ionact").joinpath("examples")
design = ia.design_adjuster(**load_method("example:fluoride_buffered"))
fluoride = ia.Ion.parse("F-")
MG = 18998.4032  # mg per mol of fluoride
std = read_standards_csv(examples.joinpath("fluoride_standards.csv"), fluoride)
print(f"{len(std['concentrations'])} standards, {std['concentrations'].min() * MG:.3g}–"
      f"{std['concentrations'].max() * MG:.3g} mg/L, each mixed 1 + 1 with the adjuster")"""),
    md("""## Calibration

The potentials are fitted against the activity of fluoride in each *treated* standard.
The low end bends (the electrode's own background), so the F-test takes the
Nikolsky–Eisenman curve; the detection limit is where the Nernstian line meets the
plateau."""),
    code("""cal = ia.calibrate("F-", std["concentrations"], std["potentials_mv"], design=design)
print(cal.report())"""),
    code("""cal.plot()"""),
    md("""## Before measuring: the batch check

The samples' expected levels and conductivities against the design's envelope and the
calibration's range: which can be measured as they are, which need a dilution."""),
    code("""batch = ia.check_samples(read_samples_csv(examples.joinpath("fluoride_batch.csv")), design,
                         calibration_range=cal)
for sid, status, dil in zip(batch.sample_id, batch.status, batch.dilution):
    print(f"{sid:<16} {status:<30} {'' if np.isnan(dil) else f'×{dil:g}'}")"""),
    md("""## Quantitation with a check standard

A 1 mg/L check standard was read at the start, in the middle and at the end. Its offset
from the calibration grows by about 0.6 mV over the run; interpolated in time it is
subtracted from each sample's reading. Every row keeps its place and its status."""),
    code("""readings = read_samples_for_quantity(examples.joinpath("fluoride_samples.csv"), fluoride)
c_check, t_check, e_check = check_standard(readings)
samples = ~readings.is_check
q = ia.quantify(cal, readings.potentials[samples], times=readings.times[samples],
                check=DriftCheck(c_check, t_check, e_check), correct_drift=True)
print(q.table(unit="mg/L"))"""),
    code("""fig, (ax,) = new_figure(figsize=(7.0, 4.0))
ids = [i for i, s in zip(readings.ids, samples) if s]
conc, iv = q.in_unit("mg/L")
ok = np.array([s == "ok" for s in q.status])
y = np.arange(len(ids))
ax.errorbar(conc[ok], y[ok], xerr=[conc[ok] - iv[0, ok], iv[1, ok] - conc[ok]], fmt="o", color=PALETTE[0],
            label="reported (95 % interval)")
other = ~ok & np.isfinite(conc)
ax.plot(conc[other], y[other], "x", color=PALETTE[3], label="outside the calibrated range")
lo, hi = cal.calibrated_range
ax.axvspan(lo * MG, hi * MG, color=PALETTE[2], alpha=0.12, label="calibrated range")
ax.set_xscale("log")
ax.set_yticks(y, ids)
ax.invert_yaxis()
ax.set_xlabel("fluoride, mg/L")
ax.legend(frameon=False, fontsize=8, loc="upper left", bbox_to_anchor=(1.0, 1.0))
fig"""),
    md("""## Standard addition for a doubtful sample

Four 0.5 mL spikes of 10 mg/L fluoride into 25 mL of a sample; the Gran function, with the
volume and activity-coefficient corrections, crosses the volume axis at −c·V/C. The slope
comes from the day's calibration."""),
    code("""v, e = read_additions_csv(examples.joinpath("fluoride_additions.csv"))
add = ia.multiple_addition("F-", sample_volume=25, spike_volumes=v, spike_concentration="10 mg/L", potentials_mv=e,
                           calibration=cal)
print(add.report("mg/L"))
fig, (ax,) = new_figure(figsize=(6.0, 4.0))
m, b = np.polyfit(add.gran_volumes_ml, add.gran_values, 1)
xs = np.linspace(-b / m * 1.1, add.gran_volumes_ml.max(), 50)
ax.plot(add.gran_volumes_ml, add.gran_values, "o", color=PALETTE[0], label="readings")
ax.plot(xs, m * xs + b, color=PALETTE[1], label=f"Gran line, crosses at {-b / m:.3f} mL")
ax.axhline(0, color="0.5", lw=0.8)
ax.set_xlabel("spike added, mL")
ax.set_ylabel("Gran function (relative)")
ax.legend(frameon=False)
fig"""),
    md("""## The error budget of one result

For *spring 02*: the calibration's own uncertainty, the design's residual γ mismatch, the
spread of the activity models, a sample read 2 °C colder than the standards, and the
change of the liquid-junction potential between the top standard and the sample — each in
mV and %, combined by the law of propagation of uncertainty."""),
    code("""k = ids.index("spring 02")
budget = ia.error_budget(cal, q.corrected_mv[k], design=design, measurement_temperature=23.0,
                         sample=ia.Solution.from_salts({"NaCl": 0.004, "CaCl2": 0.001}))
print(budget.table())"""),
    md("""Cautions: acetic acid, the complexing agent and fluoride standards are handled following
each supplier's safety data sheet; results reported for compliance follow the governing
standard method and the laboratory's accreditation."""),
]
nb.cells = cells
nb.metadata = {"kernelspec": {"display_name": "Python 3", "language": "python", "name": "python3"},
               "language_info": {"name": "python"}}
nbf.write(nb, str(Path(__file__).resolve().parent.parent / "notebooks" / "measurement_day.ipynb"))
