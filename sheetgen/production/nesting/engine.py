"""``nest``: validate, build, improve, and hand back a :class:`NestResult`.

First layouts: the parts in a few orders (largest convex hull first, the same
in rounds, largest area first, longest side first), each under each placement
rule (:data:`~sheetgen.production.nesting.place.RULES`); the best is kept.

Sheet mode (``sheet_mm=(W, H)``): parts go onto as many W x H sheets as
needed; the usable area is the sheet shrunk by ``margin_mm`` on every side.
The search first tries to empty the last sheet (a plan must place every part on
one sheet fewer, the cost being the area left over), then pushes the parts of
the last sheet towards x = 0 so the remnant at its far end is as long as
possible.

Strip mode (``strip_width_mm=W``): the strip runs along +x from x = 0 with its
width along y; the length used is the rightmost cut contour plus the margin.
The search repeatedly asks for a layout in a strip a little shorter than the
best so far (2 % at first; the cost is the area of the parts that do not fit),
halves the step (down to 0.2 %) when it cannot find one, and carries the plan
that came closest into the next attempt.

Large runs: when every quantity shares a factor (kits), the run is cut into
batches of whole units of at most :data:`BATCH_PARTS` parts; a batch is nested
with the full search, its sheets but the last (the well-filled ones) are kept
as *patterns* and repeated as often as the remaining parts allow, and what is
left is nested again the same way. Repeated patterns cost one search, the
shop cuts one program many times, and memory stays bounded.

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

Every core: after the first layout, :data:`SEARCHES` improvement searches with
seeds drawn from the run's seed start from it, each with the stage's remaining
budget, in ``jobs`` processes, and the best is kept (ties: the first search).
Each starts from the same copy of the shape library, so the layout depends on
the seed and the effort only, never on ``jobs``.

Ceiling: before any work, :func:`estimate` gives the memory a run needs from
its part and vertex counts; a run above ``memory_limit_bytes`` (default
:data:`MEMORY_LIMIT_BYTES`) or above :data:`MAX_PARTS` parts is refused with
:class:`RunTooLarge`, naming the count and the limit.
"""

from __future__ import annotations

import math
import pickle
import random
import time
from collections.abc import Callable, Sequence

import numpy as np
import shapely
from shapely.geometry import Polygon

from sheetgen.errors import SheetgenError
from sheetgen.production.nesting.bound import lower_bound_sheets
from sheetgen.production.nesting.decode import Decoded, Decoder
from sheetgen.production.nesting.model import NestItem, NestResult, PlacedPart
from sheetgen.production.nesting.nfp import rotate_ccw
from sheetgen.production.nesting.place import RULES, ShapeLibrary, Sheet, Work, place_one
from sheetgen.production.nesting.search import late_acceptance

# Work units per second of the budget, measured on the project's two-core machine
# with the benchmark instances (tests/bench/bench_esicup.py prints the rate seen).
WORK_PER_SECOND = 1_800_000  # fitted rate about 2.3 million; kept lower for a shared machine
EFFORT_UNITS = 1_000_000     # work units in one unit of effort
EFFORT_PER_SECOND = WORK_PER_SECOND / EFFORT_UNITS
FIRST_SHARE = 0.3            # of a batch's budget, at most, for the starting layouts beyond the first
NON_LAST_SHARE = 4           # a batch that is repeated gets 1/NON_LAST_SHARE of what is left of the budget
SEARCHES = 2                 # independent improvement searches per stage, each with the full budget
BATCH_PARTS = 440            # parts in one batch of a large run (about 20 demo kits)

# The ceiling (see the module doc). The per-vertex and per-part figures are the
# memory a placed part costs until its sheet is written (placed polygon,
# contours, marks, layout records): the peak of `nest --kits 1000` on the demo
# kit (236 MB for 21,000 parts and 5 million vertices) and of 4000 kits (646 MB
# for 84,000 parts) are about half of what these figures estimate (430 MB, 1.3 GB).
MEMORY_LIMIT_BYTES = 2 * 1024**3
MAX_PARTS = 200_000
BYTES_PER_VERTEX = 48
BYTES_PER_PART = 2_000
BYTES_FIXED = 150 * 1024**2


class RunTooLarge(SheetgenError):
    """A run above the nester's ceiling: refused before any work."""


