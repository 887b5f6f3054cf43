"""Nesting parts on sheet stock or a strip: see :func:`nest` and :func:`verify`."""

from sheetgen.nesting.bound import lower_bound_sheets
from sheetgen.nesting.engine import RunTooLarge, check_ceiling, estimate, nest
from sheetgen.nesting.model import NestItem, NestResult, PlacedPart, sheet_patterns
from sheetgen.nesting.verify import verify

__all__ = ["NestItem", "NestResult", "PlacedPart", "RunTooLarge", "check_ceiling", "estimate", "lower_bound_sheets",
           "nest", "sheet_patterns", "verify"]
