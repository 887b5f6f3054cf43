"""The kit in 3D: nominal solids, the assembly, and the checks made on them.

Every part instance is its NOMINAL outline (holes included) extruded by the
sheet thickness and carried into the kit frame by its placement; the panel is
a plate, the axle a rod, the gear-motor a box with its output shaft. Fit
allowances live only in the cut outlines, so the nominal model of a correct
kit has no shared volume at all: tabs sit in their slots line to line, press
bores are exactly the shaft they grip (touching is allowed, shared volume is
not).

Pure part (no cadquery): :func:`model_bodies` turns a Kit into :class:`Body`
records (prisms with placements), and the exact prism formulas below. The
cadquery part (:func:`build_model`, :func:`check_model`) imports cadquery
inside the functions, so that importing this module costs nothing.

Geometry notes, used by the checks:

* Every solid here is a right prism (a polygon swept along its axis), or two
  (the motor body and its shaft). For two prisms whose axes are parallel, the
  shared volume is exactly area(A n B) x the overlap of their depth intervals,
  and their distance is exactly hypot(depth gap, 2D distance of the
  outlines); both are computed with shapely, no approximation.
* Crossing prisms (a tab through a slot) go to OpenCascade booleans and
  distances.
* The clearance sweep turns the rotating group about the axle (x). For any
  two solids, hypot(gap of their x ranges, distance of their projections on
  the y-z plane) is a lower bound of their 3D distance, because projecting
  along x never lengthens a distance. A plate lying across the axle projects
  to its own outline, so for two such plates the bound IS the distance; other
  solids project inside the convex hull of their corners. The sweep computes
  the bound for every pair and angle, and the exact 3D distance only where the
  bound could beat the best found so far (branch and bound): the least
  clearance is exact, and pairs that cannot come close cost nothing.

What the checks call what:

* interference: any two solids sharing more than SHARED_VOLUME_TOL_MM3 at rest;
* connection: two solids are joined when they touch or sit within half the
  bearing clearance (the axle's running clearance in the support holes, the
  loosest fit of the nominal model) of each other; a floating part has no
  such neighbour, a detached group is joined to itself but not to the kit;
* tabs: each tab part's material inside its slot part's plate (holes
  filled) must be its tabs' volume, tab width x tab thickness x slot part
  thickness each, with no shared volume with the slot part itself;
* sweep: the rotating bodies, less those round about the axle (rod, collar,
  washers: they turn in place, and their gaps are measured at rest), against
  the fixed bodies, at every angle of the tracking range (solar module) in
  steps of at most MAX_SWEEP_STEP_DEG; the wheel and its pinion
  (sheetgen.kitmodel.contacts.MESHING) are rolled together instead, the pinion turning
  z_wheel / z_pinion times as far the other way;
* stops: the end stops (sheetgen.kitmodel.contacts.STOPS) are left out of the sweep;
  sheetgen.model3d.stops measures where they first touch each way (bisection),
  their least gap inside the travel and their shared volume a few degrees past it;
* frame clearance: part against part where their x ranges overlap, which is
  what frame.clearance asks of the turning frame (and what sheetgen.design.kit checks
  in 2D);
* mass: parts weigh their solid's volume x the sheet density, components
  their given mass; the turning assembly's mass and CG must match the balance
  check's (sheetgen.mechanics.massprops) within MASS_TOL.
"""


from __future__ import annotations

from sheetgen.model3d.bodies import Body, Prism, mesh_turn_deg, model_bodies, parallel_distance_mm, \
    parallel_shared_volume_mm3, spun, sweep_angles, turns_in_place
from sheetgen.model3d.checks import assemble, check_model, find_floating, find_interference
from sheetgen.model3d.measures import distance_bound_mm
from sheetgen.model3d.records import AssemblyReport
from sheetgen.model3d.solids import Model, build_assembly, build_model, prism_solid

__all__ = [
    "AssemblyReport", "Body", "Model", "Prism", "assemble", "build_assembly", "build_model", "check_model",
    "distance_bound_mm", "find_floating", "find_interference", "mesh_turn_deg", "model_bodies",
    "parallel_distance_mm", "parallel_shared_volume_mm3", "prism_solid", "spun", "sweep_angles",
    "turns_in_place",
]
