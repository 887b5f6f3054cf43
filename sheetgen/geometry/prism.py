"""A plate or a solid component as a prism: a polygon in a local x-y plane swept along
local +z, carried into the kit frame by a placement. The one solid the assembly guide,
the order planner and the 3D model all build from (pure: shapely and numpy only)."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from shapely import affinity
from shapely.geometry import MultiPoint, Polygon

from sheetgen.geometry.placement import Placement, mat3

AXIS_TOL = 1e-9  # a plate's normal this close to the axle's direction lies along it


@dataclass(frozen=True)
class Prism:
    """A polygon in a local x-y plane swept along local +z by ``depth_mm``,
    carried into the kit frame (rotation 0) by ``placement``."""

    outline: Polygon
    depth_mm: float
    placement: Placement

    @property
    def axis(self) -> np.ndarray:
        return self.placement.matrix[:, 2]

    @property
    def axial(self) -> bool:
        """Swept along the axle (x): the plate lies across the axle."""
        return abs(abs(float(self.axis[0])) - 1.0) < AXIS_TOL

    def turned(self, angle_deg: float) -> "Prism":
        return Prism(self.outline, self.depth_mm, self.placement.turned(angle_deg))

    def corners(self) -> np.ndarray:
        """Exterior vertices on both faces, in the kit frame."""
        xy = np.asarray(self.outline.exterior.coords[:-1], dtype=float)
        local = np.vstack([np.column_stack([xy, np.zeros(len(xy))]),
                           np.column_stack([xy, np.full(len(xy), self.depth_mm)])])
        return self.placement.apply(local)

    def x_range_mm(self) -> tuple[float, float]:
        c = self.corners()
        return float(c[:, 0].min()), float(c[:, 0].max())

    def yz_projection(self) -> Polygon:
        """The prism seen along x: its outline for an axial prism (exact), else
        the convex hull of its corners (contains the true projection)."""
        if self.axial:
            m = self.placement.matrix
            t = self.placement.translation_mm
            return affinity.affine_transform(self.outline, [m[1, 0], m[1, 1], m[2, 0], m[2, 1], t[1], t[2]])
        hull = MultiPoint([tuple(p) for p in self.corners()[:, 1:]]).convex_hull
        if not isinstance(hull, Polygon):  # a plate seen exactly edge-on along x and along its own thickness
            hull = hull.buffer(1e-9)
        return hull


def spun(placement: Placement, angle_deg: float) -> Placement:
    """The placement after turning the part about its own local z axis (through its local origin)."""
    a = math.radians(angle_deg)
    c, s = math.cos(a), math.sin(a)
    rz = np.array([[c, -s, 0.0], [s, c, 0.0], [0.0, 0.0, 1.0]])
    r = placement.matrix @ rz
    return Placement(mat3(r), placement.translation_mm, placement.rotating)
