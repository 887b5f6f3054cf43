"""Pure model of the kit in 3D: prisms with placements, bodies, and the exact
formulas for prisms on parallel axes (no cadquery; see the package notes)."""

from __future__ import annotations

import math

import numpy as np
from shapely import affinity
from shapely.geometry import Point, Polygon

from sheetgen.errors import GeometryBug, ParameterError
from sheetgen.geometry.shapes import one_polygon
from sheetgen.kitmodel.part import Kit
# the component solids follow one rule with the assembly guide; MOTOR is read by pairs and checks from here
from sheetgen.design.prisms import MOTOR, component_prisms, mesh_pairs as _mesh_pairs, snap as _snap
from sheetgen.geometry.placement import Placement
from sheetgen.geometry.prism import AXIS_TOL as _AXIS_TOL, Prism, spun
from sheetgen.model3d.body import Body


CONTACT_TOL_MM = 1e-3  # closer than this counts as touching
SHARED_VOLUME_TOL_MM3 = 1e-3  # more shared volume than this is an interference
MASS_TOL = 0.005  # solids vs the balance check: mass and CG within 0.5 %
SWEEP_STEP_DEG = 1.0
MAX_SWEEP_STEP_DEG = 2.0
ROUND_TOL_MM = 1e-4  # ring vertices this close to one circle about the axle: the part turns in place
CLOSEST_PAIRS = 5  # clearance pairs listed in the report



# ---------------------------------------------------------------------------
# pure model


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


def mesh_turns_deg(kit: Kit, spec) -> dict[str, float]:
    """The pinion's turn about its own axis for each meshing pair in the kit."""
    out = {}
    for wheel, pinion in _mesh_pairs(kit):
        out[pinion] = mesh_turn_deg(spec.drive.wheel_teeth, spec.drive.pinion_teeth,
                                    kit.part(wheel).placements[0], kit.part(pinion).placements[0])
    return out


def _part_pieces(part, at: Placement) -> tuple[Prism, ...]:
    """The part's plate; its spring fingers (``part.sprung``) as pieces of their
    own, moved their drop along the part's -z onto what they bear on (each
    still shares a face with the plate at its root, so the body stays one solid)."""
    if not part.sprung:
        return (Prism(part.outline, part.thickness_mm, at),)
    plate = part.outline
    for s in part.sprung:
        plate = plate.difference(s.region)
    pieces = [Prism(_snap(one_polygon(plate, f"{part.name} plate")), part.thickness_mm, at)]
    m = np.asarray(at.matrix, dtype=float)
    for s in part.sprung:
        moved = np.asarray(at.translation_mm, dtype=float) - s.drop_mm * m[:, 2]
        pieces.append(Prism(_snap(s.region), part.thickness_mm,
                            Placement(at.rotation, (float(moved[0]), float(moved[1]), float(moved[2])), at.rotating)))
    return tuple(pieces)


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
                            _part_pieces(part, at), part.material))
    for comp in kit.components:
        pieces = component_prisms(comp, kit, spec.motor.shaft_length_mm, turns)
        if pieces:
            out.append(Body(comp.name, comp.name, "component", comp.rotating, pieces, "", float(comp.mass_kg)))
    from sheetgen.model3d.fasteners import fastener_bodies

    out += fastener_bodies(kit)  # the bolts and nuts that matter for clearance (model3d/fasteners.py)
    names = [b.name for b in out]
    if len(set(names)) != len(names):
        raise GeometryBug("two solids of the model share a name")
    return tuple(out)


def turns_in_place(body: Body) -> bool:
    """A rotating body that is round about the axle (rod, collar, washers): the
    frame's rotation only turns it in its own place. A keyed rod counts too: its
    D length keeps the rod's circle over more than half its round (the flat lies
    inside it), so its least distance to what stands round it is the round
    length's, at every angle."""
    if not body.rotating:
        return False
    round_r: list[float] = []
    keyed: list[float] = []
    for p in body.pieces:
        if not p.axial:
            return False
        shape = p.yz_projection()
        for k, ring in enumerate([shape.exterior, *shape.interiors]):
            r = np.hypot(*np.asarray(ring.coords, dtype=float).T)
            if r.max() - r.min() <= ROUND_TOL_MM:
                round_r.append(float(r.max()))
            elif k > 0:
                continue  # a bore's shape (a keyed D-bore): only the rod inside meets it, and turns with it
            elif body.kind == "component" and Polygon(ring).contains(Point(0.0, 0.0)) and r.min() > 0.5 * r.max():
                keyed.append(float(r.max()))  # a keyed rod's D profile, about the axle
            else:
                return False
    # a rod keyed its whole length is one D piece: its flat lies inside its circle, and the
    # circle's arc (more than half the round) is what meets the round bearing holes
    return len(body.pieces) == 1 or all(any(abs(k - rr) <= ROUND_TOL_MM for rr in round_r) for k in keyed)


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

def _x_overlap(a: Body, b: Body) -> float:
    (a0, a1), (b0, b1) = a.x_range_mm(), b.x_range_mm()
    return min(a1, b1) - max(a0, b0)

