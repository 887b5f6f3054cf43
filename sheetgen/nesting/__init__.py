"""Nesting parts on sheet stock or a strip: see :func:`nest` and :func:`verify`."""

from sheetgen.nesting.engine import nest
from sheetgen.nesting.model import NestItem, NestResult, PlacedPart
from sheetgen.nesting.verify import verify

__all__ = ["NestItem", "NestResult", "PlacedPart", "nest", "verify"]

