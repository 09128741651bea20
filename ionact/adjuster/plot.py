"""The design figure: the search against the budget, and ΔE sample by sample."""

from __future__ import annotations

from typing import Any

import numpy as np

from ..errors import InputError
from ..plotting import MARKERS, PALETTE, new_figure, save
from ..species import typeset
from .design import AdjusterDesign

__all__ = ["plot_design"]


def _search_panel(d: AdjusterDesign, ax: Any) -> None:
    s = d.scan
    if not s:
        ax.text(0.5, 0.5, "no search (given design evaluated)", ha="center", va="center", transform=ax.transAxes)
        ax.set_axis_off()
        return
    x, y = np.asarray(s["x"], dtype=float), np.asarray(s["worst_mv"], dtype=float)
    valid = np.asarray(s.get("valid", np.ones_like(x, dtype=bool)), dtype=bool)
    ax.plot(x[valid], y[valid], "-", color=PALETTE[0], label="worst |ΔE| inside the model's range")
    if not valid.all():
        ax.plot(x[~valid], y[~valid], ":", color=PALETTE[0], label="outside the model's range")
    ax.axhline(d.budget_mv, color=PALETTE[3], ls="--", label=f"budget {d.budget_mv:.3g} mV")
    if s.get("solubility_limit") is not None:
        ax.axvline(float(s["solubility_limit"]), color=PALETTE[1], ls="-.", label="solubility limit")
    ax.plot([float(s["chosen"])], [d.worst_error_mv], marker="o", ls="none", color="k", label="this design")
    ax.set_xscale("log")
    ax.set_yscale("log")
    ax.set_xlabel(str(s["label"]))
    ax.set_ylabel("worst |ΔE| / mV")
    ax.set_title("residual error against the adjuster")
    ax.legend(fontsize=8, loc="best")


def _sample_panel(d: AdjusterDesign, ax: Any) -> None:
    g = d.gamma_profile
    if not g:
        ax.set_axis_off()
        return
    labels = list(g["labels"])
    dv = np.asarray(g["error_mv"], dtype=float)
    pos = np.arange(len(labels))
    failed = [c.name for c in d.checks if c.status == "fail"]
    ax.plot(pos, dv, marker=MARKERS[0], ls="none", color=PALETTE[0], label="worst |ΔE| of the sample")
    ax.axhline(d.budget_mv, color=PALETTE[3], ls="--", label=f"budget {d.budget_mv:.3g} mV")
    step = _label_step(ax, len(labels), fontsize=7.0)
    ax.set_xticks(pos[::step])
    ax.set_xticklabels(labels[::step], rotation=45, ha="right", fontsize=7)
    if step > 1:
        ax.set_xlabel(f"sample (one name in {step})", fontsize=8)
    ax.set_ylabel("|ΔE| / mV")
    ax.set_ylim(0, max(float(np.nanmax(dv)) if dv.size else 0.0, d.budget_mv) * 1.25)
    title = f"{typeset(d.analyte)} per sample ({d.model.name})"
    if failed:
        title += "\nfailed: " + ", ".join(failed)
    ax.set_title(title, fontsize=9, color=PALETTE[3] if failed else "k")
    ax.legend(fontsize=8, loc="upper left")


def _label_step(ax: Any, n: int, fontsize: float) -> int:
    """Name every k-th of ``n`` samples so that labels at 45° keep a line's height apart
    across the width the axes has (about 1.4 font sizes per label, along the axis)."""
    fig = ax.figure
    width_pt = ax.get_position().width * fig.get_figwidth() * 72.0
    fits = max(1, int(width_pt * np.sin(np.pi / 4) / (1.4 * fontsize)))
    return max(1, -(-n // fits))


def plot_design(d: AdjusterDesign, path: Any = None, *, ax: Any = None) -> Any:
    """Figure of a design: worst |ΔE| against the stock strength (or ratio) with the budget,
    the solubility limit and this design marked; and |ΔE| of every sample against the budget,
    with any failed check named.

    Parameters
    ----------
    path : str or path, optional
        Also write the figure there (format from the extension).
    ax : pair of matplotlib Axes, optional
        Draw into these two axes instead of a new figure.

    Returns
    -------
    matplotlib.figure.Figure
    """
    if ax is None:
        fig, axes = new_figure(2, (11.0, 4.4))
    else:
        try:
            axes = list(ax)
        except TypeError:
            raise InputError("ax must be a pair of matplotlib Axes for the two panels of the design figure") from None
        if len(axes) != 2:
            raise InputError("ax must be a pair of matplotlib Axes for the two panels of the design figure")
        fig = axes[0].figure
    _search_panel(d, axes[0])
    _sample_panel(d, axes[1])
    if path is not None:
        save(fig, path)
    return fig
