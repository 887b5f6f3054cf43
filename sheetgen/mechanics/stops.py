"""The end stops at the stall: what the stalled motor does to the teeth and to the stops.

With the end stops in place (sheetgen/design/parts/stops.py) the frame runs into them at
+-site.travel_limit and, unless something switches it off, the motor stalls there. Two
things must then hold:

* the teeth: the stalled motor's torque at the pinion's pitch circle, Lewis bending
  stress sigma = F_t / (b m Y) (Shigley's Mechanical Engineering Design, section 14-1),
  within the tooth allowable. The mesh loss is left out (an upper bound), so the wheel
  sees the same tangential force; with more teeth its Lewis form factor is larger and
  its stress lower, so the pinion governs (sheetgen.mechanics.loads.tooth_figures);
* the stops: the torque at the axle, the stall torque through the gear ratio (mesh
  loss again left out) plus the worst load torque (wind and gravity may push the same
  way), held by the force F on the contact line. With the pressure uniform along the
  line from r_in to r_out, T = F r_mid, r_mid = (r_in + r_out) / 2; the edge of the
  sheet bears sigma = F / (L t), L = r_out - r_in the contact length and t the sheet
  thickness. Allowable: the sheet's in-plane compressive strength
  (sheetgen.mechanics.materials) over STOP_BEARING_SAFETY.

Pure: numbers in, numbers out.
"""

from __future__ import annotations

from dataclasses import dataclass

STOP_BEARING_SAFETY = 3.0  # on the sheet's in-plane compressive strength (our rule, as check.tooth_safety's default)


@dataclass(frozen=True)
class StopFigures:
    axle_torque_Nm: float  # stall torque through the ratio plus the worst load torque
    radius_mm: float  # middle of the contact line
    contact_length_mm: float
    thickness_mm: float
    force_N: float
    bearing_stress_MPa: float
    strength_MPa: float  # the sheet's in-plane compressive strength
    allowable_MPa: float
    angle_deg: float  # where the stops meet (+-)


def stop_figures(stall_torque_Nm: float, gear_ratio: float, load_torque_Nm: float, radius_mm: float,
                 contact_length_mm: float, thickness_mm: float, strength_MPa: float,
                 angle_deg: float, safety: float = STOP_BEARING_SAFETY) -> StopFigures:
    """Force on the stop and the bearing stress on the sheet's edge (see the module notes)."""
    torque = stall_torque_Nm * gear_ratio + load_torque_Nm
    force = torque / (radius_mm * 1e-3)
    stress = force / (contact_length_mm * thickness_mm)
    return StopFigures(torque, radius_mm, contact_length_mm, thickness_mm, force, stress, strength_MPa,
                       strength_MPa / safety, angle_deg)
