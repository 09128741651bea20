"""Write the invented example files for 'ionact calibrate', 'quantify' and 'addition'.

The fluoride electrode of the invented Brightwater scenario: standards mixed 1:1 with the
adjuster of the example method ``fluoride_buffered``, an electrode with E0 = -180 mV, a
slope of -58.4 mV/decade and a background activity of 4e-7 (Nikolsky–Eisenman), read with
0.15 mV of seeded noise; a day's samples with a check standard drifting +0.6 mV over 80 min, and the same
samples' expected levels and conductivities for the batch check before measuring;
a multiple standard addition into 25 mL of a sample. Every number is invented.
"""

from __future__ import annotations

import csv
import warnings
from pathlib import Path

import numpy as np

import ionact as ia
from ionact.calibration import measurement_for
from ionact.method import load_method

OUT = Path(__file__).resolve().parent.parent / "ionact" / "examples"
E0, SLOPE, BACKGROUND, NOISE = -180.0, -58.4, 4e-7, 0.15
F = 18998.4032  # mg/mol


def main() -> None:
    rng = np.random.default_rng(20261202)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        design = ia.design_adjuster(**load_method("example:fluoride_buffered"))
    meas = measurement_for("F-", design=design)

    def reading(mg_l: np.ndarray, drift: np.ndarray | float = 0.0) -> np.ndarray:
        a = meas.activity(np.asarray(mg_l) / F)
        return E0 + SLOPE * np.log10(a + BACKGROUND) + drift + rng.normal(0.0, NOISE, np.shape(mg_l))

    std = np.array([0.05, 0.1, 0.2, 0.5, 1.0, 2.0, 5.0])
    with open(OUT / "fluoride_standards.csv", "w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(["id", "concentration [mg/L]", "potential [mV]"])
        for k, (c, e) in enumerate(zip(std, reading(std), strict=True)):
            w.writerow([f"S{k + 1}", f"{c:g}", f"{e:.2f}"])

    samples = [("spring 01", 0.42, 5.0), ("spring 02", 1.35, 10.0), ("spring 03 (Al)", 0.18, 15.0),
               ("spring 04", 3.1, 20.0), ("spring 05", 0.08, 25.0), ("well 06", 7.5, 30.0),
               ("well 07", 0.02, 35.0), ("well 08", 0.9, 45.0), ("well 09", 2.2, 50.0)]
    rows = [("check A", 1.0, 0.0), *samples[:7], ("check B", 1.0, 40.0), *samples[7:], ("check C", 1.0, 80.0)]
    with open(OUT / "fluoride_samples.csv", "w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(["sample_id", "time [min]", "potential [mV]", "check [mg/L]"])
        for sid, c, t in rows:
            e = float(reading(np.array([c]), 0.6 * t / 80.0)[0])
            check = "1" if sid.startswith("check") else ""
            cell = f"{e:.2f}"
            if sid == "well 08":
                cell = ""  # the reading was not taken
            w.writerow([sid, f"{t:g}", cell, check])

    with open(OUT / "fluoride_batch.csv", "w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(["sample_id", "analyte [mg/L]", "conductivity [uS/cm]"])
        for (sid, c, _), ec in zip(samples, [180, 420, 260, 900, 150, 1650, 95, 640, 1100], strict=True):
            w.writerow([sid, f"{c:g}", f"{ec:g}"])

    vx, cs, cx = 25.0, 10.0 / F, 0.3 / F  # mL, mol/L, mol/L
    plain = measurement_for("F-")
    v = np.array([0.0, 0.5, 1.0, 1.5, 2.0])
    e = E0 + SLOPE * np.log10(plain.activity((cx * vx + cs * v) / (vx + v))) + rng.normal(0.0, NOISE, v.size)
    with open(OUT / "fluoride_additions.csv", "w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(["volume [mL]", "potential [mV]"])
        for vi, ei in zip(v, e, strict=True):
            w.writerow([f"{vi:g}", f"{ei:.2f}"])


if __name__ == "__main__":
    main()
