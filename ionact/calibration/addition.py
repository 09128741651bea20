"""Standard addition: the sample's concentration from the potential change a known spike brings.

Three methods, each corrected for the volume the spike adds and — through the activity
model of the one evaluation path — for the change in ionic strength it brings:

* **known addition** (one spike): solve S·log10(a₁/a₀) = ΔE for the sample concentration,
  where a₀ is the analyte's activity in the sample and a₁ after the spike (the sample's
  matrix diluted by the spike). With γ held constant this is the classical
  c = C_s V_s/(V_x+V_s) / (10^(ΔE/S) − V_x/(V_x+V_s)).
* **multiple addition** (Gran): G_i = (V_x+V_i)·10^((E_i−E_0)/S)·γ₀/γ_i is linear in the
  added volume V_i and crosses zero at V_e = −c V_x / C_s.
* **double known addition**: two spikes give two potential changes, enough for both the
  concentration and the slope (the ratio ΔE₂/ΔE₁ depends on the concentration alone).

Volumes are mL or unit strings; concentrations mol/L or unit strings; potentials mV.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from .._frozen import Record, readonly
from ..electrode import nernst_slope
from ..errors import InputError
from ..units import parse_scalar
from .context import Measurement, measurement_for, millivolts, molar_values
from .fit import Calibration

__all__ = ["AdditionResult", "known_addition", "multiple_addition", "double_addition", "DEFAULT_READING_SD_MV"]

DEFAULT_READING_SD_MV = 0.1  # standard deviation of one potential reading without a calibration (common practice)


@dataclass(frozen=True, repr=False)
class AdditionResult(Record):
    """A standard-addition result.

    Attributes
    ----------
    method : str
    analyte : str
    concentration : float
        mol/L in the sample as taken.
    uncertainty : float
        Standard uncertainty of ``concentration`` (mol/L), from the slope's and the
        readings' uncertainties.
    slope_mv : float
        The slope used (given, from a calibration, or — for double addition — found).
    slope_source : str
    gran_volumes_ml, gran_values : ndarray
        The Gran plot's points (multiple addition; empty otherwise).
    notes : tuple of str
    """

    method: str
    analyte: str
    concentration: float
    uncertainty: float
    slope_mv: float
    slope_source: str
    gran_volumes_ml: np.ndarray = field(default_factory=lambda: np.zeros(0))
    gran_values: np.ndarray = field(default_factory=lambda: np.zeros(0))
    notes: tuple[str, ...] = ()

    def __post_init__(self) -> None:
        object.__setattr__(self, "gran_volumes_ml", readonly(np.asarray(self.gran_volumes_ml, dtype=float)))
        object.__setattr__(self, "gran_values", readonly(np.asarray(self.gran_values, dtype=float)))

    @property
    def relative_uncertainty(self) -> float:
        return self.uncertainty / self.concentration if self.concentration > 0 else math.nan

    def report(self, unit: str = "mol/L") -> str:
        from ..species import resolve_ion, typeset
        from ..units import MOLAR, convert_amount

        f = float(np.asarray(convert_amount(1.0, MOLAR, unit, resolve_ion(self.analyte))))
        lines = [f"{self.method} for {typeset(self.analyte)}: {self.concentration * f:.4g} ± "
                 f"{self.uncertainty * f:.2g} {unit} (standard uncertainty, {self.relative_uncertainty:.1%})",
                 f"  slope {self.slope_mv:.2f} mV/decade ({self.slope_source})"]
        lines += [f"note: {n}" for n in self.notes]
        return "\n".join(lines)


def _volume(v: Any, what: str) -> float:
    x = parse_scalar(v, "mL", what)
    if not x > 0:
        raise InputError(f"{what} {v!r} must be a positive volume", value=v, allowed="> 0 mL", field=what)
    return x


def _slope(meas: Measurement, slope_mv: Any, calibration: Calibration | None) -> tuple[float, float, str]:
    """The slope, its standard uncertainty and where it comes from."""
    theory = float(nernst_slope(meas.ion.charge, meas.temperature))
    if slope_mv is not None and calibration is not None:
        raise InputError("give slope_mv or calibration, not both")
    if calibration is not None:
        s, var = calibration.slope_mv, float(calibration.covariance[1, 1])
        src = "from the calibration"
    elif slope_mv is not None:
        s, var, src = parse_scalar(slope_mv, "mV", "slope_mv"), 0.0, "given"
    else:
        s, var, src = theory, 0.0, "Nernstian at the temperature (no calibration given)"
    if s * theory <= 0:
        raise InputError(f"slope {s:g} mV/decade has the wrong sign for {meas.analyte} (Nernstian {theory:.2f})",
                         value=s, allowed="the sign of z", field="slope_mv")
    return s, (math.sqrt(var) if math.isfinite(var) and var > 0 else 0.0), src


def _diluted(meas: Measurement, f: float) -> Measurement:
    """The same measurement with the sample's matrix diluted to ``f`` of its strength."""
    if not meas.matrix:
        return meas
    return Measurement(meas.analyte, meas.temperature, meas.model, meas.counter_ion,
                       {k: v * f for k, v in meas.matrix.items()}, meas.dilution, meas.density, meas.equilibrium,
                       meas.custom_ions)


