"""Where everything sits in the kit frame: one pure function of the Spec.

The kit frame has its origin on the axle axis, x along the axle, z up when the
panel faces the zenith. Seen along +x the chassis stacks up as:

    base plate (top face at z = -axle.height)
    two axle supports (plates across the axle) standing on the base
    two stretchers between the supports, low down, at +-y, bracing them
    the turning frame between the supports: two ribs on the axle, the tray on
      the ribs, the panel in the rim layer(s) on the tray, the bezel on top
    outboard of the +x support: drive.wheel_spacers spacers, the wheel
      (drive.layers thick), a gap of drive.mount_gap, then the motor's face:
      the motor body sits in a box of plates (motor-mount, a plate with a
      body-shaped opening flush with the motor's face; motor-clamp, a back
      plate the motor's rear end butts against; two motor-brace side plates
      joining them, all standing in the base), so the motor's axial place is
      free and its shaft reaches the pinion whatever its length

All the numbers the part factories share are computed here, once, from a
resolved Spec (every derived key a number: see sheetgen/design/solver/, which
chooses them). Values pinned by hand that cannot work raise ParameterError.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from sheetgen.errors import ParameterError

PANEL_CLEARANCE_MM = 0.3  # per side, panel in its rim opening (common practice for a drop-in fit)
AXIAL_PLAY_MIN_MM = 0.5  # least end float of the axle between the supports
MOUNT_GAP_MM = 1.0  # least gap, gear face to motor mount
SHAFT_END_GAP_MM = 1.0  # least gap, motor shaft end to the drive-side support's face
PINION_GRIP_MIN_MM = 2.0  # least length of shaft inside the glued pinion stack ...
PINION_GRIP_SHEETS = 0.5  # ... and at least this share of one sheet (our rule)


def pinion_grip_mm(t_mm: float, layers: int) -> float:
    """Least length of motor shaft the pinion stack must grip: the whole stack
    when it is short, else max(2 mm, half a sheet); the layers are glued, so the
    teeth engage on the full face width either way."""
    return min(layers * t_mm, max(PINION_GRIP_MIN_MM, PINION_GRIP_SHEETS * t_mm))
ANCHOR_HOLE_MM = 4.5  # base holes to screw the kit down (M4 clearance, ISO 273 medium)

# -- the clamp stack: tray, rim layer(s) and bezel hold the panel ------------
# Sheets stack in whole thicknesses, so the rim stack meets the panel only when
# the panel is a whole number of sheets thick. CLAMP_TOL_MM is how far the stack
# may miss and still clamp by itself: the bolts pull the bezel down onto the
# panel by that much, an elastic bend of the bezel between the panel edge and
# the bolt line. 0.2 mm is the order of the thickness tolerance of the sheet
# stock itself (MDF and plywood of 2 to 6 mm are sold about +-0.2 mm: from memory),
# so a closer match is not worth more parts. Where the stack misses by more, one
# more rim layer lifts the bezel clear of the panel and spring fingers cut in the
# bezel bear on it. (A shim cut from the sheet is a whole sheet thick too: it only
# changes the stack in whole sheets, as the rim count already does, so it cannot
# take up the remainder; fingers can.) The fingers are sized for the gap plus
# CLAMP_TOL_MM, so they still bear on a panel that much thinner than nominal.
CLAMP_TOL_MM = 0.2
FINGER_SLOT_MM = 1.0  # the slot freeing a finger from the bezel (wider than any kerf: our rule)
FINGER_SAFETY = 2.0  # finger bending stress at most the sheet's bending strength / 2 (our rule)
# flexural modulus for the finger's stress, the high end of each material (a stiffer
# sheet is more stressed at the same deflection): all from memory
FLEX_MODULUS_MPA = {"mdf": 3500.0, "birch_plywood": 9000.0, "cast_acrylic": 3300.0}

# -- the keyed axle ---------------------------------------------------------------
# The axle carries one flat (D profile) from the -x rib to its +x end, so the
# ribs and the wheel key onto it and it still passes through them end-first.
# Size across the flat: 0.9 d, rounded to 0.1 mm (common practice for ground D
# shafts, e.g. 6 mm shafts with the flat 5.4 to 5.5 mm across: from memory).
AXLE_FLAT_SHARE = 0.9


def axle_flat_mm(diameter_mm: float) -> float:
    """Size across the axle's flat (D profile) for this diameter."""
    return round(AXLE_FLAT_SHARE * diameter_mm, 1)


