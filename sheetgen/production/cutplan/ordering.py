"""Cut planning: the cut order and start points (inside first, short travel), and :func:`plan_sheet`."""

from __future__ import annotations

import heapq
import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from sheetgen.production.cutplan.containment import contour_polygon, enclosure_pairs
from sheetgen.production.cutplan.leadins import _add_lead_ins
from sheetgen.production.cutplan.settings import (
    CIRCLE_CANDIDATES,
    CIRCLE_FINE,
    HOME_MM,
    MAX_RING_CANDIDATES,
    MAX_ROUNDS,
    MAX_SWEEPS,
    MIN_GAIN_MM,
    OR_OPT_MAX_LEN,
    ROUND_DIGITS,
    CutPlan,
    LaserSettings,
    _circle_point,
    _planned,
    _round_pt,
    path_travel_mm,
)
from sheetgen.errors import SheetgenError
from sheetgen.geometry.contour import Contour


@dataclass(frozen=True)
class _Problem:
    n: int
    rings: tuple[np.ndarray | None, ...]  # vertices (k, 2) of each ring, None for circles
    circles: tuple[tuple[float, float, float] | None, ...]
    before_a: np.ndarray  # edge e: contour before_a[e] must be cut before before_b[e]
    before_b: np.ndarray


def _validate(contours: Sequence[Contour]) -> None:
    for i, c in enumerate(contours):
        if not isinstance(c, Contour):
            raise SheetgenError(f"contour {i}: must be a sheetgen.io.dxf.Contour, not {type(c).__name__}")
        if c.circle is not None:
            cx, cy, r = c.circle
            if not all(math.isfinite(v) for v in (cx, cy, r)) or r <= 0:
                raise SheetgenError(f"contour {i}: circle {c.circle} must have a finite radius above 0 mm")
        else:
            if len(c.points) < 3:
                raise SheetgenError(f"contour {i}: a ring needs at least 3 points, it has {len(c.points)}")
            if not all(math.isfinite(v) for p in c.points for v in p):
                raise SheetgenError(f"contour {i}: ring points must be finite numbers")


def _first_point(c: Contour) -> tuple[float, float]:
    if c.circle is not None:
        cx, cy, r = c.circle
        return (cx + r, cy)
    return c.points[0]


def _stable_topological(order: Sequence[int], problem: _Problem) -> list[int]:
    """``order`` changed as little as possible so that it is inside-first:
    among contours that may be cut next, the one earliest in ``order``."""
    rank = {c: k for k, c in enumerate(order)}
    indeg = np.zeros(problem.n, dtype=int)
    succ: list[list[int]] = [[] for _ in range(problem.n)]
    for a, b in zip(problem.before_a.tolist(), problem.before_b.tolist()):
        indeg[b] += 1
        succ[a].append(b)
    heap = [(rank[c], c) for c in range(problem.n) if indeg[c] == 0]
    heapq.heapify(heap)
    out = []
    while heap:
        _, c = heapq.heappop(heap)
        out.append(c)
        for b in succ[c]:
            indeg[b] -= 1
            if indeg[b] == 0:
                heapq.heappush(heap, (rank[b], b))
    return out