def _context(analyte: Any, temperature: Any, matrix: Any, model: str | None, counter_ion: Any,
             calibration: Calibration | None) -> Measurement:
    """The sample's measurement: its own matrix (diluted by the spikes), not the standards'."""
    if calibration is not None and calibration.analyte != measurement_for(analyte).analyte:
        raise InputError(f"the calibration is for {calibration.analyte}, not {analyte}")
    return measurement_for(analyte, temperature=temperature, matrix=matrix, model=model, counter_ion=counter_ion)


def _log_ratio(meas: Measurement, cx: float, vx: float, vs: Sequence[float], cs: float) -> np.ndarray:
    """log10(a_i/a_0) after cumulative spikes vs (mL) of cs (mol/L) into vx of a sample at cx."""
    out = []
    a0 = float(meas.activity(np.array([cx]))[0])
    for v in vs:
        f = vx / (vx + v)
        c = (cx * vx + cs * v) / (vx + v)
        a = float(_diluted(meas, f).activity(np.array([c]))[0])
        out.append(math.log10(a / a0))
    return np.array(out)


def _solve_cx(g: Any, lo: float, hi: float) -> float:
    from scipy.optimize import brentq

    llo, lhi = math.log(lo), math.log(hi)
    flo, fhi = g(lo), g(hi)
    for _ in range(60):
        if flo * fhi < 0:
            break
        llo, lhi = llo - 2.0, lhi + 2.0
        flo, fhi = g(math.exp(llo)), g(math.exp(lhi))
    else:
        raise InputError("no sample concentration reproduces these potential changes: check the signs and the slope")
    return math.exp(brentq(lambda lx: g(math.exp(lx)), llo, lhi, xtol=1e-14, rtol=1e-12))


