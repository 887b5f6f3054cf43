"""Pairs of parts (sheetgen/production/nesting/pairs.py): two copies locked together as one piece.

Sources named beside each check:
* The gap between two placed parts is measured with shapely's ``distance``
  (GEOS, a reference library from the package registry), never with the
  no-fit polygons that produced the places.
* The best pair of the step-shaped part is worked out by hand in the test
  (arithmetic on its sides, written out beside the check).
* Two parts at least the spacing apart whose boxes are grown by half the
  spacing on each side have disjoint grown boxes, so a box of two parts is
  compared with two grown boxes (common practice in box packing).
"""

from __future__ import annotations

import math

import pytest
import shapely
from hypothesis import given, settings
from hypothesis import strategies as st
from shapely import affinity
from shapely.geometry import Polygon, box

from sheetgen.production.nesting import NestItem, nest, verify
from sheetgen.production.nesting.columns import column_layout
from sheetgen.production.nesting.nfp import rotate_ccw
from sheetgen.production.nesting.pairs import PAIR_RATIO, best_pair, item_pairs, pair_item
from sheetgen.production.nesting.place import ShapeLibrary, Work

from tests import _refs as R

TOL = 1e-6
CEILING_S = 120.0   # far above what the work budget takes: the layout depends on seed and effort only


def library(poly: Polygon, spacing: float, angles=(0.0, 90.0, 180.0, 270.0)) -> ShapeLibrary:
    """A shape library as the engine builds it (grid and eps from a 1 m reference size)."""
    ref = 1000.0
    lib = ShapeLibrary([poly], [tuple(angles)], spacing, 1e-10 * ref, ref)
    lib.work = Work()
    return lib


def placed(lib: ShapeLibrary, poly: Polygon, sid: int, px: int, py: int) -> Polygon:
    """The real part of shape ``sid`` with its reference point at grid (px, py), rebuilt from the
    item's polygon (turned and moved as the engine's result does, not from the shape library)."""
    sh = lib.shapes[sid]
    turned = rotate_ccw(poly, sh.angle_deg)
    x0, y0 = turned.bounds[:2]
    return affinity.translate(turned, px / lib.scale - x0, py / lib.scale - y0)


def pair_polygons(lib: ShapeLibrary, poly: Polygon, p) -> tuple[Polygon, Polygon]:
    return placed(lib, poly, p.first, p.ax, p.ay), placed(lib, poly, p.second, p.bx, p.by)


# A step: a 100 x 20 bar with a 50 x 20 block on its left half (box 100 x 40, no holes).
STEP = Polygon([(0, 0), (100, 0), (100, 20), (50, 20), (50, 40), (0, 40)])


def test_step_part_pairs_into_the_box_worked_out_by_hand():
    # Source: hand arithmetic. The second copy turned 180 degrees has its bar on top and its
    # block at the lower right. Its block must clear the first's block sideways (x >= 50 + s)
    # and the first's bar from above (y >= 20 + s); its bar must clear the first's block from
    # above (y + 20 >= 40 + s). So the second's corner is at (s, 20 + s) and the pair's box is
    # (100 + s) x (60 + s); no other turn or place does better (any other place of the turned
    # copy lifts it or moves it right; unturned or quarter-turned copies do not interlock).
    s = 2.0
    lib = library(STEP, s)
    pairs = item_pairs(lib, 0)
    flat = [p for p in pairs if lib.shapes[p.first].angle_deg == 0.0]
    assert len(flat) == 1
    p = flat[0]
    assert lib.shapes[p.second].angle_deg == 180.0
    assert p.width_mm == pytest.approx(100 + s, abs=TOL)
    assert p.height_mm == pytest.approx(60 + s, abs=TOL)
    # grown box of the pair against two grown boxes: (104 x 64) / (2 x 102 x 42) = 6656 / 8568
    assert p.ratio == pytest.approx((100 + 2 * s) * (60 + 2 * s) / (2 * (100 + s) * (40 + s)), abs=1e-6)
    assert p.ratio == pytest.approx(6656 / 8568, abs=1e-6)
    # the saving against two boxes, by hand: 8568 - 6656 = 1912 mm^2
    assert 2 * (100 + s) * (40 + s) - (p.width_mm + s) * (p.height_mm + s) == pytest.approx(1912.0, abs=1e-3)
    # the two parts as placed: the spacing kept (shapely distance), the box as stated
    a, b = pair_polygons(lib, STEP, p)
    assert shapely.distance(a, b) >= s - TOL
    x0, y0, x1, y1 = shapely.union(a, b).bounds
    assert (x1 - x0, y1 - y0) == (pytest.approx(100 + s, abs=TOL), pytest.approx(60 + s, abs=TOL))
    # the quarter-turned first copy gives the same pair on its side
    side = [p for p in pairs if lib.shapes[p.first].angle_deg == 90.0]
    assert len(side) == 1
    assert (side[0].width_mm, side[0].height_mm) == (pytest.approx(60 + s, abs=TOL), pytest.approx(100 + s, abs=TOL))


