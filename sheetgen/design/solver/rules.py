"""The layout rules: each derived key's rule, written once, and the order they run in.

Each rule reads the state of the round (inputs, the pinned values, the load torque
the previous round's kit gives) and returns the values of the keys it sets.
Pure: no printing, no files.
"""

from __future__ import annotations

import math

from sheetgen.errors import ParameterError
from sheetgen.design.schema import SCHEMA_BY_PATH
from sheetgen.design.solver.model import NoLayout, Rule, State, key_hi, key_lo, with_values


# ISO 54 first-choice modules from 1 to 6 mm (from memory)
ISO54_SERIES_I_MM = (1.0, 1.25, 1.5, 2.0, 2.5, 3.0, 4.0, 5.0, 6.0)
MIN_MODULE_MM = 1.0  # smaller teeth lose too much of their flank to the kerf (our rule)
MODULE_PER_SHEET = 0.5  # module at least half the sheet thickness: a stubby tooth in thick stock (our rule)
MIN_PINION_TEETH = 12  # the Lewis form factor table used by the tooth check starts at 12 (Shigley table 14-2)
WHEEL_SHEET_SHARE = 0.5  # the wheel's tip circle takes at most half the usable sheet's short side (our rule)
MAX_TEETH = 400
BORDER_MIN_MM = 8.0  # our default frame border
BORDER_BOLT_MATERIAL_MM = 2.0  # material each side of a frame bolt hole (our rule)
SHIFT_STEP = 0.05  # derived shifts are rounded up to this step
HEIGHT_GRID_MM = 0.5  # derived axle heights sit on this grid
HEIGHT_SURPLUS_MM = 1.0  # a derived height may leave at most this much clearance over frame.clearance ...
HEIGHT_STEPS = 14  # ... found within this many sweeps
MAX_HEIGHT_MM = SCHEMA_BY_PATH["axle.height"].hi


def _centre_distance_mm(spec) -> float:
    from sheetgen.drive.gears import centre_distance_mm

    d = spec.drive
    return centre_distance_mm(d.module_mm, d.pinion_teeth, d.wheel_teeth, d.pressure_angle_deg,
                              d.pinion_shift, d.wheel_shift)


def _height_floor_mm(spec) -> float:
    from sheetgen.design.layout import motor_floor_height_mm, stop_floor_height_mm

    return max(key_lo("axle.height"), motor_floor_height_mm(spec, _centre_distance_mm(spec)),
               stop_floor_height_mm(spec))


def _build(spec, height_mm: float):
    from sheetgen.design.kit import build_kit

    return build_kit(with_values(spec, {"axle.height": height_mm}), check_clearance=False)


def load_torque_Nm(st: State) -> float:
    """Worst load torque at the axle (gravity + friction + wind), from the
    balance check of the kit the state describes. It does not depend on the
    axle height (nothing that turns moves with it), so the kit is built at the
    lowest height the motor allows when the height is still to be found."""
    from sheetgen.mechanics.load_torque import axle_load

    def run():
        spec = st.spec
        h = spec.axle.height_mm if not st.is_auto("axle.height") else _height_floor_mm(spec)
        return axle_load(_build(spec, h), spec).load_torque_Nm

    return st.memo("load", st.snapshot(("axle.height",)), run)


# ---------------------------------------------------------------------------
# the rules


def _border(st: State) -> dict:
    s = st.spec
    t = s.sheet.thickness_mm
    bolt = s.frame.bolt_diameter_mm
    need = max(BORDER_MIN_MM, 2.0 * t, t + 3.0 - s.frame.ledge_mm,
               bolt + 2 * BORDER_BOLT_MATERIAL_MM if bolt > 0 else 0.0)
    return {"frame.border": math.ceil(need * 2 - 1e-9) / 2}


def module_floor_mm(sheet_thickness_mm: float) -> float:
    """Smallest module the rule teeth_carry_load starts from for this sheet."""
    need = max(MIN_MODULE_MM, MODULE_PER_SHEET * sheet_thickness_mm)
    return next((m for m in ISO54_SERIES_I_MM if m >= need - 1e-9), ISO54_SERIES_I_MM[-1])


