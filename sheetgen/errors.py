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


class SheetTooSmall(ParameterError):
    """A part of the kit does not fit the usable sheet."""

    def __init__(self, message: str, part: str):
        super().__init__(message)
        self.part = part


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

    def __init__(self, signum: int, note: str = ""):
        super().__init__(signum, note)
        self.signum = signum
        self.note = note


_received: list[int] = []


def stop_on_signal(signum: int, frame=None) -> None:
    """Signal handler for SIGINT and SIGTERM: remember the signal, then raise
    (KeyboardInterrupt for SIGINT, :class:`Interrupted` otherwise)."""
    _received.append(signum)
    if signum == 2:
        raise KeyboardInterrupt
    raise Interrupted(signum)


def interrupt_in_chain(exc: BaseException) -> int | None:
    """The signal behind ``exc`` when an interrupt caused it: one in its chain, or
    one received by :func:`stop_on_signal` (a C extension that fails to load
    because Ctrl-C hit the import of its dependency raises a bare ImportError)."""
    seen: set[int] = set()
    link: BaseException | None = exc
    while link is not None and id(link) not in seen:
        seen.add(id(link))
        if isinstance(link, KeyboardInterrupt):
            return 2
        if isinstance(link, Interrupted):
            return link.signum
        link = link.__cause__ or link.__context__
    return _received[0] if _received else None


def interrupt_line(signum: int, note: str = "") -> str:
    """The one line printed when a run is stopped by a signal."""
    what = "interrupted (Ctrl-C)" if signum == 2 else f"stopped by signal {signum}"
    return f"sheetgen: {what}; " + (note or "nothing was written, any earlier output is as it was")
