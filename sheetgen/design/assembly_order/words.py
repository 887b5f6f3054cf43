"""The guide's words: how a step's title and how-to sentence follow from what moves, from
which side, into what (rods threaded through, tabs into slots, parts resting on others)."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np
from shapely.geometry import Point, Polygon

from sheetgen.design.assembly_order.items import AXES, NO_STRAIGHT_PATH
from sheetgen.kitmodel.part import Kit

if TYPE_CHECKING:
    from sheetgen.design.assembly_order.planner import Planner

SIDE = {NO_STRAIGHT_PATH: "by tilting or flexing it past the parts already there (no straight path)",
        "+z": "from above", "-z": "from below", "+x": "from the drive end (+x)", "-x": "from the plain end (-x)",
        "+y": "from the +y side", "-y": "from the -y side", "": "flat on the bench"}


def side_words(name: str, d: tuple[float, float, float]) -> str:
    """How a reader is told the side an item comes from: a kit axis by its name (SIDE), a
    plate's own direction by that plate's faces."""
    if name in SIDE:
        return SIDE[name]
    part, _, tag = name.rpartition(" ")
    if tag == "+n":
        return f"square to the {part}'s face, from its top side"
    if tag == "-n":
        return f"square to the {part}'s face, from its underside"
    return f"sliding along the {part}'s face"


def rod_items(planner: Planner) -> set[str]:
    """Components that other items are threaded on: a rod, or a box with a shaft."""
    return {it.name for it in planner.items if it.kind == "component"
            and (len(it.pieces) > 1 or planner.component(it.name).shape == "cylinder_x")}


def threaded(planner: Planner, i: int, rod: str) -> bool:
    """Item i lies across the rod's line: the rod stops it every way in its own plane."""
    j = planner.blk.index[rod]
    w = planner.items[i].pieces[0].placement.matrix[:, 2]
    axis = "xyz"[int(np.argmax(np.abs(w)))]
    across = [k for k, (name, _) in enumerate(AXES) if name[1] != axis]
    return all(planner.hits[k][i] >> j & 1 for k in across)


def grips(planner: Planner, name: str, rod: str, kit: Kit) -> bool:
    """The instance's bore round the rod is cut tighter than drawn (a press fit on the rod)."""
    it = planner.items[planner.blk.index[name]]
    part = kit.part(it.part)
    pl = it.pieces[0].placement
    line = planner.items[planner.blk.index[rod]].pieces[-1].placement.translation_mm
    t = np.asarray(pl.translation_mm, dtype=float)
    local = pl.matrix.T @ (np.array([t[0], line[1], line[2]]) - t)
    at = Point(float(local[0]), float(local[1]))
    fit = part.outline_to_cut

    def bore(poly: Polygon) -> float:
        return next((Polygon(r).area for r in poly.interiors if Polygon(r).contains(at)), 0.0)

    return bore(fit) < bore(part.outline) - 1e-6


def resting_on(planner: Planner, i: int, others: list[str], side: str) -> list[str]:
    """Of ``others``, the rods item i is threaded on or, for an item coming from above,
    the items it rests on (they stop it going down, touching)."""
    idx = planner.blk.index
    on_rods = rod_items(planner)
    out = [n for n in others if n in on_rods and threaded(planner, i, n)]
    if not out and side == "+z":
        down = next(k for k, (name, _) in enumerate(AXES) if name == "-z")
        out = [planner.items[idx[n]].part for n in others
               if planner.hits[down][i] >> idx[n] & 1 and planner.touch(i, idx[n])]
    return list(dict.fromkeys(out))


def step_words(planner: Planner, mvs, names, placed, bench, group, first) -> tuple[str, str]:
    """A step's title and how-to sentence, from what moves, from where, into what."""
    kit_joints = planner.joints
    side = mvs[-1].approach
    approach = side_words(side, mvs[-1].direction)
    what = " and ".join(names)
    before = {planner.items[planner.blk.index[n]].part for n in placed}
    if bench:
        tabs = [j for j in kit_joints if j.tab_part in names and j.slot_part in names]
        if tabs:
            return (f"On the bench: join the {what}",
                    f"Lay one {tabs[0].slot_part} flat; push the {tabs[0].tab_part} tabs into its slots, then press "
                    f"the other {tabs[0].slot_part} onto the free tab ends so the group stands square.")
        return f"On the bench: join the {what}", f"Put the {what} together {approach}."
    if group:
        below = sorted({j.slot_part for j in kit_joints if j.tab_part in names and j.slot_part in before})
        target = " and ".join(below) if below else "kit"
        return (f"Set the {what} group into the {target}",
                f"Bring the group {approach} and seat every tab in its slot.")
    if first:
        return f"Lay out the {what}", f"Put the {what} flat on the bench, top face up; everything else builds on it."
    i = planner.blk.index[mvs[0].items[0]]
    item = planner.items[i]
    into = sorted({j.slot_part for j in kit_joints if j.tab_part in names and j.slot_part in before})
    onto = sorted({j.tab_part for j in kit_joints if j.slot_part in names and j.tab_part in before})
    if into:
        return f"Fit the {what} into the {' and '.join(into)}", f"Bring it {approach} and push its tabs into the slots."
    if onto:
        onto_text = " and ".join(onto)
        if side not in SIDE:  # a plate's own side, askew to the kit's axes
            return f"Fit the {what} onto the {onto_text}", f"Press it onto the {onto_text} tabs {approach}."
        return f"Fit the {what} onto the {onto_text}", f"Lower it {approach} over the {onto_text} tabs."
    if item.name in rod_items(planner):
        passed = list(dict.fromkeys(planner.items[planner.blk.index[n]].part for n in placed
                                    if threaded(planner, planner.blk.index[n], item.name)))
        if passed:
            rod = "shaft of the " + what if planner.component(item.name).shape == "box" else what
            return (f"Push the {rod} through the {', '.join(passed)}",
                    f"Bring it {approach} and slide it through the holes of the {', '.join(passed)} in turn.")
    on = resting_on(planner, i, list(placed), side)
    comps = [n for n in placed if n in rod_items(planner) and threaded(planner, i, n)]
    if comps:
        shaft = f"{comps[0]} shaft" if planner.component(comps[0]).shape == "box" else comps[0]
        return f"Put the {what} on the {shaft}", f"Slide it on {approach}."
    later = [it for it in planner.items if it.name in rod_items(planner) and it.name not in placed
             and threaded(planner, i, it.name)]
    if later:
        return (f"Stand the {what} in line",
                f"Bring it in {approach} and hold it in line with the holes either side; the {later[0].name} goes "
                f"through it in a later step.")
    if on:
        return f"Fit the {what} on the {' and '.join(on)}", f"Bring it {approach} onto the {' and '.join(on)}."
    return f"Fit the {what}", f"Bring it into place {approach}."
