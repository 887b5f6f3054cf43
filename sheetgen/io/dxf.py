"""DXF writer: closed cut contours on layer ``CUT``, marks on their own layers.

Same input, same bytes: the header metadata ezdxf would stamp (creation time,
GUIDs) is fixed while writing, and entities are written in the order given.
Holes come before the outline that encloses them, so a file's entity order is a
valid cut order.
"""

from __future__ import annotations

import io
import logging
from collections.abc import Iterable, Sequence
from contextlib import contextmanager
from pathlib import Path
from typing import TYPE_CHECKING

from shapely.geometry import Polygon

from sheetgen.kitmodel.part import LAYER_CUT, LAYER_GUIDE, LAYER_LABEL, Mark
from sheetgen.errors import GeometryBug
from sheetgen.geometry.contour import Contour, polygon_contours

if TYPE_CHECKING:
    from sheetgen.production.coupon import Coupon

DXF_VERSIONS = {"R12": "R12", "R2000": "R2000"}
# Layer colours (ACI): cut white/black, labels green, guides grey. Our own choice.
LAYER_COLOURS = {LAYER_CUT: 7, LAYER_LABEL: 3, LAYER_GUIDE: 8}


def _new_doc(dxf_version: str):
    import ezdxf
    from ezdxf import units

    if dxf_version not in DXF_VERSIONS:
        from sheetgen.errors import SheetgenError

        raise SheetgenError(f"DXF version {dxf_version!r}: must be one of {', '.join(DXF_VERSIONS)}")
    quiet = logging.getLogger("ezdxf")
    level = quiet.level
    quiet.setLevel(logging.ERROR)  # ezdxf warns that R12 has no units; we know
    try:
        with fixed_metadata():
            doc = ezdxf.new(DXF_VERSIONS[dxf_version], setup=False, units=units.MM)
    finally:
        quiet.setLevel(level)
    if dxf_version != "R12":  # R12 has no $INSUNITS; its files carry no unit
        doc.units = units.MM
        doc.header["$MEASUREMENT"] = 1  # metric
    for name, colour in LAYER_COLOURS.items():
        doc.layers.add(name, color=colour)
    return doc


def build_document(contours: Sequence[Contour], marks: Sequence[Mark] = (), dxf_version: str = "R2000"):
    """An ezdxf document holding the contours (in order) and the marks."""
    doc = _new_doc(dxf_version)
    msp = doc.modelspace()
    attribs: dict[str, str | float] = {"layer": LAYER_CUT}
    for c in contours:
        circle = c.circle
        start: tuple[float, float] | None = getattr(c, "start", None) if circle is not None else None
        lead_in: tuple[float, float] | None = getattr(c, "lead_in", None)
        if circle is not None and start is None and lead_in is None:
            cx, cy, r = circle
            msp.add_circle((cx, cy), r, dxfattribs=attribs)
            continue
        closed = lead_in is None
        pts: list[tuple[float, float, float]]
        if circle is not None:
            # two half circles from the planned start point (bulge 1 = a half circle)
            if start is None:
                raise GeometryBug("a circle with a lead-in has no planned start point")
            cx, cy, _ = circle
            sx, sy = start
            pts = [(sx, sy, 1.0), (_r6(2 * cx - sx), _r6(2 * cy - sy), 1.0)]
            if not closed:
                pts.append((sx, sy, 0.0))
        else:
            pts = [(x, y, 0.0) for x, y in c.points]
            if not closed:
                pts.append(pts[0])
        if lead_in is not None:  # an open path
            # the lead-in belongs to its contour: one path from the pierce point in and round
            pts.insert(0, (_r6(lead_in[0]), _r6(lead_in[1]), 0.0))
        if dxf_version == "R12":
            msp.add_polyline2d(pts, format="xyb", close=closed, dxfattribs=attribs)
        else:
            msp.add_lwpolyline(pts, format="xyb", close=closed, dxfattribs=attribs)
    for m in marks:
        if m.kind == "text":
            (x, y), = m.points
            attribs = {"layer": m.layer}
            if m.angle_deg:
                attribs["rotation"] = round(m.angle_deg, 6)
            text = msp.add_text(m.text, height=m.height_mm, dxfattribs=attribs)
            text.set_placement((round(x, 6), round(y, 6)), align=_middle_center())
        else:
            mark_pts = [(round(x, 6), round(y, 6)) for x, y in m.points]
            if dxf_version == "R12":
                msp.add_polyline2d(mark_pts, dxfattribs={"layer": m.layer})
            else:
                msp.add_lwpolyline(mark_pts, dxfattribs={"layer": m.layer})
    return doc


def _r6(v: float) -> float:
    return round(float(v), 6) + 0.0


def _middle_center():
    from ezdxf.enums import TextEntityAlignment

    return TextEntityAlignment.MIDDLE_CENTER


@contextmanager
def fixed_metadata():
    """ezdxf stamps creation/write times and GUIDs; fix them while inside."""
    import ezdxf

    previous = ezdxf.options.write_fixed_meta_data_for_testing
    ezdxf.options.write_fixed_meta_data_for_testing = True
    try:
        yield
    finally:
        ezdxf.options.write_fixed_meta_data_for_testing = previous


def document_bytes(doc) -> bytes:
    """Serialise with fixed metadata so that equal input gives equal bytes."""
    stream = io.StringIO()
    with fixed_metadata():
        doc.write(stream)
    return stream.getvalue().encode("utf-8")


def dxf_bytes(contours: Sequence[Contour], marks: Sequence[Mark] = (), dxf_version: str = "R2000") -> bytes:
    return document_bytes(build_document(contours, marks, dxf_version))


def write_cut_dxf(path: str | Path, polygons: Sequence[Polygon], *, circles: Iterable[tuple[float, float, float]] = (),
                  circle_offset_mm: float = 0.0, marks: Sequence[Mark] = (), dxf_version: str = "R2000") -> None:
    """Write polygons (already kerf-compensated) as closed contours on layer CUT.

    Each polygon's holes are written before its outline; ``circles`` (cx, cy, r
    of round holes before compensation) and ``circle_offset_mm`` let round holes
    come out as true circles.
    """
    circles = list(circles)
    contours: list[Contour] = []
    for poly in polygons:
        contours.extend(polygon_contours(poly, circles, circle_offset_mm))
    Path(path).write_bytes(dxf_bytes(contours, marks, dxf_version))


def coupon_dxf_bytes(coupon: Coupon, dxf_version: str = "R2000") -> bytes:
    """The kerf coupon (:func:`sheetgen.production.coupon.make_coupon`) as a
    cut file: contours on layer CUT (each piece's slots before its outline),
    labels on layer LABEL."""
    contours = []
    for poly in coupon.polygons:
        contours.extend(polygon_contours(poly))
    return dxf_bytes(contours, coupon.marks, dxf_version)
