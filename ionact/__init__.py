"""ionact: ionic strength, activity coefficients and ionic strength adjuster design.

The public API is re-exported here; see the README for a tour. ``import ionact`` stays
light: the pint unit registry and the parameter tables are created on first use.
"""

__version__ = "0.2.0.dev0"

from typing import TYPE_CHECKING, Any

from . import models, water
from .errors import (
    ConvergenceError,
    InfeasibleDesignError,
    InputError,
    IonactError,
    MissingParameterError,
    UnitAssumptionWarning,
    UnitError,
    UnknownSpeciesError,
    ValidityRangeError,
    ValidityRangeWarning,
    strict,
)
from .solution import Solution
from .species import Ion, Salt, register_ion

if TYPE_CHECKING:
    from .activity import (
        ActivityCoefficients,
        activity_coefficients,
        compare_models,
        mean_activity_coefficient,
        osmotic_coefficient,
        water_activity,
    )
    from .adjuster import (
        AdjusterComparison,
        AdjusterDesign,
        Budget,
        Buffer,
        Check,
        Electrode,
        SamplePopulation,
        StockComponent,
        compare_adjusters,
        design_adjuster,
    )
    from .calibration import (
        AdditionResult,
        Calibration,
        DriftCheck,
        ErrorBudget,
        Quantitation,
        Selectivity,
        calibrate,
        double_addition,
        error_budget,
        junction_potential,
        known_addition,
        multiple_addition,
        quantify,
        selectivity,
    )
    from .conversion import (
        activity_from_concentration,
        activity_from_px,
        concentration_from_activity,
        px_from_activity,
        standard_for_activity,
    )
    from .electrode import (
        mv_to_relative_error,
        nernst_slope,
        nikolsky_eisenman,
        relative_error_to_mv,
        temperature_error,
    )
    from .equilibrium import Complex, Speciation, ph_of, speciate
    from .estimates import IonicStrengthEstimate, ionic_strength_from_conductivity, ionic_strength_from_tds
    from .samples import SampleCheck, check_samples

# every job's module loads on first use, so that ``import ionact`` stays light (most of a
# module's import cost is creating its record classes)
_LAZY = {name: "activity" for name in ("ActivityCoefficients", "activity_coefficients", "compare_models",
                                       "mean_activity_coefficient", "osmotic_coefficient", "water_activity")}
_LAZY.update({name: "conversion" for name in ("activity_from_concentration", "activity_from_px",
                                              "concentration_from_activity", "px_from_activity",
                                              "standard_for_activity")})
_LAZY.update({name: "electrode" for name in ("mv_to_relative_error", "nernst_slope", "nikolsky_eisenman",
                                             "relative_error_to_mv", "temperature_error")})
_LAZY.update({name: "equilibrium" for name in ("Complex", "Speciation", "ph_of", "speciate")})
_LAZY.update({name: "estimates" for name in ("IonicStrengthEstimate", "ionic_strength_from_conductivity",
                                             "ionic_strength_from_tds")})
_LAZY.update({name: "adjuster" for name in ("AdjusterComparison", "AdjusterDesign", "Budget", "Buffer", "Check",
                                            "Electrode", "SamplePopulation", "StockComponent", "compare_adjusters",
                                            "design_adjuster")})
_LAZY.update({"SampleCheck": "samples", "check_samples": "samples"})
_LAZY.update({name: "calibration" for name in ("AdditionResult", "Calibration", "DriftCheck", "Quantitation",
                                               "Selectivity", "calibrate", "double_addition", "junction_potential",
                                               "ErrorBudget", "error_budget",
                                               "known_addition", "multiple_addition", "quantify", "selectivity")})


def __getattr__(name: str) -> Any:
    if name in _LAZY:
        import importlib

        value = getattr(importlib.import_module(f".{_LAZY[name]}", __name__), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'ionact' has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(_LAZY))

__all__ = [
    "__version__",
    "models",
    "water",
    "Ion",
    "Salt",
    "register_ion",
    "Solution",
    "IonicStrengthEstimate",
    "ionic_strength_from_conductivity",
    "ionic_strength_from_tds",
    "ActivityCoefficients",
    "activity_coefficients",
    "mean_activity_coefficient",
    "compare_models",
    "osmotic_coefficient",
    "water_activity",
    "concentration_from_activity",
    "activity_from_concentration",
    "standard_for_activity",
    "activity_from_px",
    "px_from_activity",
    "nernst_slope",
    "mv_to_relative_error",
    "relative_error_to_mv",
    "nikolsky_eisenman",
    "temperature_error",
    "design_adjuster",
    "compare_adjusters",
    "AdjusterDesign",
    "AdjusterComparison",
    "Budget",
    "Buffer",
    "Check",
    "Electrode",
    "SamplePopulation",
    "StockComponent",
    "check_samples",
    "SampleCheck",
    "calibrate",
    "quantify",
    "known_addition",
    "multiple_addition",
    "double_addition",
    "selectivity",
    "junction_potential",
    "error_budget",
    "ErrorBudget",
    "Calibration",
    "Quantitation",
    "DriftCheck",
    "AdditionResult",
    "Selectivity",
    "speciate",
    "ph_of",
    "Speciation",
    "Complex",
    "ConvergenceError",
    "IonactError",
    "InputError",
    "UnitError",
    "UnknownSpeciesError",
    "MissingParameterError",
    "InfeasibleDesignError",
    "ValidityRangeError",
    "ValidityRangeWarning",
    "UnitAssumptionWarning",
    "strict",
]
