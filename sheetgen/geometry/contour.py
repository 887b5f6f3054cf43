"""Cut contours: the core type the cut plan, the runs and the writers share.

A contour is one closed cut path, a ring of points or a true circle, in the
order a laser would cut it (holes before the outline that encloses them).
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass

from shapely.geometry import Polygon

CIRCLE_MATCH_TOL_MM = 0.02


@dataclass(frozen=True)
class Circle:
    """A round hole of the nominal outline, kept so writers can emit true circles
    (:class:`sheetgen.kitmodel.part.Part` carries them; the writers turn them into contours)."""

    x_mm: float
    y_mm: float
    radius_mm: float


@dataclass(frozen=True)
class Contour:
    """One closed cut path: a ring of points, or a true circle.

    A planned contour (sheetgen.production.cutplan.PlannedContour) also carries its
    ``start`` point and an optional ``lead_in`` pierce point; the writer keeps
    both: a planned circle becomes two half-circle arcs from its start, and a
    contour with a lead-in one open path from the pierce point in and round.
    """

    points: tuple[tuple[float, float], ...] = ()
    circle: tuple[float, float, float] | None = None  # (cx, cy, r)

    @property
    def is_circle(self) -> bool:
        return self.circle is not None


def _ring_points(ring) -> tuple[tuple[float, float], ...]:
    coords = list(ring.coords)
    if len(coords) > 1 and coords[0] == coords[-1]:
        coords = coords[:-1]
    return tuple((round(float(x), 6) + 0.0, round(float(y), 6) + 0.0) for x, y in coords)


def _match_circle(ring, circles: Sequence[tuple[float, float, float]]) -> tuple[float, float, float] | None:
    """The circle (cx, cy, r) this ring approximates, if any."""
    if not circles:
        return None
    poly = Polygon(ring)
    c = poly.centroid
    x0, y0, x1, y1 = poly.bounds
    r_box = (x1 - x0 + y1 - y0) / 4
    for cx, cy, r in circles:
        if math.hypot(c.x - cx, c.y - cy) < CIRCLE_MATCH_TOL_MM and abs(r_box - r) < max(CIRCLE_MATCH_TOL_MM, 0.01 * r):
            return (cx, cy, r)
    return None


def polygon_contours(polygon: Polygon, circles: Iterable[tuple[float, float, float]] = (),
                     circle_offset_mm: float = 0.0) -> list[Contour]:
    """Contours of one polygon, holes first then the outline.

    ``circles`` lists round holes (cx, cy, r) of the polygon *before* any
    offset; ``circle_offset_mm`` is how far the polygon's holes were moved
    outward by kerf compensation (holes shrink by it), so a hole of the offset
    polygon is written as a true circle of radius r - offset.
    """
    circles = [(cx, cy, r - circle_offset_mm) for cx, cy, r in circles]
    out = []
    holes = sorted(polygon.interiors, key=lambda r: (round(r.bounds[0], 6), round(r.bounds[1], 6)))
    for ring in holes:
        hit = _match_circle(ring, circles)
        if hit is not None:
            cx, cy, r = hit
            out.append(Contour(circle=(round(cx, 6) + 0.0, round(cy, 6) + 0.0, round(r, 6))))
        else:
            out.append(Contour(points=_ring_points(ring)))
    out.append(Contour(points=_ring_points(polygon.exterior)))
    return out


def circles_of(circles: Iterable[Circle])  -> list[tuple[float, float, float]]:
    return [(c.x_mm, c.y_mm, c.radius_mm) for c in circles]
