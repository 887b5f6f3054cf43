"""The first layouts and the improvement searches of one stage (sheet or strip mode).

Every core: after the first layout, :data:`SEARCHES` improvement searches with
seeds drawn from the run's seed start from it, each with the stage's remaining
budget, in ``jobs`` processes, and the best is kept (ties: the first search).
Each starts from the same copy of the shape library, so the layout depends on
the seed and the effort only, never on ``jobs``.
"""

from __future__ import annotations

import pickle
import random

from sheetgen.production.nesting.decode import Decoded, Decoder
from sheetgen.production.nesting.place import RULES, ShapeLibrary, Work
from sheetgen.production.nesting.search import late_acceptance
from sheetgen.production.nesting.budget import Budget, Deadline, StageClock


FIRST_SHARE = 0.3            # of a batch's budget, at most, for the starting layouts beyond the first
SEARCHES = 2                 # independent improvement searches per stage, each with the full budget
TIE_SHARE = 0.5              # strip mode: the leftward tie-break is worth less than this share of the smallest part
TIE_BELOW = 0.999            # ... strictly less: a layout with every part placed costs less than the tie's ceiling


def initial_orders(lib: ShapeLibrary, part_items: list[int]) -> list[tuple]:
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
    first: dict[int, int] = {}
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


def used_x(d: Decoded) -> float:
    st = d.final
    return max((sh.x_max for sh in st.sheets), default=0.0)


def first_layout(dec, orders, stage: Budget, clock, progress_of, key):
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
    best_len = used_x(best)
    current = best
    step = 0.02
    min_step = 0.002
    n = len(part_items)
    on_step = progress_of("shortening the strip")
    while not stage.spent() and not clock.stop():
        target = best_len - step * (best_len - x0)
        dec = Decoder(lib, part_items, (x0, y0, target, y1), 1, stage.work)
        start = dec.decode(current.plan, current.rule)
        cost, all_placed = _strip_cost(lib, part_items, x0, target)
        found, _ = late_acceptance(dec, start, cost, rng=rng, budget_units=stage.units, stop=clock.stop,
                                   target=all_placed, stall_limit=max(150, 6 * n), on_step=on_step,
                                   stall_cost=lambda d: d.final.unplaced_area)
        current = found  # a failed attempt still hands on its best plan
        if not found.final.unplaced:
            best, best_len = found, used_x(found)
        elif step > min_step:
            step = max(min_step, step / 2)
    return best


def _strip_cost(lib, part_items, x0: float, length: float):
    """(cost, the cost below which every part is placed) of a layout in a
    strip ``length`` long: the area of the parts left out, then, as a tie-break
    worth less than TIE_SHARE of the smallest part (so it never outweighs a
    part), how far right the placed parts reach: the area-weighted mean of
    their right ends, over the strip. Of two plans that leave the same parts
    out, the search so keeps the one that leaves more room at the strip's end."""
    tie = TIE_SHARE * min(lib.shapes[sid].area for i in set(part_items) for sid in lib.item_shapes[i])
    shapes, scale = lib.shapes, lib.scale
    span = max(length - x0, 1e-9)

    def cost(d: Decoded) -> float:
        st = d.final
        num = den = 0.0
        for _p, _si, sid, px, _py in st.placements:
            sh = shapes[sid]
            num += sh.area * (px / scale + sh.width)
            den += sh.area
        reach = min(1.0, max(0.0, (num / den - x0) / span)) if den else 1.0
        return st.unplaced_area + tie * TIE_BELOW * reach

    return cost, tie


def _sheet_key(d: Decoded) -> tuple:
    st = d.final
    return (len(st.unplaced), len(st.sheets), st.sheets[-1].area if st.sheets else 0.0)


def sheet_search(lib, part_items, usable, lower, stage: Budget, rng, clock, progress_of, compact=True, jobs=1):
    """First layout, then the improvement searches; (placements, unplaced parts, sheet count)."""
    dec = Decoder(lib, part_items, usable, len(part_items), stage.work)
    first = first_layout(dec, initial_orders(lib, part_items), stage, clock, progress_of, _sheet_key)
    return improve(lib, "sheet", part_items, usable, lower, first, stage, rng, clock, compact, jobs)


def improve(lib, mode, part_items, usable, lower, first: Decoded, stage: Budget, rng, clock: StageClock,
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
    if any(f is None for f in found):  # a search cut by the ceiling before its start was rebuilt
        clock.fired = True
    done = [(k, f) for k, f in enumerate(found) if f is not None]
    if not done:
        return fallback
    for _k, (*_, units, hit, fired) in done:
        stage.hit = stage.hit or hit
        clock.fired = clock.fired or fired
    stage.work.add(max(f[4] for _k, f in done))  # the budget is per search: charge the longest
    stage.spent()
    _j, best = min(done, key=lambda kf: (kf[1][0], kf[0]))
    key, placements, unplaced, n_sheets = best[:4]
    return placements, unplaced, n_sheets


def _quiet(_msg: str):
    return lambda: None


class _Cut(Exception):
    """The ceiling fired while a search rebuilt its start."""


def _search_task(args):
    """One improvement search (module-level so that a process pool can run it);
    None when the wall-clock ceiling fired before it had rebuilt its start (the
    caller keeps the first layout)."""
    frozen, mode, part_items, usable, lower, plan, rule, units, deadline, seed, compact = args
    clock = Deadline(deadline)
    if clock.stop():
        return None
    lib = pickle.loads(frozen)
    work = Work()
    lib.work = work
    stage = Budget(work, units)
    rng = random.Random(seed)

    def check(_fraction: float) -> None:
        if clock.stop():
            raise _Cut

    try:
        start = Decoder(lib, part_items, usable, 1 if mode == "strip" else len(part_items), work).decode(
            plan, rule, progress=check)
    except _Cut:
        return None
    if mode == "strip":
        best = _shrink(lib, part_items, usable, start, stage, rng, clock, _quiet)
        key: tuple = (len(best.final.unplaced), used_x(best))
    else:
        best, key = _sheet_improve(lib, part_items, usable, lower, start, stage, rng, clock, compact)
    stage.spent()
    st = best.final
    return key, st.placements, st.unplaced, len(st.sheets), work.units, stage.hit, clock.fired


def _sheet_improve(lib, part_items, usable, lower, best: Decoded, stage: Budget, rng, clock, compact):
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
