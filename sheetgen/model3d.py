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
  (sheetgen.kit.MESHING) are rolled together instead, the pinion turning
  z_wheel / z_pinion times as far the other way;
* frame clearance: part against part where their x ranges overlap, which is
  what frame.clearance asks of the turning frame (and what sheetgen.kit checks
  in 2D);
* mass: parts weigh their solid's volume x the sheet density, components
  their given mass; the turning assembly's mass and CG must match the balance
  check's (sheetgen.mechanics.massprops) within MASS_TOL.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass, field
from typing import Any

import numpy as np
import shapely
from shapely import affinity
from shapely.geometry import MultiPoint, Polygon

from sheetgen.numbers import sig
from sheetgen.errors import GeometryBug, ParameterError
from sheetgen.geometry.shapes import GRID_MM, disc, rect
from sheetgen.kit import MESHING
from sheetgen.part import Component, Kit, Placement, place

CONTACT_TOL_MM = 1e-3  # closer than this counts as touching
SHARED_VOLUME_TOL_MM3 = 1e-3  # more shared volume than this is an interference
MASS_TOL = 0.005  # solids vs the balance check: mass and CG within 0.5 %
SWEEP_STEP_DEG = 1.0
MAX_SWEEP_STEP_DEG = 2.0
ROUND_TOL_MM = 1e-4  # ring vertices this close to one circle about the axle: the part turns in place
CLOSEST_PAIRS = 5  # clearance pairs listed in the report
MOTOR = "motor"  # the kit component that carries the pinion on its shaft
_AXIS_TOL = 1e-9

Y, Z = (0.0, 1.0, 0.0), (0.0, 0.0, 1.0)


# ---------------------------------------------------------------------------
# pure model


@dataclass(frozen=True)
class Prism:
    """A polygon in a local x-y plane swept along local +z by ``depth_mm``,
    carried into the kit frame (rotation 0) by ``placement``."""

    outline: Polygon
    depth_mm: float
    placement: Placement

    @property
    def axis(self) -> np.ndarray:
        return self.placement.matrix[:, 2]

    @property
    def axial(self) -> bool:
        """Swept along the axle (x): the plate lies across the axle."""
        return abs(abs(float(self.axis[0])) - 1.0) < _AXIS_TOL

    def turned(self, angle_deg: float) -> "Prism":
        return Prism(self.outline, self.depth_mm, self.placement.turned(angle_deg))

    def corners(self) -> np.ndarray:
        """Exterior vertices on both faces, in the kit frame."""
        xy = np.asarray(self.outline.exterior.coords[:-1], dtype=float)
        local = np.vstack([np.column_stack([xy, np.zeros(len(xy))]),
                           np.column_stack([xy, np.full(len(xy), self.depth_mm)])])
        return self.placement.apply(local)

    def x_range_mm(self) -> tuple[float, float]:
        c = self.corners()
        return float(c[:, 0].min()), float(c[:, 0].max())

    def yz_projection(self) -> Polygon:
        """The prism seen along x: its outline for an axial prism (exact), else
        the convex hull of its corners (contains the true projection)."""
        if self.axial:
            m = self.placement.matrix
            t = self.placement.translation_mm
            return affinity.affine_transform(self.outline, [m[1, 0], m[1, 1], m[2, 0], m[2, 1], t[1], t[2]])
        hull = MultiPoint([tuple(p) for p in self.corners()[:, 1:]]).convex_hull
        if not isinstance(hull, Polygon):  # a plate seen exactly edge-on along x and along its own thickness
            hull = hull.buffer(1e-9)
        return hull


@dataclass(frozen=True)
class Body:
    """One solid of the model: a part instance (``rib#1``) or a component."""

    name: str
    source: str  # part name or component name
    kind: str  # "part" or "component"
    rotating: bool
    pieces: tuple[Prism, ...]
    material: str = ""  # sheet material key (parts)
    mass_kg: float | None = None  # components: as given in the kit

    def aabb(self) -> tuple[np.ndarray, np.ndarray]:
        pts = np.vstack([p.corners() for p in self.pieces])
        return pts.min(axis=0), pts.max(axis=0)

    def x_range_mm(self) -> tuple[float, float]:
        lo, hi = self.aabb()
        return float(lo[0]), float(hi[0])


def spun(placement: Placement, angle_deg: float) -> Placement:
    """The placement after turning the part about its own local z axis (through its local origin)."""
    a = math.radians(angle_deg)
    c, s = math.cos(a), math.sin(a)
    rz = np.array([[c, -s, 0.0], [s, c, 0.0], [0.0, 0.0, 1.0]])
    r = placement.matrix @ rz
    return Placement(tuple(tuple(float(v) for v in row) for row in r), placement.translation_mm, placement.rotating)


def mesh_turn_deg(wheel_teeth: int, pinion_teeth: int, wheel_at: Placement, pinion_at: Placement) -> float:
    """How far to turn the pinion about its own axis so that one of its teeth
    sits centred in a wheel space at the mesh.

    Both gear outlines have tooth 0 centred on their local +x. Seen along the
    common axis, the centre line leaves the wheel at angle theta_w (wheel
    local) and the pinion at theta_p (pinion local). Let the nearest wheel
    tooth stand delta_w from the centre line. Along the common tangent at the
    mesh, arcs on the two operating pitch circles are in the ratio of the
    tooth counts, and counter-clockwise runs opposite ways on the two gears,
    so a pinion tooth at delta_p from the centre line stands midway between
    two wheel teeth (tooth in a space) when
    -z_p delta_p / 2 pi - z_w delta_w / 2 pi = 1/2 (mod 1),
    i.e. delta_p = -(z_w delta_w + pi) / z_p. Profile shift changes the pitch
    radii but not the angular pitch, so the rule holds for shifted pairs.
    Returns the turn in [0, 360 / z_p) degrees."""
    rw, rp = wheel_at.matrix, pinion_at.matrix
    if float(rw[:, 2] @ rp[:, 2]) < 1.0 - 1e-9:
        raise GeometryBug("wheel and pinion are not placed on parallel axes facing the same way")
    c = np.asarray(pinion_at.translation_mm, dtype=float) - np.asarray(wheel_at.translation_mm, dtype=float)
    theta_w = math.atan2(float(c @ rw[:, 1]), float(c @ rw[:, 0]))
    theta_p = math.atan2(float(-c @ rp[:, 1]), float(-c @ rp[:, 0]))
    pitch_w = 2 * math.pi / wheel_teeth
    delta_w = round(theta_w / pitch_w) * pitch_w - theta_w
    delta_p = -(wheel_teeth * delta_w + math.pi) / pinion_teeth
    pitch_p = 2 * math.pi / pinion_teeth
    return math.degrees((theta_p + delta_p) % pitch_p)


