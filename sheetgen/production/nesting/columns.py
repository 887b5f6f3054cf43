"""Column layouts of the large parts, fullest sheet first.

Large parts (those that fit no window of any part of the run) are packed by
their bounding boxes, grown by the spacing, in *columns*: a column is as wide
as its widest part and holds a stack of parts one above the other; a sheet is
a row of columns from left to right. Two parts whose grown boxes do not
overlap are at least the spacing apart, so such a layout is valid for any
outline. Parts with the same box size (the three frames of a kit, say) are
interchangeable here.

Sheets are built one at a time, each the fullest the remaining parts allow (a
bounded depth-first search over the column kinds, largest box area covered
first). What a column leaves free at its top is filled with rows of the
smaller parts (those that fit a window) that fit there. The parts left over
(most of the smaller ones) then go, largest first, into the free space of
those sheets, windows included, by the ordinary placement rule
(:class:`~sheetgen.production.nesting.decode.Decoder`), and onto new sheets
when they fit none.

Parts far from their boxes may also go in *pairs* (:mod:`~sheetgen.production.nesting.pairs`:
two copies, the second turned, locked at the place that gives the smallest
box): the best column layout with pairs is finished after the others, while
the budget lasts, and kept only when it needs fewer sheets (or the same with
less on the last).

The whole is deterministic and charged to the work budget; the engine keeps
it only when it needs fewer sheets (or the same number with a less filled last
sheet) than the order search.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

from sheetgen.errors import GeometryBug
from sheetgen.production.nesting.decode import Decoder, State
from sheetgen.production.nesting.pairs import expand, pair_item, saving_bound
from sheetgen.production.nesting.place import RULES, Sheet, ShapeLibrary, Work
from sheetgen.production.nesting.rows import TOL_UNITS, box_rows

PAIR_SAVING = 0.25       # pairs are tried when their boxes save at least this share of a sheet's area
KINDS_PER_WIDTH = 10     # column kinds kept per leading box (the fullest)
KIND_NODES = 5000        # search nodes per leading box
SHEET_NODES = 4000       # depth-first nodes per sheet
NODE_UNITS = 40          # work charged per search node
FILLER_WEIGHTS = (1.0, 0.5, 0.25, 0.0)   # weight of the smaller parts in a column's value, per series of greedy runs
ROUNDS = 8               # greedy runs per series (class weights corrected after each)
SMOOTH = 0.5             # share of the new estimate in a corrected weight


@dataclass(frozen=True)
class Box:
    cls: int            # class of interchangeable items
    shape: int          # shape id giving this box
    w: float            # grown width (spacing included)
    h: float
    area: float


def _classes(lib: ShapeLibrary, counts: list[int]):
    """Items grouped by the box sizes their allowed angles give (rounded to
    1e-6 mm): items of a class can stand in for each other in a column."""
    groups: dict[tuple, list[int]] = {}
    for i, c in enumerate(counts):
        if c <= 0:
            continue
        key = tuple(sorted({(round(lib.shapes[sid].width, 6), round(lib.shapes[sid].height, 6))
                            for sid in lib.item_shapes[i]}))
        groups.setdefault(key, []).append(i)
    return list(groups.values())


def _windows(lib: ShapeLibrary, items: list[int]) -> list[tuple[float, float]]:
    out = []
    for i in items:
        for ring in lib.shapes[lib.item_shapes[i][0]].polygon.interiors:
            x0, y0, x1, y1 = ring.bounds
            out.append((x1 - x0, y1 - y0))
    return out


def column_layout(lib: ShapeLibrary, counts: list[int], usable, work: Work, budget_units: int,
                  lower: int | Callable[[], int] = 1, stop: Callable[[], bool] = lambda: False,
                  finished: int = 3, pairs: bool = False):
    """Sheets as lists of (item, shape id, px, py) for ``counts`` copies of
    each item, or None when the budget ran out (or ``stop()`` said so) before
    one was finished, or there is nothing large. Stops early on a layout of
    ``lower`` sheets (or ``lower()``, asked for once a layout is finished);
    ``finished`` column layouts (the best) are completed with the smaller
    parts and the best kept.

    With ``pairs``, the copies of each item that pairs well
    (:mod:`~sheetgen.production.nesting.pairs`) are also laid out two at a
    time as its pair (an odd copy alone): the pair is a box kind of its own,
    in a column or in a row on a column's top, and a piece of its own among
    the smaller parts placed last. When the pairs' boxes save at least
    PAIR_SAVING of a sheet against single boxes (less could hardly save a
    sheet, and the work is better spent on the other searches), the best such
    layout is finished after the ``finished`` layouts of single parts, while
    the budget lasts, and kept only when it is better; its pairs are turned
    back into their two parts."""
    plain = _candidates(lib, counts, usable, work, budget_units, stop)
    if plain is None:
        return None
    best = None

    def finish(classes, cnt, layouts) -> None:
        nonlocal best
        placed = _finish(lib, classes, cnt, layouts, usable, work, stop)
        if placed is None:
            return
        placed = [expand(lib, sheet) for sheet in placed]
        final = (len(placed), sum(lib.shapes[sid].area for _i, sid, _x, _y in placed[-1]))
        if best is None or final < best[0]:
            best = (final, placed)

    def more() -> bool:
        return best is None or not (work.units >= budget_units or stop()
                                    or len(best[1]) <= (lower() if callable(lower) else lower))

    for layouts in plain[2][:finished]:
        if not more():
            break
        finish(plain[0], plain[1], layouts)
    if pairs and more():
        x0, y0, x1, y1 = usable
        sheet_area = (x1 - x0 + lib.spacing) * (y1 - y0 + lib.spacing)
        counts2 = with_pairs(lib, counts, PAIR_SAVING * sheet_area, (x1 - x0, y1 - y0))
        if _pair_saving(lib, counts2) >= PAIR_SAVING * sheet_area:
            paired = _candidates(lib, counts2, usable, work, budget_units, stop)
            if paired is not None and paired[2] and more():
                finish(paired[0], paired[1], paired[2][0])
    return None if best is None else best[1]


def _pair_saving(lib: ShapeLibrary, counts: list[int]) -> float:
    """Box area (grown by the spacing) that the pairs in ``counts`` save
    against their parts' single boxes, each pair at its best angle."""
    s = lib.spacing
    saved = 0.0
    for i, c in enumerate(counts):
        if c > 0 and i in lib.composite_items:
            best = 0.0
            for sid in lib.item_shapes[i]:
                _real, parts = lib.composites[sid]
                single = sum((lib.shapes[p].width + s) * (lib.shapes[p].height + s) for p, _dx, _dy in parts)
                best = max(best, single - (lib.shapes[sid].width + s) * (lib.shapes[sid].height + s))
            saved += c * best
    return saved