def finger_length_mm(material: str, t_mm: float, deflection_mm: float) -> float:
    """Least length of a cantilever finger whose tip deflects ``deflection_mm``
    with the root stress within the sheet's bending strength / FINGER_SAFETY:
    tip deflection d = F L^3 / (3 E I) and root stress s = F L c / I with
    c = t / 2 give s = 3 E t d / (2 L^2) (Roark's Formulas for Stress and
    Strain, cantilever with an end load), so L = sqrt(1.5 E t d / s).
    Rounded up to whole mm."""
    from sheetgen.mechanics.materials import sheet_material

    allow = sheet_material(material).bending_strength_MPa / FINGER_SAFETY
    e = FLEX_MODULUS_MPA.get(material, max(FLEX_MODULUS_MPA.values()))  # a material not tabled: the stiffest
    return float(math.ceil(math.sqrt(1.5 * e * t_mm * deflection_mm / allow) - 1e-9))


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
    # drive
    wheel_spacers: int  # spacers between the +x support and the wheel
    wheel_x_mm: float  # inner face of the wheel stack
    gear_layers: int
    mount_gap_mm: float  # gear stack's outer face to the motor mount
    mount_x_mm: float  # inner face of the motor mount
    shaft_end_x_mm: float  # where the motor shaft ends (toward the +x support)
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
    # end stops (sheetgen/design/parts/stops.py): the stop arm on the axle outboard of the collar at -x,
    # turning in the plane of the fixed end stop; they meet at +-stop_angle_deg
    stop_x_mm: float = 0.0  # low-x face of the stop arm and of the end stop
    stop_angle_deg: float = 0.0  # the travel limit
    stop_half_angle_deg: float = 0.0  # half the arm's lug angle (its edges are radial)
    stop_hub_r_mm: float = 0.0  # the arm's hub round the axle
    stop_arm_r_mm: float = 0.0  # the arm's reach (outer end of its contact edges)
    stop_cut_r_mm: float = 0.0  # the end stop's cut-out round the axle (inner end of the contact)
    stop_gap_mm: float = 0.0  # gap between the arm and the end stop everywhere but at the contact faces
    stop_half_y_mm: float = 0.0  # the end stop's half width
    stop_top_z_mm: float = 0.0  # the end stop's top edge
    # polar axle (sheetgen/design/parts/wedge.py): the wedge under the base tilts the axle by tilt_deg
    tilt_deg: float = 0.0  # the axle's angle to the ground (0: the base stands on the ground)
    wedge_foot_mm: float = 0.0  # the wedge's height at its low (-x) end
    wedge_y_mm: float = 0.0  # outer face of the +y wedge plate (the other at -y)
    # the motor's box of plates (mount_x_mm is the motor's face and the mount plate's inner face)
    clamp_x_mm: float = 0.0  # inner face of the back plate (the motor's rear end)
    motor_web_mm: float = 0.0  # material between the body opening and a brace slot, and outside the slot
    mount_half_w_mm: float = 0.0  # half width (kit y) of the mount and clamp plates about the pinion axis
    mount_top_z_mm: float = 0.0  # top edge of the mount and clamp plates
    brace_y_mm: float = 0.0  # centre planes of the braces at pinion_y -+ this
    # the clamp stack (see CLAMP_TOL_MM): "stack" (the bezel bears on the panel itself)
    # or "fingers" (the bezel rests on the rim stack, its spring fingers bear on the panel)
    clamp_mode: str = "stack"
    bezel_z_mm: float = 0.0  # underside of the bezel
    clamp_gap_mm: float = 0.0  # fingers: how far each finger is pressed down onto the panel
    stack_gap_mm: float = 0.0  # stack: gap from the rim stack's top to the bezel, closed by the bolts
    finger_len_mm: float = 0.0
    finger_width_mm: float = 0.0
    finger_sides: tuple[str, ...] = ()  # window edges with a finger: "+y", "-y" (along x), "+x", "-x"
    # the keyed axle: size across the flat, and where the flat starts (it runs to axle_x1_mm)
    axle_flat_mm: float = 0.0
    axle_flat_x0_mm: float = 0.0

    @property
    def panel_z_mm(self) -> float:
        return self.tray_z_mm + self.t_mm

    @property
    def base_top_z_mm(self) -> float:
        return -self.axle_height_mm

    @property
    def stop_contact_mm(self) -> float:
        """Length of the line along which the arm's edge meets the end stop's face."""
        return self.stop_arm_r_mm - self.stop_cut_r_mm

    @property
    def stop_radius_mm(self) -> float:
        """Radius of the middle of the contact line (where the stop force acts, the pressure uniform)."""
        return 0.5 * (self.stop_arm_r_mm + self.stop_cut_r_mm)


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
    clamp = clamp_stack(spec, t, tray_z)
    rim_layers = clamp["rim_layers"]
    rib_x = W / 2 + (b - ledge) / 2
    rib_half_y = Hp / 2 + b - 2.0
    bolt = spec.frame.bolt_diameter_mm
    bolt_points: tuple[tuple[float, float], ...] = ()
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
    n_sp = spec.drive.wheel_spacers
    gap = spec.drive.mount_gap_mm
    wheel_x = support_x + t + n_sp * t  # support, then the spacer stack
    mount_x = wheel_x + layers * t + gap  # the motor's face, flush with the mount plate's inner face
    shaft_end = mount_x - spec.motor.shaft_length_mm
    grip = pinion_grip_mm(t, layers)
    if shaft_end > wheel_x + layers * t - grip + 1e-9:
        raise ParameterError(
            f"motor.shaft_length = {spec.motor.shaft_length_mm:g}: grips only "
            f"{max(0.0, wheel_x + layers * t - shaft_end):.3g} mm of the pinion stack (at least {grip:g} mm); "
            f"with drive.mount_gap = {gap:g} it must be at least {gap + grip:g} mm "
            "(or leave drive.mount_gap at \"auto\")")
    if shaft_end < support_x + t + SHAFT_END_GAP_MM - 1e-9:
        raise ParameterError(
            f"motor.shaft_length = {spec.motor.shaft_length_mm:g}: would reach within {SHAFT_END_GAP_MM:g} mm of the "
            f"drive-side axle support with drive.wheel_spacers = {n_sp} and drive.mount_gap = {gap:g}; must be at "
            f"most {mount_x - support_x - t - SHAFT_END_GAP_MM:g} mm (or leave those keys at \"auto\")")
    a = math.radians(spec.drive.pinion_angle_deg)
    pinion_y = centre_distance_mm * math.sin(a)
    pinion_z = -centre_distance_mm * math.cos(a)
    floor = motor_floor_height_mm(spec, centre_distance_mm)
    if H < floor - 1e-9:
        raise ParameterError(
            f"axle.height = {H:g}: the motor body would reach the base; must be at least "
            f"{math.ceil(floor * 10) / 10:g} mm (or turn the pinion with drive.pinion_angle)")
    web = motor_web_mm(t)
    half_w = mount_half_width_mm(spec, t, web, H + pinion_z)
    # the back plate at the motor's rear end; a motor shorter than two sheets leaves it a sheet's
    # room behind the mount plate for the braces (the body is then held by the mount's grip alone)
    clamp_x = mount_x + max(spec.motor.body_length_mm, 2 * t)
    base_half_y = max(support_half_y, abs(pinion_y) + half_w) + 10.0
    stop_x = -(support_x + 3 * t)  # outboard of the collar (which sits against the -x support)
    base_x0 = stop_x - STOP_BASE_END_MM
    base_x1 = clamp_x + t + 10.0
    stop = stop_geometry(spec, H, base_half_y)
    base_half_y = max(base_half_y, stop.need_base_half_y_mm)
    tilt = axle_tilt_deg(spec)
    wedge_y = 0.0
    if tilt > 0:
        # the wedge plates stand outside every slot the base already has
        base_half_y += t + WEDGE_EDGE_MM
        wedge_y = base_half_y - WEDGE_EDGE_MM
    return Layout(
        t_mm=t, axle_d_mm=d, axle_height_mm=H,
        tray_half_x_mm=W / 2 + b, tray_half_y_mm=Hp / 2 + b,
        window_half_x_mm=W / 2 - ledge, window_half_y_mm=Hp / 2 - ledge,
        rim_layers=rim_layers, tray_z_mm=tray_z, rib_x_mm=rib_x, rib_half_y_mm=rib_half_y, hub_r_mm=hub_r,
        bolt_points=bolt_points,
        support_x_mm=support_x, support_half_y_mm=support_half_y, support_hub_r_mm=support_hub_r,
        foot_h_mm=foot_h, stretcher_y_mm=stretcher_y, stretcher_h_mm=stretcher_h,
        spacers_per_side=spacers, axial_play_mm=play,
        wheel_spacers=n_sp, wheel_x_mm=wheel_x, gear_layers=layers, mount_gap_mm=gap, mount_x_mm=mount_x,
        shaft_end_x_mm=shaft_end,
        pinion_y_mm=pinion_y, pinion_z_mm=pinion_z, centre_distance_mm=centre_distance_mm,
        base_x0_mm=base_x0, base_x1_mm=base_x1, base_half_y_mm=base_half_y,
        axle_x0_mm=stop_x, axle_x1_mm=wheel_x + layers * t,
        stop_x_mm=stop_x, stop_angle_deg=stop.angle_deg, stop_half_angle_deg=stop.half_angle_deg,
        stop_hub_r_mm=stop.hub_r_mm, stop_arm_r_mm=stop.arm_r_mm, stop_cut_r_mm=stop.cut_r_mm,
        stop_gap_mm=STOP_GAP_MM, stop_half_y_mm=stop.half_y_mm, stop_top_z_mm=stop.top_z_mm,
        tilt_deg=tilt, wedge_foot_mm=max(2 * t, 8.0) if tilt > 0 else 0.0, wedge_y_mm=wedge_y,
        clamp_x_mm=clamp_x, motor_web_mm=web, mount_half_w_mm=half_w,
        mount_top_z_mm=pinion_z + spec.motor.body_height_mm / 2 + max(MOTOR_BODY_MARGIN_MM, web),
        brace_y_mm=spec.motor.body_width_mm / 2 + web + t / 2,
        clamp_mode=clamp["mode"], bezel_z_mm=clamp["bezel_z_mm"], clamp_gap_mm=clamp["clamp_gap_mm"],
        stack_gap_mm=clamp["stack_gap_mm"], finger_len_mm=clamp["finger_len_mm"],
        finger_width_mm=clamp["finger_width_mm"], finger_sides=clamp["finger_sides"],
        axle_flat_mm=axle_flat_mm(d), axle_flat_x0_mm=stop_x,  # the flat runs the whole rod
    )


