"""What a gear must be: the gear and hub specs, the accepted ranges, and their validation.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from sheetgen.errors import SheetgenError
from sheetgen.drive.involute import DEFAULT_CHORD_TOL_MM


# ranges accepted (also in the gear command's help)
MODULE_RANGE_MM = (0.3, 25.0)
TEETH_RANGE = (6, 500)
PRESSURE_ANGLE_RANGE_DEG = (14.5, 25.0)
SHIFT_RANGE = (-1.0, 1.5)
BACKLASH_MAX_MODULES = 0.5        # backlash up to 0.5 m
KERF_RANGE_MM = (0.0, 1.0)
CHORD_TOL_RANGE_MM = (0.0005, 0.05)
MIN_BORE_MM = 1.0
BORE_SHAPES = ("round", "d", "square", "hex")

MIN_TIP_LAND_MODULES = 0.2        # narrower tips are fragile (common practice: 0.2 m to 0.4 m)
MIN_CONTACT_RATIO = 1.2           # below this a pair runs rough (common practice)
MIN_CLEARANCE_MODULES = 0.1       # tip-to-root clearance of a mounted pair (ISO 53 gives 0.25 m)
WEB_MIN_MM = 3.0
RIM_MODULES = 2.7

# Field labels used in error messages; the command passes its option names,
# a parameter file loader can pass its key names.
DEFAULT_LABELS = {
    "module_mm": "module_mm",
    "teeth": "teeth",
    "pressure_angle_deg": "pressure_angle_deg",
    "shift": "shift",
    "backlash_mm": "backlash_mm",
    "kerf_mm": "kerf_mm",
    "chord_tol_mm": "chord_tol_mm",
    "bore_mm": "hub.bore_mm",
    "bore_shape": "hub.bore_shape",
    "across_flats_mm": "hub.across_flats_mm",
}


@dataclass(frozen=True)
class Hub:
    bore_mm: float = 0.0                    # 0 = no hole
    bore_shape: str = "round"               # "round" | "d" | "square" | "hex"
    across_flats_mm: float | None = None    # D: flat to opposite side; square/hex: across flats
    lightening: bool = False                # windows and spokes when there is room


@dataclass(frozen=True)
class GearSpec:
    module_mm: float
    teeth: int
    pressure_angle_deg: float = 20.0
    shift: float = 0.0                      # profile shift coefficient x
    backlash_mm: float = 0.0                # tooth thinning at the pitch circle, this gear
    hub: Hub = field(default_factory=Hub)


@dataclass(frozen=True)
class GearGeometry:
    spec: GearSpec
    polygon: object                         # shapely Polygon: the cut path, centred on the origin
    pitch_diameter_mm: float
    base_diameter_mm: float
    tip_diameter_mm: float
    root_diameter_mm: float
    span_teeth: int
    span_mm: float
    pin_diameter_mm: float
    over_pins_mm: float
    warnings: tuple[str, ...]
    form_diameter_mm: float = 0.0           # where the involute flank begins (finished gear)
    pitch_thickness_mm: float = 0.0         # arc tooth thickness at the pitch circle (finished gear)
    undercut: bool = False                  # the rack cuts into the involute near the root
    kerf_mm: float = 0.0                    # kerf the polygon is compensated for
    chord_tol_mm: float = DEFAULT_CHORD_TOL_MM
    round_holes_mm: tuple[tuple[float, float, float], ...] = ()   # (cx, cy, r) of round holes, finished size
    windows: int = 0                        # lightening windows cut


# --------------------------------------------------------------------------
# validation
# --------------------------------------------------------------------------

def _fmt(v: float) -> str:
    return f"{v:g}"


def check_in_range(value, lo, hi, label, unit=""):
    if not isinstance(value, (int, float)) or isinstance(value, bool) or not math.isfinite(value) \
            or not lo <= value <= hi:
        u = f" {unit}" if unit else ""
        raise SheetgenError(f"{label} = {value!r}: must be from {_fmt(lo)} to {_fmt(hi)}{u}")


def check_gear_spec(spec: GearSpec, kerf_mm: float = 0.0, chord_tol_mm: float = DEFAULT_CHORD_TOL_MM,
                    labels: dict[str, str] | None = None) -> None:
    """Raise SheetgenError (one line naming the option and its range) for values out of range."""
    lab = dict(DEFAULT_LABELS, **(labels or {}))
    check_in_range(spec.module_mm, *MODULE_RANGE_MM, lab["module_mm"], "mm")
    if not isinstance(spec.teeth, int) or isinstance(spec.teeth, bool) \
            or not TEETH_RANGE[0] <= spec.teeth <= TEETH_RANGE[1]:
        raise SheetgenError(f"{lab['teeth']} = {spec.teeth!r}: must be a whole number from "
                            f"{TEETH_RANGE[0]} to {TEETH_RANGE[1]}")
    check_in_range(spec.pressure_angle_deg, *PRESSURE_ANGLE_RANGE_DEG, lab["pressure_angle_deg"], "deg")
    check_in_range(spec.shift, *SHIFT_RANGE, lab["shift"])
    check_in_range(spec.backlash_mm, 0.0, BACKLASH_MAX_MODULES * spec.module_mm, lab["backlash_mm"],
              "mm (0.5 x module)")
    check_in_range(kerf_mm, *KERF_RANGE_MM, lab["kerf_mm"], "mm")
    check_in_range(chord_tol_mm, *CHORD_TOL_RANGE_MM, lab["chord_tol_mm"], "mm")
    hub = spec.hub
    if hub.bore_shape not in BORE_SHAPES:
        raise SheetgenError(f"{lab['bore_shape']} = {hub.bore_shape!r}: must be one of {', '.join(BORE_SHAPES)}")
    if not isinstance(hub.bore_mm, (int, float)) or not math.isfinite(hub.bore_mm) or hub.bore_mm < 0 \
            or 0 < hub.bore_mm < MIN_BORE_MM:
        raise SheetgenError(f"{lab['bore_mm']} = {hub.bore_mm!r}: must be 0 (no hole) or at least {MIN_BORE_MM:g} mm")
    af = hub.across_flats_mm
    if hub.bore_shape == "round":
        if af is not None:
            raise SheetgenError(f"{lab['across_flats_mm']} = {af!r}: only for a d, square or hex hole "
                                f"({lab['bore_shape']} is round)")
    elif hub.bore_shape == "d":
        if hub.bore_mm <= 0:
            raise SheetgenError(f"{lab['bore_mm']} = {hub.bore_mm!r}: a d hole needs the bore diameter "
                                f"(at least {MIN_BORE_MM:g} mm)")
        if af is None or not (0.5 * hub.bore_mm < af < hub.bore_mm):
            raise SheetgenError(f"{lab['across_flats_mm']} = {af!r}: for a d hole of {_fmt(hub.bore_mm)} mm "
                                f"must be more than {_fmt(0.5 * hub.bore_mm)} and less than {_fmt(hub.bore_mm)} mm")
    else:
        size = af if af is not None else hub.bore_mm
        if af is not None and hub.bore_mm not in (0, 0.0) and abs(af - hub.bore_mm) > 1e-9:
            raise SheetgenError(f"{lab['across_flats_mm']} = {af!r} and {lab['bore_mm']} = {hub.bore_mm!r}: "
                                f"a {hub.bore_shape} hole has one size; give only {lab['across_flats_mm']}")
        if size is None or not math.isfinite(size) or size < MIN_BORE_MM:
            raise SheetgenError(f"{lab['across_flats_mm']} = {size!r}: a {hub.bore_shape} hole needs its size "
                                f"across flats, at least {MIN_BORE_MM:g} mm")
