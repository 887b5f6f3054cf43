"""Reading our DXF files back with ezdxf alone (test helper, independent of the writers).

Understands what sheetgen writes on layer CUT: CIRCLE, closed LWPOLYLINE or
POLYLINE (with bulges: arcs), and open ones that start with a lead-in and end
where the contour started.
"""

from __future__ import annotations

import io
import math

import ezdxf
from ezdxf.math import bulge_to_arc
from shapely.geometry import Polygon

ARC_STEPS_PER_TURN = 720


def _vertices(e):
    if e.dxftype() == "LWPOLYLINE":
        return [(p[0], p[1], p[2]) for p in e.get_points("xyb")], e.closed
    return [(v.dxf.location[0], v.dxf.location[1], v.dxf.bulge) for v in e.vertices], e.is_closed


def entity_contour(e):
    """(polygon of the closed contour, path length incl. arcs and lead-in, kind, pierce point)."""
    if e.dxftype() == "CIRCLE":
        c, r = e.dxf.center, e.dxf.radius
        ring = [(c[0] + r * math.cos(2 * math.pi * k / ARC_STEPS_PER_TURN),
                 c[1] + r * math.sin(2 * math.pi * k / ARC_STEPS_PER_TURN)) for k in range(ARC_STEPS_PER_TURN)]
        return Polygon(ring), 2 * math.pi * r, "circle", ring[0]
    verts, closed = _vertices(e)
    if closed:
        verts = verts + [(verts[0][0], verts[0][1], 0.0)]
    length = 0.0
    pts = [(verts[0][0], verts[0][1])]
    for (x0, y0, b), (x1, y1, _) in zip(verts, verts[1:]):
        if b:
            centre, a0, a1, r = bulge_to_arc((x0, y0), (x1, y1), b)
            sweep = (a1 - a0) % (2 * math.pi)
            length += r * sweep
            n = max(2, int(ARC_STEPS_PER_TURN * sweep / (2 * math.pi)))
            # ezdxf gives the arc counter-clockwise; a negative bulge runs it backwards
            first, step = (a0, sweep / n) if b > 0 else (a1, -sweep / n)
            arc = [(centre[0] + r * math.cos(first + step * k), centre[1] + r * math.sin(first + step * k))
                   for k in range(1, n + 1)]
            pts.extend(arc[:-1] + [(x1, y1)])
        else:
            length += math.dist((x0, y0), (x1, y1))
            pts.append((x1, y1))
    pierce = pts[0]
    if not closed:
        # open: a lead-in from the pierce point, then the contour back to its start
        assert math.dist(pts[-1], pts[1]) < 1e-6, "open cut path that does not close on itself"
        pts = pts[1:]
    has_arc = any(b for _, _, b in verts)
    return Polygon(pts), length, "circle" if has_arc else "ring", pierce


def read_cut_contours(source):
    """Entities on layer CUT in file order; ``source`` a path or DXF bytes."""
    if isinstance(source, (bytes, bytearray)):
        doc = ezdxf.read(io.StringIO(source.decode("utf-8")))
    else:
        doc = ezdxf.readfile(str(source))
    return doc, [entity_contour(e) for e in doc.modelspace() if e.dxf.layer == "CUT"]


def cut_rings(path):
    """Closed contours on layer CUT as shapely polygons."""
    doc, contours = read_cut_contours(path)
    return doc, [c[0] for c in contours]


def part_from_rings(rings):
    """The outermost ring minus the rings inside it."""
    rings = sorted(rings, key=lambda p: -p.area)
    outer = rings[0]
    for r in rings[1:]:
        assert outer.contains(r)
        outer = outer.difference(r)
    return outer
