"""The fewest sheets any layout could use: an honest lower bound.

Every part is grown by half the spacing (``G``, round corners drawn inside
the true offset, so its area is never overstated). Two parts at least the
spacing apart have disjoint grown outlines, and every grown outline lies in
the usable area (sheet less the margins) grown by half the spacing on every
side: ``(W - 2 margin + spacing) x (H - 2 margin + spacing)``, the area ``A``
one sheet offers.

What a part takes from a sheet (its *claim*): the grown outline plus those of
its holes (of the grown outline) that no part of the run could enter. A part
enters a hole only if its grown bounding box, at one of its allowed angles,
fits the hole's bounding box; holes that pass this test are *windows*. A part
that lies in a window lies there whole (it is connected and cannot cross the
window's part), with its own windows: what it fills of the window is its
*filled* outline (the grown outline with every hole closed). Claims are
disjoint, so per sheet ``A >= sum of claims + window area left empty``, and
the window area left empty is at least the window area less the filled
outlines of the parts that lie in windows. Hence

    sheets >= ceil((sum of claims + max(0, window area - most that windows can hold)) / A)

What windows can hold is bounded from above (:func:`_window_fill`): every part
that fits a window could be in one, except that some windows take at most one
of their large parts. Two large parts *exclude each other* in a window when no
offsets put both in its bounding box (at any pair of allowed angles) without
their grown outlines overlapping; :func:`_exclusive` proves it on the no-fit
polygon of two inner approximations of the outlines (a subset of the true one,
so a pair it cannot prove is treated as fitting). A part that excludes itself
and every other large part of each window it fits is *alone* there: each copy
of a window holds at most one such part, so what the alone parts add is at
most the largest of them per window, and at most the largest of their copies
one per window.

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

import numpy as np
import shapely
from shapely.geometry import Polygon, box
from shapely.geometry.base import BaseGeometry

from sheetgen.production.nesting.convex import merge_convex
from sheetgen.production.nesting.nfp import rotate_ccw

QUAD_SEGS = 16
# inner approximations tried for the exclusion proof, coarsest (fewest triangles) first:
# (inset, simplification tolerance), mm
LEVELS = ((3.0, 1.4), (1.0, 0.45), (0.4, 0.18))
FIT_TOL_MM = 1e-9
HULL_BATCH = 128               # sums taken off the offsets at a time, largest first
EXCLUSIVE_KEPT = 4096         # answers of the exclusion proof kept per process (by the parts' shapes)

_EXCLUSIVE: dict[tuple, bool] = {}


def _bbox_sizes(polygon: Polygon, angles: Sequence[float]) -> list[tuple[float, float, bool]]:
    """(width, height, is a rectangle) of ``polygon`` at each angle."""
    out = []
    for a in angles:
        turned = rotate_ccw(polygon, a)
        x0, y0, x1, y1 = turned.bounds
        rect = not turned.interiors and turned.area >= (x1 - x0) * (y1 - y0) * (1 - 1e-9)
        out.append((x1 - x0, y1 - y0, rect))
    return out


class _Inner:
    """Per part and angle: the box of the grown outline turned; per level, too, the convex
    pieces of an inner approximation (every point at least ``margin`` inside the grown
    outline): the turned outline shrunk by the level's inset, then simplified within the
    level's tolerance. Each is made when first asked for."""

    def __init__(self, grown: Sequence[Polygon], angles: Sequence[Sequence[float]]):
        self.grown = grown
        self.angles = angles
        self._turned: dict[tuple[int, float], Polygon] = {}
        self._pieces: dict[tuple[int, float, int], tuple[list[np.ndarray], float]] = {}

    def turned(self, i: int, angle: float) -> Polygon:
        if (i, angle) not in self._turned:
            self._turned[(i, angle)] = rotate_ccw(self.grown[i], angle)
        return self._turned[(i, angle)]

    def box(self, i: int, angle: float) -> tuple[float, float, float, float]:
        return self.turned(i, angle).bounds

    def pieces(self, i: int, angle: float, level: int) -> tuple[list[np.ndarray], float]:
        key = (i, angle, level)
        if key not in self._pieces:
            inset, tol = LEVELS[level]
            core = self.turned(i, angle).buffer(-inset, quad_segs=8).simplify(tol)
            # simplifying moves the outline by at most tol; the chords of the shrunk outline's arcs
            # cost well under 5 % of the inset
            self._pieces[key] = ([] if core.is_empty else _triangles(core), 0.95 * (inset - tol))
        return self._pieces[key]


