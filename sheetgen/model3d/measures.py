"""Shared volume and distance of two bodies, exact, and the sweep's lower bound."""

from __future__ import annotations

import math

import numpy as np
import shapely
from shapely import affinity
from shapely.geometry import MultiPoint, Polygon
from shapely.geometry.base import BaseGeometry

from sheetgen.errors import GeometryBug
from sheetgen.model3d.bodies import Body, Prism, _x_gap, parallel_distance_mm, parallel_shared_volume_mm3
from sheetgen.model3d.solids import Model, _occ_common_mm3, _occ_distance, _turn_location, prism_solid



# ---------------------------------------------------------------------------
# checks


class _Measures:
    """Shared volume and distance of two bodies at given frame angles, exact:
    shapely for pieces on parallel axes, OpenCascade for the rest (cached)."""

    def __init__(self, model: Model):
        self.model = model
        self.occ_calls = 0

    def _piece_solid(self, name: str, k: int, angle: float):
        s = self.model.piece_solids[(name, k)]
        return s.moved(_turn_location(angle)) if angle and self.model.body(name).rotating else s

    def shared_volume_mm3(self, a: Body, b: Body, angle_a: float = 0.0, angle_b: float = 0.0) -> float:
        total = 0.0
        for ka, pa in enumerate(a.pieces):
            pa_t = pa.turned(angle_a)
            for kb, pb in enumerate(b.pieces):
                pb_t = pb.turned(angle_b)
                v = parallel_shared_volume_mm3(pa_t, pb_t)
                if v is None:
                    self.occ_calls += 1
                    v = _occ_common_mm3(self._piece_solid(a.name, ka, angle_a), self._piece_solid(b.name, kb, angle_b))
                total += v
        return total

    def distance_mm(self, a: Body, b: Body, angle_a: float = 0.0, angle_b: float = 0.0) -> float:
        """Distance of two bodies known not to share volume: the least over their
        pieces (the distance to a union is the least distance to its members)."""
        best = math.inf
        for pa in a.pieces:
            pa_t = pa.turned(angle_a)
            for pb in b.pieces:
                pb_t = pb.turned(angle_b)
                d = parallel_distance_mm(pa_t, pb_t)
                if d is None:
                    self.occ_calls += 1
                    d = clipped_distance_mm(pa_t, pb_t)
                best = min(best, d)
        return best

    def within_mm(self, a: Body, b: Body, reach_mm: float) -> bool:
        """Whether two bodies known not to share volume, as they stand, come within
        ``reach_mm`` of each other: :meth:`distance_mm` <= reach_mm, measured only on the
        parts of each that could hold such a pair (:func:`clipped_within_mm`)."""
        for pa in a.pieces:
            for pb in b.pieces:
                d = parallel_distance_mm(pa, pb)
                if d is None:
                    self.occ_calls += 1
                    if clipped_within_mm(pa, pb, reach_mm):
                        return True
                elif d <= reach_mm:
                    return True
        return False


def _near_region(piece: Prism, other: Prism, reach_mm: float) -> BaseGeometry:
    """The part of ``piece``'s local x-y plane that can hold a point within
    ``reach_mm`` of ``other``: the box around ``other`` grown by the reach,
    brought into ``piece``'s frame and seen along its local z."""
    lo, hi = _box(other)
    lo, hi = lo - reach_mm, hi + reach_mm
    box = np.array([[x, y, z] for x in (lo[0], hi[0]) for y in (lo[1], hi[1]) for z in (lo[2], hi[2])])
    m, t = piece.placement.matrix, np.asarray(piece.placement.translation_mm, dtype=float)
    local = (box - t) @ m  # R^T (p - t), row by row
    return MultiPoint(local[:, :2]).convex_hull


CLIP_VERTICES = 64  # outlines with more ring vertices than this are clipped before OpenCascade measures them


def _clipped(piece: Prism, region: BaseGeometry) -> list[Prism]:
    if shapely.get_num_coordinates(piece.outline) <= CLIP_VERTICES:
        return [piece] if piece.outline.intersects(region) else []
    cut = piece.outline.intersection(region)
    polys = [g for g in getattr(cut, "geoms", [cut]) if isinstance(g, Polygon) and g.area > 0.0]
    return [Prism(g, piece.depth_mm, piece.placement) for g in polys]


