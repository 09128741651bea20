"""Calibration, quantitation, standard addition, selectivity, junction potentials and the
error budget of a result: from millivolts to a reported concentration with its uncertainty,
with the activity corrections of the one evaluation path built in."""

from .addition import AdditionResult, double_addition, known_addition, multiple_addition
from .budget import BudgetTerm, ErrorBudget, error_budget
from .context import Measurement, measurement_for
from .fit import DEFAULT_LINEARITY_MV, DEFAULT_SLOPE_WINDOW, FITS, Calibration, CalibrationCheck, calibrate
from .junction import junction_potential
from .quantitation import (
           DEFAULT_COVERAGE,
           DEFAULT_DRIFT_LIMIT_MV,
           QUANTITY_STATUSES,
           DriftCheck,
           Quantitation,
           quantify,
)
from .selectivities import METHODS, Selectivity, selectivity

__all__ = ["Measurement", "measurement_for", "Calibration", "CalibrationCheck", "calibrate", "FITS",
           "DEFAULT_SLOPE_WINDOW", "DEFAULT_LINEARITY_MV", "Quantitation", "DriftCheck", "quantify",
           "QUANTITY_STATUSES", "DEFAULT_DRIFT_LIMIT_MV", "DEFAULT_COVERAGE", "AdditionResult", "known_addition",
           "multiple_addition", "double_addition", "junction_potential", "Selectivity", "selectivity", "METHODS",
           "BudgetTerm", "ErrorBudget", "error_budget"]
