"""The guide's steps: the moves of the order grouped into steps, each with its title,
how-to, parts, hardware, notes and cautions; the hardware as the guide fits it. Pure."""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from sheetgen.design.assembly_order.planner import Planner, group_moves
from sheetgen.design.assembly_order.words import grips, rod_items, step_words, threaded
from sheetgen.kitmodel.part import Kit


@dataclass(frozen=True)
class Step:
    """One step of the guide.

    ``parts``: (part, qty) of the cut parts put in; ``components``: solid components put
    in; ``hardware``: (item, qty) fitted here; ``new``: the instances put in (highlighted
    in the picture); ``shown``: every instance in the picture (the kit so far, or the
    group on the bench); ``approach``: the side the new items come from (a name of
    :func:`kit_directions`, '' for the first); ``bench``: true when the step builds a group
    apart from the kit; ``hardware_specs``: what to buy for each entry of ``hardware`` (two
    sizes of one item, an M3 and an M4 bolt, are two entries)."""

    number: int
    title: str
    how: str
    parts: tuple[tuple[str, int], ...]
    components: tuple[str, ...]
    hardware: tuple[tuple[str, int], ...]
    notes: tuple[str, ...]
    cautions: tuple[str, ...]
    new: tuple[str, ...]
    shown: tuple[str, ...]
    approach: str
    bench: bool = False
    hardware_specs: tuple[str, ...] = ()


PRESS_NOTE = ("Press fit: press it home square with a vice or a clamp between two flat blocks, slowly and "
              "evenly; never hammer it.")
ACRYLIC_CAUTION = ("Press fits in acrylic crack: press slowly, support the part right round the bore, and stop "
                   "if white stress lines appear.")
PINCH_CAUTION = ("Pinch points: gears in mesh trap fingers. Keep the motor unpowered until the kit is finished "
                 "and keep fingers out of the mesh when turning the frame by hand.")
TURNING_CAUTION = ("The frame now turns on the axle and can swing down under its own weight: keep fingers out "
                   "of the gap between the frame and the supports.")
WIND_CAUTION = ("Outdoors the panel catches wind like a sail: screw the base down or ballast it as the balance "
                "check advises. Anything larger than a desk or classroom kit follows local codes for wind "
                "loads and the advice of a licensed engineer.")


@dataclass(frozen=True)
class GuideItem:
    """A bought item as the guide uses it: ``parts`` are the parts or components it
    joins or is (the step where the last of them lands is where it is fitted);
    ``final`` items are fitted when the kit is finished (anchors, counterweight)."""

    item: str
    spec: str
    qty_per_kit: int
    parts: tuple[str, ...] = ()
    final: bool = False


def guide_items(kit: Kit, spec) -> tuple[GuideItem, ...]:
    """The kit's hardware list (sheetgen.design.hardware) as the guide fits it: each item in
    the step where the last of the parts it joins lands; the rod, motor and panel with their
    own solids; anchor screws, the counterweight and carried items when the kit is finished."""
    from sheetgen.design.hardware import hardware_items

    solid_of = {"prices.axle_rod": "axle", "prices.motor": "motor", "prices.panel": "panel"}
    names = {c.name for c in kit.components}
    items = hardware_items(kit, spec)
    bolted: dict[float | None, tuple[str, ...]] = {}  # a nut goes on with the bolts of its size
    for h in items:
        if h.price_key == "prices.bolt":
            bolted[h.diameter_mm] = tuple(dict.fromkeys(bolted.get(h.diameter_mm, ()) + tuple(h.parts)))
    out = []
    for h in items:
        solid = solid_of.get(h.price_key)
        parts = (solid,) if solid in names else h.parts
        if h.price_key == "prices.nut" and not parts:
            parts = bolted.get(h.diameter_mm, ())
        final = h.price_key in ("prices.anchor_screw", "prices.counterweight", "prices.payload") or not parts
        out.append(GuideItem(h.item, h.spec, h.qty_per_kit, tuple(parts), final))
    return tuple(out)


def _stacked(part) -> bool:
    """Several instances of one part lie face to face (layers to glue into one)."""
    if part.qty < 2:
        return False
    ws = [tuple(np.round(pl.matrix[:, 2], 9)) for pl in part.placements]
    if len(set(ws)) != 1:
        return False
    w = np.asarray(ws[0])
    offs = sorted(float(np.asarray(pl.translation_mm) @ w) for pl in part.placements)
    return all(abs(b - a - part.thickness_mm) < 1e-6 for a, b in zip(offs, offs[1:]))


