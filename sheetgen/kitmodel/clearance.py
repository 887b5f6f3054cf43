"""Clearance of the turning frame through its travel, seen along the axle.

Every part instance is projected onto the kit's y-z plane (the plane the frame
turns in). Two instances can only meet if their x extents overlap, so only
such pairs of a turning and a fixed instance are compared. The turning
silhouettes are rotated about the axle (the origin) in steps of at most
``step_deg`` and the least distance to the fixed silhouettes is kept.

A part whose plane is the y-z plane projects to its own outline; a part whose
plane contains the x direction projects to the parallelogram spanned by its
extent and thickness, which is the convex hull of its projected corners.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import shapely
from shapely import affinity
from shapely.geometry import MultiPoint, Polygon

from sheetgen.kitmodel.part import Kit, Part
from sheetgen.geometry.placement import Placement
from sheetgen.geometry.shapes import one_polygon

SWEEP_STEP_DEG = 1.0


@dataclass(frozen=True)
class Silhouette:
    name: str  # "part#instance"
    shape: Polygon  # in the (y, z) plane
    x_range_mm: tuple[float, float]
    rotating: bool


@dataclass(frozen=True)
class SweepResult:
    min_clearance_mm: float
    angle_deg: float
    turning: str
    fixed: str


def _corners(part: Part) -> np.ndarray:
    xy = shapely.get_coordinates(part.outline.exterior)[:-1]
    return np.vstack([np.column_stack([xy, np.zeros(len(xy))]),
                      np.column_stack([xy, np.full(len(xy), part.thickness_mm)])])


def silhouette(part: Part, placement: Placement, index: int) -> Silhouette:
    kit_pts = placement.apply(_corners(part))
    x_range = (float(kit_pts[:, 0].min()), float(kit_pts[:, 0].max()))
    normal = placement.matrix[:, 2]
    if abs(abs(normal[0]) - 1.0) < 1e-9:
        # the part lies in a y-z plane: its outline maps straight onto (y, z)
        m = placement.matrix
        t = np.asarray(placement.translation_mm)
        a = [m[1, 0], m[1, 1], m[2, 0], m[2, 1], t[1], t[2]]
        shape = affinity.affine_transform(part.outline, a)
    else:
        # both faces are among the points, so the hull has an area (the part has a thickness)
        shape = one_polygon(MultiPoint(kit_pts[:, 1:]).convex_hull, f"{part.name} silhouette")
    return Silhouette(f"{part.name}#{index + 1}", shape, x_range, placement.rotating)


def kit_silhouettes(kit: Kit, skip: tuple[str, ...] = ()) -> list[Silhouette]:
    out = []
    for part in kit.parts:
        if part.name in skip:
            continue
        for i, pl in enumerate(part.placements):
            out.append(silhouette(part, pl, i))
    return out


def sweep_clearance(silhouettes: list[Silhouette], angles_deg: tuple[float, float],
                    step_deg: float = SWEEP_STEP_DEG,
                    meshing: frozenset[tuple[str, str]] = frozenset()) -> SweepResult:
    """Least distance between turning and fixed silhouettes over the travel.

    ``meshing`` lists (turning part, fixed part) names meant to touch (the
    wheel and its pinion). Returns infinity (and empty names) when no pair
    can meet."""
    lo, hi = angles_deg
    n = max(2, math.ceil((hi - lo) / step_deg) + 1)
    angles = np.linspace(lo, hi, n)
    turning = [s for s in silhouettes if s.rotating]
    fixed = [s for s in silhouettes if not s.rotating]
    pairs = [(a, b) for a in turning for b in fixed
             if a.x_range_mm[0] < b.x_range_mm[1] - 1e-9 and b.x_range_mm[0] < a.x_range_mm[1] - 1e-9
             and (a.name.split("#")[0], b.name.split("#")[0]) not in meshing]
    best = SweepResult(math.inf, 0.0, "", "")
    if not pairs:
        return best
    fixed_geoms = np.array([b.shape for _, b in pairs], dtype=object)
    # each turning silhouette is turned once per angle, all together (shapely 2 array functions)
    names = list(dict.fromkeys(a.name for a, _ in pairs))
    shapes = {a.name: a.shape for a, _ in pairs}
    turning_geoms = np.array([shapes[n] for n in names], dtype=object)
    index = np.array([names.index(a.name) for a, _ in pairs])
    # a pair can come no closer than the fixed shape's distance from the axle less the turning
    # shape's reach (whatever the angle): pairs that cannot beat the best so far are skipped
    reach = np.array([np.hypot(*np.asarray(shapely.get_coordinates(g)).T).max() for g in turning_geoms])
    bound = np.maximum(0.0, shapely.distance(shapely.points(0.0, 0.0), fixed_geoms) - reach[index])
    for ang in angles:
        active = np.flatnonzero(bound < best.min_clearance_mm - 1e-12)
        if active.size == 0:
            break
        c, s = math.cos(math.radians(ang)), math.sin(math.radians(ang))
        turn = np.array([[c, s], [-s, c]])  # row vectors: (y, z) -> (c y - s z, s y + c z)
        def turned(yz: np.ndarray, turn: np.ndarray = turn) -> np.ndarray:
            return yz @ turn

        need = np.unique(index[active])  # only the turning shapes of the pairs still in play
        turned_now = np.empty(len(turning_geoms), dtype=object)
        turned_now[need] = shapely.transform(turning_geoms[need], turned)
        moved = turned_now[index[active]]
        dist = shapely.distance(moved, fixed_geoms[active])
        j = int(np.argmin(dist))
        k = int(active[j])
        if dist[j] < best.min_clearance_mm - 1e-12:
            best = SweepResult(float(dist[j]), float(ang), pairs[k][0].name, pairs[k][1].name)
    return best
