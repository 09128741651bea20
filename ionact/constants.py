"""Numbers used in more than one module, named once."""

from __future__ import annotations

import math

__all__ = ["LN10", "PARAMETER_WINDOW", "REFERENCE_TEMPERATURE"]

LN10 = math.log(10.0)
REFERENCE_TEMPERATURE = 25.0  # °C: tabulated parameters are 25 °C values unless stated
# Parameters tabulated at 25 °C without a temperature dependence are used, with a range
# notice outside this window (common practice: ± 5 K changes most of them little).
PARAMETER_WINDOW = (20.0, 30.0)
