"""End stops: the stop arm on the axle and the fixed end stop it swings in.

Seen along the axle (+x) the arm is a hub round the axle with a lug pointing
down at rest, its two edges radial at +-``Layout.stop_half_angle_deg`` from
straight down. The end stop is a plate standing on the base in the arm's
plane, with a cut-out the arm swings in: a disc round the axle and a sector
whose two faces are radial at +-(travel limit + half lug angle). Turned to
+-``site.travel_limit`` an edge of the lug lies on a face of the end stop,
along the line from the cut-out radius to the arm's reach; everywhere else the
arm keeps ``Layout.stop_gap_mm`` from it. Both are drawn in the y-z plane
(local x = kit y, local y = kit z) and sit outboard of the collar at -x.
"""

from __future__ import annotations

import math

from shapely.geometry import Polygon

from sheetgen.geometry.joints import Edge
from sheetgen.geometry.shapes import disc, one_polygon, rect, segments_for_arc
from sheetgen.design.layout import Layout
from sheetgen.geometry.placement import place
from sheetgen.design.parts import Blank

Y, Z = (0.0, 1.0, 0.0), (0.0, 0.0, 1.0)


def _down(angle_deg: float, r: float) -> tuple[float, float]:
    """The point at radius r, angle_deg from straight down toward +y (local x = kit y, local y = kit z)."""
    a = math.radians(angle_deg)
    return (r * math.sin(a), -r * math.cos(a))


def sector(r_mm: float, half_angle_deg: float) -> Polygon:
    """The sector from the axle out to r_mm, +-half_angle_deg about straight down; the arc is drawn
    outside the true circle (chords through the arc points' tangents), so the sector holds the disc's."""
    n = max(2, segments_for_arc(r_mm, math.radians(2 * half_angle_deg)))
    step = 2 * half_angle_deg / n
    r_out = r_mm / math.cos(math.radians(step / 2))
    pts = [(0.0, 0.0), _down(-half_angle_deg, r_mm)]
    pts += [_down(-half_angle_deg + step * (i + 0.5), r_out) for i in range(n)]
    pts += [_down(half_angle_deg, r_mm)]
    return Polygon(pts)


def stop_arm(spec, L: Layout, drive) -> Blank:
    """Turns with the axle (keyed on its flat); its lug's edges meet the end stop at +-site.travel_limit."""
    from sheetgen.design.parts.frame import keyed_bore

    lug = Polygon([(0.0, 0.0), _down(-L.stop_half_angle_deg, L.stop_arm_r_mm),
                   _down(L.stop_half_angle_deg, L.stop_arm_r_mm)])
    outline = one_polygon(disc(0.0, 0.0, L.stop_hub_r_mm).union(lug), "stop-arm outline")
    return Blank(
        name="stop-arm",
        outline=outline,
        placements=(place(Y, Z, (L.stop_x_mm, 0.0, 0.0), rotating=True),),
        description="keyed on the axle's flat; meets the end stop at the travel limit",
        holes=(keyed_bore(spec, L),),  # the stop torque goes through the axle's flat
    )


def end_stop(spec, L: Layout, drive) -> Blank:
    """Stands on the base in the stop arm's plane; its faces stop the arm at +-site.travel_limit."""
    H, hy = L.axle_height_mm, L.stop_half_y_mm
    beta = L.stop_angle_deg + L.stop_half_angle_deg
    reach = L.stop_arm_r_mm + L.stop_gap_mm
    cut = disc(0.0, 0.0, L.stop_cut_r_mm).union(sector(reach, beta))
    if beta < 90.0:
        # open above the axle, so the plate drops over it
        cut = cut.union(rect(-L.stop_cut_r_mm, 0.0, L.stop_cut_r_mm, L.stop_top_z_mm + 1.0))
    outline = one_polygon(rect(-hy, -H, hy, L.stop_top_z_mm).difference(cut), "end-stop outline")
    return Blank(
        name="end-stop",
        outline=outline,
        placements=(place(Y, Z, (L.stop_x_mm, 0.0, 0.0)),),
        description="stands on the base; stops the turning frame at the travel limit",
        edges=(("foot", Edge((-hy, -H), (hy, -H), -1)),),
    )
