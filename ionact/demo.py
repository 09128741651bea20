"""The built-in invented scenario that ``make demo`` / ``ionact demo`` runs.

Everything here is invented for demonstration: the place, the samples, their numbers and
the electrode's selectivity coefficients.
"""

from __future__ import annotations

import sys
import warnings
from typing import Any

import numpy as np

from .activity import activity_coefficients
from .adjuster import Budget, Electrode, SamplePopulation, compare_adjusters, design_adjuster
from .errors import InfeasibleDesignError, ValidityRangeWarning
from .solution import Solution
from .species import typeset

# A survey of irrigation water around the (invented) Harrowfield polder, mg/L.
SURVEY_IONS = ("Ca^2+", "Mg^2+", "Na+", "K+", "HCO3-", "SO4^2-", "Cl-", "NO3-")
SURVEY = {
    "HF-01 canal inlet": (40, 12, 25, 3, 150, 40, 24, 8),
    "HF-02 north well": (95, 30, 80, 5, 280, 160, 86, 25),
    "HF-03 east drain": (180, 60, 300, 12, 350, 520, 341, 60),
    "HF-04 storage pond": (20, 6, 15, 4, 80, 20, 16, 2),
    "HF-05 saline well": (300, 110, 900, 20, 400, 1200, 1110, 40),
}
# Invented selectivity coefficients of the demo's nitrate electrode (log K ≈ −2.4 and −6).
DEMO_SELECTIVITY = {"Cl-": 4e-3, "SO4^2-": 1e-6}


def survey_solution(without: tuple[str, ...] = ()) -> tuple[list[str], Solution, list[float]]:
    """The survey as one batch Solution, balanced on Cl-, with each sample's Cl- adjustment (mol/kg)."""
    names = list(SURVEY)
    ions = [i for i in SURVEY_IONS if i not in without]
    rows = []
    for n in names:
        amounts = {ion: f"{v} mg/L" for ion, v in zip(SURVEY_IONS, SURVEY[n], strict=True) if ion in ions}
        rows.append(Solution(amounts, 20.0, balance="Cl-"))
    m = np.stack([r.molality_array for r in rows], axis=1)
    batch = Solution({ion: m[i] for i, ion in enumerate(rows[0].ions)}, temperature=20.0)
    added = [float(r.balanced_with[1]) if r.balanced_with else 0.0 for r in rows]
    return names, batch, added


def run(out=None) -> None:
    """Print the scenario: the survey's ionic strengths and γ, then the ISA design for nitrate."""
    out = out or sys.stdout
    w = out.write
    names, batch, added = survey_solution()
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", ValidityRangeWarning)
        g = activity_coefficients(batch, model="auto")
    w("ionact demo — a nitrate electrode method for the Harrowfield polder irrigation survey\n")
    w("(invented scenario and data; compositions in mg/L, charge-balanced on Cl- as shown)\n\n")
    w(f"1. The samples, 20 °C — activity model {g.model} (auto: the most accurate model with parameters for "
      "every ion)\n")
    for caught_warning in caught:
        w(f"   note: {caught_warning.message}\n")
    w("\n")
    head = f"{'sample':<22}{'I mol/kg':>10}{'Cl- adjust':>12}{'γ ' + typeset('NO3-'):>9}{'γ ' + typeset('Ca^2+'):>9}"
    w(head + "\n" + "-" * len(head) + "\n")
    for k, name in enumerate(names):
        w(f"{name:<22}{batch.ionic_strength[k]:>10.4f}{added[k] * 1e3:>9.3f} mM"
          f"{g['NO3-'][k]:>9.4f}{g['Ca^2+'][k]:>9.4f}\n")
    spread = g["NO3-"].max() / g["NO3-"].min()
    w(f"\nWithout an adjuster γ(NO3-) varies by {100 * (spread - 1):.1f} % across the survey, "
      f"{59.16 * np.log10(spread):.2f} mV at the electrode.\n\n")

    _, matrices, _ = survey_solution(without=("NO3-",))
    matrices = matrices.with_temperature(25.0)
    job: dict[str, Any] = dict(analyte="NO3-", samples=SamplePopulation(matrices=matrices, labels=tuple(names),
                                                        matrix_ions={"Ca^2+": "300 mg/L"}),
               analyte_range=("0.5 mg/L as N", "30 mg/L as N"), standard_salt="KNO3", budget=Budget(mv=0.5),
               lowest_temperature=12.0, name="Harrowfield irrigation survey",
               electrode=Electrode(linear_range=("0.1 mg/L as N", "1400 mg/L as N"), selectivity=DEMO_SELECTIVITY))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityRangeWarning)
        w("2. First try: the smallest (NH4)2SO4 stock that holds 0.5 mV at 2 mL per 100 mL\n\n")
        try:
            design_adjuster(stock={"(NH4)2SO4": 2.0}, volume_ratio=0.02, solve="stock", **job)
            w("   feasible\n\n")
        except InfeasibleDesignError as exc:
            w(f"   not possible — {exc}\n\n")
        w("3. So keep a 2 mol/L stock and solve for the smallest volume ratio instead\n\n")
        d = design_adjuster(stock={"(NH4)2SO4": 2.0}, volume_ratio=0.02, solve="ratio", max_ratio=0.5, **job)
        w(d.report() + "\n\n")
        c = compare_adjusters({"(NH4)2SO4": {"(NH4)2SO4": 2.0}, "Na2SO4": {"Na2SO4": 1.0},
                               "KCl": {"KCl": 2.0}}, volume_ratio=0.1, **job)
    w("4. Candidate adjusters at 10 mL per 100 mL, each at its smallest stock, ranked (feasible first,\n"
      "   then interference, then stock strength):\n\n")
    w(c.table() + "\n\n")
    w("Run `ionact design --example nitrate_irrigation` for the same job from a method file.\n")
