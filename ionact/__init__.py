"""ionact: ionic strength, activity coefficients and ionic strength adjuster design."""

__version__ = "0.1.0"
from . import (
    models,  # noqa: F401
    water,  # noqa: F401
)
from .activity import (  # noqa: F401
    activity_coefficients,
    compare_models,
    mean_activity_coefficient,
    osmotic_coefficient,
    water_activity,
)
from .errors import *  # noqa: F401,F403
from .solution import (  # noqa: F401
    Solution,
    ionic_strength_from_conductivity,
    ionic_strength_from_tds,
)
from .species import Ion, Salt  # noqa: F401
from .water import nernst_slope  # noqa: F401