def clamp_stack(spec, t: float, tray_z: float) -> dict:
    """Rim layers and how the bezel bears on the panel (see CLAMP_TOL_MM)."""
    p = spec.panel.thickness_mm
    panel_z = tray_z + t
    whole = math.floor(p / t + 1e-9)
    rest = p - whole * t
    out = {"finger_len_mm": 0.0, "finger_width_mm": 0.0, "finger_sides": (), "clamp_gap_mm": 0.0,
           "stack_gap_mm": 0.0}
    if whole >= 1 and rest <= CLAMP_TOL_MM + 1e-9:
        out.update(mode="stack", rim_layers=whole, bezel_z_mm=panel_z + p, stack_gap_mm=max(0.0, rest))
        return out
    rims = whole + 1
    gap = rims * t - p
    length = finger_length_mm(spec.sheet.material, t, gap + CLAMP_TOL_MM)
    ledge = spec.frame.ledge_mm
    width = min(ledge, max(t, 2.0))
    wx = spec.panel.width_mm / 2 - ledge  # window half sizes
    wy = spec.panel.height_mm / 2 - ledge
    margin = width + FINGER_SLOT_MM  # bezel material kept at each end of the edge
    sides = tuple(s for s, edge in (("+y", 2 * wx), ("-y", 2 * wx), ("+x", 2 * wy), ("-x", 2 * wy))
                  if length + FINGER_SLOT_MM + 2 * margin <= edge + 1e-9)
    if len(sides) < 2:
        lo, hi = whole * t, rims * t
        near = [v for v in (lo, hi) if 1.0 <= v <= 25.0]
        best = min(near, key=lambda v: abs(v - p)) if near else hi
        raise ParameterError(
            f"panel.thickness = {p:g}: the rim stack of {rims} x {t:g} mm sheets stands {gap:.2f} mm above the "
            f"panel, and the bezel's spring fingers would need {length:g} mm of window edge to press it down "
            f"within the sheet's bending strength; the window's edges are {2 * wx:.0f} and {2 * wy:.0f} mm; "
            f"must be a whole number of sheet.thickness (to {CLAMP_TOL_MM:g} mm), which the stack clamps by "
            f"itself: the nearest panel.thickness that builds is {best:g}")
    out.update(mode="fingers", rim_layers=rims, bezel_z_mm=panel_z + rims * t, clamp_gap_mm=gap,
               finger_len_mm=length, finger_width_mm=width, finger_sides=sides)
    return out


