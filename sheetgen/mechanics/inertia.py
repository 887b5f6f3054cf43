"""Moment of inertia of the turning frame about the axle (kit x axis).

Every turning part instance is a flat plate: its outline (holes included)
extruded through its thickness, of uniform density, carried into the kit
frame by its placement. With the part-local coordinates q = (1, u, v, w)
(u, v in the sheet, w through it from 0 to the thickness), a kit coordinate
is a linear form c . q, so

    I_x = rho (c_y^T M c_y + c_z^T M c_z),   M = integral of q q^T dV,

M from the outline's area moments (Green's theorem on each ring; the usual
polygon formulas, e.g. Bourke, "Calculating the area and centroid of a
polygon") and the thickness. Components: a uniform box
m (dy^2 + dz^2) / 12, a solid cylinder along x m d^2 / 8, a point 0, each
plus m times the squared distance of its centre from the axle (parallel
axis theorem). Pure; kg·m^2 out.
"""

from __future__ import annotations

import numpy as np
from shapely.geometry import Polygon
from shapely.geometry.polygon import orient

from sheetgen.mechanics.materials import sheet_material
from sheetgen.kitmodel.part import Component, Kit, Part

_MM_TO_M = 1e-3


def ring_moments(xy: np.ndarray) -> np.ndarray:
    """(A, Sx, Sy, Ixx, Iyy, Ixy) of a closed ring, signed by its orientation:
    the integrals of 1, x, y, x^2, y^2, x y over the enclosed area."""
    x0, y0 = xy[:-1, 0], xy[:-1, 1]
    x1, y1 = xy[1:, 0], xy[1:, 1]
    cr = x0 * y1 - x1 * y0
    a = cr.sum() / 2.0
    sx = ((x0 + x1) * cr).sum() / 6.0
    sy = ((y0 + y1) * cr).sum() / 6.0
    ixx = ((x0 * x0 + x0 * x1 + x1 * x1) * cr).sum() / 12.0
    iyy = ((y0 * y0 + y0 * y1 + y1 * y1) * cr).sum() / 12.0
    ixy = ((x0 * y1 + 2 * x0 * y0 + 2 * x1 * y1 + x1 * y0) * cr).sum() / 24.0
    return np.array((a, sx, sy, ixx, iyy, ixy))


def area_moments(poly: Polygon) -> np.ndarray:
    """Area moments of a polygon with holes (holes subtract)."""
    p = orient(poly, 1.0)  # exterior counter-clockwise, holes clockwise
    out = ring_moments(np.asarray(p.exterior.coords, dtype=float))
    for r in p.interiors:
        out = out + ring_moments(np.asarray(r.coords, dtype=float))
    return out


def plate_moment_matrix(poly: Polygon, thickness: float) -> np.ndarray:
    """M = integral over the plate of q q^T, q = (1, u, v, w), w in [0, t]."""
    a, su, sv, iuu, ivv, iuv = area_moments(poly)
    t = thickness
    return np.array((
        (a * t, su * t, sv * t, a * t * t / 2),
        (su * t, iuu * t, iuv * t, su * t * t / 2),
        (sv * t, iuv * t, ivv * t, sv * t * t / 2),
        (a * t * t / 2, su * t * t / 2, sv * t * t / 2, a * t ** 3 / 3),
    ))


def part_inertia_x_kgm2(part: Part, rotating_only: bool = True) -> float:
    """Sum over the part's (turning) instances of its inertia about kit x."""
    rho = sheet_material(part.material).density_kg_m3
    M = plate_moment_matrix(part.outline, part.thickness_mm)  # mm^5 etc.
    total = 0.0
    for pl in part.placements:
        if rotating_only and not pl.rotating:
            continue
        R = pl.matrix
        t = np.asarray(pl.translation_mm, dtype=float)
        for row in (1, 2):
            c = np.array((t[row], R[row, 0], R[row, 1], R[row, 2]))
            total += float(c @ M @ c)
    return rho * total * _MM_TO_M ** 5


def component_inertia_x_kgm2(comp: Component) -> float:
    """A box, a cylinder along x or a point about kit x (parallel axis theorem)."""
    m = float(comp.mass_kg)
    _, cy, cz = (v * _MM_TO_M for v in comp.centre_mm)
    own = 0.0
    if comp.shape == "box":
        _, dy, dz = (v * _MM_TO_M for v in comp.size_mm)
        own = m * (dy * dy + dz * dz) / 12.0
    elif comp.shape == "cylinder_x":
        d = comp.size_mm[1] * _MM_TO_M
        own = m * d * d / 8.0
    return own + m * (cy * cy + cz * cz)


def frame_inertia_kgm2(kit: Kit) -> float:
    """Moment of inertia of everything that turns with the frame, about the axle."""
    total = sum(part_inertia_x_kgm2(p) for p in kit.parts if p.rotating)
    total += sum(component_inertia_x_kgm2(c) for c in kit.components if c.rotating)
    return total
