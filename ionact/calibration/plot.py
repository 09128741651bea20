"""The calibration figure: E against log10 activity with the fit, the Nernstian line, the
detection-limit construction, and the residuals (pyplot-free; see :mod:`ionact.plotting`)."""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from ..plotting import PALETTE, new_figure
from ..species import typeset

__all__ = ["plot_calibration"]


def plot_calibration(cal: Any, ax: Any = None) -> Any:
    """Draw ``cal`` (a :class:`Calibration`); returns the Figure (or ``ax``'s figure when given,
    where only the main panel is drawn)."""
    if ax is None:
        fig, (main, res) = new_figure(2, figsize=(10.0, 4.2))
    else:
        fig, main, res = ax.figure, ax, None
    la = np.log10(cal.activities)
    lo = float(la.min()) - 1.0
    if cal.background > 0:
        lo = min(lo, math.log10(cal.background) - 1.0)
    grid = np.linspace(lo, float(la.max()) + 0.3, 200)
    a = np.power(10.0, grid)
    main.plot(la, cal.potentials_mv, ls="none", marker="o", color=PALETTE[0], label="standards")
    main.plot(grid, cal.potential(a), color=PALETTE[0], lw=1.2, label=f"fit ({cal.fit})")
    main.plot(grid, cal.e0_mv + cal.slope_mv * grid, color=PALETTE[1], ls="--", lw=1.0,
              label=f"Nernstian segment, {cal.slope_percent:.1f} % of theory")
    if cal.background > 0:
        plateau = cal.e0_mv + cal.slope_mv * math.log10(cal.background)
        main.axhline(plateau, color=PALETTE[2], ls=":", lw=1.0, label="plateau")
        main.axvline(math.log10(cal.background), color=PALETTE[3], ls="-.", lw=1.0,
                     label=f"detection limit (a = {cal.background:.2g})")
    lin = cal.linear_range
    main.set_xlabel(f"log10 a({typeset(cal.analyte)}) in the measured solution")
    main.set_ylabel("E / mV")
    main.set_title(f"calibration at {cal.measurement.temperature:g} °C; linear {lin[0]:.3g}–{lin[1]:.3g} mol/L",
                   fontsize=10)
    main.legend(frameon=False, fontsize=8)
    if res is not None:
        res.axhline(0.0, color="0.5", lw=0.8)
        res.plot(la, cal.residuals_mv, ls="none", marker="o", color=PALETTE[0])
        res.set_xlabel(f"log10 a({typeset(cal.analyte)})")
        res.set_ylabel("residual / mV")
        res.set_title(f"residual SD {cal.residual_sd_mv:.3g} mV", fontsize=10)
    return fig
