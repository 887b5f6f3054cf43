"""The wedge under the base that tilts a polar axle at the latitude.

With ``site.axle = "polar"`` the stand stands on a wedge: two side plates (in x-z
planes, just inside the base's long edges) carry the base along their top edge, and
their bottom edge stands on a ground plate tilted by ``Layout.tilt_deg`` against the
base, so the axle (kit x) rises at the latitude toward +x (point the +x end at the
pole). Seen along y a side plate is a right trapezoid: the base along its top edge,
the ground along its bottom edge, its two ends square to the ground (vertical when the
kit stands), the low end ``Layout.wedge_foot_mm`` tall. Drawn in the kit frame
(local x = kit x, local y = kit z). A horizontal axle has no wedge: the factories
return None and the kit leaves the families out.
"""

from __future__ import annotations

import math

from shapely.geometry import Polygon

from sheetgen.geometry.joints import Edge
from sheetgen.geometry.shapes import rect
from sheetgen.design.layout import ANCHOR_HOLE_MM, WEDGE_EDGE_MM, Layout
from sheetgen.geometry.placement import place
from sheetgen.design.parts import Blank, round_hole

X, Z = (1.0, 0.0, 0.0), (0.0, 0.0, 1.0)
GROUND_MARGIN_MM = 10.0  # ground plate beyond the wedge's ends (our rule)
ANCHOR_INSET_MM = 8.0
OVERLAP_MM = 1e-7  # far under the part grid (sheetgen.geometry.shapes.GRID_MM)


def ground_directions(tilt_deg: float) -> tuple[tuple[float, float], tuple[float, float]]:
    """In the kit's x-z plane: the ground's direction (toward +x, falling) and the ground's
    upward normal; the kit's x axis makes tilt_deg with the ground."""
    a = math.radians(tilt_deg)
    return (math.cos(a), -math.sin(a)), (math.sin(a), math.cos(a))


def wedge_corners(L: Layout) -> tuple[tuple[float, float], ...]:
    """A (low end, under the base), B (high end, under the base), C (high end, on the ground),
    D (low end, on the ground), in kit (x, z)."""
    g, u = ground_directions(L.tilt_deg)
    zu = -L.axle_height_mm - L.t_mm
    x0, x1 = L.base_x0_mm + WEDGE_EDGE_MM, L.base_x1_mm - WEDGE_EDGE_MM
    span = x1 - x0
    a = (x0, zu)
    d = (x0 - L.wedge_foot_mm * u[0], zu - L.wedge_foot_mm * u[1])
    c_ = span * math.cos(math.radians(L.tilt_deg))
    c = (d[0] + c_ * g[0], d[1] + c_ * g[1])
    return a, (x1, zu), c, d


def wedge(spec, L: Layout, drive) -> Blank | None:
    """One of two side plates of the wedge (local x = kit x, local y = kit z, thickness toward -y)."""
    if L.tilt_deg <= 0:
        return None
    a, b, c, d = wedge_corners(L)
    t = L.t_mm
    # the bottom edge runs askew in the plate's plane: drawn a rounding's width (OVERLAP_MM) below the
    # edge its tabs grow from, so that they join the outline (the grid snap of the part takes it back)
    _, u = ground_directions(L.tilt_deg)
    c_, d_ = ((p[0] - OVERLAP_MM * u[0], p[1] - OVERLAP_MM * u[1]) for p in (c, d))
    return Blank(
        name="wedge",
        outline=Polygon([a, b, c_, d_]),
        placements=(place(X, Z, (0.0, L.wedge_y_mm, 0.0)), place(X, Z, (0.0, -L.wedge_y_mm + t, 0.0))),
        description="side of the wedge that tilts the axle at the latitude",
        edges=(("top", Edge(a, b, +1)), ("bottom", Edge(d, c, -1))),
    )


def ground_plate(spec, L: Layout, drive) -> Blank | None:
    """The wedge's foot on the ground; screw it down through the corner holes
    (local x along the ground toward +x, local y = kit y, thickness up to the wedge)."""
    if L.tilt_deg <= 0:
        return None
    g, u = ground_directions(L.tilt_deg)
    _, _, c, d = wedge_corners(L)
    length = math.dist(c, d)
    m, hy, i = GROUND_MARGIN_MM, L.base_half_y_mm, ANCHOR_INSET_MM
    x0, x1 = -m, length + m
    anchors = tuple(round_hole(x, y, ANCHOR_HOLE_MM) for x in (x0 + i, x1 - i) for y in (-hy + i, hy - i))
    t = L.t_mm
    origin = (d[0] - t * u[0], 0.0, d[1] - t * u[1])
    return Blank(
        name="ground-plate",
        outline=rect(x0, -hy, x1, hy),
        placements=(place((g[0], 0.0, g[1]), (0.0, 1.0, 0.0), origin),),
        description="foot of the wedge; screw it down through the corner holes",
        holes=anchors,
    )
