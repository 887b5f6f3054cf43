"""``nest``: validate, build, improve, and hand back a :class:`NestResult`.

First layouts: the parts in a few orders (largest convex hull first, the same
in rounds, largest area first, longest side first), each under each placement
rule (:data:`~sheetgen.production.nesting.place.RULES`); the best is kept.

Sheet mode (``sheet_mm=(W, H)``): parts go onto as many W x H sheets as
needed; the usable area is the sheet shrunk by ``margin_mm`` on every side.
Each batch (:mod:`~sheetgen.production.nesting.batches`) starts with column
layouts of the large parts (:mod:`~sheetgen.production.nesting.columns`); when
they miss the lower bound, the order search tries to empty the last sheet (a
plan must place every part on one sheet fewer, the cost being the area left
over) and pushes the parts of the last sheet towards x = 0 so the remnant at
its far end is as long as possible; the assignment search
(:mod:`~sheetgen.production.nesting.assign`) then repacks the last sheet with
one or two others. Last, the parts of the last sheet are moved into the gaps
of the others where they fit.

Strip mode (``strip_width_mm=W``): the strip runs along +x from x = 0 with its
width along y; the length used is the rightmost cut contour plus the margin.
The search repeatedly asks for a layout in a strip a little shorter than the
best so far (2 % at first; the cost is the area of the parts that do not fit,
then, as a tie-break worth less than the smallest part, how far right the
placed parts reach; an attempt gives up after a run of steps that leave no
less area out), halves the step (down to 0.2 %) when it cannot find one, and
carries the plan that came closest into the next attempt. When some parts pair well
(:mod:`~sheetgen.production.nesting.pairs`), a first layout with them in pairs
is decoded too, and the search goes on from the shorter of the two.

Large runs are cut into batches (:mod:`~sheetgen.production.nesting.batches`); the work
budget and the clocks are in :mod:`~sheetgen.production.nesting.budget`, the improvement
searches in :mod:`~sheetgen.production.nesting.improve`, the memory ceiling in
:mod:`~sheetgen.production.nesting.ceiling`.
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
from sheetgen.production.nesting.bound import bound_and_proofs, keep_proofs, lower_bound_sheets
from sheetgen.production.nesting.decode import Decoder
from sheetgen.production.nesting.model import NestItem, NestResult, PlacedPart
from sheetgen.production.nesting.nfp import rotate_ccw
from sheetgen.production.nesting.pairs import expand, paired_parts
from sheetgen.production.nesting.place import RULES, ShapeLibrary, Sheet, Work, place_one
from sheetgen.production.nesting.batches import sheet_run
from sheetgen.production.nesting.budget import Budget, Clock, EFFORT_PER_SECOND, EFFORT_UNITS, StageClock, progress_of
from sheetgen.production.nesting.ceiling import MEMORY_LIMIT_BYTES, check_ceiling
from sheetgen.production.nesting.improve import first_layout, improve, initial_orders, used_x


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
    the :data:`SEARCHES` improvement searches of each stage side by side, and
    in sheet mode the lower bound beside the first layouts; the layout does
    not depend on it.
    """
    t_start = time.monotonic()
    _validate_items(items)
    if (sheet_mm is None) == (strip_width_mm is None):
        raise SheetgenError("give either a sheet size or a strip width, not both and not neither")
    margin = _check_number("margin", margin_mm, 0.0)
    spacing = _check_number("spacing", spacing_mm, 0.0)
    limit = _check_number("time limit", time_limit_s, 0.0)
    clock = Clock(limit, progress, t_start)  # the ceiling covers the whole call, preparation included
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
    counts = [int(it.qty) for it in items]

    if strip:
        parts = [(i, c) for i, it in enumerate(items) for c in range(int(it.qty))]
        part_items = [i for i, _ in parts]
        orders = initial_orders(lib, part_items)
        stage = Budget(work, budget)
        open_len = sum(max(max(lib.shapes[s].width, lib.shapes[s].height) for s in lib.item_shapes[i])
                       for i in part_items) + spacing * len(part_items) + 1.0
        usable = (margin, margin, margin + open_len, sheet_h - margin)
        strip_progress = progress_of(clock, work, 0, budget, 0.0, 1.0)
        open_dec = Decoder(lib, part_items, usable, 1, work)
        # "lowest first" rules would lay an open strip out in one long row: not as a start
        orders = [(plan, rule) for plan, rule in orders if RULES[rule][0] <= 1.0]
        first = first_layout(open_dec, orders, stage, clock, strip_progress, used_x)
        # the same with the parts that pair well laid out two at a time (pairs.py); the search goes on
        # with whichever first layout is shorter
        paired = paired_parts(lib, part_items)
        if paired != part_items and not stage.spent() and not clock.stop():
            p_orders = [(plan, rule) for plan, rule in initial_orders(lib, paired) if RULES[rule][0] <= 1.0]
            p_first = first_layout(Decoder(lib, paired, usable, 1, work), p_orders, stage, clock, strip_progress,
                                   used_x)
            if not p_first.final.unplaced and used_x(p_first) < used_x(first):
                part_items, first = paired, p_first
        stage_clock = StageClock(clock, clock.deadline)
        placements, unplaced_parts, _ = improve(lib, "strip", part_items, usable, 1, first, stage, rng, stage_clock,
                                                 True, jobs)
        length = max(px / lib.scale + lib.shapes[sid].width for _p, _si, sid, px, py in placements) + margin
        clock.report(1.0, "done")
        sheets = [expand(lib, [(part_items[p], sid, px, py) for p, _si, sid, px, py in placements])]
        unplaced = [real for p in unplaced_parts for real in lib.parts_of(part_items[p])]
        return _result(items, lib, sheets, unplaced, (length, sheet_h), margin, spacing, length, 1, 1,
                       _stopped_by(clock, [stage], [stage_clock]), work.units)

    usable = (margin, margin, sheet_w - margin, sheet_h - margin)
    area_lower = max(1, math.ceil(total_area / (usable_w * usable_h) - 1e-9))
    bound = _Bound(items, (sheet_w, sheet_h), margin, spacing, jobs)
    try:
        sheets, unplaced, stages, clocks = sheet_run(lib, counts, usable, bound.get, work, budget, rng, clock, jobs)
        lower = bound.get()
    finally:
        bound.close()  # the pool is let go with the run, also when the run is cut short
    if not unplaced and len(sheets) > lower:
        sheets = _empty_last(lib, sheets, usable, work, clock.stop)
    clock.report(1.0, "done")
    return _result(items, lib, sheets, unplaced, (sheet_w, sheet_h), margin, spacing, None, area_lower, lower,
                   _stopped_by(clock, stages, clocks), work.units)


