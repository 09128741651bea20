"""From sample potentials to reported concentrations, with a confidence interval and drift.

The activity comes from inverting the calibration; the concentration from the activity
through the calibration's measurement (the treated matrix, the model, the free fraction
where the ions react). The interval is the inverse prediction from the calibration's
covariance and the scatter of one reading (delta method on log10 a, Student's t on the
fit's degrees of freedom, coverage stated). Every row is kept in order with a status.

Drift: a check standard measured between the samples (times and potentials) gives the
offset of the electrode from its calibration at those times; the offset at each sample's
time is interpolated linearly, reported, flagged beyond a limit, and subtracted when asked.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from .._frozen import Record, readonly
from .._pandas import is_series
from ..errors import InputError
from .context import millivolts, molar_values
from .fit import Calibration

__all__ = ["Quantitation", "DriftCheck", "quantify", "QUANTITY_STATUSES", "DEFAULT_DRIFT_LIMIT_MV",
           "DEFAULT_COVERAGE"]

OK, OUTSIDE, BELOW, DRIFT, INVALID = ("ok", "outside the calibrated range", "below the detection limit",
                                      "drift beyond the limit", "invalid input")
QUANTITY_STATUSES = (OK, OUTSIDE, BELOW, DRIFT, INVALID)
DEFAULT_DRIFT_LIMIT_MV = 2.0  # largest offset of a check standard from its calibrated potential (common practice)
DEFAULT_COVERAGE = 0.95


@dataclass(frozen=True, repr=False)
class DriftCheck(Record):
    """A check standard measured during the run.

    Attributes
    ----------
    concentration : float
        As prepared, mol/L.
    times : ndarray
        When it was measured (any consistent unit, e.g. minutes since calibration).
    potentials_mv : ndarray
    """

    concentration: float
    times: np.ndarray
    potentials_mv: np.ndarray

    def __post_init__(self) -> None:
        t = np.asarray(self.times, dtype=float)
        e = np.asarray(self.potentials_mv, dtype=float)
        if t.ndim != 1 or t.size < 1 or t.size != e.size or not np.all(np.isfinite(t)) or not np.all(np.isfinite(e)):
            raise InputError("a drift check needs one finite time per finite potential (at least one)",
                             field="check")
        if t.size > 1 and np.any(np.diff(t) <= 0):
            raise InputError("the check standard's times must increase", field="check.times")
        object.__setattr__(self, "times", readonly(t))
        object.__setattr__(self, "potentials_mv", readonly(e))


@dataclass(frozen=True, repr=False)
class Quantitation(Record):
    """Concentrations of a batch with their intervals and statuses (every row, in order).

    Attributes
    ----------
    potentials_mv : ndarray
        As measured.
    corrected_mv : ndarray
        After drift correction (equal to the measured ones without it).
    drift_mv : ndarray
        The electrode's offset at each sample's time (NaN without a check standard).
    activity : ndarray
        In the measured mixture.
    concentration : ndarray
        mol/L as prepared (before the adjuster), NaN where not reportable.
    interval : ndarray
        (2, N) low and high ends at ``coverage``, mol/L.
    coverage : float
    status, reason : tuple of str
    """

    potentials_mv: np.ndarray
    corrected_mv: np.ndarray
    drift_mv: np.ndarray
    activity: np.ndarray
    concentration: np.ndarray
    interval: np.ndarray
    coverage: float
    status: tuple[str, ...]
    reason: tuple[str, ...]
    analyte: str = ""

    def __post_init__(self) -> None:
        for name in ("potentials_mv", "corrected_mv", "drift_mv", "activity", "concentration", "interval"):
            object.__setattr__(self, name, readonly(np.asarray(getattr(self, name), dtype=float)))

    def __len__(self) -> int:
        return int(self.concentration.size)

    def to_pandas(self, unit: str = "mol/L", index: Any = None) -> Any:
        """Every row as a DataFrame (concentrations in ``unit``, named in the columns' values not
        their keys), on ``index``, else on the index of the potentials' Series when given one."""
        from .._pandas import to_frame

        c, iv = self.in_unit(unit)
        return to_frame({"potential_mv": self.potentials_mv, "drift_mv": self.drift_mv,
                         "corrected_mv": self.corrected_mv, "concentration": c, "low": iv[0], "high": iv[1],
                         "unit": [unit] * len(self), "status": list(self.status), "reason": list(self.reason)},
                        index if index is not None else getattr(self, "_index", None))

    def in_unit(self, unit: str) -> tuple[np.ndarray, np.ndarray]:
        """Concentrations and intervals in ``unit`` (any per-litre unit: "mg/L", "µmol/L", "mg/L as N" …)."""
        from ..species import resolve_ion
        from ..units import MOLAR, convert_amount

        ion = resolve_ion(self.analyte)
        factor = float(np.asarray(convert_amount(1.0, MOLAR, unit, ion)))  # per-litre units scale linearly
        return self.concentration * factor, self.interval * factor

    def table(self, unit: str = "mol/L", limit: int = 50) -> str:
        c, iv = self.in_unit(unit)
        lines = [f"{'#':>4} {'E mV':>9} {'conc. ' + unit:>16} {f'{self.coverage:.0%} interval':>26}  status"]
        for i in range(min(len(self), limit)):
            lines.append(f"{i + 1:>4} {self.corrected_mv[i]:>9.2f} {c[i]:>16.4g} "
                         f"{iv[0, i]:>12.4g} – {iv[1, i]:<11.4g}  {self.status[i]}")
        if len(self) > limit:
            lines.append(f"… {len(self) - limit} more rows")
        return "\n".join(lines)


