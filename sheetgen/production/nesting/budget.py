"""The work budget and the wall-clock ceilings of a run, its stages and its searches.

Time and work: ``effort`` is a work budget in millions of work units (see
:class:`~sheetgen.production.nesting.place.Work`; about half a second each on a small
two-core machine); the same seed and effort give the same layout on any
machine under any load. Without ``effort`` it is derived from the time limit
(:data:`EFFORT_PER_SECOND` per second). ``time_limit_s`` is a wall-clock
ceiling on the search stage: when it fires first the layout depends on the
machine's speed, and the result says so (``stopped_by`` is "time_limit";
otherwise "effort" when the budget ran out, or "converged" when the search
ended on its own: it reached the lower bound or stopped improving). The first
layout of each batch is always finished.

The ceiling is real: the clock starts when ``nest`` is called and, once it
fires, everything that follows is cut short at the next part placed: the
column layouts' finishing (the parts not yet placed go in rows of boxes onto
new sheets, a complete and valid layout at once), the order and assignment
searches, the last sheet's compaction, and the improvement searches in other
processes (one cut while rebuilding its start hands back the first layout).
What is left past the limit (the overshoot) is the preparation of the outlines
before the first part is placed (the clearance outlines; about 1 s for the demo
kit), the placement in progress, each later batch's first pass of column
sheets, and the building of the result (about 0.05 ms a part);
tests/bench/bench_kits.py prints the wall time.
"""

from __future__ import annotations

import time

from sheetgen.production.nesting.place import Work


# Work units per second of the budget, measured on the project's two-core machine
# with the benchmark instances (tests/bench/bench_esicup.py prints the rate seen).
WORK_PER_SECOND = 1_800_000  # fitted rate about 2.3 million; kept lower for a shared machine
EFFORT_UNITS = 1_000_000     # work units in one unit of effort
EFFORT_PER_SECOND = WORK_PER_SECOND / EFFORT_UNITS


class Clock:
    """The wall-clock ceiling and the progress line; remembers whether the ceiling fired."""

    def __init__(self, time_limit_s: float, progress, t0: float | None = None):
        self.t0 = time.monotonic() if t0 is None else t0
        self.deadline = self.t0 + time_limit_s
        self.progress = progress
        self.last = -1.0
        self.fired = False

    def stop(self) -> bool:
        if not self.fired and time.monotonic() > self.deadline:
            self.fired = True
        return self.fired

    def report(self, fraction: float, message: str) -> None:
        if self.progress is None:
            return
        fraction = min(max(fraction, 0.0), 1.0)
        if fraction - self.last >= 0.005 or fraction >= 1.0:
            self.last = fraction
            self.progress(fraction, message)


class StageClock:
    """The ceiling of one stage of a large run: the run's ceiling, or the stage's
    share of it, whichever comes first (so that a late stage is not starved)."""

    def __init__(self, clock: Clock, deadline: float):
        self.clock = clock
        self.deadline = deadline
        self.fired = False

    def stop(self) -> bool:
        if not self.fired and (self.clock.stop() or time.monotonic() > self.deadline):
            self.fired = True
        return self.fired

    def report(self, fraction: float, message: str) -> None:
        self.clock.report(fraction, message)


class Budget:
    """The work budget of one search stage, and whether it ran out."""

    def __init__(self, work: Work, units: int):
        self.work = work
        self.units = units
        self.hit = False

    def spent(self) -> bool:
        if self.work.units >= self.units:
            self.hit = True
        return self.hit


def progress_of(clock: Clock, work: Work, w0: int, units: int, f0: float, f1: float):
    """Progress callbacks for one stage: work spent in it, mapped onto [f0, f1]."""
    def make(msg: str):
        return lambda: clock.report(f0 + (f1 - f0) * min(1.0, (work.units - w0) / max(units, 1)), msg)
    return make


class Deadline:
    """The wall-clock ceiling inside one improvement search (any process)."""

    def __init__(self, deadline: float):
        self.deadline = deadline
        self.fired = False

    def stop(self) -> bool:
        if not self.fired and time.monotonic() > self.deadline:
            self.fired = True
        return self.fired