def _mesh_pairs(kit: Kit) -> list[tuple[str, str]]:
    names = {p.name for p in kit.parts}
    return sorted((w, p) for w, p in MESHING if w in names and p in names)


def mesh_turns_deg(kit: Kit, spec) -> dict[str, float]:
    """The pinion's turn about its own axis for each meshing pair in the kit."""
    out = {}
    for wheel, pinion in _mesh_pairs(kit):
        out[pinion] = mesh_turn_deg(spec.drive.wheel_teeth, spec.drive.pinion_teeth,
                                    kit.part(wheel).placements[0], kit.part(pinion).placements[0])
    return out


def _snap(poly: Polygon) -> Polygon:
    return shapely.set_precision(poly, GRID_MM)


def _bore(outline: Polygon) -> Polygon:
    """The hole of a gear outline that holds its centre (local origin)."""
    centre = shapely.Point(0.0, 0.0)
    for ring in outline.interiors:
        hole = Polygon(ring)
        if hole.contains(centre):
            return hole
    raise GeometryBug("the pinion outline has no bore around its centre")


def _component_pieces(comp: Component, kit: Kit, spec, turns: dict[str, float]) -> tuple[Prism, ...]:
    cx, cy, cz = comp.centre_mm
    if comp.shape == "point":
        return ()
    if comp.shape == "box":
        dx, dy, dz = comp.size_mm
        ident = ((1.0, 0.0, 0.0), (0.0, 1.0, 0.0), (0.0, 0.0, 1.0))
        pieces = [Prism(rect(-dx / 2, -dy / 2, dx / 2, dy / 2), dz,
                        Placement(ident, (cx, cy, cz - dz / 2), comp.rotating))]
        if comp.name == MOTOR:
            pieces += _motor_shaft(comp, kit, spec, turns)
        return tuple(pieces)
    if comp.shape == "cylinder_x":
        length, diameter, _ = comp.size_mm
        # the same polygon the bores are cut from (chords within 0.01 mm of the
        # circle), so a press bore meets the rod face to face
        rod = _snap(disc(0.0, 0.0, diameter / 2))
        return (Prism(rod, length, place(Y, Z, (cx - length / 2, cy, cz), comp.rotating)),)
    raise GeometryBug(f"component {comp.name}: unknown shape {comp.shape!r}")


def _motor_shaft(comp: Component, kit: Kit, spec, turns: dict[str, float]) -> list[Prism]:
    """The motor's output shaft: the pinion's nominal bore, from the motor's
    mounting face ``motor.shaft_length`` along -x, turned with the pinion."""
    pinions = [p for _, p in _mesh_pairs(kit)]
    if not pinions:
        return []
    pinion = kit.part(pinions[0])
    at = spun(pinion.placements[0], turns.get(pinion.name, 0.0))
    if abs(float(at.matrix[0, 2]) - 1.0) > _AXIS_TOL:
        raise GeometryBug("the pinion does not face +x, the motor shaft's direction")
    _, py, pz = at.translation_mm
    _, cy, cz = comp.centre_mm
    if abs(py - cy) > 1e-6 or abs(pz - cz) > 1e-6:
        raise GeometryBug(f"the pinion axis ({py:.3f}, {pz:.3f}) is off the motor's ({cy:.3f}, {cz:.3f})")
    face_x = comp.centre_mm[0] - comp.size_mm[0] / 2
    length = spec.motor.shaft_length_mm
    return [Prism(_bore(pinion.outline), length, Placement(at.rotation, (face_x - length, py, pz), False))]


def model_bodies(kit: Kit, spec) -> tuple[Body, ...]:
    """Every solid of the nominal model, in the kit frame at rotation 0; the
    pinion turned so that a tooth sits in a wheel space."""
    turns = mesh_turns_deg(kit, spec)
    out = []
    for part in kit.parts:
        spin = turns.get(part.name, 0.0)
        for i, pl in enumerate(part.placements):
            at = spun(pl, spin) if spin else pl
            out.append(Body(f"{part.name}#{i + 1}", part.name, "part", pl.rotating,
                            (Prism(part.outline, part.thickness_mm, at),), part.material))
    for comp in kit.components:
        pieces = _component_pieces(comp, kit, spec, turns)
        if pieces:
            out.append(Body(comp.name, comp.name, "component", comp.rotating, pieces, "", float(comp.mass_kg)))
    names = [b.name for b in out]
    if len(set(names)) != len(names):
        raise GeometryBug("two solids of the model share a name")
    return tuple(out)


def turns_in_place(body: Body) -> bool:
    """A rotating body that is round about the axle (rod, collar, washers): the
    frame's rotation only turns it in its own place."""
    if not body.rotating:
        return False
    for p in body.pieces:
        if not p.axial:
            return False
        shape = p.yz_projection()
        for ring in [shape.exterior, *shape.interiors]:
            r = np.hypot(*np.asarray(ring.coords, dtype=float).T)
            if r.max() - r.min() > ROUND_TOL_MM:
                return False
    return True


# -- exact formulas for prisms on parallel axes -----------------------------


