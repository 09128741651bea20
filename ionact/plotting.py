"""Shared figure helpers: a colour-blind-safe palette, and figures that never touch a backend.

Figures are made as :class:`matplotlib.figure.Figure` objects with an Agg canvas attached,
without pyplot, so the library never changes the user's backend and a figure returned as
a notebook cell's last value is shown once. Pass ``ax=`` to draw into your own axes.
"""

from __future__ import annotations

from typing import Any

__all__ = ["PALETTE", "MARKERS", "new_figure", "save"]

# Okabe & Ito (2008) colour-universal-design palette: distinguishable under the common colour-vision deficiencies.
PALETTE = ("#0072B2", "#E69F00", "#009E73", "#D55E00", "#CC79A7", "#56B4E9", "#F0E442", "#000000")
MARKERS = ("o", "^", "s", "D", "v", "P", "X", "*")
LINESTYLES = ("-", "--", ":", "-.")


def _png(fig: Any) -> bytes:
    import io

    buf = io.BytesIO()
    fig.savefig(buf, format="png", dpi=100)
    return buf.getvalue()


def _notebook_display() -> None:
    """Let IPython show a returned Figure as PNG when pyplot's inline support has not done so.

    Only a display formatter is added (when none is registered for Figure); no backend is
    selected or changed.
    """
    import sys

    if "IPython" not in sys.modules:
        return
    from IPython import get_ipython
    from matplotlib.figure import Figure

    ip = get_ipython()
    if ip is None:
        return
    fmt = ip.display_formatter.formatters["image/png"]
    try:
        fmt.lookup_by_type(Figure)
    except KeyError:  # nothing shows a Figure yet
        fmt.for_type(Figure, _png)


def new_figure(ncols: int = 1, figsize: tuple[float, float] = (7.0, 4.5)) -> tuple[Any, list[Any]]:
    """A pyplot-free Figure with ``ncols`` axes side by side."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    _notebook_display()
    fig = Figure(figsize=figsize, layout="constrained")
    FigureCanvasAgg(fig)
    axes = fig.subplots(1, ncols, squeeze=False)[0]
    return fig, list(axes)


def save(fig: Any, path: Any, dpi: int = 110) -> None:
    """Write a figure to a file (the format from the file's extension: png, pdf, svg)."""
    fig.savefig(path, dpi=dpi)
