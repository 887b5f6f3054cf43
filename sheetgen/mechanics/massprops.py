"""Masses, centre of gravity and static unbalance of a kit.

Every cut part weighs its nominal area x its thickness x its material's
density (the materials table); its centre of gravity is the centroid of its
outline at mid-thickness, carried into the kit frame by each placement.
Components (panel, axle, motor, hardware, rotating masses) bring their own
mass at their centre (boxes and cylinders are uniform, so the centre is the
centre of gravity).

The rotating assembly is every part instance whose placement turns and every
rotating component. Its static unbalance about the axle (x) is
U = m r, r being the distance of its centre of gravity from the x axis,
reported in g·mm (ISO 21940-11 expresses static unbalance in g·mm; from
memory).

All positions are in the kit frame at rotation angle 0, in mm.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from sheetgen.mechanics.materials import sheet_material
from sheetgen.kitmodel.part import Component, Kit, Part

_MM3_TO_M3 = 1e-9


@dataclass(frozen=True)
class ItemMass:
    """One instance in the kit: a placed part or a component."""

    name: str  # part name with its instance number, or the component name
    group: str  # part name or component name
    kind: str  # "part" or "component"
    mass_kg: float
    cg_mm: tuple[float, float, float]
    rotating: bool


@dataclass(frozen=True)
class GroupMass:
    """All instances of one part (or one component), summed."""

    name: str
    kind: str
    qty: int
    mass_each_kg: float
    mass_kg: float
    rotating: bool
    material: str


@dataclass(frozen=True)
class MassProperties:
    items: tuple[ItemMass, ...]
    groups: tuple[GroupMass, ...]
    total_mass_kg: float
    total_cg_mm: tuple[float, float, float]
    rotating_mass_kg: float
    rotating_cg_mm: tuple[float, float, float]
    fixed_mass_kg: float

    @property
    def unbalance_radius_mm(self) -> float:
        """Distance of the rotating assembly's CG from the axle axis (x)."""
        _, y, z = self.rotating_cg_mm
        return math.hypot(y, z)

    @property
    def static_unbalance_gmm(self) -> float:
        """U = m r in g·mm."""
        return self.rotating_mass_kg * 1000.0 * self.unbalance_radius_mm

    @property
    def cg_angle_deg(self) -> float:
        """Angle of the rotating CG from the upward vertical (+z) at rotation 0,
        positive in the right-handed sense about +x (toward -y): a CG at
        (0, -r sin a, r cos a) has angle a. 0 when balanced."""
        _, y, z = self.rotating_cg_mm
        if math.hypot(y, z) == 0.0:
            return 0.0
        return math.degrees(math.atan2(-y, z))


def part_mass_each_kg(part: Part, density_kg_m3: float) -> float:
    """Nominal area x thickness x density for one instance."""
    return part.area_mm2 * part.thickness_mm * _MM3_TO_M3 * density_kg_m3


def _weighted_cg(items: list[ItemMass]) -> tuple[float, tuple[float, float, float]]:
    m = sum(i.mass_kg for i in items)
    if m <= 0.0:
        return 0.0, (0.0, 0.0, 0.0)
    c = np.sum([np.asarray(i.cg_mm) * i.mass_kg for i in items], axis=0) / m
    return m, (float(c[0]), float(c[1]), float(c[2]))


def _part_items(part: Part) -> list[ItemMass]:
    density = sheet_material(part.material).density_kg_m3
    m = part_mass_each_kg(part, density)
    local = part.local_centroid_mm()
    out = []
    for i, pl in enumerate(part.placements):
        c = pl.apply(local)[0]
        out.append(ItemMass(f"{part.name}#{i + 1}", part.name, "part", m,
                            (float(c[0]), float(c[1]), float(c[2])), pl.rotating))
    return out


def _component_item(comp: Component) -> ItemMass:
    x, y, z = comp.cg_mm()
    c = (float(x), float(y), float(z))
    return ItemMass(comp.name, comp.name, "component", float(comp.mass_kg), c, comp.rotating)


