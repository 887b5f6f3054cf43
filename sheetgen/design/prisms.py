"""A kit's solid components as prisms (sheetgen.geometry.prism): the one rule the
assembly guide and the 3D model share for the axle rod, the boxes (motor, panel) and the
motor's output shaft. Pure: a Component and its Kit in, prisms in the kit frame out."""

from __future__ import annotations

from collections.abc import Mapping

import shapely
from shapely.geometry import Point, Polygon

from sheetgen.kitmodel.part import Component, Kit
from sheetgen.errors import GeometryBug
from sheetgen.geometry.placement import Placement, place
from sheetgen.geometry.prism import AXIS_TOL, Prism, spun
from sheetgen.geometry.shapes import GRID_MM, d_shape, disc, rect

MOTOR = "motor"  # the kit component that carries the pinion on its shaft
Y, Z = (0.0, 1.0, 0.0), (0.0, 0.0, 1.0)


def snap(poly: Polygon) -> Polygon:
    """The polygon on the grid the part outlines are cleaned to."""
    return shapely.set_precision(poly, GRID_MM)


def component_prisms(comp: Component, kit: Kit, shaft_length_mm: float | None = None,
                     turns: Mapping[str, float] | None = None) -> tuple[Prism, ...]:
    """The prisms of one solid component at rotation 0 (a point mass has none).

    A box is one prism; the motor adds its output shaft. A ``cylinder_x`` rod is the
    polygon its bores are cut from (chords within 0.01 mm of the circle, on the outlines'
    grid), so a press bore meets it face to face; a keyed rod is its D profile, over its
    whole length (the first prism, whose centre weighs the component), and the round rod
    up to the flat's start.

    The shaft: with ``shaft_length_mm`` (the spec's, for the 3D model) the pinion's
    nominal bore turned as the pinion is (``turns``, part name -> deg about its own axis),
    that long from the motor's face along -x; without it (the guide, which sees the kit
    only) the bore of each fixed plate facing +x on the motor's axis, from that plate to
    the motor's face."""
    cx, cy, cz = comp.centre_mm
    if comp.shape == "point":
        return ()
    if comp.shape == "box":
        dx, dy, dz = comp.size_mm
        ident = ((1.0, 0.0, 0.0), (0.0, 1.0, 0.0), (0.0, 0.0, 1.0))
        body = Prism(rect(-dx / 2, -dy / 2, dx / 2, dy / 2), dz, Placement(ident, (cx, cy, cz - dz / 2), comp.rotating))
        if shaft_length_mm is None:
            return (body, *_shafts_to_face(comp, kit))
        if comp.name == MOTOR:
            return (body, *_motor_shaft(comp, kit, shaft_length_mm, turns or {}))
        return (body,)
    if comp.shape == "cylinder_x":
        length, diameter, _ = comp.size_mm
        rod = snap(disc(0.0, 0.0, diameter / 2))
        x0, x1 = cx - length / 2, cx + length / 2
        if comp.flat_mm > 0 and comp.flat_from_x_mm <= x0 + 1e-9:  # keyed its whole length
            return (Prism(snap(d_shape(0.0, 0.0, diameter, comp.flat_mm)), length,
                          place(Y, Z, (x0, cy, cz), comp.rotating)),)
        if comp.flat_mm > 0 and x0 < comp.flat_from_x_mm < x1:
            d_rod = snap(d_shape(0.0, 0.0, diameter, comp.flat_mm))
            xf = comp.flat_from_x_mm
            return (Prism(d_rod, length, place(Y, Z, (x0, cy, cz), comp.rotating)),
                    Prism(rod, xf - x0, place(Y, Z, (x0, cy, cz), comp.rotating)))
        return (Prism(rod, length, place(Y, Z, (x0, cy, cz), comp.rotating)),)
    raise GeometryBug(f"component {comp.name}: unknown shape {comp.shape!r}")


def mesh_pairs(kit: Kit) -> list[tuple[str, str]]:
    """The (wheel, pinion) pairs of the kit that mesh."""
    from sheetgen.kitmodel.contacts import MESHING

    names = {p.name for p in kit.parts}
    return sorted((w, p) for w, p in MESHING if w in names and p in names)


def centre_bore(outline: Polygon) -> Polygon:
    """The hole of a gear outline that holds its centre (local origin)."""
    centre = Point(0.0, 0.0)
    for ring in outline.interiors:
        hole = Polygon(ring)
        if hole.contains(centre):
            return hole
    raise GeometryBug("the pinion outline has no bore around its centre")


def _motor_shaft(comp: Component, kit: Kit, length: float, turns: Mapping[str, float]) -> list[Prism]:
    """The motor's output shaft: the pinion's nominal bore, from the motor's
    mounting face ``length`` along -x, turned with the pinion."""
    pinions = [p for _, p in mesh_pairs(kit)]
    if not pinions:
        return []
    pinion = kit.part(pinions[0])
    at = spun(pinion.placements[0], turns.get(pinion.name, 0.0))
    if abs(float(at.matrix[0, 2]) - 1.0) > AXIS_TOL:
        raise GeometryBug("the pinion does not face +x, the motor shaft's direction")
    _, py, pz = at.translation_mm
    _, cy, cz = comp.centre_mm
    if abs(py - cy) > 1e-6 or abs(pz - cz) > 1e-6:
        raise GeometryBug(f"the pinion axis ({py:.3f}, {pz:.3f}) is off the motor's ({cy:.3f}, {cz:.3f})")
    face_x = comp.centre_mm[0] - comp.size_mm[0] / 2
    return [Prism(centre_bore(pinion.outline), length, Placement(at.rotation, (face_x - length, py, pz), False))]


def _shafts_to_face(comp: Component, kit: Kit) -> tuple[Prism, ...]:
    """A box's output shaft as far as the kit shows it: the bore of each fixed plate facing
    +x on the box's own axis (a pinion on a motor), from that plate to the box's face."""
    cx, cy, cz = comp.centre_mm
    face_x = cx - comp.size_mm[0] / 2
    out = []
    for part in kit.parts:
        for pl in part.placements:
            m = pl.matrix
            x, y, z = pl.translation_mm
            if (pl.rotating or abs(m[0, 2] - 1.0) > 1e-9 or abs(y - cy) > 1e-6 or abs(z - cz) > 1e-6
                    or x >= face_x):
                continue
            bore = next((Polygon(r) for r in part.outline.interiors if Polygon(r).contains(Point(0.0, 0.0))), None)
            if bore is not None:
                out.append(Prism(bore, face_x - x, Placement(pl.rotation, (x, y, z))))
    return tuple(out)


__all__ = ["MOTOR", "Prism", "centre_bore", "component_prisms", "mesh_pairs", "snap"]
