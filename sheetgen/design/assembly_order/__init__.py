"""The order of assembly, derived from the kit: which piece goes in when, and from where.

Pure: a :class:`~sheetgen.kitmodel.part.Kit` in, ordered :class:`Step` s out.

Every part instance and every solid component (axle, panel, motor with its
shaft) is a prism or a few prisms in the kit frame. An item can be put in place
along a straight line from outside the assembly when, moved from its place
along the opposite direction, it meets nothing already there. Which item blocks
which along each direction is computed once from the projections of the prisms
(shapely) and the extents along the direction on sample lines through their
common shadow. The order is then built forward, in a natural order (the fixed
stand from the bottom up, the parts on the axle, the turning frame from the
bottom up, the rest), taking at each step the first item that can go in *and*
leaves the rest of the kit assemblable (tested by taking the finished kit apart
down to what is placed: removing an item never blocks another, so a greedy
take-apart is enough). When no single item fits, a group of parts joined by
tabs is assembled on the bench and set in as one (the supports and the
stretchers whose end tabs pass through both, lowered onto the base).

Nothing here names a part: new part families land in a step by their
placements, joints and the rotating flag. An item may come along the kit's axes or,
for a plate askew to them (the polar wedge's ground plate), along that plate's own
normal and in-plane directions.

The package by job: ``items`` (the kit's solid items, the sides they may come from, the
moves), ``blocking`` (which item blocks which along a side), ``planner`` (the order),
``words`` (a step's title and how-to) and ``steps`` (the guide's steps and the hardware
fitted in them).
"""

from __future__ import annotations

from sheetgen.design.assembly_order.items import AXES, NO_STRAIGHT_PATH, Item, Move, kit_directions, solid_items
from sheetgen.design.assembly_order.planner import Planner, assembly_moves, group_moves, part_steps
from sheetgen.design.assembly_order.steps import GuideItem, Step, assembly_steps, guide_items
from sheetgen.design.assembly_order.words import SIDE, side_words

__all__ = ["AXES", "NO_STRAIGHT_PATH", "SIDE", "GuideItem", "Item", "Move", "Planner", "Step",
           "assembly_moves", "assembly_steps", "group_moves", "guide_items", "kit_directions", "part_steps",
           "side_words", "solid_items"]
