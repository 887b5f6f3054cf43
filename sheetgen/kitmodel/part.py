"""The part model: what a kit is made of.

A :class:`Part` is a flat piece cut from sheet. Its outline lives in the part's
own plane (x, y in mm); the part occupies local z from 0 to its thickness. Each
of its :class:`Placement` s is a rigid transform from that local frame into the
kit frame (origin on the axle axis, x along the axle, z up when the panel faces
the zenith). Placements are stored once, here, and every consumer (balance
check, 3D model, clearance sweep) reads them from the part.

A :class:`Component` is anything in the kit that is not cut from the sheet:
the panel, the axle rod, the motor, hardware and counterweights. Components are
simple solids (box, cylinder along x, point) so that mass properties are exact.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

import numpy as np
from shapely.geometry import Polygon

from sheetgen.geometry.contour import Circle
from sheetgen.geometry.placement import Placement, rotation_x, vec_tuple

if TYPE_CHECKING:
    from sheetgen.drive.gears import GearPair

# Layer names used for marks; the cut layer is always "CUT".
LAYER_CUT = "CUT"
LAYER_LABEL = "LABEL"
LAYER_GUIDE = "GUIDE"


@dataclass(frozen=True)
class Mark:
    """A marking on a part (engraved or scored, never cut through).

    kind "text": ``points`` holds one (x, y) anchor (centre of the text);
    kind "line": ``points`` is an open polyline.
    """

    layer: str
    kind: str
    points: tuple[tuple[float, float], ...]
    text: str = ""
    height_mm: float = 3.0
    angle_deg: float = 0.0  # text direction, counter-clockwise from +x

    def moved(self, angle_deg: float, dx_mm: float, dy_mm: float) -> "Mark":
        """This mark turned counter-clockwise by ``angle_deg`` about (0, 0), then moved."""
        from sheetgen.geometry.shapes import turn_point

        pts = []
        for x, y in self.points:
            tx, ty = turn_point(x, y, angle_deg, dx_mm, dy_mm)
            pts.append((round(tx, 6) + 0.0, round(ty, 6) + 0.0))
        return Mark(self.layer, self.kind, tuple(pts), self.text, self.height_mm, (self.angle_deg + angle_deg) % 360.0)


@dataclass(frozen=True)
class Sprung:
    """A region of a part's outline (in the part's own plane) that the assembled
    kit presses ``drop_mm`` along the part's local -z: a spring finger bearing on
    what lies under it. The flat part is cut with the region in plane; the 3D
    model and the mass properties place it where it bears."""

    region: Polygon
    drop_mm: float


@dataclass(frozen=True)
class Joint:
    """One tab-and-slot joint instance, recorded for fit checks and reports.

    ``tab_part``/``slot_part`` name the parts; widths are nominal (along the
    edge) and the slot's across-thickness width; ``fit`` is the fit class.
    """

    tab_part: str
    slot_part: str
    tab_count: int
    tab_width_mm: float
    slot_length_mm: float
    slot_width_mm: float
    sheet_thickness_mm: float
    fit: str


@dataclass(frozen=True)
class Part:
    """A flat part cut from sheet.

    outline:      nominal outline (what the part measures after cutting,
                  joints exactly matched: tab width == slot length, slot width ==
                  sheet thickness), a valid shapely Polygon with holes.
    fit_outline:  the nominal outline with the joint fit allowances applied to
                  its slots (press fits make slots narrower). Kerf compensation
                  is applied to this one. Same as ``outline`` when no slot.
    placements:   one per instance in the kit (len == qty).
    rotations_deg: rotations the nester may use (grain rule).
    """

    name: str
    outline: Polygon
    thickness_mm: float
    material: str
    qty: int
    placements: tuple[Placement, ...]
    rotations_deg: tuple[float, ...] = (0.0, 90.0, 180.0, 270.0)
    marks: tuple[Mark, ...] = ()
    circles: tuple[Circle, ...] = ()  # round holes of the fit outline (what is cut, before kerf)
    fit_outline: Polygon | None = None
    description: str = ""
    sprung: tuple[Sprung, ...] = ()  # spring fingers, pressed down in the assembled kit

    def __post_init__(self):
        if self.qty < 1:
            raise ValueError(f"part {self.name}: qty must be >= 1")
        if len(self.placements) != self.qty:
            raise ValueError(f"part {self.name}: {len(self.placements)} placements for qty {self.qty}")
        if self.fit_outline is None:
            object.__setattr__(self, "fit_outline", self.outline)

    @property
    def outline_to_cut(self) -> Polygon:
        """The outline kerf compensation applies to: ``fit_outline``, which
        defaults to ``outline`` (the field is typed optional only for that default)."""
        return self.outline if self.fit_outline is None else self.fit_outline

    @property
    def area_mm2(self) -> float:
        return float(self.outline.area)

    @property
    def volume_mm3(self) -> float:
        return self.area_mm2 * self.thickness_mm

    @property
    def bbox_mm(self) -> tuple[float, float]:
        x0, y0, x1, y1 = self.outline.bounds
        return (x1 - x0, y1 - y0)

    @property
    def rotating(self) -> bool:
        return any(p.rotating for p in self.placements)

    def local_centroid_mm(self) -> np.ndarray:
        """Centre of gravity in the part's frame as assembled: spring fingers
        (``sprung``) sit their drop lower than the rest of the plate."""
        c = self.outline.centroid
        z = self.thickness_mm / 2.0
        if self.sprung:
            z -= sum(s.region.area * s.drop_mm for s in self.sprung) / self.outline.area
        return np.array([c.x, c.y, z])


@dataclass(frozen=True)
class Component:
    """A kit item not cut from the sheet (panel, axle, motor, hardware).

    shape "box": ``size_mm`` = (dx, dy, dz) in the kit frame at rotation 0,
    centred on ``centre_mm``; "cylinder_x": ``size_mm`` = (length, diameter,
    diameter), axis along kit x through ``centre_mm``; "point": a point mass.
    """

    name: str
    mass_kg: float
    shape: str
    centre_mm: tuple[float, float, float]
    size_mm: tuple[float, float, float] = (0.0, 0.0, 0.0)
    rotating: bool = False
    # a "cylinder_x" rod with a flat (D profile): the size across the flat, 0 for a round rod,
    # and the x from which the flat runs to the rod's +x end
    flat_mm: float = 0.0
    flat_from_x_mm: float = 0.0

    def cg_mm(self) -> tuple[float, float, float]:
        """Centre of gravity at rotation 0: the shape's centre, except a rod with a
        flat, whose D length is lighter on the flat's side (local +y of the rod's
        section = kit +z): the area-weighted centroid of its round and D lengths."""
        if self.shape != "cylinder_x" or self.flat_mm <= 0:
            return self.centre_mm
        from sheetgen.geometry.shapes import d_shape, disc

        cx, cy, cz = self.centre_mm
        length, dia, _ = self.size_mm
        x0, x1 = cx - length / 2, cx + length / 2
        xf = min(max(self.flat_from_x_mm, x0), x1)
        a_r = disc(0.0, 0.0, dia / 2).area
        dd = d_shape(0.0, 0.0, dia, self.flat_mm)
        a_d, z_d = dd.area, dd.centroid.y
        v_r, v_d = a_r * (xf - x0), a_d * (x1 - xf)
        x = (v_r * (x0 + xf) / 2 + v_d * (xf + x1) / 2) / (v_r + v_d)
        return (x, cy, cz + v_d * z_d / (v_r + v_d))

    def turned(self, angle_deg: float) -> "Component":
        if not self.rotating:
            return self
        c = rotation_x(angle_deg) @ np.asarray(self.centre_mm, dtype=float)
        return dataclasses.replace(self, centre_mm=vec_tuple(c))


@dataclass(frozen=True)
class Kit:
    """Everything one kit holds, in the kit frame at rotation angle 0."""

    parts: tuple[Part, ...]
    components: tuple[Component, ...]
    joints: tuple[Joint, ...] = ()
    # Named figures the factories decided (axle height, sweep radius, ...), mm.
    figures: tuple[tuple[str, float], ...] = field(default=())
    # The drive gear pair the wheel and pinion were cut from (None when a Kit is made without one).
    drive: GearPair | None = None

    def part(self, name: str) -> Part:
        for p in self.parts:
            if p.name == name:
                return p
        raise KeyError(name)

    def figure(self, name: str) -> float:
        return dict(self.figures)[name]
