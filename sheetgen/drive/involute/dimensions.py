"""The involute function and the standard dimensions of a spur gear: radii,
tooth thickness, span and pin measurements, undercut limits, working pressure angle.

The tooth form is the one a generating rack cuts. The rack is the ISO 53 basic
rack (addendum 1.00 m, dedendum 1.25 m, root fillet 0.38 m; ISO 53:1998, from
memory), rolled without slip on the reference (pitch) circle, its datum line
moved out by the profile shift x m. Where the rack tip is too narrow for a
0.38 m fillet (pressure angles above about 23.1 deg) the tip is a full round.
"""

from __future__ import annotations

import math

import numpy as np


# ISO 53 basic rack, in modules (ISO 53:1998, profile A; from memory).
RACK_ADDENDUM = 1.00      # gear addendum h_aP / m
RACK_DEDENDUM = 1.25      # gear dedendum h_fP / m (the rack tip that cuts the root)
RACK_ROOT_FILLET = 0.38   # rack tip fillet radius rho_fP / m


# --------------------------------------------------------------------------
# involute function and standard dimensions
# --------------------------------------------------------------------------

def inv(alpha_rad):
    """The involute function inv(a) = tan(a) - a (scalar or numpy array)."""
    return np.tan(alpha_rad) - alpha_rad if isinstance(alpha_rad, np.ndarray) else math.tan(alpha_rad) - alpha_rad


def inv_inverse(value: float) -> float:
    """The angle a in [0, pi/2) with tan(a) - a = value (value >= 0).

    Newton's method from t0 = (3 v)^(1/3), which lies at or right of the root
    because tan t - t >= t^3 / 3; on the convex, increasing function Newton
    then converges monotonically."""
    if value < 0:
        raise ValueError(f"inv_inverse({value}): the involute function is never negative")
    if value == 0:
        return 0.0
    t = min((3.0 * value) ** (1.0 / 3.0), math.pi / 2 - 1e-9)
    for _ in range(100):
        f = math.tan(t) - t - value
        step = f / math.tan(t) ** 2
        t -= step
        if abs(step) < 1e-15:
            break
    return t


def pitch_radius_mm(module_mm: float, teeth: int) -> float:
    return module_mm * teeth / 2.0


def base_radius_mm(module_mm: float, teeth: int, pressure_angle_deg: float) -> float:
    return module_mm * teeth * math.cos(math.radians(pressure_angle_deg)) / 2.0


def tip_radius_mm(module_mm: float, teeth: int, shift: float = 0.0) -> float:
    """Tip radius m (z + 2 + 2x) / 2 (no tip shortening)."""
    return module_mm * (teeth + 2.0 * RACK_ADDENDUM + 2.0 * shift) / 2.0


def root_radius_mm(module_mm: float, teeth: int, shift: float = 0.0) -> float:
    """Root radius m (z - 2.5 + 2x) / 2, cut by the rack tip line."""
    return module_mm * (teeth - 2.0 * RACK_DEDENDUM + 2.0 * shift) / 2.0


def pitch_tooth_thickness_mm(module_mm: float, pressure_angle_deg: float, shift: float = 0.0,
                             backlash_mm: float = 0.0) -> float:
    """Arc tooth thickness at the reference circle: m (pi/2 + 2 x tan a) - backlash."""
    a = math.radians(pressure_angle_deg)
    return module_mm * (math.pi / 2.0 + 2.0 * shift * math.tan(a)) - backlash_mm


def tooth_thickness_at_radius_mm(module_mm: float, teeth: int, pressure_angle_deg: float, shift: float,
                                 radius_mm: float, backlash_mm: float = 0.0) -> float:
    """Arc tooth thickness at radius r: s_r = r (s / r_p + 2 (inv a - inv a_r)), cos a_r = r_b / r."""
    a = math.radians(pressure_angle_deg)
    rp = pitch_radius_mm(module_mm, teeth)
    rb = rp * math.cos(a)
    if radius_mm < rb:
        raise ValueError(f"radius {radius_mm} mm is inside the base circle ({rb} mm)")
    s = pitch_tooth_thickness_mm(module_mm, pressure_angle_deg, shift, backlash_mm)
    ar = math.acos(rb / radius_mm)
    return radius_mm * (s / rp + 2.0 * (inv(a) - inv(ar)))


def span_over_teeth_mm(module_mm: float, teeth: int, pressure_angle_deg: float, shift: float, k: int,
                       backlash_mm: float = 0.0) -> float:
    """Base tangent length over k teeth (ISO 21771):
    W = m cos a [pi (k - 0.5) + z inv a] + 2 x m sin a, less backlash * cos a for thinned teeth."""
    a = math.radians(pressure_angle_deg)
    return (module_mm * math.cos(a) * (math.pi * (k - 0.5) + teeth * inv(a))
            + 2.0 * shift * module_mm * math.sin(a) - backlash_mm * math.cos(a))


def span_contact_radius_mm(module_mm: float, teeth: int, pressure_angle_deg: float, shift: float, k: int,
                           backlash_mm: float = 0.0) -> float:
    """Radius at which the caliper jaws touch the flanks when measuring the span over k teeth."""
    rb = base_radius_mm(module_mm, teeth, pressure_angle_deg)
    w = span_over_teeth_mm(module_mm, teeth, pressure_angle_deg, shift, k, backlash_mm)
    return math.hypot(rb, w / 2.0)


def span_teeth_k(teeth: int, pressure_angle_deg: float, shift: float = 0.0) -> int:
    """The usual number of teeth to span: the k whose jaws touch the flanks
    nearest the radius r + x m (the reference circle for unshifted gears)."""
    best_k, best_err = 1, math.inf
    target = pitch_radius_mm(1.0, teeth) + shift
    for k in range(1, max(2, teeth)):
        err = abs(span_contact_radius_mm(1.0, teeth, pressure_angle_deg, shift, k) - target)
        if err < best_err:
            best_k, best_err = k, err
    return best_k