def quantify(calibration: Calibration, potentials_mv: Any, *, times: Any = None, check: DriftCheck | None = None,
             correct_drift: bool = False, drift_limit_mv: float = DEFAULT_DRIFT_LIMIT_MV,
             coverage: float = DEFAULT_COVERAGE) -> Quantitation:
    """Concentrations of samples from their potentials.

    Parameters
    ----------
    calibration : Calibration
        The fitted calibration (see :func:`calibrate`).
    potentials_mv : sequence
        One potential per sample, mV (NaN or None marks a missing reading: that row is invalid).
    times : sequence, optional
        When each sample was read (the check standard's time unit); needed with ``check``.
    check : DriftCheck, optional
        A check standard measured during the run.
    correct_drift : bool
        Subtract the interpolated offset from each sample's potential.
    drift_limit_mv : float
        Largest acceptable absolute offset, mV; rows beyond it get the status "drift beyond
        the limit".
    coverage : float
        Of the interval (0 < coverage < 1).

    Returns
    -------
    Quantitation
        Per sample: concentration (mol/L), its interval, the activity, and a status; every
        row is kept in order.

    Raises
    ------
    InputError
        A coverage outside (0, 1), times missing or of another length with ``check``.

    References
    ----------
    N. R. Draper and H. Smith, *Applied Regression Analysis*, 3rd ed., Wiley (1998), §3.2
    (inverse prediction); JCGM 100:2008 (GUM) for the coverage.

    Examples
    --------
    >>> import ionact as ia
    >>> cal = ia.calibrate("F-", [1e-5, 1e-4, 1e-3, 1e-2], [120.1, 61.0, 2.1, -56.9], model="davies")
    >>> q = ia.quantify(cal, [30.0, 90.0])
    >>> [round(float(c) * 1e4, 3) for c in q.concentration], q.status
    ([3.297, 0.323], ('ok', 'ok'))
    """
    if not isinstance(calibration, Calibration):
        raise InputError(f"quantify needs a Calibration, got {type(calibration).__name__}")
    if not (isinstance(coverage, float | int) and 0 < coverage < 1):
        raise InputError(f"coverage {coverage!r} must be between 0 and 1", value=coverage, allowed="0–1",
                         field="coverage")
    e = millivolts(potentials_mv, "potentials_mv", allow_nan=True)
    n = e.size
    drift = np.full(n, np.nan)
    if check is not None:
        if times is None:
            raise InputError("a drift check needs the samples' times", field="times")
        t = np.asarray(times, dtype=float).reshape(-1)
        if t.size != n:
            raise InputError(f"{n} potentials but {t.size} times", field="times")
        cs = molar_values([check.concentration], calibration.measurement.ion, "check.concentration")
        expected = float(calibration.potential(calibration.measurement.activity(cs))[0])
        offsets = check.potentials_mv - expected
        drift = np.interp(t, check.times, offsets) if offsets.size > 1 else np.full(n, offsets[0])
    corrected = e - np.where(np.isfinite(drift), drift, 0.0) if correct_drift else e.copy()
    a = calibration.activity(corrected)
    log_a, s_log = _log_activity_sd(calibration, corrected)
    valid = np.isfinite(corrected)
    below = valid & ~(a > 0)
    good = valid & ~below
    conc = np.full(n, np.nan)
    interval = np.full((2, n), np.nan)
    if np.any(good):
        from scipy.stats import t as t_dist

        k = float(t_dist.ppf(0.5 + coverage / 2, calibration.dof)) if calibration.dof > 0 else math.nan
        lo_a = np.power(10.0, log_a[good] - k * s_log[good]) - calibration.background
        hi_a = np.power(10.0, log_a[good] + k * s_log[good]) - calibration.background
        meas = calibration.measurement
        conc[good] = meas.concentration(a[good])
        lo_ok = lo_a > 0
        lows = np.zeros(lo_a.shape)
        if np.any(lo_ok):
            lows[lo_ok] = meas.concentration(lo_a[lo_ok])
        interval[0, good] = np.where(np.isfinite(lo_a), lows, np.nan)
        interval[1, good] = np.where(np.isfinite(hi_a), _safe_conc(meas, hi_a), np.nan)
    status, reason = _statuses(calibration, e, conc, drift, valid, below, drift_limit_mv)
    out = Quantitation(e, corrected, drift, np.where(good, a, np.nan), conc, interval, float(coverage),
                       tuple(status), tuple(reason), calibration.analyte)
    if is_series(potentials_mv):  # rows come back on the Series' index (not part of the JSON record)
        object.__setattr__(out, "_index", potentials_mv.index)
    return out


