"""The parameter schema and the typed parameters: every key's type, unit,
valid range, default and meaning (:data:`SCHEMA`, the single source of truth),
and the frozen :class:`Spec` that :func:`sheetgen.design.spec.load_spec`
returns, with the cross-key rules every spec must meet.

The README's parameter reference and the typed sections
(:mod:`sheetgen.design.sections`) are written from SCHEMA
(``python -m sheetgen.design.spec``, ``... --sections``). The layout solver
(:mod:`sheetgen.design.solver`) reads the schema and sets the keys left at
"auto"; it needs nothing of the file reading in :mod:`sheetgen.design.spec`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from sheetgen.errors import ParameterError

if TYPE_CHECKING:
    from sheetgen.design.sections import (AxleParams, CheckParams, DriveParams, FrameParams, JointsParams,
                                          LaserParams, MotorParams, NestParams, PanelParams, SheetParams,
                                          PricesParams, SiteParams, SvgParams)

REQUIRED = object()
AUTO = "auto"  # a derived key left to the layout solver (sheetgen/design/solver/)


@dataclass(frozen=True)
class Key:
    path: str
    attr: str
    kind: type
    default: Any
    unit: str
    doc: str
    lo: float | None = None
    hi: float | None = None
    choices: tuple[str, ...] = ()
    rule: str = ""  # derived key: the solver rule that sets it when the value is "auto"
    form: str = ""  # a text key's required form: COLOUR_FORM (a #rrggbb colour)

    @property
    def derived(self) -> bool:
        return bool(self.rule)

    @property
    def section(self) -> str:
        return self.path.split(".")[0]

    @property
    def name(self) -> str:
        return self.path.split(".")[1]

    def allowed(self) -> str:
        text = self._allowed()
        return f'"auto" or {text}' if self.rule else text

    def _allowed(self) -> str:
        if self.form == COLOUR_FORM:
            return 'a colour written #rrggbb (six hex digits, for example "#6a1b9a")'
        if self.choices:
            return "one of " + ", ".join(repr(c) for c in self.choices)
        if self.kind is bool:
            return "true or false"
        unit = f" {self.unit}" if self.unit and self.unit != "-" else ""
        if self.lo is not None and self.hi is not None:
            return f"from {_fmt(self.lo)} to {_fmt(self.hi)}{unit}"
        if self.lo is not None:
            return f"at least {_fmt(self.lo)}{unit}"
        return "a " + self.kind.__name__


def _fmt(v: float) -> str:
    return f"{v:g}"


def _k(path, attr, kind, default, unit, doc, lo=None, hi=None, choices=()):
    return Key(path, attr, kind, default, unit, doc, lo, hi, tuple(choices))


COLOUR_FORM = "#rrggbb"


def _colour(path, attr, default, doc):
    """A text key holding a colour written #rrggbb."""
    return Key(path, attr, str, default, "-", doc, form=COLOUR_FORM)


def _d(path, attr, kind, rule, unit, doc, lo=None, hi=None):
    """A derived key: "auto" by default (the solver's rule sets it), or a number that pins it."""
    return Key(path, attr, kind, AUTO, unit, doc, lo, hi, (), rule)


MATERIAL_CHOICES = ("mdf", "birch_plywood", "cast_acrylic")

