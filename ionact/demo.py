"""The built-in invented scenario that ``make demo`` / ``ionact demo`` runs.

Everything here is invented for demonstration: the place, the samples and their numbers.
"""

from __future__ import annotations

import sys
import warnings

import numpy as np

from .activity import activity_coefficients, compare_models
from .errors import ValidityRangeWarning
from .solution import Solution

# A survey of irrigation water around the (invented) Harrowfield polder, mg/L.
SURVEY_IONS = ("Ca+2", "Mg+2", "Na+", "K+", "HCO3-", "SO4-2", "Cl-", "NO3-")
SURVEY = {
    "HF-01 canal inlet": (40, 12, 25, 3, 150, 40, 30, 8),
    "HF-02 north well": (95, 30, 80, 5, 280, 160, 100, 25),
    "HF-03 east drain": (180, 60, 300, 12, 350, 520, 380, 60),
    "HF-04 storage pond": (20, 6, 15, 4, 80, 20, 14, 2),
    "HF-05 saline well": (300, 110, 900, 20, 400, 1200, 1250, 40),
}


def survey_solution() -> tuple[list[str], Solution, list[float]]:
    """The survey as one batch Solution, balanced on Cl-, with each sample's Cl- adjustment (mol/kg)."""
    names = list(SURVEY)
    data = np.array([SURVEY[n] for n in names], dtype=float).T
    amounts = {ion: [f"{v} mg/L" for v in row] for ion, row in zip(SURVEY_IONS, data, strict=True)}
    # one Solution per row keeps the unit strings simple; then stack into a batch
    rows = [Solution({ion: amounts[ion][k] for ion in SURVEY_IONS}, 20.0, balance="Cl-") for k in range(len(names))]
    m = np.stack([r.molality_array for r in rows], axis=1)
    batch = Solution({ion: m[i] for i, ion in enumerate(rows[0].ions)}, temperature=20.0)
    batch_added = [r.balanced_with[1] for r in rows]
    return names, batch, batch_added


def run(out=None) -> None:
    """Print the survey: ionic strength and activity coefficients of every sample."""
    out = out or sys.stdout
    names, batch, added = survey_solution()
    g = activity_coefficients(batch, model="auto")
    w = out.write
    w("ionact demo — Harrowfield polder irrigation survey (invented data), 20 °C\n")
    w("Compositions in mg/L were converted to mol/kg with the density model; each sample was\n")
    w("charge-balanced on Cl- and the adjustment is shown.\n\n")
    w(f"activity model: {g.model} — {g.reason}\n\n")
    ions = list(batch.ions)
    head = f"{'sample':<22}{'I mol/kg':>10}{'Cl- adjust':>12}" + "".join(f"{'γ ' + i:>10}" for i in ions)
    w(head + "\n" + "-" * len(head) + "\n")
    for k, name in enumerate(names):
        w(f"{name:<22}{batch.ionic_strength[k]:>10.4f}{added[k] * 1e3:>9.3f} mM"
          + "".join(f"{g[i][k]:>10.4f}" for i in ions) + "\n")
    w("\nHow much the model choice matters for nitrate (spread over the models valid for the whole survey):\n")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityRangeWarning)
        c = compare_models(batch)
    for k, name in enumerate(names):
        w(f"  {name:<22} {100 * c.spread['NO3-'][k]:6.2f} %  = {c.spread_mv['NO3-'][k]:6.3f} mV\n")
    if c.skipped:
        w("  models without parameters for these ions: " + ", ".join(sorted(c.skipped)) + "\n")
    w("\nThese are invented demonstration numbers, not measurements; see the README for the API.\n")
