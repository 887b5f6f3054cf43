"""The fixed frame: base, axle supports, stretchers and the motor mount."""

from __future__ import annotations

from sheetgen.geometry.joints import Edge
from sheetgen.geometry.shapes import disc, hull, rect
from sheetgen.design.layout import ANCHOR_HOLE_MM, MOTOR_BODY_MARGIN_MM, Layout
from sheetgen.geometry.placement import place
from sheetgen.design.parts import Blank, round_hole

X, Y, Z = (1.0, 0.0, 0.0), (0.0, 1.0, 0.0), (0.0, 0.0, 1.0)
MINUS_Y = (0.0, -1.0, 0.0)
ANCHOR_INSET_MM = 8.0
SHAFT_CLEARANCE_MM = 1.0  # diametral, round a motor shaft passing through a plate


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


def motor_mount(spec, L: Layout, drive) -> Blank:
    """Holds the gear-motor with its shaft along -x through the plate, so the pinion meshes
    with the wheel (local x = kit y, local y = kit z)."""
    m = spec.motor
    H, py, pz = L.axle_height_mm, L.pinion_y_mm, L.pinion_z_mm
    half_w = m.body_width_mm / 2 + MOTOR_BODY_MARGIN_MM
    half_h = m.body_height_mm / 2 + MOTOR_BODY_MARGIN_MM
    if m.screw_spacing_mm:
        half_w = max(half_w, m.screw_spacing_mm / 2 + m.screw_diameter_mm / 2 + 4.0)
    foot_h = max(2 * L.t_mm, 8.0)
    outline = hull(rect(py - half_w, pz - half_h, py + half_w, pz + half_h),
                   rect(py - half_w, -H, py + half_w, -H + foot_h))
    shaft_hole = max(m.shaft_diameter_mm, m.boss_diameter_mm) + SHAFT_CLEARANCE_MM
    holes = [round_hole(py, pz, shaft_hole)]
    if m.screw_spacing_mm:
        holes += [round_hole(py + s * m.screw_spacing_mm / 2, pz, m.screw_diameter_mm) for s in (-1, 1)]
    return Blank(
        name="motor-mount",
        outline=outline,
        placements=(place(Y, Z, (L.mount_x_mm, 0.0, 0.0)),),
        description="holds the gear-motor; screw it on from outside",
        holes=tuple(holes),
        edges=(("foot", Edge((py - half_w, -H), (py + half_w, -H), -1)),),
    )
