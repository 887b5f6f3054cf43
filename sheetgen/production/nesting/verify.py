"""Independent check of a finished layout, run before anything is written.

It uses the placed polygons only (not the no-fit polygons that produced
them) and raises :class:`~sheetgen.errors.GeometryBug` on the first of:

* a part accounted for twice, or not at all (neither placed nor unplaced);
* a placed polygon that is not the item's outline turned by its angle and
  moved by its offset (vertex by vertex; the Hausdorff distance only when the
  vertex counts differ);
* a part outside the usable area (the sheet shrunk by the margin; in strip mode
  the strip from x = margin to the length used less the margin);
* two parts overlapping by more than the tolerance, or (with a spacing) closer
  than the spacing less the tolerance.

A sheet whose parts are the same items at the same places and angles as a sheet
already checked (a repeated pattern) has its outlines checked against their
transforms but not again for overlaps and gaps.

Tolerance: ``TOL_MM`` = 1e-6 mm for layouts up to 1 m, scaled with the largest
sheet or part size above that (1e-9 of it). The nester lets parts touch
within about 5e-10 of that size.
"""

from __future__ import annotations

import numpy as np
import shapely

from sheetgen.errors import GeometryBug
from sheetgen.production.nesting.model import NestItem, NestResult
from sheetgen.production.nesting.nfp import rotate_ccw

TOL_MM = 1e-6


def tolerance(result: NestResult, items) -> float:
    sizes = [max(it.polygon.bounds[2] - it.polygon.bounds[0], it.polygon.bounds[3] - it.polygon.bounds[1])
             for it in items]
    return TOL_MM * max([1.0, *(v / 1000.0 for v in result.sheet_size_mm), *(s / 1000.0 for s in sizes)])


def _same_outline(expect, placed, tol: float) -> bool:
    """True when ``placed`` is ``expect`` within ``tol``: vertex by vertex when
    both have the same rings and vertex counts (the usual case: the nester moves
    the outline without redrawing it), else by the Hausdorff distance."""
    if (len(expect.interiors) == len(placed.interiors)
            and shapely.get_num_coordinates(expect) == shapely.get_num_coordinates(placed)
            and all(len(a.coords) == len(b.coords) for a, b in zip(expect.interiors, placed.interiors))):
        a, b = shapely.get_coordinates(expect), shapely.get_coordinates(placed)
        if float(np.max(np.abs(a - b))) <= tol:
            return True
    return shapely.hausdorff_distance(expect, placed) <= tol


def verify(result: NestResult, items: list[NestItem] | tuple[NestItem, ...]) -> None:
    """Raise GeometryBug unless ``result`` is a valid layout of ``items``."""
    tol = tolerance(result, items)
    expected = {(i, c) for i, it in enumerate(items) for c in range(it.qty)}
    seen: set[tuple[int, int]] = set()
    for s, sheet in enumerate(result.sheets):
        for p in sheet:
            key = (p.item, p.copy)
            if key not in expected:
                raise GeometryBug(f"sheet {s + 1}: part {key} is not one of the parts asked for")
            if key in seen:
                raise GeometryBug(f"sheet {s + 1}: part {items[p.item].name!r} copy {p.copy} is placed twice")
            seen.add(key)
    for key in result.unplaced:
        if key not in expected or key in seen:
            raise GeometryBug(f"unplaced part {key} is unknown or also placed")
        seen.add(key)
    missing = expected - seen
    if missing:
        i, c = min(missing)
        raise GeometryBug(f"part {items[i].name!r} copy {c} is neither placed nor listed as unplaced "
                          f"({len(missing)} missing)")

    w, h = result.sheet_size_mm
    m = result.margin_mm
    x0, y0, x1, y1 = m - tol, m - tol, w - m + tol, h - m + tol
    turned_cache: dict = {}
    checked: set = set()
    for s, sheet in enumerate(result.sheets):
        if not sheet:
            raise GeometryBug(f"sheet {s + 1} is empty")
        polys = np.array([p.polygon for p in sheet], dtype=object)
        for p in sheet:
            name = items[p.item].name
            turned = turned_cache.get((p.item, p.angle_deg))
            if turned is None:
                turned = turned_cache[(p.item, p.angle_deg)] = rotate_ccw(items[p.item].polygon, p.angle_deg)
            expect = shapely.transform(turned,
                                       lambda c: c + np.array([p.x_mm, p.y_mm]))
            if not _same_outline(expect, p.polygon, tol):
                raise GeometryBug(f"sheet {s + 1}: part {name!r} copy {p.copy}: polygon does not match its "
                                  f"transform (x={p.x_mm}, y={p.y_mm}, angle={p.angle_deg})")
            bx0, by0, bx1, by1 = p.polygon.bounds
            if bx0 < x0 or by0 < y0 or bx1 > x1 or by1 > y1:
                raise GeometryBug(f"sheet {s + 1}: part {name!r} copy {p.copy} at ({bx0:.6f}, {by0:.6f})-"
                                  f"({bx1:.6f}, {by1:.6f}) leaves the usable area ({m:g} to {w - m:g}, "
                                  f"{m:g} to {h - m:g})")
        layout = tuple((p.item, p.angle_deg, p.x_mm, p.y_mm) for p in sheet)
        if layout in checked:  # the same parts at the same places as a sheet already checked: same verdict
            continue
        checked.add(layout)
        tree = shapely.STRtree(polys)
        shrunk = shapely.buffer(polys, -tol, join_style="mitre")
        left, right = tree.query(shrunk, predicate="intersects")
        for a, b in zip(left, right):
            if a != b:
                pa, pb = sheet[a], sheet[b]
                raise GeometryBug(f"sheet {s + 1}: parts {items[pa.item].name!r} copy {pa.copy} and "
                                  f"{items[pb.item].name!r} copy {pb.copy} overlap")
        gap = result.spacing_mm
        if gap - tol > 0:
            left, right = tree.query(polys, predicate="dwithin", distance=gap - tol)
            for a, b in zip(left, right):
                if a < b:
                    pa, pb = sheet[a], sheet[b]
                    d = shapely.distance(pa.polygon, pb.polygon)
                    raise GeometryBug(f"sheet {s + 1}: parts {items[pa.item].name!r} copy {pa.copy} and "
                                      f"{items[pb.item].name!r} copy {pb.copy} are {d:.6f} mm apart, "
                                      f"less than the spacing of {gap:g} mm")