def _nearest_neighbour(problem: _Problem) -> tuple[list[int], np.ndarray]:
    """Greedy order from home: the nearest contour that may be cut next, entered
    at its nearest vertex (or nearest circle point)."""
    n = problem.n
    rings = [(i, ring) for i, ring in enumerate(problem.rings) if ring is not None]
    ring_ids = [i for i, _ in rings]
    circ_ids = [i for i in range(n) if problem.circles[i] is not None]
    if ring_ids:
        verts = np.concatenate([ring for _, ring in rings])
        sizes = np.array([len(ring) for _, ring in rings])
        offsets = np.concatenate([[0], np.cumsum(sizes)[:-1]])
    circ = np.array([problem.circles[i] for i in circ_ids], dtype=float).reshape(-1, 3)
    ring_ids_a = np.array(ring_ids, dtype=int)
    circ_ids_a = np.array(circ_ids, dtype=int)

    indeg = np.zeros(n, dtype=int)
    succ: list[list[int]] = [[] for _ in range(n)]
    for a, b in zip(problem.before_a.tolist(), problem.before_b.tolist()):
        indeg[b] += 1
        succ[a].append(b)
    done = np.zeros(n, dtype=bool)
    here = np.array(HOME_MM, dtype=float)
    order: list[int] = []
    pts = np.zeros((n, 2))
    for _ in range(n):
        dist = np.full(n, np.inf)
        if ring_ids:
            d = np.hypot(verts[:, 0] - here[0], verts[:, 1] - here[1])
            dist[ring_ids_a] = np.minimum.reduceat(d, offsets)
        if circ_ids:
            dc = np.abs(np.hypot(circ[:, 0] - here[0], circ[:, 1] - here[1]) - circ[:, 2])
            dist[circ_ids_a] = dc
        dist[done | (indeg > 0)] = np.inf
        c = int(np.argmin(dist))
        v = problem.rings[c]
        if v is not None:
            k = int(np.argmin(np.hypot(v[:, 0] - here[0], v[:, 1] - here[1])))
            p = v[k]
        else:
            p = _circle_nearest(problem.circles[c], here)
        order.append(c)
        pts[c] = p
        done[c] = True
        for b in succ[c]:
            indeg[b] -= 1
        here = np.asarray(p, dtype=float)
    return order, pts




def _circle_nearest(circle, p) -> np.ndarray:
    cx, cy, r = circle
    dx, dy = p[0] - cx, p[1] - cy
    if math.hypot(dx, dy) < 1e-12:
        return _circle_point(circle, 0.0)
    return _circle_point(circle, math.atan2(dy, dx))


def _path_points(order: Sequence[int], pts: np.ndarray) -> np.ndarray:
    return np.vstack([np.asarray(HOME_MM, dtype=float)[None, :], pts[list(order)]])


def _path_length(P: np.ndarray) -> float:
    return float(np.sum(np.hypot(*(P[1:] - P[:-1]).T))) if len(P) > 1 else 0.0


