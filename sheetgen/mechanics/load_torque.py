"""The worst load torque at the axle: gravity, bearing friction and wind, together.

Worst case, stated once: the load torque at the axle is the largest gravity
torque over the tracking range plus the bearing friction under the largest
radial load plus the wind torque, all taken together and in the same sense.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from sheetgen.mechanics import loads, solar
from sheetgen.mechanics.massprops import MassProperties, mass_properties
from sheetgen.kitmodel.part import Kit
from sheetgen.mechanics.load_geometry import WindPlate, wind_plate


# A polar axle rests its weight's component along the axle on a collar or
# spacer face; we take that face's mean friction radius as one axle diameter
# (a face about three axle diameters across; our assumption).
THRUST_RADIUS_AXLE_DIAMETERS = 1.0


# ---------------------------------------------------------------------------


@dataclass(frozen=True)
class LoadFigures:
    """The worst load torque at the axle and what it is made of."""
    mass: MassProperties
    tracking: solar.TrackingRange
    gravity_torque_max_Nm: float
    gravity_worst_rotation_deg: float
    wind: WindPlate
    radial_load_N: float
    axial_load_N: float
    friction_torque_Nm: float
    friction_calm_Nm: float  # the bearing friction without the wind's push
    load_torque_Nm: float
    notes: tuple[str, ...]


def axle_load(kit: Kit, spec) -> LoadFigures:
    """Gravity, friction and wind torque at the axle, taken together (the layout
    solver sizes the drive from this; the balance check reports it)."""
    site, ax = spec.site, spec.axle
    mp = mass_properties(kit)
    tr = solar.tracking_range(site.latitude_deg, site.axle, site.travel_limit_deg)
    tilt = tr.axle_tilt_deg
    notes: list[str] = []

    # gravity
    g_max, g_rot = loads.gravity_torque_max_Nm(mp.static_unbalance_gmm, mp.cg_angle_deg, tilt, tr.range_deg)

    # wind
    wind = wind_plate(kit, spec)

    # friction: the rotating weight across the axle plus the wind force, added
    # as if in line (an upper bound); a polar axle also bears on a thrust face
    weight_N = mp.rotating_mass_kg * loads.G_M_S2
    radial = weight_N * math.cos(math.radians(tilt)) + wind.force_N
    axial = weight_N * math.sin(math.radians(tilt))
    friction = loads.friction_torque_Nm(ax.friction, radial, ax.diameter_mm)
    if axial > 0:
        friction += ax.friction * axial * THRUST_RADIUS_AXLE_DIAMETERS * ax.diameter_mm * 1e-3
        notes.append(f"polar axle: {axial:.3g} N along the axle bear on a thrust face taken at a friction radius "
                     f"of {THRUST_RADIUS_AXLE_DIAMETERS:g} axle diameter")

    friction_calm = loads.friction_torque_Nm(ax.friction, weight_N * math.cos(math.radians(tilt)), ax.diameter_mm)
    if axial > 0:
        friction_calm += ax.friction * axial * THRUST_RADIUS_AXLE_DIAMETERS * ax.diameter_mm * 1e-3

    load = g_max + friction + wind.torque_Nm
    return LoadFigures(mp, tr, g_max, g_rot, wind, radial, axial, friction, friction_calm, load, tuple(notes))
