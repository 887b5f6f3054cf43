"""Reading extra parts from DXF drawings.

Sources: the DXF reference (entity types LWPOLYLINE, POLYLINE, CIRCLE, LINE,
ARC, INSERT; header $INSUNITS codes 1 = inch, 4 = mm; from memory), files
written by our own writer ``sheetgen.io.dxf.write_cut_dxf`` and by ezdxf
(a reference library from the package registry).
"""

from __future__ import annotations

import math

import ezdxf
import numpy as np
import pytest
import shapely
from hypothesis import given
from hypothesis import strategies as st
from shapely.geometry import Point, Polygon, box

from sheetgen.errors import InputFileError
from sheetgen.io.dxf import write_cut_dxf
from sheetgen.io.dxf_read import read_dxf_parts
from sheetgen.kitmodel.part import LAYER_LABEL, Mark


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


# ---------------------------------------------------------------------------
# one reader for preflight and nest --extra: the same files read the same way


def _contour_count(parts):
    return sum(1 + len(p.polygon.interiors) for p in parts)


def _both(path):
    from sheetgen.io.dxf_read import preflight_file

    return preflight_file(path), read_dxf_parts(path)


def test_a_gap_under_the_join_tolerance_is_closed_for_both(tmp_path):
    # 0.005 mm: once joined by one reader (0.01 mm) and refused by the other (0.001 mm)
    from sheetgen.io.dxf_read import JOIN_TOL_MM

    gap = JOIN_TOL_MM / 2
    doc = ezdxf.new(units=4)
    msp = doc.modelspace()
    pts = [(0, 0), (30, 0), (30, 20), (0, 20)]
    for k in range(4):
        a, b = pts[k], pts[(k + 1) % 4]
        if k == 3:
            b = (b[0] + gap, b[1])
        msp.add_line(a, b)
    path = tmp_path / "gap.dxf"
    doc.saveas(path)
    report, parts = _both(path)
    assert report.contours == 1 and not [f for f in report.faults if f.kind == "open-contour"]
    assert len(parts) == 1 and parts[0].polygon.area == pytest.approx(600, abs=0.01)


def test_a_gap_over_the_join_tolerance_is_open_for_both(tmp_path):
    from sheetgen.io.dxf_read import JOIN_TOL_MM

    doc = ezdxf.new(units=4)
    msp = doc.modelspace()
    msp.add_lwpolyline([(0, 0), (30, 0), (30, 20), (0, 20), (3 * JOIN_TOL_MM, 0)])
    path = tmp_path / "open.dxf"
    doc.saveas(path)
    from sheetgen.io.dxf_read import preflight_file

    report = preflight_file(path)
    assert "open-contour" in [f.kind for f in report.faults]
    with pytest.raises(InputFileError, match="open contour"):
        read_dxf_parts(path)


def test_same_cut_layer_rule_for_both(tmp_path):
    # a CUT layer in the table with nothing on it: both read the geometry on the other layers
    doc = ezdxf.new(units=4)
    doc.layers.add("CUT")
    msp = doc.modelspace()
    msp.add_lwpolyline([(0, 0), (40, 0), (40, 30), (0, 30)], close=True, dxfattribs={"layer": "OUTLINE"})
    msp.add_circle((20, 15), 5, dxfattribs={"layer": "OUTLINE"})
    path = tmp_path / "outline.dxf"
    doc.saveas(path)
    report, parts = _both(path)
    assert report.layers == ("OUTLINE",) and report.contours == 2 == _contour_count(parts)
    # with geometry on CUT, both read only CUT (the guide square on GUIDE is ignored)
    msp.add_lwpolyline([(100, 0), (110, 0), (110, 10), (100, 10)], close=True, dxfattribs={"layer": "CUT"})
    msp.add_lwpolyline([(200, 0), (210, 0), (210, 10), (200, 10)], close=True, dxfattribs={"layer": "GUIDE"})
    doc.saveas(path)
    report, parts = _both(path)
    assert report.layers == ("CUT",) and report.contours == 1 == _contour_count(parts)
    assert parts[0].polygon.bounds == (100, 0, 110, 10)