class _Order:
    """A sequence of contours with fixed start points, improved in place under
    the inside-first rule. Positions are 1..n; position 0 is home."""

    def __init__(self, order: list[int], pts: np.ndarray, problem: _Problem):
        self.order = list(order)
        self.pts = pts
        self.problem = problem
        self.n = len(order)
        self.active = np.ones(problem.n, dtype=bool)  # Or-opt's "look again" marks

    def _limits(self):
        """m[p]: earliest position of a contour that must follow the one at p
        (n+1 if none); M[p]: latest position of one that must precede it (0)."""
        n = self.n
        pos = np.empty(n, dtype=int)
        pos[np.array(self.order, dtype=int)] = np.arange(1, n + 1)
        m_c = np.full(n, n + 1, dtype=int)
        M_c = np.zeros(n, dtype=int)
        a, b = self.problem.before_a, self.problem.before_b
        if len(a):
            np.minimum.at(m_c, a, pos[b])
            np.maximum.at(M_c, b, pos[a])
        idx = np.array(self.order, dtype=int)
        m = np.concatenate([[0], m_c[idx]])
        M = np.concatenate([[0], M_c[idx]])
        return m, M

    def _touch(self, *positions: int) -> None:
        """Mark the contours at these positions for another look by Or-opt."""
        for p in positions:
            if 1 <= p <= self.n:
                self.active[self.order[p - 1]] = True

    def two_opt(self) -> bool:
        """One sweep of 2-opt: for each position i the best reversal of i..j."""
        n = self.n
        improved = False
        if n < 2:
            return False
        P = _path_points(self.order, self.pts)
        m, _ = self._limits()
        for i in range(1, n):
            js = np.arange(i + 1, n + 1)
            run_min = np.minimum.accumulate(m[i:n + 1])  # min of m[i..j] at index j - i
            valid = run_min[1:] > js
            if not valid.any():
                continue
            a = P[i - 1]
            old = np.hypot(*(P[i] - a)) + np.zeros(len(js))
            new = np.hypot(*(P[js] - a).T)
            inner = js < n
            nxt = P[np.minimum(js + 1, n)]
            old = old + np.where(inner, np.hypot(*(P[js] - nxt).T), 0.0)
            new = new + np.where(inner, np.hypot(*(P[i] - nxt).T), 0.0)
            delta = np.where(valid, new - old, np.inf)
            k = int(np.argmin(delta))
            if delta[k] < -MIN_GAIN_MM:
                j = int(js[k])
                self.order[i - 1:j] = self.order[i - 1:j][::-1]
                P = _path_points(self.order, self.pts)
                m, _ = self._limits()
                self._touch(i - 1, i, j, j + 1)
                improved = True
        return improved

    def or_opt(self) -> bool:
        """One sweep of Or-opt over the marked contours: move the stretch of
        1 to 3 contours starting there, reversed or not, to its best place."""
        n = self.n
        improved = False
        if n < 2:
            return False
        P = _path_points(self.order, self.pts)
        edge = np.append(np.hypot(*(P[1:] - P[:-1]).T), 0.0)  # edge[k]: P[k] -> P[k+1]
        m, M = self._limits()
        positions = np.arange(0, n + 1)
        i = 1
        while i <= n:
            c = self.order[i - 1]
            if not self.active[c]:
                i += 1
                continue
            self.active[c] = False
            best = (np.inf, -1, False, 0)
            for L in range(1, OR_OPT_MAX_LEN + 1):
                e = i + L - 1
                if e > n:
                    break
                a = P[i - 1]
                s0, s1 = P[i], P[e]
                remove_gain = edge[i - 1] + (edge[e] - math.dist(a, P[e + 1]) if e < n else 0.0)
                seg_min_after = int(m[i:e + 1].min())
                seg_max_before = int(M[i:e + 1].max())
                reversible = L > 1 and seg_min_after > e  # no inside-first pair within the segment
                # insert between positions k and k+1: backward k + 1 <= i - 1 (never
                # ahead of a contour that must precede it), forward k >= e + 1 (never
                # past one that must follow it); k == n appends at the end
                ks = positions[((positions <= i - 2) & (positions >= seg_max_before))
                               | ((positions >= e + 1) & (positions < seg_min_after))]
                if not len(ks):
                    continue
                pk = P[ks]
                has_next = ks < n
                pn = P[np.minimum(ks + 1, n)]
                for rev in ((False, True) if reversible else (False,)):
                    first, last = (s1, s0) if rev else (s0, s1)
                    cost = np.hypot(*(pk - first).T) + np.where(has_next, np.hypot(*(pn - last).T), 0.0) - edge[ks]
                    delta = cost - remove_gain
                    k = int(np.argmin(delta))
                    if delta[k] < best[0]:
                        best = (float(delta[k]), int(ks[k]), rev, L)
            if best[0] < -MIN_GAIN_MM:
                _, k, rev, L = best
                e = i + L - 1
                seg = self.order[i - 1:e]
                if rev:
                    seg = seg[::-1]
                # the contours whose neighbours change: look at them again
                for p in (i - 1, e + 1, k, k + 1):
                    if 1 <= p <= n:
                        self.active[self.order[p - 1]] = True
                for q in seg:
                    self.active[q] = True
                rest = self.order[:i - 1] + self.order[e:]
                insert_at = k if k < i else k - L  # after the contour at old position k
                self.order = rest[:insert_at] + seg + rest[insert_at:]
                P = _path_points(self.order, self.pts)
                edge = np.append(np.hypot(*(P[1:] - P[:-1]).T), 0.0)
                m, M = self._limits()
                improved = True
            i += 1
        return improved

    def improve(self) -> None:
        for _ in range(MAX_SWEEPS):
            a = self.two_opt()
            b = self.or_opt()
            if not (a or b):
                break