SCHEMA: tuple[Key, ...] = (
    # panel -------------------------------------------------------------
    _k("panel.width", "width_mm", float, REQUIRED, "mm", "Panel size along the axle.", 40, 600),
    _k("panel.height", "height_mm", float, REQUIRED, "mm", "Panel size across the axle.", 40, 600),
    _k("panel.thickness", "thickness_mm", float, REQUIRED, "mm", "Panel thickness, glass or laminate included.", 1, 25),
    _k("panel.mass", "mass_kg", float, REQUIRED, "kg", "Panel mass.", 0.005, 5),
    # sheet -------------------------------------------------------------
    _k("sheet.width", "width_mm", float, REQUIRED, "mm", "Sheet stock size along the laser's x.", 100, 3000),
    _k("sheet.height", "height_mm", float, REQUIRED, "mm", "Sheet stock size along the laser's y.", 100, 3000),
    _k("sheet.thickness", "thickness_mm", float, REQUIRED, "mm", "Sheet thickness; every slot follows it.", 1.5, 12),
    _k("sheet.margin", "margin_mm", float, 5.0, "mm", "Clear border kept at the sheet edge.", 0, 50),
    _k("sheet.material", "material", str, REQUIRED, "-", "Sheet material (density and strength from the materials table).",
       choices=MATERIAL_CHOICES),
    _k("sheet.grain", "grain", bool, False, "-",
       "true: the sheet has a grain along x, parts turn only by 0 or 180 degrees when nested."),
    _k("sheet.price", "price", float, 0.0, "currency", "Price of one sheet (0: no cost figures).", 0, 1e6),
    # laser -------------------------------------------------------------
    _k("laser.kerf", "kerf_mm", float, REQUIRED, "mm", "Width of material the beam removes (measure it with `sheetgen coupon`).",
       0.02, 0.6),
    _k("laser.cut_speed", "cut_speed_mm_s", float, 15.0, "mm/s", "Cutting speed for this material and thickness.", 0.5, 1000),
    _k("laser.rapid_speed", "rapid_speed_mm_s", float, 200.0, "mm/s", "Head speed when not cutting.", 5, 5000),
    _k("laser.pierce_time", "pierce_time_s", float, 0.3, "s", "Time to pierce before each contour.", 0, 10),
    _k("laser.rate", "rate_per_h", float, 0.0, "currency/h", "Machine rate (0: no cost figures).", 0, 1e5),
    _k("laser.lead_in", "lead_in_mm", float, 0.0, "mm", "Lead-in length off the part edge (0: none).", 0, 10),
    # nest --------------------------------------------------------------
    _k("nest.spacing", "spacing_mm", float, 3.0, "mm", "Clear gap between the cut contours of neighbouring parts.", 0, 50),
    _k("nest.time_limit", "time_limit_s", float, 10.0, "s",
       "Wall-clock ceiling on the nester's search; when it ends the search the layout depends on the machine.",
       0, 3600),
    _k("nest.effort", "effort", float, 0.0, "-",
       "Work budget of the nester's search in millions of work units (about 0.5 s each on a small two-core "
       "machine): same seed and effort, same layout on any machine. 0 takes 1.8 per second of nest.time_limit.",
       0, 100000),
    _k("nest.seed", "seed", int, 1, "-", "Seed of the improvement search (same seed, same layout).", 0, 2**31 - 1),
    # joints ------------------------------------------------------------
    _k("joints.fit", "fit", str, "snug", "-", "Fit class of tab-and-slot joints.", choices=("press", "snug", "slip")),
    _k("joints.tab_width", "tab_width_mm", float, 0.0, "mm",
       "Tab width along the edge (0: three sheet thicknesses, at least 6 mm).", 0, 100),
    # frame -------------------------------------------------------------
    _d("frame.border", "border_mm", float, "border_holds_bolts", "mm", "Width of the frame around the panel.", 4, 60),
    _k("frame.ledge", "ledge_mm", float, 6.0, "mm", "How far the tray reaches in under the panel edge.", 2, 40),
    _k("frame.clearance", "clearance_mm", float, 5.0, "mm",
       "Least gap between the turning frame and the fixed parts through the tracking range.", 1, 100),
    _k("frame.bolt_diameter", "bolt_diameter_mm", float, 3.2, "mm",
       "Holes that clamp the frame layers together (0: none; glue instead).", 0, 10),
    # axle --------------------------------------------------------------
    _k("axle.diameter", "diameter_mm", float, 6.0, "mm", "Axle rod diameter.", 2, 25),
    _k("axle.material", "material", str, "steel", "-", "Axle rod material.", choices=("steel", "aluminium", "beech")),
    _d("axle.height", "height_mm", float, "axle_clears_travel", "mm", "Axle height above the top of the base.",
       20, 800),
    _k("axle.bearing_clearance", "bearing_clearance_mm", float, 0.15, "mm",
       "Diametral running clearance of the axle in the support holes.", 0, 1),
    _k("axle.friction", "friction", float, 0.35, "-",
       "Friction coefficient of the axle turning in its holes (dry steel on wood, common practice).", 0.02, 1.5),
    # motor -------------------------------------------------------------
    _k("motor.body_width", "body_width_mm", float, REQUIRED, "mm", "Gear-motor body size across the shaft (y).", 5, 150),
    _k("motor.body_height", "body_height_mm", float, REQUIRED, "mm", "Gear-motor body size across the shaft (z).", 5, 150),
    _k("motor.body_length", "body_length_mm", float, REQUIRED, "mm", "Gear-motor body length along the shaft.", 5, 200),
    _k("motor.shaft_diameter", "shaft_diameter_mm", float, REQUIRED, "mm", "Output shaft diameter.", 1, 12),
    _k("motor.shaft_flat", "shaft_flat_mm", float, 0.0, "mm",
       "Output shaft size across its flat (0: round shaft).", 0, 12),
    _k("motor.shaft_length", "shaft_length_mm", float, 10.0, "mm", "Shaft length beyond the mounting face.", 2, 100),
    _k("motor.boss_diameter", "boss_diameter_mm", float, 0.0, "mm",
       "Bearing boss around the shaft on the mounting face (0: none).", 0, 60),
    _k("motor.screw_spacing", "screw_spacing_mm", float, 0.0, "mm",
       "Distance between the two mounting screws, centred on the shaft (0: none).", 0, 150),
    _k("motor.screw_diameter", "screw_diameter_mm", float, 3.0, "mm", "Mounting screw clearance hole.", 1, 10),
    _k("motor.mass", "mass_kg", float, REQUIRED, "kg", "Gear-motor mass.", 0.001, 5),
    _k("motor.stall_torque", "stall_torque_Nm", float, REQUIRED, "N·m", "Stall torque at the output shaft.", 1e-4, 50),
    _k("motor.no_load_speed", "no_load_speed_rpm", float, REQUIRED, "rpm", "No-load speed at the output shaft.", 0.1, 20000),
    _k("motor.voltage", "voltage_V", float, REQUIRED, "V", "Rated voltage.", 0.5, 48),
    _k("motor.usable_fraction", "usable_fraction", float, 0.3, "-",
       "Share of stall torque to design with (common practice: 0.2 to 0.5).", 0.05, 0.9),
    # drive -------------------------------------------------------------
    _d("drive.module", "module_mm", float, "teeth_carry_load", "mm", "Gear module (ISO 54 series recommended).",
       0.5, 6),
    _d("drive.pinion_teeth", "pinion_teeth", int, "pinion_fits_shaft", "-", "Teeth on the motor pinion.", 6, 200),
    _d("drive.wheel_teeth", "wheel_teeth", int, "wheel_for_torque_margin", "-", "Teeth on the axle wheel.", 6, 400),
    _k("drive.pressure_angle", "pressure_angle_deg", float, 20.0, "deg", "Pressure angle of the basic rack (ISO 53: 20).",
       14.5, 25),
    _d("drive.pinion_shift", "pinion_shift", float, "pinion_no_undercut", "-",
       "Profile shift coefficient x of the pinion.", -0.5, 1.0),
    _k("drive.wheel_shift", "wheel_shift", float, 0.0, "-", "Profile shift coefficient x of the wheel.", -0.5, 1.0),
    _k("drive.backlash", "backlash_mm", float, 0.1, "mm", "Circumferential backlash, split over both gears.", 0, 1),
    _d("drive.layers", "layers", int, "teeth_carry_load", "-",
       "Sheet layers stacked per gear (face width = layers x sheet thickness).", 1, 4),
    _d("drive.wheel_spacers", "wheel_spacers", int, "motor_shaft_reach", "-",
       "Spacer washers on the axle between the drive-side support and the wheel.", 1, 12),
    _d("drive.mount_gap", "mount_gap_mm", float, "motor_shaft_reach", "mm",
       "Gap along the axle between the gear stack and the motor mount (places the motor).", 0.5, 60),
    _k("drive.efficiency", "efficiency", float, 0.85, "-", "Mesh efficiency of the laser-cut gear pair.", 0.3, 1.0),
    _k("drive.pinion_angle", "pinion_angle_deg", float, 0.0, "deg",
       "Direction of the pinion from the axle, seen along +x, from straight down toward +y.", -90, 90),
    _k("drive.pulse_capacitance", "pulse_capacitance_uF", float, 0.0, "µF",
       "Capacitor dumped into the motor per pulse (0: continuous drive).", 0, 1e6),
    _k("drive.pulse_voltage", "pulse_voltage_V", float, 0.0, "V", "Voltage the capacitor is charged to.", 0, 60),
    _k("drive.max_step", "max_step_deg", float, 5.0, "deg", "Largest axle turn one pulse may make in calm air (5: a flat panel then points within 5 deg of the sun and loses under 0.4 %, 1 - cos 5 deg; a flat panel's acceptance is several degrees, common practice).", 0.1, 90),
    # site --------------------------------------------------------------
    _k("site.latitude", "latitude_deg", float, REQUIRED, "deg", "Site latitude (north positive).", -66, 66),
    _k("site.axle", "axle", str, "horizontal", "-", "Axle arrangement: horizontal north-south, or polar (tilted at the latitude).",
       choices=("horizontal", "polar")),
    _k("site.travel_limit", "travel_limit_deg", float, 60.0, "deg", "Largest rotation either side of the rest position.", 5, 90),
    _k("site.wind_speed", "wind_speed_m_s", float, 10.0, "m/s", "Design wind speed.", 0, 60),
    # check -------------------------------------------------------------
    _k("check.tooth_safety", "tooth_safety", float, 3.0, "-",
       "Safety factor on the tooth material's bending strength.", 1, 20),
    _k("check.tipping_safety", "tipping_safety", float, 1.5, "-", "Safety factor against the kit tipping over in wind.", 1, 5),
    _k("check.torque_margin", "torque_margin", float, 1.25, "-",
       "Motor torque on hand over torque needed that the drive is designed for.", 1, 10),
    # prices (optional; 0: not priced, shown as absent, never as zero) ----------
    _k("prices.bolt", "bolt", float, 0.0, "currency", "Price of one bolt of the hardware list (0: not priced).", 0, 1e4),
    _k("prices.nut", "nut", float, 0.0, "currency", "Price of one nut (0: not priced).", 0, 1e4),
    _k("prices.washer", "washer", float, 0.0, "currency", "Price of one washer (0: not priced).", 0, 1e4),
    _k("prices.anchor_screw", "anchor_screw", float, 0.0, "currency",
       "Price of one screw that fixes the base to its surface (0: not priced).", 0, 1e4),
    _k("prices.motor_screw", "motor_screw", float, 0.0, "currency",
       "Price of one screw that holds the motor to its mount (0: not priced).", 0, 1e4),
    _k("prices.axle_rod", "axle_rod_per_m", float, 0.0, "currency/m",
       "Price of the axle rod stock per metre (0: not priced).", 0, 1e5),
    _k("prices.motor", "motor", float, 0.0, "currency", "Price of one gear-motor (0: not priced).", 0, 1e5),
    _k("prices.panel", "panel", float, 0.0, "currency", "Price of one panel (0: not priced).", 0, 1e5),
    _k("prices.counterweight", "counterweight", float, 0.0, "currency",
       "Price of one counterweight (0: not priced).", 0, 1e4),
    _k("prices.glue", "glue", float, 0.0, "currency", "Glue used by one kit (0: not priced).", 0, 1e4),
    _k("prices.payload", "payload", float, 0.0, "currency",
       "The other items the turning frame carries ([[rotating_mass]] entries), per kit (0: not priced).", 0, 1e5),
    # cut-ready sheet SVGs (sheets/sheet-NN.svg) --------------------------------
    _colour("svg.cut_colour", "cut_colour", "#6a1b9a",
       "Stroke colour of the cut contours in the sheet SVGs, #rrggbb."),
    _colour("svg.label_colour", "label_colour", "#00897b",
       "Stroke colour of the engraved labels in the sheet SVGs, #rrggbb."),
    _colour("svg.guide_colour", "guide_colour", "#ef6c00",
       "Stroke colour of the alignment guides in the sheet SVGs, #rrggbb."),
    _k("svg.stroke", "stroke_mm", float, 0.01, "mm",
       "Stroke width of every line in the sheet SVGs (a hairline).", 0.001, 1),
)