def _teeth_carry_load(st: State) -> dict:
    from sheetgen.mechanics import loads
    from sheetgen.mechanics.materials import sheet_material

    s = st.spec
    d = s.drive
    load = st.load_Nm
    if load is None:  # first round: no kit yet to weigh
        return {"drive.module": d.module_mm, "drive.layers": d.layers}
    if d.pinion_teeth < MIN_PINION_TEETH:
        raise ParameterError(
            f"drive.pinion_teeth = {d.pinion_teeth}: the tooth check's Lewis form factor table (Shigley table "
            f"14-2) starts at {MIN_PINION_TEETH} teeth; must be from {MIN_PINION_TEETH} to 200")
    t = s.sheet.thickness_mm
    m0 = module_floor_mm(t)
    if not st.is_auto("drive.module"):
        modules = [d.module_mm]
    elif st.module_cap_mm is not None:
        # a finer module lets the wheel carry more teeth on the sheet, for a motor that needs the ratio
        modules = [m for m in reversed(ISO54_SERIES_I_MM) if MIN_MODULE_MM <= m <= st.module_cap_mm]
    else:
        modules = [m for m in ISO54_SERIES_I_MM if m >= m0]
    layer_counts = list(range(1, 5)) if st.is_auto("drive.layers") else [d.layers]
    strength = sheet_material(s.sheet.material).bending_strength_MPa
    ratio = d.wheel_teeth / d.pinion_teeth
    motor_Nm = load / (ratio * d.efficiency)
    best: tuple[float, float, int] | None = None
    for m in modules:
        for n in layer_counts:
            fig = loads.tooth_figures(load, motor_Nm, m, d.pinion_teeth, d.wheel_teeth, n * t, strength,
                                      s.check.tooth_safety, s.motor.stall_torque_Nm)
            # the end stops stall the motor at the travel ends: the teeth carry the stall too
            worst = max(fig.stress_MPa, fig.stall_stress_MPa)
            if worst <= fig.allowable_MPa:
                return {"drive.module": m, "drive.layers": n}
            if m <= 2 * max(m0, min(modules)) and (best is None or worst < best[0]):
                best = (worst, m, n)
    if best is None:  # the wheel's cap leaves no module of the series
        raise NoLayout(f"drive.module: no module of the ISO 54 series from {MIN_MODULE_MM:g} mm is left under "
                       f"the limit the wheel sets ({st.module_cap_mm} mm)", "module")
    # none carries the load: the least stressed; the tooth check's verdict says it fails
    return {"drive.module": best[1], "drive.layers": best[2]}


def undercut_free_shift(teeth: int, pressure_angle_deg: float) -> float:
    """Least profile shift, on a SHIFT_STEP grid, that cuts this many teeth without
    undercut: x = 1 - z sin^2 a / 2 (or the rack's own limit, whichever is larger)."""
    from sheetgen.drive import involute as inv_m

    x = max(0.0, inv_m.min_shift_no_undercut(teeth, pressure_angle_deg),
            inv_m.rack_min_shift_no_undercut(teeth, pressure_angle_deg))
    return round(math.ceil(x / SHIFT_STEP - 1e-9) * SHIFT_STEP, 4)


def _pinion_shift_for(st: State, teeth: int) -> float:
    d = st.spec.drive
    return undercut_free_shift(teeth, d.pressure_angle_deg) if st.is_auto("drive.pinion_shift") else d.pinion_shift


def _pinion_fits_shaft(st: State) -> dict:
    from sheetgen.drive.gears import web_mm
    from sheetgen.drive.involute import root_radius_mm

    s = st.spec
    m = s.drive.module_mm
    for z in range(MIN_PINION_TEETH, int(key_hi("drive.pinion_teeth")) + 1):
        if root_radius_mm(m, z, _pinion_shift_for(st, z)) - s.motor.shaft_diameter_mm / 2 >= web_mm(m) - 1e-9:
            return {"drive.pinion_teeth": z}
    raise NoLayout(f"motor.shaft_diameter = {s.motor.shaft_diameter_mm:g}: no pinion of module {m:g} mm "
                   "leaves a web round the bore", "module")


