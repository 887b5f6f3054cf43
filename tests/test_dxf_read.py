"""Reading extra parts from DXF drawings.

Sources: the DXF reference (entity types LWPOLYLINE, POLYLINE, CIRCLE, LINE,
ARC, INSERT; header $INSUNITS codes 1 = inch, 4 = mm; from memory), files
written by our own writer ``sheetgen.io.dxf.write_cut_dxf`` and by ezdxf
(a reference library from the package registry).
"""

from __future__ import annotations

import math

import ezdxf
import pytest
import shapely
from shapely.geometry import Point, Polygon, box

from sheetgen.errors import InputFileError
from sheetgen.io.dxf import write_cut_dxf
from sheetgen.io.dxf_read import read_dxf_parts
from sheetgen.part import LAYER_LABEL, Mark


def _frame_with_round_holes():
    outer = box(0, 0, 120, 80)
    window = box(20, 20, 100, 60)
    holes = [Point(8, 8).buffer(3, quad_segs=64), Point(112, 72).buffer(3, quad_segs=64)]
    return Polygon(outer.exterior, [window.exterior] + [h.exterior for h in holes])


@pytest.mark.parametrize("version", ["R12", "R2000"])
def test_round_trip_of_our_own_cut_file(tmp_path, version):
    # Source: our writer (holes before outlines, round holes as CIRCLE) read back.
    frame = _frame_with_round_holes()
    inner = box(40, 30, 70, 50)  # a part drawn inside the frame's window
    tab = Polygon([(150, 0), (190, 0), (190, 10), (175, 10), (175, 30), (150, 30)])
    label = Mark(LAYER_LABEL, "text", ((60, 10),), "frame", 3.0)
    path = tmp_path / "extras.dxf"
    write_cut_dxf(path, [frame, inner, tab], circles=[(8, 8, 3), (112, 72, 3)], marks=[label], dxf_version=version)
    parts = read_dxf_parts(path)
    assert [p.name for p in parts] == ["extras-1", "extras-2", "extras-3"]
    by_area = sorted(parts, key=lambda p: p.polygon.area)
    for got, want in zip(by_area, sorted([frame, inner, tab], key=lambda p: p.area)):
        # circles come back as true circles flattened finely: within 0.01 mm
        assert shapely.hausdorff_distance(got.polygon, want) < 0.02
        assert got.polygon.area == pytest.approx(want.area, rel=1e-3)
        assert len(got.polygon.interiors) == len(want.interiors)
    framed = by_area[-1]
    assert sorted(framed.circles) == [(8.0, 8.0, 3.0), (112.0, 72.0, 3.0)]


def test_lines_and_arcs_chained_into_a_contour(tmp_path):
    # Source: area of a 10 x 10 square topped by a half disc of radius 5: 100 + 12.5 pi.
    doc = ezdxf.new(units=4)  # mm
    msp = doc.modelspace()
    msp.add_line((0, 0), (10, 0))
    msp.add_line((10, 0), (10, 10))
    msp.add_arc((5, 10), 5, 0, 180)
    msp.add_line((0, 10), (0, 0))
    msp.add_circle((5, 5), 2)  # a hole
    path = tmp_path / "bracket.dxf"
    doc.saveas(path)
    (part,) = read_dxf_parts(path)
    assert part.name == "bracket"
    assert part.polygon.area == pytest.approx(100 + 12.5 * math.pi - 4 * math.pi, rel=1e-3)
    assert part.circles == ((5.0, 5.0, 2.0),)


def test_inch_drawing_is_converted_to_mm(tmp_path):
    # Source: $INSUNITS 1 = inch, 25.4 mm to the inch (DXF reference, from memory).
    doc = ezdxf.new(units=1)
    doc.modelspace().add_lwpolyline([(0, 0), (2, 0), (2, 1), (0, 1)], close=True)
    path = tmp_path / "inch.dxf"
    doc.saveas(path)
    (part,) = read_dxf_parts(path)
    assert part.polygon.bounds == pytest.approx((0, 0, 50.8, 25.4))


def test_open_contour_rejected_with_file_and_place(tmp_path):
    doc = ezdxf.new(units=4)
    msp = doc.modelspace()
    msp.add_lwpolyline([(0, 0), (10, 0), (10, 10), (0, 10)], close=True)
    msp.add_lwpolyline([(20, 0), (30, 0), (30, 10)])  # not closed
    path = tmp_path / "open.dxf"
    doc.saveas(path)
    with pytest.raises(InputFileError, match=r"open\.dxf.*open contour.*\(20, 0\)"):
        read_dxf_parts(path)


@pytest.mark.parametrize("content", [b"this is not a drawing\n", b"0\nSECTION\n2\nENTITIES\n0\nLINE\n8\n0\n10\nx\n"])
def test_unreadable_file_rejected(tmp_path, content):
    path = tmp_path / "broken.dxf"
    path.write_bytes(content)
    with pytest.raises(InputFileError, match="broken.dxf"):
        read_dxf_parts(path)


def test_missing_file_rejected(tmp_path):
    with pytest.raises(InputFileError, match="nowhere.dxf"):
        read_dxf_parts(tmp_path / "nowhere.dxf")


def test_drawing_without_closed_contours_rejected(tmp_path):
    doc = ezdxf.new(units=4)
    doc.modelspace().add_text("just words")
    path = tmp_path / "empty.dxf"
    doc.saveas(path)
    with pytest.raises(InputFileError, match="empty.dxf.*no closed contour"):
        read_dxf_parts(path)


def test_blocks_are_exploded(tmp_path):
    # Source: DXF INSERT of a block, placed twice at different points.
    doc = ezdxf.new(units=4)
    blk = doc.blocks.new("TAB")
    blk.add_lwpolyline([(0, 0), (5, 0), (5, 3), (0, 3)], close=True)
    msp = doc.modelspace()
    msp.add_blockref("TAB", (0, 0))
    msp.add_blockref("TAB", (10, 0))
    path = tmp_path / "tabs.dxf"
    doc.saveas(path)
    parts = read_dxf_parts(path)
    assert [p.polygon.bounds for p in parts] == [(0, 0, 5, 3), (10, 0, 15, 3)]