def known_addition(analyte: Any, *, sample_volume: Any, spike_volume: Any, spike_concentration: Any,
                   delta_mv: Any, slope_mv: Any = None, calibration: Calibration | None = None,
                   matrix: Any = None, temperature: Any = 25.0, model: str | None = None, counter_ion: Any = None,
                   reading_sd_mv: float | None = None) -> AdditionResult:
    """Single known addition: the sample's concentration from one spike and one potential change.

    Parameters
    ----------
    analyte : str or Ion
        The measured ion.
    sample_volume, spike_volume : float or str
        mL, or unit strings.
    spike_concentration : float or str
        mol/L or a unit string.
    delta_mv : float
        E(after) − E(before), mV.
    slope_mv : float, optional
        The electrode's slope, mV/decade (default: the calibration's, else Nernstian at the
        temperature).
    calibration : Calibration, optional
        A calibration whose slope (and residual SD) to use.
    matrix : Solution, optional
        The sample's background (diluted by the spike); pure water when None.
    temperature : float or str
        °C.
    model : str, optional
        Activity model for the γ change that the spike causes (default "auto").
    counter_ion : str, optional
        The ion accompanying the analyte in the spike.
    reading_sd_mv : float, optional
        Standard deviation of one reading (default: the calibration's residual SD, else 0.1 mV).

    Returns
    -------
    AdditionResult
        Concentration (mol/L) with its standard uncertainty, and the notes of the evaluation.

    Raises
    ------
    InputError
        Non-positive volumes or concentration, a potential change of the wrong sign for the
        analyte, or a non-finite value.

    References
    ----------
    Known addition as in Buck and Lindner, Pure Appl. Chem. 66 (1994) 2527; the γ
    correction for the spike's change of ionic strength is common practice.

    Examples
    --------
    >>> import ionact as ia
    >>> r = ia.known_addition("F-", sample_volume=50, spike_volume=0.5, spike_concentration=0.01,
    ...                       delta_mv=-17.0, model="ideal")
    >>> round(r.concentration * 1e5, 3)   # mol/L
    10.444
    """
    meas = _context(analyte, temperature, matrix, model, counter_ion, calibration)
    vx, vs = _volume(sample_volume, "sample_volume"), _volume(spike_volume, "spike_volume")
    cs = float(molar_values([spike_concentration], meas.ion, "spike_concentration")[0])
    de = parse_scalar(delta_mv, "mV", "delta_mv")
    s, u_s, src = _slope(meas, slope_mv, calibration)
    sd = _reading_sd(reading_sd_mv, calibration)

    def solve(de_: float, s_: float) -> float:
        return _solve_cx(lambda cx: s_ * _log_ratio(meas, cx, vx, [vs], cs)[0] - de_, cs * 1e-4, cs)

    cx = solve(de, s)
    u = _propagate(lambda d, sl: solve(d, sl), de, s, math.sqrt(2.0) * sd, u_s)
    return AdditionResult("known addition", meas.analyte, cx, u, s, src,
                          notes=(f"volume-corrected; activities by {meas.model}", _sd_note(sd, calibration)))


def double_addition(analyte: Any, *, sample_volume: Any, spike_volume: Any, spike_concentration: Any,
                    delta_mv: Sequence[Any], matrix: Any = None, temperature: Any = 25.0, model: str | None = None,
                    counter_ion: Any = None, reading_sd_mv: float = DEFAULT_READING_SD_MV) -> AdditionResult:
    """Double known addition: the concentration and the slope from two equal spikes.

    The two potential changes are each taken against the sample before any spike.

    Parameters
    ----------
    analyte : str or Ion
        The measured ion.
    sample_volume : float or str
        mL, or a unit string.
    spike_volume : float or str
        The volume of each of the two spikes (mL).
    spike_concentration : float or str
        mol/L or a unit string.
    delta_mv : (ΔE₁, ΔE₂)
        Potentials after the first and after the second spike, minus the sample's, mV.
    matrix : Solution, optional
        The sample's background; pure water when None.
    temperature : float or str
        °C.
    model : str, optional
        Activity model (default "auto").
    counter_ion : str, optional
        The ion accompanying the analyte in the spike.
    reading_sd_mv : float
        Standard deviation of one reading, mV.

    Returns
    -------
    AdditionResult
        Concentration (mol/L), the slope it implies (mV/decade), uncertainty and notes.

    Raises
    ------
    InputError
        Not two potential changes, changes of the wrong sign or order, non-positive volumes.

    References
    ----------
    Double known addition as common practice (the slope found in the sample itself).

    Examples
    --------
    >>> import ionact as ia
    >>> r = ia.double_addition("F-", sample_volume=50, spike_volume=0.5, spike_concentration=0.01,
    ...                        delta_mv=(-17.0, -26.5), model="ideal")
    >>> round(r.concentration * 1e5, 2), round(r.slope_mv, 1)
    (8.93, -52.8)
    """
    meas = _context(analyte, temperature, matrix, model, counter_ion, None)
    vx, vs = _volume(sample_volume, "sample_volume"), _volume(spike_volume, "spike_volume")
    cs = float(molar_values([spike_concentration], meas.ion, "spike_concentration")[0])
    d = millivolts(delta_mv, "delta_mv")
    if d.size != 2:
        raise InputError(f"delta_mv needs two potential changes, got {d.size}", field="delta_mv")
    if not (abs(d[1]) > abs(d[0]) > 0 and d[0] * d[1] > 0):
        raise InputError(f"delta_mv {tuple(d)}: the second change must be larger than the first, with the same sign",
                         field="delta_mv")

    def solve(d1: float, d2: float) -> tuple[float, float]:
        ratio = d2 / d1

        def g(cx: float) -> float:
            lr = _log_ratio(meas, cx, vx, [vs, 2 * vs], cs)
            if lr[0] == 0.0:  # a spike too small to tell at this concentration: ratio → 2·V/(V+…) limit
                return 2.0 - ratio
            return float(lr[1] / lr[0] - ratio)

        cx = _solve_cx(g, cs * 1e-4, cs)
        return cx, d1 / _log_ratio(meas, cx, vx, [vs], cs)[0]

    cx, s = solve(d[0], d[1])
    theory = float(nernst_slope(meas.ion.charge, meas.temperature))
    if s * theory <= 0:
        raise InputError(f"the potential changes give a slope {s:.2f} mV/decade of the wrong sign for {meas.analyte}",
                         field="delta_mv")
    u = _propagate(lambda a, b: solve(a, b)[0], d[0], d[1], math.sqrt(2.0) * reading_sd_mv,
                   math.sqrt(2.0) * reading_sd_mv)
    return AdditionResult("double known addition", meas.analyte, cx, u, float(s),
                          f"found from the two additions ({100 * s / theory:.1f} % of Nernstian)",
                          notes=(f"volume-corrected; activities by {meas.model}",))


