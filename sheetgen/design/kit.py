"""Spec -> Kit: every part of one tracker kit, joined, placed and verified.

The part factories (sheetgen/design/parts) give plain outlines, holes, placements and
named edges. Here the JOINTS table grows tabs on those edges and cuts each tab's
footprint as a slot in its mating part, the labels are placed, the kit is
verified (valid outlines, every part fits the sheet, the turning frame clears
the fixed parts through its travel) and the non-sheet components (panel, axle,
motor, rotating masses) are added.
"""

from __future__ import annotations

import dataclasses
import functools
import math

import shapely
from shapely.geometry import Polygon
from shapely.ops import polylabel, unary_union

from sheetgen.errors import GeometryBug, ParameterError, SheetTooSmall
from sheetgen.geometry.joints import TabMissesSlot, fit_slot, slot_footprint, tab_layout, tab_rects
from sheetgen.geometry.kerf import cut_outline
from sheetgen.geometry.shapes import clean, one_polygon
from sheetgen.kitmodel.clearance import kit_silhouettes, sweep_clearance
from sheetgen.kitmodel.contacts import MESHING, STOPS
from sheetgen.design.layout import Layout, compute_layout
from sheetgen.kitmodel.part import LAYER_LABEL, Component, Joint, Kit, Mark, Part
from sheetgen.design.parts import Blank, part_families

# (tab part, its edge, slot part): a tab-and-slot joint along that edge.
JOINTS = (
    ("axle-support", "foot", "base"),
    ("stretcher", "bottom", "base"),
    ("stretcher", "end+", "axle-support"),
    ("stretcher", "end-", "axle-support"),
    ("motor-mount", "foot", "base"),
    ("motor-clamp", "foot", "base"),
    ("motor-brace", "bottom", "base"),
    ("motor-brace", "end-", "motor-mount"),
    ("motor-brace", "end+", "motor-clamp"),
    ("rib", "top", "tray"),
    ("end-stop", "foot", "base"),
    ("wedge", "top", "base"),
    ("wedge", "bottom", "ground-plate"),
)
LABEL_MAX_MM = 4.0
LABEL_MIN_MM = 1.5
LABELS_KEPT = 512  # labels kept per process (by outline); a kit has about 20 part outlines
OUTLINES_KEPT = 512  # part outlines kept per process (by what they are cut from), as the labels


def build_kit(spec, *, check_clearance: bool = True, step_labels: bool | None = None) -> Kit:
    """All parts and components of one kit, in the kit frame at rotation 0.

    Raises ParameterError when a part does not fit the sheet or the turning
    frame would come closer than frame.clearance to a fixed part. With
    ``step_labels`` (by default whenever the clearance is checked, that is for
    every kit that is made rather than tried by the solver) each part's label
    carries the number of its assembly step ("3 rib"; the number alone where
    the name does not fit).
    """
    from sheetgen.design.parts.drive import drive_pair

    from sheetgen.design.parts.counterweight import plan_counterweight

    drive = drive_pair(spec)
    layout = compute_layout(spec, drive.centre_distance_mm)
    made = (factory(spec, layout, drive) for factory in part_families())
    blanks = {b.name: b for b in made if b is not None}  # a family may not apply (the wedge: polar only)
    tabs, slots, joints = _joints(spec, blanks)
    parts = tuple(_make_part(spec, b, tabs.get(b.name, []), slots.get(b.name, [])) for b in blanks.values())
    components = _components(spec, layout)
    figures = _figures(spec, layout, drive)
    # the counterweight the bare frame needs (rule counterweight_balance): a bracket part, its
    # bolts through the rib, and the bar
    cw = plan_counterweight(spec, layout, parts, components)
    if cw is not None:
        rib = blanks["rib"]
        rib = dataclasses.replace(rib, holes=rib.holes + cw.rib_holes)
        parts = tuple(_make_part(spec, rib, tabs.get("rib", []), slots.get("rib", [])) if p.name == "rib" else p
                      for p in parts) + (_make_part(spec, cw.bracket, [], []),)
        components = components + (cw.component,)
        figures = figures + (("counterweight_arm_mm", cw.arm_mm), ("counterweight_bar_diameter_mm", cw.bar_diameter_mm),
                             ("counterweight_bar_length_mm", cw.bar_length_mm),
                             ("bare_unbalance_gmm", cw.bare_unbalance_gmm),
                             ("residual_unbalance_gmm", cw.residual_gmm))
    kit = Kit(
        parts=parts,
        components=components,
        joints=tuple(joints),
        figures=figures,
        drive=drive,
    )
    _check_fits_sheet(spec, kit)
    if check_clearance:
        _check_clearance(spec, kit)
    if check_clearance if step_labels is None else step_labels:
        kit = _with_step_labels(kit)
    return kit


