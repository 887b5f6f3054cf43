"""Nesting parts on sheet stock or a strip: see :func:`nest` and :func:`verify`."""

from sheetgen.production.nesting.bound import lower_bound_sheets
from sheetgen.production.nesting.ceiling import RunTooLarge, check_ceiling, estimate
from sheetgen.production.nesting.engine import nest
from sheetgen.production.nesting.model import NestItem, NestResult, PlacedPart, sheet_patterns
from sheetgen.production.nesting.verify import verify

__all__ = ["NestItem", "NestResult", "PlacedPart", "RunTooLarge", "check_ceiling", "estimate", "lower_bound_sheets",
           "nest", "sheet_patterns", "verify"]