def estimate(items: Sequence[NestItem]) -> tuple[int, int]:
    """(parts, bytes): the part count of a run and the memory it needs, from
    the part and vertex counts alone (see the constants above)."""
    parts = sum(int(it.qty) for it in items)
    verts = sum(int(it.qty) * int(shapely.get_num_coordinates(it.polygon)) for it in items)
    return parts, BYTES_FIXED + parts * BYTES_PER_PART + verts * BYTES_PER_VERTEX


def check_ceiling(items: Sequence[NestItem], memory_limit_bytes: float = MEMORY_LIMIT_BYTES) -> None:
    """Raise :class:`RunTooLarge` when ``items`` are above the ceiling."""
    parts, need = estimate(items)
    gib = 1024**3
    if parts > MAX_PARTS:
        raise RunTooLarge(f"{parts:,} parts to nest: the limit is {MAX_PARTS:,} parts per run "
                          f"(split the run into smaller ones)")
    if need > memory_limit_bytes:
        per_part = (need - BYTES_FIXED) / parts
        fits = int((memory_limit_bytes - BYTES_FIXED) / per_part)
        raise RunTooLarge(f"{parts:,} parts to nest would need about {need / gib:.1f} GB of memory: the limit is "
                          f"{memory_limit_bytes / gib:.1f} GB (about {max(fits, 0):,} of these parts per run; "
                          f"split the run into smaller ones)")


def _check_number(name: str, value, lo: float, *, lo_open: bool = False) -> float:
    try:
        v = float(value)
    except (TypeError, ValueError):
        raise SheetgenError(f"{name} = {value!r}: must be a number") from None
    if not math.isfinite(v) or v < lo or (lo_open and v == lo):
        rel = ">" if lo_open else ">="
        raise SheetgenError(f"{name} = {value!r}: must be a finite number {rel} {lo:g}")
    return v


def _validate_items(items: Sequence[NestItem]) -> None:
    if not items:
        raise SheetgenError("nothing to nest: the list of parts is empty")
    for i, it in enumerate(items):
        label = f"part {it.name!r}" if getattr(it, "name", "") else f"part #{i + 1}"
        poly = it.polygon
        if not isinstance(poly, Polygon) or poly.is_empty or not poly.is_valid or poly.area <= 0:
            raise SheetgenError(f"{label}: outline must be one valid polygon with a positive area")
        if isinstance(it.qty, bool) or not isinstance(it.qty, (int, np.integer)) or it.qty < 1:
            raise SheetgenError(f"{label}: quantity = {it.qty!r}: must be a whole number >= 1")
        if not it.rotations_deg:
            raise SheetgenError(f"{label}: rotations: at least one allowed angle is needed")
        for a in it.rotations_deg:
            if not isinstance(a, (int, float, np.floating, np.integer)) or not math.isfinite(float(a)):
                raise SheetgenError(f"{label}: rotation {a!r}: must be a finite angle in degrees")


def _fmt(v: float) -> str:
    return f"{v:.1f}".rstrip("0").rstrip(".")


class _Clock:
    """The wall-clock ceiling and the progress line; remembers whether the ceiling fired."""

    def __init__(self, time_limit_s: float, progress):
        self.t0 = time.monotonic()
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


class _StageClock:
    """The ceiling of one stage of a large run: the run's ceiling, or the stage's
    share of it, whichever comes first (so that a late stage is not starved)."""

    def __init__(self, clock: _Clock, deadline: float):
        self.clock = clock
        self.deadline = deadline
        self.fired = False

    def stop(self) -> bool:
        if not self.fired and (self.clock.stop() or time.monotonic() > self.deadline):
            self.fired = True
        return self.fired

    def report(self, fraction: float, message: str) -> None:
        self.clock.report(fraction, message)


class _Budget:
    """The work budget of one search stage, and whether it ran out."""

    def __init__(self, work: Work, units: int):
        self.work = work
        self.units = units
        self.hit = False

    def spent(self) -> bool:
        if self.work.units >= self.units:
            self.hit = True
        return self.hit