def _candidates(problem: _Problem, c: int, current: np.ndarray) -> np.ndarray:
    ring = problem.rings[c]
    if ring is not None:
        if len(ring) <= MAX_RING_CANDIDATES:
            return ring
        # a long ring (a gear, a polygonised arc): every k-th vertex and the current start
        step = -(-len(ring) // MAX_RING_CANDIDATES)
        return np.vstack([current[None, :], ring[::step]])
    circle = problem.circles[c]
    assert circle is not None  # a contour that is not a ring is a circle
    ang = np.arange(CIRCLE_CANDIDATES) * (2 * math.pi / CIRCLE_CANDIDATES)
    cx, cy, r = circle
    pts = np.round(np.column_stack([cx + r * np.cos(ang), cy + r * np.sin(ang)]), ROUND_DIGITS) + 0.0
    return np.vstack([current[None, :], pts])


def _best_starts(order: list[int], pts: np.ndarray, problem: _Problem) -> np.ndarray:
    """Start points minimising travel for a fixed order: dynamic programming
    over each contour's candidates (its current point among them, so the result
    is never worse), then circle starts refined on the continuous circle."""
    if not order:
        return pts
    cands = [_candidates(problem, c, pts[c]) for c in order]
    home = np.asarray(HOME_MM, dtype=float)
    cost = np.hypot(*(cands[0] - home).T)
    back = []
    for k in range(1, len(order)):
        prev, cur = cands[k - 1], cands[k]
        d = np.hypot(cur[None, :, 0] - prev[:, None, 0], cur[None, :, 1] - prev[:, None, 1])
        total = cost[:, None] + d
        arg = np.argmin(total, axis=0)
        back.append(arg)
        cost = total[arg, np.arange(len(cur))]
    k_best = int(np.argmin(cost))
    choice = [0] * len(order)
    choice[-1] = k_best
    for k in range(len(order) - 1, 0, -1):
        choice[k - 1] = int(back[k - 1][choice[k]])
    new = pts.copy()
    for k, c in enumerate(order):
        new[c] = cands[k][choice[k]]
    _refine_circles(order, new, problem)
    return new


def _refine_circles(order: list[int], pts: np.ndarray, problem: _Problem) -> None:
    home = np.asarray(HOME_MM, dtype=float)
    fine = np.arange(CIRCLE_FINE) * (2 * math.pi / CIRCLE_FINE)
    for _ in range(2):
        for k, c in enumerate(order):
            circle = problem.circles[c]
            if circle is None:
                continue
            a = pts[order[k - 1]] if k > 0 else home
            b = pts[order[k + 1]] if k + 1 < len(order) else None
            cx, cy, r = circle

            if b is None:
                p = _circle_nearest(circle, a)
                theta = math.atan2(p[1] - cy, p[0] - cx)
            else:
                ax, ay, bx, by = float(a[0]), float(a[1]), float(b[0]), float(b[1])

                def f(t: float) -> float:
                    x, y = cx + r * math.cos(t), cy + r * math.sin(t)
                    return math.hypot(x - ax, y - ay) + math.hypot(x - bx, y - by)

                xs, ys = cx + r * np.cos(fine), cy + r * np.sin(fine)
                vals = np.hypot(xs - ax, ys - ay) + np.hypot(xs - bx, ys - by)
                t0 = float(fine[int(np.argmin(vals))])
                lo, hi = t0 - 2 * math.pi / CIRCLE_FINE, t0 + 2 * math.pi / CIRCLE_FINE
                g = (math.sqrt(5) - 1) / 2
                x1, x2 = hi - g * (hi - lo), lo + g * (hi - lo)
                f1, f2 = f(x1), f(x2)
                for _ in range(30):  # golden-section search in the bracket
                    if f1 <= f2:
                        hi, x2, f2 = x2, x1, f1
                        x1 = hi - g * (hi - lo)
                        f1 = f(x1)
                    else:
                        lo, x1, f1 = x1, x2, f2
                        x2 = lo + g * (hi - lo)
                        f2 = f(x2)
                theta = (lo + hi) / 2
            p = _circle_point(circle, theta)
            cost_p = math.dist(a, p) + (math.dist(p, b) if b is not None else 0.0)
            cost_now = math.dist(a, pts[c]) + (math.dist(pts[c], b) if b is not None else 0.0)
            if cost_p < cost_now - MIN_GAIN_MM:
                pts[c] = p


def _improve(order: list[int], pts: np.ndarray, problem: _Problem) -> tuple[list[int], np.ndarray, float]:
    """Alternate order improvement (start points fixed) and start point choice
    (order fixed) while the travel gets shorter. The result is a 2-opt and
    Or-opt local optimum for its start points."""
    for _ in range(MAX_ROUNDS):
        seq = _Order(order, pts, problem)
        seq.improve()
        order = seq.order
        length = _path_length(_path_points(order, pts))
        new_pts = _best_starts(order, pts, problem)
        if _path_length(_path_points(order, new_pts)) > length - MIN_GAIN_MM:
            break
        pts = new_pts
    return order, pts, _path_length(_path_points(order, pts))






def plan_sheet(contours: Sequence[Contour], settings: LaserSettings,
               sheet_size_mm: tuple[float, float] | None = None) -> CutPlan:
    """Plan the cutting of one sheet.

    ``contours`` are the sheet's cut contours in the nester's order. With
    ``settings.lead_in_mm`` above 0 each contour gets a lead-in where one fits;
    ``sheet_size_mm`` (width, height), when given, keeps lead-ins on the sheet
    (0, 0)-(width, height).
    """
    if not isinstance(settings, LaserSettings):
        raise SheetgenError("plan_sheet: settings must be a LaserSettings")
    contours = list(contours)
    _validate(contours)
    if sheet_size_mm is not None:
        if len(sheet_size_mm) != 2 or not all(isinstance(v, (int, float)) and math.isfinite(v) and v > 0
                                              for v in sheet_size_mm):
            raise SheetgenError(f"sheet size {sheet_size_mm!r}: must be (width, height) in mm, both above 0")
    n = len(contours)
    polygons = [contour_polygon(c) for c in contours]
    pairs = enclosure_pairs(polygons)
    problem = _Problem(
        n=n,
        rings=tuple(None if c.is_circle else np.asarray(c.points, dtype=float) for c in contours),
        circles=tuple(c.circle if c.is_circle else None for c in contours),
        before_a=np.array([inner for _, inner in pairs], dtype=int),
        before_b=np.array([outer for outer, _ in pairs], dtype=int),
    )

    first_pts = np.array([_round_pt(_first_point(c)) for c in contours], dtype=float).reshape(n, 2)
    travel_unplanned = _path_length(_path_points(list(range(n)), first_pts))

    results = []
    if n:
        nn_order, nn_pts = _nearest_neighbour(problem)
        results.append(_improve(nn_order, nn_pts, problem))
        if results[0][2] > travel_unplanned:  # rare: improve the nester's order too
            nest_order = _stable_topological(list(range(n)), problem)
            results.append(_improve(nest_order, first_pts.copy(), problem))
    if results:
        order, pts, _ = min(results, key=lambda r: r[2])
    else:
        order, pts = [], first_pts

    planned = [_planned(contours[c], pts[c]) for c in order]
    lead_count = 0
    if settings.lead_in_mm > 0 and planned:
        depth = np.zeros(n, dtype=int)
        for _, inner in pairs:
            depth[inner] += 1
        planned, lead_count = _add_lead_ins(planned, order, contours, polygons, depth, settings.lead_in_mm,
                                            sheet_size_mm)

    cut_length = sum(c.perimeter_mm + c.lead_in_length_mm for c in planned)
    travel = path_travel_mm(planned)
    cut_time = cut_length / settings.cut_speed_mm_s + travel / settings.rapid_speed_mm_s \
        + len(planned) * settings.pierce_time_s
    cost = None
    if settings.rate_per_h or settings.sheet_price:
        cost = (settings.rate_per_h or 0.0) * cut_time / 3600.0 + (settings.sheet_price or 0.0)
    return CutPlan(
        contours=tuple(planned),
        order=tuple(int(c) for c in order),
        pierces=len(planned),
        cut_length_mm=cut_length,
        travel_mm=travel,
        travel_unplanned_mm=travel_unplanned,
        cut_time_s=cut_time,
        cost=cost,
        lead_ins=lead_count,
    )
