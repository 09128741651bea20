"""Potentiometric selectivity coefficients from measurements, on activities.

The Nikolsky–Eisenman coefficient K(A,B) of an electrode for its primary ion A against an
interfering ion B, by the methods of the IUPAC recommendations on ion-selective electrode
selectivity:

* **separate solutions** (SSM): A alone at a_A gives E_A, B alone at a_B gives E_B;
  log K = (E_B − E_A)/S + log a_A − (z_A/z_B) log a_B.
* **fixed interference** (FIM): a calibration in a constant background of B; the
  intersection of its Nernstian segment and the plateau is the activity a_A(DL), and
  K = a_A(DL) / a_B^(z_A/z_B).
* **matched potential** (MPM): adding Δa_A of A to a reference solution changes the
  potential as much as adding B at a_B to the same reference; K = Δa_A / a_B.

Every activity is computed at its own solution's ionic strength, through the one
evaluation path — the step most often done on concentrations. The result gives both
values (activities and concentrations) and the entry the design's interference check
reads (``Electrode(selectivity=result.electrode_entry)``).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np

from .._frozen import Record, frozen_map
from ..electrode import nernst_slope
from ..errors import InputError
from ..units import parse_scalar
from .context import measurement_for, millivolts, molar_values
from .fit import calibrate

__all__ = ["Selectivity", "selectivity", "METHODS"]

METHODS = ("separate", "fixed", "matched")


@dataclass(frozen=True, repr=False)
class Selectivity(Record):
    """A measured selectivity coefficient.

    Attributes
    ----------
    primary, interferent : str
    method : {"separate", "fixed", "matched"}
    coefficient, log_coefficient : float
        From activities.
    coefficient_from_concentrations : float
        The same data read on concentrations (for comparison; not for use).
    slope_mv : float
    activities : mapping
        The activities used (name -> value).
    notes : tuple of str
    """

    primary: str
    interferent: str
    method: str
    coefficient: float
    log_coefficient: float
    coefficient_from_concentrations: float
    slope_mv: float
    activities: Mapping[str, float]
    notes: tuple[str, ...] = ()

    def __post_init__(self) -> None:
        object.__setattr__(self, "activities", frozen_map(dict(self.activities)))

    @property
    def electrode_entry(self) -> dict[str, float]:
        """``{interferent: K}`` for :class:`ionact.Electrode`'s ``selectivity``."""
        return {self.interferent: self.coefficient}


