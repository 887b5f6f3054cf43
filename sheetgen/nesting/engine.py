"""``nest``: validate, build, improve, and hand back a :class:`NestResult`.

First layouts: the parts in a few orders (largest convex hull first, the same
in rounds, largest area first, longest side first), each under each placement
rule (:data:`~sheetgen.nesting.place.RULES`); the best is kept.

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

Time: ``time_limit_s`` is turned into a work budget (see
:class:`~sheetgen.nesting.place.Work`) calibrated so that a run lasts about
that long on a small two-core machine; with the same seed and limit a run
gives the same layout on any machine. As a safety net the search also stops at
``2 * time_limit_s + 2`` seconds of wall time, which only a much slower or busy
machine reaches (and which then makes the result depend on timing). The first
layout is always finished, however long it takes.
"""

from __future__ import annotations

import math
import random
import time
from collections.abc import Callable, Sequence

import numpy as np
import shapely
from shapely.geometry import Polygon

from sheetgen.errors import SheetgenError
from sheetgen.nesting.decode import Decoded, Decoder
from sheetgen.nesting.model import NestItem, NestResult, PlacedPart
from sheetgen.nesting.nfp import rotate_ccw
from sheetgen.nesting.place import RULES, ShapeLibrary, Work
from sheetgen.nesting.search import late_acceptance

# Work units per second of the budget, measured on the project's two-core machine
# with the benchmark instances (tests/bench/bench_esicup.py prints the rate seen).
WORK_PER_SECOND = 1_800_000  # fitted rate about 2.3 million; kept lower for a shared machine


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
    def __init__(self, time_limit_s: float, progress):
        self.t0 = time.monotonic()
        self.hard_stop = self.t0 + 2 * time_limit_s + 2
        self.progress = progress
        self.last = -1.0

    def stop(self) -> bool:
        return time.monotonic() > self.hard_stop

    def report(self, fraction: float, message: str) -> None:
        if self.progress is None:
            return
        fraction = min(max(fraction, 0.0), 1.0)
        if fraction - self.last >= 0.005 or fraction >= 1.0:
            self.last = fraction
            self.progress(fraction, message)


def nest(items: Sequence[NestItem], *, sheet_mm: tuple[float, float] | None = None,
         strip_width_mm: float | None = None, margin_mm: float = 0.0, spacing_mm: float = 0.0,
         time_limit_s: float = 10.0, seed: int = 1,
         progress: Callable[[float, str], None] | None = None) -> NestResult:
    """Nest ``items`` on sheets of ``sheet_mm`` or on a strip of ``strip_width_mm``.

    Exactly one of ``sheet_mm`` and ``strip_width_mm`` is given. Raises
    :class:`SheetgenError` for bad input, including a part that fits the usable
    area in none of its allowed rotations.
    """
    _validate_items(items)
    if (sheet_mm is None) == (strip_width_mm is None):
        raise SheetgenError("give either a sheet size or a strip width, not both and not neither")
    margin = _check_number("margin", margin_mm, 0.0)
    spacing = _check_number("spacing", spacing_mm, 0.0)
    limit = _check_number("time limit", time_limit_s, 0.0)
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

    parts = [(i, c) for i, it in enumerate(items) for c in range(int(it.qty))]
    part_items = [i for i, _ in parts]
    total_area = sum(it.polygon.area * it.qty for it in items)
    rng = random.Random(seed)
    work = Work()
    lib.work = work
    budget = int(limit * WORK_PER_SECOND)
    clock = _Clock(limit, progress)
    build_share = 0.15 if budget > 0 else 1.0

    def search_progress(msg: str):
        return lambda: clock.report(build_share + (1 - build_share) * min(1.0, work.units / max(budget, 1)), msg)

    orders = _initial_orders(lib, part_items)
    if strip:
        open_len = sum(max(max(lib.shapes[s].width, lib.shapes[s].height) for s in lib.item_shapes[i])
                       for i in part_items) + spacing * len(part_items) + 1.0
        usable = (margin, margin, margin + open_len, sheet_h - margin)
        best = _strip_search(lib, part_items, usable, orders, work, budget, rng, clock, build_share, search_progress)
        length = _used_x(best) + margin
        clock.report(1.0, "done")
        return _result(items, lib, parts, best, (length, sheet_h), margin, spacing, length, total_area)

    usable = (margin, margin, sheet_w - margin, sheet_h - margin)
    lower = max(1, math.ceil(total_area / (usable_w * usable_h) - 1e-9))
    best = _sheet_search(lib, part_items, usable, lower, orders, work, budget, rng, clock, build_share,
                         search_progress)
    clock.report(1.0, "done")
    return _result(items, lib, parts, best, (sheet_w, sheet_h), margin, spacing, None, total_area, lower)


def _initial_orders(lib: ShapeLibrary, part_items: list[int]) -> list[tuple]:
    """(plan, rule) pairs to start from: largest first by convex hull area (so
    frames come before the parts that can go in their windows), the same in
    eight rounds (mixing large parts of different kinds), by area, by longest
    side; each with every placement rule."""
    def shape(i):
        return lib.shapes[lib.item_shapes[i][0]]

    hull = [shape(i).polygon.convex_hull.area for i in range(len(lib.item_shapes))]
    qty = [part_items.count(i) for i in range(len(lib.item_shapes))]
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


