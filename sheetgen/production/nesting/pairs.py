"""Pairs of parts: two copies of one part locked together as one piece to place.

A part far from its bounding box (a triangle-topped support, an L, a ring with
a notch) wastes the corners of its box when it is packed alone. Two copies,
the second turned (180 degrees, or any other allowed angle), often interlock
into a box much smaller than two boxes: the point of an upturned triangle goes
between the shoulders of the other.

:func:`best_pair` finds, for one angle of the first copy and one of the
second, the place of the second that gives the smallest bounding box of the
two, each box grown by the spacing (the area the two take from a row of boxes),
keeping the spacing between them. The places where the second copy touches
the first, the spacing kept, are the boundary of their no-fit polygon
(:meth:`~sheetgen.production.nesting.place.ShapeLibrary.nfp`, cached, built on
the clearance outlines, so the gap is never short of the spacing by more than
the placement's own rounding). Along each edge of that boundary the pair's
width and height are piecewise linear in the position, so the grown box area
is a piecewise quadratic; its least value on the edge is at an end, at a
breakpoint (where one box's side passes the other's) or at the quadratic's
stationary point. All of them are tried, so the pair found is the best over
the whole boundary (the best place never lies off the boundary: moving the
second copy towards the first, until they touch, never grows the box).

:func:`pair_item` registers the pair with the shape library as one more item
(:meth:`~sheetgen.production.nesting.place.ShapeLibrary.add_composite`), with
one composite shape per angle of the first copy; :func:`expand` turns placed
pairs back into their two parts. A pair is offered only when its grown box is
at most :data:`PAIR_RATIO` of two single grown boxes.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pyclipper
import shapely
from shapely.geometry import Polygon

from sheetgen.errors import GeometryBug
from sheetgen.production.nesting.place import ShapeLibrary

PAIR_RATIO = 0.9      # a pair is worth offering when its grown box is at most this share of two boxes
EDGE_UNITS = 6        # work charged per boundary edge examined
APART_UNITS = 8       # work charged per vertex of a place checked on the real outlines
APART_TOL = 5e-7      # mm per metre of part size: gap a pair may lack (the nester's verify allows 1e-6)


@dataclass(frozen=True)
class Pair:
    """Two shapes of one item at grid offsets from the pair's lower-left corner.

    ``first`` and ``second`` are shape ids; ``(ax, ay)`` and ``(bx, by)`` the
    grid positions (units of ``1 / lib.scale`` mm) of their reference points
    (bounding-box corners) in the pair's frame, whose bounding box starts at
    the origin and is ``width_mm`` x ``height_mm``. ``ratio`` is the pair's
    box grown by the spacing over two single boxes grown by it."""

    first: int
    second: int
    ax: int
    ay: int
    bx: int
    by: int
    width_mm: float
    height_mm: float
    ratio: float


def _grown_area(tx: float, ty: float, wa: float, ha: float, wb: float, hb: float, s: float) -> float:
    w = max(wa, tx + wb) - min(0.0, tx)
    h = max(ha, ty + hb) - min(0.0, ty)
    return (w + s) * (h + s)


def best_pair(lib: ShapeLibrary, first: int, second: int) -> Pair:
    """The place of shape ``second`` next to shape ``first`` (at the origin)
    that gives the smallest grown bounding box of the two (module doc). Ties
    go to the squarer box, then the lower, then the further left position,
    so the result is deterministic."""
    sa, sb = lib.shapes[first], lib.shapes[second]
    sc = lib.scale
    wa, ha, wb, hb = sa.width * sc, sa.height * sc, sb.width * sc, sb.height * sc
    s = lib.spacing * sc
    flat, cuts, _bounds = lib.nfp(first, second)
    xs = flat[:, 0].astype(float)
    ys = flat[:, 1].astype(float)
    found: list[tuple] = []
    edges = 0
    for i0, i1 in cuts:
        n = i1 - i0
        # a hole of the no-fit polygon is where the second copy would sit in a hole of the first,
        # which a copy as large as the first cannot do: only outer rings are followed
        if not pyclipper.Orientation(flat[i0:i1].tolist()):
            continue
        for k in range(n):
            j = i0 + k
            j2 = i0 + (k + 1) % n
            px, py, qx, qy = xs[j], ys[j], xs[j2], ys[j2]
            dx, dy = qx - px, qy - py
            # breakpoints along the edge: where tx or ty crosses 0 or the other box's far side
            us = {0.0, 1.0}
            for c, p0, d in ((0.0, px, dx), (wa - wb, px, dx), (0.0, py, dy), (ha - hb, py, dy)):
                if d != 0.0:
                    u = (c - p0) / d
                    if 0.0 < u < 1.0:
                        us.add(u)
            cuts_u = sorted(us)
            cand = list(cuts_u)
            for u0, u1 in zip(cuts_u, cuts_u[1:]):
                # inside (u0, u1) width and height are linear in u: w = w0 + a u, h = h0 + b u
                um = 0.5 * (u0 + u1)
                tx, ty = px + um * dx, py + um * dy
                a = (dx if tx + wb > wa else 0.0) - (dx if tx < 0.0 else 0.0)
                b = (dy if ty + hb > ha else 0.0) - (dy if ty < 0.0 else 0.0)
                if a * b > 0.0:  # convex: the stationary point may be inside
                    w_m = max(wa, tx + wb) - min(0.0, tx) + s
                    h_m = max(ha, ty + hb) - min(0.0, ty) + s
                    # (w_m + a (u - um)) (h_m + b (u - um)) is least at u - um = -(w_m b + h_m a) / (2 a b)
                    u = um - (w_m * b + h_m * a) / (2.0 * a * b)
                    if u0 < u < u1:
                        cand.append(u)
            for u in cand:
                tx = round(px + u * dx)
                ty = round(py + u * dy)
                area = _grown_area(tx, ty, wa, ha, wb, hb, s)
                w = max(wa, tx + wb) - min(0.0, tx)
                h = max(ha, ty + hb) - min(0.0, ty)
                found.append((round(area / (sc * sc), 6), round(abs(w - h) / sc, 6), ty, tx))
            edges += 1
    if lib.work is not None:
        lib.work.add(EDGE_UNITS * edges)
    tx = ty = None
    for _area, _sq, cy, cx in sorted(set(found)):
        if _apart(lib, first, second, cx, cy):
            tx, ty = cx, cy
            break
    if tx is None or ty is None:  # cannot happen: the far end of the boundary is always clear; kept safe
        raise GeometryBug(f"shapes {first} and {second}: no place on their no-fit polygon keeps them apart")
    ax, ay = -min(0, tx), -min(0, ty)
    bx, by = ax + tx, ay + ty
    width = max(ax / sc + sa.width, bx / sc + sb.width)
    height = max(ay / sc + sa.height, by / sc + sb.height)
    single = (sa.width + lib.spacing) * (sa.height + lib.spacing) + (sb.width + lib.spacing) * (sb.height + lib.spacing)
    ratio = (width + lib.spacing) * (height + lib.spacing) / single
    return Pair(first, second, int(ax), int(ay), int(bx), int(by), width, height, ratio)


def _grown_outer(lib: ShapeLibrary, item: int) -> float:
    """Area of the item's outer outline grown by half the spacing (drawn
    inside the true offset, so never overstated)."""
    s = lib.spacing
    outer = Polygon(lib.shapes[lib.item_shapes[item][0]].polygon.exterior)
    return outer.buffer(s / 2, quad_segs=8).area if s > 0 else outer.area


def saving_bound(lib: ShapeLibrary, item: int) -> float:
    """At most the box area (grown by the spacing) a pair of ``item`` saves
    against two single boxes: the pair's grown box holds the two grown outer
    outlines (see :func:`may_pair`), so it is at least twice their area."""
    s = lib.spacing
    sh = lib.shapes[lib.item_shapes[item][0]]
    return max(0.0, 2 * (sh.width + s) * (sh.height + s) - 2 * _grown_outer(lib, item))


def may_pair(lib: ShapeLibrary, item: int) -> bool:
    """Whether a pair of ``item`` can reach PAIR_RATIO at all. The second
    copy cannot enter a hole of the first (it is as large as the first's
    outer outline, which is larger than any of its holes), and the two outer
    outlines grown by half the spacing are disjoint and lie in the pair's box
    grown by half the spacing on every side: that grown box is at least twice
    the grown outer outline's area (the buffer is drawn inside the true
    offset, so its area is never overstated). A part that fills its grown
    box more than PAIR_RATIO that way (a rectangle, a frame) is not worth the
    no-fit polygons."""
    s = lib.spacing
    sh = lib.shapes[lib.item_shapes[item][0]]
    return _grown_outer(lib, item) <= PAIR_RATIO * (sh.width + s) * (sh.height + s)


def _apart(lib: ShapeLibrary, first: int, second: int, tx: int, ty: int) -> bool:
    """Whether the real outlines of ``first`` at the origin and ``second`` at
    grid position (tx, ty) are the spacing apart (within the nester's
    tolerance), measured on the outlines themselves: a no-fit polygon drawn
    from a sum of edge sweeps may keep a crack of no width where the sweeps
    of two parallel edges only touch, and a place on such a crack would put
    the two copies one on the other."""
    a = lib.shapes[first].polygon
    if lib.work is not None:
        lib.work.add(APART_UNITS * int(shapely.get_num_coordinates(a)))
    b = shapely.transform(lib.shapes[second].polygon, _shift(np.array([tx, ty], dtype=float) / lib.scale))
    size = max(1000.0, lib.shapes[first].width, lib.shapes[first].height)
    tol = APART_TOL * size / 1000.0
    if lib.spacing > 0:
        return float(shapely.distance(a, b)) >= lib.spacing - tol
    return float(shapely.intersection(a, b).area) <= tol * (a.length + b.length)


def _shift(d: np.ndarray):
    def move(xy: np.ndarray) -> np.ndarray:
        return xy + d
    return move


def item_pairs(lib: ShapeLibrary, item: int) -> list[Pair]:
    """For each angle of the first copy, the best pair over the angles of the
    second (:func:`best_pair`), kept when its ratio is at most PAIR_RATIO."""
    out: list[Pair] = []
    if not may_pair(lib, item):
        return out
    for a in lib.item_shapes[item]:
        best: Pair | None = None
        for b in lib.item_shapes[item]:
            p = best_pair(lib, a, b)
            if best is None or (round(p.ratio, 9), b) < (round(best.ratio, 9), best.second):
                best = p
        if best is not None and best.ratio <= PAIR_RATIO:
            out.append(best)
    return out


def pair_item(lib: ShapeLibrary, item: int) -> int | None:
    """The item index of ``item``'s pair in ``lib`` (registered the first time
    it is asked for, then cached), or None when no pair is worth offering."""
    cache = lib.pair_items
    if item in cache:
        return cache[item]
    pairs = item_pairs(lib, item)
    got = None
    if pairs:
        sids = []
        for p in pairs:
            sid = lib.add_composite(item, ((p.first, p.ax, p.ay), (p.second, p.bx, p.by)))
            if sid is not None and sid not in sids:
                sids.append(sid)
        if sids:
            got = lib.add_item(tuple(sids))
    cache[item] = got
    return got


def paired_parts(lib: ShapeLibrary, items: list[int], min_qty: int = 2) -> list[int]:
    """``items`` (part copies as item indexes) with copies of a pairable item
    taken two at a time as its pair item; an odd copy stays single. The order
    is that of the first copy of each item, pairs before the odd copy."""
    qty: dict[int, int] = {}
    for i in items:
        qty[i] = qty.get(i, 0) + 1
    out: list[int] = []
    done: set[int] = set()
    for i in items:
        if i in done:
            continue
        done.add(i)
        q = qty[i]
        pi = pair_item(lib, i) if q >= min_qty else None
        if pi is None:
            out.extend([i] * q)
        else:
            out.extend([pi] * (q // 2))
            out.extend([i] * (q % 2))
    return out


def expand(lib: ShapeLibrary, sheet: list) -> list:
    """Sheet parts ``(item, shape id, px, py)`` with every placed pair replaced
    by its two parts, in place order."""
    out = []
    for item, sid, px, py in sheet:
        comp = lib.composites.get(sid)
        if comp is None:
            out.append((item, sid, px, py))
            continue
        real, parts = comp
        for csid, dx, dy in parts:
            out.append((real, csid, px + dx, py + dy))
    return out