def _triangles(region) -> list[np.ndarray]:
    """Convex pieces covering ``region`` exactly: the triangles of a constrained triangulation,
    merged across shared edges while the union stays convex (fewer pieces, fewer sums). Each
    piece is a (k, 2) array of its corners, counter-clockwise."""
    tris = shapely.get_parts(shapely.constrained_delaunay_triangles(region))
    tris = tris[~shapely.is_empty(tris)]
    if not len(tris):
        return []
    coords = shapely.get_coordinates(shapely.get_exterior_ring(tris)).reshape(len(tris), 4, 2)[:, :3, :]
    pieces: list[list[tuple[float, float]]] = []
    for t in coords:
        pts = [(float(x), float(y)) for x, y in t]
        if _cross(pts[0], pts[1], pts[2]) < 0:
            pts.reverse()
        pieces.append(pts)
    return [np.asarray(pts) for pts in merge_convex(pieces, 1e-12)]


def _cross(a, b, c) -> float:
    return (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0])


def _exclusive(inner: _Inner, a: int, b: int, hole_w: float, hole_h: float) -> bool:
    """Whether parts ``a`` and ``b`` (grown) cannot both lie in a ``hole_w`` x ``hole_h`` box
    at any of their allowed angles: proven when, for every pair of angles at which both fit,
    every offset of b from a that keeps both in the box lies inside the no-fit polygon of
    inner approximations (a subset of the true one, at least the sum of their margins inside
    it), at one of the LEVELS. One pair of angles where that is not proven, and they may
    share the window."""
    seen: set[tuple[float, float]] = set()
    for ra in inner.angles[a]:
        for rb in inner.angles[b]:
            # both turned half a turn: the same question (the box is symmetric)
            if ((ra + 180.0) % 360.0, (rb + 180.0) % 360.0) in seen:
                continue
            seen.add((ra % 360.0, rb % 360.0))
            ax0, ay0, ax1, ay1 = inner.box(a, ra)
            bx0, by0, bx1, by1 = inner.box(b, rb)
            aw, ah, bw, bh = ax1 - ax0, ay1 - ay0, bx1 - bx0, by1 - by0
            if aw > hole_w + FIT_TOL_MM or ah > hole_h + FIT_TOL_MM or bw > hole_w + FIT_TOL_MM \
                    or bh > hole_h + FIT_TOL_MM:
                continue  # one of them does not fit at these angles
            if aw + bw <= hole_w + FIT_TOL_MM or ah + bh <= hole_h + FIT_TOL_MM:
                return False  # side by side: their boxes apart
            # a at p, b at q inside the box [0, hole_w] x [0, hole_h]: p in [-ax0, hole_w - ax1] (and y);
            # they overlap when q - p lies inside a (+) (-b), the no-fit polygon
            d = (-bx0 - (hole_w - ax1), -by0 - (hole_h - ay1), hole_w - bx1 + ax0, hole_h - by1 + ay0)
            if not any(_covered(inner.pieces(a, ra, k), inner.pieces(b, rb, k), d) for k in range(len(LEVELS))):
                return False
    return True


def _covered(a, b, d: tuple[float, float, float, float]) -> bool:
    """Whether every offset in the box ``d`` lies inside the no-fit polygon of the
    approximations ``a`` and ``b`` ((convex pieces, margin) of :meth:`_Inner.pieces`), the union
    of the convex hulls of the sums of their pieces, with room to spare for the margins."""
    ta, ma = a
    tb, mb = b
    if not len(ta) or not len(tb) or ma + mb <= 0.0:
        return False
    grow = (ma + mb) / 4
    dx0, dy0, dx1, dy1 = d[0] - grow, d[1] - grow, d[2] + grow, d[3] + grow
    # the sum of two convex pieces is the hull of their corners' sums; pieces padded to a common
    # corner count by repeating a corner (the hull is the same)
    pa = _padded(ta)
    pb = _padded(tb)
    sums = (pa[:, None, :, None, :] - pb[None, :, None, :, :]).reshape(len(ta) * len(tb), -1, 2)
    lo, hi = sums.min(axis=1), sums.max(axis=1)
    near = (hi[:, 0] >= dx0) & (lo[:, 0] <= dx1) & (hi[:, 1] >= dy0) & (lo[:, 1] <= dy1)
    if not near.any():
        return False
    hulls = shapely.convex_hull(shapely.multipoints(sums[near]))
    offsets = box(dx0, dy0, dx1, dy1)
    if shapely.contains(hulls, offsets).any():
        return True
    # a free offset would leave a square of side (ma + mb) / 2 about it uncovered: the union
    # lies at least ma + mb inside the true no-fit polygon
    room = ((ma + mb) / 2) ** 2 / 4
    hulls = hulls[np.argsort(-shapely.area(hulls), kind="stable")]
    left: BaseGeometry = offsets
    for start in range(0, len(hulls), HULL_BATCH):
        left = shapely.difference(left, shapely.union_all(hulls[start:start + HULL_BATCH]))
        if left.area <= room:
            return True
    return False


def _padded(pieces: list[np.ndarray]) -> np.ndarray:
    k = max(len(p) for p in pieces)
    return np.stack([np.vstack([p, np.repeat(p[-1:], k - len(p), axis=0)]) for p in pieces])


