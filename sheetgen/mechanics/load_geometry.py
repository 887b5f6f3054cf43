"""The geometry the loads need, read from an assembled kit: the plate the wind
sees and the ground the fixed parts stand on. Pure: no printing, no files.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from shapely.geometry import MultiPolygon, Polygon, box
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from sheetgen.errors import GeometryBug
from sheetgen.mechanics import loads
from sheetgen.kitmodel.part import Kit


@dataclass(frozen=True)
class WindPlate:
    area_m2: float
    chord_mm: float  # size across the axle
    centroid_y_mm: float  # offset of the plate's centroid across the axle (rotation 0)
    centroid_z_mm: float
    eccentricity_mm: float
    force_N: float
    torque_Nm: float


# ---------------------------------------------------------------------------
# geometry the loads need


def wind_plate_footprint(kit: Kit) -> Polygon | MultiPolygon:
    """What the wind sees square-on at rotation 0: the union of the x-y
    footprints of the rotating parts lying flat (sheet square to z) and of the
    rotating box components (the panel), holes filled (the panel covers its
    window). Parts standing on edge (ribs, wheel) are left out: they face the
    wind edge-on when the plate faces it."""
    shapes = []
    for part in kit.parts:
        ext = np.asarray(part.outline.exterior.coords, dtype=float)[:, :2]
        local = np.column_stack([ext, np.zeros(len(ext))])
        for pl in part.placements:
            if not pl.rotating:
                continue
            if abs(abs(pl.matrix[2, 2]) - 1.0) > 1e-9:
                continue
            pts = pl.apply(local)
            shapes.append(Polygon(pts[:, :2]))
    for comp in kit.components:
        if comp.rotating and comp.shape == "box":
            cx, cy, _ = comp.centre_mm
            dx, dy, _ = comp.size_mm
            shapes.append(box(cx - dx / 2, cy - dy / 2, cx + dx / 2, cy + dy / 2))
    if not shapes:
        return Polygon()
    u = _polygons(unary_union(shapes))
    polys = [u] if isinstance(u, Polygon) else list(u.geoms)
    return _polygons(unary_union([Polygon(p.exterior) for p in polys]))


def _polygons(g: BaseGeometry) -> Polygon | MultiPolygon:
    """A union of areas as what it is (one polygon or several); an empty union as an empty polygon."""
    if isinstance(g, (Polygon, MultiPolygon)):
        return g
    if g.is_empty:
        return Polygon()
    raise GeometryBug(f"the wind plate footprint is a {g.geom_type}, not an area")


def wind_plate(kit: Kit, spec) -> WindPlate:
    fp = wind_plate_footprint(kit)
    if fp.is_empty:
        return WindPlate(0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0)
    area_m2 = fp.area * 1e-6
    _, y0, _, y1 = fp.bounds
    chord = y1 - y0
    cy = fp.centroid.y
    # height of the plate: area-weighted z of the flat rotating items at rotation 0
    zs, ws = [], []
    for comp in kit.components:
        if comp.rotating and comp.shape == "box":
            zs.append(comp.centre_mm[2])
            ws.append(comp.size_mm[0] * comp.size_mm[1])
    cz = float(np.average(zs, weights=ws)) if zs else 0.0
    ecc = loads.wind_eccentricity_mm(cy, chord)
    force = loads.drag_force_N(spec.site.wind_speed_m_s, area_m2)
    return WindPlate(area_m2, chord, cy, cz, ecc, force, force * ecc * 1e-3)


def kit_tilt_deg(kit: Kit) -> float:
    """The axle's angle to the ground the kit stands on (0 unless a wedge tilts it)."""
    return float(dict(kit.figures).get("axle_tilt_deg", 0.0))


def to_ground_frame(points_mm: np.ndarray, tilt_deg: float) -> np.ndarray:
    """Kit-frame points in the ground frame: the kit turned about y by -tilt_deg, so that a
    polar kit's ground plate lies level (z up) and the axle rises at tilt_deg toward +x.
    y is unchanged (the wind across the axle blows along it)."""
    a = np.radians(tilt_deg)
    c, s = np.cos(a), np.sin(a)
    r = np.array([[c, 0.0, -s], [0.0, 1.0, 0.0], [s, 0.0, c]])
    return np.asarray(points_mm, dtype=float) @ r.T


def ground_and_footprint(kit: Kit) -> tuple[float, float, float]:
    """Lowest z of the fixed parts in the ground frame (the ground: the base, or
    the ground plate under a polar kit's wedge), and the y extent of the fixed
    material touching it (its edges across the axle)."""
    g = ground_contact(kit)
    return g.ground_z_mm, g.y_lo_mm, g.y_hi_mm


@dataclass(frozen=True)
class GroundContact:
    """Where the kit stands, in the ground frame (see :func:`to_ground_frame`)."""

    ground_z_mm: float  # the ground's height (the axle's middle at 0)
    x_lo_mm: float  # extent of the fixed material on the ground, along the ground's x ...
    x_hi_mm: float
    y_lo_mm: float  # ... and across the axle
    y_hi_mm: float
    tilt_deg: float


def ground_contact(kit: Kit) -> GroundContact:
    """The fixed parts' lowest face in the ground frame and its extent."""
    tilt = kit_tilt_deg(kit)
    pts = []
    for part in kit.parts:
        ext = np.asarray(part.outline.exterior.coords, dtype=float)[:, :2]
        for pl in part.placements:
            if pl.rotating:
                continue
            for z in (0.0, part.thickness_mm):
                pts.append(pl.apply(np.column_stack([ext, np.full(len(ext), z)])))
    if not pts:
        return GroundContact(0.0, 0.0, 0.0, 0.0, 0.0, tilt)
    allp = to_ground_frame(np.vstack(pts), tilt)
    ground = float(allp[:, 2].min())
    low = allp[np.abs(allp[:, 2] - ground) < 1e-6]
    return GroundContact(ground, float(low[:, 0].min()), float(low[:, 0].max()),
                         float(low[:, 1].min()), float(low[:, 1].max()), tilt)
