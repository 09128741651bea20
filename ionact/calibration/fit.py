"""Calibration of an ion-selective electrode from its standards.

The potential against the activity the electrode sees in each treated standard is fitted
either by the Nernstian line, E = E⁰ + S·log10 a, or by the Nikolsky–Eisenman form with a
background activity b that bends the curve at the low end, E = E⁰ + S·log10(a + b)
(weighted least squares where the scatter of each standard is given). ``fit="auto"``
takes the curved form only when the data ask for it (an F-test on the extra parameter at
95 %). The slope is accepted against a window of the theoretical (Nernstian) slope at the
measured temperature, 90–105 % by default (common practice), and the residuals of the
linear part against a linearity limit; failures are statuses with their numbers.

The detection limit is the IUPAC one: the activity where the extrapolated Nernstian line
meets the low-activity plateau — for the fitted curve exactly the background activity b.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from .._frozen import Record, readonly
from ..electrode import nernst_slope
from ..errors import InputError
from ..units import parse_scalar
from .context import Measurement, measurement_for, millivolts, molar_values

__all__ = ["Calibration", "CalibrationCheck", "calibrate", "FITS", "DEFAULT_SLOPE_WINDOW", "DEFAULT_LINEARITY_MV"]

FITS = ("auto", "nernst", "nikolsky")
DEFAULT_SLOPE_WINDOW = (90.0, 105.0)  # % of the Nernstian slope (common practice)
DEFAULT_LINEARITY_MV = 1.0  # largest residual of a standard in the linear range, mV (common practice)
F_TEST_LEVEL = 0.95  # the curved form is taken when its extra parameter is significant at this level


@dataclass(frozen=True, repr=False)
class CalibrationCheck(Record):
    """One acceptance check: ``status`` is "ok", "warning" or "fail"; ``value`` and ``limit``
    in ``unit``; ``detail`` in words."""

    name: str
    status: str
    value: float
    limit: str
    unit: str
    detail: str

    def __str__(self) -> str:
        return (f"[{self.status.upper():^7}] {self.name}: {self.value:.4g} {self.unit} (limit {self.limit}); "
                f"{self.detail}")


@dataclass(frozen=True, repr=False)
class Calibration(Record):
    """A fitted calibration: the numbers every later step (quantitation, detection limit,
    the batch check's calibrated range) reads.

    Attributes
    ----------
    measurement : Measurement
        The analyte, temperature, model and treated matrix (conversions go through it).
    concentrations : ndarray
        The standards as prepared, mol/L (in the order given).
    activities : ndarray
        The analyte's activity in each treated standard (what the electrode sees).
    potentials_mv, sd_mv : ndarray
        Measured potentials and, where given, their replicate standard deviations (mV).
    fit : {"nernst", "nikolsky", "two-point"}
    e0_mv, slope_mv : float
        E⁰ (mV) and slope (mV per decade of activity).
    background : float
        Nikolsky–Eisenman background activity b (0 for the Nernstian line).
    covariance : ndarray
        Covariance of (E⁰, S) or (E⁰, S, log10 b); NaN for a two-point calibration.
    residual_sd_mv : float
        Scatter of one reading about the fit (mV); NaN with no degrees of freedom.
    dof : int
        Degrees of freedom of the fit.
    residuals_mv : ndarray
    theoretical_slope_mv, slope_percent : float
        The Nernstian slope at the temperature and the fitted slope as its percentage.
    detection_limit : float
        Concentration (mol/L, as prepared) at the IUPAC detection limit; NaN when the data
        show no curvature (then it lies below the lowest standard).
    detection_limit_activity : float
    linear_range : tuple of float
        Concentrations (mol/L) over which the fit is Nernstian within the linearity limit.
    checks : tuple of CalibrationCheck
    status : {"ok", "warning", "fail"}
    notes : tuple of str
    """

    measurement: Measurement
    concentrations: np.ndarray
    activities: np.ndarray
    potentials_mv: np.ndarray
    sd_mv: np.ndarray | None
    fit: str
    e0_mv: float
    slope_mv: float
    background: float
    covariance: np.ndarray
    residual_sd_mv: float
    dof: int
    residuals_mv: np.ndarray
    theoretical_slope_mv: float
    slope_percent: float
    detection_limit: float
    detection_limit_activity: float
    linear_range: tuple[float, float]
    checks: tuple[CalibrationCheck, ...]
    status: str
    notes: tuple[str, ...] = ()

    def __post_init__(self) -> None:
        for name in ("concentrations", "activities", "potentials_mv", "covariance", "residuals_mv"):
            object.__setattr__(self, name, readonly(np.asarray(getattr(self, name), dtype=float)))
        if self.sd_mv is not None:
            object.__setattr__(self, "sd_mv", readonly(np.asarray(self.sd_mv, dtype=float)))
        object.__setattr__(self, "linear_range", (float(self.linear_range[0]), float(self.linear_range[1])))

    @property
    def analyte(self) -> str:
        return self.measurement.analyte

    @property
    def calibrated_range(self) -> tuple[float, float]:
        """The lowest and highest standard (mol/L as prepared): where results are reported
        (from the fitted curve, which may bend below the linear range)."""
        return float(self.concentrations.min()), float(self.concentrations.max())

    @property
    def parameters(self) -> np.ndarray:
        """(E⁰, S) or (E⁰, S, log10 b)."""
        if self.fit == "nikolsky":
            return np.array([self.e0_mv, self.slope_mv, math.log10(self.background)])
        return np.array([self.e0_mv, self.slope_mv])

    def potential(self, activity: Any) -> np.ndarray:
        """The fitted potential (mV) at activities in the measured mixture."""
        return np.asarray(self.e0_mv + self.slope_mv * np.log10(np.asarray(activity, dtype=float) + self.background))

    def activity(self, potential_mv: Any) -> np.ndarray:
        """The activity in the measured mixture for potentials (mV); ≤ 0 below the detection limit."""
        x = (np.asarray(potential_mv, dtype=float) - self.e0_mv) / self.slope_mv
        return np.asarray(np.power(10.0, x) - self.background)

    def report(self) -> str:
        """The fit, its acceptance and the limits, as text."""
        from ..species import typeset

        u = "mol/L"
        lines = [f"Calibration of the {typeset(self.analyte)} electrode at {self.measurement.temperature:g} °C "
                 f"({self.concentrations.size} standards, fit: {self.fit}, activities by {self.measurement.model})",
                 f"  E0        {self.e0_mv:.2f} mV" + _pm(self.covariance, 0),
                 f"  slope     {self.slope_mv:.2f} mV/decade" + _pm(self.covariance, 1)
                 + f"  = {self.slope_percent:.1f} % of Nernstian ({self.theoretical_slope_mv:.2f})"]
        if self.fit == "nikolsky":
            lines.append(f"  background activity b = {self.background:.3g}")
        lines.append(f"  residual SD {self.residual_sd_mv:.3g} mV on {self.dof} degrees of freedom")
        dl = (f"{self.detection_limit:.3g} {u} (activity {self.detection_limit_activity:.3g})"
              if math.isfinite(self.detection_limit) else "below the lowest standard (no curvature in the data)")
        lines.append(f"  detection limit (IUPAC): {dl}")
        lines.append(f"  linear range: {self.linear_range[0]:.3g} – {self.linear_range[1]:.3g} {u}")
        lines.append(f"  {'conc. mol/L':>12} {'activity':>11} {'E mV':>9} {'residual':>9}")
        for c, a, e, r in zip(self.concentrations, self.activities, self.potentials_mv, self.residuals_mv,
                              strict=True):
            lines.append(f"  {c:>12.4g} {a:>11.4g} {e:>9.2f} {r:>+9.3f}")
        lines += [f"  {c}" for c in self.checks]
        lines.append(f"Result: {self.status}")
        lines += [f"note: {n}" for n in self.notes]
        return "\n".join(lines)

    def plot(self, ax: Any = None) -> Any:
        """E against log10 activity with the fit, the Nernstian line, the detection-limit
        construction and the residuals (see :func:`ionact.calibration.plot.plot_calibration`)."""
        from .plot import plot_calibration

        return plot_calibration(self, ax=ax)


def _pm(cov: np.ndarray, i: int) -> str:
    v = float(cov[i, i]) if cov.shape[0] > i else math.nan
    return f" ± {math.sqrt(v):.2f} (SE)" if math.isfinite(v) and v >= 0 else ""


def calibrate(analyte: Any, concentrations: Any, potentials_mv: Any, *, temperature: Any = 25.0, design: Any = None,
              matrix: Any = None, model: str | None = None, fit: str = "auto", sd_mv: Any = None,
              counter_ion: Any = None, slope_window: Sequence[float] = DEFAULT_SLOPE_WINDOW,
              linearity_mv: float = DEFAULT_LINEARITY_MV, activities: Any = None) -> Calibration:
    """Fit a calibration from standards and their potentials.

    Parameters
    ----------
    analyte : str or Ion
        The measured ion, e.g. "F-".
    concentrations : sequence
        The standards as prepared: mol/L, or unit strings ("0.1 mg/L"); listed in increasing
        (or decreasing) order, no value twice (replicates go into ``sd_mv``).
    potentials_mv : sequence
        One potential (mV) per standard.
    temperature : float or str
        °C of the measurement (the theoretical slope is taken there).
    design : AdjusterDesign or its dict, optional
        The standards were mixed with this design's adjuster in its ratio: activities are
        those of the treated standards, with the design's model and counter-ion.
    matrix : Solution, optional
        Otherwise, the background of the standards (pure water when None).
    model : str, optional
        Activity model (default: the design's, else "auto").
    fit : {"auto", "nernst", "nikolsky"}
        The calibration function: a straight line in log a, the curved form with a constant
        background activity, or the curved form only where an F-test supports it.
    sd_mv : sequence, optional
        Replicate standard deviation of each standard's potential (mV): weights 1/sd².
    counter_ion : str, optional
        The ion accompanying the analyte in the standards.
    slope_window : (low, high)
        Accepted slope, % of Nernstian.
    linearity_mv : float
        Largest residual (mV) of a standard inside the linear range.
    activities : sequence, optional
        Standards given by their activity in the measured solution instead (pass
        ``concentrations=None``); their concentrations follow through the same path.

    Returns
    -------
    Calibration
        E°, slope (mV/decade and % of Nernstian), their covariance, detection limit (mol/L),
        linear range, residuals, and the measurement context.

    Raises
    ------
    InputError
        Fewer than two standards, duplicated or unordered concentrations, potentials that
        are not numbers, lengths that differ, an unknown fit.

    References
    ----------
    R. P. Buck and E. Lindner, Pure Appl. Chem. 66 (1994) 2527 (IUPAC recommendations for
    ion-selective electrodes: slope, detection limit, linear range; from memory).

    Examples
    --------
    >>> import ionact as ia
    >>> cal = ia.calibrate("F-", [1e-5, 1e-4, 1e-3, 1e-2], [120.1, 61.0, 2.1, -56.9], model="davies")
    >>> round(cal.slope_mv, 2), round(cal.slope_percent, 1), cal.fit
    (-59.87, 101.2, 'nernst')
    """
    if fit not in FITS:
        raise InputError(f"fit {fit!r} is not one of {', '.join(FITS)}", value=fit, allowed=", ".join(FITS),
                         field="fit")
    lo_w, hi_w = _window(slope_window)
    if not (isinstance(linearity_mv, int | float) and not isinstance(linearity_mv, bool)
            and math.isfinite(linearity_mv) and linearity_mv > 0):
        raise InputError(f"linearity_mv {linearity_mv!r} must be a positive number of mV", value=linearity_mv,
                         allowed="> 0", field="linearity_mv")
    meas = measurement_for(analyte, temperature=temperature, design=design, matrix=matrix, model=model,
                           counter_ion=counter_ion)
    if (concentrations is None) == (activities is None):
        raise InputError("give the standards' concentrations or their activities (one of the two)",
                         field="concentrations")
    e = millivolts(potentials_mv, "potentials_mv")
    if activities is not None:
        try:
            a_given = np.asarray([parse_scalar(v, "", f"activities[{i}]") for i, v in enumerate(activities)])
        except TypeError:
            raise InputError(f"activities {activities!r} must be a sequence of numbers", field="activities") from None
        if np.any(~(a_given > 0)):
            raise InputError("activities must be positive numbers", field="activities")
        c = meas.concentration(a_given)
    else:
        c = molar_values(concentrations, meas.ion, "concentrations")
    _check_series(c, e)
    sd = None if sd_mv is None else millivolts(sd_mv, "sd_mv")
    if sd is not None and (sd.size != c.size or np.any(~(sd > 0))):
        raise InputError(f"sd_mv needs one positive value per standard ({c.size})", field="sd_mv")
    a = meas.activity(c)
    x = np.log10(a)
    w = np.ones_like(x) if sd is None else 1.0 / sd**2
    theory = float(nernst_slope(meas.ion.charge, meas.temperature))
    notes: list[str] = []
    if c.size == 2:
        params, cov, ssr, dof, kind = *_line(x, e, w), "two-point"
        notes.append("two-point calibration: the line passes through both standards; no uncertainty")
    else:
        p1, c1, s1, d1 = _line(x, e, w)
        params, cov, ssr, dof, kind = p1, c1, s1, d1, "nernst"
        if fit in ("auto", "nikolsky") and c.size >= 4:
            curved = _nikolsky(x, e, w, p1)
            if curved is not None and (fit == "nikolsky" or _better(s1, d1, curved[2], curved[3])):
                params, cov, ssr, dof, kind = (*curved, "nikolsky")
        elif fit == "nikolsky":
            raise InputError("the Nikolsky–Eisenman fit needs at least four standards", field="fit")
    e0, slope = float(params[0]), float(params[1])
    b = float(10.0 ** params[2]) if kind == "nikolsky" else 0.0
    resid = e - (e0 + slope * np.log10(a + b))
    sigma = math.sqrt(ssr / dof) if dof > 0 else math.nan
    if sd is not None and dof > 0:
        notes.append("weighted by 1/sd²; the residual SD is relative to the stated scatter (1 = as stated)")
    cal_partial = dict(measurement=meas, concentrations=c, activities=a, potentials_mv=e, sd_mv=sd, fit=kind,
                       e0_mv=e0, slope_mv=slope, background=b, covariance=cov, residual_sd_mv=sigma, dof=dof,
                       residuals_mv=resid, theoretical_slope_mv=theory, slope_percent=100.0 * slope / theory)
    dl_a, lin_a = _limits(a, b, slope, linearity_mv)
    dl_c = float(meas.concentration(np.array([dl_a]))[0]) if math.isfinite(dl_a) else math.nan
    lin_c = (float(c.min()) if lin_a is None else float(meas.concentration(np.array([lin_a]))[0]), float(c.max()))
    checks = _checks(100.0 * slope / theory, (lo_w, hi_w), resid, a, lin_a, linearity_mv, theory, slope)
    status = "fail" if any(k.status == "fail" for k in checks) else (
        "warning" if any(k.status == "warning" for k in checks) else "ok")
    return Calibration(**cal_partial, detection_limit=dl_c, detection_limit_activity=dl_a,  # type: ignore[arg-type]
                       linear_range=lin_c, checks=tuple(checks), status=status, notes=tuple(notes))


def _window(w: Sequence[float]) -> tuple[float, float]:
    try:
        lo, hi = (float(v) for v in w)
    except (TypeError, ValueError):
        raise InputError(f"slope_window {w!r} must be two numbers (% of Nernstian)", field="slope_window") from None
    if not (0 < lo < hi):
        raise InputError(f"slope_window {w!r} must be 0 < low < high (% of Nernstian)", field="slope_window")
    return lo, hi


def _check_series(c: np.ndarray, e: np.ndarray) -> None:
    if c.size < 2:
        raise InputError(f"a calibration needs at least two standards, got {c.size}", value=c.size, allowed="≥ 2",
                         field="concentrations")
    if e.size != c.size:
        raise InputError(f"{c.size} concentrations but {e.size} potentials", field="potentials_mv")
    d = np.diff(c)
    dup = np.flatnonzero(d == 0)
    if dup.size:
        raise InputError(f"standard {c[dup[0]]:g} mol/L appears twice (positions {dup[0] + 1} and {dup[0] + 2}); "
                         "give replicates as one standard with sd_mv", value=float(c[dup[0]]),
                         field="concentrations")
    if not (np.all(d > 0) or np.all(d < 0)):
        k = int(np.flatnonzero(np.sign(d) != np.sign(d[0]))[0])  # d[k] turns against d[0]: c[k + 1] breaks it
        raise InputError(f"standards must be listed in increasing or decreasing concentration: {c[k + 1]:g} mol/L "
                         f"at position {k + 2} breaks the order", value=float(c[k + 1]), field="concentrations")


def _line(x: np.ndarray, e: np.ndarray, w: np.ndarray) -> tuple[np.ndarray, np.ndarray, float, int]:
    """Weighted least squares E = E⁰ + S x: parameters, covariance, weighted SSR, dof."""
    X = np.column_stack([np.ones_like(x), x])
    sw = np.sqrt(w)
    p, *_ = np.linalg.lstsq(X * sw[:, None], e * sw, rcond=None)
    r = e - X @ p
    ssr = float(np.sum(w * r * r))
    dof = x.size - 2
    if dof <= 0:
        return p, np.full((2, 2), np.nan), ssr, 0
    cov = np.linalg.inv(X.T @ (X * w[:, None])) * (ssr / dof)
    return p, cov, ssr, dof


def _nikolsky(x: np.ndarray, e: np.ndarray, w: np.ndarray, start: np.ndarray
              ) -> tuple[np.ndarray, np.ndarray, float, int] | None:
    """Weighted least squares E = E⁰ + S log10(10^x + 10^lb) (scipy's least_squares)."""
    from scipy.optimize import least_squares

    sw = np.sqrt(w)

    def res(p: np.ndarray) -> np.ndarray:
        return np.asarray((e - (p[0] + p[1] * np.logaddexp(x * np.log(10), p[2] * np.log(10)) / np.log(10))) * sw)

    best = None
    for lb0 in (x.min() - 1.0, x.min(), x.min() + 1.0):
        sol = least_squares(res, np.array([start[0], start[1], lb0]), method="lm", xtol=1e-15, ftol=1e-15,
                            gtol=1e-15, max_nfev=5000)
        if best is None or sol.cost < best.cost:
            best = sol
    if best is None or not best.success or not np.all(np.isfinite(best.x)):
        return None
    dof = x.size - 3
    ssr = float(2.0 * best.cost)
    jac = best.jac
    try:
        jtj_inv = np.linalg.inv(jac.T @ jac)
    except np.linalg.LinAlgError:
        return None
    cov = jtj_inv * (ssr / dof) if dof > 0 else np.full((3, 3), np.nan)
    return np.asarray(best.x), cov, ssr, dof


def _better(ssr1: float, dof1: int, ssr2: float, dof2: int) -> bool:
    """Is the curved fit significantly better (F-test on one extra parameter)?"""
    from scipy.stats import f as f_dist

    if dof2 <= 0:
        return False
    scale = max(ssr1, 1e-300)
    if ssr1 <= 1e-20 * max(1.0, scale):  # a line that fits exactly needs no curve
        return False
    if ssr2 <= 1e-24 * scale:
        return True
    stat = (ssr1 - ssr2) / (ssr2 / dof2)
    return bool(stat > f_dist.ppf(F_TEST_LEVEL, 1, dof2))


def _limits(a: np.ndarray, b: float, slope: float, linearity_mv: float) -> tuple[float, float | None]:
    """Detection-limit activity (the intersection of the Nernstian line and the plateau: b),
    and the lowest activity inside the linear range (the curve within ``linearity_mv`` of the
    line: S·log10((a + b)/a) ≤ δ), or None for a Nernstian fit."""
    if b <= 0:
        return math.nan, None
    low = b / (10.0 ** (linearity_mv / abs(slope)) - 1.0)
    return b, float(min(max(low, float(a.min())), float(a.max())))


def _checks(percent: float, window: tuple[float, float], resid: np.ndarray, a: np.ndarray, lin_a: float | None,
            linearity_mv: float, theory: float, slope: float) -> list[CalibrationCheck]:
    lo, hi = window
    out = []
    if slope * theory <= 0:
        out.append(CalibrationCheck("slope", "fail", percent, f"{lo:g}–{hi:g}", "% of Nernstian",
                                    f"the slope {slope:.2f} mV/decade has the wrong sign for this ion "
                                    f"(Nernstian {theory:.2f}): check the electrode and the standards' order"))
    else:
        ok = lo <= percent <= hi
        out.append(CalibrationCheck("slope", "ok" if ok else "fail", percent, f"{lo:g}–{hi:g}", "% of Nernstian",
                                    f"{slope:.2f} mV/decade against {theory:.2f}"
                                    + ("" if ok else ": recondition or replace the electrode, or remake the "
                                       "standards")))
    inside = a >= (lin_a if lin_a is not None else -np.inf)
    worst = float(np.max(np.abs(resid[inside]))) if np.any(inside) else math.nan
    ok_lin = not (worst > linearity_mv)
    out.append(CalibrationCheck("linearity", "ok" if ok_lin else "warning", worst, f"≤ {linearity_mv:g}", "mV",
                                f"largest residual of the {int(np.sum(inside))} standards in the linear range"))
    return out