def _safe_conc(meas: Any, a: np.ndarray) -> np.ndarray:
    out = np.full(a.shape, np.nan)
    ok = np.isfinite(a) & (a > 0)
    if np.any(ok):
        out[ok] = meas.concentration(a[ok])
    return out


def _log_activity_sd(cal: Calibration, e: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """log10(a + b) of each reading and its standard deviation: the delta method on
    x = (E − E⁰)/S with the fit's covariance and the scatter of one reading."""
    e0, s = cal.e0_mv, cal.slope_mv
    x = (e - e0) / s
    cov = cal.covariance
    sigma = cal.residual_sd_mv if math.isfinite(cal.residual_sd_mv) else math.nan
    var = (sigma**2 + cov[0, 0] + x * x * cov[1, 1] + 2.0 * x * cov[0, 1]) / (s * s)
    return x, np.sqrt(np.maximum(var, 0.0))


def _statuses(cal: Calibration, e: np.ndarray, conc: np.ndarray, drift: np.ndarray, valid: np.ndarray,
              below: np.ndarray, limit: float) -> tuple[list[str], list[str]]:
    lo, hi = cal.calibrated_range
    lin = cal.linear_range[0]
    status = np.full(e.size, OK, dtype=object)
    reason = np.full(e.size, "", dtype=object)
    outside = valid & ~below & ((conc < lo * (1 - 1e-9)) | (conc > hi * (1 + 1e-9)))
    drifted = valid & np.isfinite(drift) & (np.abs(drift) > limit)
    status[outside], status[drifted], status[below], status[~valid] = OUTSIDE, DRIFT, BELOW, INVALID
    for i in np.flatnonzero(status != OK):  # words only for the rows that need them
        if status[i] == INVALID:
            reason[i] = "no potential reading"
        elif status[i] == BELOW:
            reason[i] = (f"{e[i]:.2f} mV lies beyond the fitted curve's plateau: below the detection limit "
                         f"({cal.detection_limit:.3g} mol/L)")
        elif status[i] == DRIFT:
            reason[i] = f"the electrode had drifted {drift[i]:+.2f} mV from its calibration (limit ±{limit:g} mV)"
        else:
            reason[i] = (f"{conc[i]:.4g} mol/L is outside the standards' range {lo:.3g}–{hi:.3g} mol/L: "
                         + ("dilute" if conc[i] > hi else "use lower standards or standard addition"))
    ok = status == OK
    curved = ok & (conc < lin * (1 - 1e-9))
    reason[ok] = "within the linear range"
    reason[curved] = "in the curved low end of the calibration (read from the fitted curve)"
    return list(status), list(reason)
