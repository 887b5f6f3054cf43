"""No-fit polygons and inner-fit rectangles.

Conventions used throughout the nester:

* A *shape* is a part's polygon turned to one allowed angle and moved so that
  the lower-left corner of its bounding box is at the origin. That corner is the
  shape's **reference point**: a shape "at (px, py)" occupies ``shape + (px, py)``.
* ``no_fit_polygon(fixed, moving)`` is the Minkowski sum ``fixed (+) (-moving)``:
  with ``fixed`` where it is, ``moving`` placed with its reference point at ``t``
  overlaps ``fixed`` (interiors meet) exactly when ``t`` lies in the interior of
  the result. Points on its boundary are touching positions; holes of the
  result are positions where ``moving`` sits inside a hole of ``fixed`` (or in a
  closed pocket) without touching it.
* Spacing (the clear gap between cut contours): ``no_fit_polygon(..., spacing)``
  dilates ``fixed`` by the spacing before the sum, its round corners drawn
  slightly outside the true circle, so the gap is never smaller than asked.
  The nester itself grows *both* parts by half the spacing instead (mitred
  corners, which contain the round offset; see :func:`clearance_outline`),
  which needs no extra vertices.
* Reference-file convention: the no-fit and inner-fit polygons stored in the
  ESICUP XML files use this same reference point (the lower-left corner of each
  turned piece's bounding box); see tests/test_nfp_esicup.py.

The sum is exact up to the integer grid of pyclipper, which is chosen per call
so that the largest coordinate is about 2**45 grid units (for a 1 m part the grid
is about 3e-11 mm). It is the union of

* every edge of ``fixed`` swept along every edge of ``-moving`` (pyclipper's
  Minkowski sum of each ring of ``-moving`` along the rings of ``fixed``), which
  covers all translations where the boundaries meet;
* ``fixed - b0`` for one point ``b0`` of ``moving`` (``moving`` wholly inside
  ``fixed``) and ``a0 - moving`` for one point ``a0`` of ``fixed`` (the
  other way round).

Every translation where the two overlap is in one of these three sets, and
every translation in them makes the two meet, so the union is the sum. The
nester itself takes a faster road to the same set (:func:`fast_nfp_paths`:
the hull of the corner differences for two convex outlines, otherwise the
union of the sums of convex pieces, :mod:`~sheetgen.production.nesting.convex`).
"""

from __future__ import annotations

import math

import numpy as np
import pyclipper
import shapely
from shapely.geometry import MultiPolygon, Polygon

from sheetgen.geometry.shapes import one_polygon
from sheetgen.production.nesting.convex import convex_sum_paths

GRID_TARGET = float(2**45)


def grid_scale(*extents: float) -> float:
    """A power-of-two scale putting the largest extent near GRID_TARGET units."""
    biggest = max([1e-9, *[abs(e) for e in extents]])
    return 2.0 ** math.floor(math.log2(GRID_TARGET / biggest))


def rings(polygon: Polygon) -> list[np.ndarray]:
    """Exterior then holes, each as an (n, 2) array without the closing point."""
    out = [np.asarray(polygon.exterior.coords)[:-1, :2]]
    out.extend(np.asarray(r.coords)[:-1, :2] for r in polygon.interiors)
    return out


def _to_int(ring: np.ndarray, scale: float) -> list[tuple[int, int]]:
    return [(int(x), int(y)) for x, y in np.rint(ring * scale)]


def _oriented(ring: np.ndarray, ccw: bool) -> np.ndarray:
    x, y = ring[:, 0], ring[:, 1]
    area2 = float(np.dot(x, np.roll(y, -1)) - np.dot(np.roll(x, -1), y))
    return ring if (area2 > 0) == ccw else ring[::-1]


def _polygon_paths(polygon: Polygon, scale: float) -> list[list[tuple[int, int]]]:
    """Rings in clipper orientation: exterior counter-clockwise, holes clockwise,
    so that a non-zero union treats each polygon with its holes correctly."""
    rs = rings(polygon)
    paths = [_to_int(_oriented(rs[0], True), scale)]
    paths.extend(_to_int(_oriented(r, False), scale) for r in rs[1:])
    return paths


def _tree_to_polygons(node, scale: float, out: list[Polygon]) -> None:
    for child in node.Childs:
        # child is an outer contour; its children are holes; their children outers again
        shell = np.asarray(child.Contour, dtype=float) / scale
        holes = [np.asarray(h.Contour, dtype=float) / scale for h in child.Childs if len(h.Contour) >= 3]
        if len(shell) >= 3:
            out.append(Polygon(shell, holes))
        for h in child.Childs:
            _tree_to_polygons(h, scale, out)


def _as_geometry(polys: list[Polygon]):
    polys = [p for p in polys if not p.is_empty and p.area > 0]
    if not polys:
        return Polygon()
    if len(polys) == 1:
        return polys[0]
    return MultiPolygon(polys)