def _in_frame_of(a: Prism, b: Prism):
    """b's outline in a's local plane and b's depth interval along a's axis,
    or None when the axes are not parallel."""
    ra, rb = a.placement.matrix, b.placement.matrix
    m = ra.T @ rb
    if abs(abs(float(m[2, 2])) - 1.0) > _AXIS_TOL:
        return None
    o = ra.T @ (np.asarray(b.placement.translation_mm) - np.asarray(a.placement.translation_mm))
    b2 = affinity.affine_transform(b.outline, [m[0, 0], m[0, 1], m[1, 0], m[1, 1], o[0], o[1]])
    z0, z1 = sorted((float(o[2]), float(o[2] + m[2, 2] * b.depth_mm)))
    return b2, z0, z1


def parallel_shared_volume_mm3(a: Prism, b: Prism) -> float | None:
    """Exact shared volume of two prisms on parallel axes (None if not parallel)."""
    f = _in_frame_of(a, b)
    if f is None:
        return None
    b2, z0, z1 = f
    overlap = min(a.depth_mm, z1) - max(0.0, z0)
    if overlap <= 0:
        return 0.0
    return float(a.outline.intersection(b2).area) * overlap


def parallel_distance_mm(a: Prism, b: Prism) -> float | None:
    """Exact distance of two prisms on parallel axes (None if not parallel)."""
    f = _in_frame_of(a, b)
    if f is None:
        return None
    b2, z0, z1 = f
    gap = max(0.0, z0 - a.depth_mm, -z1)
    return math.hypot(gap, float(a.outline.distance(b2)))


def _aabb_overlap(a, b, slack: float = 0.0) -> bool:
    (alo, ahi), (blo, bhi) = a, b
    return bool(np.all(alo < bhi + slack) and np.all(blo < ahi + slack))


def _aabb_gap(a, b) -> float:
    (alo, ahi), (blo, bhi) = a, b
    d = np.maximum(0.0, np.maximum(blo - ahi, alo - bhi))
    return float(np.linalg.norm(d))


def _x_gap(a: tuple[float, float], b: tuple[float, float]) -> float:
    return max(0.0, b[0] - a[1], a[0] - b[1])


def sweep_angles(range_deg: tuple[float, float], step_deg: float) -> np.ndarray:
    """Angles from one end of the range to the other in equal steps of at most ``step_deg``."""
    if not 0 < step_deg <= MAX_SWEEP_STEP_DEG:
        raise ParameterError(f"sweep step = {step_deg:g}: must be more than 0 and at most {MAX_SWEEP_STEP_DEG:g} deg")
    lo, hi = range_deg
    n = max(2, math.ceil((hi - lo) / step_deg - 1e-9) + 1)
    return np.linspace(lo, hi, n)


# ---------------------------------------------------------------------------
# report records


@dataclass(frozen=True)
class Interference:
    a: str
    b: str
    volume_mm3: float


@dataclass(frozen=True)
class TabCheck:
    tab_part: str
    slot_part: str
    tab_count: int
    expected_mm3: float  # tabs x tab width x tab thickness x slot part thickness
    found_mm3: float  # tab material inside the slot part's plate
    missing: tuple[str, ...]  # tab part instances that reach no slot part
    ok: bool


@dataclass(frozen=True)
class Clearance:
    turning: str
    fixed: str
    distance_mm: float
    angle_deg: float
    x_gap_mm: float  # gap between their x ranges (the distance itself when the gap is along the axle)
    steady: bool = False  # the same at every angle of the sweep (exactly known: plates across the axle)


@dataclass(frozen=True)
class Collision:
    turning: str
    fixed: str
    first_deg: float  # range of sampled angles where they share volume
    last_deg: float
    samples: int
    nearest_rest_deg: float  # the colliding angle nearest to rotation 0
    worst_deg: float
    worst_volume_mm3: float


@dataclass(frozen=True)
class Touch:
    turning: str
    fixed: str
    first_deg: float
    last_deg: float
    samples: int


@dataclass(frozen=True)
class MeshCheck:
    wheel: str
    pinion: str
    pinion_turn_deg: float
    min_gap_mm: float
    min_gap_deg: float
    max_overlap_mm3: float


@dataclass(frozen=True)
class MassCheck:
    mass_kg: float  # rotating assembly, from the solids
    cg_mm: tuple[float, float, float]
    ref_mass_kg: float  # the balance check's figures (sheetgen.mechanics.massprops)
    ref_cg_mm: tuple[float, float, float]
    mass_deviation: float  # relative
    cg_deviation_mm: float
    cg_tolerance_mm: float
    kit_mass_kg: float
    kit_cg_mm: tuple[float, float, float]
    ok: bool


@dataclass(frozen=True)
class SolidInfo:
    name: str
    source: str
    group: str  # "rotating" or "fixed"
    volume_mm3: float
    mass_kg: float


