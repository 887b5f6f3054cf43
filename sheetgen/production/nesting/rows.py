"""Rows of bounding boxes: the quick, always valid way to finish a layout.

When the wall-clock ceiling cuts a layout short, the parts not yet placed go
in rows of their boxes into the free ends of the sheets and onto new sheets
(:func:`box_rows`): no no-fit polygon is needed, and boxes the spacing apart
hold parts the spacing apart whatever their outlines.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

from sheetgen.errors import GeometryBug
from sheetgen.production.nesting.place import ShapeLibrary

TOL_UNITS = 4            # grid units by which boxes may exceed the area in sums (float rounding)


def box_rows(lib: ShapeLibrary, items: list[int], usable,
             ends: Sequence[tuple[int, float]] = ()) -> tuple[dict[int, list], list[list[tuple[int, int, int, int]]]]:
    """``items`` in rows of their bounding boxes (tallest first, each row left
    to right, rows bottom to top, a part at least the spacing from the next):
    first into the free ends of existing sheets (``ends``: (sheet index, x in
    mm where its parts' boxes end), the free end starting the spacing further
    on), then onto new sheets. No no-fit polygon, so quick, and valid for any
    outline because boxes the spacing apart hold parts the spacing apart.
    Each item lies in the angle of its lowest box that fits the usable area.
    Grid positions are rounded up and kept inside the usable area, so a gap
    may be short of the spacing by a few grid units (about 1e-9 mm), far below
    the tolerance, as in :func:`_finish`. Returns (parts added per existing sheet,
    new sheets), parts as (item, shape id, px, py)."""
    x0, y0, x1, y1 = usable
    s, scale = lib.spacing, lib.scale
    tol = TOL_UNITS / scale   # float rounding; positions are clamped into the usable area

    def shape(i: int) -> int:
        fits = [sid for sid in lib.item_shapes[i]
                if lib.shapes[sid].width <= x1 - x0 and lib.shapes[sid].height <= y1 - y0]
        return min(fits, key=lambda sid: (lib.shapes[sid].height, sid))

    left = sorted(((lib.shapes[shape(i)].height, lib.shapes[shape(i)].width, i, shape(i)) for i in items),
                  key=lambda e: (-e[0], -e[1], e[2], e[3]))

    def fill(bx: float) -> list[tuple[int, int, int, int]]:
        """Rows from x = bx to the usable area's right edge; takes what fits out of ``left``."""
        nonlocal left
        out: list[tuple[int, int, int, int]] = []
        rest = []
        x = y = row_h = 0.0   # cursor from (bx, y0), mm
        for e in left:
            h, w, i, sid = e
            if bx + x + w > x1 + tol and out and bx + w <= x1 + tol and y + row_h + s + h <= y1 - y0 + tol:
                x, y, row_h = 0.0, y + row_h + s, 0.0
            if bx + x + w > x1 + tol or y + h > y1 - y0 + tol:
                rest.append(e)
                continue
            px = min(math.ceil((bx + x) * scale), math.floor((x1 - w) * scale))
            py = min(math.ceil((y0 + y) * scale), math.floor((y1 - h) * scale))
            out.append((i, sid, px, py))
            x += w + s
            row_h = max(row_h, h)
        left = rest
        return out

    added: dict[int, list] = {}
    for k, x_end in ends:
        if not left:
            break
        got = fill(max(x0, x_end + s))
        if got:
            added[k] = got
    new: list[list[tuple[int, int, int, int]]] = []
    while left:
        got = fill(x0)
        if not got:  # cannot happen: every part fits the usable area in some angle (checked by nest)
            raise GeometryBug(f"item {left[0][2]}: no room on an empty sheet for its box")
        new.append(got)
    return added, new