def _union_paths(paths, scale: float):
    pc = pyclipper.Pyclipper()
    pc.AddPaths(paths, pyclipper.PT_SUBJECT, True)
    tree = pc.Execute2(pyclipper.CT_UNION, pyclipper.PFT_NONZERO, pyclipper.PFT_NONZERO)
    polys: list[Polygon] = []
    _tree_to_polygons(tree, scale, polys)
    return polys


def dilate_paths(polygon: Polygon, distance: float, scale: float) -> list[list[tuple[int, int]]]:
    """Clipper paths of ``polygon`` grown by ``distance`` (holes shrink).

    Round corners are polylines whose chords stay at least ``distance`` from
    the original outline: the offset radius is ``distance + arc tolerance``."""
    paths = _polygon_paths(polygon, scale)
    if distance <= 0:
        return paths
    arc_tol = max(0.01 * distance, 1e-6)
    off = pyclipper.PyclipperOffset()
    off.ArcTolerance = arc_tol * scale
    off.AddPaths(paths, pyclipper.JT_ROUND, pyclipper.ET_CLOSEDPOLYGON)
    grown = off.Execute((distance + arc_tol) * scale)  # outer rings positive, holes negative
    return [list(map(tuple, p)) for p in grown]


def dilate(polygon: Polygon, distance: float) -> Polygon | MultiPolygon:
    """``polygon`` grown by ``distance`` as a shapely geometry (for checks and tests)."""
    x0, y0, x1, y1 = polygon.bounds
    scale = grid_scale(x0, y0, x1, y1, distance * 4)
    return _as_geometry(_union_paths(dilate_paths(polygon, distance, scale), scale))


def nfp_paths(fixed: Polygon, moving: Polygon, spacing: float, scale: float) -> list[list[list[int]]]:
    """The no-fit polygon as pyclipper paths on a grid of ``1 / scale``
    (outer rings counter-clockwise, holes clockwise)."""
    a_paths = dilate_paths(fixed, spacing, scale)
    b_paths = _polygon_paths(moving, scale)
    out: list = []
    for ring in b_paths:
        neg = [(-x, -y) for x, y in ring]
        out.extend(pyclipper.MinkowskiSum2(neg, a_paths, True))
    # containment terms: fixed - b0 (a_paths are oriented for a non-zero union) and a0 - moving
    bx, by = b_paths[0][0]
    for path in a_paths:
        out.append([(x - bx, y - by) for x, y in path])
    ax, ay = next(p for p in a_paths if pyclipper.Orientation(p))[0]
    for path in b_paths:
        out.append([(ax - x, ay - y) for x, y in path])
    pc = pyclipper.Pyclipper()
    pc.AddPaths(out, pyclipper.PT_SUBJECT, True)
    return pc.Execute(pyclipper.CT_UNION, pyclipper.PFT_NONZERO, pyclipper.PFT_NONZERO)


def nfp_scale(fixed: Polygon, moving: Polygon, spacing: float) -> float:
    fx0, fy0, fx1, fy1 = fixed.bounds
    mx0, my0, mx1, my1 = moving.bounds
    return grid_scale(fx0, fy0, fx1, fy1, mx0, my0, mx1, my1,
                      (fx1 - fx0) + (mx1 - mx0) + 4 * spacing, (fy1 - fy0) + (my1 - my0) + 4 * spacing)


def no_fit_polygon(fixed: Polygon, moving: Polygon, spacing: float = 0.0) -> Polygon | MultiPolygon:
    """The no-fit polygon ``dilate(fixed, spacing) (+) (-moving)``, see module doc."""
    scale = nfp_scale(fixed, moving, spacing)
    return paths_to_geometry(nfp_paths(fixed, moving, spacing, scale), scale)


def paths_to_geometry(paths, scale: float) -> Polygon | MultiPolygon:
    """Shapely geometry of clipper paths (non-zero fill)."""
    return _as_geometry(_union_paths(paths, scale))


def shape_of(polygon: Polygon, angle_deg: float) -> tuple[Polygon, tuple[float, float]]:
    """``polygon`` turned CCW by ``angle_deg`` about (0, 0), then moved so its
    bounding box starts at the origin. Returns the shape and the offset
    ``(bx, by)`` = lower-left corner of the turned polygon's bounding box, so a
    shape at reference point (px, py) is the part moved by (px - bx, py - by)."""
    turned = rotate_ccw(polygon, angle_deg)
    bx, by = turned.bounds[0], turned.bounds[1]
    shape = shapely.transform(turned, lambda c: c - np.array([bx, by]))
    return shape, (bx, by)


def rotate_ccw(polygon: Polygon, angle_deg: float) -> Polygon:
    """Rotation CCW about the origin; exact for multiples of 90 degrees."""
    a = float(angle_deg) % 360.0
    quarter = {0.0: (1.0, 0.0), 90.0: (0.0, 1.0), 180.0: (-1.0, 0.0), 270.0: (0.0, -1.0)}
    if a in quarter:
        c, s = quarter[a]
    else:
        r = math.radians(a)
        c, s = math.cos(r), math.sin(r)
    m = np.array([[c, s], [-s, c]])  # row vectors: [x y] @ m = [cx - sy, sx + cy]
    return shapely.transform(polygon, lambda xy: xy @ m)


