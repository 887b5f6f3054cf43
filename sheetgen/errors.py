"""One exception family for everything a user can get wrong, and one for our own bugs.

The CLI maps :class:`SheetgenError` to one line on stderr and exit code 2.
Messages name the key or file and what is allowed, e.g.
``panel.width = 5: must be from 40 to 600 mm``.

:class:`SheetgenError` is deliberately *not* a ``ValueError``: a core routine
that catches ``ValueError`` for its own reasons (a numeric edge case) must not
swallow a user's error by accident. Internal invariant failures are
:class:`GeometryBug` (exit code 3), never ``ValueError`` either.
"""

from __future__ import annotations


class SheetgenError(Exception):
    """Bad input: a parameter, an option or a file. Exit code 2, no traceback."""


class ParameterError(SheetgenError):
    """A parameter (TOML key or --set override) is missing, mistyped or out of range."""


class InputFileError(SheetgenError):
    """An input file cannot be read or does not hold what it should."""


class OutputPathError(SheetgenError):
    """An output target that cannot or must not be written: it holds files sheetgen
    did not write, it is the input, it is a device, its folder is read-only, the
    disk is full, the name is too long."""


class GeometryBug(RuntimeError):
    """Verification of generated geometry failed. This is a bug in sheetgen, never
    user error: it is reported loudly and nothing is written."""


class Interrupted(BaseException):
    """The process was asked to stop (SIGTERM). Like ``KeyboardInterrupt`` it is a
    ``BaseException`` so that no ``except Exception`` keeps the run going; the
    CLI turns it into exit code ``128 + signal``."""

    def __init__(self, signum: int):
        super().__init__(signum)
        self.signum = signum