def _first_layout(dec, orders, work, budget, clock, build_share, key):
    """Decode the starting orders (all of them, or until the budget is spent) and keep the best by ``key``."""
    best = None
    for k, (plan, rule) in enumerate(orders):
        if k > 0 and work.units >= budget:
            break
        d = dec.decode(plan, rule, progress=(lambda f, k=k: clock.report(build_share * (k + f) / len(orders),
                                                                        "first layout")))
        if best is None or key(d) < key(best):
            best = d
    return best


def _strip_search(lib, part_items, usable, orders, work, budget, rng, clock, build_share, search_progress):
    open_dec = Decoder(lib, part_items, usable, 1, work)
    # "lowest first" rules would lay an open strip out in one long row: not as a start
    orders = [(plan, rule) for plan, rule in orders if RULES[rule][0] <= 1.0]
    best = _first_layout(open_dec, orders, work, budget, clock, build_share, _used_x)
    return _shrink(lib, part_items, usable, best, work, budget, rng, clock, search_progress)


def _shrink(lib, part_items, usable, best, work, budget, rng, clock, search_progress):
    """Ask for ever shorter strips; see the module doc."""
    x0, y0, _, y1 = usable
    best_len = _used_x(best)
    current = best
    step = 0.02
    min_step = 0.002
    n = len(part_items)
    on_step = search_progress("shortening the strip")
    while work.units < budget and not clock.stop():
        target = best_len - step * (best_len - x0)
        dec = Decoder(lib, part_items, (x0, y0, target, y1), 1, work)
        start = dec.decode(current.plan, current.rule)
        found, cost = late_acceptance(dec, start, lambda d: d.final.unplaced_area, rng=rng, budget_units=budget,
                                      stop=clock.stop, target=0.0, stall_limit=max(150, 6 * n), on_step=on_step)
        current = found  # a failed attempt still hands on its best plan
        if cost <= 0.0:
            best, best_len = found, _used_x(found)
        elif step > min_step:
            step = max(min_step, step / 2)
    return best


def _sheet_search(lib, part_items, usable, lower, orders, work, budget, rng, clock, build_share, search_progress):
    n = len(part_items)
    dec = Decoder(lib, part_items, usable, n, work)

    def key(d: Decoded):
        st = d.final
        return (len(st.unplaced), len(st.sheets), st.sheets[-1].area if st.sheets else 0.0)

    best = _first_layout(dec, orders, work, budget, clock, build_share, key)
    # fewer sheets: every part must fit on one sheet fewer
    while len(best.final.sheets) > lower and work.units < budget and not clock.stop():
        fewer = Decoder(lib, part_items, usable, len(best.final.sheets) - 1, work)
        start = fewer.decode(best.plan, best.rule)
        found, cost = late_acceptance(fewer, start, lambda d: d.final.unplaced_area, rng=rng, budget_units=budget,
                                      stop=clock.stop, target=0.0, stall_limit=max(200, 4 * n),
                                      on_step=search_progress("saving a sheet"))
        if cost > 0.0:
            break
        best = found
    # a longer remnant: the last sheet's parts as far left as they go
    if work.units < budget and not clock.stop():
        count = len(best.final.sheets)
        width = usable[2] - usable[0]
        area = width * (usable[3] - usable[1])

        def compact(d: Decoded) -> float:
            st = d.final
            extra = len(st.sheets) - count
            last = st.sheets[-1]
            return 10.0 * max(0, extra) + st.unplaced_area / area + (last.x_max - usable[0]) / width

        found, _ = late_acceptance(dec, best, compact, rng=rng, budget_units=budget, stop=clock.stop,
                                   on_step=search_progress("lengthening the remnant"))
        if key(found)[:2] <= key(best)[:2]:
            best = found
    return best


def _result(items, lib: ShapeLibrary, parts, best: Decoded, sheet_size, margin, spacing, strip_length,
            total_area, lower: int = 1) -> NestResult:
    st = best.final
    per_sheet: list[list[PlacedPart]] = [[] for _ in st.sheets]
    turned_cache: dict[tuple[int, float], Polygon] = {}
    for part, si, sid, px, py in st.placements:
        item, copy = parts[part]
        sh = lib.shapes[sid]
        x, y = px / lib.scale - sh.offset[0], py / lib.scale - sh.offset[1]
        tk = (item, sh.angle_deg)
        turned = turned_cache.get(tk)
        if turned is None:
            turned = turned_cache[tk] = rotate_ccw(items[item].polygon, sh.angle_deg)
        poly = shapely.transform(turned, lambda c, o=np.array([x, y]): c + o)
        per_sheet[si].append(PlacedPart(item, copy, float(x), float(y), sh.angle_deg, poly))
    sheet_w, sheet_h = sheet_size
    util = tuple(sum(p.polygon.area for p in s) / (sheet_w * sheet_h) for s in per_sheet)
    remnant = None
    if strip_length is None and per_sheet:
        x_end = max(p.polygon.bounds[2] for p in per_sheet[-1]) + spacing
        remnant = (max(0.0, sheet_w - x_end), sheet_h)
    unplaced = tuple(sorted(parts[p] for p in st.unplaced))
    return NestResult(sheets=tuple(tuple(s) for s in per_sheet), unplaced=unplaced,
                      sheet_size_mm=(float(sheet_w), float(sheet_h)), margin_mm=float(margin),
                      spacing_mm=float(spacing), strip_length_mm=None if strip_length is None else float(strip_length),
                      utilisation=util, area_lower_bound_sheets=int(lower), remnant_mm=remnant)
