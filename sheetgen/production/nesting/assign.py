"""The assignment search: which parts go on which sheet.

After the first layout and the order search, the sheets of a run are improved
as a set. The *last* sheet is the least filled one; the search tries to empty
it into the others:

* **Repack a pair.** The parts of one other sheet and of the last sheet are
  laid out afresh on a single sheet (a short order search, see
  :func:`~sheetgen.production.nesting.search.late_acceptance`, whose cost is the
  area of the parts that do not fit). When everything fits, the last sheet is
  gone. When the parts left over have less area than the last sheet had, they
  become the new last sheet (it must hold them all): the other sheet took
  more than it gave, which covers both moving parts into its gaps and windows
  and swapping a large part out for smaller ones.
* **Repack a triple.** The same with two other sheets and the last one onto two
  sheets, when no pair helps.

A pair or triple that did not help is not tried again while its sheets stay
as they are. Everything is charged to the work budget and all choices come
from the seeded generator, so the result depends on the seed and the effort
only. Sheets are lists of ``(item, shape id, px, py)`` as the engine keeps them.
"""

from __future__ import annotations

import random
from collections.abc import Callable

from sheetgen.production.nesting.decode import Decoded, Decoder
from sheetgen.production.nesting.place import RULES, ShapeLibrary, Work
from sheetgen.production.nesting.search import late_acceptance

SheetParts = list[tuple[int, int, float, float]]   # (item, shape id, px, py), positions in grid units

PAIR_STALL = 60        # order-search steps without progress before a pair is given up
TRIPLE_STALL = 80
START_RULES = (0, 1)    # placement rules tried on the starting plans
MAX_TRIPLES = 12        # triples tried per round (the emptiest other sheets)


def _claims(lib: ShapeLibrary) -> list[float]:
    """Per item, the area it takes from a sheet in this search: its convex
    hull (a frame counts as its whole rectangle; what its window holds is
    counted again, which only makes the search keep frames placed first)."""
    return lib.hull_areas()


def _area(lib: ShapeLibrary, sheet: SheetParts) -> float:
    claim = _claims(lib)
    return sum(claim[i] for i, _sid, _x, _y in sheet)


def _left_over(lib: ShapeLibrary, dec: Decoder, d: Decoded) -> float:
    claim = _claims(lib)
    return sum(claim[dec.part_items[p]] for p in d.final.unplaced)


def _content(sheet: SheetParts) -> tuple:
    return tuple(sorted(e[0] for e in sheet))


def _starts(lib: ShapeLibrary, part_items: list[int], groups: list[int]) -> list[tuple]:
    """Plans to start from: the sheets' own orders one after another, and all
    parts largest convex hull first."""
    hull = _claims(lib)
    n = len(part_items)
    own = tuple((p, None) for p in range(n))
    big = tuple((p, None) for p in sorted(range(n), key=lambda p: (-hull[part_items[p]], part_items[p], groups[p], p)))
    return [own] if own == big else [own, big]


def _pack(lib: ShapeLibrary, sheets: list[SheetParts], usable, n_sheets: int, work: Work, rng: random.Random,
          budget_units: int, stop: Callable[[], bool], stall: int) -> tuple[Decoded, Decoder] | None:
    """The parts of ``sheets`` laid out on ``n_sheets`` sheets: the plan that
    leaves the least area over (searched from a few starting plans under every
    placement rule). None when the budget ran out first."""
    part_items = [e[0] for s in sheets for e in s]
    groups = [g for g, s in enumerate(sheets) for _ in s]
    dec = Decoder(lib, part_items, usable, n_sheets, work)
    best: Decoded | None = None
    for plan in _starts(lib, part_items, groups):
        for rule in START_RULES:
            if work.units >= budget_units or stop():
                return None
            d = dec.decode(plan, rule)
            if best is None or _left_over(lib, dec, d) < _left_over(lib, dec, best):
                best = d
    if best is None:
        return None
    if best.final.unplaced:
        best, _ = late_acceptance(dec, best, lambda d: _left_over(lib, dec, d), rng=rng, budget_units=budget_units,
                                  stop=stop, target=0.0, stall_limit=stall)
    return best, dec


def _sheets_of(dec: Decoder, d: Decoded) -> list[SheetParts]:
    out: list[SheetParts] = [[] for _ in d.final.sheets]
    for part, si, sid, px, py in d.final.placements:
        out[si].append((dec.part_items[part], sid, px, py))
    return out


def _one_sheet(lib, items: list[int], usable, work, rng, budget_units, stop) -> SheetParts | None:
    """``items`` on one sheet (largest first under every rule, then a short search), or None."""
    got = _pack(lib, [[(i, lib.item_shapes[i][0], 0, 0) for i in items]], usable, 1, work, rng, budget_units, stop,
                PAIR_STALL)
    if got is None or got[0].final.unplaced:
        return None
    return _sheets_of(got[1], got[0])[0]