def mass_properties(kit: Kit) -> MassProperties:
    """Mass of every part and component, and the CGs of the whole kit and of
    the rotating assembly, in the kit frame at rotation 0."""
    items: list[ItemMass] = []
    groups: list[GroupMass] = []
    for part in kit.parts:
        its = _part_items(part)
        items.extend(its)
        each = its[0].mass_kg
        # a part whose instances split between turning and fixed counts as turning
        # in the group line; the items keep each instance's own flag
        groups.append(GroupMass(part.name, "part", part.qty, each, each * part.qty, part.rotating, part.material))
    for comp in kit.components:
        items.append(_component_item(comp))
        groups.append(GroupMass(comp.name, "component", 1, float(comp.mass_kg), float(comp.mass_kg),
                                comp.rotating, ""))
    total_m, total_cg = _weighted_cg(items)
    rot_m, rot_cg = _weighted_cg([i for i in items if i.rotating])
    return MassProperties(
        items=tuple(items),
        groups=tuple(groups),
        total_mass_kg=total_m,
        total_cg_mm=total_cg,
        rotating_mass_kg=rot_m,
        rotating_cg_mm=rot_cg,
        fixed_mass_kg=total_m - rot_m,
    )


# ---------------------------------------------------------------------------
# counterweight


@dataclass(frozen=True)
class Counterweight:
    """A point mass on the rotating frame that moves its CG onto the axle."""

    mass_kg: float
    position_mm: tuple[float, float, float]
    arm_mm: float
    rule: str  # how the position was chosen
    found: bool = True  # False: no usable place was found; the figures are for reference only
    carried: bool = False  # True: the kit carries it (a counterweight-bracket part and a bar)
    bare_unbalance_gmm: float = 0.0  # carried: the frame's unbalance without bracket and bar
    residual_unbalance_gmm: float = 0.0  # carried: what is left with them


def counterweight_at_arm(mp: MassProperties, arm_mm: float, x_mm: float | None = None) -> Counterweight:
    """The mass at distance ``arm_mm`` from the axle, straight opposite the
    rotating CG, that cancels the unbalance: m_c arm = U (lever rule).
    ``x_mm`` (along the axle) does not change the balance about x; it defaults
    to the CG's x."""
    if arm_mm <= 0:
        raise ValueError("counterweight arm must be positive")
    cx, cy, cz = mp.rotating_cg_mm
    x = cx if x_mm is None else x_mm
    r = mp.unbalance_radius_mm
    if r == 0.0:
        return Counterweight(0.0, (x, 0.0, 0.0), 0.0, "balanced: no counterweight")
    uy, uz = -cy / r, -cz / r
    mass = mp.rotating_mass_kg * r / arm_mm
    return Counterweight(mass, (x, uy * arm_mm, uz * arm_mm), arm_mm, f"opposite the CG at {arm_mm:.1f} mm")


COUNTERWEIGHT_DIAMETER_MM = 16.0  # a round steel bar laid along the axle (a compact, easily cut weight)
COUNTERWEIGHT_ARM_STEP_MM = 1.0


def frame_reach_mm(kit: Kit) -> float:
    """The turning frame's largest distance from the axle (its sweep radius)."""
    from sheetgen.kitmodel.clearance import kit_silhouettes

    best = 0.0
    for s in kit_silhouettes(kit):
        if s.rotating:
            xy = np.asarray(s.shape.exterior.coords, dtype=float)
            best = max(best, float(np.hypot(xy[:, 0], xy[:, 1]).max()))
    return best


def _bar(mass_kg: float, centre_yz: tuple[float, float], x_mm: float):
    """Silhouette of the counterweight bar: a disc in (y, z), its length along x."""
    from shapely.geometry import Point

    from sheetgen.kitmodel.clearance import Silhouette
    from sheetgen.mechanics.materials import rod_material

    r = COUNTERWEIGHT_DIAMETER_MM / 2
    length = mass_kg / (rod_material("steel").density_kg_m3 * math.pi * (r * 1e-3) ** 2) * 1e3
    disc = Point(centre_yz).buffer(r, quad_segs=16)
    return Silhouette("counterweight#1", disc, (x_mm - length / 2, x_mm + length / 2), True), length


def _sunny_sides(kit: Kit):
    """For each turning box (the panel): the space over it, from its underside
    up, where a weight would shade it or sit in it."""
    from shapely.geometry import box as rect

    from sheetgen.kitmodel.clearance import Silhouette

    out = []
    for c in kit.components:
        if c.rotating and c.shape == "box":
            x, y, z = c.centre_mm
            dx, dy, dz = c.size_mm
            out.append(Silhouette(f"{c.name}#sky", rect(y - dy / 2, z - dz / 2, y + dy / 2, 1e4),
                                  (x - dx / 2, x + dx / 2), True))
    return out


