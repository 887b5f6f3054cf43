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
from sheetgen.mechanics.teeth import LEWIS_Y_TABLE
from sheetgen.mechanics import loads, solar, tracking
from sheetgen.mechanics.drive import DriveTime, drive_time
from sheetgen.mechanics.inertia import frame_inertia_kgm2
from sheetgen.mechanics.pulse import AxleLoad, Motor
from sheetgen.mechanics.massprops import Counterweight, MassProperties, mass_properties, suggest_counterweight
from sheetgen.mechanics.materials import sheet_material
from sheetgen.design.part import Kit

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
    year: tracking.YearTracking
    drive_time: DriveTime
    calm_load: AxleLoad  # what resists the frame in calm air (for the pulse model and the plots)
    wind_load: AxleLoad  # ... in the design wind
    tooth: loads.ToothFigures
    tipping: loads.TippingFigures
    counterweight: Counterweight
    checks: tuple[Check, ...]
    material: str
    notes: tuple[str, ...] = field(default=())
    pulse_capacitance_uF: float = 0.0
    pulse_voltage_V: float = 0.0

    @property
    def ok(self) -> bool:
        return all(c.passed for c in self.checks if c.binding)

    @property
    def pulse_step_calm_deg(self) -> float | None:
        """Largest step one pulse makes in calm air over the travel (None: continuous drive)."""
        sw = self.drive_time.sweep
        return None if sw is None else sw.calm_max_deg

    @property
    def pulse_step_wind_deg(self) -> float | None:
        """Smallest step one pulse makes in the design wind over the travel."""
        sw = self.drive_time.sweep
        return None if sw is None else sw.wind_min_deg

    def to_json(self) -> dict:
        m, tr, d, t = self.mass, self.tracking, self.drive, self.tooth
        y, dtm = self.year, self.drive_time
        sw, cd = dtm.sweep, dtm.continuous

        def steps(vals):
            return [None if math.isnan(v) else sig(v) for v in vals]

        out = {
            "ok": self.ok,
            "pulse_step_calm_deg": None if sw is None else sig(sw.calm_max_deg),
            "pulse_step_wind_deg": None if sw is None else sig(sw.wind_min_deg),
            "peak_tracking_rate_deg_per_h": sig(y.peak_rate_deg_h),
            "shortest_day_tracked_h": sig(y.shortest_day.tracked_h),
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
            "motor_model": {
                "torque_constant_Nm_A": sig(dtm.motor_k_Nm_A),
                "winding_resistance_ohm": sig(dtm.motor_resistance_ohm),
                "frame_inertia_kgm2": sig(dtm.frame_inertia_kgm2),
                "friction_calm_Nm": sig(self.calm_load.friction_Nm),
            },
            "pulse": None if sw is None else {
                "energy_J": sig(loads.capacitor_energy_J(self.pulse_capacitance_uF, self.pulse_voltage_V)),
                "max_step_deg": sig(dtm.max_step_deg),
                "start_angles_deg": [sig(a) for a in sw.angles_deg],
                "calm_plus_deg": steps(sw.calm_plus_deg),
                "calm_minus_deg": steps(sw.calm_minus_deg),
                "wind_plus_deg": steps(sw.wind_plus_deg),
                "wind_minus_deg": steps(sw.wind_minus_deg),
                "calm_max_at": {"start_deg": sig(sw.calm_max_at[0]), "direction": sw.calm_max_at[1]},
                "wind_min_at": {"start_deg": sig(sw.wind_min_at[0]), "direction": sw.wind_min_at[1]},
                "at_rest_deg": {k: steps(v) for k, v in sw.at_rest.items()},
                "at_travel_ends_deg": {k: steps(v) for k, v in sw.at_ends.items()},
                "runs_to_travel_end": sw.runs_to_end,
                "held_by_gearbox": sw.held_by_gearbox,
                "longest_pulse_s": sig(sw.longest_pulse_s),
                # pulses an hour at the year's peak rate if every pulse made the design-wind's smallest step
                "pulses_per_hour_peak_wind": (None if sw.wind_min_deg <= 0 else
                                              sig(y.peak_rate_deg_h / sw.wind_min_deg)),
                "fixes": [{"change": f.change, "key": f.key, "value": sig(f.value), "unit": f.unit,
                           "calm_max_deg": sig(f.calm_max_deg), "wind_min_deg": sig(f.wind_min_deg),
                           "text": f.text} for f in dtm.fixes],
            },
            "continuous_drive": {
                "voltage_V": sig(cd.voltage_V),
                "steady_speed_deg_h": sig(cd.steady_speed_deg_h),
                "crossing_time_s": sig(cd.crossing_time_s) if cd.crosses else None,
                "crossing_time_steady_s": sig(cd.crossing_time_steady_s) if cd.crossing_time_steady_s < math.inf
                else None,
            },
            "year": {
                "peak_rate_deg_h": sig(y.peak_rate_deg_h),
                "peak_declination_deg": sig(y.peak_declination_deg),
                "shortest_day": y.shortest_day.name,
                "days": [{"name": dd.name, "declination_deg": sig(dd.declination_deg),
                          "day_length_h": sig(dd.day_length_h), "tracked_h": sig(dd.tracked_h),
                          "peak_rate_deg_h": sig(dd.peak_rate_deg_h), "hours": [sig(h) for h in dd.hours],
                          "rotation_deg": [sig(r) for r in dd.rotation_deg],
                          "rate_deg_h": [sig(r) for r in dd.rate_deg_h]} for dd in y.days],
                "warnings": list(y.warnings),
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

    friction_calm = loads.friction_torque_Nm(ax.friction, weight_N * math.cos(math.radians(tilt)), ax.diameter_mm)
    if axial > 0:
        friction_calm += ax.friction * axial * THRUST_RADIUS_AXLE_DIAMETERS * ax.diameter_mm * 1e-3

    load = g_max + friction + wind.torque_Nm
    return LoadFigures(mp, tr, g_max, g_rot, wind, radial, axial, friction, friction_calm, load, tuple(notes))


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
    friction_calm = al.friction_calm_Nm
    notes = list(al.notes)

    # drive
    df = loads.drive_figures(load, drive.pinion_teeth, drive.wheel_teeth, drive.efficiency,
                             motor.stall_torque_Nm, motor.usable_fraction, motor.no_load_speed_rpm)
    year = tracking.year_tracking(site.latitude_deg, site.axle, site.travel_limit_deg, df.output_speed_deg_h)
    if drive.pulse_capacitance_uF > 0:
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

    # the drive in time: one pulse (or a steady supply) against these loads
    inertia = frame_inertia_kgm2(kit)
    calm_load = AxleLoad.from_unbalance(mp.static_unbalance_gmm, mp.cg_angle_deg, tilt, friction_calm)
    wind_load = AxleLoad.from_unbalance(mp.static_unbalance_gmm, mp.cg_angle_deg, tilt, friction, wind.torque_Nm)
    balanced = None
    if cw.found and cw.mass_kg > 0 and mp.rotating_mass_kg > 0:
        grow = (mp.rotating_mass_kg + cw.mass_kg) / mp.rotating_mass_kg
        f_extra = (friction_calm) * (grow - 1.0)
        balanced = (inertia + cw.mass_kg * (cw.arm_mm * 1e-3) ** 2,
                    AxleLoad(0.0, 0.0, friction_calm + f_extra),
                    AxleLoad(0.0, 0.0, friction + f_extra, wind.torque_Nm),
                    f"fit the counterweight ({cw.mass_kg * 1000:.0f} g at {_pos(cw.position_mm)} mm)")
    dtm = drive_time(Motor.from_ratings(motor.stall_torque_Nm, motor.no_load_speed_rpm, motor.voltage_V),
                     df.gear_ratio, drive.efficiency, inertia, calm_load, wind_load,
                     drive.pulse_capacitance_uF * 1e-6, drive.pulse_voltage_V, site.travel_limit_deg,
                     drive.max_step_deg, load, drive.pinion_teeth, balanced)
    sw = dtm.sweep
    if sw is not None and sw.held_by_gearbox:
        notes.append("some pulses end with gravity and wind turning the frame back harder than the bearing "
                     "holds: the figures take the gear-motor's gearbox to hold it; balance the frame")
    if sw is not None and sw.unsure:
        notes.append("some pulses were still creeping when the integration stopped: their steps are lower bounds")
    notes.append(f"pulse model: motor torque constant {dtm.motor_k_Nm_A:.3g} N·m/A and winding resistance "
                 f"{dtm.motor_resistance_ohm:.3g} ohm from the rated voltage, stall torque and no-load speed "
                 f"(straight motor line); frame inertia {inertia * 1e6:.0f} kg·mm² about the axle; the gear-motor's "
                 "own rotor inertia is not known and left out")
    notes.extend(year.warnings)
    checks = _checks(spec, mp, tr, g_max, load, df, dtm, year, tooth, tipping, cw, mat.name)
    if tr.clipped:
        notes.append(f"the sun's path needs +-{tr.sunset_rotation_deg:.1f} deg; site.travel_limit = "
                     f"{tr.travel_limit_deg:g} deg follows it for {tr.tracked_hours_h:.1f} of "
                     f"{tr.day_length_h:.1f} h of daylight on the solstice")
    return BalanceReport(
        mass=mp, tracking=tr, axle_tilt_deg=tilt,
        gravity_torque_max_Nm=g_max, gravity_worst_rotation_deg=g_rot,
        radial_load_N=radial, axial_load_N=axial, friction_torque_Nm=friction,
        wind=wind, load_torque_Nm=load, drive=df, year=year, drive_time=dtm, calm_load=calm_load,
        wind_load=wind_load, tooth=tooth, tipping=tipping,
        counterweight=cw, checks=tuple(checks), material=spec.sheet.material, notes=tuple(notes),
        pulse_capacitance_uF=drive.pulse_capacitance_uF, pulse_voltage_V=drive.pulse_voltage_V,
    )


def _checks(spec, mp, tr, g_max, load, df, dtm, year, tooth, tipping, cw, material_name) -> list[Check]:
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
    ok = df.output_speed_deg_h >= year.peak_rate_deg_h
    out.append(Check(
        "tracking speed", ok, df.output_speed_deg_h, year.peak_rate_deg_h, "deg/h",
        f"axle turns at {df.output_speed_deg_h:.4g} deg/h under load; the frame must follow up to "
        f"{year.peak_rate_deg_h:.3g} deg/h over the year" + ("" if ok else "; the motor is too slow or too loaded")))
    sw = dtm.sweep
    if sw is not None:
        fixes = "; ".join(f"{f.text} gives {f.calm_max_deg:.3g} deg in calm air and {f.wind_min_deg:.3g} deg "
                          f"in the design wind" for f in dtm.fixes)
        fix_text = ("; would pass: " + fixes) if fixes else (
            "; no capacitance, voltage or wheel teeth found that pass: balance the frame or change the motor")
        ok = sw.wind_min_deg > 0.0
        where = f"from {sw.wind_min_at[0]:g} deg turning {'+' if sw.wind_min_at[1] > 0 else '-'}"
        out.append(Check(
            "pulse moves the frame in the design wind", ok, sw.wind_min_deg, 0.0, "deg",
            (f"one pulse turns the frame at least {sw.wind_min_deg:.3g} deg in the design wind ({where})"
             if ok else f"one pulse does not start the frame in the design wind {where}" + fix_text)))
        ok = sw.calm_max_deg <= dtm.max_step_deg
        where = f"from {sw.calm_max_at[0]:g} deg turning {'+' if sw.calm_max_at[1] > 0 else '-'}"
        out.append(Check(
            "pulse step in calm air", ok, sw.calm_max_deg, dtm.max_step_deg, "deg",
            f"one pulse turns the frame up to {sw.calm_max_deg:.3g} deg in calm air ({where}"
            + (", into the travel end" if sw.calm_max_deg >= 2 * spec.site.travel_limit_deg - 1e-6
               or sw.runs_to_end and not ok else "")
            + f"); drive.max_step = {dtm.max_step_deg:g} deg" + ("" if ok else fix_text)))
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
    y = report.year
    row("sun", f"{tr.sun_rate_deg_h:.0f} (frame up to {tr.peak_rate_deg_h:.2f} in June)", "deg/h")
    row("peak tracking rate over the year", f"{y.peak_rate_deg_h:.1f}", "deg/h")
    sd = y.shortest_day
    row("tracked on the shortest day", f"{sd.tracked_h:.1f} of {sd.day_length_h:.1f} h ({sd.name})")
    for dd in y.days:
        row(f"  {dd.name}", f"day {dd.day_length_h:.1f} h, tracked {dd.tracked_h:.1f} h, "
                            f"up to {dd.peak_rate_deg_h:.1f} deg/h")
    dtm = report.drive_time
    cd = dtm.continuous
    row("steady drive: speed under worst load", f"{cd.steady_speed_deg_h:.4g}", "deg/h")
    row("steady drive: time across the travel",
        f"{cd.crossing_time_s:.3g}" if cd.crosses else "does not cross", "s" if cd.crosses else "")
    sw = dtm.sweep
    if sw is not None:
        row("frame inertia about the axle", f"{dtm.frame_inertia_kgm2 * 1e6:.0f}", "kg·mm²")
        row("angle per pulse, calm (largest)", f"{sw.calm_max_deg:.3g}", "deg")
        row("angle per pulse, design wind (smallest)", f"{sw.wind_min_deg:.3g}", "deg")
        for label, key in (("calm", "calm"), ("design wind", "wind")):
            r, e = sw.at_rest[key], sw.at_ends[key]
            row(f"  {label}: at rest +/-, from the ends",
                f"{r[0]:.3g} / {r[1]:.3g}, {e[0]:.3g} / {e[1]:.3g}", "deg")
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
