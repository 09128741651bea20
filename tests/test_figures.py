"""Every figure the library draws, audited as it is rendered: no tick labels on top of each
other, legends that cover no data point, and legend entries that differ by marker or line
style as well as by colour (so they stay apart under colour-vision deficiencies)."""

from __future__ import annotations

import warnings
from collections.abc import Callable
from typing import Any

import numpy as np
import pytest

import ionact as ia

pytest.importorskip("matplotlib")


def _design(solve: str) -> Any:
    return ia.design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, samples=ia.SamplePopulation(ionic_strength=(0.0, 0.05)),
                              analyte_range=(1e-5, 1e-3), budget=ia.Budget(mv=0.5), solve=solve, model="davies")


def _batch() -> Any:
    d = _design("none")
    rng = np.random.default_rng(4)  # invented samples spread over the range and beyond it
    n = 60
    return ia.check_samples({"sample_id": [f"s{k}" for k in range(n)],
                             "analyte": list(10 ** rng.uniform(-6.5, -1.5, n)),
                             "ionic_strength": list(10 ** rng.uniform(-4, 0, n))}, d)


def _calibration(curved: bool) -> Any:
    conc = [1e-6, 3e-6, 1e-5, 1e-4, 1e-3, 1e-2] if curved else [1e-5, 1e-4, 1e-3, 1e-2]
    # invented readings: Nernstian with a background of 2e-6 mol/L when curved
    mv = [float(100.0 - 59.16 * np.log10(c + (2e-6 if curved else 0.0)) - 295.8) for c in conc]
    return ia.calibrate("F-", conc, mv, model="davies", fit="nikolsky" if curved else "nernst")


def _many_matrices() -> Any:
    k = np.geomspace(1e-4, 0.05, 40)  # invented matrices: a NaCl series with some sulfate
    mats = ia.Solution.from_salts({"NaCl": k, "Na2SO4": k / 10})
    return ia.design_adjuster("NO3-", {"(NH4)2SO4": 2.0}, samples=mats, analyte_range=(1e-5, 1e-3),
                              budget=ia.Budget(mv=0.5), solve="none", model="davies", equilibrium=False)


FIGURES: dict[str, Callable[[], Any]] = {
    "design over 40 matrices": lambda: _many_matrices().plot(),
    "design, stock solved": lambda: _design("stock").plot(),
    "design, evaluated": lambda: _design("none").plot(),
    "batch check": lambda: _batch().plot(),
    "calibration, straight": lambda: _calibration(False).plot(),
    "calibration, with a detection limit": lambda: _calibration(True).plot(),
}


@pytest.fixture(scope="module", params=sorted(FIGURES))
def drawn(request: Any) -> tuple[str, Any, Any]:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ia.ValidityRangeWarning)
        fig = FIGURES[request.param]()
    fig.canvas.draw()
    return request.param, fig, fig.canvas.get_renderer()


def _overlaps(boxes: list[Any]) -> list[tuple[int, int]]:
    return [(i, j) for i in range(len(boxes)) for j in range(i + 1, len(boxes))
            if boxes[i].overlaps(boxes[j]) and boxes[i].intersection(boxes[i], boxes[j]).width > 1
            and boxes[i].intersection(boxes[i], boxes[j]).height > 1]


def _rotated_clashes(labels: list[Any], renderer: Any) -> list[tuple[str, str]]:
    """Rotated labels are parallel strips: neighbours a distance d apart along the axis are
    d·sin θ apart across their text, which must exceed the text's height."""
    theta = np.deg2rad(labels[0].get_rotation())
    pos = [t.get_window_extent(renderer) for t in labels]
    centres = sorted(((b.x0 + b.x1) / 2, t) for b, t in zip(pos, labels, strict=True))
    height = max(renderer.points_to_pixels(t.get_fontsize()) for t in labels)
    return [(a.get_text(), b.get_text()) for (xa, a), (xb, b) in zip(centres, centres[1:], strict=False)
            if abs(xb - xa) * abs(np.sin(theta)) < height]


def test_tick_labels_do_not_overlap(drawn):
    name, fig, renderer = drawn
    for ax in fig.axes:
        for axis in (ax.xaxis, ax.yaxis):
            labels = [t for t in axis.get_ticklabels(minor=False) + axis.get_ticklabels(minor=True)
                      if t.get_visible() and t.get_text()]
            if not labels:
                continue
            if labels[0].get_rotation() % 180:
                clash = _rotated_clashes(labels, renderer)
            else:
                boxes = [t.get_window_extent(renderer) for t in labels]
                clash = [(labels[i].get_text(), labels[j].get_text()) for i, j in _overlaps(boxes)]
            assert clash == [], f"{name}: overlapping tick labels {clash}"


def _data_points(ax: Any) -> np.ndarray:
    pts = [line.get_xydata() for line in ax.get_lines() if line.get_label() and len(line.get_xydata())]
    pts += [c.get_offsets() for c in ax.collections if hasattr(c, "get_offsets") and len(c.get_offsets())]
    data = [np.asarray(p, dtype=float) for p in pts if np.size(p)]
    if not data:
        return np.empty((0, 2))
    xy = np.concatenate([d.reshape(-1, 2) for d in data])
    xy = xy[np.all(np.isfinite(xy), axis=1)]
    return np.asarray(ax.transData.transform(xy))


def _legends(fig: Any) -> list[tuple[Any, Any]]:
    """(axes, legend) of every axes that carries a legend."""
    return [(ax, ax.get_legend()) for ax in fig.axes if ax.get_legend() is not None]


def test_legends_cover_no_data(drawn):
    name, fig, renderer = drawn
    for ax, legend in _legends(fig):
        box = legend.get_window_extent(renderer)
        pts = _data_points(ax)
        inside = (pts[:, 0] > box.x0) & (pts[:, 0] < box.x1) & (pts[:, 1] > box.y0) & (pts[:, 1] < box.y1)
        assert int(inside.sum()) == 0, f"{name}: the legend covers {int(inside.sum())} data points"


def test_legend_entries_differ_without_colour(drawn):
    name, fig, _ = drawn
    for _ax, legend in _legends(fig):
        keys = []
        for handle in legend.legend_handles:
            if hasattr(handle, "get_linestyle") and hasattr(handle, "get_marker"):
                ls = handle.get_linestyle() if handle.get_linewidth() > 0 else "None"
                keys.append((handle.get_marker(), ls))
            elif hasattr(handle, "get_paths") and hasattr(handle, "get_offsets"):  # a scatter
                keys.append((str(handle.get_paths()[0].vertices.round(2).tolist()), "None"))
            else:  # a filled area
                keys.append(("patch", type(handle).__name__))
        dupes = {k for k in keys if keys.count(k) > 1}
        assert not dupes, f"{name}: legend entries told apart by colour only: {dupes}"


def test_every_axis_is_labelled(drawn):
    name, fig, _ = drawn
    for ax in fig.axes:
        if not ax.axison:
            continue
        assert ax.get_xlabel() or ax.get_xticklabels(), name
        assert ax.get_ylabel(), f"{name}: an axis without a y label"