@dataclass(frozen=True)
class AssemblyReport:
    solids: tuple[SolidInfo, ...]
    interference: tuple[Interference, ...]
    floating_parts: tuple[str, ...]
    detached_parts: tuple[str, ...]  # not connected, through contacts, to the largest group
    tabs: tuple[TabCheck, ...]
    tracking_range_deg: tuple[float, float]
    step_deg: float
    angles: int
    running: tuple[Clearance, ...]  # parts round about the axle (they turn in place): gap to the nearest fixed part
    closest: tuple[Clearance, ...]  # least clearance first
    frame_clearance: Clearance | None  # part over part where their x ranges overlap (what frame.clearance means)
    frame_clearance_required_mm: float
    collisions: tuple[Collision, ...]  # the worst first
    touching: tuple[Touch, ...]
    mesh: tuple[MeshCheck, ...]
    mass: MassCheck
    timing_s: tuple[tuple[str, float], ...] = field(default=())
    occ_calls: int = 0  # OpenCascade booleans and distances the checks needed

    @property
    def running_parts(self) -> tuple[str, ...]:
        return tuple(r.turning for r in self.running)

    @property
    def max_interference_mm3(self) -> float:
        return max((i.volume_mm3 for i in self.interference), default=0.0)

    @property
    def min_clearance_mm(self) -> float:
        if self.collisions:
            return 0.0
        return self.closest[0].distance_mm if self.closest else math.inf

    @property
    def min_clearance_angle_deg(self) -> float | None:
        if self.collisions:
            return self.collisions[0].worst_deg
        return self.closest[0].angle_deg if self.closest else None

    @property
    def tabs_ok(self) -> bool:
        return all(t.ok for t in self.tabs)

    @property
    def frame_clearance_ok(self) -> bool:
        fc = self.frame_clearance
        return fc is None or fc.distance_mm >= self.frame_clearance_required_mm - 1e-6

    @property
    def mesh_ok(self) -> bool:
        return all(m.max_overlap_mm3 <= SHARED_VOLUME_TOL_MM3 for m in self.mesh)

    @property
    def ok(self) -> bool:
        return (not self.interference and not self.floating_parts and not self.detached_parts and self.tabs_ok
                and not self.collisions and not self.touching and self.min_clearance_mm > 0
                and self.frame_clearance_ok and self.mesh_ok and self.mass.ok)

    def to_json(self) -> dict:
        m = self.mass
        cl = [_clearance_json(c) for c in self.closest]
        worst = self.collisions[0] if self.collisions else None
        return {
            "ok": self.ok,
            "solid_count": len(self.solids),
            "solids": [{"name": s.name, "source": s.source, "group": s.group, "volume_mm3": sig(s.volume_mm3),
                        "mass_kg": sig(s.mass_kg)} for s in self.solids],
            "interference": [{"a": i.a, "b": i.b, "volume_mm3": sig(i.volume_mm3)} for i in self.interference],
            "max_interference_mm3": sig(self.max_interference_mm3),
            "floating_parts": list(self.floating_parts),
            "detached_parts": list(self.detached_parts),
            "tabs_ok": self.tabs_ok,
            "tabs": [{"tab_part": t.tab_part, "slot_part": t.slot_part, "tabs": t.tab_count,
                      "expected_mm3": sig(t.expected_mm3), "found_mm3": sig(t.found_mm3),
                      "missing": list(t.missing), "ok": t.ok} for t in self.tabs],
            "tracking_range_deg": [sig(self.tracking_range_deg[0]), sig(self.tracking_range_deg[1])],
            "sweep_step_deg": sig(self.step_deg),
            "sweep_angles": self.angles,
            "min_clearance_mm": sig(self.min_clearance_mm),
            "min_clearance_angle_deg": sig(self.min_clearance_angle_deg),
            "min_clearance_pair": ([worst.turning, worst.fixed] if worst else
                                   [self.closest[0].turning, self.closest[0].fixed] if self.closest else None),
            "closest": cl,
            "frame_clearance": None if self.frame_clearance is None else _clearance_json(self.frame_clearance),
            "frame_clearance_required_mm": sig(self.frame_clearance_required_mm),
            "frame_clearance_ok": self.frame_clearance_ok,
            "collisions": [{"turning": c.turning, "fixed": c.fixed, "first_deg": sig(c.first_deg),
                            "last_deg": sig(c.last_deg), "samples": c.samples,
                            "nearest_rest_deg": sig(c.nearest_rest_deg), "worst_deg": sig(c.worst_deg),
                            "worst_volume_mm3": sig(c.worst_volume_mm3)} for c in self.collisions],
            "touching": [{"turning": t.turning, "fixed": t.fixed, "first_deg": sig(t.first_deg),
                          "last_deg": sig(t.last_deg), "samples": t.samples} for t in self.touching],
            "running_parts": [{"name": r.turning, "nearest_fixed": r.fixed, "gap_mm": sig(r.distance_mm)}
                              for r in self.running],
            "mesh": [{"wheel": g.wheel, "pinion": g.pinion, "pinion_turn_deg": sig(g.pinion_turn_deg),
                      "min_gap_mm": sig(g.min_gap_mm), "min_gap_deg": sig(g.min_gap_deg),
                      "max_overlap_mm3": sig(g.max_overlap_mm3)} for g in self.mesh],
            "mass_kg": sig(m.mass_kg),
            "cg_mm": [sig(v) for v in m.cg_mm],
            "mass_check": {"balance_mass_kg": sig(m.ref_mass_kg), "balance_cg_mm": [sig(v) for v in m.ref_cg_mm],
                           "mass_deviation": sig(m.mass_deviation), "cg_deviation_mm": sig(m.cg_deviation_mm),
                           "cg_tolerance_mm": sig(m.cg_tolerance_mm), "ok": m.ok},
            "kit_mass_kg": sig(m.kit_mass_kg),
            "kit_cg_mm": [sig(v) for v in m.kit_cg_mm],
            "timing_s": {k: round(v, 3) for k, v in self.timing_s},
            "occ_calls": self.occ_calls,
        }


def _clearance_json(c: Clearance) -> dict:
    return {"turning": c.turning, "fixed": c.fixed, "distance_mm": sig(c.distance_mm), "angle_deg": sig(c.angle_deg),
            "x_gap_mm": sig(c.x_gap_mm), "along_axle": abs(c.distance_mm - c.x_gap_mm) < 1e-6 and c.x_gap_mm > 0,
            "steady": c.steady}




# ---------------------------------------------------------------------------
# cadquery: solids and the assembly


@dataclass(frozen=True)
class Model:
    bodies: tuple[Body, ...]
    solids: dict[str, Any]  # body name -> cadquery Solid in the kit frame (rotation 0)
    piece_solids: dict[tuple[str, int], Any]
    build_s: float

    def body(self, name: str) -> Body:
        for b in self.bodies:
            if b.name == name:
                return b
        raise KeyError(name)


def _location(pl: Placement):
    import cadquery as cq
    from OCP.gp import gp_Trsf

    m = pl.matrix
    t = pl.translation_mm
    trsf = gp_Trsf()
    trsf.SetValues(m[0, 0], m[0, 1], m[0, 2], t[0], m[1, 0], m[1, 1], m[1, 2], t[1], m[2, 0], m[2, 1], m[2, 2], t[2])
    return cq.Location(trsf)


def _turn_location(angle_deg: float):
    import cadquery as cq
    from OCP.gp import gp_Ax1, gp_Dir, gp_Pnt, gp_Trsf

    trsf = gp_Trsf()
    trsf.SetRotation(gp_Ax1(gp_Pnt(0, 0, 0), gp_Dir(1, 0, 0)), math.radians(angle_deg))
    return cq.Location(trsf)