def multiple_addition(analyte: Any, *, sample_volume: Any, spike_volumes: Any, spike_concentration: Any,
                      potentials_mv: Any, slope_mv: Any = None, calibration: Calibration | None = None,
                      matrix: Any = None, temperature: Any = 25.0, model: str | None = None,
                      counter_ion: Any = None) -> AdditionResult:
    """Multiple standard additions evaluated by the Gran linearisation, activity-corrected.

    Parameters
    ----------
    analyte : str or Ion
        The measured ion.
    sample_volume : float or str
        mL, or a unit string.
    spike_volumes : sequence
        Cumulative volume added at each reading (mL); the first may be 0 (the sample alone).
    spike_concentration : float or str
        mol/L or a unit string.
    potentials_mv : sequence
        One reading per cumulative volume, mV.
    slope_mv : float, optional
        The electrode's slope, mV/decade (default: the calibration's, else Nernstian).
    calibration : Calibration, optional
        A calibration whose slope to use.
    matrix : Solution, optional
        The sample's background; pure water when None.
    temperature : float or str
        °C.
    model : str, optional
        Activity model for the γ at each reading (default "auto").
    counter_ion : str, optional
        The ion accompanying the analyte in the spike.

    Returns
    -------
    AdditionResult
        Concentration (mol/L) from the Gran plot's intercept, its standard uncertainty, the
        Gran points and notes.

    Raises
    ------
    InputError
        Fewer than three readings, volumes not increasing, lengths that differ, or a
        non-finite value.

    References
    ----------
    G. Gran, Analyst 77 (1952) 661 (from memory).

    Examples
    --------
    >>> import ionact as ia
    >>> r = ia.multiple_addition("F-", sample_volume=50, spike_volumes=[0, 0.5, 1.0, 1.5],
    ...                          spike_concentration=0.01, potentials_mv=[100.0, 84.0, 75.0, 68.0],
    ...                          model="ideal")
    >>> round(r.concentration * 1e4, 3)   # mol/L
    1.177
    """
    meas = _context(analyte, temperature, matrix, model, counter_ion, calibration)
    vx = _volume(sample_volume, "sample_volume")
    v = np.array([parse_scalar(x, "mL", f"spike_volumes[{i}]") for i, x in enumerate(spike_volumes)])
    if np.any(v < 0) or np.any(np.diff(v) <= 0):
        raise InputError("spike_volumes must be cumulative: non-negative and increasing", field="spike_volumes")
    e = millivolts(potentials_mv, "potentials_mv")
    if e.size != v.size or v.size < 3:
        raise InputError(f"multiple addition needs at least three readings, one per volume ({v.size} volumes, "
                         f"{e.size} potentials)", field="potentials_mv")
    cs = float(molar_values([spike_concentration], meas.ion, "spike_concentration")[0])
    s, u_s, src = _slope(meas, slope_mv, calibration)
    x, gvals, cx, u = _gran(meas, vx, v, e, cs, s)
    if u_s > 0:  # the slope's share, by a finite difference
        cx2 = _gran(meas, vx, v, e, cs, s + u_s)[2]
        u = math.hypot(u, cx2 - cx)
    return AdditionResult("multiple addition (Gran)", meas.analyte, float(cx), float(u), s, src, x, gvals,
                          notes=(f"Gran function with volume and activity-coefficient corrections "
                                 f"(activities by {meas.model})",))


