"""Cut planning: lead-ins off the part edge on the waste side."""

from __future__ import annotations

import math

import numpy as np

from sheetgen.production.cutplan.settings import (
    CIRCLE_CANDIDATES,
    HOME_MM,
    LEAD_IN_FRACTIONS,
    _circle_point,
    _planned,
    _round_pt,
)


def _ring_lead_direction(points, k: int, poly, waste_outside: bool):
    """Unit direction from vertex k into the waste: along the corner's bisector
    (or the edge normal on a straight run)."""
    from shapely.geometry import Point

    v = np.asarray(points[k], dtype=float)
    a = np.asarray(points[k - 1], dtype=float)
    b = np.asarray(points[(k + 1) % len(points)], dtype=float)
    u1, u2 = a - v, b - v
    l1, l2 = np.hypot(*u1), np.hypot(*u2)
    if l1 < 1e-12 or l2 < 1e-12:
        return None
    w = u1 / l1 + u2 / l2
    if np.hypot(*w) < 1e-9:
        w = np.array([-u2[1], u2[0]])
    w = w / np.hypot(*w)
    probe = 1e-4 * max(l1, l2, 1.0)
    for d in (w, -w):
        inside = poly.contains(Point(*(v + probe * d)))
        if inside != waste_outside:
            return d
    return None


def _lead_in_ok(start, tip, own_index, own_poly, is_circle, waste_outside, tree, boundaries, sheet_size_mm) -> bool:
    from shapely.geometry import LineString, Point

    start_a, tip_a = np.asarray(start), np.asarray(tip)
    if sheet_size_mm is not None:
        w, h = sheet_size_mm
        if not (0 <= start[0] <= w and 0 <= start[1] <= h):
            return False
    if own_poly.contains(Point(*start)) == waste_outside:
        return False
    if not is_circle:  # a radial lead-in cannot cross its own circle
        near_tip = tip_a + (start_a - tip_a) * 1e-3
        seg_open = LineString([tuple(start_a), tuple(near_tip)])
        if seg_open.intersects(boundaries[own_index]):
            return False
    seg = LineString([tuple(start_a), tuple(tip_a)])
    for j in tree.query(seg, predicate="intersects").tolist():
        if j != own_index:
            return False
    return True


def _add_lead_ins(planned, order, contours, polygons, depth, length_mm, sheet_size_mm):
    import shapely

    boundaries = [p.exterior for p in polygons]
    tree = shapely.STRtree(boundaries)
    out = list(planned)
    count = 0
    home = np.asarray(HOME_MM, dtype=float)
    for k, c in enumerate(order):
        pc = out[k]
        poly = polygons[c]
        waste_outside = depth[c] % 2 == 0
        prev_end = np.asarray(out[k - 1].end) if k > 0 else home
        next_pt = np.asarray(out[k + 1].pierce) if k + 1 < len(out) else None

        def score(p):
            s = math.dist(prev_end, p)
            return s + (math.dist(p, next_pt) if next_pt is not None else 0.0)

        options = []  # (tip, unit direction), best first
        if pc.is_circle:
            cx, cy, r = pc.circle
            angles = [math.atan2(pc.start[1] - cy, pc.start[0] - cx)]
            extra = [i * 2 * math.pi / CIRCLE_CANDIDATES for i in range(CIRCLE_CANDIDATES)]
            extra.sort(key=lambda t: score(_circle_point(pc.circle, t)))
            for t in angles + extra:
                d = np.array([math.cos(t), math.sin(t)])
                options.append((np.array([cx, cy]) + r * d, d if waste_outside else -d))
        else:
            pts = tuple(tuple(p) for p in contours[c].points)
            k0 = pts.index(pc.start)
            rest = sorted((i for i in range(len(pts)) if i != k0), key=lambda i: (score(pts[i]), i))
            for i in [k0] + rest:
                d = _ring_lead_direction(pts, i, poly, waste_outside)
                if d is not None:
                    options.append((np.asarray(pts[i], dtype=float), d))
        found = None
        for frac in LEAD_IN_FRACTIONS:
            ell = length_mm * frac
            if pc.is_circle and not waste_outside:
                ell = min(ell, pc.circle[2] * frac)
            for tip, d in options:
                start = _round_pt(tip + ell * d)
                if math.dist(start, tip) < 1e-6:
                    continue
                if _lead_in_ok(start, tuple(tip), c, poly, pc.is_circle, waste_outside, tree, boundaries,
                               sheet_size_mm):
                    found = (tip, start)
                    break
            if found:
                break
        if found:
            tip, start = found
            out[k] = _planned(contours[c], tip, lead_in=start)
            count += 1
    return out, count
