"""Kerf compensation: nominal outlines to the paths the beam should follow.

The beam removes a band ``kerf`` wide centred on its path. For the part to
measure its nominal size, the path runs kerf/2 outside the material: outer
contours grow by kerf/2, holes and slots shrink by kerf/2. Sharp corners stay
sharp (mitre joins), so what the beam leaves is the nominal part with its
corners intact; arcs stay round (an offset arc is an arc of the same centre).
"""

from __future__ import annotations

from shapely import set_precision
from shapely.geometry import MultiPolygon, Polygon

from sheetgen.errors import GeometryBug, ParameterError

# A mitre join reaches 1/sin(theta/2) times the offset out from a corner of
# interior angle theta. 20 keeps every corner down to about 6 degrees sharp.
MITRE_LIMIT = 20.0
GRID_MM = 1e-6


def _single(geom, what: str) -> Polygon:
    if isinstance(geom, Polygon):
        return geom
    if isinstance(geom, MultiPolygon) and len(geom.geoms) == 1:
        return geom.geoms[0]
    raise GeometryBug(f"{what}: offset did not give one polygon ({geom.geom_type})")


def offset_polygon(polygon: Polygon, distance_mm: float) -> Polygon:
    """Offset outward (distance > 0) or inward (< 0) with mitred corners."""
    if distance_mm == 0:
        return polygon
    out = polygon.buffer(distance_mm, join_style="mitre", mitre_limit=MITRE_LIMIT)
    return _single(set_precision(out, GRID_MM), "offset")


def cut_outline(polygon: Polygon, kerf_mm: float) -> Polygon:
    """The path the beam follows to leave ``polygon`` (nominal) behind."""
    if kerf_mm < 0:
        raise ParameterError(f"kerf {kerf_mm:g} mm: must not be negative")
    return offset_polygon(polygon, kerf_mm / 2.0)


def beam_leaves(cut: Polygon, kerf_mm: float) -> Polygon:
    """What remains of the sheet inside a cut path once the beam has passed:
    the cut polygon eroded by kerf/2 (the inverse of :func:`cut_outline`)."""
    return offset_polygon(cut, -kerf_mm / 2.0)
