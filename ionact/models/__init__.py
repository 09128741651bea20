"""Activity-coefficient models: low-level broadcasting functions and the model registry.

``ionact.models.davies(charge, I)`` and its siblings work on plain numbers and arrays;
:func:`ionact.activity_coefficients` applies a named model to a :class:`~ionact.Solution`.
"""

from .debye_huckel import (
    B_DOT,
    DAVIES_COEFFICIENT,
    RANGES,
    SETSCHENOW_DEFAULT,
    b_dot,
    bates_guggenheim,
    davies,
    extended_debye_huckel,
    guntelberg,
    limiting,
    setschenow,
    truesdell_jones,
)
from .registry import MODELS, ModelInfo, get_model, model_names

__all__ = [
    "limiting",
    "extended_debye_huckel",
    "guntelberg",
    "davies",
    "truesdell_jones",
    "b_dot",
    "bates_guggenheim",
    "setschenow",
    "MODELS",
    "ModelInfo",
    "get_model",
    "model_names",
    "RANGES",
    "DAVIES_COEFFICIENT",
    "B_DOT",
    "SETSCHENOW_DEFAULT",
]
