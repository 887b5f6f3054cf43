"""The clearance sweep of the turning frame through the tracking range
(branch and bound on the projection bound; see the package notes)."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import shapely
from shapely import affinity
from shapely.geometry import MultiPoint, Polygon

from sheetgen.kitmodel.contacts import MESHING, STOPS
from sheetgen.model3d.bodies import CLOSEST_PAIRS, Prism, CONTACT_TOL_MM, SHARED_VOLUME_TOL_MM3, _x_gap, _x_overlap, turns_in_place
from sheetgen.model3d.measures import _Measures, distance_bound_mm
from sheetgen.model3d.records import Clearance, Collision, Touch
from sheetgen.model3d.solids import Model



# -- the sweep --------------------------------------------------------------


@dataclass(frozen=True)
class _SweepTables:
    pairs: list[tuple[int, int]]  # (turning body index, fixed body index)
    lb: np.ndarray  # (pairs, angles): lower bound of the 3D distance
    exact: np.ndarray  # (pairs, angles): True where the bound is the distance
    x_gap: np.ndarray  # (pairs,)


SLABS = 12  # a plate not across the axle is seen along x in at most this many slices (a tighter bound)


def x_slabs(prism: Prism, count: int = SLABS) -> list[tuple[Polygon, tuple[float, float]]]:
    """The prism seen along x, slice by slice: for each of ``count`` slabs of its
    x range, a polygon that holds the y-z projection of the prism's points in
    the slab, and the slab. A plate across the axle is one exact slice.

    The points of the plate with x in [s0, s1] have local (u, v) in the strip
    s0 - w_hi <= m00 u + m01 v + t0 <= s1 - w_lo (w the part of x its depth
    adds); the hull of the outline clipped to that strip, on both faces,
    holds their projection. Slabs meet at vertices along x, so that a tab
    standing out of a plate's edge is a slice of its own."""
    x0, x1 = prism.x_range_mm()
    if prism.axial or count <= 1 or x1 - x0 <= 1e-9:
        return [(prism.yz_projection(), (x0, x1))]
    m, t = prism.placement.matrix, np.asarray(prism.placement.translation_mm, dtype=float)
    w_lo, w_hi = sorted((0.0, float(m[0, 2]) * prism.depth_mm))
    # slab edges where the outline's vertices lie along x (a tab, a step), thinned to ``count`` slabs
    xs = np.unique(np.round(prism.corners()[:, 0], 6))
    if len(xs) > count + 1:
        xs = xs[np.unique(np.round(np.linspace(0, len(xs) - 1, count + 1)).astype(int))]
    edges = np.unique(np.concatenate([[x0], xs, [x1]]))
    out = []
    big = 1e6
    for s0, s1 in zip(edges[:-1], edges[1:]):
        lo, hi = s0 - w_hi - t[0], s1 - w_lo - t[0]
        a, b = float(m[0, 0]), float(m[0, 1])
        norm = math.hypot(a, b)
        if norm < 1e-12:  # x comes from the depth alone: every slice sees the whole outline
            return [(prism.yz_projection(), (x0, x1))]
        # the strip lo <= a u + b v <= hi in the local plane, as a long rectangle
        d = np.array([a, b]) / norm
        e = np.array([-d[1], d[0]])
        corners = [d * lo / norm + e * big, d * hi / norm + e * big, d * hi / norm - e * big, d * lo / norm - e * big]
        cut = prism.outline.intersection(Polygon(corners))
        # the areal parts only: a point on a slab's edge is the limit of inner points of
        # the slab on one side, and the closure of that slab's area holds it
        areal = [g for g in getattr(cut, "geoms", [cut]) if isinstance(g, Polygon) and g.area > 0.0]
        if not areal:
            continue
        xy = np.vstack([shapely.get_coordinates(g) for g in areal])
        local = np.vstack([np.column_stack([xy, np.zeros(len(xy))]),
                           np.column_stack([xy, np.full(len(xy), prism.depth_mm)])])
        hull = MultiPoint(prism.placement.apply(local)[:, 1:]).convex_hull
        if not isinstance(hull, Polygon):
            hull = hull.buffer(1e-9)
        out.append((hull, (float(s0), float(s1))))
    return out or [(prism.yz_projection(), (x0, x1))]