SCHEMA_BY_PATH = {k.path: k for k in SCHEMA}
SECTIONS = tuple(dict.fromkeys(k.section for k in SCHEMA))

ROTATING_MASS_KEYS = ("name", "mass_kg", "position_mm")
ROTATING_MASS_LIMIT_KG = (0.0, 20.0)
POSITION_LIMIT_MM = 2000.0


@dataclass(frozen=True)
class RotatingMass:
    name: str
    mass_kg: float
    position_mm: tuple[float, float, float]


@dataclass(frozen=True)
class Derived:
    """A value the layout solver set for a key left at "auto", and the rule that set it."""
    path: str
    value: float | int
    rule: str


@dataclass(frozen=True)
class Spec:
    panel: PanelParams
    sheet: SheetParams
    laser: LaserParams
    nest: NestParams
    joints: JointsParams
    frame: FrameParams
    axle: AxleParams
    motor: MotorParams
    drive: DriveParams
    site: SiteParams
    check: CheckParams
    prices: PricesParams
    svg: SvgParams
    rotating_masses: tuple[RotatingMass, ...]
    source: str = ""
    derived: tuple[Derived, ...] = ()  # filled by the solver: the keys that were "auto"

    def is_resolved(self) -> bool:
        return not any(self.value(k.path) == AUTO for k in SCHEMA if k.derived)

    def derived_by_path(self) -> dict[str, Derived]:
        return {d.path: d for d in self.derived}

    def value(self, path: str):
        key = SCHEMA_BY_PATH[path]
        return getattr(getattr(self, key.section), key.attr)

    def to_table(self) -> dict[str, Any]:
        """The parameters as a TOML-shaped dict (keys without units)."""
        out: dict[str, Any] = {}
        for k in SCHEMA:
            out.setdefault(k.section, {})[k.name] = self.value(k.path)
        out["rotating_mass"] = [
            {"name": m.name, "mass_kg": m.mass_kg, "position_mm": list(m.position_mm)} for m in self.rotating_masses
        ]
        return out


