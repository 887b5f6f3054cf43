"""The gear outline as a polygon.

Tooth thinning (backlash) and the kerf offset are both handled *in the rack*:
thinning thickens the rack tooth; an outward normal offset ``d`` of the gear
outline is exactly the outline cut by the rack offset inward by ``d`` (flanks
moved ``d`` along their normal, tip line moved ``d``, fillet radius ``rho - d``
about the same centre). Its flanks are involutes of the same base circle whose
base-circle arc thickness grows by ``d`` per flank, so the tooth thickness at
the pitch circle grows by exactly ``2 d / cos(alpha)``; tip and root radii grow
by ``d``; the tip corners stay sharp.
"""

from __future__ import annotations

import math

import numpy as np
from sheetgen.drive.involute.tooth import ToothForm


# Default chord tolerance. Vertices sit on the true curve, chords within this
# distance of it. 0.0025 mm keeps the tooth thickness measured across two
# flanks within 0.01 mm at every radius (error <= 2 tol / cos(alpha_r)).
DEFAULT_CHORD_TOL_MM = 0.0025


# --------------------------------------------------------------------------
# polygonisation
# --------------------------------------------------------------------------

def _chord_deviation(pts: np.ndarray, i: int, j: int) -> float:
    """Largest distance of pts[i+1:j] from the segment pts[i] -> pts[j]."""
    if j <= i + 1:
        return 0.0
    a, b = pts[i], pts[j]
    q = pts[i + 1:j] - a
    ab = b - a
    L2 = float(ab @ ab)
    if L2 == 0.0:
        return float(np.max(np.hypot(q[:, 0], q[:, 1])))
    t = np.clip((q @ ab) / L2, 0.0, 1.0)
    e = q - np.outer(t, ab)
    return float(np.max(np.hypot(e[:, 0], e[:, 1])))


def _greedy_vertices(pts: np.ndarray, tol: float) -> np.ndarray:
    """Fewest dense points (endpoints kept) whose chords stay within tol of all
    skipped points: from each kept point, the farthest next point that passes."""
    n = len(pts)
    keep = [0]
    i = 0
    while i < n - 1:
        step = 1
        good = i + 1
        while True:                                  # gallop
            j = min(i + 2 * step, n - 1)
            if _chord_deviation(pts, i, j) <= tol:
                good = j
                if j == n - 1:
                    break
                step *= 2
            else:
                bad = j
                break
        if good < n - 1 or _chord_deviation(pts, i, n - 1) > tol:
            if good != n - 1:
                lo, hi = good, bad                   # binary search between good and bad
                while hi - lo > 1:
                    mid = (lo + hi) // 2
                    if _chord_deviation(pts, i, mid) <= tol:
                        lo = mid
                    else:
                        hi = mid
                good = lo
        keep.append(good)
        i = good
    return pts[keep]


def sample_curve(func, t0: float, t1: float, tol: float) -> np.ndarray:
    """Points on the curve func(t) (array in, (N, 2) out) from t0 to t1, both
    ends included, every chord within tol of the curve."""
    if t0 == t1:
        return func(np.array([t0]))
    n = 256
    dense_tol = tol / 25.0
    for _ in range(12):
        t = np.linspace(t0, t1, n + 1)
        pts = func(t)
        mid = func(0.5 * (t[:-1] + t[1:]))
        chord_mid = 0.5 * (pts[:-1] + pts[1:])
        sag = float(np.max(np.hypot(*(mid - chord_mid).T)))
        if sag <= dense_tol:
            break
        n = int(n * min(8.0, max(1.5, 1.2 * math.sqrt(sag / dense_tol))))
    return _greedy_vertices(pts, tol * 0.96)


def arc_points(radius: float, a0: float, a1: float, tol: float, centre=(0.0, 0.0)) -> np.ndarray:
    """Points on a circular arc from angle a0 to a1 (both included), chords within tol."""
    span = abs(a1 - a0)
    if span * radius < 1e-9 or radius <= 0.0:        # a point (e.g. the root arc under a full-round rack tip)
        return np.array([[centre[0] + radius * math.cos(a0), centre[1] + radius * math.sin(a0)]])
    if tol >= radius:
        n = max(1, math.ceil(span / (math.pi / 2)))
    else:
        max_step = 2.0 * math.acos(1.0 - tol / radius)
        n = max(1, math.ceil(span / max_step - 1e-12))
    ang = np.linspace(a0, a1, n + 1)
    return np.column_stack([centre[0] + radius * np.cos(ang), centre[1] + radius * np.sin(ang)])


def _join(pieces: list[np.ndarray], what: str) -> np.ndarray:
    out = [pieces[0]]
    for p in pieces[1:]:
        gap = float(np.hypot(*(out[-1][-1] - p[0])))
        if gap > 1e-6:
            from sheetgen.errors import GeometryBug

            raise GeometryBug(f"gear outline: pieces of the {what} do not meet (gap {gap:.2e} mm)")
        out.append(p[1:])
    return np.vstack(out)


def gear_outline_xy(tf: ToothForm, tol: float = DEFAULT_CHORD_TOL_MM) -> np.ndarray:
    """The closed outline (N, 2), counter-clockwise, first point not repeated.

    One pitch is built from: the whole root arc of the space at -pi/z, the
    lower fillet and involute of tooth 0, its whole tip arc, then the upper
    involute and fillet (mirror images); z rotated copies make the gear."""
    z = tf.teeth
    a_root = tf.root_half_angle
    fillet = sample_curve(tf.fillet_xy, math.pi, tf.beta_end, tol)
    flank = sample_curve(tf.involute_xy, tf.gamma_start, tf.gamma_tip, tol)
    half_tip = tf.tip_half_angle
    root = arc_points(tf.r_root, -math.pi / z - a_root, -math.pi / z + a_root, tol)
    tip = arc_points(tf.r_tip, -half_tip, half_tip, tol)
    lower = _join([root, fillet, flank, tip], "tooth")
    upper = _join([flank[::-1], fillet[::-1]], "upper flank") * np.array([1.0, -1.0])
    unit = _join([lower, upper], "tooth")
    # the unit ends where the next pitch's root arc starts: drop that point
    end_expected = np.array([tf.r_root * math.cos(math.pi / z - a_root), tf.r_root * math.sin(math.pi / z - a_root)])
    if float(np.hypot(*(unit[-1] - end_expected))) > 1e-6:
        from sheetgen.errors import GeometryBug

        raise GeometryBug("gear outline: one pitch does not close onto the next")
    unit = unit[:-1]
    step = np.hypot(*np.diff(unit, axis=0).T)
    unit = unit[np.concatenate([[True], step > 1e-9])]   # no zero-length edges
    ang = 2.0 * math.pi * np.arange(z) / z
    c, s = np.cos(ang)[:, None], np.sin(ang)[:, None]
    x = c * unit[None, :, 0] - s * unit[None, :, 1]
    y = s * unit[None, :, 0] + c * unit[None, :, 1]
    return np.column_stack([x.ravel(), y.ravel()])
