"""Reading our DXF files back with ezdxf alone (test helper, independent of the writers)."""

from __future__ import annotations

import math

import ezdxf
from shapely.geometry import Polygon


def cut_rings(path):
    """Closed contours on layer CUT as shapely polygons (circles to 720-gons)."""
    doc = ezdxf.readfile(str(path))
    rings = []
    for e in doc.modelspace():
        if e.dxf.layer != "CUT":
            continue
        if e.dxftype() == "LWPOLYLINE":
            assert e.closed
            rings.append(Polygon([tuple(p)[:2] for p in e.get_points()]))
        elif e.dxftype() == "POLYLINE":
            assert e.is_closed
            rings.append(Polygon([tuple(v.dxf.location)[:2] for v in e.vertices]))
        elif e.dxftype() == "CIRCLE":
            c, r = e.dxf.center, e.dxf.radius
            rings.append(Polygon([(c[0] + r * math.cos(a * math.pi / 360), c[1] + r * math.sin(a * math.pi / 360))
                                  for a in range(720)]))
        else:
            raise AssertionError(f"unexpected {e.dxftype()} on CUT")
    return doc, rings


def part_from_rings(rings):
    """The outermost ring minus the rings inside it."""
    rings = sorted(rings, key=lambda p: -p.area)
    outer = rings[0]
    for r in rings[1:]:
        assert outer.contains(r)
        outer = outer.difference(r)
    return outer