def with_pairs(lib: ShapeLibrary, counts: list[int], least: float = 0.0,
               room: tuple[float, float] = (math.inf, math.inf)) -> list[int]:
    """``counts`` over the library's items (pair items included) with the
    copies of each item that pairs well taken two at a time as its pair item,
    when the pair fits a ``room`` (width, height: the usable area) at one of
    its angles. When the pairs could not save ``least`` box area in all (by
    the bound of :func:`~sheetgen.production.nesting.pairs.saving_bound`),
    every item is left single without computing a pair."""
    out = list(counts)
    real = [(i, c) for i, c in enumerate(counts) if c >= 2 and i not in lib.composite_items]
    if sum((c // 2) * saving_bound(lib, i) for i, c in real) < least:
        real = []
    for i, c in real:
        pi = pair_item(lib, i)
        if pi is not None and any(lib.shapes[sid].width <= room[0] and lib.shapes[sid].height <= room[1]
                                  for sid in lib.item_shapes[pi]):
            out.extend([0] * (len(lib.item_shapes) - len(out)))
            out[pi] += c // 2
            out[i] = c % 2
    out.extend([0] * (len(lib.item_shapes) - len(out)))
    return out


def _candidates(lib: ShapeLibrary, counts: list[int], usable, work: Work, budget_units: int,
                stop: Callable[[], bool]):
    """(classes, counts, column layouts fewest column sheets first), or None
    when nothing is large or the search found nothing."""
    s = lib.spacing
    x0, y0, x1, y1 = usable
    tol = TOL_UNITS / lib.scale
    W, H = x1 - x0 + s + tol, y1 - y0 + s + tol
    present = [i for i, c in enumerate(counts) if c > 0]
    windows = _windows(lib, present)

    def fits_window(i: int) -> bool:
        return any(lib.shapes[sid].width + 2 * s <= ww and lib.shapes[sid].height + 2 * s <= wh
                   for sid in lib.item_shapes[i] for ww, wh in windows)

    classes = _classes(lib, counts)
    large = [k for k, items in enumerate(classes) if not any(fits_window(i) for i in items)]
    if not large:
        return None
    boxes: list[list[Box]] = []
    for items in classes:
        seen: dict[tuple, Box] = {}
        for sid in lib.item_shapes[items[0]]:
            sh = lib.shapes[sid]
            key = (round(sh.width, 6), round(sh.height, 6))
            if key not in seen and sh.width + s <= W and sh.height + s <= H:
                w, h = sh.width + s, sh.height + s
                seen[key] = Box(len(boxes), sid, w, h, w * h)
        boxes.append(list(seen.values()))
    demand = [sum(counts[i] for i in items) for items in classes]

    fillers = sorted((b for k, bs in enumerate(boxes) if k not in large for b in bs),
                     key=lambda b: (-b.area, b.cls, b.shape))
    kinds = _column_kinds(boxes, large, fillers, H, demand)
    work.add(NODE_UNITS * len(kinds))
    found: dict[tuple, list] = {}
    for fw in FILLER_WEIGHTS:
        favour = {c: 1.0 for c in large}
        for _round in range(ROUNDS):
            if found and (work.units >= budget_units or stop()):
                break
            layouts = _column_sheets(kinds, demand, large, fillers, W, H, (fw, favour), work)
            key = (len(layouts), sum(b.area for b, _x, _y in layouts[-1]) if layouts else 0.0)
            found.setdefault(key, layouts)
            favour = _corrected(favour, layouts, large, W * H)
    if not found:
        return None
    # the fewest column sheets first; the smaller parts decide the final count
    return classes, counts, [found[key] for key in sorted(found)]


def _finish(lib: ShapeLibrary, classes, counts: list[int], layouts, usable, work: Work,
            stop: Callable[[], bool] = lambda: False):
    """The column sheets with concrete items at grid positions, then the rest
    placed (:func:`_place_rest`, which ``stop()`` cuts short); None if rounding
    pushed a part out."""
    x0, y0, x1, y1 = usable
    pool = [[i for i in items for _ in range(counts[i])] for items in classes]
    used = [0] * len(classes)
    scale = lib.scale
    sheets: list[Sheet] = []
    placed: list[list[tuple[int, int, int, int]]] = []
    for pieces in layouts:
        sheet = Sheet(lib, usable)
        out = []
        for b, x, y in pieces:
            item = pool[b.cls][used[b.cls]]
            used[b.cls] += 1
            sid = _same_box_shape(lib, item, b)
            # the grown box starts at (x0 - s/2 + x, ...): the part's own box half the spacing further
            # in; positions are rounded to the grid and kept inside the usable area, so a gap may be
            # short of the spacing by a grid unit or two (about 1e-10 mm), far below the tolerance
            sh = lib.shapes[sid]
            px = min(round((x0 + x) * scale), math.floor((x1 - sh.width) * scale))
            py = min(round((y0 + y) * scale), math.floor((y1 - sh.height) * scale))
            if px < math.ceil(x0 * scale) or py < math.ceil(y0 * scale):
                return None  # cannot happen: boxes fit the area; kept safe
            sheet = sheet.with_part(sid, px, py)
            out.append((item, sid, px, py))
        sheets.append(sheet)
        placed.append(out)
    rest = [i for k, items in enumerate(classes) for i in pool[k][used[k]:]]
    if rest:
        got = _place_rest(lib, rest, usable, sheets, placed, work, stop)
        if got is None:
            return None
        sheets, placed = got
    return placed


def _corrected(favour: dict, layouts, large: list[int], sheet_area: float) -> dict:
    """Weights for the next greedy run (sequential value correction): a class
    whose parts ended on poorly filled sheets is worth more next time, so the
    fuller early sheets take it in."""
    fill = [sum(b.area for b, _x, _y in pieces) / sheet_area for pieces in layouts]
    seen: dict[int, list[float]] = {c: [] for c in large}
    for f, pieces in zip(fill, layouts):
        for b, _x, _y in pieces:
            if b.cls in seen:
                seen[b.cls].append(1.0 / max(f, 1e-3))
    new = {}
    for c in large:
        est = sum(seen[c]) / len(seen[c]) if seen[c] else favour[c]
        new[c] = (1 - SMOOTH) * favour[c] + SMOOTH * est
    low = min(new.values())
    return {c: v / low for c, v in new.items()}


def _column_sheets(kinds, demand: list[int], large: list[int], fillers: list[Box], W: float, H: float, variant,
                   work: Work) -> list[list[tuple[Box, float, float]]]:
    """Sheets, fullest first, as pieces (box, x, y) in grown coordinates from
    the grown usable area's lower-left corner."""
    fw, favour = variant
    left = list(demand)
    layouts: list[list[tuple[Box, float, float]]] = []
    while any(left[k] for k in large):
        cols = _best_sheet(kinds, left, large, W, H, fw, favour, work)
        if not cols:
            break  # cannot happen: every large part fits the sheet on its own
        pieces: list[tuple[Box, float, float]] = []
        x = 0.0
        for kind in cols:
            y = 0.0
            for b in kind[1]:
                pieces.append((b, x, y))
                left[b.cls] -= 1
                y += b.h
            # rows of smaller parts in the free top of the column
            for b in fillers:
                while left[b.cls] > 0 and b.w <= kind[0] and y + b.h <= H:
                    across = min(left[b.cls], int((kind[0]) // b.w))
                    for j in range(across):
                        pieces.append((b, x + j * b.w, y))
                    left[b.cls] -= across
                    y += b.h
            x += kind[0]
        layouts.append(pieces)
    return layouts


def _same_box_shape(lib: ShapeLibrary, item: int, b: Box) -> int:
    """The shape of ``item`` whose box is ``b``'s (items of a class share box sizes)."""
    for sid in lib.item_shapes[item]:
        sh = lib.shapes[sid]
        if abs(sh.width + lib.spacing - b.w) < 1e-6 and abs(sh.height + lib.spacing - b.h) < 1e-6:
            return sid
    raise GeometryBug(f"item {item}: no allowed angle gives the box of its class")


def _top_fill(cw: float, free_h: float, fillers: list[Box]) -> float:
    """Box area of rows of smaller parts (any number of each) in a cw x free_h top of a column."""
    got = 0.0
    for b in fillers:
        while b.w <= cw and b.h <= free_h:
            got += int((cw) // b.w) * b.area
            free_h -= b.h
    return got


def _column_kinds(boxes: list[list[Box]], large: list[int], fillers: list[Box], H: float, demand: list[int]):
    """(width, boxes bottom to top, fill of the top by smaller parts) of the
    fullest stacks of large parts, per width: a branch-and-bound search per
    leading box (at most KIND_NODES nodes), the KINDS_PER_WIDTH fullest kept."""
    options = [b for k in large for b in boxes[k]]
    kinds = []
    for lead in options:
        cw = lead.w
        fit = sorted((b for b in options if b.w <= cw), key=lambda b: (-b.w, -b.h, b.cls, b.shape))
        found: list[tuple[float, tuple[Box, ...]]] = []
        nodes = [0]

        def floor_area() -> float:
            return found[-1][0] if len(found) >= KINDS_PER_WIDTH else -1.0

        def grow(start: int, stack: tuple[Box, ...], height: float, area: float, have: dict) -> None:
            nodes[0] += 1
            if lead in stack and area > floor_area():
                found.append((area, stack))
                found.sort(key=lambda f: (-f[0], [(b.cls, b.shape) for b in f[1]]))
                del found[KINDS_PER_WIDTH:]
            for j in range(start, len(fit)):
                if nodes[0] >= KIND_NODES or area + (H - height) * cw <= floor_area():
                    return
                b = fit[j]
                if height + b.h <= H and have.get(b.cls, 0) < demand[b.cls]:
                    have[b.cls] = have.get(b.cls, 0) + 1
                    grow(j, stack + (b,), height + b.h, area + b.area, have)
                    have[b.cls] -= 1

        grow(0, (), 0.0, 0.0, {})
        for _a, stack in found:
            kinds.append((cw, stack, _top_fill(cw, H - sum(b.h for b in stack), fillers)))
    # one entry per distinct (width, counts)
    out, seen = [], set()
    for kind in kinds:
        key = (round(kind[0], 6), tuple(sorted((b.cls, b.shape) for b in kind[1])))
        if key not in seen:
            seen.add(key)
            out.append(kind)
    return out


def _best_sheet(kinds, left: list[int], large: list[int], W: float, H: float, fw: float, favour: dict,
                work: Work):
    """Columns (left to right) of the most value (box area of the large parts,
    favoured classes weighted up, plus ``fw`` times the top fill): a
    depth-first search over the column kinds, at most SHEET_NODES nodes."""
    best: list = [0.0, []]
    nodes = [0]
    value_of = [sum(b.area * favour.get(b.cls, 1.0) for b in k[1]) + fw * k[2] for k in kinds]
    order = sorted(range(len(kinds)), key=lambda j: (-value_of[j] / kinds[j][0], kinds[j][0], j))
    kinds = [kinds[j] for j in order]
    values = [value_of[j] for j in order]
    dens = [v / (k[0] * H) for v, k in zip(values, kinds)]
    needs = []   # per kind, (class, parts of it in the column), counted once
    for kind in kinds:
        need: dict[int, int] = {}
        for b in kind[1]:
            need[b.cls] = need.get(b.cls, 0) + 1
        needs.append(tuple(need.items()))

    def need_ok(j: int, have: list[int]) -> bool:
        return all(have[c] >= n for c, n in needs[j])

    def dfs(start: int, width: float, value: float, cols: list, have: list[int]) -> None:
        nodes[0] += 1
        if value > best[0] + 1e-9:
            best[0], best[1] = value, list(cols)
        if nodes[0] >= SHEET_NODES:
            return
        for j in range(start, len(kinds)):
            kind = kinds[j]
            # the kinds are by density: nothing after j can beat this bound
            if value + (W - width) * H * dens[j] <= best[0] + 1e-9:
                return
            if width + kind[0] > W or not need_ok(j, have):
                continue
            for b in kind[1]:
                have[b.cls] -= 1
            cols.append(kind)
            dfs(j, width + kind[0], value + values[j], cols, have)
            cols.pop()
            for b in kind[1]:
                have[b.cls] += 1
            if nodes[0] >= SHEET_NODES:
                return

    dfs(0, 0.0, 0.0, [], list(left))
    work.add(NODE_UNITS * nodes[0])
    # widest columns first, so the narrow ones (and the free end) are on the right
    return sorted(best[1], key=lambda k: -k[0])


def _place_rest(lib: ShapeLibrary, rest: list[int], usable, sheets: list[Sheet], placed, work: Work,
                stop: Callable[[], bool] = lambda: False):
    """The remaining parts, largest convex hull first, each onto the first
    sheet with room (windows included), new sheets when none has. When
    ``stop()`` says so (the wall-clock ceiling), the parts not yet placed go
    in rows of boxes into the free ends of the sheets and onto new sheets
    (:func:`~sheetgen.production.nesting.rows.box_rows`): the layout is always complete, and cheap to finish.
    None when a part fits no sheet at any of its angles (a pair larger than the sheet)."""
    hull = lib.hull_areas()
    order = sorted(range(len(rest)), key=lambda p: (-hull[rest[p]], rest[p], p))
    dec = Decoder(lib, rest, usable, len(rest) + len(sheets), work)
    st = State(tuple(sheets), tuple(frozenset() for _ in sheets), (), (), 0.0)
    left: list[int] = []
    for k, p in enumerate(order):
        if stop():
            left = order[k:]
            break
        st = dec.step(st, p, None, RULES[0])
    if st.unplaced:  # a part that fits no sheet at any of its angles: no layout, rather than a part lost
        return None
    out = [list(x) for x in placed] + [[] for _ in range(len(st.sheets) - len(placed))]
    for part, si, sid, px, py in st.placements:
        out[si].append((rest[part], sid, px, py))
    if left:
        added, new = box_rows(lib, [rest[p] for p in left], usable,
                              [(k, sh.x_max) for k, sh in enumerate(st.sheets) if sh.placed])
        for k, parts in added.items():
            out[k].extend(parts)
        out.extend(new)
    return list(st.sheets), out