def clipped_distance_mm(a: Prism, b: Prism) -> float:
    """The exact distance of two prisms that share no volume, measured by
    OpenCascade on the parts of each that can hold the nearest points.

    A point of ``a`` within r of ``b`` lies in ``b``'s box grown by r, and the
    other way round; so once the clipped pieces are found no farther apart
    than r, their distance is the prisms' distance (the clipped sets are
    subsets that hold the nearest pair). A gear's outline has thousands of
    faces; the few teeth near the other part are measured instead."""
    reach = max(_box_gap_mm(a, b), 0.0) + 4.0
    for _ in range(60):
        ca, cb = _clipped(a, _near_region(a, b, reach)), _clipped(b, _near_region(b, a, reach))
        if ca and cb:
            d = _occ_distance(_shells(ca), _shells(cb))
            if d <= reach:
                return d
            reach = d  # an upper bound of the distance: the next round holds the nearest pair
        else:
            reach = 2.0 * reach
    raise GeometryBug("the clipped distance did not settle")  # pragma: no cover - reach grows past both boxes


def clipped_within_mm(a: Prism, b: Prism, reach_mm: float) -> bool:
    """Whether two prisms that share no volume come within ``reach_mm`` of each other: every
    point of ``a`` within the reach of ``b`` lies in ``b``'s box grown by the reach, and the
    other way round (as in :func:`clipped_distance_mm`), so the answer is OpenCascade's distance
    of the clipped pieces, and no when either clipped set is empty."""
    if _box_gap_mm(a, b) > reach_mm:
        return False
    ca, cb = _clipped(a, _near_region(a, b, reach_mm)), _clipped(b, _near_region(b, a, reach_mm))
    return bool(ca and cb) and _occ_distance(_shells(ca), _shells(cb)) <= reach_mm


def _shells(prisms: list[Prism]):
    """The boundaries of the prisms as one OpenCascade compound."""
    from OCP.BRep import BRep_Builder
    from OCP.TopoDS import TopoDS_Compound

    builder = BRep_Builder()
    comp = TopoDS_Compound()
    builder.MakeCompound(comp)
    for p in prisms:
        for sh in prism_solid(p).Shells():
            builder.Add(comp, sh.wrapped)
    return comp


def _box(p: Prism) -> tuple[np.ndarray, np.ndarray]:
    """A box around the prism in the kit frame (its local bounding box carried
    over: it holds the prism, which is all the clipping needs)."""
    x0, y0, x1, y1 = p.outline.bounds
    local = np.array([[x, y, z] for x in (x0, x1) for y in (y0, y1) for z in (0.0, p.depth_mm)])
    c = p.placement.apply(local)
    return c.min(axis=0), c.max(axis=0)


def _box_gap_mm(a: Prism, b: Prism) -> float:
    (alo, ahi), (blo, bhi) = _box(a), _box(b)
    return float(np.linalg.norm(np.maximum(0.0, np.maximum(blo - ahi, alo - bhi))))


def distance_bound_mm(a: Body, b: Body, angle_a_deg: float = 0.0) -> tuple[float, bool]:
    """The sweep's lower bound of the distance between body ``a`` turned by
    ``angle_a_deg`` and body ``b`` at rest: hypot(x gap, distance of the y-z
    projections), least over their pieces; and whether it is exact (the
    least comes from two plates across the axle)."""
    best, exact = math.inf, False
    for pa in a.pieces:
        proj_a = affinity.rotate(pa.yz_projection(), angle_a_deg, origin=(0.0, 0.0)) if a.rotating \
            else pa.yz_projection()
        for pb in b.pieces:
            d = math.hypot(_x_gap(pa.x_range_mm(), pb.x_range_mm()), float(proj_a.distance(pb.yz_projection())))
            if d < best:
                best, exact = d, pa.axial and pb.axial
    return best, exact

