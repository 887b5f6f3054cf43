"""The balance and drive check of one kit: figures, verdicts, a table.

``balance_check(kit, spec)`` reads the parts' placements and the components
of a built kit, and the site, axle, motor, drive and check keys of the spec,
and returns a :class:`BalanceReport`. Pure: no printing, no files.

Worst case, stated once: the load torque at the axle is the largest gravity
torque over the tracking range plus the bearing friction under the largest
radial load plus the wind torque, all taken together and in the same sense.

The report is :mod:`~sheetgen.mechanics.balance_report`, its text
:mod:`~sheetgen.mechanics.balance_text`, the load torque :mod:`~sheetgen.mechanics.load_torque`.
"""

from __future__ import annotations

import math

import numpy as np

from sheetgen.errors import ParameterError
from sheetgen.mechanics.teeth import LEWIS_Y_TABLE
from sheetgen.mechanics import loads, tracking
from sheetgen.mechanics.drive import drive_time
from sheetgen.mechanics.inertia import frame_inertia_kgm2
from sheetgen.mechanics.pulse import AxleLoad, Motor
from sheetgen.mechanics.massprops import suggest_counterweight
from sheetgen.mechanics.materials import sheet_material
from sheetgen.kitmodel.part import Kit
from sheetgen.mechanics.balance_report import BalanceReport, Check
from sheetgen.mechanics.load_geometry import ground_contact, to_ground_frame
from sheetgen.mechanics.load_torque import axle_load
from sheetgen.mechanics.stops import STOP_BEARING_SAFETY, StopFigures, stop_figures
from sheetgen.mechanics.mount import MOUNT_BACKLASH_SHARE, MountStiffness, mount_stiffness


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

    # tipping: wind from either side across the axle; the lee edge of what the kit stands on,
    # in the ground frame (a polar kit's wedge tilts the kit: sheetgen.mechanics.load_geometry)
    ground = ground_contact(kit)
    ground_z, y_lo, y_hi = ground.ground_z_mm, ground.y_lo_mm, ground.y_hi_mm
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
    if ground.tilt_deg > 0:
        # the panel faces up the tilt: the wind also pushes along the ground, over the ground plate's ends
        cg_x = float(to_ground_frame(np.asarray(mp.total_cg_mm, dtype=float), ground.tilt_deg)[0])
        x_mid = 0.5 * (ground.x_lo_mm + ground.x_hi_mm)
        for edge, sign in ((ground.x_hi_mm, 1.0), (ground.x_lo_mm, -1.0)):
            tips.append(loads.tipping_along_axle_figures(
                wind.force_N, height, ground.tilt_deg, mp.total_mass_kg,
                cg_lever_mm=max(0.0, sign * (edge - cg_x)),
                uplift_lever_mm=abs(edge) + cp_radius,
                ballast_lever_mm=abs(edge - x_mid), safety=chk.tipping_safety))
        if not ground.x_lo_mm <= cg_x <= ground.x_hi_mm:
            notes.append(f"the kit's centre of mass ({cg_x:.0f} mm along the ground) is outside its ground plate "
                         f"({ground.x_lo_mm:.0f} to {ground.x_hi_mm:.0f} mm): it tips over without wind; screw it down")
    tipping = max(tips, key=lambda t: t.ballast_kg)
    if tilt > 0 and ground.tilt_deg <= 0:
        notes.append("tipping is figured for the base standing level; a polar kit's inclined mount "
                     "needs its own anchoring")

    stops = None
    figures = dict(kit.figures)
    if figures.get("stop_contact_mm", 0.0) > 0:
        stops = stop_figures(motor.stall_torque_Nm, df.gear_ratio, load, figures["stop_radius_mm"],
                             figures["stop_contact_mm"], spec.sheet.thickness_mm, mat.bearing_strength_MPa,
                             figures["stop_angle_deg"])

    cw = suggest_counterweight(kit, mp, (-site.travel_limit_deg, site.travel_limit_deg), spec.frame.clearance_mm)

    # the drive in time: one pulse (or a steady supply) against these loads
    inertia = frame_inertia_kgm2(kit)
    calm_load = AxleLoad.from_unbalance(mp.static_unbalance_gmm, mp.cg_angle_deg, tilt, friction_calm)
    wind_load = AxleLoad.from_unbalance(mp.static_unbalance_gmm, mp.cg_angle_deg, tilt, friction, wind.torque_Nm)
    balanced = None
    if cw.found and not cw.carried and cw.mass_kg > 0 and mp.rotating_mass_kg > 0:
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
    checks = _checks(spec, mp, tr, g_max, load, df, dtm, year, tooth, tipping, cw, mat.name, stops)
    mount = mount_stiffness(kit, spec)
    if mount is not None:
        checks.append(_mount_check(mount, mat.name))
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
        stops=stops,
        mount=mount,
    )