class _Bound:
    """The run's lower bound of sheets (:func:`lower_bound_sheets`), the same number whenever it
    is asked for. With ``jobs`` > 1 it is computed in a process of its own from the start, while
    the first layouts are made (its proofs kept here too); ``get`` waits for it. With one job, or
    when no process can be started, it is computed here first. The layout does not depend on which."""

    def __init__(self, items: Sequence[NestItem], sheet_mm: tuple[float, float], margin: float, spacing: float,
                 jobs: int) -> None:
        self._args = ([NestItem(it.name, it.polygon, it.qty, tuple(it.rotations_deg)) for it in items],
                      sheet_mm, margin, spacing)
        self._value: int | None = None
        self._pool = self._future = None
        if jobs > 1:
            try:
                from concurrent.futures import ProcessPoolExecutor

                self._pool = ProcessPoolExecutor(max_workers=1)
                self._future = self._pool.submit(bound_and_proofs, *self._args)
            except (OSError, RuntimeError, ImportError):
                self.close()
        if self._future is None:  # here and now: the run's clock counts it, as it counts the rest
            self._value = int(lower_bound_sheets(*self._args))

    def get(self) -> int:
        if self._value is None:
            if self._future is not None:
                try:
                    value, proofs = self._future.result()
                    keep_proofs(proofs)  # the next run of the same parts in this process reuses them
                    self._value = int(value)
                except (OSError, RuntimeError, EOFError):  # a worker that died: the same sum here
                    self._value = None
                finally:
                    self.close()
            if self._value is None:
                self._value = int(lower_bound_sheets(*self._args))
        return self._value

    def close(self) -> None:
        if self._pool is not None:
            self._pool.shutdown(wait=False, cancel_futures=True)
        self._pool = self._future = None


def _stopped_by(clock: Clock, stages: list[Budget], clocks=()) -> str:
    if clock.fired or any(c.fired for c in clocks):
        return "time_limit"
    if any(s.hit for s in stages):
        return "effort"
    return "converged"


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


MOVE_BLOCK = 256   # placed parts moved per shapely call when building the result


def _result(items, lib: ShapeLibrary, sheets, unplaced_items, sheet_size, margin, spacing, strip_length,
            area_lower: int, lower: int, stopped_by: str, work_units: int) -> NestResult:
    """The NestResult of sheets given as lists of (item, shape id, px, py);
    copies are numbered in placement order, then the unplaced ones."""
    turned_cache: dict[tuple[int, float], Polygon] = {}
    copies = [0] * len(items)
    records = []   # (sheet, item, copy, x, y, angle) in placement order
    turned_list = []
    for k, sheet in enumerate(sheets):
        for item, sid, px, py in sheet:
            sh = lib.shapes[sid]
            x, y = px / lib.scale - sh.offset[0], py / lib.scale - sh.offset[1]
            tk = (item, sh.angle_deg)
            turned = turned_cache.get(tk)
            if turned is None:
                turned = turned_cache[tk] = rotate_ccw(items[item].polygon, sh.angle_deg)
            records.append((k, item, copies[item], x, y, sh.angle_deg))
            turned_list.append(turned)
            copies[item] += 1
    # parts moved a block at a time (the same sums as one call per part, so the same coordinates;
    # blocks keep the coordinate arrays small)
    moved: list = []
    for b0 in range(0, len(records), MOVE_BLOCK):
        geoms = np.empty(len(turned_list[b0:b0 + MOVE_BLOCK]), dtype=object)
        geoms[:] = turned_list[b0:b0 + MOVE_BLOCK]
        shift = np.repeat(np.array([(r[3], r[4]) for r in records[b0:b0 + MOVE_BLOCK]], dtype=float),
                          shapely.get_num_coordinates(geoms), axis=0)
        moved.extend(shapely.transform(geoms, lambda c: c + shift))
    per_sheet: list[list[PlacedPart]] = [[] for _ in sheets]
    for (k, item, copy, x, y, angle), poly in zip(records, moved):
        per_sheet[k].append(PlacedPart(item, copy, float(x), float(y), angle, poly))
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
