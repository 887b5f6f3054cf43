"""Entry point of ``python -m sheetgen`` and of the ``sheetgen`` console script.

Kept tiny on purpose: the signal handlers are set as soon as this module loads
and the interrupt is caught around every other import, so Ctrl-C at any moment
(loading included) prints one line and exits 130, and SIGTERM exits 143
(128 + the signal's number, the shell's convention).
"""

import signal
import sys

from sheetgen.errors import (
    Interrupted,
    interrupt_in_chain,
    interrupt_line,
    stop_on_signal,
)

signal.signal(signal.SIGINT, stop_on_signal)
signal.signal(signal.SIGTERM, stop_on_signal)
_print_exception = sys.excepthook


def _quiet_when_interrupted(kind, value, tb):
    """C extensions (numpy's loader) print a failed import through this hook when
    an interrupt hit it; after an interrupt that print is noise: one line comes."""
    if interrupt_in_chain(value) is None:
        _print_exception(kind, value, tb)


sys.excepthook = _quiet_when_interrupted


def _finished() -> None:
    """The run is over and its exit code known: a signal from now on changes nothing."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    signal.signal(signal.SIGTERM, signal.SIG_IGN)


def run() -> None:
    signal.signal(signal.SIGINT, stop_on_signal)
    signal.signal(signal.SIGTERM, stop_on_signal)
    try:
        from sheetgen.cli import main

        main()
    except SystemExit:
        _finished()
        raise
    except BaseException as exc:
        signum = interrupt_in_chain(exc)
        if signum is None:
            raise
        _finished()
        sys.stderr.write(interrupt_line(signum, exc.note if isinstance(exc, Interrupted) else "") + "\n")
        sys.exit(128 + signum)


if __name__ == "__main__":
    run()
