"""The bought items of one kit, sized from the kit itself: a pure function of Kit + Spec.

Nothing here is a fixed list of part names. The fasteners come from the round
holes of the parts as placed in the kit frame (rotation 0): holes on one line
whose plates touch face to face are one *stack*, and a stack is

- an axle or motor-shaft passage when it lies on the axle or on the motor's
  shaft axis (no fastener: the axle rod and the motor are items of their own);
- a base anchor when it is vertical and starts at the kit's underside (a screw
  into the user's surface);
- a motor screw when it ends on the face of the motor body;
- a screw into a tapped end (no nut) when it ends on the end face of the counterweight
  bar, on the bar's axis (the bar is drilled and tapped there);
- otherwise a bolt with two washers and a nut.

Each fastener's size is the largest metric size whose ISO 273 clearance hole
the hole passes; its length is rounded up to the next length of the series
written below with its source. The axle rod, the gear-motor, the panel, the
counterweight, the other carried items and the glue come from the kit's
components, the spec and the part descriptions.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from sheetgen.kitmodel.part import Component, Kit
from sheetgen.errors import ParameterError
from sheetgen.geometry.placement import vec3

# ---------------------------------------------------------------------------
# Tables of the trade. Values recalled without reading the standard are marked "from memory".

# ISO 273 clearance holes for bolts and screws, fine / medium / coarse series, mm (from memory).
ISO_273_CLEARANCE_MM: dict[float, tuple[float, float, float]] = {
    1.6: (1.7, 1.8, 2.0),
    2.0: (2.2, 2.4, 2.6),
    2.5: (2.7, 2.9, 3.1),
    3.0: (3.2, 3.4, 3.6),
    4.0: (4.3, 4.5, 4.8),
    5.0: (5.3, 5.5, 5.8),
    6.0: (6.4, 6.6, 7.0),
    8.0: (8.4, 9.0, 10.0),
    10.0: (10.5, 11.0, 12.0),
    12.0: (13.0, 13.5, 14.5),
}
# ISO 261 coarse thread pitch, mm (from memory).
ISO_261_PITCH_MM = {1.6: 0.35, 2.0: 0.4, 2.5: 0.45, 3.0: 0.5, 4.0: 0.7, 5.0: 0.8, 6.0: 1.0, 8.0: 1.25, 10.0: 1.5, 12.0: 1.75}
# ISO 4032 hexagon nut, style 1: largest thickness m, mm (from memory).
ISO_4032_NUT_MM = {1.6: 1.3, 2.0: 1.6, 2.5: 2.0, 3.0: 2.4, 4.0: 3.2, 5.0: 4.7, 6.0: 5.2, 8.0: 6.8, 10.0: 8.4, 12.0: 10.8}
# ISO 7089 plain washer, normal series: thickness h and outside diameter d2, mm (from memory).
ISO_7089_WASHER_MM = {1.6: (0.3, 4.0), 2.0: (0.3, 5.0), 2.5: (0.5, 6.0), 3.0: (0.5, 7.0), 4.0: (0.8, 9.0), 5.0: (1.0, 10.0),
                      6.0: (1.6, 12.0), 8.0: (1.6, 16.0), 10.0: (2.0, 20.0), 12.0: (2.5, 24.0)}
# ISO 4762 hexagon socket head cap screws: the nominal length series l, mm (from memory; a size is
# stocked over part of it only, e.g. M3 from 5 to 30 mm).
ISO_4762_LENGTHS_MM = (3, 4, 5, 6, 8, 10, 12, 16, 20, 25, 30, 35, 40, 45, 50, 55, 60, 65, 70, 80, 90, 100, 110,
                       120, 130, 140, 150, 160, 180, 200, 220, 240, 260, 280, 300)
# Wood screws (chipboard type): lengths commonly stocked, mm (common practice, from memory).
WOOD_SCREW_LENGTHS_MM = (10, 12, 16, 20, 25, 30, 35, 40, 45, 50, 60, 70, 80, 90, 100, 120, 140, 160, 180, 200)

THREAD_ALLOWANCE_PITCHES = 2  # thread showing beyond the nut: at least two pitches (common practice)
WASHERS_PER_BOLT = 2  # under the head and under the nut: sheet wood is soft (common practice)
WOOD_SCREW_EMBED_D = 6  # a wood screw reaches about six diameters into the surface (common practice, from memory)
MOTOR_THREAD_ENGAGEMENT_D = 1.5  # screw into a motor's threaded holes by 1.5 diameters (common practice)
# A screw into a tapped hole in steel engages about 1 to 1.5 diameters (common practice, from memory);
# the counterweight bar's tapped end takes 1.5 diameters, or the bar's length if it is shorter.
TAPPED_STEEL_ENGAGEMENT_D = 1.5

AXLE_MATERIAL_TEXT = {"steel": "steel rod (bright drawn)", "aluminium": "aluminium rod", "beech": "beech dowel"}
GLUE_TEXT = {"mdf": "PVA wood glue", "birch_plywood": "PVA wood glue",
             "cast_acrylic": "two-part epoxy (or acrylic solvent cement: ventilate, wear gloves)"}

TOL_MM = 0.01  # faces this close touch; centres this close are on one line


@dataclass(frozen=True)
class HardwareItem:
    """One bought item of a kit and how many one kit needs.

    ``item`` is the kind ("bolt", "nut", "washer", "anchor screw", "motor screw", "axle rod",
    "gear-motor", "panel", "counterweight", "carried item", "glue"), ``spec`` what to buy.
    ``price_key`` names the [prices] key that prices it and ``priced_per`` how: "each",
    "metre" (of ``length_mm``, per item) or "kit". ``parts`` lists the cut parts it passes
    or joins; a fastener passes ``holes`` plate holes of ``hole_mm``.
    """

    item: str
    spec: str
    qty_per_kit: int
    price_key: str
    priced_per: str = "each"
    length_mm: float | None = None
    diameter_mm: float | None = None
    standard: str = ""
    parts: tuple[str, ...] = ()
    holes: int = 0
    hole_mm: float | None = None

    def to_json(self, kits: int) -> dict:
        out: dict = {"item": self.item, "spec": self.spec, "qty_per_kit": self.qty_per_kit,
                     "qty_total": self.qty_per_kit * kits}
        if self.length_mm is not None:
            out["length_mm"] = round(self.length_mm, 3)
        if self.diameter_mm is not None:
            out["diameter_mm"] = round(self.diameter_mm, 3)
        if self.standard:
            out["standard"] = self.standard
        if self.parts:
            out["parts"] = list(self.parts)
        if self.holes:
            out["holes"] = self.holes
            out["hole_mm"] = self.hole_mm
        out["price_key"] = self.price_key
        return out


@dataclass(frozen=True)
class HoleStack:
    """Coaxial round holes through plates that touch face to face, in the kit frame at rotation 0.

    ``axis`` is a unit vector (its first non-zero component positive), ``start_mm`` the centre of
    the stack's face at the low end along the axis, ``length_mm`` the stack thickness;
    ``diameter_mm`` is the smallest hole of the stack; ``parts`` the part of each hole, in order."""

    axis: tuple[float, float, float]
    start_mm: tuple[float, float, float]
    length_mm: float
    diameter_mm: float
    parts: tuple[str, ...]
    kind: str  # "axle", "shaft", "anchor", "motor screw", "tapped", "bolt"

    @property
    def end_mm(self) -> tuple[float, float, float]:
        return vec3(np.asarray(self.start_mm) + self.length_mm * np.asarray(self.axis))


# ---------------------------------------------------------------------------


def metric_size(hole_mm: float, where: str) -> float:
    """The largest metric size (mm) a round hole of ``hole_mm`` clears (ISO 273: the hole at
    least the size's fine-series clearance)."""
    fits = [d for d, (fine, _, _) in ISO_273_CLEARANCE_MM.items() if fine <= hole_mm + 1e-9]
    if not fits:
        raise ParameterError(f"{where}: a {hole_mm:g} mm hole is smaller than the M1.6 clearance hole "
                             f"(ISO 273 fine, {ISO_273_CLEARANCE_MM[1.6][0]:g} mm); no bolt fits it")
    return max(fits)


def next_length(need_mm: float, series: tuple[int, ...], what: str) -> float:
    """The first length of ``series`` at least ``need_mm``."""
    for length in series:
        if length >= need_mm - 1e-9:
            return float(length)
    raise ParameterError(f"{what}: needs {need_mm:.1f} mm, longer than the series' longest ({series[-1]} mm)")


def _size_text(d: float) -> str:
    return f"M{d:g}"


def _canonical(axis: np.ndarray) -> np.ndarray:
    for v in axis:
        if abs(v) > 1e-9:
            return axis if v > 0 else -axis
    return axis


def _lowest_z_mm(kit: Kit) -> float:
    lows = []
    for part in kit.parts:
        x0, y0, x1, y1 = part.outline.bounds
        corners = np.array([(x, y, z) for x in (x0, x1) for y in (y0, y1) for z in (0.0, part.thickness_mm)])
        for pl in part.placements:
            lows.append(float(pl.apply(corners)[:, 2].min()))
    return min(lows)


def _component(kit: Kit, name: str) -> Component | None:
    for c in kit.components:
        if c.name == name:
            return c
    return None


def hole_stacks(kit: Kit) -> tuple[HoleStack, ...]:
    """Every stack of coaxial round holes in the kit, classified (see the module's docstring)."""
    lines: dict[tuple, list[tuple[float, float, float, str]]] = {}
    for part in kit.parts:
        for pl in part.placements:
            normal = _canonical(pl.matrix[:, 2])
            for c in part.circles:
                p0 = pl.apply(np.array([[c.x_mm, c.y_mm, 0.0]]))[0]
                s0 = float(p0 @ normal)
                s1 = s0 + part.thickness_mm * float(pl.matrix[:, 2] @ normal)
                foot = p0 - s0 * normal
                key = (tuple(round(float(v), 6) + 0.0 for v in normal), tuple(round(float(v) / TOL_MM) for v in foot))
                lines.setdefault(key, []).append((min(s0, s1), max(s0, s1), 2 * c.radius_mm, part.name))
    lowest = _lowest_z_mm(kit)
    motor = _component(kit, "motor")
    out = []
    for (normal, foot_key), spans in sorted(lines.items()):
        spans.sort()
        groups: list[list[tuple[float, float, float, str]]] = []
        for span in spans:
            if groups and span[0] <= max(s[1] for s in groups[-1]) + TOL_MM:
                groups[-1].append(span)
            else:
                groups.append([span])
        a = np.asarray(normal)
        for g in groups:
            s_lo, s_hi = g[0][0], max(s[1] for s in g)
            near = np.asarray(foot_key, dtype=float) * TOL_MM  # the line's foot, to TOL_MM / 2
            out.append(_classify(kit, a, s_lo, s_hi, g, lowest, motor, near))
    return tuple(sorted(out, key=lambda h: (h.kind, h.start_mm)))


def _classify(kit, a, s_lo, s_hi, group, lowest, motor, near=None) -> HoleStack:
    part_names = tuple(s[3] for s in group)
    foot = _line_foot(kit, a, group, near)
    start = foot + s_lo * a
    length = s_hi - s_lo
    d = min(s[2] for s in group)
    along_x = abs(abs(a[0]) - 1.0) < 1e-9
    vertical = abs(abs(a[2]) - 1.0) < 1e-9
    kind = "bolt"
    if along_x and math.hypot(foot[1], foot[2]) < TOL_MM:
        kind = "axle"
    elif motor is not None and along_x and math.hypot(foot[1] - motor.centre_mm[1], foot[2] - motor.centre_mm[2]) < TOL_MM:
        kind = "shaft"
    elif vertical and abs(start[2] - lowest) < TOL_MM:
        kind = "anchor"
    elif motor is not None and along_x and _on_motor_face(motor, foot, s_lo, s_hi):
        kind = "motor screw"
    elif along_x and _on_bar_end(_component(kit, "counterweight"), foot, s_lo, s_hi):
        kind = "tapped"
    return HoleStack(vec3(a), vec3(start), length, d, part_names, kind)


def _line_foot(kit: Kit, a: np.ndarray, group, near: np.ndarray | None = None) -> np.ndarray:
    """The point of the stack's line nearest the kit origin (from the first hole's part); ``near``:
    the line's foot as its key rounds it, which tells apart equal holes of one part on parallel lines
    (the four frame bolt holes of the tray)."""
    name = group[0][3]
    part = kit.part(name)
    for pl in part.placements:
        normal = _canonical(pl.matrix[:, 2])
        # ``a`` is the stack's key, rounded to 6 decimals: a tilted plate's normal (a polar kit's
        # ground plate) agrees with it only to that; the spans were measured along the plate's own
        if not np.allclose(normal, a, atol=1e-6):
            continue
        for c in part.circles:
            p0 = pl.apply(np.array([[c.x_mm, c.y_mm, 0.0]]))[0]
            s0 = float(p0 @ normal)
            s1 = s0 + part.thickness_mm * float(pl.matrix[:, 2] @ normal)
            foot = p0 - float(p0 @ a) * a
            if near is not None and float(np.linalg.norm(foot - near)) > TOL_MM:
                continue
            if abs(min(s0, s1) - group[0][0]) < 1e-9 and abs(2 * c.radius_mm - group[0][2]) < 1e-9:
                return foot
    raise AssertionError("a hole of the stack is not in its part")  # pragma: no cover


def _on_bar_end(bar: Component | None, foot: np.ndarray, s_lo: float, s_hi: float) -> bool:
    """Whether a stack along x lies on the counterweight bar's axis and ends on one of its end faces."""
    if bar is None or bar.shape != "cylinder_x":
        return False
    cx, cy, cz = bar.centre_mm
    length = bar.size_mm[0]
    on_axis = math.hypot(foot[1] - cy, foot[2] - cz) < TOL_MM
    ends = (cx - length / 2, cx + length / 2)
    return on_axis and any(abs(s - e) < TOL_MM for s in (s_lo, s_hi) for e in ends)


def tapped_screw_length_mm(stack_mm: float, size: float, bar_length_mm: float) -> tuple[float, float]:
    """(needed length, ISO 4762 length) of a screw through a stack of ``stack_mm`` into a tapped
    bar end: the stack, a washer under the head, and TAPPED_STEEL_ENGAGEMENT_D diameters of thread
    (or the bar's length, if shorter); the series length is the first at least that need which
    does not bottom in the bar, or the first above the need when none fits between the two."""
    washer = ISO_7089_WASHER_MM[size][0]
    need = stack_mm + washer + min(TAPPED_STEEL_ENGAGEMENT_D * size, bar_length_mm)
    most = stack_mm + washer + bar_length_mm
    fits = [float(n) for n in ISO_4762_LENGTHS_MM if need - 1e-9 <= n <= most + 1e-9]
    return need, (min(fits) if fits else next_length(need, ISO_4762_LENGTHS_MM, f"an M{size:g} screw into the bar"))


def _on_motor_face(motor: Component, foot: np.ndarray, s_lo: float, s_hi: float) -> bool:
    cx, cy, cz = motor.centre_mm
    lx, wy, hz = motor.size_mm
    inside = abs(foot[1] - cy) <= wy / 2 + 1e-9 and abs(foot[2] - cz) <= hz / 2 + 1e-9
    faces = (cx - lx / 2, cx + lx / 2)
    return inside and any(abs(s - f) < TOL_MM for s in (s_lo, s_hi) for f in faces)


# ---------------------------------------------------------------------------


def bolt_length_mm(stack_mm: float, size: float) -> tuple[float, float]:
    """(needed length, ISO 4762 length) of a bolt through a stack of ``stack_mm``: the stack, a
    washer under the head and one under the nut, the nut and two pitches of thread beyond it."""
    need = (stack_mm + WASHERS_PER_BOLT * ISO_7089_WASHER_MM[size][0] + ISO_4032_NUT_MM[size]
            + THREAD_ALLOWANCE_PITCHES * ISO_261_PITCH_MM[size])
    return need, next_length(need, ISO_4762_LENGTHS_MM, f"an M{size:g} bolt through {stack_mm:g} mm")


def hardware_items(kit: Kit, spec) -> tuple[HardwareItem, ...]:
    """Every bought item of one kit, in the order a buyer reads them."""
    stacks = hole_stacks(kit)
    items: list[HardwareItem] = []
    items += _axle(kit, spec, stacks)
    bar = _component(kit, "counterweight")
    items += _fasteners(stacks, bar.size_mm[0] if bar is not None else 0.0)
    items += _motor(kit, spec)
    items += _panel(spec)
    items += _carried(kit)
    items += _glue(kit, spec)
    return tuple(items)


def _axle(kit: Kit, spec, stacks: tuple[HoleStack, ...]) -> list[HardwareItem]:
    axle = _component(kit, "axle")
    if axle is None:
        return []
    length, d = axle.size_mm[0], axle.size_mm[1]
    figures = dict(kit.figures)
    flat = figures.get("axle_flat_mm")
    flat_text = f", with a flat (axle_flat_mm = {flat:g} mm)" if flat else ", round (no flat)"
    return [HardwareItem("axle rod", f"{AXLE_MATERIAL_TEXT.get(spec.axle.material, spec.axle.material)}, "
                         f"diameter {d:g} mm, cut to {length:g} mm{flat_text}; deburr both ends",
                         1, "prices.axle_rod", "metre", length_mm=length, diameter_mm=d,
                         parts=tuple(sorted({n for s in stacks if s.kind == "axle" for n in s.parts})))]


def _fasteners(stacks: tuple[HoleStack, ...], bar_length_mm: float = 0.0) -> list[HardwareItem]:
    bolts: dict[tuple[float, float, float], list[HoleStack]] = {}  # (size, length, hole) -> stacks
    anchors: dict[tuple[float, float, float], list[HoleStack]] = {}
    screws: dict[tuple[float, float, float], list[HoleStack]] = {}
    tapped: dict[tuple[float, float, float], list[HoleStack]] = {}
    washers: dict[float, int] = {}
    nuts: dict[float, int] = {}
    washer_parts: dict[float, set[str]] = {}
    for s in stacks:
        if s.kind in ("axle", "shaft"):
            continue
        where = "holes in " + " + ".join(dict.fromkeys(s.parts))
        size = metric_size(s.diameter_mm, where)
        w = ISO_7089_WASHER_MM[size][0]
        if s.kind == "bolt":
            _, length = bolt_length_mm(s.length_mm, size)
            bolts.setdefault((size, length, s.diameter_mm), []).append(s)
            washers[size] = washers.get(size, 0) + WASHERS_PER_BOLT
            nuts[size] = nuts.get(size, 0) + 1
        elif s.kind == "tapped":
            _, length = tapped_screw_length_mm(s.length_mm, size, bar_length_mm)
            tapped.setdefault((size, length, s.diameter_mm), []).append(s)
            washers[size] = washers.get(size, 0) + 1
        elif s.kind == "anchor":
            need = s.length_mm + w + WOOD_SCREW_EMBED_D * size
            length = next_length(need, WOOD_SCREW_LENGTHS_MM, f"an anchor screw through {where}")
            anchors.setdefault((size, length, s.diameter_mm), []).append(s)
            washers[size] = washers.get(size, 0) + 1
        else:
            need = s.length_mm + w + MOTOR_THREAD_ENGAGEMENT_D * size
            length = next_length(need, ISO_4762_LENGTHS_MM, f"a motor screw through {where}")
            screws.setdefault((size, length, s.diameter_mm), []).append(s)
            washers[size] = washers.get(size, 0) + 1
        washer_parts.setdefault(size, set()).update(s.parts)
    out = []
    for (size, length, hole), group in sorted(bolts.items()):
        stack = max(s.length_mm for s in group)
        out.append(HardwareItem(
            "bolt", f"socket head cap screw ISO 4762 {_size_text(size)} x {length:g} (through {stack:g} mm of "
            f"sheet, washer each side, nut)", len(group), "prices.bolt", length_mm=length, diameter_mm=size,
            standard="ISO 4762", parts=_parts_of(group), holes=len(group[0].parts), hole_mm=hole))
    for size, n in sorted(nuts.items()):
        out.append(HardwareItem("nut", f"hexagon nut ISO 4032 {_size_text(size)}", n, "prices.nut", diameter_mm=size,
                                standard="ISO 4032"))
    for (size, length, hole), group in sorted(anchors.items()):
        out.append(HardwareItem(
            "anchor screw", f"wood screw {size:g} x {length:g} mm with a washer, through the base into a wooden "
            f"surface (into anything else: an {_size_text(size)} bolt or a wall plug of that size, as the surface "
            "needs)", len(group), "prices.anchor_screw", length_mm=length, diameter_mm=size,
            parts=_parts_of(group), holes=len(group[0].parts), hole_mm=hole))
    for (size, length, hole), group in sorted(screws.items()):
        out.append(HardwareItem(
            "motor screw", f"socket head cap screw ISO 4762 {_size_text(size)} x {length:g} with a washer, into "
            f"the motor's threaded holes (check their depth on the motor's data sheet)", len(group),
            "prices.motor_screw", length_mm=length, diameter_mm=size, standard="ISO 4762",
            parts=_parts_of(group), holes=len(group[0].parts), hole_mm=hole))
    for (size, length, hole), group in sorted(tapped.items()):
        out.append(HardwareItem(
            "counterweight screw", f"socket head cap screw ISO 4762 {_size_text(size)} x {length:g} with a washer, "
            f"through the bracket into the counterweight bar's tapped end (no nut)", len(group), "prices.bolt",
            length_mm=length, diameter_mm=size, standard="ISO 4762", parts=_parts_of(group),
            holes=len(group[0].parts), hole_mm=hole))
    for size, n in sorted(washers.items()):
        h, od = ISO_7089_WASHER_MM[size]
        out.append(HardwareItem("washer", f"plain washer ISO 7089, size {size:g} ({od:g} mm outside, {h:g} mm thick)", n,
                                "prices.washer", diameter_mm=size, standard="ISO 7089",
                                parts=tuple(sorted(washer_parts[size]))))
    return out


def _parts_of(group: list[HoleStack]) -> tuple[str, ...]:
    return tuple(dict.fromkeys(n for s in group for n in s.parts))


def _motor(kit: Kit, spec) -> list[HardwareItem]:
    if _component(kit, "motor") is None:
        return []
    m = spec.motor
    flat = f", flat {m.shaft_flat_mm:g} mm across" if m.shaft_flat_mm else ", round"
    screws = (f"; two mounting holes {m.screw_spacing_mm:g} mm apart" if m.screw_spacing_mm else "")
    return [HardwareItem(
        "gear-motor", f"DC gear-motor {m.voltage_V:g} V, stall torque at least {m.stall_torque_Nm:g} N·m at the "
        f"output, about {m.no_load_speed_rpm:g} rpm without load; output shaft {m.shaft_diameter_mm:g} mm{flat}, "
        f"{m.shaft_length_mm:g} mm beyond the mounting face; body {m.body_length_mm:g} x {m.body_width_mm:g} x "
        f"{m.body_height_mm:g} mm (length x width x height){screws}; mass about {m.mass_kg * 1000:g} g",
        1, "prices.motor")]


def _panel(spec) -> list[HardwareItem]:
    p = spec.panel
    return [HardwareItem("panel", f"solar panel {p.width_mm:g} mm along the axle x {p.height_mm:g} mm across x "
                         f"{p.thickness_mm:g} mm thick, about {p.mass_kg * 1000:g} g", 1, "prices.panel")]


def _carried(kit: Kit) -> list[HardwareItem]:
    out = []
    for c in kit.components:
        if c.name in ("panel", "axle", "motor"):
            continue
        x, y, z = c.centre_mm
        where = f"at ({x:g}, {y:g}, {z:g}) mm in the kit frame"
        size = f", {c.size_mm[0]:g} x {c.size_mm[1]:g} x {c.size_mm[2]:g} mm" if c.shape == "box" else ""
        if "counterweight" in c.name.lower():
            out.append(HardwareItem("counterweight", f"{c.name}: {c.mass_kg * 1000:g} g{size}, fixed to the turning "
                                    f"frame {where}", 1, "prices.counterweight"))
        else:
            out.append(HardwareItem("carried item", f"{c.name}: {c.mass_kg * 1000:g} g{size}, carried by the "
                                    f"turning frame {where}", 1, "prices.payload", "kit"))
    return out


def _glue(kit: Kit, spec) -> list[HardwareItem]:
    glued = tuple(p.name for p in kit.parts if p.qty > 1 and "glue" in p.description.lower())
    if not glued:
        return []
    what = GLUE_TEXT.get(spec.sheet.material, "glue for the sheet material")
    return [HardwareItem("glue", f"{what}, for the layers of: {', '.join(glued)}", 1, "prices.glue", "kit",
                         parts=glued)]