def _checks(spec, mp, tr, g_max, load, df, dtm, year, tooth, tipping, cw, material_name,
            stops: StopFigures | None = None) -> list[Check]:
    out = []
    share = g_max / load if load > 0 else 0.0
    fix = ("raise the gear ratio (drive.wheel_teeth / drive.pinion_teeth), use a stronger motor"
           + (f", or balance the frame (gravity is {share:.0%} of the load: "
              f"{cw.mass_kg * 1000:.0f} g at {_pos(cw.position_mm)} mm)" if share > 0.2 and cw.found
              and not cw.carried else ""))
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
    if stops is not None:
        out.append(Check(
            "teeth at motor stall", ok, tooth.stall_stress_MPa, tooth.allowable_MPa, "MPa",
            f"at the end stops (+-{stops.angle_deg:g} deg) the stalled motor loads the pinion to "
            f"{tooth.stall_stress_MPa:.3g} MPa (Lewis, stall torque at the pinion's pitch circle) vs "
            f"{tooth.allowable_MPa:.3g} MPa" + ("" if ok else "; add drive.layers or a larger drive.module")))
        ok = stops.bearing_stress_MPa <= stops.allowable_MPa
        out.append(Check(
            "end stop bearing", ok, stops.bearing_stress_MPa, stops.allowable_MPa, "MPa",
            f"stall torque through the ratio plus the load, {stops.axle_torque_Nm:.3g} N·m at the axle, is "
            f"{stops.force_N:.3g} N on the stop at {stops.radius_mm:.3g} mm; over {stops.contact_length_mm:.3g} x "
            f"{stops.thickness_mm:g} mm of sheet edge {stops.bearing_stress_MPa:.3g} MPa vs {stops.allowable_MPa:.3g} "
            f"MPa ({material_name} in-plane compressive strength / {STOP_BEARING_SAFETY:g})"
            + ("" if ok else "; a longer stop arm (a higher axle) or a thicker sheet")))
    else:
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
        + ("" if ok else f"; screw the {'ground plate' if tr.axle_tilt_deg > 0 else 'base'} down "
           f"or add {tipping.ballast_kg:.2f} kg ballast at its middle"),
        binding=False))
    return out


def _mount_check(m: MountStiffness, material_name: str) -> Check:
    """The motor mount's give at the pinion under the stalled motor's tooth force (sheetgen.mechanics.mount)."""
    text = (f"the motor-mount plate gives {m.deflection_mm * 1000:.3g} µm at the pinion under the stalled motor's "
            f"tooth force {m.force_N:.3g} N (cantilever {m.lever_mm:.3g} mm from the base, least I "
            f"{m.second_moment_mm4:.4g} mm4, {material_name} E {m.modulus_MPa:g} MPa: delta = F L^3 / 3 E I, Roark); "
            f"allowed {MOUNT_BACKLASH_SHARE:g} x drive.backlash = {m.limit_mm * 1000:.3g} µm")
    if not m.ok:
        text += "; a stiffer sheet, a thicker sheet, a lower motor (drive.pinion_angle) or more drive.backlash"
    return Check("motor mount stiffness", m.ok, m.deflection_mm, m.limit_mm, "mm", text)


def _pos(p) -> str:
    return "[" + ", ".join(f"{v:.0f}" for v in p) + "]"