MOTOR_BODY_MARGIN_MM = 4.0  # mount plate material round the motor body
MOTOR_BASE_GAP_MM = 1.0  # least gap, mount plate to the base under the motor
MOTOR_WEB_MIN_MM = 2.0  # least web between two cuts of a motor plate ...
MOTOR_WEB_SHEETS = 0.5  # ... and at least this share of the sheet (common practice: a web of half the stock)


def motor_web_mm(t_mm: float) -> float:
    """Material left between the motor's body opening and a brace slot (and outside
    the slot) in the mount and clamp plates; also the braces' gap to the body."""
    return max(MOTOR_WEB_MIN_MM, MOTOR_WEB_SHEETS * t_mm)


MOUNT_WIDEN_MAX_MM = 40.0  # the mount plates grow for stiffness by at most this much per side ...
MOUNT_WIDEN_MAX_BODIES = 2.0  # ... or this many body widths, whichever is more (our rule)
MOUNT_WIDTH_STEP_MM = 0.5


def mount_half_width_mm(spec, t_mm: float, web_mm: float, lever_mm: float) -> float:
    """Half width of the mount and clamp plates about the pinion axis: the body, a web,
    the brace slot and a web each side, widened (up to MOUNT_WIDEN_MAX_MM or
    MOUNT_WIDEN_MAX_BODIES body widths a side, whichever is more) until the
    mount's stiffness check passes (sheetgen.mechanics.mount: the plate as a cantilever of
    length ``lever_mm``, delta = F L^3 / 3 E I within a share of the backlash, its least
    section the two strips beside the body opening, less the brace slots):
    I = (2 t / 3) [(w^3 - (a + t)^3) + (a^3 - b^3)], a = b + web, b = half the body width."""
    from sheetgen.mechanics.materials import sheet_material
    from sheetgen.mechanics.mount import MOUNT_BACKLASH_SHARE, worst_tooth_force_N

    b = spec.motor.body_width_mm / 2
    a = b + web_mm
    least = a + t_mm + web_mm
    limit = MOUNT_BACKLASH_SHARE * spec.drive.backlash_mm
    e = sheet_material(spec.sheet.material).modulus_MPa
    if limit <= 0 or e <= 0 or lever_mm <= 0:
        return least
    need_i = worst_tooth_force_N(spec) * lever_mm ** 3 / (3.0 * e * limit)
    w3 = need_i * 3.0 / (2.0 * t_mm) + (a + t_mm) ** 3 - a ** 3 + b ** 3
    w = math.ceil(w3 ** (1.0 / 3.0) / MOUNT_WIDTH_STEP_MM - 1e-9) * MOUNT_WIDTH_STEP_MM
    return min(max(least, w), least + max(MOUNT_WIDEN_MAX_MM, MOUNT_WIDEN_MAX_BODIES * spec.motor.body_width_mm))