def _pinion_no_undercut(st: State) -> dict:
    d = st.spec.drive
    return {"drive.pinion_shift": undercut_free_shift(d.pinion_teeth, d.pressure_angle_deg)}


def wheel_teeth_limits(spec) -> tuple[int, int]:
    """Fewest and most wheel teeth the module allows: at least the pinion's and
    no undercut at drive.wheel_shift; the tip circle within WHEEL_SHEET_SHARE of
    the usable sheet's short side."""
    from sheetgen.drive.gears import undercut_limit

    d, sh = spec.drive, spec.sheet
    lo = max(d.pinion_teeth, math.ceil(undercut_limit(d.pressure_angle_deg, d.wheel_shift) - 1e-9))
    short = min(sh.width_mm, sh.height_mm) - 2 * sh.margin_mm
    hi = min(MAX_TEETH, math.floor(WHEEL_SHEET_SHARE * short / d.module_mm - 2 - 2 * d.wheel_shift + 1e-9))
    return lo, hi


def _wheel_for_torque_margin(st: State) -> dict:
    s = st.spec
    d, mo = s.drive, s.motor
    load = st.load_Nm
    lo, hi = wheel_teeth_limits(s)
    if hi < lo:
        raise NoLayout(f"drive.module = {d.module_mm:g}: a wheel of {lo} teeth would not fit "
                       f"{WHEEL_SHEET_SHARE:g} of the sheet's short side", "module")
    if load is None:
        return {"drive.wheel_teeth": min(max(5 * d.pinion_teeth, lo), hi)}
    usable = mo.stall_torque_Nm * mo.usable_fraction
    per_tooth = usable * d.efficiency / d.pinion_teeth  # axle torque on hand per wheel tooth
    need = math.ceil(s.check.torque_margin * load / per_tooth - 1e-9)
    z = min(max(need, lo), hi)
    if need > hi and st.is_auto("drive.module") and d.module_mm > MIN_MODULE_MM:
        short = min(s.sheet.width_mm, s.sheet.height_mm) - 2 * s.sheet.margin_mm
        fits = WHEEL_SHEET_SHARE * short / (need + 2 + 2 * d.wheel_shift)  # the module that would take `need` teeth
        finer = [m for m in ISO54_SERIES_I_MM if MIN_MODULE_MM <= m < d.module_mm and m <= fits] or [MIN_MODULE_MM]
        cap = finer[-1]
        if cap < d.module_mm and (st.module_cap_mm is None or cap < st.module_cap_mm):
            st.module_cap_mm = cap
            return {"drive.wheel_teeth": z}  # the next round tries the finer module
    if hi * per_tooth < load:
        raise NoLayout(
            f"the motor cannot turn the frame at any ratio module {d.module_mm:g} mm allows "
            f"(wheel up to {hi} teeth: {hi * per_tooth:.3g} N·m at the axle against a load of {load:.3g} N·m)",
            "motor", stall_needed_Nm=load / (hi * per_tooth) * mo.stall_torque_Nm)
    return {"drive.wheel_teeth": z}


