"""No-fit polygons as unions of convex sums: the nester's fast path.

The Minkowski sum ``A (+) (-B)`` of two polygons (holes allowed) is the union
of the sums of their convex pieces: ``A = A1 u ... u Am`` and ``B = B1 u ... u Bn``
give ``A (+) (-B) = u (Ai (+) (-Bj))``, since a sum of unions is the union of
the sums. The sum of two convex polygons is the convex polygon whose edges are
the edges of both, taken in the order of their directions: no search, no
intersections. The pieces are cut once per outline (a constrained Delaunay
triangulation of the outline on the integer grid, its triangles merged while
the merged piece stays convex, tested in exact integer arithmetic), and the
sums of all pairs of pieces are made at once with numpy; one pyclipper union
joins them. For the outlines of a kit (tens of vertices, a few windows) this
is about four times faster than sweeping every edge of one outline along every
edge of the other (:func:`sheetgen.production.nesting.nfp.nfp_paths`), and it
gives the same set of translations up to the rounding of the grid.

Everything is on pyclipper's integer grid: the corners of the pieces are the
outline's own grid points and every sum is a sum of integers, so the pieces'
corners are exact.
"""

from __future__ import annotations

import math

import numpy as np
import pyclipper
import shapely
from shapely.geometry import Polygon

PIECES_KEPT = 2048           # outlines whose convex pieces are kept per process
_PIECES: dict[tuple, tuple[np.ndarray, np.ndarray, np.ndarray] | None] = {}
_LAST = 7.0                  # direction given to the padding (zero) edges: after every real edge (< 2 pi)


def _cross(a, b, c):
    return (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0])


def merge_convex(pieces: list, slack: float) -> list:
    """Counter-clockwise polygons (lists of corner tuples) that tile a region, merged across
    their shared edges, the longest first, while the merged polygon stays convex: no corner
    turns clockwise by more than ``slack`` (as a cross product; 0 for exact integer corners)."""
    pieces = list(pieces)
    owner: dict[tuple, int] = {}   # directed edge -> piece holding it
    for k, corners in enumerate(pieces):
        for j in range(len(corners)):
            owner[(corners[j], corners[(j + 1) % len(corners)])] = k
    shared = sorted({(min(e), max(e)) for e in owner if (e[1], e[0]) in owner},
                    key=lambda e: (-math.dist(e[0], e[1]), e))
    for u, v in shared:
        if (u, v) not in owner or (v, u) not in owner:
            continue
        kp, kq = owner[(u, v)], owner[(v, u)]
        p, q = pieces[kp], pieces[kq]
        if kp == kq or p is None or q is None:
            continue
        i = p.index(v)
        j = q.index(u)
        merged = p[i:] + p[:i] + (q[j:] + q[:j])[1:-1]   # v ... u, then q's corners between u and v
        n = len(merged)
        if any(_cross(merged[m - 1], merged[m], merged[(m + 1) % n]) < -slack for m in range(n)):
            continue
        pieces[kp], pieces[kq] = merged, None
        for m in range(n):
            owner[(merged[m], merged[(m + 1) % n])] = kp
        owner.pop((u, v), None)
        owner.pop((v, u), None)
    return [p for p in pieces if p is not None]


def convex_pieces(region: Polygon) -> list[list[tuple[int, int]]] | None:
    """Convex pieces, counter-clockwise, whose union is ``region`` (a polygon whose
    coordinates are whole numbers): the triangles of a constrained Delaunay
    triangulation, merged across shared edges (the longest first) while the union
    stays convex. None when the triangles do not cover the region exactly (a
    degenerate outline), so that the caller takes the general method."""
    try:
        tris = shapely.get_parts(shapely.constrained_delaunay_triangles(region))
    except shapely.errors.GEOSException:  # an outline the triangulation refuses: the general method
        return None
    tris = tris[~shapely.is_empty(tris)]
    if not len(tris):
        return None
    coords = shapely.get_coordinates(shapely.get_exterior_ring(tris)).reshape(len(tris), 4, 2)[:, :3, :]
    pieces: list[list[tuple[int, int]]] = []
    twice_area = 0
    for t in coords:
        pts = [(int(x), int(y)) for x, y in t]
        c = _cross(pts[0], pts[1], pts[2])
        if c == 0:
            continue  # a triangle of no area covers nothing
        if c < 0:
            pts.reverse()
        twice_area += abs(c)
        pieces.append(pts)
    if abs(twice_area - 2.0 * region.area) > 1e-9 * twice_area:
        return None
    return merge_convex(pieces, 0)