def test_same_units_for_both(tmp_path):
    # $INSUNITS = 1 (inches): 1 in = 25.4 mm exactly (NIST SP 811, the international inch)
    doc = ezdxf.new(units=1)
    doc.modelspace().add_lwpolyline([(0, 0), (2, 0), (2, 1), (0, 1)], close=True)
    path = tmp_path / "inch.dxf"
    doc.saveas(path)
    from sheetgen.io.dxf_read import read_cut_file

    geo = read_cut_file(path)
    assert geo.units_state == "declared" and geo.factor == 25.4
    report, parts = _both(path)
    assert report.units == "inches" and report.contours == 1
    assert parts[0].polygon.bounds == pytest.approx((0, 0, 50.8, 25.4))


def test_unit_table_agrees_with_ezdxf():
    # reference library: ezdxf.units.conversion_factor (codes it converts; it rounds the mile
    # and gives the light year and parsec to three figures, so those are compared loosely)
    from ezdxf import units

    from sheetgen.io.dxf_read import UNIT_MM

    compared = 0
    for code, mm in UNIT_MM.items():
        if code == 0:
            continue
        try:
            ref = units.conversion_factor(code, units.MM)
        except (TypeError, KeyError, ValueError):
            continue  # ezdxf has no factor for microinches, mils or US survey feet
        assert mm == pytest.approx(ref, rel=2e-3 if code in (19, 20) else 1e-8), code
        compared += 1
    assert compared >= 15
    # the ones ezdxf cannot convert, from their definitions (NIST SP 811 / NIST HB 44):
    assert UNIT_MM[8] == pytest.approx(25.4e-6)   # microinch
    assert UNIT_MM[9] == pytest.approx(25.4e-3)   # mil = 1/1000 in
    assert UNIT_MM[21] == pytest.approx(1200 / 3937 * 1000)  # US survey foot = 1200/3937 m


def test_block_on_layer_zero_takes_the_insert_layer_for_both(tmp_path):
    # DXF reference: an entity on layer 0 inside a block takes the layer of its INSERT (from memory)
    doc = ezdxf.new(units=4)
    blk = doc.blocks.new("PLATE")
    blk.add_lwpolyline([(0, 0), (8, 0), (8, 6), (0, 6)], close=True)  # layer 0
    msp = doc.modelspace()
    msp.add_blockref("PLATE", (0, 0), dxfattribs={"layer": "CUT"})
    msp.add_blockref("PLATE", (20, 0), dxfattribs={"layer": "NOTES"})
    path = tmp_path / "plates.dxf"
    doc.saveas(path)
    report, parts = _both(path)
    assert report.contours == 1 == _contour_count(parts)
    assert parts[0].polygon.bounds == (0, 0, 8, 6)


@given(st.lists(st.tuples(st.integers(0, 40), st.integers(0, 40)), min_size=1, max_size=60))
def test_end_clustering_matches_a_brute_force_closure(cells):
    # internal cross-check: the vectorised clustering against a plain transitive closure
    from sheetgen.geometry.cutpaths import JOIN_TOL_MM, cluster_points

    pts = np.array(cells, dtype=float) * (JOIN_TOL_MM * 0.6)  # neighbours on the grid are within the tolerance
    got = cluster_points(pts, JOIN_TOL_MM)
    n = len(pts)
    near = np.hypot(*(pts[:, None, :] - pts[None, :, :]).transpose(2, 0, 1)) <= JOIN_TOL_MM
    reach = near.copy()
    for k in range(n):  # Floyd-Warshall closure
        reach |= reach[:, k:k + 1] & reach[k:k + 1, :]
    expected = np.array([int(np.nonzero(reach[i])[0].min()) for i in range(n)])
    assert got.tolist() == expected.tolist()
