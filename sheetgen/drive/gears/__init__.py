"""Gear blanks and the drive pair (pure core); how a blank carries the kerf is
told in :mod:`sheetgen.drive.gears.blank`.

Modules: spec (what a gear must be, ranges, validation), hub (bore and lightening
windows), blank (the kerf-compensated blank and its checks), pair (the meshing pair).
"""

from sheetgen.drive.gears.spec import (MODULE_RANGE_MM, TEETH_RANGE, PRESSURE_ANGLE_RANGE_DEG, SHIFT_RANGE,
                                       BACKLASH_MAX_MODULES, KERF_RANGE_MM, CHORD_TOL_RANGE_MM, MIN_BORE_MM,
                                       BORE_SHAPES, MIN_TIP_LAND_MODULES, MIN_CONTACT_RATIO, MIN_CLEARANCE_MODULES,
                                       WEB_MIN_MM, RIM_MODULES, DEFAULT_LABELS, Hub, GearSpec, GearGeometry,
                                       check_in_range, check_gear_spec)
from sheetgen.drive.gears.hub import hole_size, hole_ring, web_mm, plan_windows, window_rings
from sheetgen.drive.gears.blank import gear_blank, undercut_limit
from sheetgen.drive.gears.pair import GearPair, centre_distance_mm, contact_ratio, gear_pair

__all__ = ["BACKLASH_MAX_MODULES", "BORE_SHAPES", "CHORD_TOL_RANGE_MM", "DEFAULT_LABELS", "GearGeometry",
           "GearPair", "GearSpec", "Hub", "KERF_RANGE_MM", "MIN_BORE_MM", "MIN_CLEARANCE_MODULES",
           "MIN_CONTACT_RATIO", "MIN_TIP_LAND_MODULES", "MODULE_RANGE_MM", "PRESSURE_ANGLE_RANGE_DEG",
           "RIM_MODULES", "SHIFT_RANGE", "TEETH_RANGE", "WEB_MIN_MM", "centre_distance_mm", "check_gear_spec",
           "check_in_range", "contact_ratio", "gear_blank", "gear_pair", "hole_ring", "hole_size", "plan_windows",
           "undercut_limit", "web_mm", "window_rings"]
