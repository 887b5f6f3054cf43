"""The drive pair: the two blanks, their centre distance and contact ratio.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from sheetgen.errors import SheetgenError
from sheetgen.drive import involute as inv_m
from sheetgen.drive.involute import DEFAULT_CHORD_TOL_MM
from sheetgen.drive.gears.blank import gear_blank
from sheetgen.drive.gears.spec import GearGeometry, GearSpec, MIN_CLEARANCE_MODULES, MIN_CONTACT_RATIO


@dataclass(frozen=True)
class GearPair:
    pinion: GearGeometry
    wheel: GearGeometry
    centre_distance_mm: float
    ratio: float
    contact_ratio: float
    warnings: tuple[str, ...]
    working_pressure_angle_deg: float = 20.0
    effective_contact_ratio: float = 0.0    # counting only flanks that are true involutes
    clearance_mm: float = 0.0               # tip-to-root clearance, smaller of the two


# --------------------------------------------------------------------------
# the pair
# --------------------------------------------------------------------------

def centre_distance_mm(module_mm: float, z1: int, z2: int, pressure_angle_deg: float = 20.0,
                       x1: float = 0.0, x2: float = 0.0) -> float:
    """Zero-backlash centre distance a_w = m (z1 + z2) / 2 * cos a / cos a_w (ISO 21771)."""
    aw = inv_m.working_pressure_angle_rad(pressure_angle_deg, z1, z2, x1, x2)
    return module_mm * (z1 + z2) / 2.0 * math.cos(math.radians(pressure_angle_deg)) / math.cos(aw)


def contact_ratio(module_mm: float, z1: int, z2: int, pressure_angle_deg: float = 20.0,
                  x1: float = 0.0, x2: float = 0.0) -> float:
    """Transverse contact ratio (textbook formula):
    eps = [sqrt(ra1^2 - rb1^2) + sqrt(ra2^2 - rb2^2) - a_w sin a_w] / (pi m cos a),
    tip radii m (z + 2 + 2x) / 2."""
    a = math.radians(pressure_angle_deg)
    aw = inv_m.working_pressure_angle_rad(pressure_angle_deg, z1, z2, x1, x2)
    cd = centre_distance_mm(module_mm, z1, z2, pressure_angle_deg, x1, x2)
    ra1, ra2 = inv_m.tip_radius_mm(module_mm, z1, x1), inv_m.tip_radius_mm(module_mm, z2, x2)
    rb1 = inv_m.base_radius_mm(module_mm, z1, pressure_angle_deg)
    rb2 = inv_m.base_radius_mm(module_mm, z2, pressure_angle_deg)
    length = math.sqrt(ra1 * ra1 - rb1 * rb1) + math.sqrt(ra2 * ra2 - rb2 * rb2) - cd * math.sin(aw)
    return length / (math.pi * module_mm * math.cos(a))


def gear_pair(pinion: GearSpec, wheel: GearSpec, kerf_mm: float = 0.0,
              chord_tol_mm: float = DEFAULT_CHORD_TOL_MM, *, labels: dict[str, str] | None = None) -> GearPair:
    """Pinion (on the motor) and wheel (on the axle) that mesh at the returned centre distance.

    The centre distance is the zero-backlash one for the shifts; backlash comes
    from the thinned teeth (each spec's backlash_mm), not from spreading the
    shafts. Errors in either gear are prefixed "pinion:" or "wheel:"."""
    if pinion.module_mm != wheel.module_mm:
        raise SheetgenError(f"pinion module {pinion.module_mm:g} mm and wheel module {wheel.module_mm:g} mm: "
                            f"a pair must share one module")
    if pinion.pressure_angle_deg != wheel.pressure_angle_deg:
        raise SheetgenError(f"pinion pressure angle {pinion.pressure_angle_deg:g} deg and wheel "
                            f"{wheel.pressure_angle_deg:g} deg: a pair must share one pressure angle")
    blanks = []
    for name, spec in (("pinion", pinion), ("wheel", wheel)):
        try:
            blanks.append(gear_blank(spec, kerf_mm, chord_tol_mm, labels=labels))
        except SheetgenError as exc:
            raise SheetgenError(f"{name}: {exc}") from None
    g1, g2 = blanks
    m, a_deg = pinion.module_mm, pinion.pressure_angle_deg
    z1, z2, x1, x2 = pinion.teeth, wheel.teeth, pinion.shift, wheel.shift
    if x1 + x2 < 0 and inv_m.inv(math.radians(a_deg)) + 2 * math.tan(math.radians(a_deg)) * (x1 + x2) / (z1 + z2) <= 0:
        raise SheetgenError(f"shifts {x1:g} + {x2:g}: too negative for {z1} + {z2} teeth")
    cd = centre_distance_mm(m, z1, z2, a_deg, x1, x2)
    aw = inv_m.working_pressure_angle_rad(a_deg, z1, z2, x1, x2)
    eps = contact_ratio(m, z1, z2, a_deg, x1, x2)
    warnings = [f"pinion: {w}" for w in g1.warnings] + [f"wheel: {w}" for w in g2.warnings]

    # path of contact along the line of action, measured from the pinion's base tangent point
    rb1, rb2 = g1.base_diameter_mm / 2.0, g2.base_diameter_mm / 2.0
    ra1, ra2 = g1.tip_diameter_mm / 2.0, g2.tip_diameter_mm / 2.0
    rf1, rf2 = g1.form_diameter_mm / 2.0, g2.form_diameter_mm / 2.0
    line = cd * math.sin(aw)
    start = line - math.sqrt(ra2 * ra2 - rb2 * rb2)       # wheel tip meets the pinion
    end = math.sqrt(ra1 * ra1 - rb1 * rb1)                # pinion tip leaves the wheel
    form1 = math.sqrt(max(rf1 * rf1 - rb1 * rb1, 0.0))
    form2 = line - math.sqrt(max(rf2 * rf2 - rb2 * rb2, 0.0))
    p_b = math.pi * m * math.cos(math.radians(a_deg))
    eps_eff = max(0.0, min(end, form2) - max(start, form1)) / p_b
    if start < form1 - 1e-9:
        warnings.append(f"the wheel tip reaches below the pinion's involute (form diameter {2 * rf1:.3f} mm): "
                        f"the rack-cut root clears it, but only {eps_eff:.2f} of the contact ratio "
                        f"{eps:.2f} runs on true involutes; a positive pinion shift helps")
    if end > form2 + 1e-9:
        warnings.append(f"the pinion tip reaches below the wheel's involute (form diameter {2 * rf2:.3f} mm)")
    if min(eps, eps_eff) < MIN_CONTACT_RATIO:
        warnings.append(f"contact ratio {min(eps, eps_eff):.2f} is below {MIN_CONTACT_RATIO}: the pair will run rough; "
                        f"use more teeth or a smaller pressure angle")
    clearance = min(cd - ra1 - g2.root_diameter_mm / 2.0, cd - ra2 - g1.root_diameter_mm / 2.0)
    if clearance < MIN_CLEARANCE_MODULES * m:
        warnings.append(f"tip-to-root clearance {clearance:.3f} mm is under {MIN_CLEARANCE_MODULES:g} x module: "
                        f"the tips may touch the roots; reduce the shifts")
    return GearPair(pinion=g1, wheel=g2, centre_distance_mm=cd, ratio=z2 / z1, contact_ratio=eps,
                    warnings=tuple(warnings), working_pressure_angle_deg=math.degrees(aw),
                    effective_contact_ratio=eps_eff, clearance_mm=clearance)