def test_a_rectangle_is_not_offered_in_pairs():
    # Source: common practice (two rectangles in a box fill it no better than one each).
    lib = library(box(0, 0, 80, 30), 3.0)
    assert item_pairs(lib, 0) == []
    assert pair_item(lib, 0) is None
    assert lib.nfp_computed == 0  # ruled out before any no-fit polygon


def test_pairs_are_the_same_on_every_run():
    a = best_pair(library(STEP, 1.5), 0, 2)
    b = best_pair(library(STEP, 1.5), 0, 2)
    assert a == b


@st.composite
def odd_parts(draw):
    """Parts far from their boxes (triangles, steps, notched plates) in random sizes and turns."""
    kind = draw(st.sampled_from(["tri", "step", "notch"]))
    w = draw(st.floats(20, 120))
    h = draw(st.floats(20, 120))
    if kind == "tri":
        poly = Polygon([(0, 0), (w, 0), (w * draw(st.floats(0, 1)), h)])
    elif kind == "step":
        f = draw(st.floats(0.2, 0.8))
        poly = Polygon([(0, 0), (w, 0), (w, h * f), (w * f, h * f), (w * f, h), (0, h)])
    else:
        poly = box(0, 0, w, h).difference(box(w / 3, h / 2, 2 * w / 3, h + 1))
    poly = affinity.rotate(poly, draw(st.sampled_from([0.0, 17.0, 90.0, 135.0])), origin=(0, 0))
    return poly, draw(st.floats(0.5, 5.0))


@settings(max_examples=20, deadline=None)
@given(odd_parts())
def test_pairs_keep_the_spacing_and_their_box(case):
    # Source: the gap measured by shapely.distance (reference library) on the real outlines;
    # the box by shapely's bounds of the two placed parts.
    poly, s = case
    if not poly.is_valid or poly.area < 1.0:
        R.refused("degenerate outline")
        return
    R.kept()
    lib = library(poly, s)
    sids = lib.item_shapes[0]
    for b in sids:
        p = best_pair(lib, sids[0], b)
        pa, pb = pair_polygons(lib, poly, p)
        assert shapely.distance(pa, pb) >= s - TOL
        x0, y0, x1, y1 = shapely.union(pa, pb).bounds
        assert x0 >= -TOL and y0 >= -TOL
        assert x1 - x0 == pytest.approx(p.width_mm, abs=TOL)
        assert y1 - y0 == pytest.approx(p.height_mm, abs=TOL)
    # offered pairs: the grown box of the two is no larger than PAIR_RATIO of two grown boxes
    for p in item_pairs(lib, 0):
        pa, pb = pair_polygons(lib, poly, p)
        x0, y0, x1, y1 = shapely.union(pa, pb).bounds
        one = lib.shapes[p.first]
        two_boxes = 2 * (one.width + s) * (one.height + s)
        assert (x1 - x0 + s) * (y1 - y0 + s) <= PAIR_RATIO * two_boxes + 1e-6


