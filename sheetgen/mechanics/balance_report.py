"""The balance report: the figures and verdicts of one kit's balance and drive check,
with the cautions shown beside them.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from sheetgen.numbers import sig
from sheetgen.mechanics import loads, solar
from sheetgen.mechanics.drive import DriveTime
from sheetgen.mechanics.pulse import AxleLoad
from sheetgen.mechanics.tracking import YearTracking
from sheetgen.mechanics.massprops import Counterweight, MassProperties
from sheetgen.mechanics.load_geometry import WindPlate
from sheetgen.mechanics.stops import StopFigures
from sheetgen.mechanics.mount import MountStiffness


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
    year: YearTracking
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
    stops: StopFigures | None = None  # the end stops at the stall (None: a kit without them)
    mount: MountStiffness | None = None  # the motor mount's give at the pinion (sheetgen.mechanics.mount)

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
                "carried": self.counterweight.carried,
                "bare_unbalance_gmm": sig(self.counterweight.bare_unbalance_gmm),
                "residual_unbalance_gmm": sig(self.counterweight.residual_unbalance_gmm),
            },
            "ballast_kg": sig(self.tipping.ballast_kg),
            "checks": [c.to_json() for c in self.checks],
            "motor_mount": None if self.mount is None else self.mount.to_json(),
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
            "stops": None if self.stops is None else {
                "angle_deg": sig(self.stops.angle_deg),
                "axle_torque_Nm": sig(self.stops.axle_torque_Nm),
                "radius_mm": sig(self.stops.radius_mm),
                "contact_length_mm": sig(self.stops.contact_length_mm),
                "force_N": sig(self.stops.force_N),
                "bearing_stress_MPa": sig(self.stops.bearing_stress_MPa),
                "bearing_allowable_MPa": sig(self.stops.allowable_MPa),
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
