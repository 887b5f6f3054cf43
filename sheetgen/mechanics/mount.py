"""The motor mount's stiffness: how far the pinion gives under the worst tooth force.

Model (stated once). The mount plate (``motor-mount``) stands in the base and
carries the motor body in its opening; the tooth force acts on the pinion, in
the plate's own plane (a spur mesh pushes across the shaft, not along it). The
plate is taken as a cantilever fixed at the base's top face and loaded at the
height of the pinion's axis, bending in its own plane, with the least second
moment of area of its horizontal sections over that span (the sections through
the body opening and the brace slots: the narrowest), and the sheet's bending
modulus taken low (sheetgen.mechanics.materials). Roark's Formulas for Stress
and Strain, table of beam formulas, cantilever with an end load:
delta = F L^3 / (3 E I) (from memory). Conservative: the back plate
(``motor-clamp``) and the braces, which share the load, are left out, and so is
the shear deflection (small for a plate this stubby against its bending, and
the neglected parts stiffen it far more).

Worst tooth force: the stalled motor's torque on the pinion's pitch radius
(m z / 2), F_t = T_stall / r; with the radial part F_r = F_t tan(alpha) the
resultant is F_t / cos(alpha), taken all in the weak direction.

Limit: MOUNT_BACKLASH_SHARE of drive.backlash. A mount that gives delta along
the line of centres changes the backlash by about 2 delta tan(alpha) (0.73
delta at 20 deg: the backlash and centre-distance relation of ISO 21771, from
memory), so a quarter of the backlash keeps the mesh from losing more than a
fifth of its play, and a give across the line of centres under a quarter of
the play between the teeth.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from shapely.geometry import LineString, Polygon

from sheetgen.kitmodel.part import Kit

MOUNT_PART = "motor-mount"
MOUNT_BACKLASH_SHARE = 0.25  # our rule (see the module notes)


@dataclass(frozen=True)
class MountStiffness:
    tangential_N: float  # at the pinion's pitch circle, motor stalled
    radial_N: float
    force_N: float  # resultant, taken in the plate's weak direction
    lever_mm: float  # base top to the pinion's axis
    second_moment_mm4: float  # least over the lever, in-plane bending
    modulus_MPa: float
    deflection_mm: float  # at the pinion
    limit_mm: float  # MOUNT_BACKLASH_SHARE x drive.backlash
    backlash_mm: float

    @property
    def ok(self) -> bool:
        return self.deflection_mm <= self.limit_mm + 1e-12

    @property
    def share_of_backlash(self) -> float:
        return self.deflection_mm / self.backlash_mm if self.backlash_mm > 0 else math.inf

    def to_json(self) -> dict:
        from sheetgen.numbers import sig

        return {"part": MOUNT_PART, "model": "cantilever, end load: delta = F L^3 / (3 E I) (Roark)",
                "tangential_force_N": sig(self.tangential_N), "radial_force_N": sig(self.radial_N),
                "force_N": sig(self.force_N), "lever_mm": sig(self.lever_mm),
                "second_moment_mm4": sig(self.second_moment_mm4), "modulus_MPa": sig(self.modulus_MPa),
                "deflection_mm": sig(self.deflection_mm), "limit_mm": sig(self.limit_mm),
                "backlash_share_allowed": MOUNT_BACKLASH_SHARE, "ok": self.ok}


def worst_tooth_force_N(spec) -> float:
    """The stalled motor's tooth force on the pinion, tangential and radial together:
    F_t / cos(alpha) with F_t = T_stall / (m z / 2)."""
    d = spec.drive
    ft = spec.motor.stall_torque_Nm / (d.module_mm * d.pinion_teeth / 2.0 * 1e-3)
    return ft / math.cos(math.radians(d.pressure_angle_deg))


def section_second_moment_mm4(outline: Polygon, v: float, thickness_mm: float) -> float:
    """Second moment of area, for bending in the plate's plane, of the plate's
    section along the line local y = v: the material segments of that line, each
    thickness_mm deep, about their common centroid."""
    x0, _, x1, _ = outline.bounds
    cut = outline.intersection(LineString([(x0 - 1.0, v), (x1 + 1.0, v)]))
    segs = [g for g in getattr(cut, "geoms", [cut]) if isinstance(g, LineString) and g.length > 0]
    if not segs:
        return 0.0
    ends = np.array([sorted((c[0][0], c[-1][0])) for c in (list(g.coords) for g in segs)], dtype=float)
    u1, u2 = ends[:, 0], ends[:, 1]
    area = float(np.sum(u2 - u1))
    c = float(np.sum((u2 ** 2 - u1 ** 2) / 2)) / area
    return thickness_mm * float(np.sum(((u2 - c) ** 3 - (u1 - c) ** 3) / 3))


def least_second_moment_mm4(outline: Polygon, v0: float, v1: float, thickness_mm: float) -> float:
    """Least section second moment between heights v0 and v1 (the sections change only
    at the outline's vertex heights, so one between each pair of them is exact)."""
    vs = {v0, v1}
    for ring in [outline.exterior, *outline.interiors]:
        vs.update(float(y) for _, y in ring.coords if v0 < y < v1)
    ys = sorted(vs)
    mids = [(a + b) / 2 for a, b in zip(ys, ys[1:]) if b - a > 1e-9]
    return min((section_second_moment_mm4(outline, v, thickness_mm) for v in mids), default=0.0)


def mount_stiffness(kit: Kit, spec) -> MountStiffness | None:
    """The mount plate's deflection at the pinion under the stalled motor's tooth force
    (None when the kit has no mount plate or no pinion)."""
    from sheetgen.mechanics.materials import sheet_material

    names = {p.name for p in kit.parts}
    if MOUNT_PART not in names or "pinion" not in names or "base" not in names:
        return None
    d = spec.drive
    r_m = d.module_mm * d.pinion_teeth / 2.0 * 1e-3
    alpha = math.radians(d.pressure_angle_deg)
    ft = spec.motor.stall_torque_Nm / r_m
    fr = ft * math.tan(alpha)
    f = ft / math.cos(alpha)
    plate = kit.part(MOUNT_PART)
    at = plate.placements[0]
    rot = np.asarray(at.matrix, dtype=float)
    origin = np.asarray(at.translation_mm, dtype=float)
    base = kit.part("base")
    base_top_z = float(base.placements[0].translation_mm[2]) + base.thickness_mm
    pinion_c = np.asarray(kit.part("pinion").placements[0].translation_mm, dtype=float)
    # heights in the plate's plane: its local y runs along kit z (a plate standing across the axle)
    if abs(float(rot[2, 1]) - 1.0) > 1e-9:
        raise ValueError("the motor mount does not stand upright across the axle")
    v_pinion = float((rot.T @ (pinion_c - origin))[1])
    v_base = base_top_z - float(origin[2])
    lever = v_pinion - v_base
    inertia = least_second_moment_mm4(plate.outline, v_base, v_pinion, plate.thickness_mm)
    e = sheet_material(spec.sheet.material).modulus_MPa
    delta = f * lever ** 3 / (3.0 * e * inertia) if inertia > 0 and e > 0 else math.inf
    return MountStiffness(ft, fr, f, lever, inertia, e, delta, MOUNT_BACKLASH_SHARE * d.backlash_mm,
                          d.backlash_mm)
