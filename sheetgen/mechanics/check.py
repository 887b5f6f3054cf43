"""The balance and drive check of one kit: figures, verdicts, a table.

``balance_check(kit, spec)`` reads the parts' placements and the components
of a built kit, and the site, axle, motor, drive and check keys of the spec,
and returns a :class:`BalanceReport`. Pure: no printing, no files.

Worst case, stated once: the load torque at the axle is the largest gravity
torque over the tracking range plus the bearing friction under the largest
radial load plus the wind torque, all taken together and in the same sense.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from shapely.geometry import Polygon, box
from shapely.ops import unary_union

from sheetgen.numbers import sig
from sheetgen.errors import ParameterError
from sheetgen.gears import LEWIS_Y_TABLE
from sheetgen.mechanics import loads, solar
from sheetgen.mechanics.massprops import Counterweight, MassProperties, mass_properties, suggest_counterweight
from sheetgen.mechanics.materials import sheet_material
from sheetgen.part import Kit

# A polar axle rests its weight's component along the axle on a collar or
# spacer face; we take that face's mean friction radius as one axle diameter
# (a face about three axle diameters across; our assumption).
THRUST_RADIUS_AXLE_DIAMETERS = 1.0

CAUTIONS = (
    "Cautions: this check is for desk-size kits. For anything larger, wind and snow loads follow "
    "local codes (for example ASCE 7, EN 1991-1-4) and a licensed engineer. Secure an outdoor tracker "
    "against wind. Gears pinch fingers: keep them covered while the motor can run.",
)


@dataclass(frozen=True)
class Check:
    name: str
    passed: bool
    value: float
    limit: float
    unit: str
    reason: str
    binding: bool = True  # counts toward ``ok``; advisory checks only inform

    def to_json(self) -> dict:
        return {"name": self.name, "pass": self.passed, "value": sig(self.value), "limit": sig(self.limit),
                "unit": self.unit, "reason": self.reason, "binding": self.binding}


@dataclass(frozen=True)
class WindPlate:
    area_m2: float
    chord_mm: float  # size across the axle
    centroid_y_mm: float  # offset of the plate's centroid across the axle (rotation 0)
    centroid_z_mm: float
    eccentricity_mm: float
    force_N: float
    torque_Nm: float


@dataclass(frozen=True)
class BalanceReport:
    mass: MassProperties
    tracking: solar.TrackingRange
    axle_tilt_deg: float
    gravity_torque_max_Nm: float
    gravity_worst_rotation_deg: float
    radial_load_N: float
    axial_load_N: float
    friction_torque_Nm: float
    wind: WindPlate
    load_torque_Nm: float
    drive: loads.DriveFigures
    pulse: loads.PulseFigures | None
    tooth: loads.ToothFigures
    tipping: loads.TippingFigures
    counterweight: Counterweight
    checks: tuple[Check, ...]
    material: str
    notes: tuple[str, ...] = field(default=())

    @property
    def ok(self) -> bool:
        return all(c.passed for c in self.checks if c.binding)

    def to_json(self) -> dict:
        m, tr, d, t = self.mass, self.tracking, self.drive, self.tooth
        out = {
            "ok": self.ok,
            "rotating_mass_kg": sig(m.rotating_mass_kg),
            "cg_mm": [sig(v) for v in m.rotating_cg_mm],
            "static_unbalance_gmm": sig(m.static_unbalance_gmm),
            "cg_angle_deg": sig(m.cg_angle_deg),
            "axle_tilt_deg": sig(self.axle_tilt_deg),
            "tracking_range_deg": [sig(tr.range_deg[0]), sig(tr.range_deg[1])],
            "gravity_torque_max_Nm": sig(self.gravity_torque_max_Nm),
            "friction_torque_Nm": sig(self.friction_torque_Nm),
            "wind_torque_Nm": sig(self.wind.torque_Nm),
            "load_torque_Nm": sig(self.load_torque_Nm),
            "gear_ratio": sig(d.gear_ratio),
            "motor_torque_required_Nm": sig(d.motor_torque_required_Nm),
            "motor_torque_available_Nm": sig(d.motor_torque_available_Nm),
            "torque_margin": sig(d.torque_margin),
            "tooth_stress_MPa": sig(t.stress_MPa),
            "tooth_stress_allowable_MPa": sig(t.allowable_MPa),
            "counterweight": {
                "mass_kg": sig(self.counterweight.mass_kg),
                "position_mm": [sig(v) for v in self.counterweight.position_mm],
                "arm_mm": sig(self.counterweight.arm_mm),
                "rule": self.counterweight.rule,
                "found": self.counterweight.found,
            },
            "ballast_kg": sig(self.tipping.ballast_kg),
            "checks": [c.to_json() for c in self.checks],
            "total_mass_kg": sig(m.total_mass_kg),
            "kit_cg_mm": [sig(v) for v in m.total_cg_mm],
            "tracking": {
                "axle": tr.axle,
                "latitude_deg": sig(tr.latitude_deg),
                "declination_deg": sig(tr.declination_deg),
                "sunrise_hour_angle_deg": sig(tr.sunrise_hour_angle_deg),
                "day_length_h": sig(tr.day_length_h),
                "sunset_rotation_deg": sig(tr.sunset_rotation_deg),
                "travel_limit_deg": sig(tr.travel_limit_deg),
                "clipped": tr.clipped,
                "tracked_hours_h": sig(tr.tracked_hours_h),
                "peak_rate_deg_h": sig(tr.peak_rate_deg_h),
                "sun_rate_deg_h": sig(tr.sun_rate_deg_h),
            },
            "gravity_worst_rotation_deg": sig(self.gravity_worst_rotation_deg),
            "bearing": {"radial_load_N": sig(self.radial_load_N), "axial_load_N": sig(self.axial_load_N)},
            "wind": {
                "area_m2": sig(self.wind.area_m2),
                "chord_mm": sig(self.wind.chord_mm),
                "eccentricity_mm": sig(self.wind.eccentricity_mm),
                "force_N": sig(self.wind.force_N),
                "air_density_kg_m3": loads.AIR_DENSITY_KG_M3,
                "drag_coefficient": loads.FLAT_PLATE_CD,
            },
            "drive": {
                "mesh_efficiency": sig(d.mesh_efficiency),
                "motor_speed_at_load_rpm": sig(d.motor_speed_at_load_rpm),
                "output_speed_deg_h": sig(d.output_speed_deg_h),
                "output_speed_no_load_deg_h": sig(d.output_speed_no_load_deg_h),
            },
            "pulse": None if self.pulse is None else {
                "energy_J": sig(self.pulse.energy_J),
                "threshold_voltage_V": sig(self.pulse.threshold_voltage_V),
                "motor_efficiency": sig(self.pulse.motor_efficiency),
                "work_per_pulse_J": sig(self.pulse.work_per_pulse_J),
                "angle_per_pulse_deg": sig(self.pulse.angle_per_pulse_deg),
                "pulses_per_hour_peak": sig(self.pulse.pulses_per_hour_peak),
                "pulses_per_hour_mean": sig(self.pulse.pulses_per_hour_mean),
            },
            "tooth": {
                "material": self.material,
                "face_width_mm": sig(t.face_width_mm),
                "weaker_gear": t.weaker_gear,
                "pinion_stress_MPa": sig(t.pinion_stress_MPa),
                "wheel_stress_MPa": sig(t.wheel_stress_MPa),
                "stall_stress_MPa": sig(t.stall_stress_MPa),
            },
            "tipping": {
                "wind_force_N": sig(self.tipping.wind_force_N),
                "force_height_mm": sig(self.tipping.force_height_mm),
                "cg_lever_mm": sig(self.tipping.cg_lever_mm),
                "overturning_Nm": sig(self.tipping.overturning_Nm),
                "restoring_Nm": sig(self.tipping.restoring_Nm),
                "worst_rotation_deg": sig(self.tipping.worst_rotation_deg),
            },
            "parts": [
                {"name": g.name, "kind": g.kind, "qty": g.qty, "mass_each_kg": sig(g.mass_each_kg),
                 "mass_kg": sig(g.mass_kg), "rotating": g.rotating}
                for g in m.groups
            ],
            "notes": list(self.notes),
            "cautions": list(CAUTIONS),
        }
        return out




# ---------------------------------------------------------------------------
# geometry the loads need


def wind_plate_footprint(kit: Kit) -> Polygon:
    """What the wind sees square-on at rotation 0: the union of the x-y
    footprints of the rotating parts lying flat (sheet square to z) and of the
    rotating box components (the panel), holes filled (the panel covers its
    window). Parts standing on edge (ribs, wheel) are left out: they face the
    wind edge-on when the plate faces it."""
    shapes = []
    for part in kit.parts:
        ext = np.asarray(part.outline.exterior.coords, dtype=float)[:, :2]
        local = np.column_stack([ext, np.zeros(len(ext))])
        for pl in part.placements:
            if not pl.rotating:
                continue
            if abs(abs(pl.matrix[2, 2]) - 1.0) > 1e-9:
                continue
            pts = pl.apply(local)
            shapes.append(Polygon(pts[:, :2]))
    for comp in kit.components:
        if comp.rotating and comp.shape == "box":
            cx, cy, _ = comp.centre_mm
            dx, dy, _ = comp.size_mm
            shapes.append(box(cx - dx / 2, cy - dy / 2, cx + dx / 2, cy + dy / 2))
    if not shapes:
        return Polygon()
    u = unary_union(shapes)
    polys = [u] if u.geom_type == "Polygon" else list(u.geoms)
    return unary_union([Polygon(p.exterior) for p in polys])


def _wind_plate(kit: Kit, spec) -> WindPlate:
    fp = wind_plate_footprint(kit)
    if fp.is_empty:
        return WindPlate(0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0)
    area_m2 = fp.area * 1e-6
    _, y0, _, y1 = fp.bounds
    chord = y1 - y0
    cy = fp.centroid.y
    # height of the plate: area-weighted z of the flat rotating items at rotation 0
    zs, ws = [], []
    for comp in kit.components:
        if comp.rotating and comp.shape == "box":
            zs.append(comp.centre_mm[2])
            ws.append(comp.size_mm[0] * comp.size_mm[1])
    cz = float(np.average(zs, weights=ws)) if zs else 0.0
    ecc = loads.wind_eccentricity_mm(cy, chord)
    force = loads.drag_force_N(spec.site.wind_speed_m_s, area_m2)
    return WindPlate(area_m2, chord, cy, cz, ecc, force, force * ecc * 1e-3)


def _ground_and_footprint(kit: Kit) -> tuple[float, float, float]:
    """Lowest z of the fixed parts (the ground), and the y extent of the
    fixed material touching it (the base's edges across the axle)."""
    pts = []
    for part in kit.parts:
        ext = np.asarray(part.outline.exterior.coords, dtype=float)[:, :2]
        for pl in part.placements:
            if pl.rotating:
                continue
            for z in (0.0, part.thickness_mm):
                pts.append(pl.apply(np.column_stack([ext, np.full(len(ext), z)])))
    if not pts:
        return 0.0, 0.0, 0.0
    allp = np.vstack(pts)
    ground = float(allp[:, 2].min())
    low = allp[np.abs(allp[:, 2] - ground) < 1e-6]
    return ground, float(low[:, 1].min()), float(low[:, 1].max())


# ---------------------------------------------------------------------------


@dataclass(frozen=True)
class AxleLoad:
    """The worst load torque at the axle and what it is made of."""
    mass: MassProperties
    tracking: solar.TrackingRange
    gravity_torque_max_Nm: float
    gravity_worst_rotation_deg: float
    wind: WindPlate
    radial_load_N: float
    axial_load_N: float
    friction_torque_Nm: float
    load_torque_Nm: float
    notes: tuple[str, ...]


def axle_load(kit: Kit, spec) -> AxleLoad:
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
    wind = _wind_plate(kit, spec)

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

    load = g_max + friction + wind.torque_Nm
    return AxleLoad(mp, tr, g_max, g_rot, wind, radial, axial, friction, load, tuple(notes))


def balance_check(kit: Kit, spec) -> BalanceReport:
    """Mass, balance, torques, drive, teeth, tipping and counterweight of a kit."""
    site, motor, drive, chk = spec.site, spec.motor, spec.drive, spec.check
    if drive.pinion_teeth < LEWIS_Y_TABLE[0][0]:
        raise ParameterError(
            f"drive.pinion_teeth = {drive.pinion_teeth}: the tooth check's Lewis form factor table "
            f"(Shigley table 14-2) starts at {LEWIS_Y_TABLE[0][0]} teeth; must be from {LEWIS_Y_TABLE[0][0]} to 200")
    al = axle_load(kit, spec)
    mp, tr, tilt, wind = al.mass, al.tracking, al.tracking.axle_tilt_deg, al.wind
    g_max, g_rot, load = al.gravity_torque_max_Nm, al.gravity_worst_rotation_deg, al.load_torque_Nm
    radial, axial, friction = al.radial_load_N, al.axial_load_N, al.friction_torque_Nm
    notes = list(al.notes)

    # drive
    df = loads.drive_figures(load, drive.pinion_teeth, drive.wheel_teeth, drive.efficiency,
                             motor.stall_torque_Nm, motor.usable_fraction, motor.no_load_speed_rpm)
    pulse = None
    if drive.pulse_capacitance_uF > 0:
        span = tr.range_deg[1] - tr.range_deg[0]
        mean_rate = span / tr.tracked_hours_h if tr.tracked_hours_h > 0 else 0.0
        pulse = loads.pulse_figures(drive.pulse_capacitance_uF, drive.pulse_voltage_V, load,
                                    df.motor_torque_required_Nm, motor.stall_torque_Nm, motor.voltage_V,
                                    drive.efficiency, tr.peak_rate_deg_h, mean_rate)
        if drive.pulse_voltage_V > 1.2 * motor.voltage_V:
            notes.append(f"drive.pulse_voltage = {drive.pulse_voltage_V:g} V is more than 1.2 x the motor's "
                         f"rated {motor.voltage_V:g} V: check the motor tolerates it")

    # teeth
    if abs(drive.pressure_angle_deg - 20.0) > 1e-9:
        notes.append(f"drive.pressure_angle = {drive.pressure_angle_deg:g} deg: the Lewis form factors are "
                     "tabled for 20 deg full-depth teeth, so the tooth stress is approximate")
    mat = sheet_material(spec.sheet.material)
    face = drive.layers * spec.sheet.thickness_mm
    tooth = loads.tooth_figures(load, df.motor_torque_required_Nm, drive.module_mm, drive.pinion_teeth,
                                drive.wheel_teeth, face, mat.bending_strength_MPa, chk.tooth_safety,
                                motor.stall_torque_Nm)

    # tipping: wind from either side across the axle; the base's lee edge
    ground_z, y_lo, y_hi = _ground_and_footprint(kit)
    cp_radius = math.hypot(wind.centroid_y_mm, wind.centroid_z_mm) + loads.CP_SHIFT_CHORDS * wind.chord_mm
    height = -ground_z + cp_radius
    base_mid = 0.5 * (y_lo + y_hi)
    cg_y = mp.total_cg_mm[1]
    tips = []
    for edge, sign in ((y_hi, 1.0), (y_lo, -1.0)):
        tips.append(loads.tipping_figures(
            wind.force_N, height, mp.total_mass_kg,
            cg_lever_mm=max(0.0, sign * (edge - cg_y)),
            uplift_lever_mm=abs(edge) + cp_radius,
            ballast_lever_mm=abs(edge - base_mid),
            safety=chk.tipping_safety, range_deg=tr.range_deg))
    tipping = max(tips, key=lambda t: t.ballast_kg)
    if tilt > 0:
        notes.append("tipping is figured for the base standing level; a polar kit's inclined mount "
                     "needs its own anchoring")

    cw = suggest_counterweight(kit, mp, (-site.travel_limit_deg, site.travel_limit_deg), spec.frame.clearance_mm)
    checks = _checks(spec, mp, tr, g_max, load, df, pulse, tooth, tipping, cw, mat.name)
    if tr.clipped:
        notes.append(f"the sun's path needs +-{tr.sunset_rotation_deg:.1f} deg; site.travel_limit = "
                     f"{tr.travel_limit_deg:g} deg follows it for {tr.tracked_hours_h:.1f} of "
                     f"{tr.day_length_h:.1f} h of daylight on the solstice")
    return BalanceReport(
        mass=mp, tracking=tr, axle_tilt_deg=tilt,
        gravity_torque_max_Nm=g_max, gravity_worst_rotation_deg=g_rot,
        radial_load_N=radial, axial_load_N=axial, friction_torque_Nm=friction,
        wind=wind, load_torque_Nm=load, drive=df, pulse=pulse, tooth=tooth, tipping=tipping,
        counterweight=cw, checks=tuple(checks), material=spec.sheet.material, notes=tuple(notes),
    )


def _checks(spec, mp, tr, g_max, load, df, pulse, tooth, tipping, cw, material_name) -> list[Check]:
    out = []
    share = g_max / load if load > 0 else 0.0
    fix = ("raise the gear ratio (drive.wheel_teeth / drive.pinion_teeth), use a stronger motor"
           + (f", or balance the frame (gravity is {share:.0%} of the load: "
              f"{cw.mass_kg * 1000:.0f} g at {_pos(cw.position_mm)} mm)" if share > 0.2 and cw.found else ""))
    want = spec.check.torque_margin
    ok = df.motor_torque_required_Nm * want <= df.motor_torque_available_Nm * (1 + 1e-9)
    out.append(Check(
        "motor torque", ok, df.motor_torque_required_Nm * want, df.motor_torque_available_Nm, "N·m",
        (f"needs {df.motor_torque_required_Nm:.4g} N·m at the motor, has {df.motor_torque_available_Nm:.4g} "
         f"(stall x motor.usable_fraction): margin {df.torque_margin:.2f} against check.torque_margin {want:g}")
        + ("" if ok else f"; {fix}")))
    ok = tooth.stress_MPa <= tooth.allowable_MPa
    out.append(Check(
        "tooth stress", ok, tooth.stress_MPa, tooth.allowable_MPa, "MPa",
        (f"Lewis stress in the {tooth.weaker_gear} {tooth.stress_MPa:.3g} MPa vs {tooth.allowable_MPa:.3g} MPa "
         f"({material_name} bending strength / check.tooth_safety)")
        + ("" if ok else "; add drive.layers, a larger drive.module or more teeth")))
    ok = df.output_speed_deg_h >= tr.peak_rate_deg_h
    out.append(Check(
        "tracking speed", ok, df.output_speed_deg_h, tr.peak_rate_deg_h, "deg/h",
        f"axle turns at {df.output_speed_deg_h:.4g} deg/h under load; the frame must follow up to "
        f"{tr.peak_rate_deg_h:.3g} deg/h" + ("" if ok else "; the motor is too slow or too loaded")))
    if pulse is not None:
        ok = pulse.moves
        out.append(Check(
            "pulse moves the frame", ok, spec.drive.pulse_voltage_V, pulse.threshold_voltage_V, "V",
            (f"the capacitor at {spec.drive.pulse_voltage_V:g} V drives the load down to "
             f"{pulse.threshold_voltage_V:.3g} V: {pulse.angle_per_pulse_deg:.3g} deg per pulse, "
             f"{pulse.pulses_per_hour_peak:.3g} pulses/h at the fastest")
            if ok else
            (f"the motor stalls below {pulse.threshold_voltage_V:.3g} V on this load, above the "
             f"{spec.drive.pulse_voltage_V:g} V pulse; raise drive.pulse_voltage or lower the load")))
    ok = tooth.stall_stress_MPa <= tooth.allowable_MPa
    out.append(Check(
        "teeth at motor stall", ok, tooth.stall_stress_MPa, tooth.allowable_MPa, "MPa",
        f"if the frame jams, the stalled motor loads the pinion to {tooth.stall_stress_MPa:.3g} MPa"
        + ("" if ok else "; stop the motor at the travel ends (limit switches), do not let it stall there"),
        binding=False))
    ok = tipping.ballast_kg <= 0.0
    out.append(Check(
        "stands in the design wind", ok, tipping.overturning_Nm, tipping.restoring_Nm, "N·m",
        (f"wind moment x check.tipping_safety {tipping.overturning_Nm:.3g} N·m vs the kit's weight "
         f"{tipping.restoring_Nm:.3g} N·m")
        + ("" if ok else f"; screw the base down or add {tipping.ballast_kg:.2f} kg ballast at its middle"),
        binding=False))
    return out


def _pos(p) -> str:
    return "[" + ", ".join(f"{v:.0f}" for v in p) + "]"


# ---------------------------------------------------------------------------
# text


def render_text(report: BalanceReport) -> str:
    """A readable table of the figures and the verdicts."""
    m = report.mass
    rows: list[tuple[str, str]] = []

    def row(label, value, unit=""):
        rows.append((label, f"{value}{(' ' + unit) if unit else ''}"))

    lines = [f"Balance and drive check: {'PASS' if report.ok else 'FAIL'}", ""]
    row("rotating mass", f"{m.rotating_mass_kg * 1000:.1f}", "g")
    row("whole kit", f"{m.total_mass_kg * 1000:.1f}", "g")
    row("CG of the rotating frame", _pos3(m.rotating_cg_mm), "mm")
    row("static unbalance", f"{m.static_unbalance_gmm:.0f}", "g·mm")
    tr = report.tracking
    row("axle", f"{tr.axle}, tilt {report.axle_tilt_deg:.1f}", "deg")
    row("tracking range", f"{tr.range_deg[0]:.1f} to {tr.range_deg[1]:.1f}", "deg")
    row("daylight followed", f"{tr.tracked_hours_h:.1f} of {tr.day_length_h:.1f}", "h")
    row("gravity torque, worst", f"{report.gravity_torque_max_Nm:.4f}", "N·m")
    row("friction torque", f"{report.friction_torque_Nm:.4f}", "N·m")
    row("wind torque", f"{report.wind.torque_Nm:.4f}", "N·m")
    row("load torque at the axle", f"{report.load_torque_Nm:.4f}", "N·m")
    d = report.drive
    row("gear ratio", f"{d.gear_ratio:.3f}")
    row("motor torque needed", f"{d.motor_torque_required_Nm:.4f}", "N·m")
    row("motor torque available", f"{d.motor_torque_available_Nm:.4f}", "N·m")
    row("torque margin", f"{d.torque_margin:.2f}")
    row("axle speed under load", f"{d.output_speed_deg_h:.0f}", "deg/h")
    row("sun", f"{tr.sun_rate_deg_h:.0f} (frame up to {tr.peak_rate_deg_h:.2f})", "deg/h")
    if report.pulse is not None:
        p = report.pulse
        row("pulse energy", f"{p.energy_J:.4f}", "J")
        row("axle angle per pulse", f"{p.angle_per_pulse_deg:.3g}", "deg")
        row("pulses per hour (peak / mean)", f"{p.pulses_per_hour_peak:.3g} / {p.pulses_per_hour_mean:.3g}")
    t = report.tooth
    row(f"tooth stress ({t.weaker_gear})", f"{t.stress_MPa:.3f} of {t.allowable_MPa:.2f}", "MPa")
    cw = report.counterweight
    row("counterweight", f"{cw.mass_kg * 1000:.1f} g at {_pos3(cw.position_mm)}", "mm")
    row("ballast for the design wind", f"{report.tipping.ballast_kg:.3f}", "kg")
    width = max(len(a) for a, _ in rows)
    lines += [f"  {a:<{width}}  {b}" for a, b in rows]
    lines += ["", "Checks:"]
    for c in report.checks:
        tag = ("pass" if c.passed else "FAIL") if c.binding else ("ok" if c.passed else "note")
        lines.append(f"  [{tag:>4}] {c.name}: {c.reason}")
    notes = [f"counterweight: {cw.rule}", *report.notes]
    lines += ["", "Notes:"] + [f"  - {n}" for n in notes]
    lines += ["", *CAUTIONS]
    return "\n".join(lines)


def _pos3(p) -> str:
    return "[" + ", ".join(f"{v:.1f}" for v in p) + "]"
