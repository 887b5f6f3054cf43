"""The fixed frame: base, axle supports and stretchers (the motor's box of plates is in motor.py)."""

from __future__ import annotations

from sheetgen.geometry.joints import Edge
from sheetgen.geometry.shapes import disc, hull, rect
from sheetgen.design.layout import ANCHOR_HOLE_MM, Layout
from sheetgen.geometry.placement import place
from sheetgen.design.parts import Blank, round_hole

X, Y, Z = (1.0, 0.0, 0.0), (0.0, 1.0, 0.0), (0.0, 0.0, 1.0)
MINUS_Y = (0.0, -1.0, 0.0)
ANCHOR_INSET_MM = 8.0


def base(spec, L: Layout, drive) -> Blank:
    """Base plate; everything fixed stands in its slots. Anchor holes to screw it down."""
    x0, x1, hy = L.base_x0_mm, L.base_x1_mm, L.base_half_y_mm
    i = ANCHOR_INSET_MM
    anchors = tuple(round_hole(x, y, ANCHOR_HOLE_MM) for x in (x0 + i, x1 - i) for y in (-hy + i, hy - i))
    return Blank(
        name="base",
        outline=rect(x0, -hy, x1, hy),
        placements=(place(X, Y, (0.0, 0.0, -L.axle_height_mm - L.t_mm)),),
        description="base plate; screw it down through the corner holes",
        holes=anchors,
    )


def axle_support(spec, L: Layout, drive) -> Blank:
    """One of two supports carrying the axle in a bearing hole (local x = kit y, local y = kit z)."""
    H, ys = L.axle_height_mm, L.support_half_y_mm
    outline = hull(disc(0.0, 0.0, L.support_hub_r_mm), rect(-ys, -H, ys, -H + L.foot_h_mm))
    t = L.t_mm
    bearing = spec.axle.diameter_mm + spec.axle.bearing_clearance_mm
    holes = [round_hole(0.0, 0.0, bearing)]
    return Blank(
        name="axle-support",
        outline=outline,
        placements=(place(Y, Z, (-L.support_x_mm - t, 0.0, 0.0)), place(Y, Z, (L.support_x_mm, 0.0, 0.0))),
        description="stands on the base and carries the axle in its bearing hole",
        holes=tuple(holes),
        edges=(("foot", Edge((-ys, -H), (ys, -H), -1)),),
    )


def stretcher(spec, L: Layout, drive) -> Blank:
    """Braces the two supports against each other, low down and clear of the turning frame
    (local x = kit x, local y = kit z, thickness toward -y)."""
    H, xs, h = L.axle_height_mm, L.support_x_mm, L.stretcher_h_mm
    t = L.t_mm
    return Blank(
        name="stretcher",
        outline=rect(-xs, -H, xs, -H + h),
        placements=tuple(place(X, Z, (0.0, y + t / 2, 0.0)) for y in (-L.stretcher_y_mm, L.stretcher_y_mm)),
        description="braces the supports; its end tabs pass through them",
        edges=(
            ("bottom", Edge((-xs, -H), (xs, -H), -1)),
            ("end+", Edge((xs, -H), (xs, -H + h), -1)),
            ("end-", Edge((-xs, -H), (-xs, -H + h), +1)),
        ),
    )