def inner_fit_rect(usable: tuple[float, float, float, float],
                   size: tuple[float, float]) -> tuple[float, float, float, float] | None:
    """Reference points at which a shape of ``size`` (w, h) lies inside the
    usable rectangle ``(x0, y0, x1, y1)``: the rectangle ``(x0, y0, x1 - w, y1 - h)``,
    or None when the shape is wider or taller than the usable area."""
    x0, y0, x1, y1 = usable
    w, h = size
    if x1 - w < x0 or y1 - h < y0:
        return None
    return (x0, y0, x1 - w, y1 - h)


# ---------------------------------------------------------------------------
# Outlines used for no-fit polygons in a run (the "clearance outlines")

MAX_VERTICES = 48


def clearance_outline(polygon: Polygon, half_spacing: float, max_vertices: int = MAX_VERTICES) -> Polygon:
    """A polygon containing ``polygon`` grown by ``half_spacing``, with at most
    about ``max_vertices`` vertices.

    Two parts whose clearance outlines do not overlap are at least the spacing
    apart. Growing uses mitred corners, which contain the round offset. Finely
    drawn outlines (gears, polygonised circles) are then coarsened outward:
    grown by a tolerance t and simplified by t, so the result still contains
    the outline, and t doubles until the vertex count is small enough; the
    convex hull is the last resort. Coarsening only loses nesting tightness
    of about 2 t, never validity (the layout is checked on the real outlines).
    """
    out = polygon
    x0, y0, x1, y1 = polygon.bounds
    if half_spacing > 1e-10 * max(1.0, x1 - x0, y1 - y0):  # below that, far under any tolerance
        out = polygon.buffer(half_spacing, join_style="mitre", mitre_limit=4.0)
        if not isinstance(out, Polygon) or out.is_empty or not out.covers(polygon):
            out = polygon.buffer(half_spacing * 1.01, quad_segs=16)
    if shapely.get_num_coordinates(out) - 1 - len(out.interiors) <= max_vertices:
        return out
    x0, y0, x1, y1 = out.bounds
    tol = 2e-4 * max(x1 - x0, y1 - y0)
    for _ in range(12):
        cand = out.buffer(tol, join_style="mitre", mitre_limit=4.0).simplify(tol, preserve_topology=True)
        if isinstance(cand, Polygon) and cand.is_valid and cand.covers(out):
            if shapely.get_num_coordinates(cand) - 1 - len(cand.interiors) <= max_vertices:
                return cand
        tol *= 2
    hull = out.convex_hull
    return one_polygon(hull.buffer(tol, join_style="mitre", mitre_limit=4.0).simplify(tol).convex_hull,
                       "simplified spacing outline")


def fill_small_holes(polygon: Polygon, width: float, height: float) -> Polygon:
    """``polygon`` without the holes that cannot hold a ``width`` x ``height``
    box (their bounding box is narrower or lower). Such holes change no no-fit
    polygon with a part of that size, and dropping them saves work."""
    if not polygon.interiors:
        return polygon
    keep = []
    for ring in polygon.interiors:
        hx0, hy0, hx1, hy1 = ring.bounds
        if hx1 - hx0 >= width and hy1 - hy0 >= height:
            keep.append(ring)
    if len(keep) == len(polygon.interiors):
        return polygon
    return Polygon(polygon.exterior, keep)


def is_convex(polygon: Polygon) -> bool:
    if polygon.interiors:
        return False
    return polygon.area >= polygon.convex_hull.area * (1 - 1e-12)


def fast_nfp_paths(fixed: Polygon, moving: Polygon, scale: float):
    """The no-fit polygon as clipper paths, with shortcuts that give the
    same set: holes too small for the other part are filled first; when
    both outlines are then convex the sum is the convex hull of all vertex
    differences, and otherwise the union of the sums of their convex pieces
    (:mod:`~sheetgen.production.nesting.convex`; the edge sweep of
    :func:`nfp_paths` when an outline cannot be cut). Also returns a measure of
    the work done (vertex pairs)."""
    fx0, fy0, fx1, fy1 = fixed.bounds
    mx0, my0, mx1, my1 = moving.bounds
    a = fill_small_holes(fixed, mx1 - mx0, my1 - my0)
    b = fill_small_holes(moving, fx1 - fx0, fy1 - fy0)
    if is_convex(a) and is_convex(b):
        pa = np.asarray(a.exterior.coords)[:-1]
        pb = np.asarray(b.exterior.coords)[:-1]
        hull = one_polygon(shapely.MultiPoint((pa[:, None, :] - pb[None, :, :]).reshape(-1, 2)).convex_hull,
                           "no-fit polygon of two convex shapes")
        return _polygon_paths(hull, scale), len(pa) * len(pb) // 8
    na = int(shapely.get_num_coordinates(a))
    nb = int(shapely.get_num_coordinates(b))
    paths = convex_sum_paths(a, b, scale)  # the union of the sums of convex pieces (convex.py)
    return (nfp_paths(a, b, 0.0, scale) if paths is None else paths), na * nb