def _with_step_labels(kit: Kit) -> Kit:
    """The kit with each part's label led by the numbers of its assembly steps."""
    from sheetgen.design.assembly_order import part_steps

    steps = part_steps(kit)
    parts = []
    for part in kit.parts:
        numbers = ",".join(str(n) for n in steps.get(part.name, ()))
        others = tuple(m for m in part.marks if m.layer != LAYER_LABEL)
        parts.append(dataclasses.replace(part, marks=_label(part.name, part.outline, numbers) + others))
    return dataclasses.replace(kit, parts=tuple(parts))

def travel_deg(spec) -> tuple[float, float]:
    """The rotation range the frame must clear: the travel limit either side of rest."""
    return (-spec.site.travel_limit_deg, spec.site.travel_limit_deg)


def frame_sweep(kit: Kit, angles_deg: tuple[float, float], step_deg: float = 1.0):
    """Least clearance between the turning frame and the fixed parts (y-z projection)."""
    return sweep_clearance(kit_silhouettes(kit), angles_deg, step_deg, MESHING | STOPS)


# ---------------------------------------------------------------------------


def _joints(spec, blanks: dict[str, Blank]):
    t = spec.sheet.thickness_mm
    tabs: dict[str, list[Polygon]] = {}
    received: dict[str, list[list[Polygon]]] = {}  # slot part -> per instance footprints
    joints = []
    for tab_name, edge_name, slot_name in JOINTS:
        if tab_name not in blanks or slot_name not in blanks:
            continue  # a family this kit does not have (the wedge of a polar axle)
        tb, sb = blanks[tab_name], blanks[slot_name]
        edge = tb.edge(edge_name)
        centres, width = tab_layout(edge.length_mm, t, spec.joints.tab_width_mm)
        rects = tab_rects(edge, centres, width, t)
        tabs.setdefault(tab_name, []).extend(rects)
        per_instance = received.setdefault(slot_name, [[] for _ in sb.placements])
        own = []  # this joint's slots
        for tp in tb.placements:
            for r in rects:
                hits = 0
                for k, sp in enumerate(sb.placements):
                    try:
                        fp = slot_footprint(r, t, tp, sp, t)
                    except TabMissesSlot:
                        continue
                    if not sb.outline.contains(fp):
                        raise GeometryBug(f"joint {tab_name}.{edge_name} -> {slot_name}: slot at "
                                          f"({fp.centroid.x:.1f}, {fp.centroid.y:.1f}) leaves the {slot_name} outline")
                    per_instance[k].append(fp)
                    own.append(fp)
                    hits += 1
                if hits == 0:
                    raise GeometryBug(f"joint {tab_name}.{edge_name} -> {slot_name}: a tab reaches no {slot_name}")
        x0, y0, x1, y1 = own[0].bounds
        joints.append(Joint(tab_name, slot_name, len(rects) * len(tb.placements), width,
                            max(x1 - x0, y1 - y0), min(x1 - x0, y1 - y0), t, spec.joints.fit))
    slots: dict[str, list[Polygon]] = {}
    for slot_name, per_instance in received.items():
        # every instance of a part is cut from the same outline, so all must need the same slots
        keys = [sorted(tuple(round(v, 4) for v in p.bounds) for p in prints) for prints in per_instance]
        if any(k != keys[0] for k in keys):
            raise GeometryBug(f"instances of {slot_name} would need different slots")
        slots[slot_name] = per_instance[0]
    return tabs, slots, joints


def _label(name: str, outline: Polygon, step: str = "") -> tuple[Mark, ...]:
    """The part's engraved label at the point farthest inside it: its assembly step
    number(s) and name ("3 rib"), or the number alone where that does not fit at
    LABEL_MIN_MM high; no label where nothing fits. The layout solver builds the kit many
    times over, mostly with the same outlines, so labels are kept by the outline's exact
    coordinates (its WKB): the same outline, the same label."""
    return _label_of(name, outline.wkb, step)