def test_a_crack_in_the_no_fit_polygon_does_not_stack_a_pair():
    # Source: shapely.distance on the real outlines. A plate with a slot as wide as its arms,
    # turned 17 degrees (a draw hypothesis found): the no-fit polygon of the plate and its
    # half-turned copy, summed from edge sweeps, kept a crack of no width along the slot, and a
    # place on it put one copy into the other (distance 0, 32 mm^2 of overlap).
    poly = Polygon([(0, 0), (19.126095119260707, 5.847434094454735), (16.61981663178491, 14.045101647865415),
                    (5.691389065934883, 10.703946040886477), (2.3502334589559446, 21.632373606736504),
                    (-5.847434094454735, 19.126095119260707)])
    s = 0.5
    lib = library(poly, s)
    for b in lib.item_shapes[0]:
        p = best_pair(lib, lib.item_shapes[0][0], b)
        pa, pb = pair_polygons(lib, poly, p)
        assert shapely.distance(pa, pb) >= s - TOL


def check_sheets(lib: ShapeLibrary, poly: Polygon, sheets, usable, s: float, parts: int) -> None:
    """Every part inside the usable area and at least the spacing from the others (shapely)."""
    x0, y0, x1, y1 = usable
    n = 0
    for sheet in sheets:
        polys = [placed(lib, poly, sid, px, py) for _item, sid, px, py in sheet]
        n += len(polys)
        for q in polys:
            bx0, by0, bx1, by1 = q.bounds
            assert bx0 >= x0 - TOL and by0 >= y0 - TOL and bx1 <= x1 + TOL and by1 <= y1 + TOL
        for i in range(len(polys)):
            for j in range(i + 1, len(polys)):
                assert shapely.distance(polys[i], polys[j]) >= s - TOL
    assert n == parts


def test_pairs_save_a_sheet_in_the_column_layouts():
    # Source: hand count. A usable area of 103 x 190 mm, spacing 2: single steps in boxes of
    # 102 x 42 (grown) stack 4 to a column (4 x 42 = 168 <= 192 < 5 x 42), and one column fits
    # (103 + 2 < 2 x 42 + 102); on their sides (42 x 102) two columns of one: 4 a sheet at best,
    # so 12 parts take 3 sheets. Pairs (grown 104 x 64) stack 3 to a column (192 = 3 x 64):
    # 6 parts a sheet, 2 sheets.
    s = 2.0
    usable = (1.0, 1.0, 104.0, 191.0)
    lib = library(STEP, s)
    plain = column_layout(lib, [12], usable, Work(), 10**12)
    assert plain is not None and len(plain) == 3
    check_sheets(lib, STEP, plain, usable, s, 12)
    lib = library(STEP, s)
    both = column_layout(lib, [12], usable, Work(), 10**12, pairs=True)
    assert both is not None and len(both) == 2
    check_sheets(lib, STEP, both, usable, s, 12)
    assert all(item == 0 for sheet in both for item, *_ in sheet)   # pairs turned back into parts


def test_the_engine_lays_out_steps_in_pairs_and_verifies_them():
    # Source: the same hand count (2 sheets of 6); the layout checked by verify() and by shapely
    # distances between the placed outlines.
    s = 2.0
    items = [NestItem("step", STEP, 12, (0.0, 90.0, 180.0, 270.0))]
    result = nest(items, sheet_mm=(105.0, 192.0), margin_mm=1.0, spacing_mm=s, time_limit_s=CEILING_S,
                  effort=3.0, seed=1)
    verify(result, items)
    assert not result.unplaced
    assert len(result.sheets) <= 2
    for sheet in result.sheets:
        for i, a in enumerate(sheet):
            for b in sheet[i + 1:]:
                assert shapely.distance(a.polygon, b.polygon) >= s - TOL
    assert math.isclose(sum(len(sh) for sh in result.sheets), 12)