def _wire(cq, coords):
    pts = [cq.Vector(float(x), float(y), 0.0) for x, y in list(coords)[:-1]]
    return cq.Wire.makePolygon(pts, close=True)


def prism_solid(prism: Prism, filled: bool = False):
    """The prism as a cadquery Solid in the kit frame; ``filled`` drops the holes."""
    import cadquery as cq

    outer = _wire(cq, prism.outline.exterior.coords)
    inner = [] if filled else [_wire(cq, r.coords) for r in prism.outline.interiors]
    face = cq.Face.makeFromWires(outer, inner)
    solid = cq.Solid.extrudeLinear(face, cq.Vector(0.0, 0.0, prism.depth_mm))
    return solid.moved(_location(prism.placement))


def build_model(kit: Kit, spec) -> Model:
    """cadquery solids for every body of the model."""
    import cadquery  # noqa: F401 - loaded before the clock starts: its import is not the model's cost

    start = time.perf_counter()
    bodies = model_bodies(kit, spec)
    solids, pieces = {}, {}
    for b in bodies:
        ps = [prism_solid(p) for p in b.pieces]
        for k, s in enumerate(ps):
            pieces[(b.name, k)] = s
        if len(ps) == 1:
            solids[b.name] = ps[0]
        else:
            fused = ps[0].fuse(*ps[1:]).clean()
            parts = fused.Solids()
            if len(parts) != 1:
                raise GeometryBug(f"{b.name}: its pieces do not join into one solid")
            solids[b.name] = parts[0]
    return Model(bodies, solids, pieces, time.perf_counter() - start)


def build_assembly(model: Model, name: str = "kit"):
    """A cadquery Assembly: ``fixed`` and ``rotating`` groups, one named child per solid."""
    import cadquery as cq

    top = cq.Assembly(name=name)
    groups = {g: cq.Assembly(name=g) for g in ("fixed", "rotating")}
    for b in model.bodies:
        groups["rotating" if b.rotating else "fixed"].add(model.solids[b.name], name=b.name)
    top.add(groups["fixed"])
    top.add(groups["rotating"])
    return top


# -- OpenCascade measures ---------------------------------------------------


def _shell(solid):
    """The solid's boundary: distances between boundaries skip OpenCascade's slow
    inside-the-solid test, and the checks know from shared volume whether
    two solids overlap."""
    from OCP.BRep import BRep_Builder
    from OCP.TopoDS import TopoDS_Compound

    builder = BRep_Builder()
    comp = TopoDS_Compound()
    builder.MakeCompound(comp)
    for sh in solid.Shells():
        builder.Add(comp, sh.wrapped)
    return comp


def _occ_distance(shape_a, shape_b) -> float:
    from OCP.BRepExtrema import BRepExtrema_DistShapeShape

    ext = BRepExtrema_DistShapeShape(shape_a, shape_b)
    if not ext.IsDone():
        raise GeometryBug("OpenCascade could not measure a distance")
    return float(ext.Value())


def _occ_common_mm3(solid_a, solid_b) -> float:
    return float(solid_a.intersect(solid_b).Volume())


def _volume_and_centre(solid) -> tuple[float, np.ndarray]:
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(solid.wrapped, props)
    c = props.CentreOfMass()
    return float(props.Mass()), np.array([c.X(), c.Y(), c.Z()])


# ---------------------------------------------------------------------------
# checks


class _Measures:
    """Shared volume and distance of two bodies at given frame angles, exact:
    shapely for pieces on parallel axes, OpenCascade for the rest (cached)."""

    def __init__(self, model: Model):
        self.model = model
        self._shells: dict[str, Any] = {}
        self.occ_calls = 0

    def _piece_solid(self, name: str, k: int, angle: float):
        s = self.model.piece_solids[(name, k)]
        return s.moved(_turn_location(angle)) if angle and self.model.body(name).rotating else s

    def _shell(self, name: str, angle: float):
        if name not in self._shells:
            self._shells[name] = _shell(self.model.solids[name])
        sh = self._shells[name]
        if angle and self.model.body(name).rotating:
            return sh.Moved(_turn_location(angle).wrapped)
        return sh

    def shared_volume_mm3(self, a: Body, b: Body, angle_a: float = 0.0, angle_b: float = 0.0) -> float:
        total = 0.0
        for ka, pa in enumerate(a.pieces):
            pa_t = pa.turned(angle_a)
            for kb, pb in enumerate(b.pieces):
                pb_t = pb.turned(angle_b)
                v = parallel_shared_volume_mm3(pa_t, pb_t)
                if v is None:
                    self.occ_calls += 1
                    v = _occ_common_mm3(self._piece_solid(a.name, ka, angle_a), self._piece_solid(b.name, kb, angle_b))
                total += v
        return total

    def distance_mm(self, a: Body, b: Body, angle_a: float = 0.0, angle_b: float = 0.0) -> float:
        """Distance of two bodies known not to share volume."""
        exact = []
        for pa in a.pieces:
            for pb in b.pieces:
                d = parallel_distance_mm(pa.turned(angle_a), pb.turned(angle_b))
                if d is None:
                    self.occ_calls += 1
                    return _occ_distance(self._shell(a.name, angle_a), self._shell(b.name, angle_b))
                exact.append(d)
        return min(exact)


def distance_bound_mm(a: Body, b: Body, angle_a_deg: float = 0.0) -> tuple[float, bool]:
    """The sweep's lower bound of the distance between body ``a`` turned by
    ``angle_a_deg`` and body ``b`` at rest: hypot(x gap, distance of the y-z
    projections), least over their pieces; and whether it is exact (the
    least comes from two plates across the axle)."""
    best, exact = math.inf, False
    for pa in a.pieces:
        proj_a = affinity.rotate(pa.yz_projection(), angle_a_deg, origin=(0.0, 0.0)) if a.rotating \
            else pa.yz_projection()
        for pb in b.pieces:
            d = math.hypot(_x_gap(pa.x_range_mm(), pb.x_range_mm()), float(proj_a.distance(pb.yz_projection())))
            if d < best:
                best, exact = d, pa.axial and pb.axial
    return best, exact