def assembly_steps(kit: Kit, spec, hardware: tuple | None = None) -> tuple[Step, ...]:
    """The guide's steps: every cut part, solid component and hardware item in one of them.

    ``hardware``: the bought items (objects with ``item``, ``spec``, ``qty_per_kit`` and
    optionally ``parts``/``final``); by default :func:`guide_items`."""
    from sheetgen.kitmodel.contacts import MESHING

    planner = Planner(kit)
    moves = tuple(planner.order(frozenset(range(len(planner.items)))))
    hardware = guide_items(kit, spec) if hardware is None else hardware
    items = {it.name: it for it in planner.items}
    part_of = {name: it.part for name, it in items.items()}
    parts = {p.name: p for p in kit.parts}
    gears = {n for pair in MESHING for n in pair}
    acrylic = "acryl" in spec.sheet.material
    placed: list[str] = []
    first_step: dict[str, int] = {}
    raw: list[Step] = []
    for number, (tag, mvs) in enumerate(group_moves(moves), start=1):
        new = [n for mv in mvs for n in mv.items]
        bench = tag.startswith("bench:")
        group = not bench and tag == "group"
        if group:
            shown = tuple(placed + new)
            fresh: list[str] = []
        else:
            shown = tuple(new) if bench else tuple(placed + new)
            fresh = new
        for n in fresh:
            first_step.setdefault(part_of[n], number)
        names = list(dict.fromkeys(part_of[n] for n in new))
        counts = () if group else tuple((p, sum(1 for n in new if part_of[n] == p)) for p in names if p in parts)
        comps = tuple(p for p in names if p not in parts)
        before = {part_of[n] for n in placed}
        title, how = step_words(planner, mvs, names, placed, bench, group, number == 1)
        notes, cautions = [], []
        rods = rod_items(planner)
        # a part presses on when the rod it grips is already there; else the rod presses through it later
        pressed = list(dict.fromkeys(
            part_of[n] for n in fresh if items[n].kind == "part" for r in rods
            if r in placed and threaded(planner, planner.blk.index[n], r) and grips(planner, n, r, kit)))
        gripping = list(dict.fromkeys(
            part_of[m] for n in fresh if n in rods for m in placed
            if items[m].kind == "part" and threaded(planner, planner.blk.index[m], n) and grips(planner, m, n, kit)))
        if gripping:
            notes.append(f"Press fit: the {' and '.join(gripping)} grip the rod. Push it through slowly and "
                         f"evenly (a vice or a clamp), backing each of them with a block so it stays square; "
                         f"never hammer.")
            pressed.append(gripping[0])
        elif pressed and not group:
            notes.append(PRESS_NOTE)
        if pressed and not group and acrylic:
            cautions.append(ACRYLIC_CAUTION)
        for p, q in counts:
            if q > 1 and _stacked(parts[p]):
                notes.append(f"Glue the {q} {p} layers face to face, aligned, before the glue sets.")
        tab_joints = [j for j in kit.joints if j.tab_part in names and (j.slot_part in before or j.slot_part in names)]
        tab_joints += [j for j in kit.joints if j.slot_part in names and j.tab_part in before]
        if tab_joints:
            fit = tab_joints[0].fit
            if fit == "press" and acrylic:
                cautions.append(ACRYLIC_CAUTION)
            notes.append("Tabs into slots: " + ("a press fit, close them with a clamp, never a hammer."
                                                if fit == "press" else "they go in by hand; square each joint "
                                                "before the next part."))
        if any(part_of[n] in gears for n in fresh) or (any(items[n].kind == "component" and not items[n].rotating
                                                        for n in fresh) and gears):
            cautions.append(PINCH_CAUTION)
        turning_now = any(items[n].rotating and items[n].kind == "component" and items[n].pieces
                          and abs(items[n].pieces[0].placement.matrix[0, 2]) > 0.5 for n in fresh)
        if turning_now:
            cautions.append(TURNING_CAUTION)
        raw.append(Step(number, title, how, counts, comps, (), tuple(notes), tuple(dict.fromkeys(cautions)),
                        tuple(new), shown, mvs[-1].approach, bench))
        if not bench:
            placed += [n for n in new if n not in placed]
    # hardware: in the step where the last of its parts lands; final items in a last step
    last = len(raw)
    where: dict[str, int] = {}
    for number, (_, mvs) in enumerate(group_moves(moves), start=1):
        for mv in mvs:
            if not mv.bench:
                for n in mv.items:
                    where[part_of[n]] = number
    for name in [q.name for q in kit.parts] + [c.name for c in kit.components]:  # bench parts: their group
        where.setdefault(name, first_step.get(name, last))
    hw_at: dict[int, list[tuple[str, int, str]]] = {}
    finals: list = []
    for h in hardware:
        hp = tuple(getattr(h, "parts", ()) or ())
        if getattr(h, "final", False) or not hp or any(n not in where for n in hp):
            finals.append(h)
            continue
        hw_at.setdefault(max(where[n] for n in hp), []).append((h.item, h.qty_per_kit, getattr(h, "spec", "")))
    steps = []
    for r in raw:
        fitted = hw_at.get(r.number, [])
        hw = tuple((item, qty) for item, qty, _ in fitted)
        step_notes = r.notes
        if any(item == "bolt" for item, _ in hw):
            step_notes += ("Bolt the stack: a bolt through each hole, washer under the nut; tighten evenly, "
                           "snug, without crushing the sheet.",)
        steps.append(dataclasses.replace(r, hardware=hw, notes=step_notes,
                                         hardware_specs=tuple(what for _, _, what in fitted)))
    if finals:
        fin_parts = list(dict.fromkeys(h.item for h in finals))
        steps.append(Step(last + 1, "Finish and set up", "Fit the " + ", ".join(fin_parts) + "; set the kit where "
                          "it will stand and turn the frame by hand through its travel before powering the motor.",
                          (), (), tuple((h.item, h.qty_per_kit) for h in finals),
                          ("Fix the loose items where the spec gives them: the counterweight's place is what "
                           "the balance check assumed.",) if any("counterweight" in h.item for h in finals) else (),
                          (WIND_CAUTION, PINCH_CAUTION), (), tuple(placed), "",
                          hardware_specs=tuple(getattr(h, "spec", "") for h in finals)))
    else:
        steps[-1] = dataclasses.replace(steps[-1], cautions=steps[-1].cautions + (WIND_CAUTION,))
    return tuple(steps)
