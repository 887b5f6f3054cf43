"""Typed parameter sections, one frozen dataclass per section of the schema.

Generated from sheetgen.design.schema.SCHEMA by `python -m sheetgen.design.spec --sections`;
tests/test_spec.py fails while this file differs from what the schema writes. Do not edit.
A derived key holds the number the layout solver set (or the pinned one) once the
spec is loaded; only inside the solver may it still read "auto".
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal


@dataclass(frozen=True)
class PanelParams:
    """[panel] (see the README's parameter table for units, ranges and meaning)."""

    width_mm: float  # panel.width, mm
    height_mm: float  # panel.height, mm
    thickness_mm: float  # panel.thickness, mm
    mass_kg: float  # panel.mass, kg


@dataclass(frozen=True)
class SheetParams:
    """[sheet] (see the README's parameter table for units, ranges and meaning)."""

    width_mm: float  # sheet.width, mm
    height_mm: float  # sheet.height, mm
    thickness_mm: float  # sheet.thickness, mm
    margin_mm: float  # sheet.margin, mm
    material: Literal['mdf', 'birch_plywood', 'cast_acrylic']  # sheet.material, -
    grain: bool  # sheet.grain, -
    price: float  # sheet.price, currency


@dataclass(frozen=True)
class LaserParams:
    """[laser] (see the README's parameter table for units, ranges and meaning)."""

    kerf_mm: float  # laser.kerf, mm
    cut_speed_mm_s: float  # laser.cut_speed, mm/s
    rapid_speed_mm_s: float  # laser.rapid_speed, mm/s
    pierce_time_s: float  # laser.pierce_time, s
    rate_per_h: float  # laser.rate, currency/h
    lead_in_mm: float  # laser.lead_in, mm


@dataclass(frozen=True)
class NestParams:
    """[nest] (see the README's parameter table for units, ranges and meaning)."""

    spacing_mm: float  # nest.spacing, mm
    time_limit_s: float  # nest.time_limit, s
    effort: float  # nest.effort, -
    seed: int  # nest.seed, -


@dataclass(frozen=True)
class JointsParams:
    """[joints] (see the README's parameter table for units, ranges and meaning)."""

    fit: Literal['press', 'snug', 'slip']  # joints.fit, -
    tab_width_mm: float  # joints.tab_width, mm


@dataclass(frozen=True)
class FrameParams:
    """[frame] (see the README's parameter table for units, ranges and meaning)."""

    border_mm: float  # frame.border, mm, derived
    ledge_mm: float  # frame.ledge, mm
    clearance_mm: float  # frame.clearance, mm
    bolt_diameter_mm: float  # frame.bolt_diameter, mm


@dataclass(frozen=True)
class AxleParams:
    """[axle] (see the README's parameter table for units, ranges and meaning)."""

    diameter_mm: float  # axle.diameter, mm
    material: Literal['steel', 'aluminium', 'beech']  # axle.material, -
    height_mm: float  # axle.height, mm, derived
    bearing_clearance_mm: float  # axle.bearing_clearance, mm
    friction: float  # axle.friction, -


@dataclass(frozen=True)
class MotorParams:
    """[motor] (see the README's parameter table for units, ranges and meaning)."""

    body_width_mm: float  # motor.body_width, mm
    body_height_mm: float  # motor.body_height, mm
    body_length_mm: float  # motor.body_length, mm
    shaft_diameter_mm: float  # motor.shaft_diameter, mm
    shaft_flat_mm: float  # motor.shaft_flat, mm
    shaft_length_mm: float  # motor.shaft_length, mm
    boss_diameter_mm: float  # motor.boss_diameter, mm
    screw_spacing_mm: float  # motor.screw_spacing, mm
    screw_diameter_mm: float  # motor.screw_diameter, mm
    mass_kg: float  # motor.mass, kg
    stall_torque_Nm: float  # motor.stall_torque, N·m
    no_load_speed_rpm: float  # motor.no_load_speed, rpm
    voltage_V: float  # motor.voltage, V
    usable_fraction: float  # motor.usable_fraction, -


@dataclass(frozen=True)
class DriveParams:
    """[drive] (see the README's parameter table for units, ranges and meaning)."""

    module_mm: float  # drive.module, mm, derived
    pinion_teeth: int  # drive.pinion_teeth, -, derived
    wheel_teeth: int  # drive.wheel_teeth, -, derived
    pressure_angle_deg: float  # drive.pressure_angle, deg
    pinion_shift: float  # drive.pinion_shift, -, derived
    wheel_shift: float  # drive.wheel_shift, -
    backlash_mm: float  # drive.backlash, mm
    layers: int  # drive.layers, -, derived
    wheel_spacers: int  # drive.wheel_spacers, -, derived
    mount_gap_mm: float  # drive.mount_gap, mm, derived
    efficiency: float  # drive.efficiency, -
    pinion_angle_deg: float  # drive.pinion_angle, deg
    pulse_capacitance_uF: float  # drive.pulse_capacitance, µF
    pulse_voltage_V: float  # drive.pulse_voltage, V
    max_step_deg: float  # drive.max_step, deg


@dataclass(frozen=True)
class SiteParams:
    """[site] (see the README's parameter table for units, ranges and meaning)."""

    latitude_deg: float  # site.latitude, deg
    axle: Literal['horizontal', 'polar']  # site.axle, -
    travel_limit_deg: float  # site.travel_limit, deg
    wind_speed_m_s: float  # site.wind_speed, m/s


@dataclass(frozen=True)
class CheckParams:
    """[check] (see the README's parameter table for units, ranges and meaning)."""

    tooth_safety: float  # check.tooth_safety, -
    tipping_safety: float  # check.tipping_safety, -
    torque_margin: float  # check.torque_margin, -


@dataclass(frozen=True)
class PricesParams:
    """[prices] (see the README's parameter table for units, ranges and meaning)."""

    bolt: float  # prices.bolt, currency
    nut: float  # prices.nut, currency
    washer: float  # prices.washer, currency
    anchor_screw: float  # prices.anchor_screw, currency
    motor_screw: float  # prices.motor_screw, currency
    axle_rod_per_m: float  # prices.axle_rod, currency/m
    motor: float  # prices.motor, currency
    panel: float  # prices.panel, currency
    counterweight: float  # prices.counterweight, currency
    glue: float  # prices.glue, currency
    payload: float  # prices.payload, currency


@dataclass(frozen=True)
class SvgParams:
    """[svg] (see the README's parameter table for units, ranges and meaning)."""

    cut_colour: str  # svg.cut_colour, -
    label_colour: str  # svg.label_colour, -
    guide_colour: str  # svg.guide_colour, -
    stroke_mm: float  # svg.stroke, mm


SECTION_CLASSES: dict[str, type] = {
    "panel": PanelParams,
    "sheet": SheetParams,
    "laser": LaserParams,
    "nest": NestParams,
    "joints": JointsParams,
    "frame": FrameParams,
    "axle": AxleParams,
    "motor": MotorParams,
    "drive": DriveParams,
    "site": SiteParams,
    "check": CheckParams,
    "prices": PricesParams,
    "svg": SvgParams,
}
