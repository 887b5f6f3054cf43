"""The motor's box of plates: it clamps the gear-motor's BODY, so the motor's
place along its shaft is free and the shaft reaches the pinion whatever its
length (see sheetgen/design/layout.py for the figures).

* ``motor-mount``: a plate across the axle, flush with the motor's face, with a
  body-shaped opening cut to a press fit (the body is pushed in and held by the
  grip; spur teeth put no thrust along the shaft).
* ``motor-clamp``: the back plate the motor's rear end butts against, with a
  round opening for the motor's terminals and wires.
* ``motor-brace`` (two): side plates along the motor, one either side of it,
  their end tabs through the mount and the clamp and their bottom tabs in the
  base: with the base they close the box, so the mount is held by three parts
  and not by one foot.

Every plate stands in the base. Local x = kit y, local y = kit z for the two
plates across the axle; local x = kit x, local y = kit z for the braces.
"""

from __future__ import annotations

from shapely.geometry import Polygon

from sheetgen.geometry.joints import Edge, fit_clearance_mm
from sheetgen.geometry.shapes import rect
from sheetgen.geometry.placement import place
from sheetgen.design.layout import Layout
from sheetgen.design.parts import Blank, Hole, round_hole

X, Y, Z = (1.0, 0.0, 0.0), (0.0, 1.0, 0.0), (0.0, 0.0, 1.0)
WIRE_OPENING_SHARE = 0.5  # terminal opening in the back plate: this share of the body's smaller side (our rule)


def body_opening(spec, L: Layout) -> Hole:
    """The motor body's section as a hole: nominal line to line with the body, cut a
    press fit (the fit outline smaller by the press allowance per side, corners kept)."""
    m = spec.motor
    py, pz = L.pinion_y_mm, L.pinion_z_mm
    nominal = rect(py - m.body_width_mm / 2, pz - m.body_height_mm / 2, py + m.body_width_mm / 2,
                   pz + m.body_height_mm / 2)
    fit = nominal.buffer(fit_clearance_mm("press"), join_style="mitre", mitre_limit=10.0)
    assert isinstance(fit, Polygon)
    return Hole(nominal, fit)


def _plate_outline(L: Layout) -> Polygon:
    py, w = L.pinion_y_mm, L.mount_half_w_mm
    return rect(py - w, -L.axle_height_mm, py + w, L.mount_top_z_mm)


def _foot(L: Layout) -> tuple[str, Edge]:
    py, w, H = L.pinion_y_mm, L.mount_half_w_mm, L.axle_height_mm
    return ("foot", Edge((py - w, -H), (py + w, -H), -1))


def motor_mount(spec, L: Layout, drive) -> Blank:
    """The front plate: clamps the motor body in its opening, flush with the motor's face."""
    return Blank(
        name="motor-mount",
        outline=_plate_outline(L),
        placements=(place(Y, Z, (L.mount_x_mm, 0.0, 0.0)),),
        description="front plate of the motor box; push the gear-motor in from behind until its face is flush",
        holes=(body_opening(spec, L),),
        edges=(_foot(L),),
    )


def motor_clamp(spec, L: Layout, drive) -> Blank:
    """The back plate: the motor's rear end butts against it; the wires leave through its opening."""
    m = spec.motor
    wires = WIRE_OPENING_SHARE * min(m.body_width_mm, m.body_height_mm)
    return Blank(
        name="motor-clamp",
        outline=_plate_outline(L),
        placements=(place(Y, Z, (L.clamp_x_mm, 0.0, 0.0)),),
        description="back plate of the motor box; the motor's rear butts against it, its wires pass the opening",
        holes=(round_hole(L.pinion_y_mm, L.pinion_z_mm, wires),),
        edges=(_foot(L),),
    )


def motor_brace(spec, L: Layout, drive) -> Blank:
    """Two side plates along the motor, joining the mount and the clamp (end tabs) and the base."""
    x0 = L.mount_x_mm + L.t_mm  # the brace's local origin (its outline does not move with the drive's place)
    n = L.clamp_x_mm - x0
    H = L.axle_height_mm
    top = L.pinion_z_mm + spec.motor.body_height_mm / 2
    t = L.t_mm
    return Blank(
        name="motor-brace",
        outline=rect(0.0, -H, n, top),
        placements=tuple(place(X, Z, (x0, L.pinion_y_mm + s * L.brace_y_mm + t / 2, 0.0)) for s in (-1, 1)),
        description="side plate of the motor box; its tabs pass the front and back plates and the base",
        edges=(
            ("bottom", Edge((0.0, -H), (n, -H), -1)),
            ("end+", Edge((n, -H), (n, top), -1)),
            ("end-", Edge((0.0, -H), (0.0, top), +1)),
        ),
    )
