"""The fewest sheets any layout could use: an honest lower bound.

Every part is grown by half the spacing (``G``, round corners drawn inside
the true offset, so its area is never overstated). Two parts at least the
spacing apart have disjoint grown outlines, and every grown outline lies in
the usable area (sheet less the margins) grown by half the spacing on every
side: ``(W - 2 margin + spacing) x (H - 2 margin + spacing)``, the area ``A``
one sheet offers.

What a part takes from a sheet (its *claim*): the grown outline plus those of
its holes (of the grown outline) that no part of the run could enter. A part
enters a hole only if its bounding box, at one of its allowed angles, fits the
hole's bounding box; holes that pass this test are *windows*. Claims are
disjoint, so per sheet ``A >= sum of claims + window area left empty``, and
the area left empty in the windows is at least the window area less the
claims of all parts that fit some window. Hence

    sheets >= ceil((sum of claims + max(0, window area - claims of parts fitting a window)) / A)

Two more counts, each valid on its own, and the bound is the largest of the three:

* parts whose claim is more than half of ``A`` cannot share a sheet;
* rectangular parts longer than half the usable length minus half the spacing along
  both axes at every allowed angle cannot share a sheet either (two rectangles
  are apart only if they are apart along x or along y).

Strip mode has no bound of its own (1).
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import shapely
from shapely.geometry import Polygon

from sheetgen.production.nesting.nfp import rotate_ccw

QUAD_SEGS = 16


def _bbox_sizes(polygon: Polygon, angles: Sequence[float]) -> list[tuple[float, float, bool]]:
    """(width, height, is a rectangle) of ``polygon`` at each angle."""
    out = []
    for a in angles:
        turned = rotate_ccw(polygon, a)
        x0, y0, x1, y1 = turned.bounds
        rect = not turned.interiors and turned.area >= (x1 - x0) * (y1 - y0) * (1 - 1e-9)
        out.append((x1 - x0, y1 - y0, rect))
    return out


def lower_bound_sheets(items, sheet_mm: tuple[float, float], margin_mm: float, spacing_mm: float) -> int:
    """The lower bound of the module doc for ``items`` (NestItem-like: polygon, qty, rotations_deg)."""
    w, h = sheet_mm
    s = float(spacing_mm)
    uw, uh = w - 2 * margin_mm, h - 2 * margin_mm
    area = (uw + s) * (uh + s)
    sizes = [_bbox_sizes(it.polygon, it.rotations_deg) for it in items]
    grown = []
    for it in items:
        g = it.polygon.buffer(s / 2, quad_segs=QUAD_SEGS) if s > 0 else it.polygon
        if g.geom_type != "Polygon":  # cannot happen for a valid polygon grown outward; be safe
            g = shapely.unary_union([g]).convex_hull
        grown.append(g)

    def fits_in(hole_w: float, hole_h: float) -> list[bool]:
        return [any(bw <= hole_w and bh <= hole_h for bw, bh, _ in sz) for sz in sizes]

    claims, window_area = [], 0.0
    fits_window = [False] * len(items)
    for it, g in zip(items, grown):
        claim = g.area
        for ring in g.interiors:
            x0, y0, x1, y1 = ring.bounds
            fit = fits_in(x1 - x0, y1 - y0)
            hole = Polygon(ring).area
            if any(fit):
                window_area += hole * it.qty
                fits_window = [a or b for a, b in zip(fits_window, fit)]
            else:
                claim += hole
        claims.append(claim)
    total = sum(c * it.qty for c, it in zip(claims, items))
    fitting = sum(c * it.qty for c, it, f in zip(claims, items, fits_window) if f)
    empty_windows = max(0.0, window_area - fitting)
    by_area = math.ceil((total + empty_windows) / area - 1e-9)
    big_claims = sum(it.qty for c, it in zip(claims, items) if c > area / 2)
    big_rects = sum(it.qty for sz, it in zip(sizes, items)
                    if all(rect and bw > (uw - s) / 2 and bh > (uh - s) / 2 for bw, bh, rect in sz))
    return max(1, by_area, big_claims, big_rects)