# cross-field rules that need no geometry (geometry-dependent ones are checked
# where the parts are made, and raise ParameterError naming the keys)


def check_cross_rules(spec: Spec) -> None:
    t = spec.sheet.thickness_mm
    kerf = spec.laser.kerf_mm
    smallest = min(t, spec.motor.screw_diameter_mm if spec.motor.screw_spacing_mm > 0 else t)
    if kerf > smallest / 4:
        raise ParameterError(
            f"laser.kerf = {kerf:g}: must be at most a quarter of the smallest slot or hole "
            f"({smallest:g} mm), so at most {smallest / 4:g} mm")
    usable_w = spec.sheet.width_mm - 2 * spec.sheet.margin_mm
    usable_h = spec.sheet.height_mm - 2 * spec.sheet.margin_mm
    if min(usable_w, usable_h) < 50:
        raise ParameterError(
            f"sheet.margin = {spec.sheet.margin_mm:g}: leaves {usable_w:g} x {usable_h:g} mm of sheet; "
            "must leave at least 50 mm each way")
    if spec.motor.shaft_flat_mm and spec.motor.shaft_flat_mm >= spec.motor.shaft_diameter_mm:
        raise ParameterError(
            f"motor.shaft_flat = {spec.motor.shaft_flat_mm:g}: must be less than motor.shaft_diameter "
            f"({spec.motor.shaft_diameter_mm:g} mm), or 0 for a round shaft")
    if spec.motor.shaft_flat_mm and spec.motor.shaft_flat_mm < spec.motor.shaft_diameter_mm / 2:
        raise ParameterError(
            f"motor.shaft_flat = {spec.motor.shaft_flat_mm:g}: must be at least half of motor.shaft_diameter "
            f"({spec.motor.shaft_diameter_mm / 2:g} mm)")
    if spec.motor.boss_diameter_mm and spec.motor.boss_diameter_mm <= spec.motor.shaft_diameter_mm:
        raise ParameterError(
            f"motor.boss_diameter = {spec.motor.boss_diameter_mm:g}: must exceed motor.shaft_diameter "
            f"({spec.motor.shaft_diameter_mm:g} mm), or be 0")
    if spec.motor.screw_spacing_mm and spec.motor.screw_spacing_mm <= max(
            spec.motor.boss_diameter_mm, spec.motor.shaft_diameter_mm) + spec.motor.screw_diameter_mm:
        raise ParameterError(
            f"motor.screw_spacing = {spec.motor.screw_spacing_mm:g}: the screw holes would cut into the shaft hole; "
            f"must exceed {max(spec.motor.boss_diameter_mm, spec.motor.shaft_diameter_mm) + spec.motor.screw_diameter_mm:g} mm"
        )
    if AUTO not in (spec.drive.wheel_teeth, spec.drive.pinion_teeth) and \
            spec.drive.wheel_teeth < spec.drive.pinion_teeth:
        raise ParameterError(
            f"drive.wheel_teeth = {spec.drive.wheel_teeth}: must be at least drive.pinion_teeth "
            f"({spec.drive.pinion_teeth}); the drive reduces speed")
    if (spec.drive.pulse_capacitance_uF > 0) != (spec.drive.pulse_voltage_V > 0):
        raise ParameterError(
            "drive.pulse_capacitance and drive.pulse_voltage: give both (a pulsed drive) or neither (continuous drive)")
    if spec.frame.ledge_mm >= min(spec.panel.width_mm, spec.panel.height_mm) / 3:
        raise ParameterError(
            f"frame.ledge = {spec.frame.ledge_mm:g}: must be less than a third of the panel's smaller side "
            f"({min(spec.panel.width_mm, spec.panel.height_mm) / 3:g} mm)")
    if spec.frame.bolt_diameter_mm and spec.frame.border_mm != AUTO and \
            spec.frame.bolt_diameter_mm > spec.frame.border_mm - 2:
        raise ParameterError(
            f"frame.bolt_diameter = {spec.frame.bolt_diameter_mm:g}: must be at most frame.border - 2 "
            f"({spec.frame.border_mm - 2:g} mm), or 0")
    # the clamp stack: spring fingers that fit the bezel's window where the panel is not a whole
    # number of sheets thick (inputs only, so it is checked before the layout is solved)
    from sheetgen.design.layout import clamp_stack

    clamp_stack(spec, spec.sheet.thickness_mm, 0.0)