def find_interference(model: Model) -> list[Interference]:
    """Every pair of solids sharing more than SHARED_VOLUME_TOL_MM3 (at rest)."""
    return _interference(model, _Measures(model), [b.aabb() for b in model.bodies])


def find_floating(model: Model, reach_mm: float) -> tuple[list[str], list[str]]:
    """(floating bodies, bodies cut off from the largest connected group): two
    bodies are connected when they are within ``reach_mm`` of each other."""
    return _connection(model, _Measures(model), [b.aabb() for b in model.bodies], reach_mm)


def _interference(model: Model, meas: _Measures, boxes) -> list[Interference]:
    out = []
    bodies = model.bodies
    for i in range(len(bodies)):
        for j in range(i + 1, len(bodies)):
            if not _aabb_overlap(boxes[i], boxes[j], -1e-7):
                continue
            v = meas.shared_volume_mm3(bodies[i], bodies[j])
            if v > SHARED_VOLUME_TOL_MM3:
                out.append(Interference(bodies[i].name, bodies[j].name, v))
    return out


def _connection(model: Model, meas: _Measures, boxes, reach_mm: float) -> tuple[list[str], list[str]]:
    """Floating bodies (nothing within reach) and bodies cut off from the largest connected group."""
    bodies = model.bodies
    n = len(bodies)
    parent = list(range(n))

    def find(i):
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    cands = [(i, j) for i in range(n) for j in range(i + 1, n) if _aabb_gap(boxes[i], boxes[j]) <= reach_mm]

    def parallel(i, j):
        return all(_in_frame_of(pa, pb) is not None for pa in bodies[i].pieces for pb in bodies[j].pieces)

    # exact (cheap) pairs first, then OpenCascade only where it could still join two groups
    for i, j in sorted(cands, key=lambda p: not parallel(*p)):
        if find(i) == find(j):
            continue
        if meas.distance_mm(bodies[i], bodies[j]) <= reach_mm:
            parent[find(i)] = find(j)
    groups: dict[int, list[int]] = {}
    for i in range(n):
        groups.setdefault(find(i), []).append(i)
    floating = [bodies[m[0]].name for m in groups.values() if len(m) == 1]
    main = max(groups.values(), key=len)
    detached = [bodies[i].name for g in groups.values() if g is not main and len(g) > 1 for i in g]
    return floating, detached


def _tabs(kit: Kit, model: Model, meas: _Measures, boxes) -> list[TabCheck]:
    by_pair: dict[tuple[str, str], list] = {}
    for j in kit.joints:
        by_pair.setdefault((j.tab_part, j.slot_part), []).append(j)
    index = {b.name: k for k, b in enumerate(model.bodies)}
    out = []
    for (tab_part, slot_part), joints in by_pair.items():
        slot = kit.part(slot_part)
        # a tab crossing its slot part square on fills tab width x tab thickness x slot part thickness
        expected = sum(j.tab_count * j.tab_width_mm * j.sheet_thickness_mm * slot.thickness_mm for j in joints)
        count = sum(j.tab_count for j in joints)
        tabs = [b for b in model.bodies if b.source == tab_part]
        slots = [b for b in model.bodies if b.source == slot_part]
        found, missing = 0.0, []
        for tb in tabs:
            got = 0.0
            for sb in slots:
                if not _aabb_overlap(boxes[index[tb.name]], boxes[index[sb.name]], -1e-7):
                    continue
                plate = Prism(Polygon(slot.outline.exterior), slot.thickness_mm, sb.pieces[0].placement)
                v = parallel_shared_volume_mm3(tb.pieces[0], plate)
                if v is None:
                    meas.occ_calls += 1
                    v = _occ_common_mm3(model.solids[tb.name], prism_solid(plate, filled=True))
                got += v
            if got <= SHARED_VOLUME_TOL_MM3:
                missing.append(tb.name)
            found += got
        ok = not missing and abs(found - expected) <= 1e-6 * expected + SHARED_VOLUME_TOL_MM3
        out.append(TabCheck(tab_part, slot_part, count, expected, found, tuple(missing), ok))
    return out


def _mass(kit: Kit, model: Model) -> tuple[MassCheck, list[SolidInfo]]:
    from sheetgen.mechanics.massprops import mass_properties
    from sheetgen.mechanics.materials import sheet_material

    infos = []
    items = []  # (mass, centre, rotating)
    for b in model.bodies:
        vol, centre = _volume_and_centre(model.solids[b.name])
        if b.kind == "part":
            mass = vol * 1e-9 * sheet_material(b.material).density_kg_m3
        else:
            # the component's mass as given, at the centre of the shape the kit gives it
            # (the motor's shaft is drawn for the fit, weighed with the body)
            mass = float(b.mass_kg)
            _, centre = _volume_and_centre(model.piece_solids[(b.name, 0)])
        infos.append(SolidInfo(b.name, b.source, "rotating" if b.rotating else "fixed", vol, mass))
        items.append((mass, centre, b.rotating))
    for c in kit.components:
        if c.shape == "point":
            items.append((float(c.mass_kg), np.asarray(c.centre_mm, dtype=float), c.rotating))

    def total(sel):
        m = sum(i[0] for i in sel)
        cg = sum(i[0] * i[1] for i in sel) / m if m > 0 else np.zeros(3)
        return m, cg

    rot_m, rot_cg = total([i for i in items if i[2]])
    kit_m, kit_cg = total(items)
    ref = mass_properties(kit)
    ref_cg = np.asarray(ref.rotating_cg_mm, dtype=float)
    dev_m = abs(rot_m - ref.rotating_mass_kg) / ref.rotating_mass_kg if ref.rotating_mass_kg > 0 else 0.0
    dev_cg = float(np.linalg.norm(rot_cg - ref_cg))
    tol_cg = max(MASS_TOL * float(np.linalg.norm(ref_cg)), 0.01)
    check = MassCheck(rot_m, tuple(float(v) for v in rot_cg), ref.rotating_mass_kg, tuple(float(v) for v in ref_cg),
                      dev_m, dev_cg, tol_cg, kit_m, tuple(float(v) for v in kit_cg),
                      dev_m <= MASS_TOL and dev_cg <= tol_cg)
    return check, infos


