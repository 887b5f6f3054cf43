"""Rings on the axle: the collar that holds it endwise, and spacer washers.

Both stay round: the collar grips the axle's round end (outside the flat, which
runs from the -x rib to the +x end) and carries no torque; the spacers must turn
freely against the supports, so their bores are loose (axle.bearing_clearance)."""

from __future__ import annotations

from sheetgen.geometry.shapes import disc
from sheetgen.design.layout import Layout
from sheetgen.geometry.placement import place
from sheetgen.design.parts import Blank, round_hole

Y, Z = (0.0, 1.0, 0.0), (0.0, 0.0, 1.0)


def collar(spec, L: Layout, drive) -> Blank:
    """Press-fit ring outside the -x support, keyed on the axle's flat (it turns with the axle);
    with the wheel it stops the axle sliding."""
    from sheetgen.design.parts.frame import keyed_bore

    d = spec.axle.diameter_mm
    od = d + 2 * max(4.0, 1.5 * L.t_mm)
    x = -L.support_x_mm - 2 * L.t_mm
    return Blank(
        name="collar",
        outline=disc(0.0, 0.0, od / 2),
        placements=(place(Y, Z, (x, 0.0, 0.0), rotating=True),),
        description="press-fit ring keyed on the axle's flat; keeps the axle from sliding out",
        holes=(keyed_bore(spec, L),),
    )


def spacer(spec, L: Layout, drive) -> Blank:
    """Loose washers between each rib and its support, and drive.wheel_spacers between the +x
    support and the wheel (their number places the wheel, so the motor shaft clears the support)."""
    d = spec.axle.diameter_mm
    od = d + 2 * max(5.0, 2 * L.t_mm)
    t, xs = L.t_mm, L.support_x_mm
    xs_list = [-xs + i * t for i in range(L.spacers_per_side)]
    xs_list += [xs - (i + 1) * t for i in range(L.spacers_per_side)]
    xs_list += [xs + t + i * t for i in range(L.wheel_spacers)]  # between the +x support and the wheel
    return Blank(
        name="spacer",
        outline=disc(0.0, 0.0, od / 2),
        placements=tuple(place(Y, Z, (x, 0.0, 0.0), rotating=True) for x in sorted(xs_list)),
        description="loose washer on the axle; keeps the frame centred",
        holes=(round_hole(0.0, 0.0, d + spec.axle.bearing_clearance_mm),),
    )