@functools.lru_cache(maxsize=LABELS_KEPT)
def _label_of(name: str, wkb: bytes, step: str) -> tuple[Mark, ...]:
    outline = one_polygon(shapely.from_wkb(wkb), f"{name}: label outline")
    p = polylabel(outline, tolerance=0.25)
    room = outline.boundary.distance(p)
    for text in ((f"{step} {name}", step) if step else (name,)):
        height = min(LABEL_MAX_MM, 0.7 * room, room / (0.3 * len(text)))
        if height >= LABEL_MIN_MM:
            return (Mark(LAYER_LABEL, "text", ((round(p.x, 3), round(p.y, 3)),), text, round(height, 2)),)
    return ()


@functools.lru_cache(maxsize=OUTLINES_KEPT)
def _outlines_of(name: str, body: tuple[bytes, ...], nominal_voids: tuple[bytes, ...],
                 fit_voids: tuple[bytes, ...]) -> tuple[Polygon, Polygon]:
    """(nominal outline, fit outline) of a part: the blank and its tabs less the voids of each, on
    the fine grid. Kept by the exact coordinates of what they are cut from (the layout solver
    builds the kit many times over, mostly with the same parts: 3,096 cuts were 388 distinct in one
    refused draw's derivation)."""
    whole = unary_union(shapely.from_wkb(list(body)))
    cut = []
    for voids in (nominal_voids, fit_voids):
        cut.append(clean(whole.difference(unary_union(shapely.from_wkb(list(voids)))) if voids else whole, name))
    return cut[0], cut[1]


def _make_part(spec, blank: Blank, tabs: list[Polygon], slots: list[Polygon]) -> Part:
    nominal_voids = [h.nominal for h in blank.holes] + slots
    fit_voids = [h.fit for h in blank.holes] + [fit_slot(s, spec.joints.fit) for s in slots]
    outline, fit = _outlines_of(blank.name, tuple(g.wkb for g in (blank.outline, *tabs)),
                                tuple(g.wkb for g in nominal_voids), tuple(g.wkb for g in fit_voids))
    if blank.rotations_deg is not None:
        rotations = blank.rotations_deg
    else:
        rotations = (0.0, 180.0) if spec.sheet.grain else (0.0, 90.0, 180.0, 270.0)
    if spec.sheet.grain:
        rotations = tuple(r for r in rotations if r % 180 == 0)
    return Part(
        name=blank.name,
        outline=outline,
        thickness_mm=spec.sheet.thickness_mm,
        material=spec.sheet.material,
        qty=len(blank.placements),
        placements=blank.placements,
        rotations_deg=rotations,
        marks=_label(blank.name, outline) + blank.guides,
        circles=tuple(h.circle for h in blank.holes if h.circle is not None),
        fit_outline=fit,
        description=blank.description,
        sprung=blank.sprung,
    )


def _components(spec, L: Layout) -> tuple[Component, ...]:
    p, m = spec.panel, spec.motor
    length = L.axle_x1_mm - L.axle_x0_mm
    out = [
        Component("panel", p.mass_kg, "box", (0.0, 0.0, L.panel_z_mm + p.thickness_mm / 2),
                  (p.width_mm, p.height_mm, p.thickness_mm), rotating=True),
        Component("axle", _keyed_axle_mass_kg(spec, L), "cylinder_x",
                  ((L.axle_x0_mm + L.axle_x1_mm) / 2, 0.0, 0.0), (length, spec.axle.diameter_mm, spec.axle.diameter_mm),
                  rotating=True, flat_mm=L.axle_flat_mm, flat_from_x_mm=L.axle_flat_x0_mm),
        Component("motor", m.mass_kg, "box",
                  (L.mount_x_mm + m.body_length_mm / 2, L.pinion_y_mm, L.pinion_z_mm),
                  (m.body_length_mm, m.body_width_mm, m.body_height_mm), rotating=False),
    ]
    out += [Component(r.name, r.mass_kg, "point", r.position_mm, rotating=True) for r in spec.rotating_masses]
    return tuple(out)


