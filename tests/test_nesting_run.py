"""Production runs cut from repeated batches: which sheets of a batch are repeated.

Sources: hand counts written out beside each case (arithmetic on the sizes,
independent of the code); the layouts are read back with shapely (an
independent computation) as well as with ``verify``.
"""

from __future__ import annotations

import itertools

from shapely.geometry import box

from sheetgen.production.nesting import NestItem, nest, sheet_patterns, verify

CEILING_S = 120.0  # far above what the work budget takes: the layout depends on seed and effort only


def _read_back(result, items):
    """Every copy placed once, inside the sheet, no two overlapping (shapely)."""
    w, h = result.sheet_size_mm
    seen = []
    for sheet in result.sheets:
        for p in sheet:
            x0, y0, x1, y1 = p.polygon.bounds
            assert x0 >= -1e-9 and y0 >= -1e-9 and x1 <= w + 1e-9 and y1 <= h + 1e-9
            seen.append((p.item, p.copy))
        for a, b in itertools.combinations(sheet, 2):
            assert a.polygon.intersection(b.polygon).area < 1e-6
    assert sorted(seen) == sorted((i, c) for i, it in enumerate(items) for c in range(it.qty))


def _squares_in_batches(monkeypatch, batch_parts: int, qty_a: int, qty_b: int):
    """10 mm squares of two kinds (``qty_a`` and ``qty_b``), spacing 0, nested on 25 x 25 mm
    sheets in batches of ``batch_parts`` parts; the layout verified and read back."""
    from sheetgen.production.nesting import batches

    monkeypatch.setattr(batches, "BATCH_PARTS", batch_parts)
    items = [NestItem("a", box(0, 0, 10, 10), qty_a, (0.0,)), NestItem("b", box(0, 0, 10, 10), qty_b, (0.0,))]
    result = nest(items, sheet_mm=(25, 25), effort=1, time_limit_s=CEILING_S)
    verify(result, items)
    _read_back(result, items)
    return result


def test_a_poorly_filled_last_sheet_of_a_batch_is_not_repeated(monkeypatch):
    # Hand count: 10 mm squares, spacing 0, on a 25 x 25 mm sheet: 2 x 2 fit
    # and no more (3 x 10 = 30 > 25 along either side), so 20 squares need
    # ceil(20 / 4) = 5 sheets. The run is 4 kits of 3 + 2 squares; with batches
    # of 5 parts (one kit: 2 sheets, 4 squares and 1) repeating the whole batch
    # would cut a sheet holding a single square with every repeat. The batch's
    # last sheet holds a quarter of what the first holds, so only the full sheet
    # is repeated and the single squares left over are nested together: 5 sheets.
    result = _squares_in_batches(monkeypatch, 5, 12, 8)
    assert len(result.sheets) == 5
    assert all(len(s) == 4 for s in result.sheets)
    assert max(len(g) for g in sheet_patterns(result)) >= 4  # the full sheet is the repeated pattern


def test_a_well_filled_batch_is_repeated_whole(monkeypatch):
    # Hand count: the same squares, kits of 2 + 2 (4 parts, one sheet of 2 x 2),
    # batches of 8 parts (2 kits, 2 full sheets): 6 kits = 24 squares = 6 full
    # sheets, every one of them cut from the batch's patterns.
    result = _squares_in_batches(monkeypatch, 8, 12, 12)
    assert len(result.sheets) == 6 and all(len(s) == 4 for s in result.sheets)


def test_a_pooled_run_is_the_same_for_the_same_seed_and_effort(monkeypatch):
    # Source: the contract of the work budget (same seed and effort, same layout),
    # here on a run whose batches hand parts back to the run.
    from sheetgen.production.nesting import batches

    monkeypatch.setattr(batches, "BATCH_PARTS", 5)
    items = [NestItem("a", box(0, 0, 10, 10), 12, (0.0,)), NestItem("b", box(0, 0, 6, 14), 8, (0.0, 90.0))]
    runs = [nest(items, sheet_mm=(25, 25), spacing_mm=0.5, effort=0.5, time_limit_s=t, seed=4)
            for t in (CEILING_S, 2 * CEILING_S)]
    key = [[[(p.item, p.copy, p.x_mm, p.y_mm, p.angle_deg) for p in s] for s in r.sheets] for r in runs]
    assert key[0] == key[1]
    verify(runs[0], items)