def motor_floor_height_mm(spec, centre_distance_mm: float) -> float:
    """Least axle height that keeps the motor mount's plate round the motor body
    clear of the base: the pinion sits centre_distance from the axle, toward
    drive.pinion_angle from straight down."""
    pinion_z = -centre_distance_mm * math.cos(math.radians(spec.drive.pinion_angle_deg))
    margin = max(MOTOR_BODY_MARGIN_MM, motor_web_mm(spec.sheet.thickness_mm))
    body = -(pinion_z - spec.motor.body_height_mm / 2 - margin) + MOTOR_BASE_GAP_MM
    # the pinion's tip circle off the base too: d_a = m (z + 2 + 2x) (ISO 21771, the tip not shortened)
    d = spec.drive
    tip_r = d.module_mm * (d.pinion_teeth + 2.0 + 2.0 * d.pinion_shift) / 2.0
    return max(body, -(pinion_z - tip_r) + MOTOR_BASE_GAP_MM)


# ---------------------------------------------------------------------------
# end stops

STOP_GAP_MM = 2.0  # the arm's gap to the end stop away from the contact faces (our rule)
STOP_HALF_ANGLE_DEG = 15.0  # the arm's lug spans 30 deg, its edges radial (our rule)
STOP_BASE_END_MM = 14.0  # base material beyond the end stop's slots, clear of the anchor holes
STOP_BASE_EDGE_MM = 5.0  # base material beside the end stop's foot


