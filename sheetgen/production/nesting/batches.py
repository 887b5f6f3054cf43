"""Sheet mode stage by stage: a run cut into batches whose full sheets are repeated as patterns.

Large runs: when every quantity shares a factor (kits), the run is cut into
batches of whole units of at most :data:`BATCH_PARTS` parts; a batch is nested
with the full search, its sheets (all of them for whole units; otherwise all
but the last, the well-filled ones) are kept as *patterns* and repeated as
often as the remaining parts allow, and what is left is nested again the same
way. A batch of whole units whose last sheet is filled less than
:data:`POOL_FILL` times the mean of its other sheets is treated like the rest:
that sheet is not repeated, and its parts go back to the run, where they are
nested together with what is left (one sheet of leftovers from many repeats
instead of a poorly filled sheet in every repeat). Each batch starts with the column layouts of
:mod:`~sheetgen.production.nesting.columns`; the order search runs when they miss
the bound, and the assignment search of :mod:`~sheetgen.production.nesting.assign`
with what is left of the batch's budget. Repeated patterns cost one search, the
shop cuts one program many times, and memory stays bounded.
"""

from __future__ import annotations

import math
import time

from sheetgen.production.nesting.assign import compact_last, reassign
from sheetgen.production.nesting.budget import Budget, StageClock, progress_of
from sheetgen.production.nesting.columns import column_layout
from sheetgen.production.nesting.improve import sheet_search


NON_LAST_SHARE = 4           # a batch that is repeated gets 1/NON_LAST_SHARE of what is left of the budget
BATCH_PARTS = 440            # parts in one batch of a large run (about 20 demo kits)
COMPACT_UNITS = 600_000      # work of the last sheet's compaction per batch (about 0.3 s)
POOL_FILL = 0.75             # a batch's last sheet filled less than this share of the others' mean is not repeated
ASSIGN_SHARE = 0.5           # of a stage's budget for the assignment search (assign.py)


