"""One exception family for everything a user can get wrong.

The CLI maps :class:`SheetgenError` to one line on stderr and exit code 2.
Messages name the key or file and what is allowed, e.g.
``panel.width = 5: must be from 40 to 600 mm``.
"""

from __future__ import annotations


class SheetgenError(ValueError):
    """Bad input: a parameter, an option or a file. Exit code 2, no traceback."""


class ParameterError(SheetgenError):
    """A parameter (TOML key or --set override) is missing, mistyped or out of range."""


class SheetTooSmall(ParameterError):
    """A part of the kit does not fit the usable sheet."""

    def __init__(self, message: str, part: str):
        super().__init__(message)
        self.part = part


class InputFileError(SheetgenError):
    """An input file cannot be read or does not hold what it should."""


class GeometryBug(RuntimeError):
    """Verification of generated geometry failed. This is a bug in sheetgen, never
    user error: it is reported loudly and nothing is written."""