def nest(items: Sequence[NestItem], *, sheet_mm: tuple[float, float] | None = None,
         strip_width_mm: float | None = None, margin_mm: float = 0.0, spacing_mm: float = 0.0,
         time_limit_s: float = 10.0, effort: float | None = None, seed: int = 1,
         progress: Callable[[float, str], None] | None = None,
         memory_limit_bytes: float = MEMORY_LIMIT_BYTES, jobs: int = 1) -> NestResult:
    """Nest ``items`` on sheets of ``sheet_mm`` or on a strip of ``strip_width_mm``.

    Exactly one of ``sheet_mm`` and ``strip_width_mm`` is given. ``effort``
    (millions of work units, default ``EFFORT_PER_SECOND * time_limit_s``) is
    the deterministic work budget; ``time_limit_s`` the wall-clock ceiling of
    the search. Raises :class:`SheetgenError` for bad input, including a part
    that fits the usable area in none of its allowed rotations, and
    :class:`RunTooLarge` for a run above the ceiling. ``jobs`` processes run
    the :data:`SEARCHES` improvement searches of each stage side by side; the
    layout does not depend on it.
    """
    _validate_items(items)
    if (sheet_mm is None) == (strip_width_mm is None):
        raise SheetgenError("give either a sheet size or a strip width, not both and not neither")
    margin = _check_number("margin", margin_mm, 0.0)
    spacing = _check_number("spacing", spacing_mm, 0.0)
    limit = _check_number("time limit", time_limit_s, 0.0)
    work_effort = limit * EFFORT_PER_SECOND if effort is None else _check_number("effort", effort, 0.0)
    check_ceiling(items, memory_limit_bytes)
    if sheet_mm is not None:
        try:
            w_raw, h_raw = sheet_mm
        except (TypeError, ValueError):
            raise SheetgenError(f"sheet = {sheet_mm!r}: must be two sizes W x H in mm") from None
        sheet_w = _check_number("sheet width", w_raw, 0.0, lo_open=True)
        sheet_h = _check_number("sheet height", h_raw, 0.0, lo_open=True)
        if 2 * margin >= min(sheet_w, sheet_h):
            raise SheetgenError(f"margin = {_fmt(margin)} mm: must be less than half the sheet's smaller side "
                                f"({_fmt(min(sheet_w, sheet_h) / 2)} mm)")
    else:
        sheet_h = _check_number("strip width", strip_width_mm, 0.0, lo_open=True)
        sheet_w = math.inf
        if 2 * margin >= sheet_h:
            raise SheetgenError(f"margin = {_fmt(margin)} mm: must be less than half the strip width "
                                f"({_fmt(sheet_h / 2)} mm)")
    strip = sheet_mm is None

    rotations = [tuple(float(a) % 360.0 for a in it.rotations_deg) for it in items]
    sizes = [max(it.polygon.bounds[2] - it.polygon.bounds[0], it.polygon.bounds[3] - it.polygon.bounds[1])
             for it in items]
    ref = max([1000.0, sheet_h, *sizes] + ([] if strip else [sheet_w]))
    eps = 1e-10 * ref
    lib = ShapeLibrary([it.polygon for it in items], rotations, spacing, eps, ref)

    usable_w = (sheet_w - 2 * margin) if not strip else math.inf
    usable_h = sheet_h - 2 * margin
    for i, it in enumerate(items):
        if not any(lib.shapes[s].width <= usable_w and lib.shapes[s].height <= usable_h for s in lib.item_shapes[i]):
            s0 = lib.shapes[lib.item_shapes[i][0]]
            where = (f"the usable strip width of {_fmt(usable_h)} mm (strip {_fmt(sheet_h)} mm, "
                     f"margin {_fmt(margin)} mm)"
                     if strip else
                     f"the usable area of {_fmt(usable_w)} x {_fmt(usable_h)} mm (sheet {_fmt(sheet_w)} x "
                     f"{_fmt(sheet_h)} mm, margin {_fmt(margin)} mm)")
            raise SheetgenError(f"part {it.name!r} is {_fmt(s0.width)} x {_fmt(s0.height)} mm and fits "
                                f"{where} in none of its allowed rotations")

    total_area = sum(it.polygon.area * it.qty for it in items)
    rng = random.Random(seed)
    work = Work()
    lib.work = work
    budget = int(work_effort * EFFORT_UNITS)
    clock = _Clock(limit, progress)
    counts = [int(it.qty) for it in items]

    if strip:
        parts = [(i, c) for i, it in enumerate(items) for c in range(int(it.qty))]
        part_items = [i for i, _ in parts]
        orders = _initial_orders(lib, part_items)
        stage = _Budget(work, budget)
        open_len = sum(max(max(lib.shapes[s].width, lib.shapes[s].height) for s in lib.item_shapes[i])
                       for i in part_items) + spacing * len(part_items) + 1.0
        usable = (margin, margin, margin + open_len, sheet_h - margin)
        progress_of = _progress_of(clock, work, 0, budget, 0.0, 1.0)
        open_dec = Decoder(lib, part_items, usable, 1, work)
        # "lowest first" rules would lay an open strip out in one long row: not as a start
        orders = [(plan, rule) for plan, rule in orders if RULES[rule][0] <= 1.0]
        first = _first_layout(open_dec, orders, stage, clock, progress_of, _used_x)
        stage_clock = _StageClock(clock, clock.deadline)
        placements, unplaced_parts, _ = _improve(lib, "strip", part_items, usable, 1, first, stage, rng, stage_clock,
                                                 True, jobs)
        length = max(px / lib.scale + lib.shapes[sid].width for _p, _si, sid, px, py in placements) + margin
        clock.report(1.0, "done")
        sheets = [[(part_items[p], sid, px, py) for p, _si, sid, px, py in placements]]
        unplaced = [part_items[p] for p in unplaced_parts]
        return _result(items, lib, sheets, unplaced, (length, sheet_h), margin, spacing, length, 1, 1,
                       _stopped_by(clock, [stage], [stage_clock]), work.units)

    usable = (margin, margin, sheet_w - margin, sheet_h - margin)
    area_lower = max(1, math.ceil(total_area / (usable_w * usable_h) - 1e-9))
    lower = lower_bound_sheets(items, (sheet_w, sheet_h), margin, spacing)
    sheets, unplaced, stages, clocks = _sheet_run(lib, counts, usable, lower, work, budget, rng, clock, jobs)
    if not unplaced and len(sheets) > lower:
        sheets = _empty_last(lib, sheets, usable, work, clock.stop)
    clock.report(1.0, "done")
    return _result(items, lib, sheets, unplaced, (sheet_w, sheet_h), margin, spacing, None, area_lower, lower,
                   _stopped_by(clock, stages, clocks), work.units)