def _motor_shaft_reach(st: State) -> dict:
    """The motor's face sits drive.mount_gap past the gear stack (the mount plate
    clamps the body, flush with the face, so no plate eats the shaft): the shaft
    grips the pinion when shaft >= gap + grip, and its end keeps SHAFT_END_GAP_MM
    off the support when the spacers leave room for what runs past the pinion."""
    from sheetgen.design.layout import MOUNT_GAP_MM, SHAFT_END_GAP_MM, pinion_grip_mm

    s = st.spec
    t, layers, shaft = s.sheet.thickness_mm, s.drive.layers, s.motor.shaft_length_mm
    n_lo, n_max = int(key_lo("drive.wheel_spacers")), int(key_hi("drive.wheel_spacers"))
    grip = pinion_grip_mm(t, layers)
    if not st.is_auto("drive.mount_gap"):
        gap = s.drive.mount_gap_mm
        poke = shaft - (gap + layers * t)  # past the pinion's inner face toward the support
        n = max(n_lo, math.ceil((poke + SHAFT_END_GAP_MM) / t - 1e-9))
        return {"drive.wheel_spacers": n if st.is_auto("drive.wheel_spacers") else s.drive.wheel_spacers,
                "drive.mount_gap": gap}
    need = MOUNT_GAP_MM + grip
    if shaft < need - 1e-9:
        raise NoLayout(f"motor.shaft_length = {shaft:g} mm is too short to cross the {MOUNT_GAP_MM:g} mm gap to "
                       f"the pinion and grip its stack ({layers} layer(s) of {t:g} mm) by {grip:g} mm",
                       "shaft", need_mm=need)
    extra = shaft - (MOUNT_GAP_MM + layers * t)  # past the pinion's inner face (negative: ends inside it)
    counts = range(n_lo, n_max + 1) if st.is_auto("drive.wheel_spacers") else [s.drive.wheel_spacers]
    for n in counts:
        room = n * t - SHAFT_END_GAP_MM  # how far the spacer stack lets the shaft run past the pinion
        gap = MOUNT_GAP_MM + max(0.0, extra - room)
        # a longer gap moves the motor out (a longer overhang of the wheel); up to one sheet is taken
        # before another spacer is added
        if gap <= MOUNT_GAP_MM + t + 1e-9 or n == counts[-1]:
            if shaft - gap < grip - 1e-9:  # cannot happen with n >= 1 (the spacers give room), kept as a guard
                raise NoLayout(f"motor.shaft_length = {shaft:g} mm: no spacer count keeps the pinion gripped and "
                               "the shaft end off the support", "shaft", need_mm=need)
            return {"drive.wheel_spacers": n, "drive.mount_gap": round(gap, 3)}
    raise AssertionError("unreachable")


def _axle_clears_travel(st: State) -> dict:
    from sheetgen.design.kit import frame_sweep, travel_deg

    s = st.spec
    floor = _height_floor_mm(s)
    need = s.frame.clearance_mm

    def grid_up(h):
        return math.ceil(h / HEIGHT_GRID_MM - 1e-9) * HEIGHT_GRID_MM

    floor = grid_up(floor)

    reach: list[float] = []

    def clearance(h):
        def run():
            kit = _build(s, h)
            if not reach:
                reach.append(_turning_reach_mm(kit))
            return frame_sweep(kit, travel_deg(s)).min_clearance_mm
        return st.memo("sweep", (st.snapshot(("axle.height",)), h), run)

    prev = s.axle.height_mm
    h = grid_up(max(floor, prev)) if isinstance(prev, (int, float)) else floor
    passing, failing = None, None
    seen: list[tuple[float, float]] = []  # (height, clearance) where the frame does not touch
    for _ in range(HEIGHT_STEPS):
        if h > MAX_HEIGHT_MM:
            raise NoLayout(f"the turning frame needs an axle height over {MAX_HEIGHT_MM:g} mm to clear the stand",
                           "height")
        c = clearance(h)
        if c > 0:
            seen.append((h, c))
        if c >= need - 1e-9:
            passing = h if passing is None else min(passing, h)
            if c - need <= HEIGHT_SURPLUS_MM or h <= floor:
                break
            nxt = grid_up(max(floor, h - (c - need) / 1.2))  # clearance grows no faster than 1.2 x height
        else:
            failing = h if failing is None else max(failing, h)
            nxt = grid_up(h + (need - c) / 0.7)  # ... and no slower than 0.7 x (the stretchers rise with it)
            if c <= 0 and reach:
                # touching: no distance to go by; the stand below the frame's reach (base, stretchers
                # at most STRETCHER_MAX_MM tall) certainly clears, so bisect toward that height
                nxt = max(nxt, grid_up(reach[0] + need + STRETCHER_MAX_MM + 1.0))
        if len(seen) >= 2:
            # secant through the two evaluations nearest the target clearance
            (h1, c1), (h2, c2) = sorted(seen, key=lambda p: abs(p[1] - need))[:2]
            if abs(c2 - c1) > 1e-6 and h1 != h2:
                slope = (c2 - c1) / (h2 - h1)
                if slope > 0:
                    nxt = grid_up(h1 + (need + HEIGHT_SURPLUS_MM / 4 - c1) / slope)
        if passing is not None and failing is not None:
            if passing - failing <= HEIGHT_GRID_MM + 1e-9:
                break
            if not failing < nxt < passing:
                nxt = grid_up((passing + failing) / 2)
                if nxt >= passing:
                    break
        if nxt < floor:
            nxt = floor
        if passing is not None and nxt >= passing:
            break
        h = nxt
    if passing is None:
        raise NoLayout(f"the turning frame does not clear the stand by frame.clearance = {need:g} mm at any "
                       f"axle height the search tried (up to {h:g} mm)", "height")
    return {"axle.height": passing}