def _prepared(pieces: list[list[tuple[int, int]]]) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Per piece: its lowest corner (least y, then least x), its edges from there in
    counter-clockwise order, and their directions in [0, 2 pi) (rising along the
    piece); shorter pieces padded with zero edges of direction ``_LAST``."""
    width = max(len(p) for p in pieces)
    starts = np.zeros((len(pieces), 2), dtype=np.int64)
    edges = np.zeros((len(pieces), width, 2), dtype=np.int64)
    angles = np.full((len(pieces), width), _LAST)
    for k, p in enumerate(pieces):
        s = min(range(len(p)), key=lambda i: (p[i][1], p[i][0]))
        corners = np.array(p[s:] + p[:s], dtype=np.int64)
        e = np.roll(corners, -1, axis=0) - corners
        a = np.arctan2(e[:, 1].astype(float), e[:, 0].astype(float))
        starts[k] = corners[0]
        edges[k, :len(p)] = e
        angles[k, :len(p)] = np.where(a < 0.0, a + 2.0 * math.pi, a)
    return starts, edges, angles


def _grid_polygon(polygon: Polygon, scale: float, sign: int) -> Polygon:
    rings = [np.rint(np.asarray(r.coords)[:, :2] * scale) * sign for r in (polygon.exterior, *polygon.interiors)]
    return Polygon(rings[0], rings[1:])


def _pieces_of(polygon: Polygon, scale: float, sign: int):
    """The prepared convex pieces of ``sign * polygon`` on the grid of ``scale`` (kept per process)."""
    key = (polygon.wkb, scale, sign)
    if key not in _PIECES:
        if len(_PIECES) >= PIECES_KEPT:
            _PIECES.clear()
        pieces = convex_pieces(_grid_polygon(polygon, scale, sign))
        _PIECES[key] = None if not pieces else _prepared(pieces)
    return _PIECES[key]


def convex_sum_paths(fixed: Polygon, moving: Polygon, scale: float) -> list | None:
    """The no-fit polygon ``fixed (+) (-moving)`` as pyclipper paths on the grid of
    ``scale`` (outer rings counter-clockwise, holes clockwise), from the convex
    pieces of both (module doc); None when an outline could not be cut into pieces."""
    a = _pieces_of(fixed, scale, 1)
    b = _pieces_of(moving, scale, -1)
    if a is None or b is None:
        return None
    sa, ea, aa = a
    sb, eb, ab = b
    n1, n2, w1, w2 = len(sa), len(sb), ea.shape[1], eb.shape[1]
    edges = np.concatenate([np.broadcast_to(ea[:, None], (n1, n2, w1, 2)),
                            np.broadcast_to(eb[None, :], (n1, n2, w2, 2))], axis=2).reshape(n1 * n2, w1 + w2, 2)
    angles = np.concatenate([np.broadcast_to(aa[:, None], (n1, n2, w1)),
                             np.broadcast_to(ab[None, :], (n1, n2, w2))], axis=2).reshape(n1 * n2, w1 + w2)
    order = np.argsort(angles, axis=1, kind="stable")
    edges = np.take_along_axis(edges, order[:, :, None], axis=1)
    # the lowest corner of a sum is the sum of the lowest corners; the edges in order of direction go round it
    corners = np.cumsum(edges, axis=1) + (sa[:, None, :] + sb[None, :, :]).reshape(n1 * n2, 1, 2)
    pc = pyclipper.Pyclipper()
    pc.AddPaths(corners.tolist(), pyclipper.PT_SUBJECT, True)
    return pc.Execute(pyclipper.CT_UNION, pyclipper.PFT_NONZERO, pyclipper.PFT_NONZERO)