def stop_material_mm(t_mm: float) -> float:
    """Sheet material left round the end stop's cut-out and the contact face (our rule)."""
    return max(2.0 * t_mm, 6.0)


def stop_min_contact_mm(t_mm: float) -> float:
    """Shortest contact line the stop rule accepts (our rule)."""
    return max(2.0 * t_mm, 6.0)


@dataclass(frozen=True)
class StopGeometry:
    angle_deg: float
    half_angle_deg: float
    hub_r_mm: float
    cut_r_mm: float
    arm_r_mm: float
    half_y_mm: float
    top_z_mm: float
    need_base_half_y_mm: float


def stop_hub_r_mm(spec) -> float:
    """The stop arm's hub round the axle, as the ribs' (sheetgen/design/parts/frame.py)."""
    t, d = spec.sheet.thickness_mm, spec.axle.diameter_mm
    return d / 2 + max(2.5 * t, 0.75 * d, 5.0)


def stop_cut_r_mm(spec) -> float:
    """Radius of the end stop's cut-out round the axle: clear of the arm's hub and the collar."""
    t, d = spec.sheet.thickness_mm, spec.axle.diameter_mm
    collar_r = d / 2 + max(4.0, 1.5 * t)
    return max(stop_hub_r_mm(spec), collar_r) + STOP_GAP_MM


def _stop_reach_below_mm(spec) -> float:
    """What the arm must keep below it: the end stop's bottom bar (with its gap), and
    frame.clearance to the base (the arm turns with the frame)."""
    return max(STOP_GAP_MM + stop_material_mm(spec.sheet.thickness_mm), spec.frame.clearance_mm)


def stop_floor_height_mm(spec) -> float:
    """Least axle height that leaves the stop arm its shortest contact line."""
    return stop_cut_r_mm(spec) + stop_min_contact_mm(spec.sheet.thickness_mm) + _stop_reach_below_mm(spec)


def stop_geometry(spec, height_mm: float, base_half_y_mm: float) -> StopGeometry:
    """The stop arm and the end stop, seen along the axle (+x), the arm's lug pointing down at rest.

    The lug's edges are radial at +-STOP_HALF_ANGLE_DEG from straight down; the end stop's faces
    are radial at +-(site.travel_limit + STOP_HALF_ANGLE_DEG), so an edge lies on its face exactly
    at +-site.travel_limit, along the line from the cut-out radius to the arm's reach. The arm
    reaches as far as the base allows (frame.clearance and the end stop's bottom bar below it, the
    end stop's width within the base); the base is widened only when the shortest contact line
    would not fit it."""
    t = spec.sheet.thickness_mm
    limit = spec.site.travel_limit_deg
    phi = STOP_HALF_ANGLE_DEG
    beta = math.radians(limit + phi)
    s_beta = math.sin(beta) if limit + phi < 90.0 else 1.0
    m = stop_material_mm(t)
    cut_r = stop_cut_r_mm(spec)
    lowest = cut_r + stop_min_contact_mm(t)
    by_height = height_mm - _stop_reach_below_mm(spec)
    if by_height < lowest - 1e-9:
        raise ParameterError(
            f"axle.height = {height_mm:g}: leaves no room for the end stops below the axle; must be at least "
            f"{math.ceil(stop_floor_height_mm(spec) * 10) / 10:g} mm (or leave it at \"auto\")")
    by_width = (base_half_y_mm - STOP_BASE_EDGE_MM - m) / s_beta - STOP_GAP_MM
    arm_r = min(by_height, max(by_width, lowest))
    half_y = (arm_r + STOP_GAP_MM) * s_beta + m
    if limit + phi < 90.0:
        top_z = m
    else:
        top_z = (arm_r + STOP_GAP_MM) * abs(math.cos(beta)) + m
    return StopGeometry(limit, phi, stop_hub_r_mm(spec), cut_r, arm_r, half_y, top_z,
                        half_y + STOP_BASE_EDGE_MM)


# ---------------------------------------------------------------------------
# polar axle

WEDGE_EDGE_MM = 4.0  # base material outside the wedge plates


def axle_tilt_deg(spec) -> float:
    """The axle's angle to the ground: the latitude (either hemisphere) for a polar axle, else 0."""
    return abs(spec.site.latitude_deg) if spec.site.axle == "polar" else 0.0