def reassign(lib: ShapeLibrary, sheets: list[SheetParts], usable, lower: int, work: Work, budget_units: int,
             rng: random.Random, stop: Callable[[], bool]) -> list[SheetParts]:
    """Fewer sheets, or a less filled last sheet, by the moves of the module doc."""
    sheets = [list(s) for s in sheets if s]
    if len(sheets) < 2:
        return sheets
    tried: set = set()

    def spent() -> bool:
        return work.units >= budget_units or stop()

    def last_to_end() -> None:
        k = min(range(len(sheets)), key=lambda j: (_area(lib, sheets[j]), -j))
        sheets.append(sheets.pop(k))

    last_to_end()
    while len(sheets) > max(1, lower) and not spent():
        last = sheets[-1]
        last_area = _area(lib, last)
        others = sorted(range(len(sheets) - 1), key=lambda j: (_area(lib, sheets[j]), j))
        changed = False
        for k in others:
            key = ("pair", _content(sheets[k]), _content(last))
            if key in tried:
                continue
            if spent():
                return sheets
            got = _pack(lib, [sheets[k], last], usable, 1, work, rng, budget_units, stop, PAIR_STALL)
            if got is None:
                return sheets
            d, dec = got
            if not d.final.unplaced:
                sheets[k] = _sheets_of(dec, d)[0]
                sheets.pop()
                changed = True
                break
            left_items = [dec.part_items[p] for p in d.final.unplaced]
            left_area = _left_over(lib, dec, d)
            if left_area < last_area * (1 - 1e-9):
                new_last = _one_sheet(lib, left_items, usable, work, rng, budget_units, stop)
                if new_last is not None:
                    sheets[k] = _sheets_of(dec, d)[0]
                    sheets[-1] = new_last
                    changed = True
                    break
            tried.add(key)
        if not changed:
            for a_i, a in enumerate(others[:MAX_TRIPLES]):
                for b in others[a_i + 1:MAX_TRIPLES]:
                    pair = tuple(sorted((_content(sheets[a]), _content(sheets[b]))))
                    key = ("triple", pair, _content(last))
                    if key in tried:
                        continue
                    if spent():
                        return sheets
                    got = _pack(lib, [sheets[a], sheets[b], last], usable, 2, work, rng, budget_units, stop,
                                TRIPLE_STALL)
                    if got is None:
                        return sheets
                    d, dec = got
                    new = _sheets_of(dec, d)
                    if not d.final.unplaced:
                        sheets[a] = new[0]
                        sheets[b] = new[1] if len(new) > 1 else []
                        sheets.pop()
                        sheets[:] = [s for s in sheets if s]
                        changed = True
                        break
                    left_items = [dec.part_items[p] for p in d.final.unplaced]
                    left_area = _left_over(lib, dec, d)
                    if len(new) == 2 and left_area < last_area * (1 - 1e-9):
                        new_last = _one_sheet(lib, left_items, usable, work, rng, budget_units, stop)
                        if new_last is not None:
                            sheets[a], sheets[b] = new
                            sheets[-1] = new_last
                            changed = True
                            break
                    tried.add(key)
                if changed:
                    break
        if not changed:
            break
        last_to_end()
    return sheets


def compact_last(lib: ShapeLibrary, sheets: list[SheetParts], usable, work: Work, budget_units: int,
                 rng: random.Random, stop: Callable[[], bool]) -> list[SheetParts]:
    """The last sheet laid out afresh (its own order and largest first, under
    every placement rule, then a short order search) when that ends its parts
    further left: a longer clean remnant at its far end."""
    if not sheets or not sheets[-1] or work.units >= budget_units or stop():
        return sheets
    last = sheets[-1]
    reach = max(px / lib.scale + lib.shapes[sid].width for _i, sid, px, _py in last)
    part_items = [e[0] for e in last]
    dec = Decoder(lib, part_items, usable, 1, work)
    best: Decoded | None = None

    def cost(d: Decoded) -> float:
        st = d.final
        return (usable[2] - usable[0]) * len(st.unplaced) + (st.sheets[0].x_max if st.sheets else 0.0)

    for plan in _starts(lib, part_items, [0] * len(part_items)):
        for rule in range(len(RULES)):
            if work.units >= budget_units or stop():
                break
            d = dec.decode(plan, rule)
            if best is None or cost(d) < cost(best):
                best = d
    if best is None:
        return sheets
    best, _ = late_acceptance(dec, best, cost, rng=rng, budget_units=budget_units, stop=stop, stall_limit=PAIR_STALL)
    if best.final.unplaced or not best.final.sheets or best.final.sheets[0].x_max >= reach - 1e-9:
        return sheets
    return sheets[:-1] + [_sheets_of(dec, best)[0]]
