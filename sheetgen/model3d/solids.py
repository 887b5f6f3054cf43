"""cadquery solids of the bodies, the assembly, and OpenCascade measures.

cadquery is imported inside the functions, so importing this module costs nothing."""

from __future__ import annotations

import math
import time
from dataclasses import dataclass
from typing import Any

import numpy as np
from shapely.geometry import Polygon

from sheetgen.errors import GeometryBug
from sheetgen.kitmodel.part import Kit
from sheetgen.geometry.placement import Placement
from sheetgen.model3d.bodies import Body, Prism, model_bodies



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


CAP_EDGES = 300  # a face bounded by more edges than this is written in sectors (see step_solid)


def _sectors(outline: Polygon, count: int) -> list[Polygon]:
    """The outline cut into ``count`` sectors about the centre of its bounds
    (the axis of a gear): the areal parts, in sector order."""
    x0, y0, x1, y1 = outline.bounds
    cx, cy, r = (x0 + x1) / 2, (y0 + y1) / 2, 2.0 * math.hypot(x1 - x0, y1 - y0) + 1.0
    out = []
    for k in range(count):
        a = [2 * math.pi * (k + f / 4) / count for f in range(5)]
        wedge = Polygon([(cx, cy)] + [(cx + r * math.cos(t), cy + r * math.sin(t)) for t in a])
        cut = outline.intersection(wedge)
        out += [g for g in getattr(cut, "geoms", [cut]) if isinstance(g, Polygon) and g.area > 0.0]
    return out


def step_solid(body: Body, solid):
    """The solid as the STEP file carries it: a plate whose outline has more
    than :data:`CAP_EDGES` vertices on a ring (a gear) gets its two flat faces
    cut into sectors, the same solid in shape and volume.

    A STEP reader joins the edges of each face one against another, so a gear
    face of 2,400 edges takes it about half a minute and one of 120 a
    fraction of a second; CAD programs open the file that much faster. The
    model's own solids (the checks) stay whole."""
    if len(body.pieces) != 1:
        return solid
    piece = body.pieces[0]
    rings = [piece.outline.exterior, *piece.outline.interiors]
    most = max(len(r.coords) - 1 for r in rings)
    if most <= CAP_EDGES:
        return solid
    parts = [prism_solid(Prism(g, piece.depth_mm, piece.placement)) for g in _sectors(piece.outline,
                                                                                        -(-most // 120))]
    fused = parts[0].fuse(*parts[1:], glue=True)
    pieces = fused.Solids()
    if len(pieces) != 1 or abs(pieces[0].Volume() - solid.Volume()) > 1e-6 * solid.Volume():
        raise GeometryBug(f"{body.name}: its sectors do not join into the one solid")
    return pieces[0]


GROUND_PLATE = "ground-plate"  # the part a polar kit's wedge stands on (sheetgen/design/parts/wedge.py)


def ground_tilt_deg(model: Model) -> float:
    """The angle by which the kit frame is turned about y against the ground: 0 unless
    the model has a ground plate (a polar kit's wedge), whose face normal is then up."""
    for b in model.bodies:
        if b.source == GROUND_PLATE:
            n = b.pieces[0].placement.matrix[:, 2]
            return math.degrees(math.atan2(float(n[0]), float(n[2])))
    return 0.0


def _ground_location(tilt_deg: float):
    import cadquery as cq
    from OCP.gp import gp_Ax1, gp_Dir, gp_Pnt, gp_Trsf

    trsf = gp_Trsf()
    trsf.SetRotation(gp_Ax1(gp_Pnt(0, 0, 0), gp_Dir(0, 1, 0)), -math.radians(tilt_deg))
    return cq.Location(trsf)


def build_assembly(model: Model, name: str = "kit"):
    """A cadquery Assembly: ``fixed`` and ``rotating`` groups, one named child per solid.
    A polar kit is stood on its ground plate (the kit turned about y so the plate lies
    level), so the file shows the axle at its tilt."""
    import cadquery as cq

    tilt = ground_tilt_deg(model)
    top = cq.Assembly(name=name) if tilt == 0 else cq.Assembly(name=name, loc=_ground_location(tilt))
    groups = {g: cq.Assembly(name=g) for g in ("fixed", "rotating")}
    for b in model.bodies:
        groups["rotating" if b.rotating else "fixed"].add(step_solid(b, model.solids[b.name]), name=b.name)
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


OCC_FUZZY_MM = 1e-6  # booleans treat faces this close as one: a polar kit's tilted plates meet in faces
# that agree only to rounding, and a plain boolean then drops pieces of the common volume


def _occ_common_mm3(solid_a, solid_b) -> float:
    return float(solid_a.intersect(solid_b, tol=OCC_FUZZY_MM).Volume())


def _volume_and_centre(solid) -> tuple[float, np.ndarray]:
    from OCP.BRepGProp import BRepGProp
    from OCP.GProp import GProp_GProps

    props = GProp_GProps()
    BRepGProp.VolumeProperties_s(solid.wrapped, props)
    c = props.CentreOfMass()
    return float(props.Mass()), np.array([c.X(), c.Y(), c.Z()])

