"""Small polygon builders shared by the part factories (pure, shapely only)."""

from __future__ import annotations

import math

from shapely import set_precision
from shapely.geometry import MultiPolygon, Polygon, box
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from sheetgen.errors import GeometryBug

# Curves are drawn so that no chord strays more than this from the true arc.
CHORD_TOL_MM = 0.01
GRID_MM = 1e-6


def segments_for_arc(radius_mm: float, sweep_rad: float = 2 * math.pi, tol_mm: float = CHORD_TOL_MM) -> int:
    """Fewest chords that keep the sagitta of a ``radius_mm`` arc within ``tol_mm``."""
    if radius_mm <= tol_mm:
        return 4
    step = 2 * math.acos(1 - tol_mm / radius_mm)
    return max(4, math.ceil(sweep_rad / step))


def one_polygon(geom: BaseGeometry, what: str) -> Polygon:
    """``geom`` as a Polygon, for operations whose result is a polygon by
    construction (a convex hull of an area, a disc cut by a box) but that
    shapely types as any geometry; anything else is a bug in the caller."""
    if not isinstance(geom, Polygon):
        raise GeometryBug(f"{what}: expected one polygon, got {geom.geom_type}")
    return geom


def disc(cx: float, cy: float, r: float, tol_mm: float = CHORD_TOL_MM) -> Polygon:
    """A circle as a polygon whose vertices lie on the circle."""
    n = segments_for_arc(r, tol_mm=tol_mm)
    pts = [(cx + r * math.cos(2 * math.pi * i / n), cy + r * math.sin(2 * math.pi * i / n)) for i in range(n)]
    return Polygon(pts)


def rect(x0: float, y0: float, x1: float, y1: float) -> Polygon:
    return box(min(x0, x1), min(y0, y1), max(x0, x1), max(y0, y1))


def hull(*geoms) -> Polygon:
    return one_polygon(unary_union(list(geoms)).convex_hull, "convex hull")


def clean(geom, what: str) -> Polygon:
    """Snap to a fine grid and insist on exactly one valid polygon."""
    geom = set_precision(geom, GRID_MM)
    if isinstance(geom, MultiPolygon):
        raise GeometryBug(f"{what}: outline falls apart into {len(geom.geoms)} pieces")
    if not isinstance(geom, Polygon) or geom.is_empty or not geom.is_valid:
        raise GeometryBug(f"{what}: outline is not one valid polygon")
    return geom


def turn_point(x: float, y: float, angle_deg: float, dx_mm: float = 0.0, dy_mm: float = 0.0) -> tuple[float, float]:
    """(x, y) turned counter-clockwise by ``angle_deg`` about (0, 0), then moved (the nester's convention)."""
    a = math.radians(angle_deg)
    c, s = math.cos(a), math.sin(a)
    return (c * x - s * y + dx_mm, s * x + c * y + dy_mm)


def d_shape(cx: float, cy: float, diameter_mm: float, across_flat_mm: float) -> Polygon:
    """A round hole with one flat (D profile) for a motor shaft; the flat is on +y."""
    r = diameter_mm / 2
    flat_y = cy + across_flat_mm - r
    return one_polygon(disc(cx, cy, r).intersection(rect(cx - r - 1, cy - r - 1, cx + r + 1, flat_y)),
                       "D-shaped hole")
