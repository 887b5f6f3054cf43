"""Shared volume and distance of two bodies, exact, and the sweep's lower bound."""

from __future__ import annotations
from __future__ import annotations

import math
from typing import Any

from shapely import affinity

from sheetgen.model3d.bodies import Body, _x_gap, parallel_distance_mm, parallel_shared_volume_mm3
from sheetgen.model3d.solids import Model, _occ_common_mm3, _occ_distance, _shell, _turn_location



# ---------------------------------------------------------------------------
# checks


class _Measures:
    """Shared volume and distance of two bodies at given frame angles, exact:
    shapely for pieces on parallel axes, OpenCascade for the rest (cached)."""

    def __init__(self, model: Model):
        self.model = model
        self._shells: dict[str, Any] = {}
        self.occ_calls = 0

    def _piece_solid(self, name: str, k: int, angle: float):
        s = self.model.piece_solids[(name, k)]
        return s.moved(_turn_location(angle)) if angle and self.model.body(name).rotating else s

    def _shell(self, name: str, angle: float):
        if name not in self._shells:
            self._shells[name] = _shell(self.model.solids[name])
        sh = self._shells[name]
        if angle and self.model.body(name).rotating:
            return sh.Moved(_turn_location(angle).wrapped)
        return sh

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
        """Distance of two bodies known not to share volume."""
        exact = []
        for pa in a.pieces:
            for pb in b.pieces:
                d = parallel_distance_mm(pa.turned(angle_a), pb.turned(angle_b))
                if d is None:
                    self.occ_calls += 1
                    return _occ_distance(self._shell(a.name, angle_a), self._shell(b.name, angle_b))
                exact.append(d)
        return min(exact)


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

