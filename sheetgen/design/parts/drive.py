"""The drive pair: wheel on the axle, pinion on the motor shaft (involute gears)."""

from __future__ import annotations

from shapely.geometry import Polygon

from sheetgen.geometry.joints import fit_clearance_mm
from sheetgen.geometry.shapes import d_shape
from sheetgen.design.layout import Layout
from sheetgen.geometry.placement import place
from sheetgen.design.parts import Blank, Hole, plain_hole, round_hole

Y, Z = (0.0, 1.0, 0.0), (0.0, 0.0, 1.0)


def drive_specs(spec):
    """Gear specs of the pinion and the wheel (bores are added as holes by the factories)."""
    from sheetgen.drive.gears import GearSpec, Hub

    d = spec.drive
    half = d.backlash_mm / 2
    pinion = GearSpec(d.module_mm, d.pinion_teeth, d.pressure_angle_deg, d.pinion_shift, half, Hub())
    wheel = GearSpec(d.module_mm, d.wheel_teeth, d.pressure_angle_deg, d.wheel_shift, half, Hub(lightening=True))
    return pinion, wheel


def drive_pair(spec):
    from sheetgen.drive.gears import gear_pair

    pinion, wheel = drive_specs(spec)
    return gear_pair(pinion, wheel)


def _gear_blank(name, geometry, bore: Hole, placements, description):
    poly = geometry.polygon
    holes = (bore,) + tuple(plain_hole(Polygon(r)) for r in poly.interiors)
    return Blank(
        name=name,
        outline=Polygon(poly.exterior),
        placements=placements,
        description=description,
        holes=holes,
        rotations_deg=(0.0, 90.0, 180.0, 270.0),
    )


def wheel(spec, L: Layout, drive) -> Blank:
    t = L.t_mm
    placements = tuple(place(Y, Z, (L.wheel_x_mm + i * t, 0.0, 0.0), rotating=True) for i in range(L.gear_layers))
    from sheetgen.design.parts.frame import keyed_bore

    return _gear_blank("wheel", drive.wheel, keyed_bore(spec, L), placements,
                       f"gear wheel, {spec.drive.wheel_teeth} teeth, keyed on the axle's flat (D-bore, press fit); "
                       "glue the layers")


def pinion(spec, L: Layout, drive) -> Blank:
    t = L.t_mm
    m = spec.motor
    if m.shaft_flat_mm:
        nominal = d_shape(0.0, 0.0, m.shaft_diameter_mm, m.shaft_flat_mm)
        bore = Hole(nominal, nominal.buffer(fit_clearance_mm("press"), join_style="mitre"))
    else:
        bore = round_hole(0.0, 0.0, m.shaft_diameter_mm, fit="press")
    placements = tuple(place(Y, Z, (L.wheel_x_mm + i * t, L.pinion_y_mm, L.pinion_z_mm))
                       for i in range(L.gear_layers))
    return _gear_blank("pinion", drive.pinion, bore, placements,
                       f"motor pinion, {spec.drive.pinion_teeth} teeth, press fit on the motor shaft"
                       + ("; glue the layers" if L.gear_layers > 1 else ""))