def sheet_run(lib, counts, usable, lower, work, budget, rng, clock, jobs):
    """Sheets for ``counts`` copies of each item: batches, patterns repeated, the rest nested (module doc).

    ``lower()`` gives the run's lower bound of sheets; it is asked for only when the last batch
    needs it (it may still be computed in another process while the first batches are nested).

    Each stage gets its share of the work budget and the same share of the
    wall-clock ceiling. Returns (sheets as lists of (item, shape id, px, py),
    unplaced items, stage budgets, stage clocks)."""
    remaining = list(counts)
    sheets: list[list[tuple]] = []
    unplaced: list[int] = []
    stages: list[Budget] = []
    clocks: list[StageClock] = []
    total0 = sum(counts)
    while True:
        total = sum(remaining)
        if total == 0:
            break
        left = max(0, budget - work.units)
        last = total <= BATCH_PARTS
        batch = list(remaining) if last else _batch(remaining)
        share = left if last else left // NON_LAST_SHARE
        stage_end = work.units + share
        now = time.monotonic()
        left_s = max(0.0, clock.deadline - now)
        stage_clock = StageClock(clock, now + (left_s if last or left == 0 else left_s * share / left))
        clocks.append(stage_clock)
        f0 = 1.0 - total / total0
        f1 = 1.0 - (total - sum(batch)) / total0 if not last else 1.0
        part_items = [i for i, q in enumerate(batch) for _ in range(q)]
        done = len(sheets)

        def share_lower(last=last, done=done) -> int:
            # the last batch: the run's bound less the sheets before it; a batch before: one sheet
            return max(1, lower() - done) if last else 1

        # column layouts of the large parts first; the order search when they miss the bound. Like a
        # first layout, always finished: bounded work, the same on any machine unless the run's
        # wall-clock ceiling fires, which cuts the finishing short (the parts not yet placed go in
        # rows of boxes onto new sheets); it may use the whole run's budget, the first batch's NFPs
        # serving the rest; parts that pair well (pairs.py) are offered in pairs too
        got = column_layout(lib, batch, usable, work, max(stage_end, budget), share_lower,
                            stop=clock.stop, finished=3, pairs=True) or []
        unplaced_items: list[int] = []
        if not got or (last and len(got) > share_lower() and work.units < stage_end and not clock.stop()):
            stage = Budget(work, work.units + int(max(0, stage_end - work.units) * (1 - ASSIGN_SHARE)))
            stages.append(stage)
            placements, unplaced_parts, n_sheets = sheet_search(
                lib, part_items, usable, share_lower(), stage, rng, stage_clock,
                progress_of(clock, work, work.units, share, f0, f1), compact=last, jobs=jobs)
            searched: list[list[tuple]] = [[] for _ in range(n_sheets)]
            for p, si, sid, px, py in placements:
                searched[si].append((part_items[p], sid, px, py))
            if not got or (not unplaced_parts and _key(lib, searched) < _key(lib, got)):
                got, unplaced_items = searched, [part_items[p] for p in unplaced_parts]
        if not unplaced_items and len(got) > share_lower():
            stages.append(Budget(work, stage_end))
            got = reassign(lib, got, usable, share_lower(), work, stage_end, rng, stage_clock.stop)
            stages[-1].spent()
        if got:  # a longer remnant on the batch's last sheet (the run's last, or repeated with its block);
            # a small fixed amount of work, cut only by the run's wall-clock ceiling
            got = compact_last(lib, got, usable, work, work.units + COMPACT_UNITS, rng, clock.stop)
        if last:
            sheets.extend(got)
            unplaced.extend(unplaced_items)
            break
        # the well-filled sheets; or, when the batch is whole units (kits), all of them: whole kits
        # per block leave no odd mix of parts for the end
        whole = not unplaced_items and _units(remaining) > 1 and not _poor_last(lib, got, usable)
        block = got if whole or len(got) == 1 else got[:-1]
        used = [0] * len(counts)
        for sheet in block:
            for item, *_ in sheet:
                used[item] += 1
        times = min(remaining[i] // used[i] for i in range(len(counts)) if used[i])
        for _ in range(times):
            sheets.extend(block)
        remaining = [r - times * u for r, u in zip(remaining, used)]
    return sheets, unplaced, stages, clocks


def _fill(lib, sheet, usable) -> float:
    """Share of the usable area that the parts of ``sheet`` cover."""
    return sum(lib.shapes[sid].area for _i, sid, _x, _y in sheet) / ((usable[2] - usable[0]) * (usable[3] - usable[1]))


def _poor_last(lib, sheets, usable) -> bool:
    """Whether the last sheet of a batch is filled less than POOL_FILL times
    the mean of the others: then it is not repeated with the batch; its parts
    go back to the run, to be nested with the rest."""
    if len(sheets) < 2:
        return False
    body = [_fill(lib, s, usable) for s in sheets[:-1]]
    return _fill(lib, sheets[-1], usable) < POOL_FILL * sum(body) / len(body)


def _units(remaining: list[int]) -> int:
    """The common factor of the counts (kits in a kit run)."""
    g = 0
    for r in remaining:
        g = math.gcd(g, r)
    return g


def _key(lib, sheets) -> tuple:
    """Fewer sheets, then less on the last one."""
    return (len(sheets), sum(lib.shapes[sid].area for _i, sid, _x, _y in sheets[-1]) if sheets else 0.0)


def _batch(remaining: list[int]) -> list[int]:
    """A batch of at most BATCH_PARTS parts: whole units when the counts share
    a factor (kits), else the same share of every item."""
    total = sum(remaining)
    g = 0
    for r in remaining:
        g = math.gcd(g, r)
    unit = [r // g for r in remaining]
    per_unit = sum(unit)
    if g > 1 and per_unit <= BATCH_PARTS:
        m = max(1, BATCH_PARTS // per_unit)
        return [u * m for u in unit]
    return [min(r, max(1 if r else 0, r * BATCH_PARTS // total)) for r in remaining]
