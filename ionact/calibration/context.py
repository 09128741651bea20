"""Where the standards and samples are measured: the treated matrix, and the conversions
between the activity the electrode reads and the concentration the laboratory reports.

Every conversion goes through :func:`ionact.activity_from_concentration` and
:func:`ionact.concentration_from_activity` — the one evaluation path (density, species,
activity model) — in the matrix the electrode actually sees: the design's adjuster mixed
with the solution in the design's ratio, or a given background, or pure water.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from .._frozen import Record, frozen_map
from ..errors import InputError
from ..species import Ion, resolve_ion
from ..units import MOLAR, Amount, parse_amount, parse_scalar

__all__ = ["Measurement", "measurement_for", "molar_values", "millivolts", "MAX_POINTS"]

MAX_POINTS = 10_000_000  # sanity bound on the length of an input series


@dataclass(frozen=True, repr=False)
class Measurement(Record):
    """How a solution is measured: the analyte, the temperature, the activity model, and the
    matrix the electrode sees.

    Attributes
    ----------
    analyte : str
        Ion notation.
    temperature : float
        °C.
    model : str
        Activity model (a registered name or "auto").
    counter_ion : str or None
        The ion the analyte is added with (the standards' salt).
    matrix : mapping or None
        Molalities (mol/kg) of the treated background: the adjuster's ions after mixing, or
        a given background; None for pure water.
    dilution : float
        Concentration in the solution as prepared / concentration in the measured mixture
        (1 + volume ratio with an adjuster, 1 without).
    density : str or None
        "water" or None (the density model).
    equilibrium : bool or None
        Speciate (None: where the ions react).
    custom_ions : mapping
        Ions the tables lack (from a design), by name: their ``Ion.to_dict()``.
    """

    analyte: str
    temperature: float = 25.0
    model: str = "auto"
    counter_ion: str | None = None
    matrix: Mapping[str, float] | None = None
    dilution: float = 1.0
    density: str | None = None
    equilibrium: bool | None = None
    custom_ions: Mapping[str, Any] = field(default_factory=dict)

    def __post_init__(self) -> None:
        object.__setattr__(self, "matrix", None if self.matrix is None else frozen_map(
            {str(k): float(v) for k, v in self.matrix.items()}))
        object.__setattr__(self, "custom_ions", frozen_map(dict(self.custom_ions)))
        if not (math.isfinite(self.dilution) and self.dilution >= 1.0):
            raise InputError(f"dilution {self.dilution!r} must be a finite number ≥ 1")

    @property
    def ion(self) -> Ion:
        return self.ion_of(self.analyte)

    def ion_of(self, name: str) -> Ion:
        """An ion of the measurement by name (the design's own ions included)."""
        if name in self.custom_ions:
            return Ion.from_dict(self.custom_ions[name])
        return resolve_ion(name)

    def _matrix(self) -> Any:
        from ..solution import Solution

        if not self.matrix:
            return None
        amounts: dict[Any, float] = {self.ion_of(k): v for k, v in self.matrix.items()}
        return Solution(amounts, self.temperature, density=self.density, charge_tolerance=1e-3)

    def activity(self, concentration: np.ndarray) -> np.ndarray:
        """Activity of the analyte in the measured mixture for concentrations (mol/L) as prepared."""
        from ..conversion import activity_from_concentration

        c = np.asarray(concentration, dtype=float) / self.dilution
        r = activity_from_concentration(self.ion, Amount(c, MOLAR), matrix=self._matrix(),
                                        counter_ion=self.counter_ion, model=self.model,
                                        temperature=self.temperature, density=self.density,
                                        equilibrium=self.equilibrium)
        return np.asarray(r.activity, dtype=float)

    def concentration(self, activity: np.ndarray) -> np.ndarray:
        """Concentration (mol/L) as prepared for activities in the measured mixture."""
        from ..conversion import concentration_from_activity

        a = np.asarray(activity, dtype=float)
        r = concentration_from_activity(self.ion, a, matrix=self._matrix(), counter_ion=self.counter_ion,
                                        model=self.model, temperature=self.temperature,
                                        equilibrium=self.equilibrium, density=self.density)
        return np.asarray(r.concentration("mol/L"), dtype=float) * self.dilution


def measurement_for(analyte: Any, *, temperature: Any = 25.0, design: Any = None, matrix: Any = None,
                    model: str | None = None, counter_ion: Any = None) -> Measurement:
    """The measurement context in which standards and samples are read.

    With a design: its adjuster in its ratio, its model and counter-ion; else a given
    background ``matrix`` (a Solution) or pure water.

    Parameters
    ----------
    analyte : str or Ion
        The measured ion, e.g. "F-".
    temperature : float, str or pint.Quantity
        °C for bare numbers.
    design : AdjusterDesign or its dict, optional
        The method's adjuster design; its treated-solution composition is the background.
    matrix : Solution, optional
        Otherwise the background (pure water when None).
    model : str, optional
        Activity model (default: the design's, else "auto").
    counter_ion : str, optional
        The ion accompanying the analyte in the standards (default: the design's, else the
        usual one for the analyte's sign).

    Returns
    -------
    Measurement
        The context every calibration job reads activities in.

    Raises
    ------
    InputError
        Both a design and a matrix, a temperature outside liquid water's range, or a
        design that is not one.

    Examples
    --------
    >>> from ionact.calibration import measurement_for
    >>> m = measurement_for("F-")
    >>> m.analyte, m.model, m.dilution
    ('F-', 'auto', 1.0)
    """
    from ..solution import Solution
    from ..water import checked_temperature

    if design is not None and matrix is not None:
        raise InputError("give a design (its adjuster is the matrix) or a matrix, not both")
    t = float(checked_temperature(parse_scalar(temperature, "degC", "temperature") if isinstance(temperature, str)
                                  else temperature, "temperature"))
    if design is not None:
        from ..adjuster import AdjusterDesign

        d = design if isinstance(design, AdjusterDesign) else AdjusterDesign.from_dict(design)
        custom = d.custom_ions()
        an = custom.get(d.analyte) or resolve_ion(d.analyte)
        want = analyte if isinstance(analyte, Ion) else (custom.get(analyte) if isinstance(analyte, str) else None)
        want = want or resolve_ion(analyte)
        if want.name != an.name:
            raise InputError(f"the design is for {an.name}, not {want.name}")
        r = d.volume_ratio
        stock = {k: float(v) * r / (1.0 + r) for k, v in d.stock_ions.items()}
        ions = {k: custom.get(k) or resolve_ion(k) for k in stock}
        amounts: dict[Any, float] = {ions[k]: v for k, v in stock.items()}
        sol = Solution(amounts, t, basis=MOLAR, density=d.density, charge_tolerance=1e-3)
        molal = {k: float(v) for k, v in sol.molalities.items()}
        return Measurement(an.name, t, model or d.model.name, d.counter_ion, molal, 1.0 + r,
                           d.density, d.equilibrium, {k: v.to_dict() for k, v in custom.items()})
    ion = analyte if isinstance(analyte, Ion) else resolve_ion(analyte)
    custom_ions = {} if ion.tabulated else {ion.name: ion.to_dict()}
    mat = None
    if matrix is not None:
        if not isinstance(matrix, Solution):
            raise InputError(f"matrix must be a Solution, got {type(matrix).__name__}")
        if matrix.shape:
            raise InputError("the matrix must be one solution, not a batch")
        mat = {k: float(v) for k, v in matrix.molalities.items()}
        custom_ions.update({n: matrix.ion(n).to_dict() for n in matrix.ions if not matrix.ion(n).tabulated})
    counter = None if counter_ion is None else (counter_ion.name if isinstance(counter_ion, Ion)
                                                else resolve_ion(counter_ion).name)
    return Measurement(ion.name, t, model or "auto", counter, mat, 1.0, None, None, custom_ions)


def molar_values(values: Any, ion: Ion, what: str) -> np.ndarray:
    """A series of concentrations in mol/L: bare numbers are mol/L; strings and Quantities by
    their units (mass units through the ion's molar mass); mol/kg is refused (a series is
    prepared by volume)."""
    seq = _sequence(values, what)
    out = np.empty(len(seq))
    for i, v in enumerate(seq):
        if isinstance(v, bool | np.bool_) or v is None:
            raise InputError(f"{what}[{i}] {v!r} is not a concentration", value=v, field=what)
        amt = parse_amount(v, ion, MOLAR, what=f"{what}[{i}]")
        if amt.basis != MOLAR:
            raise InputError(f"{what}[{i}] {v!r}: give mol/L or a per-litre unit (a series is prepared by volume)",
                             value=v, allowed="mol/L, mmol/L, mg/L, µg/L, …", field=what)
        x = float(np.asarray(amt.value))
        if not (math.isfinite(x) and x > 0):
            raise InputError(f"{what}[{i}] {v!r} must be a positive finite concentration", value=v,
                             allowed="> 0", field=what)
        out[i] = x
    return out


def millivolts(values: Any, what: str, *, allow_nan: bool = False) -> np.ndarray:
    """A series of potentials in mV (numbers, or strings such as "-123.4 mV")."""
    seq = _sequence(values, what)
    out = np.empty(len(seq))
    for i, v in enumerate(seq):
        if allow_nan and (v is None or (isinstance(v, float) and math.isnan(v))):
            out[i] = math.nan
            continue
        out[i] = parse_scalar(v, "mV", f"{what}[{i}]")
    return out


def _sequence(values: Any, what: str) -> Sequence[Any]:
    if isinstance(values, str | bytes) or np.ndim(values) == 0:
        raise InputError(f"{what} must be a sequence of values, got {values!r}", value=values, field=what)
    seq = list(np.asarray(values, dtype=object).reshape(-1))
    if len(seq) > MAX_POINTS:
        raise InputError(f"{what} has {len(seq)} values; at most {MAX_POINTS}", field=what)
    return seq
