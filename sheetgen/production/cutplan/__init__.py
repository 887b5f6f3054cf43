"""Cut plan for one sheet: the order the laser cuts the contours, where each
one is pierced, and what the sheet costs in length, travel, time and money.

Rules, in order of importance:

1. **Inside first.** Every contour is cut before any contour that encloses it:
   a part's holes before its outline, a part nested in a hole before the part
   that holds it. A part whose outline is cut first can drop or shift in the
   bed, and whatever is cut inside it afterwards lands in the wrong place
   (common practice). Containment is computed with shapely.
2. **Short travel.** Within that rule the head moves as little as possible
   between contours: nearest neighbour from the laser's home (0, 0), then
   improved by 2-opt (reverse a stretch of the sequence) and Or-opt (move one
   to three contours elsewhere), both only where the inside-first rule allows,
   alternated with choosing each contour's start point: any vertex of a ring,
   any point of a circle (on a ring of more than MAX_RING_CANDIDATES vertices,
   every k-th vertex and the current start, which bounds the work on gears). When that comes out longer than the nester's own
   order, the same improvement also runs from the nester's order (made
   inside-first when it is not) and the shorter result wins, so when the
   nester's order already obeys rule 1 the plan is never longer.

Travel is the straight-line rapid move from home to the first pierce and from
the end of each contour to the next pierce. The move back home after the last
contour is not counted. ``travel_unplanned_mm`` is the same figure for the
nester's order, each ring cut from its first vertex and each circle from its
point at angle 0 (where a DXF circle begins), without lead-ins.

Lead-ins (off by default): a straight cut from a pierce point off the part's
edge, on the waste side (outside an outer contour, inside a hole), to the
contour's start point. Piercing leaves a blemish wider than the kerf; a lead-in
keeps it off the finished edge (common practice). A lead-in never crosses or
touches another contour; where the chosen start point cannot take one, the
planner tries the next best start point and then half and a quarter of the
length; a contour too small for any gets none (counted in ``CutPlan``).

Pure: no files, no printing.
"""


from sheetgen.production.cutplan.containment import contour_polygon, enclosure_pairs
from sheetgen.production.cutplan.ordering import plan_sheet
from sheetgen.production.cutplan.settings import (
    CutPlan,
    LaserSettings,
    PlannedContour,
    contour_perimeter_mm,
    cut_plan_contours,
    path_travel_mm,
    settings_from_spec,
)

__all__ = ["CutPlan", "LaserSettings", "PlannedContour", "contour_perimeter_mm", "contour_polygon",
           "cut_plan_contours", "enclosure_pairs", "path_travel_mm", "plan_sheet", "settings_from_spec"]