STRETCHER_MAX_MM = 40.0  # the stretchers' height cap in sheetgen/design/layout.py


def _turning_reach_mm(kit) -> float:
    """Farthest point of any turning part from the axle, seen along it."""
    import numpy as np

    from sheetgen.kitmodel.clearance import kit_silhouettes

    pts = [np.asarray(sil.shape.exterior.coords) for sil in kit_silhouettes(kit) if sil.rotating]
    return float(max(np.hypot(p[:, 0], p[:, 1]).max() for p in pts)) if pts else 0.0


RULES: tuple[Rule, ...] = (
    Rule("border_holds_bolts", ("frame.border",),
         f"at least {BORDER_MIN_MM:g} mm, two sheet thicknesses, the bolt hole plus "
         f"{BORDER_BOLT_MATERIAL_MM:g} mm each side, and sheet.thickness + 3 mm less the ledge", _border),
    Rule("teeth_carry_load", ("drive.module", "drive.layers"),
         "the smallest ISO 54 module from max(1 mm, half the sheet) (the largest finer one, down to 1 mm, when "
         "the motor needs a ratio the wheel cannot reach) and the fewest layers whose Lewis tooth stress under the "
         "load, and under the motor stalled at the end stops, stays within the tooth check's allowable",
         _teeth_carry_load),
    Rule("pinion_fits_shaft", ("drive.pinion_teeth",),
         f"the fewest teeth (from {MIN_PINION_TEETH}) whose root circle leaves the gear web round the motor shaft",
         _pinion_fits_shaft),
    Rule("pinion_no_undercut", ("drive.pinion_shift",),
         "the least shift x = 1 - z sin^2 a / 2 (no undercut), rounded up to 0.05", _pinion_no_undercut),
    Rule("wheel_for_torque_margin", ("drive.wheel_teeth",),
         "the fewest teeth giving check.torque_margin over the worst load, within the module's limits "
         "(the wheel within half the sheet's short side); else the most it allows", _wheel_for_torque_margin),
    Rule("motor_shaft_reach", ("drive.wheel_spacers", "drive.mount_gap"),
         "the motor's face (the mount plate clamps its body, flush with the face) at least 1 mm past the gear "
         "stack, and the fewest spacers that keep the shaft end at least 1 mm from the support while the "
         "shaft grips the pinion; the gap grows (up to one sheet per spacer saved) for a long shaft",
         _motor_shaft_reach),
    Rule("axle_clears_travel", ("axle.height",),
         f"the lowest height, on a {HEIGHT_GRID_MM:g} mm grid, keeping frame.clearance (plus at most "
         f"{HEIGHT_SURPLUS_MM:g} mm) through the travel, the motor off the base and the stop arm its shortest "
         "contact line",
         _axle_clears_travel),
)
RULE_BY_NAME = {r.name: r for r in RULES}
LOAD_KEYS = frozenset({"drive.module", "drive.layers", "drive.wheel_teeth"})  # set from the load torque


# ---------------------------------------------------------------------------
# rules of the kit's figures that have no key of their own (set in
# sheetgen/design/layout.py and sheetgen/design/parts/counterweight.py, named here
# so the derived values say by which rule)

FRAME_RULE_DOCS = {
    "clamp_stack": "whole rim layers when the panel is that thick (to 0.2 mm); else one more, and spring fingers in "
                   "the bezel",
    "axle_keyed": "a flat 0.9 d across from the -x rib to the +x end; the parts that turn with it have D-bores",
    "counterweight_balance": "a steel bar opposite the bare frame's CG, on a bracket beside the +x rib",
}
