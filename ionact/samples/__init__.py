"""The analyst's job: check a batch of samples against a method before measuring, and plan
dilutions. ``table`` reads sample files strictly and in chunks; ``columns`` gives every
column its meaning and unit and every cell its value or reason; ``check`` runs the batch
through the design's evaluation path; ``result`` holds the answer; ``output`` writes it."""

from .check import CHUNK, DEFAULT_DILUTIONS, Method, check_samples
from .columns import DEFAULT_CHARGE_BALANCE_PERCENT, MAX_ANALYTE, MAX_IONIC_STRENGTH
from .output import (
    FIGURE_FORMATS,
    BatchSummary,
    atomic_output,
    check_csv,
    printable,
    read_report_csv,
    report_to_text,
    safe_cell,
    write_report_csv,
)
from .result import CANNOT, DILUTE, INSIDE, INVALID, REPORT_FORMAT, REPORT_VERSION, STATUSES, SampleCheck
from .table import MAX_CELL, MAX_COLUMNS, MAX_LINE_BYTES, SampleTable, iter_samples_csv, read_samples_csv

__all__ = [
    "check_samples",
    "check_csv",
    "SampleCheck",
    "SampleTable",
    "BatchSummary",
    "atomic_output",
    "Method",
    "read_samples_csv",
    "iter_samples_csv",
    "write_report_csv",
    "read_report_csv",
    "report_to_text",
    "safe_cell",
    "printable",
    "STATUSES",
    "INSIDE",
    "DILUTE",
    "CANNOT",
    "INVALID",
    "DEFAULT_DILUTIONS",
    "DEFAULT_CHARGE_BALANCE_PERCENT",
    "MAX_ANALYTE",
    "MAX_IONIC_STRENGTH",
    "MAX_LINE_BYTES",
    "MAX_COLUMNS",
    "MAX_CELL",
    "FIGURE_FORMATS",
    "REPORT_FORMAT",
    "REPORT_VERSION",
    "CHUNK",
]
