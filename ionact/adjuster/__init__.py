"""Ionic strength adjuster (ISA) design: the method developer's job, end to end.

An ISA is a concentrated, inert electrolyte added in a fixed volume ratio to every sample
and standard so that the analyte's activity coefficient is (nearly) the same in all of
them. :func:`design_adjuster` proves it and writes the recipe; :func:`compare_adjusters`
ranks candidate stocks for one job. The modules follow the job's steps: ``inputs``
(the records a job is made of), ``system`` (the fixed arrays), ``solve`` (the search),
``checks``, ``design`` (the result record), ``report``, ``plot``, ``compare``.
"""

from .api import design_adjuster
from .checks import STATUSES, Check
from .compare import AdjusterComparison, CandidateRow, compare_adjusters
from .design import CAUTIONS, DESIGN_FORMAT, DESIGN_VERSION, AdjusterDesign, RecipeLine
from .inputs import MAX_VOLUME_RATIO, ROLES, Budget, Buffer, Electrode, SamplePopulation, StockComponent

__all__ = [
    "design_adjuster",
    "compare_adjusters",
    "AdjusterDesign",
    "AdjusterComparison",
    "CandidateRow",
    "RecipeLine",
    "Check",
    "STATUSES",
    "Budget",
    "Buffer",
    "Electrode",
    "SamplePopulation",
    "StockComponent",
    "ROLES",
    "MAX_VOLUME_RATIO",
    "CAUTIONS",
    "DESIGN_FORMAT",
    "DESIGN_VERSION",
]
