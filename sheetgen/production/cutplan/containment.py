"""Cut planning: which contour encloses which (the inside-first rule)."""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from sheetgen.production.cutplan.settings import CIRCLE_QUAD_SEGS
from sheetgen.geometry.contour import Contour


def _circle_polygon(circle):
    from shapely.geometry import Point

    cx, cy, r = circle
    return Point(cx, cy).buffer(r, quad_segs=CIRCLE_QUAD_SEGS)


def contour_polygon(contour: Contour):
    """The region a contour bounds, as a shapely Polygon (valid)."""
    from shapely.geometry import Polygon

    if contour.is_circle:
        return _circle_polygon(contour.circle)
    poly = Polygon(contour.points)
    if not poly.is_valid:
        from shapely.validation import make_valid

        fixed = make_valid(poly)
        polys = [g for g in getattr(fixed, "geoms", [fixed]) if g.geom_type == "Polygon"]
        poly = max(polys, key=lambda g: g.area) if polys else poly
    return poly


def enclosure_pairs(polygons: Sequence) -> list[tuple[int, int]]:
    """All pairs (outer, inner) where region ``outer`` encloses region ``inner``.

    Cut contours of a sheet do not cross, so one encloses another when it is
    larger and holds (more than half of) it; the area test keeps the relation
    strict and acyclic, and the half-overlap test tolerates the polygon
    approximation of circles.
    """
    import shapely

    if len(polygons) < 2:
        return []
    geoms = np.asarray(polygons, dtype=object)
    areas = shapely.area(geoms)
    tree = shapely.STRtree(geoms)
    left, right = tree.query(geoms, predicate="intersects")
    pairs = []
    for a, b in zip(left.tolist(), right.tolist()):
        if a == b or not areas[a] > areas[b]:
            continue
        ax0, ay0, ax1, ay1 = polygons[a].bounds
        bx0, by0, bx1, by1 = polygons[b].bounds
        tol = 1e-6 + 1e-3 * max(ax1 - ax0, ay1 - ay0)
        if bx0 < ax0 - tol or by0 < ay0 - tol or bx1 > ax1 + tol or by1 > ay1 + tol:
            continue
        if polygons[a].intersection(polygons[b]).area > 0.5 * areas[b]:
            pairs.append((a, b))
    pairs.sort()
    return pairs