def test_steps_on_a_strip_interlock_at_least_as_tightly_as_pairs():
    # Source: hand count. A strip 64 mm wide, spacing 2, six steps: three pairs (102 x 62 each,
    # see above) in a row take 3 x 102 + 2 x 2 = 310 mm; single steps, which cannot stack two
    # deep unless they interlock (40 + 2 + 40 > 64), would take 6 x 100 + 5 x 2 = 610 mm.
    s = 2.0
    items = [NestItem("step", STEP, 6, (0.0, 90.0, 180.0, 270.0))]
    result = nest(items, strip_width_mm=64.0, spacing_mm=s, time_limit_s=CEILING_S, effort=2.0, seed=1)
    verify(result, items)
    assert not result.unplaced and len(result.sheets[0]) == 6
    assert result.strip_length_mm <= 3 * (100 + s) + 2 * s + TOL
    parts = result.sheets[0]
    for i, a in enumerate(parts):
        for b in parts[i + 1:]:
            assert shapely.distance(a.polygon, b.polygon) >= s - TOL


def test_pairs_on_a_strip_of_the_esicup_shapes1_instance_are_valid():
    # Outside source: the ESICUP SHAPES1 instance (tests/data/esicup, licence and source in its
    # readme); two of its pieces pair within PAIR_RATIO at 0 and 180 degrees, so the strip
    # search may go on from a first layout in pairs. The layout is checked by verify() and by
    # shapely (no two pieces overlapping, every piece the instance asks for placed once), and
    # can be no shorter than the best recorded length (56, recorded_solutions.csv).
    from pathlib import Path

    from sheetgen.production.nesting.esicup import read_instance

    inst = read_instance(Path(__file__).parent / "data" / "esicup" / "shapes" / "shapes1.xml")
    result = nest(inst.items, strip_width_mm=inst.strip_width, time_limit_s=CEILING_S, effort=0.5, seed=1)
    verify(result, inst.items)
    assert not result.unplaced
    placed = result.sheets[0]
    assert sorted((p.item, p.copy) for p in placed) == sorted(
        (i, c) for i, it in enumerate(inst.items) for c in range(it.qty))
    for i, a in enumerate(placed):
        for b in placed[i + 1:]:
            # touching pieces may overlap by the nester's tolerance in depth (verify: 1e-6 mm)
            assert shapely.intersection(a.polygon, b.polygon).area <= TOL * min(a.polygon.length, b.polygon.length)
    assert result.strip_length_mm >= 56.0 - TOL


@pytest.mark.parametrize("mode", ["sheet", "strip"])
def test_the_slotted_plate_is_nested_without_overlaps(mode):
    # Source: verify() and shapely.distance on the placed outlines. The plate above (a slot as
    # wide as its arms) once came out of the nester with copies one inside the other, through
    # the crack in their no-fit polygon (the no-fit polygons are now closed before use).
    poly = Polygon([(0, 0), (19.126095119260707, 5.847434094454735), (16.61981663178491, 14.045101647865415),
                    (5.691389065934883, 10.703946040886477), (2.3502334589559446, 21.632373606736504),
                    (-5.847434094454735, 19.126095119260707)])
    s = 0.5
    items = [NestItem("plate", poly, 30, (0.0, 90.0, 180.0, 270.0))]
    where = {"sheet_mm": (120.0, 80.0), "margin_mm": 1.0} if mode == "sheet" else {"strip_width_mm": 60.0}
    result = nest(items, spacing_mm=s, time_limit_s=CEILING_S, effort=1.0, seed=1, **where)
    verify(result, items)
    assert not result.unplaced
    for sheet in result.sheets:
        for i, a in enumerate(sheet):
            for b in sheet[i + 1:]:
                assert shapely.distance(a.polygon, b.polygon) >= s - TOL