def _keyed_axle_mass_kg(spec, L: Layout) -> float:
    """The rod's mass less what its flat removes (the D segment's section from
    its polygon, the round rod's as a circle)."""
    from sheetgen.geometry.shapes import d_shape, disc
    from sheetgen.mechanics.materials import axle_mass_kg, rod_material

    d = spec.axle.diameter_mm
    full = axle_mass_kg(spec.axle.material, d, L.axle_x1_mm - L.axle_x0_mm)
    if L.axle_flat_mm <= 0:
        return full
    lost_mm2 = disc(0.0, 0.0, d / 2).area - d_shape(0.0, 0.0, d, L.axle_flat_mm).area
    lost = lost_mm2 * (L.axle_x1_mm - L.axle_flat_x0_mm) * 1e-9 * rod_material(spec.axle.material).density_kg_m3
    return full - lost


def _figures(spec, L: Layout, drive) -> tuple[tuple[str, float], ...]:
    return (
        ("axle_height_mm", L.axle_height_mm),
        ("centre_distance_mm", drive.centre_distance_mm),
        ("support_spacing_mm", 2 * L.support_x_mm),
        ("axial_play_mm", L.axial_play_mm),
        ("wheel_spacers", L.wheel_spacers),
        ("mount_gap_mm", L.mount_gap_mm),
        ("shaft_end_gap_mm", L.shaft_end_x_mm - (L.support_x_mm + L.t_mm)),
        ("tray_z_mm", L.tray_z_mm),
        ("panel_z_mm", L.panel_z_mm),
        ("base_length_mm", L.base_x1_mm - L.base_x0_mm),
        ("base_width_mm", 2 * L.base_half_y_mm),
        ("stop_angle_deg", L.stop_angle_deg),
        ("stop_radius_mm", L.stop_radius_mm),
        ("stop_contact_mm", L.stop_contact_mm),
        ("axle_tilt_deg", L.tilt_deg),
        ("axle_flat_mm", L.axle_flat_mm),
        ("clamp_fingers", float(len(L.finger_sides))),
        ("clamp_finger_bend_mm", L.clamp_gap_mm),
        ("clamp_stack_gap_mm", L.stack_gap_mm),
    )


def _check_fits_sheet(spec, kit: Kit) -> None:
    s = spec.sheet
    uw, uh = s.width_mm - 2 * s.margin_mm, s.height_mm - 2 * s.margin_mm
    for part in kit.parts:
        cut = cut_outline(part.outline_to_cut, spec.laser.kerf_mm)
        ok = False
        for angle in part.rotations_deg:
            x0, y0, x1, y1 = shapely.affinity.rotate(cut, angle, origin=(0, 0)).bounds
            if x1 - x0 <= uw + 1e-9 and y1 - y0 <= uh + 1e-9:
                ok = True
                break
        if not ok:
            x0, y0, x1, y1 = cut.bounds
            raise SheetTooSmall(
                f"part {part.name} ({x1 - x0:.1f} x {y1 - y0:.1f} mm) does not fit the usable sheet "
                f"{uw:g} x {uh:g} mm (sheet.width x sheet.height less 2 x sheet.margin)", part.name)


def _check_clearance(spec, kit: Kit) -> None:
    need = spec.frame.clearance_mm
    first = frame_sweep(kit, travel_deg(spec))
    if first.min_clearance_mm >= need - 1e-9:
        return
    # find the least axle height that clears, to say what would be allowed
    height, res = spec.axle.height_mm, first
    for _ in range(60):
        height = math.ceil((height + max(need - res.min_clearance_mm, 0.5)) * 2) / 2
        trial = dataclasses.replace(spec, axle=dataclasses.replace(spec.axle, height_mm=height))
        try:
            res = frame_sweep(build_kit(trial, check_clearance=False), travel_deg(spec))
        except ParameterError:
            continue
        if res.min_clearance_mm >= need - 1e-9:
            break
    raise ParameterError(
        f"axle.height = {spec.axle.height_mm:g}: the turning {_name(first.turning)} comes within "
        f"{first.min_clearance_mm:.1f} mm of the fixed {_name(first.fixed)} at {first.angle_deg:g} deg "
        f"(frame.clearance = {need:g} mm through +-{spec.site.travel_limit_deg:g} deg); "
        f"must be at least {height:g} mm")


def _name(instance: str) -> str:
    return instance.replace("#", " #")