def _stopped_by(clock: _Clock, stages: list[_Budget], clocks=()) -> str:
    if clock.fired or any(c.fired for c in clocks):
        return "time_limit"
    if any(s.hit for s in stages):
        return "effort"
    return "converged"


def _progress_of(clock: _Clock, work: Work, w0: int, units: int, f0: float, f1: float):
    """Progress callbacks for one stage: work spent in it, mapped onto [f0, f1]."""
    def make(msg: str):
        return lambda: clock.report(f0 + (f1 - f0) * min(1.0, (work.units - w0) / max(units, 1)), msg)
    return make


def _sheet_run(lib, counts, usable, lower, work, budget, rng, clock, jobs):
    """Sheets for ``counts`` copies of each item: batches, patterns repeated, the rest nested (module doc).

    Each stage gets its share of the work budget and the same share of the
    wall-clock ceiling. Returns (sheets as lists of (item, shape id, px, py),
    unplaced items, stage budgets, stage clocks)."""
    remaining = list(counts)
    sheets: list[list[tuple]] = []
    unplaced: list[int] = []
    stages: list[_Budget] = []
    clocks: list[_StageClock] = []
    total0 = sum(counts)
    while True:
        total = sum(remaining)
        if total == 0:
            break
        left = max(0, budget - work.units)
        last = total <= BATCH_PARTS
        batch = list(remaining) if last else _batch(remaining)
        share = left if last else left // NON_LAST_SHARE
        stage = _Budget(work, work.units + share)
        stages.append(stage)
        now = time.monotonic()
        left_s = max(0.0, clock.deadline - now)
        stage_clock = _StageClock(clock, now + (left_s if last or left == 0 else left_s * share / left))
        clocks.append(stage_clock)
        f0 = 1.0 - total / total0
        f1 = 1.0 - (total - sum(batch)) / total0 if not last else 1.0
        part_items = [i for i, q in enumerate(batch) for _ in range(q)]
        # a batch may use one sheet more than its share of the whole run's bound
        share_lower = 1 if not last else max(1, lower - len(sheets))
        placements, unplaced_parts, n_sheets = _sheet_search(
            lib, part_items, usable, share_lower, stage, rng, stage_clock,
            _progress_of(clock, work, work.units, share, f0, f1), compact=last, jobs=jobs)
        got = [[] for _ in range(n_sheets)]
        for p, si, sid, px, py in placements:
            got[si].append((part_items[p], sid, px, py))
        if last:
            sheets.extend(got)
            unplaced.extend(part_items[p] for p in unplaced_parts)
            break
        block = got[:-1] if len(got) > 1 else got
        used = [0] * len(counts)
        for sheet in block:
            for item, *_ in sheet:
                used[item] += 1
        times = min(remaining[i] // used[i] for i in range(len(counts)) if used[i])
        for _ in range(times):
            sheets.extend(block)
        remaining = [r - times * u for r, u in zip(remaining, used)]
    return sheets, unplaced, stages, clocks


def _empty_last(lib, sheets, usable, work, stop):
    """Try to move every part of the last sheet into the free space of the
    others (largest part first, each onto the latest sheet that takes it);
    when all of them find a place, the last sheet goes. Sheets that are alike
    (repeated patterns) are tried once while they stay alike. A bounded pass
    after the search (at most parts x distinct sheets placement attempts)."""
    if len(sheets) < 2:
        return sheets
    built: dict[int, Sheet] = {}
    added: dict[int, list] = {}
    failed: set = set()  # (content of a sheet, shape set) that did not fit

    def content(k):
        return tuple(sheets[k]) + tuple(added.get(k, ()))

    last = sorted(sheets[-1], key=lambda e: (-lib.shapes[e[1]].area, e[0], e[2], e[3]))
    for item, *_ in last:
        sids = lib.item_shapes[item]
        home = None
        for k in range(len(sheets) - 2, -1, -1):
            if stop():
                return sheets
            key = (content(k), sids)
            if key in failed:
                continue
            sheet = built.get(k)
            if sheet is None:
                sheet = Sheet(lib, usable)
                for _item, sid, px, py in sheets[k]:
                    sheet = sheet.with_part(sid, px, py)
            hit = place_one(sheet, sids, work, RULES[0])
            if hit is None:
                failed.add(key)
                built[k] = sheet
                continue
            _, sid, px, py = hit
            built[k] = sheet.with_part(sid, px, py)
            added.setdefault(k, []).append((item, sid, px, py))
            home = k
            break
        if home is None:
            return sheets
    return [list(s) + added.get(k, []) for k, s in enumerate(sheets[:-1])]


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


def _initial_orders(lib: ShapeLibrary, part_items: list[int]) -> list[tuple]:
    """(plan, rule) pairs to start from: largest first by convex hull area (so
    frames come before the parts that can go in their windows), the same in
    eight rounds (mixing large parts of different kinds), by area, by longest
    side; each with every placement rule."""
    def shape(i):
        return lib.shapes[lib.item_shapes[i][0]]

    n_items = len(lib.item_shapes)
    hull = [shape(i).polygon.convex_hull.area for i in range(n_items)]
    qty = [0] * n_items
    for i in part_items:
        qty[i] += 1
    first = {}
    for p, i in enumerate(part_items):
        first.setdefault(i, p)
    keys = [
        lambda p: (-hull[part_items[p]], part_items[p], p),
        # round robin: the k-th share of every item before the (k+1)-th, largest first within a share
        lambda p: (int(8 * (p - first[part_items[p]]) / qty[part_items[p]]), -hull[part_items[p]], part_items[p], p),
        lambda p: (-shape(part_items[p]).area, part_items[p], p),
        lambda p: (-max(shape(part_items[p]).width, shape(part_items[p]).height), part_items[p], p),
    ]
    plans = []
    for key in keys:
        plan = tuple((p, None) for p in sorted(range(len(part_items)), key=key))
        if plan not in plans:
            plans.append(plan)
    return [(plan, rule) for rule in range(len(RULES)) for plan in plans]


def _used_x(d: Decoded) -> float:
    st = d.final
    return max((sh.x_max for sh in st.sheets), default=0.0)


def _first_layout(dec, orders, stage: _Budget, clock, progress_of, key):
    """Decode the starting orders (the first always; the others while
    FIRST_SHARE of the stage's budget lasts) and keep the best by ``key``."""
    best = None
    w0 = stage.work.units
    room = FIRST_SHARE * max(0, stage.units - w0)
    for k, (plan, rule) in enumerate(orders):
        if k > 0 and (stage.work.units - w0 >= room or stage.spent() or clock.stop()):
            break
        d = dec.decode(plan, rule)
        if best is None or key(d) < key(best):
            best = d
        progress_of("first layout")()
    return best


def _shrink(lib, part_items, usable, best, stage, rng, clock, progress_of):
    """Ask for ever shorter strips; see the module doc."""
    x0, y0, _, y1 = usable
    best_len = _used_x(best)
    current = best
    step = 0.02
    min_step = 0.002
    n = len(part_items)
    on_step = progress_of("shortening the strip")
    while not stage.spent() and not clock.stop():
        target = best_len - step * (best_len - x0)
        dec = Decoder(lib, part_items, (x0, y0, target, y1), 1, stage.work)
        start = dec.decode(current.plan, current.rule)
        found, cost = late_acceptance(dec, start, lambda d: d.final.unplaced_area, rng=rng, budget_units=stage.units,
                                      stop=clock.stop, target=0.0, stall_limit=max(150, 6 * n), on_step=on_step)
        current = found  # a failed attempt still hands on its best plan
        if cost <= 0.0:
            best, best_len = found, _used_x(found)
        elif step > min_step:
            step = max(min_step, step / 2)
    return best


def _sheet_key(d: Decoded) -> tuple:
    st = d.final
    return (len(st.unplaced), len(st.sheets), st.sheets[-1].area if st.sheets else 0.0)


def _sheet_search(lib, part_items, usable, lower, stage: _Budget, rng, clock, progress_of, compact=True, jobs=1):
    """First layout, then the improvement searches; (placements, unplaced parts, sheet count)."""
    dec = Decoder(lib, part_items, usable, len(part_items), stage.work)
    first = _first_layout(dec, _initial_orders(lib, part_items), stage, clock, progress_of, _sheet_key)
    return _improve(lib, "sheet", part_items, usable, lower, first, stage, rng, clock, compact, jobs)


class _Deadline:
    """The wall-clock ceiling inside one improvement search (any process)."""

    def __init__(self, deadline: float):
        self.deadline = deadline
        self.fired = False

    def stop(self) -> bool:
        if not self.fired and time.monotonic() > self.deadline:
            self.fired = True
        return self.fired


def _improve(lib, mode, part_items, usable, lower, first: Decoded, stage: _Budget, rng, clock: _StageClock,
             compact, jobs):
    """Run SEARCHES improvement searches from ``first``, each with what is
    left of the stage's budget and its own seed drawn from ``rng``, in ``jobs``
    processes; keep the best (the lowest search number on a tie). Each search
    starts from the same copy of the shape library, so the result does not
    depend on ``jobs``. Returns (placements, unplaced parts, sheet count) of the
    best. The budget is per search: with ``jobs`` >= SEARCHES a run takes the
    wall time of one search, with one process about SEARCHES times as long."""
    left = max(0, stage.units - stage.work.units)
    st = first.final
    fallback = (st.placements, st.unplaced, len(st.sheets))
    if left <= 0 or stage.spent() or clock.stop():
        return fallback
    seeds = [rng.getrandbits(64) for _ in range(SEARCHES)]
    deadline = min(clock.deadline, clock.clock.deadline)
    frozen = pickle.dumps(lib, protocol=pickle.HIGHEST_PROTOCOL)
    tasks = [(frozen, mode, part_items, usable, lower, first.plan, first.rule, left, deadline, sd, compact)
             for sd in seeds]
    if jobs > 1:
        from concurrent.futures import ProcessPoolExecutor

        with ProcessPoolExecutor(max_workers=min(jobs, len(tasks))) as pool:
            found = list(pool.map(_search_task, tasks))
    else:
        found = [_search_task(t) for t in tasks]
    for *_, units, hit, fired in found:
        stage.hit = stage.hit or hit
        clock.fired = clock.fired or fired
    stage.work.add(max(f[4] for f in found))  # the budget is per search: charge the longest
    stage.spent()
    j = min(range(len(found)), key=lambda k: (found[k][0], k))
    key, placements, unplaced, n_sheets = found[j][:4]
    return placements, unplaced, n_sheets


def _quiet(_msg: str):
    return lambda: None


def _search_task(args):
    """One improvement search (module-level so that a process pool can run it)."""
    frozen, mode, part_items, usable, lower, plan, rule, units, deadline, seed, compact = args
    lib = pickle.loads(frozen)
    work = Work()
    lib.work = work
    stage = _Budget(work, units)
    clock = _Deadline(deadline)
    rng = random.Random(seed)
    if mode == "strip":
        start = Decoder(lib, part_items, usable, 1, work).decode(plan, rule)
        best = _shrink(lib, part_items, usable, start, stage, rng, clock, _quiet)
        key: tuple = (len(best.final.unplaced), _used_x(best))
    else:
        start = Decoder(lib, part_items, usable, len(part_items), work).decode(plan, rule)
        best, key = _sheet_improve(lib, part_items, usable, lower, start, stage, rng, clock, compact)
    stage.spent()
    st = best.final
    return key, st.placements, st.unplaced, len(st.sheets), work.units, stage.hit, clock.fired


def _sheet_improve(lib, part_items, usable, lower, best: Decoded, stage: _Budget, rng, clock, compact):
    """Fewer sheets, then (``compact``) a longer remnant; the best and its key."""
    n = len(part_items)
    work = stage.work
    dec = Decoder(lib, part_items, usable, n, work)
    # fewer sheets: every part must fit on one sheet fewer
    while len(best.final.sheets) > lower and not stage.spent() and not clock.stop():
        fewer = Decoder(lib, part_items, usable, len(best.final.sheets) - 1, work)
        start = fewer.decode(best.plan, best.rule)
        found, cost = late_acceptance(fewer, start, lambda d: d.final.unplaced_area, rng=rng,
                                      budget_units=stage.units, stop=clock.stop, target=0.0,
                                      stall_limit=max(200, 4 * n))
        if cost > 0.0:
            break
        best = found
    width = usable[2] - usable[0]
    area = width * (usable[3] - usable[1])
    count = len(best.final.sheets)

    def compact_cost(d: Decoded) -> float:
        st = d.final
        extra = len(st.sheets) - count
        reach = (st.sheets[-1].x_max - usable[0]) / width if st.sheets else 1.0
        return 10.0 * (max(0, extra) + len(st.unplaced)) + st.unplaced_area / area + reach

    # a longer remnant: the last sheet's parts as far left as they go
    if compact and not stage.spent() and not clock.stop():
        found, _ = late_acceptance(dec, best, compact_cost, rng=rng, budget_units=stage.units, stop=clock.stop,
                                   stall_limit=max(300, 4 * n))
        if _sheet_key(found)[:2] <= _sheet_key(best)[:2]:
            best = found
    st = best.final
    key = (len(st.unplaced), len(st.sheets), compact_cost(best) if compact else st.sheets[-1].area)
    return best, key


def _result(items, lib: ShapeLibrary, sheets, unplaced_items, sheet_size, margin, spacing, strip_length,
            area_lower: int, lower: int, stopped_by: str, work_units: int) -> NestResult:
    """The NestResult of sheets given as lists of (item, shape id, px, py);
    copies are numbered in placement order, then the unplaced ones."""
    per_sheet: list[list[PlacedPart]] = []
    turned_cache: dict[tuple[int, float], Polygon] = {}
    copies = [0] * len(items)
    for sheet in sheets:
        out = []
        for item, sid, px, py in sheet:
            sh = lib.shapes[sid]
            x, y = px / lib.scale - sh.offset[0], py / lib.scale - sh.offset[1]
            tk = (item, sh.angle_deg)
            turned = turned_cache.get(tk)
            if turned is None:
                turned = turned_cache[tk] = rotate_ccw(items[item].polygon, sh.angle_deg)
            poly = shapely.transform(turned, lambda c, o=np.array([x, y]): c + o)
            out.append(PlacedPart(item, copies[item], float(x), float(y), sh.angle_deg, poly))
            copies[item] += 1
        per_sheet.append(out)
    unplaced = []
    for item in unplaced_items:
        unplaced.append((item, copies[item]))
        copies[item] += 1
    sheet_w, sheet_h = sheet_size
    item_area = [it.polygon.area for it in items]
    util = tuple(sum(item_area[p.item] for p in s) / (sheet_w * sheet_h) for s in per_sheet)
    remnant = None
    if strip_length is None and per_sheet:
        x_end = max(p.polygon.bounds[2] for p in per_sheet[-1]) + spacing
        remnant = (max(0.0, sheet_w - x_end), sheet_h)
    return NestResult(sheets=tuple(tuple(s) for s in per_sheet), unplaced=tuple(sorted(unplaced)),
                      sheet_size_mm=(float(sheet_w), float(sheet_h)), margin_mm=float(margin),
                      spacing_mm=float(spacing), strip_length_mm=None if strip_length is None else float(strip_length),
                      utilisation=util, area_lower_bound_sheets=int(area_lower), remnant_mm=remnant,
                      lower_bound_sheets=int(lower), stopped_by=stopped_by, work_units=int(work_units))