def _gran(meas: Measurement, vx: float, v: np.ndarray, e: np.ndarray, cs: float, s: float
          ) -> tuple[np.ndarray, np.ndarray, float, float]:
    """Gran points and the x-intercept's concentration, with γ corrections iterated on c."""
    corr = np.ones_like(v)
    cx = math.nan
    for _ in range(50):
        g = (vx + v) * np.power(10.0, (e - e[0]) / s) * corr
        m, q = np.polyfit(v, g, 1)
        new = q * cs / (m * vx)
        if not (math.isfinite(new) and new > 0):
            raise InputError("the Gran line does not cross the volume axis on the negative side: check the slope "
                             "sign and the readings", field="potentials_mv")
        if math.isfinite(cx) and abs(new - cx) <= 1e-12 * cx:
            cx = new
            break
        cx = new
        c = (cx * vx + cs * v) / (vx + v)
        gam = np.array([float(_diluted(meas, vx / (vx + vi)).activity(np.array([ci]))[0]) / ci
                        for vi, ci in zip(v, c, strict=True)])
        corr = gam[0] / gam
    g = (vx + v) * np.power(10.0, (e - e[0]) / s) * corr
    m, q = np.polyfit(v, g, 1)
    n = v.size
    resid = g - (m * v + q)
    s_y = math.sqrt(float(np.sum(resid**2)) / (n - 2)) if n > 2 else 0.0
    sxx = float(np.sum((v - v.mean()) ** 2))
    ybar = float(g.mean())
    s_ve = s_y / abs(m) * math.sqrt(1.0 / n + ybar**2 / (m * m * sxx))
    return v, g, cx, s_ve * cs / vx


def _reading_sd(sd: float | None, calibration: Calibration | None) -> float:
    if sd is not None:
        return parse_scalar(sd, "mV", "reading_sd_mv")
    if calibration is not None and math.isfinite(calibration.residual_sd_mv):
        return calibration.residual_sd_mv
    return DEFAULT_READING_SD_MV


def _sd_note(sd: float, calibration: Calibration | None) -> str:
    return (f"reading scatter {sd:.3g} mV per reading "
            + ("(the calibration's residual SD)" if calibration is not None else "(assumed; common practice)"))


def _propagate(f: Any, x: float, y: float, ux: float, uy: float) -> float:
    """Standard uncertainty of f(x, y) from those of x and y (independent), by central differences."""
    out = 0.0
    for h, u, which in ((max(abs(x) * 1e-6, 1e-6), ux, 0), (max(abs(y) * 1e-6, 1e-6), uy, 1)):
        if u <= 0:
            continue
        if which == 0:
            d = (f(x + h, y) - f(x - h, y)) / (2 * h)
        else:
            d = (f(x, y + h) - f(x, y - h)) / (2 * h)
        out += (d * u) ** 2
    return math.sqrt(out)