def _sweep_tables(bodies, turning, fixed, angles, meshing) -> _SweepTables:
    pairs = [(i, j) for i in turning for j in fixed if (bodies[i].source, bodies[j].source) not in meshing]
    t_pieces = [(i, k, p) for i in turning for k, p in enumerate(bodies[i].pieces)]
    t_index = {(i, k): n for n, (i, k, _) in enumerate(t_pieces)}
    t_proj = [p.yz_projection() for _, _, p in t_pieces]
    t_range = [p.x_range_mm() for _, _, p in t_pieces]
    entries = []  # (pair number, turning piece number, fixed projection, x gap, exact)
    fixed_cache = {}
    for n, (i, j) in enumerate(pairs):
        for kb, pb in enumerate(bodies[j].pieces):
            if (j, kb) not in fixed_cache:
                fixed_cache[(j, kb)] = x_slabs(pb)
            for proj_b, range_b in fixed_cache[(j, kb)]:
                for ka, pa in enumerate(bodies[i].pieces):
                    tn = t_index[(i, ka)]
                    entries.append((n, tn, proj_b, _x_gap(t_range[tn], range_b), pa.axial and pb.axial))
    lb = np.full((len(pairs), len(angles)), np.inf)
    exact = np.zeros((len(pairs), len(angles)), dtype=bool)
    x_gap = np.array([_x_gap(bodies[i].x_range_mm(), bodies[j].x_range_mm()) for i, j in pairs])
    if not entries:
        return _SweepTables(pairs, lb, exact, x_gap)
    e_pair = np.array([e[0] for e in entries])
    e_turn = np.array([e[1] for e in entries])
    e_fixed = np.array([e[2] for e in entries], dtype=object)
    e_gap = np.array([e[3] for e in entries])
    e_exact = np.array([e[4] for e in entries])
    starts = np.searchsorted(e_pair, np.arange(len(pairs)))  # entries come pair by pair
    for k, ang in enumerate(angles):
        moved = np.array([affinity.rotate(g, float(ang), origin=(0.0, 0.0)) for g in t_proj], dtype=object)
        d = np.hypot(e_gap, shapely.distance(moved[e_turn], e_fixed))
        lb[:, k] = np.minimum.reduceat(d, starts)
        # exact when the least bound of the pair comes from two plates across the axle
        # (any other piece pair is at least its own bound away)
        exact[:, k] = np.logical_or.reduceat(e_exact & (d <= lb[e_pair, k] + 1e-12), starts)
    return _SweepTables(pairs, lb, exact, x_gap)