def pin_centre_angle_rad(module_mm: float, teeth: int, pressure_angle_deg: float, shift: float,
                         pin_diameter_mm: float, backlash_mm: float = 0.0) -> float:
    """Pressure angle at the pin centre when a pin of this size sits in a tooth space:
    inv(phi) = d_p / (m z cos a) - pi / (2 z) + inv a + 2 x tan a / z - backlash / (m z)."""
    a = math.radians(pressure_angle_deg)
    v = (pin_diameter_mm / (module_mm * teeth * math.cos(a)) - math.pi / (2.0 * teeth) + inv(a)
         + 2.0 * shift * math.tan(a) / teeth - backlash_mm / (module_mm * teeth))
    return inv_inverse(v)


def dimension_over_pins_mm(module_mm: float, teeth: int, pressure_angle_deg: float, shift: float,
                           pin_diameter_mm: float, backlash_mm: float = 0.0) -> float:
    """Measurement over two pins (ISO 21771 / handbook formula):
    even z: M = d_b / cos(phi) + d_p; odd z: M = d_b cos(pi / 2z) / cos(phi) + d_p."""
    phi = pin_centre_angle_rad(module_mm, teeth, pressure_angle_deg, shift, pin_diameter_mm, backlash_mm)
    db = 2.0 * base_radius_mm(module_mm, teeth, pressure_angle_deg)
    centre = db / math.cos(phi)
    if teeth % 2:
        centre *= math.cos(math.pi / (2.0 * teeth))
    return centre + pin_diameter_mm


def pin_contact_radius_mm(module_mm: float, teeth: int, pressure_angle_deg: float, shift: float,
                          pin_diameter_mm: float, backlash_mm: float = 0.0) -> float:
    """Radius at which a pin of this size touches the flanks."""
    phi = pin_centre_angle_rad(module_mm, teeth, pressure_angle_deg, shift, pin_diameter_mm, backlash_mm)
    rb = base_radius_mm(module_mm, teeth, pressure_angle_deg)
    roll = math.tan(phi) - pin_diameter_mm / (2.0 * rb)
    return rb * math.sqrt(1.0 + roll * roll) if roll > 0 else rb


def ideal_pin_diameter_mm(module_mm: float, teeth: int, pressure_angle_deg: float, shift: float,
                          backlash_mm: float = 0.0, contact_radius_mm: float | None = None) -> float:
    """Pin diameter that touches the flanks at contact_radius_mm (default r + x m).

    The pin centre lies on the base tangent through the contact point, a pin
    radius further out: tan(phi) = tan(a_c) + d_p / d_b, which with the pin
    formula gives phi = tan(a_c) - C, C = inv a + 2 x tan a / z - pi / 2z - backlash / (m z)."""
    a = math.radians(pressure_angle_deg)
    rb = base_radius_mm(module_mm, teeth, pressure_angle_deg)
    rc = pitch_radius_mm(module_mm, teeth) + shift * module_mm if contact_radius_mm is None else contact_radius_mm
    gamma_c = math.sqrt(max(rc * rc / (rb * rb) - 1.0, 0.0))
    c = (inv(a) + 2.0 * shift * math.tan(a) / teeth - math.pi / (2.0 * teeth)
         - backlash_mm / (module_mm * teeth))
    phi = gamma_c - c
    return 2.0 * rb * (math.tan(phi) - gamma_c)


def undercut_limit_teeth(pressure_angle_deg: float, shift: float = 0.0) -> float:
    """Fewest teeth cut without undercut by a rack with 1.0 m of straight flank
    below its datum: z_min = 2 (1 - x) / sin^2 a (2 / sin^2 a = 17.1 at 20 deg)."""
    s = math.sin(math.radians(pressure_angle_deg))
    return 2.0 * (1.0 - shift) / (s * s)


def min_shift_no_undercut(teeth: int, pressure_angle_deg: float) -> float:
    """Smallest profile shift that avoids undercut: x_min = 1 - z sin^2 a / 2."""
    s = math.sin(math.radians(pressure_angle_deg))
    return 1.0 - teeth * s * s / 2.0


def rack_min_shift_no_undercut(teeth: int, pressure_angle_deg: float) -> float:
    """Smallest shift for which the rack actually used here (ISO 53, 0.38 m tip
    fillet or a full round above about 23.1 deg) does not undercut:
    x = h_s - z sin^2 a / 2 with h_s = 1.25 - rho (1 - sin a) / m the depth of the
    rack's straight flank below its datum (h_s = 1.00 at 20 deg)."""
    a = math.radians(pressure_angle_deg)
    sa = math.sin(a)
    half_tip = math.pi / 4.0 - RACK_DEDENDUM * math.tan(a)
    rho = max(0.0, min(RACK_ROOT_FILLET, half_tip * math.cos(a) / (1.0 - sa)))
    return RACK_DEDENDUM - rho * (1.0 - sa) - teeth * sa * sa / 2.0


def working_pressure_angle_rad(pressure_angle_deg: float, z1: int, z2: int, x1: float = 0.0,
                               x2: float = 0.0) -> float:
    """inv(a_w) = inv(a) + 2 tan(a) (x1 + x2) / (z1 + z2) (zero-backlash mesh of shifted gears)."""
    a = math.radians(pressure_angle_deg)
    if x1 + x2 == 0:
        return a
    v = inv(a) + 2.0 * math.tan(a) * (x1 + x2) / (z1 + z2)
    if v <= 0:
        raise ValueError(f"shifts x1 + x2 = {x1 + x2}: no working pressure angle")
    return inv_inverse(v)