def _window_fill(items, grown: Sequence[Polygon], windows, filled: Sequence[float]) -> float:
    """The most filled outline area that the windows (``windows``: (part index, hole polygon,
    hole width, hole height, the parts whose grown box fits the hole's)) can hold, from above
    (module doc)."""
    angles = [tuple(it.rotations_deg) for it in items]
    inner = _Inner(grown, angles)
    quarter = [all((a + 90.0) % 360.0 in {x % 360.0 for x in angles[j]} for a in angles[j]) for j in range(len(items))]
    shape_key = [(grown[j].wkb, tuple(a % 360.0 for a in angles[j])) for j in range(len(items))]

    def exclusive(j: int, k: int, ww: float, wh: float) -> bool:
        # a box turned a quarter is the same question when both parts may turn by quarters; the
        # answer depends on the shapes only, so it is kept for the next run of the same parts
        dims = (round(ww, 6), round(wh, 6))
        j, k = sorted((j, k), key=lambda x: shape_key[x])
        key = (shape_key[j], shape_key[k], tuple(sorted(dims)) if quarter[j] and quarter[k] else dims)
        if key not in _EXCLUSIVE:
            if len(_EXCLUSIVE) >= EXCLUSIVE_KEPT:
                _EXCLUSIVE.clear()
            _EXCLUSIVE[key] = _exclusive(inner, j, k, ww, wh)
        return _EXCLUSIVE[key]

    # per window: the largest parts first, kept while each excludes itself and those kept
    alone_in: list[set[int]] = []
    for _i, _hole, ww, wh, cands in windows:
        kept: list[int] = []
        for j in sorted(cands, key=lambda j: (-filled[j], j)):
            if items[j].qty > 1 and not exclusive(j, j, ww, wh):
                continue  # two of its copies may share the window
            if all(exclusive(j, k, ww, wh) for k in kept):
                kept.append(j)
        alone_in.append(set(kept))
    in_any = {j for *_w, cands in windows for j in cands}
    # alone: in the kept set of every window it fits (so every window holds at most one of them)
    alone = {j for j in in_any if all(j in kept for kept, (*_w, cands) in zip(alone_in, windows) if j in cands)}
    free = sum(filled[j] * items[j].qty for j in in_any - alone)
    # each copy of a window: at most one alone part, at most the largest that fits it
    slots = []
    for i, hole, _ww, _wh, cands in windows:
        best = max((filled[j] for j in cands if j in alone), default=0.0)
        slots += [min(best, hole.area)] * items[i].qty
    copies = sorted((filled[j] for j in alone for _ in range(items[j].qty)), reverse=True)
    slots = [s for s in slots if s > 0.0]
    by_slots = sum(slots)
    by_copies = sum(copies[:len(slots)])
    return free + min(by_slots, by_copies)


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
    grown_sizes = [[(bw + s, bh + s, rect) for bw, bh, rect in sz] for sz in sizes]

    claims, filled, windows, window_area = [], [], [], 0.0
    for i, (it, g) in enumerate(zip(items, grown)):
        claim = g.area
        for ring in g.interiors:
            x0, y0, x1, y1 = ring.bounds
            hole = Polygon(ring)
            fit = [j for j, sz in enumerate(grown_sizes)
                   if any(bw <= x1 - x0 + FIT_TOL_MM and bh <= y1 - y0 + FIT_TOL_MM for bw, bh, _ in sz)]
            if fit:
                windows.append((i, hole, x1 - x0, y1 - y0, fit))
                window_area += hole.area * it.qty
            else:
                claim += hole.area
        claims.append(claim)
        filled.append(Polygon(g.exterior).area)
    total = sum(c * it.qty for c, it in zip(claims, items))
    held = _window_fill(items, grown, windows, filled) if windows else 0.0
    empty_windows = max(0.0, window_area - held)
    by_area = math.ceil((total + empty_windows) / area - 1e-9)
    big_claims = sum(it.qty for c, it in zip(claims, items) if c > area / 2)
    big_rects = sum(it.qty for sz, it in zip(sizes, items)
                    if all(rect and bw > (uw - s) / 2 and bh > (uh - s) / 2 for bw, bh, rect in sz))
    return max(1, by_area, big_claims, big_rects)


def bound_and_proofs(items, sheet_mm: tuple[float, float], margin_mm: float,
                     spacing_mm: float) -> tuple[int, dict[tuple, bool]]:
    """:func:`lower_bound_sheets`, and the exclusion proofs it made that were not kept before (for
    a caller in another process to keep: :func:`keep_proofs`)."""
    before = set(_EXCLUSIVE)
    value = lower_bound_sheets(items, sheet_mm, margin_mm, spacing_mm)
    return value, {k: v for k, v in _EXCLUSIVE.items() if k not in before}


def keep_proofs(proofs: dict[tuple, bool]) -> None:
    """Keep exclusion proofs made in another process (see :func:`bound_and_proofs`)."""
    for key, value in proofs.items():
        if len(_EXCLUSIVE) >= EXCLUSIVE_KEPT:
            _EXCLUSIVE.clear()
        _EXCLUSIVE[key] = value
