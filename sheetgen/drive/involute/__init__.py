"""Involute spur-gear math: pure functions, radians inside, mm for lengths.

The tooth form is the one a generating rack cuts. The rack is the ISO 53 basic
rack (addendum 1.00 m, dedendum 1.25 m, root fillet 0.38 m; ISO 53:1998, from
memory), rolled without slip on the reference (pitch) circle, its datum line
moved out by the profile shift x m. Where the rack tip is too narrow for a
0.38 m fillet (pressure angles above about 23.1 deg) the tip is a full round.

Modules: dimensions (the involute function and the standard dimensions), tooth (the
generated tooth form), outline (the polygon, every vertex on the true curve).
"""

from sheetgen.drive.involute.dimensions import (RACK_ADDENDUM, RACK_DEDENDUM, RACK_ROOT_FILLET, inv, inv_inverse,
                                                pitch_radius_mm, base_radius_mm, tip_radius_mm, root_radius_mm,
                                                pitch_tooth_thickness_mm, tooth_thickness_at_radius_mm,
                                                span_over_teeth_mm, span_contact_radius_mm, span_teeth_k,
                                                pin_centre_angle_rad, dimension_over_pins_mm, pin_contact_radius_mm,
                                                ideal_pin_diameter_mm, undercut_limit_teeth, min_shift_no_undercut,
                                                rack_min_shift_no_undercut, working_pressure_angle_rad)
from sheetgen.drive.involute.tooth import ToothForm, tooth_form, bisect
from sheetgen.drive.involute.outline import DEFAULT_CHORD_TOL_MM, sample_curve, arc_points, gear_outline_xy

__all__ = ["DEFAULT_CHORD_TOL_MM", "RACK_ADDENDUM", "RACK_DEDENDUM", "RACK_ROOT_FILLET", "ToothForm", "arc_points",
           "base_radius_mm", "bisect", "dimension_over_pins_mm", "gear_outline_xy", "ideal_pin_diameter_mm", "inv",
           "inv_inverse", "min_shift_no_undercut", "pin_centre_angle_rad", "pin_contact_radius_mm",
           "pitch_radius_mm", "pitch_tooth_thickness_mm", "rack_min_shift_no_undercut", "root_radius_mm",
           "sample_curve", "span_contact_radius_mm", "span_over_teeth_mm", "span_teeth_k", "tip_radius_mm",
           "tooth_form", "tooth_thickness_at_radius_mm", "undercut_limit_teeth", "working_pressure_angle_rad"]