# -- the sweep --------------------------------------------------------------


@dataclass(frozen=True)
class _SweepTables:
    pairs: list[tuple[int, int]]  # (turning body index, fixed body index)
    lb: np.ndarray  # (pairs, angles): lower bound of the 3D distance
    exact: np.ndarray  # (pairs, angles): True where the bound is the distance
    x_gap: np.ndarray  # (pairs,)


def _sweep_tables(bodies, turning, fixed, angles, meshing) -> _SweepTables:
    pairs = [(i, j) for i in turning for j in fixed if (bodies[i].source, bodies[j].source) not in meshing]
    t_pieces = [(i, k, p) for i in turning for k, p in enumerate(bodies[i].pieces)]
    t_index = {(i, k): n for n, (i, k, _) in enumerate(t_pieces)}
    t_proj = [p.yz_projection() for _, _, p in t_pieces]
    t_range = [p.x_range_mm() for _, _, p in t_pieces]
    entries = []  # (pair number, turning piece number, fixed projection, x gap, exact)
    fixed_cache = {}
    for n, (i, j) in enumerate(pairs):
        for kb, pb in enumerate(bodies[j].pieces):
            if (j, kb) not in fixed_cache:
                fixed_cache[(j, kb)] = (pb.yz_projection(), pb.x_range_mm(), pb.axial)
            proj_b, range_b, axial_b = fixed_cache[(j, kb)]
            for ka, pa in enumerate(bodies[i].pieces):
                tn = t_index[(i, ka)]
                entries.append((n, tn, proj_b, _x_gap(t_range[tn], range_b), pa.axial and axial_b))
    lb = np.full((len(pairs), len(angles)), np.inf)
    exact = np.zeros((len(pairs), len(angles)), dtype=bool)
    x_gap = np.array([_x_gap(bodies[i].x_range_mm(), bodies[j].x_range_mm()) for i, j in pairs])
    if not entries:
        return _SweepTables(pairs, lb, exact, x_gap)
    e_pair = np.array([e[0] for e in entries])
    e_turn = np.array([e[1] for e in entries])
    e_fixed = np.array([e[2] for e in entries], dtype=object)
    e_gap = np.array([e[3] for e in entries])
    e_exact = np.array([e[4] for e in entries])
    starts = np.searchsorted(e_pair, np.arange(len(pairs)))  # entries come pair by pair
    for k, ang in enumerate(angles):
        moved = np.array([affinity.rotate(g, float(ang), origin=(0.0, 0.0)) for g in t_proj], dtype=object)
        d = np.hypot(e_gap, shapely.distance(moved[e_turn], e_fixed))
        lb[:, k] = np.minimum.reduceat(d, starts)
        # exact when the least bound of the pair comes from two plates across the axle
        # (any other piece pair is at least its own bound away)
        exact[:, k] = np.logical_or.reduceat(e_exact & (d <= lb[e_pair, k] + 1e-12), starts)
    return _SweepTables(pairs, lb, exact, x_gap)


def _sweep(model: Model, meas: _Measures, angles: np.ndarray):
    bodies = model.bodies
    running = [i for i, b in enumerate(bodies) if turns_in_place(b)]
    turning = [i for i, b in enumerate(bodies) if b.rotating and i not in running]
    fixed = [i for i, b in enumerate(bodies) if not b.rotating]
    tab = _sweep_tables(bodies, turning, fixed, angles, MESHING)
    npairs = len(tab.pairs)
    dist = np.full(tab.lb.shape, np.nan)  # exact distances computed so far (0 where colliding)
    volume = np.zeros(tab.lb.shape)

    def name(n):
        i, j = tab.pairs[n]
        return bodies[i].name, bodies[j].name

    # collisions and contacts: every (pair, angle) whose bound says they may meet
    for n, k in zip(*np.nonzero(tab.lb <= CONTACT_TOL_MM)):
        i, j = tab.pairs[n]
        a = float(angles[k])
        v = meas.shared_volume_mm3(bodies[i], bodies[j], a, 0.0)
        volume[n, k] = v
        dist[n, k] = 0.0 if v > SHARED_VOLUME_TOL_MM3 else meas.distance_mm(bodies[i], bodies[j], a, 0.0)
    collisions, touching = [], []
    order = []
    for n in range(npairs):
        hit = np.nonzero(volume[n] > SHARED_VOLUME_TOL_MM3)[0]
        if len(hit):
            w = hit[int(np.argmax(volume[n, hit]))]
            near = hit[int(np.argmin(np.abs(angles[hit])))]
            collisions.append(Collision(*name(n), float(angles[hit[0]]), float(angles[hit[-1]]), len(hit),
                                        float(angles[near]), float(angles[w]), float(volume[n, w])))
            order.append((-round(float(volume[n, w]), 6), int(w), n))
        rub = np.nonzero((dist[n] <= CONTACT_TOL_MM) & (volume[n] <= SHARED_VOLUME_TOL_MM3))[0]
        if len(rub):
            touching.append(Touch(*name(n), float(angles[rub[0]]), float(angles[rub[-1]]), len(rub)))

    # the worst collision first (ties: the earliest angle of the sweep, then the pair order)
    collisions = [c for _, c in sorted(zip(order, collisions), key=lambda oc: oc[0])]

    def exact_at(n, k) -> float:
        if np.isnan(dist[n, k]):
            if tab.exact[n, k]:
                dist[n, k] = tab.lb[n, k]
            else:
                i, j = tab.pairs[n]
                dist[n, k] = meas.distance_mm(bodies[i], bodies[j], float(angles[k]), 0.0)
        return float(dist[n, k])

    def pair_min(n) -> tuple[float, int]:
        best, best_k = math.inf, 0
        for k in np.lexsort((np.arange(len(angles)), np.round(tab.lb[n], 9))):
            if tab.lb[n, k] >= best - 1e-9:
                break
            d = exact_at(n, k)
            if d < best - 1e-12:
                best, best_k = d, int(k)
        return best, best_k

    def closest(candidates, count):
        found: list[tuple[float, int, int]] = []
        lows = tab.lb.min(axis=1) if npairs else np.array([])
        for n in sorted(candidates, key=lambda n: lows[n]):
            if len(found) >= count and lows[n] > found[count - 1][0] + 1e-9:
                break
            d, k = pair_min(n)
            found.append((d, k, n))
            # ties (a symmetric kit): the earliest angle of the sweep, then the pair order
            found.sort(key=lambda f: (round(f[0], 9), f[1], f[2]))
        return [Clearance(*name(n), d, float(angles[k]), float(tab.x_gap[n]),
                          bool(np.all(tab.exact[n]) and np.ptp(tab.lb[n]) < 1e-9)) for d, k, n in found[:count]]

    top = closest(range(npairs), CLOSEST_PAIRS)
    # the frame over the fixed frame, as frame.clearance means it: part against part,
    # where their x ranges overlap (the same pairs sheetgen.kit checks in 2D)
    over = [n for n in range(npairs) if bodies[tab.pairs[n][0]].kind == bodies[tab.pairs[n][1]].kind == "part"
            and _x_overlap(bodies[tab.pairs[n][0]], bodies[tab.pairs[n][1]]) > 1e-9]
    frame = closest(over, 1)
    # parts turning in place: their gap to the fixed parts is the same at every angle (at rest)
    gaps = []
    for i in running:
        best, other = math.inf, ""
        bounds = sorted((distance_bound_mm(bodies[i], bodies[j])[0], j) for j in fixed)
        for bound, j in bounds:  # branch and bound, as in the sweep
            if bound >= best - 1e-9:
                break
            d = meas.distance_mm(bodies[i], bodies[j])
            if d < best:
                best, other = d, bodies[j].name
        x_gap = _x_gap(bodies[i].x_range_mm(), model.body(other).x_range_mm()) if other else math.inf
        gaps.append(Clearance(bodies[i].name, other, best, 0.0, x_gap, True))
    return gaps, top, frame[0] if frame else None, collisions, touching