def _runs_into(bar, turning) -> bool:
    """Whether the bar overlaps a turning part it shares x with (touching is fine)."""
    for s in turning:
        if s.x_range_mm[0] < bar.x_range_mm[1] - 1e-9 and bar.x_range_mm[0] < s.x_range_mm[1] - 1e-9:
            if s.shape.intersection(bar.shape).area > 1e-6:
                return True
    return False


def suggest_counterweight(kit: Kit, mp: MassProperties, travel_deg: tuple[float, float],
                          clearance_mm: float) -> Counterweight:
    """The counterweight for the kit as designed.

    Position rule: a round steel bar COUNTERWEIGHT_DIAMETER_MM across, laid
    along the axle at the rotating CG's x, straight opposite the CG, as far
    from the axle as the turning frame's own reach allows while the bar keeps
    ``clearance_mm`` from every fixed part through the travel (the same sweep
    as the frame's clearance check) and does not run into the turning parts
    or the axle (it may touch them). The farther out, the lighter it is. Its
    bracket to the frame is the builder's to fit."""
    from sheetgen.kitmodel.clearance import kit_silhouettes, sweep_clearance

    carried = _carried(kit, mp)
    if carried is not None:
        return carried
    r = mp.unbalance_radius_mm
    if r == 0.0:
        return counterweight_at_arm(mp, 1.0)
    cx, cy, cz = mp.rotating_cg_mm
    uy, uz = -cy / r, -cz / r
    sils = kit_silhouettes(kit)
    fixed = [s for s in sils if not s.rotating]
    turning = [s for s in sils if s.rotating] + _sunny_sides(kit)
    reach = frame_reach_mm(kit)
    axle_r = max([c.size_mm[1] / 2 for c in kit.components if c.shape == "cylinder_x"] + [0.0])
    a_min = axle_r + COUNTERWEIGHT_DIAMETER_MM / 2  # the bar touching the axle
    arm = math.floor(reach / COUNTERWEIGHT_ARM_STEP_MM) * COUNTERWEIGHT_ARM_STEP_MM
    while arm >= a_min:
        mass = mp.rotating_mass_kg * r / arm
        bar, length = _bar(mass, (uy * arm, uz * arm), cx)
        if _runs_into(bar, turning):
            arm -= COUNTERWEIGHT_ARM_STEP_MM
            continue
        res = sweep_clearance(fixed + [bar], travel_deg)
        if res.min_clearance_mm >= clearance_mm - 1e-9:
            cw = counterweight_at_arm(mp, arm, cx)
            rule = (f"steel bar {COUNTERWEIGHT_DIAMETER_MM:g} mm across and {length:.0f} mm long along the axle, "
                    f"opposite the CG at {arm:g} mm: the farthest out (up to the frame's reach, {reach:.1f} mm) "
                    f"that keeps frame.clearance from the fixed parts through the travel; fit a bracket to the frame")
            return Counterweight(cw.mass_kg, cw.position_mm, cw.arm_mm, rule)
        arm -= COUNTERWEIGHT_ARM_STEP_MM
    cw = counterweight_at_arm(mp, a_min, cx)
    rule = (f"no place straight opposite the CG both keeps frame.clearance from the fixed parts "
            f"and stays off the turning parts and the panel's sunny side; given at {a_min:g} mm "
            "from the axle for reference only: move the heavy items instead")
    return Counterweight(cw.mass_kg, cw.position_mm, cw.arm_mm, rule, found=False)


def _carried(kit: Kit, mp: MassProperties) -> Counterweight | None:
    """The counterweight the kit carries (component "counterweight" on its
    bracket), with the bare frame's unbalance (the kit without bracket and bar)
    and the residual (the kit as it is)."""
    bar = next((c for c in kit.components if c.name == "counterweight" and c.rotating), None)
    if bar is None:
        return None
    bare = Kit(tuple(p for p in kit.parts if p.name != "counterweight-bracket"),
               tuple(c for c in kit.components if c is not bar))
    u_bare = mass_properties(bare).static_unbalance_gmm
    _, y, z = bar.centre_mm
    length, dia, _ = bar.size_mm
    rule = (f"carried: steel bar {dia:g} mm across and {length:g} mm long on the counterweight-bracket, "
            f"{math.hypot(y, z):.0f} mm from the axle opposite the frame's CG; unbalance {u_bare:.0f} g·mm bare, "
            f"{mp.static_unbalance_gmm:.0f} g·mm with it")
    return Counterweight(float(bar.mass_kg), bar.centre_mm, math.hypot(y, z), rule, True, True, u_bare,
                         mp.static_unbalance_gmm)