def _sweep(model: Model, meas: _Measures, angles: np.ndarray):
    bodies = model.bodies
    running = [i for i, b in enumerate(bodies) if turns_in_place(b)]
    turning = [i for i, b in enumerate(bodies) if b.rotating and i not in running]
    fixed = [i for i, b in enumerate(bodies) if not b.rotating]
    tab = _sweep_tables(bodies, turning, fixed, angles, MESHING | STOPS)  # the stops: model3d.stops
    npairs = len(tab.pairs)
    dist = np.full(tab.lb.shape, np.nan)  # exact distances computed so far (0 where colliding)
    volume = np.zeros(tab.lb.shape)

    def name(n: int) -> tuple[str, str]:
        i, j = tab.pairs[n]
        return bodies[i].name, bodies[j].name

    # collisions and contacts: every (pair, angle) whose bound says they may meet
    for n, k in zip(*np.nonzero(tab.lb <= CONTACT_TOL_MM)):
        i, j = tab.pairs[n]
        a = float(angles[k])
        v = meas.shared_volume_mm3(bodies[i], bodies[j], a, 0.0)
        volume[n, k] = v
        dist[n, k] = 0.0 if v > SHARED_VOLUME_TOL_MM3 else meas.distance_mm(bodies[i], bodies[j], a, 0.0)
    collisions, touching = [], []
    order = []
    for n in range(npairs):
        hit = np.nonzero(volume[n] > SHARED_VOLUME_TOL_MM3)[0]
        if len(hit):
            w = hit[int(np.argmax(volume[n, hit]))]
            near = hit[int(np.argmin(np.abs(angles[hit])))]
            collisions.append(Collision(*name(n), float(angles[hit[0]]), float(angles[hit[-1]]), len(hit),
                                        float(angles[near]), float(angles[w]), float(volume[n, w])))
            order.append((-round(float(volume[n, w]), 6), int(w), n))
        rub = np.nonzero((dist[n] <= CONTACT_TOL_MM) & (volume[n] <= SHARED_VOLUME_TOL_MM3))[0]
        if len(rub):
            touching.append(Touch(*name(n), float(angles[rub[0]]), float(angles[rub[-1]]), len(rub)))

    # the worst collision first (ties: the earliest angle of the sweep, then the pair order)
    collisions = [c for _, c in sorted(zip(order, collisions), key=lambda oc: oc[0])]

    def exact_at(n, k) -> float:
        if np.isnan(dist[n, k]):
            if tab.exact[n, k]:
                dist[n, k] = tab.lb[n, k]
            else:
                i, j = tab.pairs[n]
                dist[n, k] = meas.distance_mm(bodies[i], bodies[j], float(angles[k]), 0.0)
        return float(dist[n, k])

    def pair_min(n) -> tuple[float, int]:
        best, best_k = math.inf, 0
        for k in np.lexsort((np.arange(len(angles)), np.round(tab.lb[n], 9))):
            if tab.lb[n, k] >= best - 1e-9:
                break
            d = exact_at(n, k)
            if d < best - 1e-12:
                best, best_k = d, int(k)
        return best, best_k

    def closest(candidates, count):
        found: list[tuple[float, int, int]] = []
        lows = tab.lb.min(axis=1) if npairs else np.array([])
        for n in sorted(candidates, key=lambda n: lows[n]):
            if len(found) >= count and lows[n] > found[count - 1][0] + 1e-9:
                break
            d, k = pair_min(n)
            found.append((d, k, n))
            # ties (a symmetric kit): the earliest angle of the sweep, then the pair order
            found.sort(key=lambda f: (round(f[0], 9), f[1], f[2]))
        return [Clearance(*name(n), d, float(angles[k]), float(tab.x_gap[n]),
                          bool(np.all(tab.exact[n]) and np.ptp(tab.lb[n]) < 1e-9)) for d, k, n in found[:count]]

    top = closest(range(npairs), CLOSEST_PAIRS)
    # the frame over the fixed frame, as frame.clearance means it: part against part,
    # where their x ranges overlap (the same pairs sheetgen.design.kit checks in 2D)
    over = [n for n in range(npairs) if bodies[tab.pairs[n][0]].kind == bodies[tab.pairs[n][1]].kind == "part"
            and _x_overlap(bodies[tab.pairs[n][0]], bodies[tab.pairs[n][1]]) > 1e-9]
    frame = closest(over, 1)
    # parts turning in place: their gap to the fixed parts is the same at every angle (at rest)
    gaps = []
    for i in running:
        best, other = math.inf, ""
        bounds = sorted((distance_bound_mm(bodies[i], bodies[j])[0], j) for j in fixed)
        for bound, j in bounds:  # branch and bound, as in the sweep
            if bound >= best - 1e-9:
                break
            d = meas.distance_mm(bodies[i], bodies[j])
            if d < best:
                best, other = d, bodies[j].name
        x_gap = _x_gap(bodies[i].x_range_mm(), model.body(other).x_range_mm()) if other else math.inf
        gaps.append(Clearance(bodies[i].name, other, best, 0.0, x_gap, True))
    return gaps, top, frame[0] if frame else None, collisions, touching