def _x_overlap(a: Body, b: Body) -> float:
    (a0, a1), (b0, b1) = a.x_range_mm(), b.x_range_mm()
    return min(a1, b1) - max(a0, b0)


def _mesh(kit: Kit, spec, model: Model, angles: np.ndarray) -> list[MeshCheck]:
    """Wheel and pinion rolled together through the travel (the pinion turns
    z_wheel / z_pinion times as far, the other way): both are plates across
    the axle, so their gap and shared volume are exact in the y-z plane."""
    out = []
    ratio = spec.drive.wheel_teeth / spec.drive.pinion_teeth
    turns = mesh_turns_deg(kit, spec)
    for wheel, pinion in _mesh_pairs(kit):
        for wb in (b for b in model.bodies if b.source == wheel):
            for pb in (b for b in model.bodies if b.source == pinion):
                pw, pp = wb.pieces[0], pb.pieces[0]
                (w0, w1), (p0, p1) = pw.x_range_mm(), pp.x_range_mm()
                overlap = min(w1, p1) - max(w0, p0)
                if overlap <= 1e-9:
                    continue
                best_gap, best_deg, worst = math.inf, 0.0, 0.0
                for ang in angles:
                    a = float(ang)
                    w2 = pw.turned(a).yz_projection()
                    p2 = Prism(pp.outline, pp.depth_mm, spun(pp.placement, -a * ratio)).yz_projection()
                    gap = float(w2.distance(p2))
                    if gap <= CONTACT_TOL_MM:
                        worst = max(worst, float(w2.intersection(p2).area) * overlap)
                    if gap < best_gap - 1e-12:
                        best_gap, best_deg = gap, a
                out.append(MeshCheck(wb.name, pb.name, turns[pinion], best_gap, best_deg, worst))
    return out


def check_model(model: Model, kit: Kit, spec, step_deg: float = SWEEP_STEP_DEG) -> AssemblyReport:
    """All checks of the nominal model (see the module notes)."""
    from sheetgen.mechanics.solar import tracking_range

    timing = []
    clock = time.perf_counter()

    def lap(label):
        nonlocal clock
        now = time.perf_counter()
        timing.append((label, now - clock))
        clock = now

    meas = _Measures(model)
    boxes = [b.aabb() for b in model.bodies]
    interference = _interference(model, meas, boxes)
    lap("interference")
    reach = CONTACT_TOL_MM + spec.axle.bearing_clearance_mm / 2
    floating, detached = _connection(model, meas, boxes, reach)
    lap("connection")
    tabs = _tabs(kit, model, meas, boxes)
    lap("tabs")
    tr = tracking_range(spec.site.latitude_deg, spec.site.axle, spec.site.travel_limit_deg)
    angles = sweep_angles(tr.range_deg, step_deg)
    running, closest, frame, collisions, touching = _sweep(model, meas, angles)
    lap("sweep")
    mesh = _mesh(kit, spec, model, angles)
    lap("mesh")
    mass, infos = _mass(kit, model)
    lap("mass")
    timing.insert(0, ("build", model.build_s))
    return AssemblyReport(
        solids=tuple(infos), interference=tuple(interference), floating_parts=tuple(floating),
        detached_parts=tuple(detached), tabs=tuple(tabs), tracking_range_deg=tuple(tr.range_deg),
        step_deg=float(angles[1] - angles[0]) if len(angles) > 1 else 0.0, angles=len(angles),
        running=tuple(running), closest=tuple(closest), frame_clearance=frame,
        frame_clearance_required_mm=spec.frame.clearance_mm, collisions=tuple(collisions),
        touching=tuple(touching), mesh=tuple(mesh), mass=mass, timing_s=tuple(timing), occ_calls=meas.occ_calls,
    )


def assemble(kit: Kit, spec, step_deg: float = SWEEP_STEP_DEG) -> tuple[Model, AssemblyReport]:
    """Build the solids and check them."""
    model = build_model(kit, spec)
    return model, check_model(model, kit, spec, step_deg)