def selectivity(primary: Any, interferent: Any, *, method: str = "separate", temperature: Any = 25.0,
                slope_mv: Any = None, model: str | None = None, primary_counter_ion: Any = None,
                interferent_counter_ion: Any = None, **data: Any) -> Selectivity:
    """A potentiometric selectivity coefficient K(primary, interferent) from measurements.

    Parameters
    ----------
    primary : str or Ion
        The electrode's primary ion.
    interferent : str or Ion
        The interfering ion (same sign of charge).
    method : {"separate", "fixed", "matched"}
        Separate-solution, fixed-interference or matched-potential method.
    temperature : float or str
        °C.
    slope_mv : float, optional
        The electrode's slope (default: Nernstian at the temperature; the fixed-interference
        method fits its own).
    model : str, optional
        Activity model for the solutions' activities (default "auto").
    primary_counter_ion, interferent_counter_ion : str, optional
        The ions accompanying primary and interferent in their salts.
    **data
        separate: ``primary_concentration``, ``primary_mv``, ``interferent_concentration``,
        ``interferent_mv``.
        fixed: ``concentrations``, ``potentials_mv`` (the primary series) and
        ``interferent_concentration`` (the constant background).
        matched: ``reference_concentration`` (of the primary, in the reference solution),
        ``primary_added`` (the primary's concentration step) and ``interferent_concentration``
        (added to the reference, giving the same potential change).
        Concentrations in mol/L or unit strings; potentials in mV.

    Returns
    -------
    Selectivity
        K (on activities, and on concentrations for comparison), log K, the slope used, the
        activities and notes; ``.electrode_entry`` for a method file.

    Raises
    ------
    InputError
        An unknown method, missing or extra data for the method, ions of opposite charge,
        or non-positive concentrations.

    References
    ----------
    Y. Umezawa et al., Pure Appl. Chem. 72 (2000) 1851 (IUPAC report on selectivity
    coefficients; from memory).

    Examples
    --------
    >>> import ionact as ia
    >>> s = ia.selectivity("NO3-", "Cl-", method="separate", primary_concentration=0.01, primary_mv=-100.0,
    ...                    interferent_concentration=0.01, interferent_mv=-10.0, model="ideal")
    >>> round(s.log_coefficient, 2)
    -1.52
    """
    if method not in METHODS:
        raise InputError(f"method {method!r} is not one of {', '.join(METHODS)}", value=method,
                         allowed=", ".join(METHODS), field="method")
    pa = measurement_for(primary, temperature=temperature, model=model, counter_ion=primary_counter_ion)
    pb = measurement_for(interferent, temperature=temperature, model=model, counter_ion=interferent_counter_ion)
    za, zb = pa.ion.charge, pb.ion.charge
    if za * zb <= 0:
        raise InputError(f"{pb.analyte} must carry the charge sign of {pa.analyte} to interfere", field="interferent")
    theory = float(nernst_slope(za, pa.temperature))
    s = theory if slope_mv is None else parse_scalar(slope_mv, "mV", "slope_mv")
    if s * theory <= 0:
        raise InputError(f"slope {s:g} mV/decade has the wrong sign for {pa.analyte}", value=s, field="slope_mv")
    ratio = za / zb
    try:
        if method == "separate":
            ca = _one(data, "primary_concentration", pa)
            cb = _one(data, "interferent_concentration", pb)
            ea = float(millivolts([_need(data, "primary_mv")], "primary_mv")[0])
            eb = float(millivolts([_need(data, "interferent_mv")], "interferent_mv")[0])
            a_a, a_b = float(pa.activity(np.array([ca]))[0]), float(pb.activity(np.array([cb]))[0])
            log_k = (eb - ea) / s + math.log10(a_a) - ratio * math.log10(a_b)
            log_kc = (eb - ea) / s + math.log10(ca) - ratio * math.log10(cb)
            acts = {pa.analyte: a_a, pb.analyte: a_b}
            notes = ["separate-solution method: each ion in its own solution, at its own ionic strength"]
        elif method == "fixed":
            from ..solution import Solution

            cb = _one(data, "interferent_concentration", pb)
            bg = Solution.from_parts([(pb.ion, _molar(cb))] + _counter_part(pb, cb), pa.temperature,
                                     density="water")
            cal = calibrate(pa.ion, _need(data, "concentrations"), _need(data, "potentials_mv"),
                            temperature=pa.temperature, matrix=bg, model=model, fit="nikolsky",
                            counter_ion=primary_counter_ion)
            a_b = _activity_in(bg, pb.analyte, model)
            a_dl = cal.detection_limit_activity
            log_k = math.log10(a_dl) - ratio * math.log10(a_b)
            log_kc = math.log10(cal.detection_limit) - ratio * math.log10(cb)
            s = cal.slope_mv
            acts = {f"{pa.analyte} at the detection limit": a_dl, pb.analyte: a_b}
            notes = [f"fixed-interference method: Nikolsky–Eisenman fit in {cb:.3g} mol/L of {pb.analyte} "
                     f"(slope {cal.slope_mv:.2f} mV/decade, {cal.slope_percent:.1f} % of Nernstian)"]
        else:
            c0 = _one(data, "reference_concentration", pa)
            dc = _one(data, "primary_added", pa)
            cb = _one(data, "interferent_concentration", pb)
            a0, a1 = (float(v) for v in pa.activity(np.array([c0, c0 + dc])))
            a_b = _activity_with(pa, c0, pb, cb)
            log_k = math.log10((a1 - a0) / a_b)
            log_kc = math.log10(dc / cb)
            acts = {f"{pa.analyte} (reference)": a0, f"{pa.analyte} (after the step)": a1, pb.analyte: a_b}
            notes = ["matched-potential method: independent of the Nikolsky–Eisenman form and of the charges"]
    except KeyError as exc:
        raise InputError(f"the {method} method needs {exc.args[0]}", field=str(exc.args[0])) from None
    return Selectivity(pa.analyte, pb.analyte, method, 10.0**log_k, log_k, 10.0**log_kc, s, acts, tuple(notes))


def _need(data: Mapping[str, Any], key: str) -> Any:
    if key not in data:
        raise KeyError(key)
    return data[key]


def _one(data: Mapping[str, Any], key: str, meas: Any) -> float:
    return float(molar_values([_need(data, key)], meas.ion, key)[0])


def _molar(c: float) -> Any:
    from ..units import MOLAR, Amount

    return Amount(np.asarray(c), MOLAR)


def _counter_part(meas: Any, c: float) -> list[tuple[Any, Any]]:
    from ..conversion import default_counter_ion

    counter = default_counter_ion(meas.ion, meas.counter_ion)
    if counter is None:
        return []
    return [(counter, _molar(c * abs(meas.ion.charge) / abs(counter.charge)))]


def _activity_in(bg: Any, name: str, model: str | None) -> float:
    """The interferent's activity in the fixed background (the interferent's salt alone)."""
    from ..activity import activity_coefficients

    g = activity_coefficients(bg, model=model or "auto")
    return float(g[name]) * float(bg.molality(name))


def _activity_with(pa: Any, c0: float, pb: Any, cb: float) -> float:
    """The interferent's activity after adding it at cb to the reference solution of the primary."""
    from ..activity import activity_coefficients
    from ..solution import Solution

    parts = [(pa.ion, _molar(c0))] + _counter_part(pa, c0) + [(pb.ion, _molar(cb))] + _counter_part(pb, cb)
    sol = Solution.from_parts(parts, pa.temperature, density=pa.density)  # the same ion's amounts add
    g = activity_coefficients(sol, model=pa.model)
    return float(g[pb.analyte]) * float(sol.molality(pb.analyte))
