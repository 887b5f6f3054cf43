"""The kit as a machine, measured on its STEP file alone (shared by tests/test_step_machine.py
and tests/bench/bench_step_machine.py).

Everything here works on the solids read back from a written STEP file
(sheetgen.model3d.stepread: names and groups as the file holds them) with
OpenCascade's own measures: BRepExtrema_DistShapeShape for distances,
BRepAlgoAPI_Common for shared volume, BRepGProp for volumes, centres and
principal axes. Nothing here reads the kit's prisms, its layout or its checks.
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np

G_M_S2 = 9.80665  # standard gravity, ISO 80000-3 / CGPM 1901
OVERLAP_TOL_MM3 = 0.01  # our tolerance: more shared volume than this is two solids in one place
TOUCH_MM = 0.01  # the brief's "touches": closer than this
STEEL_KG_M3 = 7850.0  # carbon steel, common practice

# Densities this check uses, kg/m3, by the params file's material keys (sheet.material,
# axle.material); written here from handbook figures, not taken from sheetgen's own table.
DENSITY_KG_M3 = {
    "mdf": 750.0,  # EN 622-5:2009 gives MDF 650 to 800 kg/m3; mid-range, from memory
    "birch_plywood": 680.0,  # birch plywood about 680 kg/m3, manufacturers' data sheets (from memory)
    "cast_acrylic": 1190.0,  # cast PMMA 1190 kg/m3, ISO 1183 data sheets (from memory)
    "steel": STEEL_KG_M3,  # common practice
    "aluminium": 2700.0,  # common practice (pure aluminium 2700 kg/m3)
    "beech": 720.0,  # European beech at 12 % moisture about 720 kg/m3 (from memory)
}


@dataclass(frozen=True)
class Solid:
    name: str
    group: str  # "fixed" or "rotating" (the STEP's sub-assembly)
    shape: Any  # cadquery Shape, placed

    # What the checks ask of a solid again and again, measured once (a turned copy has the same
    # faces, so it shares ``planar``).
    @functools.cached_property
    def planar(self) -> bool:
        """Whether every face of the solid is flat."""
        return all(f.geomType() == "PLANE" for f in self.shape.Faces())

    @functools.cached_property
    def box(self) -> tuple[np.ndarray, np.ndarray]:
        return bbox(self.shape)

    @functools.cached_property
    def oriented(self):
        return obb(self.shape, planar=self.planar)

    @functools.cached_property
    def volume_centre(self) -> tuple[float, np.ndarray]:
        return volume_centre(self.shape)

    @functools.cached_property
    def face_boxes(self) -> tuple[list, np.ndarray, np.ndarray]:
        """(faces, their boxes' low corners, their high corners): :func:`bbox` of each face."""
        faces = self.shape.Faces()
        boxes = [bbox(f) for f in faces]
        return faces, np.array([b[0] for b in boxes]), np.array([b[1] for b in boxes])


def read(path: str | Path) -> dict[str, Solid]:
    from sheetgen.model3d.stepread import read_step_solids

    return {s.name: Solid(s.name, s.group, s.solid()) for s in read_step_solids(path)}


def write_step_of(params: str, out: Path, sets: tuple[str, ...] = ()) -> Path:
    """The kit's STEP file, written by sheetgen's own writer (the file the build puts in
    model/assembly.step): the only thing the checks read besides the params file."""
    return write_step_and_figures(params, out, sets)[0]


def write_step_and_figures(params: str, out: Path, sets: tuple[str, ...] = ()) -> tuple[Path, dict]:
    """The STEP file as :func:`write_step_of` writes it, and the kit's own figures (for the one
    internal cross-check that compares them with the file's)."""
    from sheetgen.design.kit import build_kit
    from sheetgen.design.spec import load_spec
    from sheetgen.io.step import write_step
    from sheetgen.model3d.solids import build_assembly, build_model

    spec = load_spec(params, list(sets))
    kit = build_kit(spec)
    model = build_model(kit, spec)
    return write_step(build_assembly(model, name=Path(params).stem), out), dict(kit.figures)


# -- OpenCascade measures ---------------------------------------------------


def volume_centre(shape) -> tuple[float, np.ndarray]:
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(shape.wrapped, props)
    c = props.CentreOfMass()
    return float(props.Mass()), np.array([c.X(), c.Y(), c.Z()])


def distance(a, b) -> float:
    """OpenCascade's least distance between two shapes (BRepExtrema_DistShapeShape)."""
    from OCP.BRepExtrema import BRepExtrema_DistShapeShape

    ext = BRepExtrema_DistShapeShape(a.wrapped, b.wrapped)
    assert ext.IsDone(), "OpenCascade could not measure a distance"
    return float(ext.Value())


def _boundary(shape):
    import cadquery as cq

    shells = shape.Shells()
    return cq.Compound.makeCompound(shells) if shells else shape


def solid_distance(a, b) -> float:
    """The least distance between two solids: between their boundaries (OpenCascade skips its
    slow inside-the-solid test there), 0 when one lies inside the other.

    Boundaries apart (d > 0), the solids either share no volume or one holds a whole shell of the
    other: each shell is connected and meets no face of the other solid, so it lies wholly inside
    or wholly outside it (and two solids whose shells all lie outside each other share nothing:
    point-set topology, common practice). So one vertex of each shell, classified against the
    other solid (BRepClass3d_SolidClassifier), decides."""
    d = distance(_boundary(a), _boundary(b))
    return 0.0 if d > 0.0 and _nested(a, b) else d


def touches(a: Solid, b: Solid, reach_mm: float = TOUCH_MM, quick: bool = False) -> bool:
    """Whether :func:`solid_distance` of the two is below ``reach_mm`` (r), measured only where it can be.

    Two faces closer than r lie each within r of the other solid's box (boxes are never small, see
    :func:`bbox`), so the faces of each whose boxes come within r of the other's box are all the
    boundary distance needs; when either has none, the boundaries are r or more apart and only one
    solid inside the other makes them touch. First the edges of the side with fewer such faces
    against the other's faces: a part of the boundaries, so a distance below r there is a touch,
    found without OpenCascade's slow face-on-face case (a bolt's head lying on a plate's face is a
    continuum of nearest points). With ``quick``, that first look alone: True is a touch, False
    says nothing."""
    import cadquery as cq

    if bbox_gap(a.box, b.box) >= reach_mm:
        return False
    near = []
    for s, other in ((a, b), (b, a)):
        faces, lo, hi = s.face_boxes
        olo, ohi = other.box
        gap = np.linalg.norm(np.maximum(0.0, np.maximum(olo - hi, lo - ohi)), axis=1)
        near.append([f for f, g in zip(faces, gap) if g < reach_mm])
    if near[0] and near[1]:
        few, many = sorted(near, key=len)
        edges = cq.Compound.makeCompound([e for f in few for e in f.Edges()])
        if distance(edges, cq.Compound.makeCompound(many)) < reach_mm:
            return True
        if quick:
            return False
        if distance(cq.Compound.makeCompound(near[0]), cq.Compound.makeCompound(near[1])) < reach_mm:
            return True
    return False if quick else _nested(a.shape, b.shape)


def _nested(a, b, b_classifiers=None) -> bool:
    """For two solids whose boundaries are apart: whether one lies inside the other (see
    :func:`solid_distance`). ``b_classifiers``: :func:`_classifiers` of ``b``, when the caller
    keeps them."""
    return bbox_gap(bbox(a), bbox(b)) == 0.0 and (_shell_inside(a, b, b_classifiers) or _shell_inside(b, a))


def _shell_inside(a, b, classifiers=None) -> bool:
    """Whether a vertex of some shell of ``a`` lies strictly inside a solid of ``b``
    (``classifiers``: :func:`_classifiers` of ``b``, when the caller keeps them)."""
    from OCP.TopAbs import TopAbs_IN

    points = _shell_points(a)
    for c in classifiers if classifiers is not None else _classifiers(b):
        for p in points:
            c.Perform(p, 1e-7)
            if c.State() == TopAbs_IN:
                return True
    return False


def _classifiers(shape) -> list:
    """One OpenCascade point-in-solid classifier per solid of the shape (BRepClass3d_SolidClassifier)."""
    from OCP.BRepClass3d import BRepClass3d_SolidClassifier

    return [BRepClass3d_SolidClassifier(s.wrapped) for s in shape.Solids()]


def _shell_points(shape) -> list:
    """The first vertex of each shell of the shape."""
    from OCP.BRep import BRep_Tool
    from OCP.TopAbs import TopAbs_SHELL, TopAbs_VERTEX
    from OCP.TopExp import TopExp_Explorer
    from OCP.TopoDS import TopoDS

    out = []
    shells = TopExp_Explorer(shape.wrapped, TopAbs_SHELL)
    while shells.More():
        v = TopExp_Explorer(shells.Current(), TopAbs_VERTEX)
        out.append(BRep_Tool.Pnt_s(TopoDS.Vertex_s(v.Current())))
        shells.Next()
    return out


def common_mm3(a, b) -> float:
    from OCP.BRepAlgoAPI import BRepAlgoAPI_Common
    from OCP.TopTools import TopTools_ListOfShape

    op = BRepAlgoAPI_Common()
    args, tools = TopTools_ListOfShape(), TopTools_ListOfShape()
    args.Append(a.wrapped)
    tools.Append(b.wrapped)
    op.SetArguments(args)
    op.SetTools(tools)
    op.SetFuzzyValue(1e-6)  # faces that agree only to rounding (a tilted kit) count as one
    op.Build()
    assert op.IsDone(), "OpenCascade could not intersect two solids"
    import cadquery as cq

    return float(cq.Shape.cast(op.Shape()).Volume())


def bbox(shape) -> tuple[np.ndarray, np.ndarray]:
    """An axis-aligned box round the shape (OpenCascade's plain box from its geometry, without
    triangulation: it may be a little large, never small; a prefilter only)."""
    from OCP.Bnd import Bnd_Box
    from OCP.BRepBndLib import BRepBndLib

    box = Bnd_Box()
    BRepBndLib.Add_s(shape.wrapped, box, False)
    x0, y0, z0, x1, y1, z1 = box.Get()
    return np.array([x0, y0, z0]), np.array([x1, y1, z1])


def bbox_gap(a, b) -> float:
    (alo, ahi), (blo, bhi) = a, b
    return float(np.linalg.norm(np.maximum(0.0, np.maximum(blo - ahi, alo - bhi))))


def obb(shape, grow_mm: float = 0.0, planar: bool | None = None):
    """An oriented box round the shape, grown by ``grow_mm`` along each of its axes (OpenCascade's
    Bnd_OBB over the shape's vertices), or None when a face is curved (``planar``: whether every
    face is flat, when the caller knows it: :attr:`Solid.planar`). A plane-faced solid lies
    in the convex hull of its vertices, so the box holds it; grown by r, it holds every point
    within r of it (a prefilter only: boxes apart prove the solids at least r apart)."""
    from OCP.Bnd import Bnd_OBB
    from OCP.BRepBndLib import BRepBndLib

    if planar is None:
        planar = all(f.geomType() == "PLANE" for f in shape.Faces())
    if not planar:
        return None
    box = Bnd_OBB()
    BRepBndLib.AddOBB_s(shape.wrapped, box, False, False, False)
    if grow_mm > 0.0:
        box.Enlarge(grow_mm)
    return box


def boxes_apart(a, b) -> bool:
    """Two oriented boxes (:func:`obb`) that share no point; False when either is missing."""
    return a is not None and b is not None and bool(a.IsOut(b))


@dataclass(frozen=True)
class Axis:
    point: np.ndarray
    direction: np.ndarray  # unit

    def perpendicular(self, p: np.ndarray) -> np.ndarray:
        v = np.asarray(p, dtype=float) - self.point
        return v - (v @ self.direction) * self.direction

    def distance(self, p: np.ndarray) -> float:
        return float(np.linalg.norm(self.perpendicular(p)))


def axle_axis(solids: dict[str, Solid]) -> Axis:
    """The axle's axis: the direction of the axle solid's longest principal axis (least moment
    of inertia), through the centre of the circle its vertices lie on seen along that direction.

    Not through its centre of mass: a rod with a flat (a D profile) has its centre of mass
    off its axis (0.14 mm on the demo's 6 mm rod), and a frame turned 60 deg about that line
    would move 0.14 mm off its bearings. The rod's vertices (its round and the ends of its
    flat's chord) all lie on its circle: a least-squares circle fit (Kasa's algebraic fit)
    finds the centre."""
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    shape = solids["axle"].shape
    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(shape.wrapped, props)
    pp = props.PrincipalProperties()
    moments = pp.Moments()
    axes = [pp.FirstAxisOfInertia(), pp.SecondAxisOfInertia(), pp.ThirdAxisOfInertia()]
    k = int(np.argmin(moments))
    d = np.array([axes[k].X(), axes[k].Y(), axes[k].Z()])
    d = d / np.linalg.norm(d)
    c = props.CentreOfMass()
    com = np.array([c.X(), c.Y(), c.Z()])
    # an orthonormal basis (u, v) of the cross-section
    u = np.cross(d, [1.0, 0.0, 0.0] if abs(d[0]) < 0.9 else [0.0, 1.0, 0.0])
    u /= np.linalg.norm(u)
    v = np.cross(d, u)
    pts = np.array([vx.toTuple() for vx in shape.Vertices()]) - com
    x, y = pts @ u, pts @ v
    # x^2 + y^2 = 2 a x + 2 b y + c, least squares (Kasa 1976)
    sol, *_ = np.linalg.lstsq(np.column_stack([2 * x, 2 * y, np.ones_like(x)]), x ** 2 + y ** 2, rcond=None)
    return Axis(com + sol[0] * u + sol[1] * v, d)


def turned(shape, axis: Axis, angle_deg: float):
    import cadquery as cq
    from OCP.gp import gp_Ax1, gp_Dir, gp_Pnt, gp_Trsf

    if angle_deg == 0.0:
        return shape
    trsf = gp_Trsf()
    trsf.SetRotation(gp_Ax1(gp_Pnt(*map(float, axis.point)), gp_Dir(*map(float, axis.direction))),
                     math.radians(angle_deg))
    return shape.moved(cq.Location(trsf))


# -- 1. the panel held --------------------------------------------------------


def panel_gaps(solids: dict[str, Solid]) -> tuple[tuple[float, str], tuple[float, str]]:
    """((gap, nearest solid) over the panel's upper face, the same under its lower face).

    The panel's faces are its two largest planar faces; each is shrunk 0.5 mm inside its
    edges (so the parts that only frame its edges do not count) and measured against
    every other solid."""
    import cadquery as cq

    panel = solids["panel"].shape
    faces = sorted(panel.Faces(), key=lambda f: -f.Area())[:2]
    _, c = volume_centre(panel)
    out = []
    for f in sorted(faces, key=lambda f: -float((np.array(f.Center().toTuple()) - c) @ _up(panel))):
        wire = f.outerWire().offset2D(-0.5)[0]
        probe = cq.Face.makeFromWires(wire)
        best, who = math.inf, ""
        lo_hi = bbox(probe)
        for s in solids.values():
            if s.name == "panel" or bbox_gap(lo_hi, s.box) > 1.0:
                continue
            d = distance(probe, _boundary(s.shape))
            if d < best:
                best, who = d, s.name
        out.append((best, who))
    return out[0], out[1]


def _up(panel) -> np.ndarray:
    """The panel's face normal, turned to have a positive z (its sunny side up at rest)."""
    f = max(panel.Faces(), key=lambda f: f.Area())
    n = np.array(f.normalAt().toTuple())
    return n if n[2] >= 0 else -n


# -- 2. the motor clear ---------------------------------------------------------


def motor_clearance(solids: dict[str, Solid], axis: Axis, angles_deg, exempt,
                    at_least_mm: float = 0.0) -> tuple[float, str, float]:
    """(least distance, to what, at which frame angle) from the motor solid (its body and shaft)
    to every solid not exempted by ``exempt(name)``; turning solids at each of ``angles_deg``.
    Branch and bound: candidates in the order of their bounding boxes' gap, which no distance
    can beat.

    With ``at_least_mm`` = r > 0 the answer is exact where it is below r, and (inf, "", 0)
    when nothing comes that close: a turning solid is measured in its own place against the
    motor turned back by the frame's angle (the same relative position), and only its faces
    whose oriented boxes meet the motor's grown by r are measured (:func:`obb`); a face out of
    that reach is at least r from the motor."""
    if at_least_mm > 0.0:
        return _motor_clearance_within(solids, axis, angles_deg, exempt, at_least_mm)
    motor = solids["motor"].shape
    mbox = bbox(motor)
    cands = []
    for s in solids.values():
        if s.name == "motor" or exempt(s.name):
            continue
        for a in (angles_deg if s.group == "rotating" else [0.0]):
            t = turned(s.shape, axis, float(a)) if s.group == "rotating" else s.shape
            cands.append((bbox_gap(mbox, bbox(t)), s.name, float(a), t))
    cands.sort(key=lambda c: (c[0], c[1], c[2]))
    best = (math.inf, "", 0.0)
    for gap, name, a, t in cands:
        if gap >= best[0]:
            break
        d = solid_distance(motor, t)
        if d < best[0]:
            best = (d, name, a)
    return best


def _motor_clearance_within(solids, axis: Axis, angles_deg, exempt, r_mm: float) -> tuple[float, str, float]:
    import cadquery as cq

    motor = solids["motor"].shape
    faces: dict[str, list] = {}  # name -> [(face, its oriented box)], or [] for a solid with a curved face
    inside: dict[str, list] = {}  # name -> its point-in-solid classifiers
    best = (math.inf, "", 0.0)
    for s in solids.values():
        if s.name == "motor" or exempt(s.name):
            continue
        whole = s.oriented
        for a in (angles_deg if s.group == "rotating" else [0.0]):
            m = turned(motor, axis, -float(a))  # the motor where the solid, turned by a, sees it
            reach = obb(m, r_mm, planar=solids["motor"].planar)
            if boxes_apart(reach, whole):
                continue
            if s.name not in faces:
                faces[s.name] = [(f, obb(f, planar=True)) for f in s.shape.Faces()] if whole is not None else []
            if faces[s.name]:
                near = [f for f, box in faces[s.name] if not boxes_apart(reach, box)]
                if not near:
                    continue
                d = distance(_boundary(m), cq.Compound.makeCompound(near))
            else:
                d = distance(_boundary(m), _boundary(s.shape))
            if d > 0.0 and bbox_gap(bbox(m), s.box) == 0.0:  # classifiers only where they may be asked
                if s.name not in inside:
                    inside[s.name] = _classifiers(s.shape)
                if _nested(m, s.shape, inside[s.name]):
                    d = 0.0
            if d < best[0]:
                best = (d, s.name, float(a))
    return best if best[0] <= r_mm else (math.inf, "", 0.0)


def turning_clearance(solids: dict[str, Solid], axis: Axis, angles_deg, subject) -> tuple[float, str, str, float]:
    """(least distance, turning solid, fixed solid, frame angle) from the turning solids chosen by
    ``subject(name)`` to every fixed solid, at each of ``angles_deg`` (branch and bound on boxes)."""
    fixed = [(s, s.box) for s in solids.values() if s.group == "fixed"]
    cands = []
    for r in solids.values():
        if r.group != "rotating" or not subject(r.name):
            continue
        for a in angles_deg:
            t = turned(r.shape, axis, float(a))
            tb = bbox(t)
            cands += [(bbox_gap(tb, fb), r.name, f.name, float(a), t, f.shape) for f, fb in fixed]
    cands.sort(key=lambda c: (c[0], c[1], c[2], c[3]))
    best = (math.inf, "", "", 0.0)
    for gap, rn, fn, a, t, f in cands:
        if gap >= best[0]:
            break
        d = solid_distance(t, f)
        if d < best[0]:
            best = (d, rn, fn, a)
    return best


# -- 3. the end stops -----------------------------------------------------------


def meshing_or_bearing(rot: str, fix: str) -> bool:
    """Pairs left out of the overlap search, as the kit's own pair check leaves them:
    the wheel against the pinion it meshes with (the pinion turns too), and the axle in the
    fixed supports' bores (it turns in its own place)."""
    return (rot.startswith("wheel") and fix.startswith("pinion")) or rot == "axle"


def overlaps(solids: dict[str, Solid], axis: Axis, angle_deg: float,
             skip: frozenset[str] = frozenset()) -> list[tuple[str, str, float]]:
    """(turning solid, fixed solid, shared mm3) for every pair sharing more than OVERLAP_TOL_MM3
    with the turning group turned by ``angle_deg`` about ``axis``."""
    fixed = [(s, s.box, s.oriented) for s in solids.values() if s.group == "fixed" and s.name not in skip]
    out = []
    for r in solids.values():
        if r.group != "rotating" or r.name in skip:
            continue
        t = turned(r.shape, axis, angle_deg)
        tb, to = bbox(t), obb(t, planar=r.planar)
        for f, fb, fo in fixed:
            if meshing_or_bearing(r.name, f.name) or bbox_gap(tb, fb) > 0.0 or boxes_apart(to, fo):
                continue
            v = common_mm3(t, f.shape)
            if v > OVERLAP_TOL_MM3:
                out.append((r.name, f.name, v))
    return out


def first_overlap_deg(solids, axis: Axis, inside_deg: float, past_deg: float, tol_deg: float = 0.02) -> float:
    """Bisection between an angle without overlap and one with: where the first overlap appears."""
    lo, hi = inside_deg, past_deg
    while abs(hi - lo) > tol_deg:
        mid = 0.5 * (lo + hi)
        if overlaps(solids, axis, mid):
            hi = mid
        else:
            lo = mid
    return 0.5 * (lo + hi)


# -- 4. the keyed bores -----------------------------------------------------------


def bore_walls(shape, axis: Axis, axle_radius_mm: float) -> tuple[float, float]:
    """(least, largest) distance from the axle axis to the wall of the plate's bore round it.

    The bore's wall: the faces all of whose vertices lie within the axle's radius + 2 mm of
    the axis. Least: OpenCascade's distance from a long segment on the axis to those faces;
    largest: the farthest vertex."""
    import cadquery as cq

    walls = []
    far = 0.0
    for f in shape.Faces():
        r = [axis.distance(np.array(v.toTuple())) for v in f.Vertices()]
        if r and max(r) <= axle_radius_mm + 2.0:
            walls.append(f)
            far = max(far, max(r))
    assert walls, "no bore round the axle axis"
    p0 = axis.point - 1e4 * axis.direction
    p1 = axis.point + 1e4 * axis.direction
    line = cq.Edge.makeLine(cq.Vector(*map(float, p0)), cq.Vector(*map(float, p1)))
    near = distance(line, cq.Compound.makeCompound(walls))
    return near, far


def axle_radius_mm(solids: dict[str, Solid], axis: Axis) -> float:
    return max(axis.distance(np.array(v.toTuple())) for v in solids["axle"].shape.Vertices())


# -- 5. the counterweight carried ---------------------------------------------------


def counterweight_hardware(solids: dict[str, Solid]) -> tuple[str, ...]:
    """The counterweight, its bracket and the fasteners that touch either (what the bare frame lacks)."""
    cw = [s for n, s in solids.items() if n.startswith("counterweight")]
    out = [s.name for s in cw]
    for n, s in solids.items():
        if n.startswith(("bolt#", "nut#")) and any(touches(s, c) for c in cw):
            out.append(n)
    return tuple(out)


def kit_to_file(axis: Axis) -> np.ndarray:
    """The rotation from the kit frame of the params file (x along the axle, origin on it) to the
    STEP file's frame: the least rotation taking x onto the axle's direction (identity for a level
    axle; a polar kit's file stands it at its tilt)."""
    x = np.array([1.0, 0.0, 0.0])
    d = axis.direction if axis.direction @ x >= 0 else -axis.direction
    v, c = np.cross(x, d), float(x @ d)
    k = np.array([[0.0, -v[2], v[1]], [v[2], 0.0, -v[0]], [-v[1], v[0], 0.0]])
    return np.eye(3) + k + k @ k / (1.0 + c)  # Rodrigues, for c > -1


def unbalance_Nm(solids: dict[str, Solid], axis: Axis, sheet_material: str, axle_material: str,
                 panel_mass_kg: float, leave_out: tuple[str, ...] = (),
                 point_masses: tuple[tuple[float, tuple[float, float, float]], ...] = ()) -> tuple[float, float]:
    """(static unbalance of the turning group about the axis, N*m, with the axis level and the CG
    at its worst; the CG's distance from the axis, mm). Masses: the solids' volumes times the
    densities above (parts of the sheet material; the axle of its rod material; the counterweight,
    the bolts and the nuts steel); the panel's mass as given, at its solid's centre; ``point_masses`` (kg, position in the
    params file's kit frame: the file's [[rotating_mass]] items, which have no solid)."""
    moment = np.zeros(3)
    total = 0.0
    for s in solids.values():
        if s.group != "rotating" or s.name in leave_out:
            continue
        vol, c = s.volume_centre
        if s.name == "panel":
            m = panel_mass_kg
        elif s.name == "axle":
            m = vol * 1e-9 * DENSITY_KG_M3[axle_material]
        elif (s.name.startswith("counterweight") and "bracket" not in s.name) or s.name.startswith(("bolt#", "nut#")):
            m = vol * 1e-9 * STEEL_KG_M3
        else:
            m = vol * 1e-9 * DENSITY_KG_M3[sheet_material]
        moment += m * axis.perpendicular(c)
        total += m
    rot = kit_to_file(axis)
    for m, pos in point_masses:
        moment += m * axis.perpendicular(rot @ np.asarray(pos, dtype=float))
        total += m
    r = float(np.linalg.norm(moment))  # kg*mm
    return r * 1e-3 * G_M_S2, r / total if total else 0.0
