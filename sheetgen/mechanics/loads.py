"""Torques at the axle and through the drive, tooth stress, tipping.

Each model states its assumptions; the sources are named beside the constants.
All functions are pure: numbers in, numbers out. Units are in the names.

Gravity: a rotating assembly with static unbalance U (g·mm) whose CG sits at
angle psi from the upward vertical (right-handed about the axle, +x) feels
T = U g cos(tilt) sin(psi) about the axle; tilt is the axle's tilt from
horizontal (0 for a horizontal axle, the latitude for a polar one). Turning
the frame by theta makes psi = psi0 + theta.

Friction: the axle turns in plain holes in the sheet. T = mu N r, N the radial
load on the holes, r the axle radius (Coulomb friction on a journal, the usual
plain-bearing estimate; common practice). The coefficient is ``axle.friction``
(default 0.35 for dry steel on wood, common practice).

Wind: F = 0.5 rho v^2 Cd A on the panel and frame, rho = 1.225 kg/m3 (ISA sea
level, ISO 2533), Cd = 1.17 (flat plate square to the flow, Hoerner,
Fluid-Dynamic Drag, ch. 3). Its moment about the axle is F times the
eccentricity of the centre of pressure from the axle. Square to the flow the
centre of pressure sits at the plate's centroid; at oblique flow it moves
toward the leading edge, to about the quarter chord at small incidence
(thin-aerofoil result; common practice). We take the full square-on force
together with the centroid offset plus a quarter chord: an upper bound, since
the force is far smaller by the time the centre has moved that far.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from sheetgen.mechanics.teeth import lewis_stress_MPa

G_M_S2 = 9.80665  # standard acceleration of gravity (CGPM 1901; ISO 80000-3)
AIR_DENSITY_KG_M3 = 1.225  # ISA sea level, ISO 2533
FLAT_PLATE_CD = 1.17  # flat plate normal to the flow, Hoerner, Fluid-Dynamic Drag, ch. 3
CP_SHIFT_CHORDS = 0.25  # allowance for the centre of pressure moving at oblique flow (quarter chord)
DEG_H_PER_RPM = 360.0 * 60.0  # one turn per minute in degrees per hour


# ---------------------------------------------------------------------------
# gravity


def gravity_torque_Nm(unbalance_gmm: float, cg_angle_deg: float, tilt_deg: float) -> float:
    """T = U g cos(tilt) sin(psi), U in g·mm -> kg·m (1e-6)."""
    return unbalance_gmm * 1e-6 * G_M_S2 * math.cos(math.radians(tilt_deg)) * math.sin(math.radians(cg_angle_deg))


def max_abs_sin_deg(lo_deg: float, hi_deg: float) -> tuple[float, float]:
    """max |sin a| for a in [lo, hi] and an angle where it is reached."""
    if hi_deg < lo_deg:
        lo_deg, hi_deg = hi_deg, lo_deg
    k = math.ceil((lo_deg - 90.0) / 180.0)
    peak = 90.0 + 180.0 * k
    if peak <= hi_deg:
        return 1.0, peak
    a, b = abs(math.sin(math.radians(lo_deg))), abs(math.sin(math.radians(hi_deg)))
    return (a, lo_deg) if a >= b else (b, hi_deg)


def gravity_torque_max_Nm(unbalance_gmm: float, cg_angle_deg: float, tilt_deg: float,
                          range_deg: tuple[float, float]) -> tuple[float, float]:
    """Largest |gravity torque| while the frame turns through ``range_deg``,
    and the frame rotation where it occurs."""
    s, psi = max_abs_sin_deg(cg_angle_deg + range_deg[0], cg_angle_deg + range_deg[1])
    t = unbalance_gmm * 1e-6 * G_M_S2 * abs(math.cos(math.radians(tilt_deg))) * s
    return t, psi - cg_angle_deg


# ---------------------------------------------------------------------------
# friction


def friction_torque_Nm(friction: float, radial_load_N: float, axle_diameter_mm: float) -> float:
    """T = mu N r (journal in a plain hole)."""
    return friction * radial_load_N * axle_diameter_mm / 2.0 * 1e-3


# ---------------------------------------------------------------------------
# wind


def drag_force_N(speed_m_s: float, area_m2: float, cd: float = FLAT_PLATE_CD,
                 air_density_kg_m3: float = AIR_DENSITY_KG_M3) -> float:
    """F = 0.5 rho v^2 Cd A."""
    return 0.5 * air_density_kg_m3 * speed_m_s ** 2 * cd * area_m2


def wind_eccentricity_mm(centroid_offset_mm: float, chord_mm: float) -> float:
    """Arm of the wind force about the axle: the plate centroid's offset across
    the axle plus the allowance of CP_SHIFT_CHORDS chord."""
    return abs(centroid_offset_mm) + CP_SHIFT_CHORDS * chord_mm


# ---------------------------------------------------------------------------
# drive


@dataclass(frozen=True)
class DriveFigures:
    gear_ratio: float
    mesh_efficiency: float
    motor_torque_required_Nm: float
    motor_torque_available_Nm: float
    torque_margin: float  # available / required (>= 1 passes)
    motor_speed_at_load_rpm: float  # on the straight torque-speed line
    output_speed_deg_h: float  # axle speed while the motor runs against the load
    output_speed_no_load_deg_h: float


def drive_figures(load_torque_Nm: float, pinion_teeth: int, wheel_teeth: int, efficiency: float,
                  stall_torque_Nm: float, usable_fraction: float, no_load_speed_rpm: float) -> DriveFigures:
    """Motor torque needed for the axle load through the gear pair, torque the
    motor offers (stall x usable fraction), and the axle speed.

    Required = load / (ratio x efficiency). ``efficiency`` is drive.efficiency
    (default 0.85: our allowance for a laser-cut pair running dry, below the
    0.98 or so of a machined spur mesh, from memory). The usable fraction of
    stall torque (motor.usable_fraction, 0.2 to 0.5 as common practice) keeps
    the motor on the efficient, cool part of its curve. The motor's speed falls
    on a straight line from no-load speed to zero at stall (permanent-magnet
    DC motor; common practice)."""
    ratio = wheel_teeth / pinion_teeth
    required = load_torque_Nm / (ratio * efficiency)
    available = stall_torque_Nm * usable_fraction
    margin = available / required if required > 0 else math.inf
    speed = max(0.0, no_load_speed_rpm * (1.0 - required / stall_torque_Nm))
    return DriveFigures(
        gear_ratio=ratio,
        mesh_efficiency=efficiency,
        motor_torque_required_Nm=required,
        motor_torque_available_Nm=available,
        torque_margin=margin,
        motor_speed_at_load_rpm=speed,
        output_speed_deg_h=speed / ratio * DEG_H_PER_RPM,
        output_speed_no_load_deg_h=no_load_speed_rpm / ratio * DEG_H_PER_RPM,
    )


# ---------------------------------------------------------------------------
# pulsed drive


def capacitor_energy_J(capacitance_uF: float, voltage_V: float) -> float:
    """E = C V^2 / 2. What one pulse does with it is worked out in time by
    sheetgen.mechanics.pulse."""
    return 0.5 * capacitance_uF * 1e-6 * voltage_V ** 2



# ---------------------------------------------------------------------------
# tooth stress


@dataclass(frozen=True)
class ToothFigures:
    face_width_mm: float
    pinion_force_N: float
    wheel_force_N: float
    pinion_stress_MPa: float
    wheel_stress_MPa: float
    stress_MPa: float  # the weaker gear's
    weaker_gear: str
    allowable_MPa: float
    stall_stress_MPa: float  # pinion stress if the motor stalls at full stall torque


def tooth_figures(axle_torque_Nm: float, motor_torque_Nm: float, module_mm: float, pinion_teeth: int,
                  wheel_teeth: int, face_width_mm: float, bending_strength_MPa: float, safety: float,
                  stall_torque_Nm: float) -> ToothFigures:
    """Lewis bending stress sigma = F_t / (b m Y) in each gear.

    The tangential force at the pitch circle is the torque over the pitch
    radius m z / 2: the wheel carries the axle torque, the pinion the motor
    torque (larger than the wheel's force by the mesh loss). Allowable = the
    material's bending strength / ``check.tooth_safety``."""
    r_p_m = module_mm * pinion_teeth / 2.0 * 1e-3
    r_w_m = module_mm * wheel_teeth / 2.0 * 1e-3
    f_p = motor_torque_Nm / r_p_m
    f_w = axle_torque_Nm / r_w_m
    s_p = lewis_stress_MPa(f_p, face_width_mm, module_mm, pinion_teeth)
    s_w = lewis_stress_MPa(f_w, face_width_mm, module_mm, wheel_teeth)
    s_stall = lewis_stress_MPa(stall_torque_Nm / r_p_m, face_width_mm, module_mm, pinion_teeth)
    weaker = "pinion" if s_p >= s_w else "wheel"
    return ToothFigures(face_width_mm, f_p, f_w, s_p, s_w, max(s_p, s_w), weaker,
                        bending_strength_MPa / safety, s_stall)


# ---------------------------------------------------------------------------
# tipping


@dataclass(frozen=True)
class TippingFigures:
    wind_force_N: float
    force_height_mm: float  # height of the pressure centre above the ground (upper bound)
    cg_lever_mm: float  # horizontal distance from the kit's CG to the lee edge of the base
    uplift_lever_mm: float  # horizontal distance from the pressure centre to the lee edge (upper bound)
    ballast_lever_mm: float  # horizontal distance from the ballast (base centre) to the lee edge
    overturning_Nm: float  # wind moment about the lee edge, times the safety factor
    restoring_Nm: float  # kit weight alone
    ballast_kg: float  # extra mass at the base centre needed (0 if none)
    worst_rotation_deg: float


def tipping_figures(wind_force_N: float, force_height_mm: float, kit_mass_kg: float, cg_lever_mm: float,
                    uplift_lever_mm: float, ballast_lever_mm: float, safety: float,
                    range_deg: tuple[float, float]) -> TippingFigures:
    """Ballast so that the kit does not tip about the lee edge of its base.

    The wind force F acts square to the panel wherever the frame points in
    its range (a flat plate's force stays close to its normal): at rotation
    theta its horizontal part F |sin theta| pushes at the pressure centre's
    height h, its vertical part F cos theta is taken as lift (the worse sign)
    at the pressure centre, a lever u from the lee edge. Weight resists with
    the kit's lever a and the ballast's lever c:
    m_kit g a + m_ballast g c >= S F (|sin theta| h + cos theta u)."""
    lo, hi = range_deg
    h = force_height_mm * 1e-3
    u = uplift_lever_mm * 1e-3
    # |sin t| h + cos t u peaks at t = +-atan(h / u) (or at the range ends)
    peak = math.degrees(math.atan2(h, u))
    best_t, best_m = lo, -math.inf  # lo is always in range, so the loop sets both
    for t in (lo, hi, 0.0, peak, -peak):
        if lo - 1e-12 <= t <= hi + 1e-12:
            tr = math.radians(t)
            m = abs(math.sin(tr)) * h + math.cos(tr) * u
            if m > best_m:
                best_t, best_m = t, m
    overturning = safety * wind_force_N * best_m
    return _tipping(wind_force_N, force_height_mm, kit_mass_kg, cg_lever_mm, uplift_lever_mm, ballast_lever_mm,
                    overturning, float(best_t))


def _tipping(wind_force_N: float, force_height_mm: float, kit_mass_kg: float, cg_lever_mm: float,
             uplift_lever_mm: float, ballast_lever_mm: float, overturning: float, angle_deg: float) -> TippingFigures:
    """The kit's weight on its lever against the overturning moment; the ballast at its lever
    that makes up the shortfall (none when the weight suffices, infinite with no lever)."""
    restoring = kit_mass_kg * G_M_S2 * cg_lever_mm * 1e-3
    short = overturning - restoring
    if short <= 0:
        ballast = 0.0
    elif ballast_lever_mm > 0:
        ballast = short / (G_M_S2 * ballast_lever_mm * 1e-3)
    else:
        ballast = math.inf
    return TippingFigures(wind_force_N, force_height_mm, cg_lever_mm, uplift_lever_mm, ballast_lever_mm,
                          overturning, restoring, ballast, angle_deg)


def tipping_along_axle_figures(wind_force_N: float, force_height_mm: float, tilt_deg: float, kit_mass_kg: float,
                               cg_lever_mm: float, uplift_lever_mm: float, ballast_lever_mm: float,
                               safety: float) -> TippingFigures:
    """A polar kit tipping over an end of its ground plate. Its panel faces up the axle's tilt:
    the wind force F square to the panel, at frame rotation theta, has the part
    F cos(theta) sin(tilt) along the ground toward the ends (at the pressure centre's height h)
    and F cos(theta) cos(tilt) taken as lift (at the lever u from the lee end); both peak at
    theta = 0. So m_kit g a + m_ballast g c >= S F (sin(tilt) h + cos(tilt) u)."""
    a = math.radians(tilt_deg)
    arm_mm = math.sin(a) * force_height_mm + math.cos(a) * uplift_lever_mm
    overturning = safety * wind_force_N * arm_mm * 1e-3
    return _tipping(wind_force_N, force_height_mm, kit_mass_kg, cg_lever_mm, uplift_lever_mm, ballast_lever_mm,
                    overturning, 0.0)
