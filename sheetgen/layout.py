"""Where everything sits in the kit frame: one pure function of the Spec.

The kit frame has its origin on the axle axis, x along the axle, z up when the
panel faces the zenith. Seen along +x the chassis stacks up as:

    base plate (top face at z = -axle.height)
    two axle supports (plates across the axle) standing on the base
    two stretchers between the supports, low down, at +-y, bracing them
    the turning frame between the supports: two ribs on the axle, the tray on
      the ribs, the panel in the rim layer(s) on the tray, the bezel on top
    outboard of the +x support: a spacer, the wheel (drive.layers thick),
      then the motor mount with the motor behind it, its pinion meshing with
      the wheel

All the numbers the part factories share are computed here, once.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from sheetgen.errors import ParameterError

PANEL_CLEARANCE_MM = 0.3  # per side, panel in its rim opening (common practice for a drop-in fit)
AXIAL_PLAY_MIN_MM = 0.5  # least end float of the axle between the supports
MOUNT_GAP_MM = 1.0  # gear face to motor mount
ANCHOR_HOLE_MM = 4.5  # base holes to screw the kit down (M4 clearance, ISO 273 medium)


@dataclass(frozen=True)
class Layout:
    t_mm: float  # sheet thickness
    axle_d_mm: float
    axle_height_mm: float
    # turning frame
    tray_half_x_mm: float
    tray_half_y_mm: float
    window_half_x_mm: float
    window_half_y_mm: float
    rim_layers: int
    tray_z_mm: float  # underside of the tray = top edge of the ribs
    rib_x_mm: float  # centre plane of the +x rib (the other at -x)
    rib_half_y_mm: float
    hub_r_mm: float  # material radius around the axle in ribs
    bolt_points: tuple[tuple[float, float], ...]
    # fixed frame
    support_x_mm: float  # inner face of the +x support (the other at -x)
    support_half_y_mm: float  # foot half width
    support_hub_r_mm: float
    foot_h_mm: float
    stretcher_y_mm: float  # centre plane of the +y stretcher
    stretcher_h_mm: float
    spacers_per_side: int
    axial_play_mm: float
    shaft_through_support: bool  # the motor shaft reaches into the +x support (it gets a clearance hole)
    # drive
    wheel_x_mm: float  # inner face of the wheel stack
    gear_layers: int
    mount_x_mm: float  # inner face of the motor mount
    pinion_y_mm: float
    pinion_z_mm: float
    centre_distance_mm: float
    # base
    base_x0_mm: float
    base_x1_mm: float
    base_half_y_mm: float
    # axle rod
    axle_x0_mm: float
    axle_x1_mm: float

    @property
    def panel_z_mm(self) -> float:
        return self.tray_z_mm + self.t_mm

    @property
    def base_top_z_mm(self) -> float:
        return -self.axle_height_mm


def compute_layout(spec, centre_distance_mm: float) -> Layout:
    t = spec.sheet.thickness_mm
    W, Hp = spec.panel.width_mm, spec.panel.height_mm
    b, ledge = spec.frame.border_mm, spec.frame.ledge_mm
    d = spec.axle.diameter_mm
    H = spec.axle.height_mm

    if b + ledge < t + 3:
        raise ParameterError(
            f"frame.border + frame.ledge = {b + ledge:g} mm: must be at least sheet.thickness + 3 = {t + 3:g} mm "
            "so the rib slots keep material around them")
    hub_r = d / 2 + max(2.5 * t, 0.75 * d, 5.0)
    tray_z = hub_r
    rim_layers = max(1, math.ceil(spec.panel.thickness_mm / t - 1e-9))
    rib_x = W / 2 + (b - ledge) / 2
    rib_half_y = Hp / 2 + b - 2.0
    bolt = spec.frame.bolt_diameter_mm
    bolt_points = ()
    if bolt > 0:
        yb = Hp / 2 + b / 2
        bolt_points = tuple((sx * W / 4, sy * yb) for sx in (-1, 1) for sy in (-1, 1))

    support_x = W / 2 + b + spec.frame.clearance_mm
    span = support_x - (rib_x + t / 2)  # rib outer face to support inner face
    spacers = max(0, math.floor((span - AXIAL_PLAY_MIN_MM) / t))
    play = span - spacers * t
    support_hub_r = d / 2 + max(2.5 * t, 6.0)
    stretcher_h = min(max(0.3 * H, 12.0), 40.0)
    foot_h = stretcher_h + max(2 * t, 6.0)
    support_half_y = max(0.5 * H, support_hub_r + 10.0, 30.0, Hp / 2 * 0.6)
    stretcher_y = support_half_y - t / 2 - max(2 * t, 6.0)

    layers = spec.drive.layers
    wheel_x = support_x + 2 * t  # support, then one spacer
    mount_x = wheel_x + layers * t + MOUNT_GAP_MM
    need_shaft = t + MOUNT_GAP_MM + layers * t
    if spec.motor.shaft_length_mm < need_shaft - 1e-9:
        raise ParameterError(
            f"motor.shaft_length = {spec.motor.shaft_length_mm:g}: too short to carry the pinion through the mount; "
            f"must be at least {need_shaft:g} mm (sheet.thickness + {MOUNT_GAP_MM:g} mm gap + drive.layers x sheet.thickness)")
    # beyond the pinion the shaft may run on through the spacer's gap and a clearance hole
    # in the +x support (cut when it needs one), but never into the turning frame
    shaft_free = need_shaft + t  # mount face to the support's outer face
    shaft_max = shaft_free + t  # to the support's inner face
    if spec.motor.shaft_length_mm > shaft_max + 1e-9:
        raise ParameterError(
            f"motor.shaft_length = {spec.motor.shaft_length_mm:g}: the shaft would reach past the axle support "
            f"into the turning frame; must be at most {shaft_max:g} mm (shorten the shaft, or raise drive.layers)")
    a = math.radians(spec.drive.pinion_angle_deg)
    pinion_y = centre_distance_mm * math.sin(a)
    pinion_z = -centre_distance_mm * math.cos(a)
    body_bottom = pinion_z - spec.motor.body_height_mm / 2 - 4.0
    if body_bottom < -H + 1.0:
        raise ParameterError(
            f"axle.height = {H:g}: the motor body would reach the base; must be at least "
            f"{math.ceil((-(pinion_z - spec.motor.body_height_mm / 2 - 4.0) + 1.0) * 10) / 10:g} mm "
            "(or turn the pinion with drive.pinion_angle)")
    base_half_y = max(support_half_y, abs(pinion_y) + spec.motor.body_width_mm / 2 + 4.0) + 10.0
    base_x0 = -(support_x + 2 * t) - 10.0
    base_x1 = mount_x + t + spec.motor.body_length_mm + 5.0
    return Layout(
        t_mm=t, axle_d_mm=d, axle_height_mm=H,
        tray_half_x_mm=W / 2 + b, tray_half_y_mm=Hp / 2 + b,
        window_half_x_mm=W / 2 - ledge, window_half_y_mm=Hp / 2 - ledge,
        rim_layers=rim_layers, tray_z_mm=tray_z, rib_x_mm=rib_x, rib_half_y_mm=rib_half_y, hub_r_mm=hub_r,
        bolt_points=bolt_points,
        support_x_mm=support_x, support_half_y_mm=support_half_y, support_hub_r_mm=support_hub_r,
        foot_h_mm=foot_h, stretcher_y_mm=stretcher_y, stretcher_h_mm=stretcher_h,
        spacers_per_side=spacers, axial_play_mm=play,
        shaft_through_support=spec.motor.shaft_length_mm > shaft_free + 1e-9,
        wheel_x_mm=wheel_x, gear_layers=layers, mount_x_mm=mount_x,
        pinion_y_mm=pinion_y, pinion_z_mm=pinion_z, centre_distance_mm=centre_distance_mm,
        base_x0_mm=base_x0, base_x1_mm=base_x1, base_half_y_mm=base_half_y,
        axle_x0_mm=-(support_x + 2 * t), axle_x1_mm=wheel_x + layers * t,
    )
