"""The nester: no-fit polygons, placement, sheets and strips, verification.

Sources named beside each check. Geometric facts used:
* Minkowski sum of two axis-parallel rectangles is the rectangle of the summed
  sides (de Berg et al., Computational Geometry, ch. 13, from memory).
* No-fit polygon definition: B moved by t overlaps A exactly when t is inside
  A (+) (-B) (same source, from memory); checked against shapely's own
  intersection test, an independent computation.
* Strip and sheet lower bounds from total area (common practice).
* The honest sheet bound is checked against hand counts written out beside each
  case (arithmetic on the sizes, independent of the code).
"""

from __future__ import annotations

import dataclasses
import json
import math

import numpy as np
import pytest
import shapely
from hypothesis import given, settings
from hypothesis import strategies as st
from shapely import affinity
from shapely.geometry import Point, Polygon, box

from sheetgen.errors import GeometryBug, SheetgenError
from sheetgen.production.nesting import (
    NestItem,
    RunTooLarge,
    lower_bound_sheets,
    nest,
    sheet_patterns,
    verify,
)
from sheetgen.production.nesting.nfp import clearance_outline, no_fit_polygon

TOL = 1e-6
# A wall-clock ceiling far above what the work budget (effort) takes, so that the
# layout depends on the seed and effort only, never on the load of the machine
# (a loaded CI machine once hit a 0.3 s ceiling and laid the same run out two ways).
CEILING_S = 120.0


# ---------------------------------------------------------------- helpers

def independent_check(result, items, margin, spacing):
    """Our own reading of the layout, separate from verify(): inside the margin,
    no overlap deeper than TOL, gaps at least the spacing, all parts there."""
    w, h = result.sheet_size_mm
    seen = set()
    for sheet in result.sheets:
        for p in sheet:
            x0, y0, x1, y1 = p.polygon.bounds
            assert x0 >= margin - TOL and y0 >= margin - TOL
            assert x1 <= w - margin + TOL and y1 <= h - margin + TOL
            assert abs(p.polygon.area - items[p.item].polygon.area) < 1e-6 * items[p.item].polygon.area
            seen.add((p.item, p.copy))
        for i, a in enumerate(sheet):
            for b in sheet[i + 1:]:
                if spacing > TOL:
                    assert a.polygon.distance(b.polygon) >= spacing - TOL
                else:
                    assert not a.polygon.buffer(-TOL).intersects(b.polygon)
    seen |= set(result.unplaced)
    assert seen == {(i, c) for i, it in enumerate(items) for c in range(it.qty)}


def frame(outer: float, window: float) -> Polygon:
    o = box(0, 0, outer, outer)
    m = (outer - window) / 2
    return Polygon(o.exterior, [box(m, m, m + window, m + window).exterior])


shape_kinds = st.sampled_from(["rect", "ell", "tri", "ring"])


@st.composite
def parts(draw):
    kind = draw(shape_kinds)
    w = draw(st.floats(5, 60))
    h = draw(st.floats(5, 60))
    if kind == "rect":
        poly = box(0, 0, w, h)
    elif kind == "ell":
        poly = Polygon([(0, 0), (w, 0), (w, h / 3), (w / 3, h / 3), (w / 3, h), (0, h)])
    elif kind == "tri":
        poly = Polygon([(0, 0), (w, 0), (w * draw(st.floats(0, 1)), h)])
    else:
        poly = box(0, 0, w, h).difference(box(w / 4, h / 4, 3 * w / 4, 3 * h / 4))
    angle = draw(st.floats(-180, 180))
    poly = affinity.translate(affinity.rotate(poly, angle, origin=(0, 0)), draw(st.floats(-50, 50)),
                              draw(st.floats(-50, 50)))
    rots = draw(st.sampled_from([(0.0,), (0.0, 180.0), (0.0, 90.0, 180.0, 270.0), (0.0, 45.0)]))
    return poly, draw(st.integers(1, 3)), rots


# ---------------------------------------------------------------- no-fit polygons

def test_nfp_of_rectangles_is_the_summed_rectangle():
    # Source: Minkowski sum of boxes (de Berg et al., ch. 13, from memory).
    a, b = box(0, 0, 30, 10), box(0, 0, 4, 7)
    nfp = no_fit_polygon(a, b)
    assert nfp.symmetric_difference(box(-4, -7, 30, 10)).area < 1e-9


@settings(max_examples=15)
@given(parts(), parts(), st.integers(0, 2**31))
def test_nfp_agrees_with_the_overlap_test(pa, pb, seed):
    # Source: the NFP definition, against shapely's intersection of the two
    # polygons (independent computation), at random translations.
    a, b = pa[0], pb[0]
    _agrees_with_overlap(a, b, no_fit_polygon(a, b), seed)


def _agrees_with_overlap(a, b, nfp, seed: int) -> None:
    """At random translations: b moved there overlaps a exactly when the point is inside nfp."""
    rng = np.random.default_rng(seed)
    x0, y0, x1, y1 = nfp.bounds
    for x, y in rng.uniform((x0 - 2, y0 - 2), (x1 + 2, y1 + 2), size=(25, 2)):
        pt = Point(x, y)
        if nfp.boundary.distance(pt) < 1e-6:
            continue
        moved = affinity.translate(b, x, y)
        assert (moved.intersection(a).area > 1e-9) == nfp.contains(pt)


@settings(max_examples=25)
@given(parts(), parts(), st.integers(0, 2**31))
def test_convex_piece_sums_agree_with_the_overlap_test_and_the_edge_sweep(pa, pb, seed):
    # Source: the NFP definition, against shapely's intersection of the two polygons
    # (independent computation), at random translations; and, as an internal cross-check,
    # the same set as the edge sweep (nfp_paths) up to the grid's rounding.
    from sheetgen.production.nesting.convex import convex_sum_paths
    from sheetgen.production.nesting.nfp import nfp_paths, nfp_scale, paths_to_geometry

    a, b = pa[0], pb[0]
    scale = nfp_scale(a, b, 0.0)
    paths = convex_sum_paths(a, b, scale)
    assert paths is not None
    nfp = paths_to_geometry(paths, scale)
    sweep = paths_to_geometry(nfp_paths(a, b, 0.0, scale), scale)
    assert nfp.symmetric_difference(sweep).area <= 1e-9 * sweep.area
    _agrees_with_overlap(a, b, nfp, seed)


def test_convex_pieces_cover_a_notched_plate_and_refuse_a_crossed_outline():
    # Plane geometry (common practice): an L of two rectangles is two convex pieces at least,
    # and their areas add up to the L's (hand count: 10 x 4 + 4 x 6 = 64); a crossed outline
    # (a bow tie) bounds no region the pieces could cover, so it is left to the edge sweep.
    from sheetgen.production.nesting.convex import convex_pieces

    ell = Polygon([(0, 0), (10, 0), (10, 4), (4, 4), (4, 10), (0, 10)])
    pieces = convex_pieces(ell)
    assert pieces is not None and len(pieces) >= 2
    assert sum(Polygon(p).area for p in pieces) == 64
    assert all(Polygon(p).equals(Polygon(p).convex_hull) for p in pieces)
    assert convex_pieces(Polygon([(0, 0), (10, 10), (10, 0), (0, 10)])) is None


def test_nfp_with_spacing_keeps_the_gap():
    # Source: definition of the clear gap; a square moved to the right of another.
    a = b = box(0, 0, 1, 1)
    s = 0.5
    nfp = no_fit_polygon(a, b, spacing=s)
    assert nfp.contains(Point(1 + s - 1e-3, 0))
    assert not nfp.contains(Point(1 + s + 1e-2, 0))
    # diagonal: the gap is round (corner to corner distance), within the arc tolerance
    d = (1 + s / math.sqrt(2) + 0.02)
    assert not nfp.contains(Point(d, d))


def test_nfp_hole_where_a_small_part_fits_in_a_window():
    # Source: NFP definition; a 20 mm square in a 50 mm window of a 100 mm frame.
    nfp = no_fit_polygon(frame(100, 50), box(0, 0, 20, 20))
    assert len(nfp.interiors) == 1
    hole = Polygon(nfp.interiors[0])
    assert hole.symmetric_difference(box(25, 25, 55, 55)).area < 1e-9


def test_clearance_outline_covers_a_finely_drawn_gear():
    # Source: construction (outward coarsening): the outline must contain the
    # part grown by half the spacing, with few vertices.
    n = 400
    ang = np.linspace(0, 2 * np.pi, n, endpoint=False)
    r = 30 + 2 * (np.arange(n) % 10 < 5)
    gear = Polygon(np.c_[r * np.cos(ang), r * np.sin(ang)])
    out = clearance_outline(gear, 1.5)
    assert out.covers(gear.buffer(1.5, quad_segs=32))
    assert shapely.get_num_coordinates(out) <= 60


# ---------------------------------------------------------------- layouts

@settings(max_examples=12)
@given(st.lists(parts(), min_size=1, max_size=5), st.floats(0, 8), st.floats(0, 4), st.integers(0, 3))
def test_random_parts_are_nested_without_overlap(specs, margin, spacing, seed):
    # Source: the rules of the issue (inside the margin, spacing kept, no overlap),
    # read independently of verify().
    items = [NestItem(f"p{i}", poly, qty, rots) for i, (poly, qty, rots) in enumerate(specs)]
    size = max(max(p.bounds[2] - p.bounds[0], p.bounds[3] - p.bounds[1]) for p, _, _ in specs)
    sheet = (size + 2 * margin + 40, size + 2 * margin + 10)
    result = nest(items, sheet_mm=sheet, margin_mm=margin, spacing_mm=spacing, effort=0.18,
                    time_limit_s=CEILING_S, seed=seed)
    verify(result, items)
    independent_check(result, items, margin, spacing)
    assert not result.unplaced
    # a lower bound can never exceed a layout that exists (definition of a bound)
    assert 1 <= result.lower_bound_sheets <= len(result.sheets)


@pytest.mark.parametrize("specs, spacing", [
    # two items of one shape (the same triangle, moved): each item's pairs stay its own
    ([([(0.0, 0.0), (-4.774, -3.072), (25.269, -47.633)], 3, (0.0, 90.0, 180.0, 270.0)),
      ([(0.0, -32.866), (-4.774, -35.938), (25.269, -80.499)], 3, (0.0, 90.0, 180.0, 270.0)),
      ([(-7.798, -26.684), (32.869, -38.569), (40.668, -11.885), (0.0, 0.0)], 3, (0.0,))], 1.909),
    # a slanted bar whose pair is larger than the sheet: it goes single, never lost
    # (a 5 x 19 bar turned 2 degrees and an 8 x 33 bar turned 45 degrees, coordinates as drawn)
    ([([(5.0, 0.0), (5.0, 5.0), (0.0, 5.0), (0.0, 0.0)], 1, (0.0,)),
      ([(4.9969541350954785, 0.17449748351250485), (4.33386369774796, 19.162923196875322),
        (-0.6630904373475184, 18.98842571336282), (0.0, 0.0)], 3, (0.0, 45.0)),
      ([(5.656854249492381, 5.65685424949238), (-17.677669529663685, 28.991378028648448),
        (-23.334523779156065, 23.33452377915607), (0.0, 0.0)], 2, (0.0,))], 0.0),
])
def test_every_copy_is_placed_once_when_parts_pair(specs, spacing):
    # Source: the rules of the issue (every part asked for, once), read independently of
    # verify(): two draws of the property above that lost parts in the column layouts with pairs.
    items = [NestItem(f"p{i}", Polygon(pts), qty, rots) for i, (pts, qty, rots) in enumerate(specs)]
    size = max(max(it.polygon.bounds[2] - it.polygon.bounds[0], it.polygon.bounds[3] - it.polygon.bounds[1])
               for it in items)
    result = nest(items, sheet_mm=(size + 40, size + 10), spacing_mm=spacing, effort=0.18,
                  time_limit_s=CEILING_S, seed=0)
    copies = sorted((p.item, p.copy) for sheet in result.sheets for p in sheet)
    assert copies == sorted((i, c) for i, it in enumerate(items) for c in range(it.qty))
    verify(result, items)
    independent_check(result, items, 0.0, spacing)


@settings(max_examples=12)
@given(st.floats(20, 80), st.floats(0, 3), st.floats(0.2, 0.99))
def test_small_part_goes_into_the_window_of_a_frame(window, spacing, fill):
    # Source: the issue (parts inside the holes of other parts). The sheet is
    # exactly the frame; the square fits the window with the spacing on all sides.
    outer = window + 30
    side = (window - 2 * spacing) * fill
    items = [NestItem("frame", frame(outer, window), 1, (0.0,)), NestItem("square", box(0, 0, side, side), 1, (0.0,))]
    result = nest(items, sheet_mm=(outer, outer), spacing_mm=spacing, effort=0.18, time_limit_s=CEILING_S)
    verify(result, items)
    assert len(result.sheets) == 1
    fr = next(p for p in result.sheets[0] if p.item == 0)
    sq = next(p for p in result.sheets[0] if p.item == 1)
    assert Polygon(fr.polygon.interiors[0]).buffer(TOL).contains(sq.polygon)


def test_square_too_big_for_the_window_takes_a_second_sheet():
    # Source: arithmetic: 50 mm window, 2 mm spacing: room for 46 mm, not 47.
    items = [NestItem("frame", frame(80, 50), 1, (0.0,)), NestItem("square", box(0, 0, 47, 47), 1, (0.0,))]
    result = nest(items, sheet_mm=(80, 80), spacing_mm=2, effort=0.18, time_limit_s=CEILING_S)
    verify(result, items)
    assert len(result.sheets) == 2
    assert result.area_lower_bound_sheets == 1


def test_strip_of_rectangles_reaches_the_area_bound():
    # Source: area / width lower bound (common practice): 4 x (10 x 20) in a
    # 20-wide strip tile exactly, length 40.
    items = [NestItem("r", box(0, 0, 20, 10), 4, (0.0, 90.0))]
    result = nest(items, strip_width_mm=20, effort=0.36, time_limit_s=CEILING_S)
    verify(result, items)
    assert result.strip_length_mm == pytest.approx(40.0, abs=1e-5)
    assert result.sheet_size_mm == (pytest.approx(40.0, abs=1e-5), 20.0)
    assert result.utilisation[0] == pytest.approx(1.0, abs=1e-5)
    assert result.remnant_mm is None


def test_strip_mode_with_margin():
    # Source: definitions (length = rightmost contour + margin).
    items = [NestItem("r", box(0, 0, 10, 10), 3, (0.0,))]
    result = nest(items, strip_width_mm=30, margin_mm=5, spacing_mm=1, effort=0.18, time_limit_s=CEILING_S)
    verify(result, items)
    independent_check(result, items, 5, 1)
    # usable width 30 - 2 x 5 = 20 holds one 10 mm square across (10 + 1 + 10 > 20): a row of three
    assert result.strip_length_mm == pytest.approx(5 + 10 + 1 + 10 + 1 + 10 + 5, abs=1e-5)


def test_sheets_remnant_and_lower_bound():
    # Source: area bound (common practice): 6 squares of 30 mm on 100 x 50: 5400 mm2
    # over a usable 5000 mm2 -> at least 2 sheets; only 3 fit per sheet.
    items = [NestItem("sq", box(0, 0, 30, 30), 6, (0.0,))]
    result = nest(items, sheet_mm=(100, 50), spacing_mm=2, effort=0.18, time_limit_s=CEILING_S)
    verify(result, items)
    assert result.area_lower_bound_sheets == 2
    assert len(result.sheets) == 2
    assert [len(s) for s in result.sheets] == [3, 3]
    # remnant: the full-height strip after the last part plus the spacing
    assert result.remnant_mm == pytest.approx((100 - (30 * 3 + 2 * 2) - 2, 50))
    assert result.utilisation == pytest.approx((2700 / 5000, 2700 / 5000))


def test_same_seed_same_layout_and_progress_reported():
    # Source: the issue (deterministic for a given seed); progress in [0, 1].
    items = [NestItem("ell", Polygon([(0, 0), (30, 0), (30, 10), (10, 10), (10, 30), (0, 30)]), 5,
                      (0.0, 90.0, 180.0, 270.0)), NestItem("tri", Polygon([(0, 0), (25, 0), (0, 20)]), 4, (0.0, 180.0))]
    seen = []
    a = nest(items, sheet_mm=(80, 60), spacing_mm=1, effort=0.54, time_limit_s=CEILING_S, seed=7,
             progress=lambda f, msg: seen.append((f, msg)))
    b = nest(items, sheet_mm=(80, 60), spacing_mm=1, effort=0.54, time_limit_s=CEILING_S, seed=7)
    key = lambda r: [[(p.item, p.copy, p.x_mm, p.y_mm, p.angle_deg) for p in s] for s in r.sheets]  # noqa: E731
    assert a.stopped_by != "time_limit" and b.stopped_by != "time_limit"
    assert key(a) == key(b)
    assert seen and all(0.0 <= f <= 1.0 for f, _ in seen) and seen[-1][0] == 1.0


def test_placed_polygon_follows_the_documented_transform():
    # Source: the convention of the ESICUP README (turn CCW about (0, 0), then move).
    poly = Polygon([(3, 1), (13, 1), (13, 4), (3, 4)])
    items = [NestItem("bar", poly, 1, (90.0,))]
    result = nest(items, sheet_mm=(20, 20), time_limit_s=0)
    p = result.sheets[0][0]
    expect = affinity.translate(affinity.rotate(poly, p.angle_deg, origin=(0, 0)), p.x_mm, p.y_mm)
    assert p.angle_deg == 90.0
    assert shapely.hausdorff_distance(expect, p.polygon) < 1e-9


# ---------------------------------------------------------------- bad input

def test_part_larger_than_the_sheet_is_named_with_both_sizes():
    items = [NestItem("base plate", box(0, 0, 300, 120), 1, (0.0, 90.0))]
    with pytest.raises(SheetgenError, match=r"base plate.*300 x 120 mm.*190 x 190 mm.*200 x 200 mm"):
        nest(items, sheet_mm=(200, 200), margin_mm=5)


@pytest.mark.parametrize("qty", [0, -2, 1.5])
def test_bad_quantity_refused(qty):
    with pytest.raises(SheetgenError, match="quantity"):
        nest([NestItem("p", box(0, 0, 1, 1), qty, (0.0,))], sheet_mm=(10, 10))


@pytest.mark.parametrize("kw", [dict(), dict(sheet_mm=(10, 10), strip_width_mm=10),
                                dict(sheet_mm=(10, 10), spacing_mm=-1), dict(sheet_mm=(10, 10), margin_mm=5),
                                dict(sheet_mm=(0, 10))])
def test_bad_options_refused(kw):
    with pytest.raises(SheetgenError):
        nest([NestItem("p", box(0, 0, 1, 1), 1, (0.0,))], **kw)


# ---------------------------------------------------------------- verify() catches broken layouts

@pytest.fixture(scope="module")
def good():
    items = [NestItem("a", box(0, 0, 20, 10), 2, (0.0,)), NestItem("b", Polygon([(0, 0), (15, 0), (0, 15)]), 2, (0.0,))]
    result = nest(items, sheet_mm=(100, 60), margin_mm=5, spacing_mm=2, time_limit_s=0)
    verify(result, items)
    return result, items


def _moved(p, dx, dy):
    return dataclasses.replace(p, x_mm=p.x_mm + dx, y_mm=p.y_mm + dy, polygon=affinity.translate(p.polygon, dx, dy))


def _with_sheet(result, sheet):
    return dataclasses.replace(result, sheets=(tuple(sheet),) + result.sheets[1:])


def test_verify_catches_overlap(good):
    result, items = good
    s = list(result.sheets[0])
    a, b = s[0], s[1]
    s[1] = _moved(b, a.polygon.centroid.x - b.polygon.centroid.x, a.polygon.centroid.y - b.polygon.centroid.y)
    with pytest.raises(GeometryBug, match="overlap|apart"):
        verify(_with_sheet(result, s), items)


def test_verify_catches_part_outside_the_margin(good):
    result, items = good
    s = list(result.sheets[0])
    s[0] = _moved(s[0], -(s[0].polygon.bounds[0] - 4.0), 0)  # 1 mm into the 5 mm margin
    with pytest.raises(GeometryBug, match="usable area"):
        verify(_with_sheet(result, s), items)


def test_verify_catches_parts_too_close(good):
    result, items = good
    s = list(result.sheets[0])
    # put part 1 exactly 1 mm (half the spacing) right of part 0
    a, b = s[0], s[1]
    s[1] = _moved(b, a.polygon.bounds[2] + 1.0 - b.polygon.bounds[0], a.polygon.bounds[1] - b.polygon.bounds[1])
    assert a.polygon.distance(s[1].polygon) == pytest.approx(1.0)
    with pytest.raises(GeometryBug, match="apart|overlap"):
        verify(_with_sheet(result, s), items)


def test_verify_catches_missing_and_doubled_parts(good):
    result, items = good
    s = list(result.sheets[0])
    with pytest.raises(GeometryBug, match="neither placed nor"):
        verify(_with_sheet(result, s[1:]), items)
    with pytest.raises(GeometryBug, match="twice"):
        verify(_with_sheet(result, s + [s[0]]), items)


def test_verify_catches_a_polygon_that_does_not_match_its_transform(good):
    result, items = good
    s = list(result.sheets[0])
    s[0] = dataclasses.replace(s[0], x_mm=s[0].x_mm + 0.5)
    with pytest.raises(GeometryBug, match="transform"):
        verify(_with_sheet(result, s), items)


# ---------------------------------------------------------------- the honest lower bound (hand counts)

def test_bound_counts_squares_that_cannot_share_a_sheet():
    # Hand count: 60 mm squares on a 100 mm sheet: 60 + 60 > 100 along x and
    # along y, so no two share a sheet: 3 squares need 3 sheets, although their
    # area (10,800 mm2) fits in 2 sheets (10,000 mm2 each).
    items = [NestItem("sq", box(0, 0, 60, 60), 3, (0.0, 90.0))]
    assert lower_bound_sheets(items, (100, 100), 0, 0) == 3
    result = nest(items, sheet_mm=(100, 100), effort=0.18, time_limit_s=CEILING_S)
    assert len(result.sheets) == 3 and result.lower_bound_sheets == 3
    assert result.area_lower_bound_sheets == 2


def test_bound_counts_the_spacing_between_neighbours():
    # Hand count, spacing 2 mm on a 100 x 100 sheet: four 49 mm squares fit
    # (49 + 2 + 49 = 100) on one sheet; 49.1 mm squares do not pair up
    # (49.1 + 2 + 49.1 = 100.2 > 100), so four of them need four sheets.
    fit = [NestItem("sq", box(0, 0, 49, 49), 4, (0.0,))]
    assert lower_bound_sheets(fit, (100, 100), 0, 2) == 1
    assert len(nest(fit, sheet_mm=(100, 100), spacing_mm=2, effort=0.36, time_limit_s=CEILING_S).sheets) == 1
    wide = [NestItem("sq", box(0, 0, 49.1, 49.1), 4, (0.0,))]
    assert lower_bound_sheets(wide, (100, 100), 0, 2) == 4


def test_bound_counts_a_window_only_for_the_parts_that_fit_it():
    # Hand count: a 100 mm frame with a 90 mm window fills a 100 mm sheet. A
    # 50 mm square fits the window; a 95 x 10 mm bar does not (95 > 90 both
    # ways), and there is no room beside the frame: 2 sheets. The plain area
    # ratio, (1,900 + 2,500 + 950) / 10,000, says 1.
    items = [NestItem("frame", frame(100, 90), 1, (0.0,)), NestItem("sq", box(0, 0, 50, 50), 1, (0.0,)),
             NestItem("bar", box(0, 0, 95, 10), 1, (0.0, 90.0))]
    assert lower_bound_sheets(items, (100, 100), 0, 0) == 2
    result = nest(items, sheet_mm=(100, 100), effort=0.36, time_limit_s=CEILING_S)
    verify(result, items)
    assert len(result.sheets) == 2 and result.lower_bound_sheets == 2 and result.area_lower_bound_sheets == 1


def test_bound_takes_margins_into_account():
    # Hand count: a 110 x 110 sheet with a 5 mm margin leaves 100 x 100; a
    # 60 mm square and a 45 mm square fit side by side (60 + 45 <= 100): 1 sheet;
    # with a 10 mm margin (90 x 90 usable) two 60 mm squares cannot share: 2.
    items = [NestItem("a", box(0, 0, 60, 60), 1, (0.0,)), NestItem("b", box(0, 0, 45, 45), 1, (0.0,))]
    assert lower_bound_sheets(items, (110, 110), 5, 0) == 1
    two = [NestItem("a", box(0, 0, 60, 60), 2, (0.0,))]
    assert lower_bound_sheets(two, (110, 110), 10, 0) == 2


# ---------------------------------------------------------------- work budget, ceiling, patterns

def test_what_ended_the_search_is_reported():
    # Source: the contract of nest() (stopped_by is "effort", "time_limit" or "converged").
    items = [NestItem("ell", Polygon([(0, 0), (30, 0), (30, 10), (10, 10), (10, 30), (0, 30)]), 6,
                      (0.0, 90.0, 180.0, 270.0))]
    assert nest(items, sheet_mm=(60, 50), effort=0.05, time_limit_s=600).stopped_by == "effort"
    assert nest(items, sheet_mm=(60, 50), effort=1000, time_limit_s=0).stopped_by == "time_limit"
    one = [NestItem("sq", box(0, 0, 10, 10), 1, (0.0,))]  # nothing to search: ends on its own
    assert nest(one, sheet_mm=(60, 50), effort=1000, time_limit_s=600).stopped_by == "converged"


def test_same_seed_and_effort_same_layout_whatever_the_time_limit():
    # Source: the contract of the work budget: the layout depends on seed and
    # effort only (the wall-clock ceiling is set far away in both runs).
    items = [NestItem("ell", Polygon([(0, 0), (30, 0), (30, 10), (10, 10), (10, 30), (0, 30)]), 7,
                      (0.0, 90.0, 180.0, 270.0)), NestItem("tri", Polygon([(0, 0), (25, 0), (0, 20)]), 5, (0.0, 180.0))]
    a = nest(items, sheet_mm=(80, 60), spacing_mm=1, effort=0.4, time_limit_s=3000, seed=3)
    b = nest(items, sheet_mm=(80, 60), spacing_mm=1, effort=0.4, time_limit_s=1000, seed=3)
    key = lambda r: [[(p.item, p.copy, p.x_mm, p.y_mm, p.angle_deg) for p in s] for s in r.sheets]  # noqa: E731
    assert key(a) == key(b) and a.work_units == b.work_units


def test_run_above_the_ceiling_is_refused_before_any_work():
    # Source: the contract (count and limit named). 10 million parts are far above it.
    items = [NestItem("sq", box(0, 0, 5, 5), 10_000_000, (0.0,))]
    with pytest.raises(RunTooLarge, match=r"10,000,000 parts.*limit"):
        nest(items, sheet_mm=(100, 100))
    with pytest.raises(RunTooLarge, match=r"GB of memory: the limit is 0\.0 GB"):
        nest([NestItem("sq", box(0, 0, 5, 5), 100, (0.0,))], sheet_mm=(100, 100), memory_limit_bytes=1000)


def test_large_run_is_cut_from_repeated_patterns(monkeypatch):
    # Hand count: 10 mm squares, spacing 0, on a 25 x 25 sheet: 2 x 2 per sheet
    # (3 x 10 > 25), so 40 squares need exactly 10 sheets, all alike; the area
    # bound is ceil(40 x 100 / 625) = 7 (no square is over half the sheet).
    from sheetgen.production.nesting import batches

    monkeypatch.setattr(batches, "BATCH_PARTS", 8)
    items = [NestItem("sq", box(0, 0, 10, 10), 20, (0.0,)), NestItem("sq2", box(0, 0, 10, 10), 20, (0.0,))]
    result = nest(items, sheet_mm=(25, 25), effort=1, time_limit_s=600)
    verify(result, items)
    independent_check(result, items, 0, 0)
    assert len(result.sheets) == 10 and result.lower_bound_sheets == 7
    groups = sheet_patterns(result)
    assert sum(len(g) for g in groups) == 10
    assert max(len(g) for g in groups) >= 4  # a batch of 8 gives 2 sheets: the first is repeated


# ---------------------------------------------------------------- the nest command

def _cli(*args):
    from click.testing import CliRunner

    from sheetgen.cli import main

    return CliRunner().invoke(main, [str(a) for a in args])


def test_nest_command_same_seed_and_effort_same_bytes(tmp_path):
    # Source: the contract of --effort (same seed and effort, same bytes on any
    # machine and load, with any --jobs); the wall-clock ceiling is far away in both runs.
    from tests.conftest import DEMO

    outs = []
    for k, (limit, jobs) in enumerate(((900, 1), (600, 2))):  # nor on the number of processes
        out = tmp_path / f"run{k}"
        res = _cli("nest", DEMO, "--kits", 2, "--effort", 1.5, "--time-limit", limit, "--seed", 4, "--jobs", jobs,
                   "-o", out, "--json")
        assert res.exit_code == 0, res.output
        outs.append((out, json.loads(res.output)))
    (a, ja), (b, jb) = outs
    assert ja["stopped_by"] in ("effort", "converged") and ja["stopped_by"] == jb["stopped_by"]
    assert ja["files"] == jb["files"] and ja["files"]
    for name in ja["files"]:
        assert (a / name).read_bytes() == (b / name).read_bytes()
    assert ja["lower_bound_sheets"] <= ja["sheets"]
    assert sum(p["count"] for p in ja["patterns"]) == ja["sheets"]
    assert sorted(k for p in ja["patterns"] for k in p["sheets"]) == list(range(1, ja["sheets"] + 1))


def test_nest_command_refuses_a_run_above_the_ceiling(tmp_path):
    # Source: the contract (exit 2, one line naming the count and the limit, nothing written).
    from tests.conftest import DEMO

    out = tmp_path / "big"
    res = _cli("nest", DEMO, "--kits", 100000, "-o", out)
    assert res.exit_code == 2
    assert "parts" in res.output and "limit" in res.output and "Traceback" not in res.output
    assert not out.exists()


def test_last_sheet_emptied_into_the_gaps_of_the_others():
    # Hand count: a 20 mm square on a 25 mm sheet leaves a 5 mm strip along two
    # sides; a 4 mm square fits there, so a second sheet holding only it goes.
    from sheetgen.production.nesting.engine import _empty_last
    from sheetgen.production.nesting.place import ShapeLibrary, Work

    lib = ShapeLibrary([box(0, 0, 20, 20), box(0, 0, 4, 4)], [(0.0,), (0.0,)], 0.0, 1e-7, 1000.0)
    usable = (0.0, 0.0, 25.0, 25.0)
    big, small = lib.item_shapes[0][0], lib.item_shapes[1][0]
    sheets = [[(0, big, 0, 0)], [(1, small, 0, 0)]]
    out = _empty_last(lib, sheets, usable, Work(), lambda: False)
    assert len(out) == 1 and sorted(e[0] for e in out[0]) == [0, 1]
    x, y = out[0][1][2] / lib.scale, out[0][1][3] / lib.scale
    assert x >= 20.0 - 1e-6 or y >= 20.0 - 1e-6  # beside the big square, not on it
    # a part too big for any gap stays where it is
    lib2 = ShapeLibrary([box(0, 0, 20, 20), box(0, 0, 6, 6)], [(0.0,), (0.0,)], 0.0, 1e-7, 1000.0)
    sheets2 = [[(0, lib2.item_shapes[0][0], 0, 0)], [(1, lib2.item_shapes[1][0], 0, 0)]]
    assert len(_empty_last(lib2, sheets2, usable, Work(), lambda: False)) == 2


# ---------------------------------------------------------------- assignment of parts to sheets

def _tiling_items(k: int):
    # Hand-made tiling (arithmetic on the sizes, independent of the code): with
    # spacing 2 each part claims its size + 2 in both directions, and the usable
    # 118 x 88 of a 120 x 90 sheet with a 1 mm margin offers 120 x 90 of claims.
    # Columns: 50 wide (three 48 x 28, claims 50 x 30 each, 90 high), 40 wide
    # (two 38 x 43, claims 40 x 45), 30 wide (one 28 x 88, claim 30 x 90):
    # 50 + 40 + 30 = 120. The claims fill the sheet, so k sets need k sheets and
    # fit on k (area bound, common practice, met by the construction).
    rots = (0.0, 90.0, 180.0, 270.0)
    return [NestItem("a", box(0, 0, 48, 28), 3 * k, rots), NestItem("b", box(0, 0, 38, 43), 2 * k, rots),
            NestItem("c", box(0, 0, 28, 88), k, rots)]


def test_parts_that_tile_the_sheets_exactly_need_no_more_sheets():
    items = _tiling_items(3)
    result = nest(items, sheet_mm=(120, 90), margin_mm=1, spacing_mm=2, effort=2, time_limit_s=600)
    verify(result, items)
    independent_check(result, items, 1, 2)
    assert result.lower_bound_sheets == 3
    assert len(result.sheets) == 3 and not result.unplaced


@st.composite
def guillotine_tilings(draw):
    """Parts cut from one usable area by a two-stage guillotine pattern: the
    width split into columns, each column's height split into pieces."""
    spacing = draw(st.sampled_from([0.0, 1.0, 3.0]))
    n_cols = draw(st.integers(1, 4))
    widths = [draw(st.integers(6, 40)) for _ in range(n_cols)]
    W = sum(widths)
    H = draw(st.integers(20, 80))
    pieces = []
    for w in widths:
        cuts = sorted(draw(st.sets(st.integers(6, H - 6), max_size=2)))
        edges = [0, *[c for c in cuts], H]
        hs = [b - a for a, b in zip(edges, edges[1:])]
        if any(h < 6 for h in hs):
            hs = [H]
        pieces += [(w - spacing, h - spacing) for h in hs]
    # the usable area is the claims' area less the spacing; a 2 mm margin around it
    return spacing, (W - spacing + 4, H - spacing + 4), pieces


REFUSED = {"tilings": 0, "drawn": 0}


@settings(max_examples=25, deadline=None)
@given(guillotine_tilings())
def test_a_guillotine_tiling_of_one_sheet_is_nested_on_one_sheet(tiling):
    # Source: the construction itself (the parts were cut from one sheet, so one
    # sheet holds them: area bound, common practice). Refused draws are counted
    # (pieces too thin for the spacing are not drawn).
    spacing, sheet, pieces = tiling
    REFUSED["drawn"] += 1
    if any(w <= 0.5 or h <= 0.5 for w, h in pieces):
        REFUSED["tilings"] += 1
        return
    items = [NestItem(f"p{k}", box(0, 0, w, h), 1, (0.0, 90.0)) for k, (w, h) in enumerate(pieces)]
    result = nest(items, sheet_mm=sheet, margin_mm=2, spacing_mm=spacing, effort=0.5, time_limit_s=600)
    verify(result, items)
    independent_check(result, items, 2, spacing)
    assert len(result.sheets) == 1 and not result.unplaced
    assert REFUSED["tilings"] <= REFUSED["drawn"] // 2 + 1


def test_reassign_empties_the_last_sheet_by_repacking_a_pair():
    # Hand count: two 50 x 100 parts fill a 100 x 100 sheet exactly. Sheet one
    # holds one of them in the middle (25 mm free on each side), sheet two the
    # other; repacking the pair puts both on one sheet.
    import random

    from sheetgen.production.nesting.assign import reassign
    from sheetgen.production.nesting.place import ShapeLibrary, Work

    lib = ShapeLibrary([box(0, 0, 50, 100)], [(0.0,)], 0.0, 1e-7, 1000.0)
    s = lib.item_shapes[0][0]
    mid = int(round(25 * lib.scale))
    sheets = [[(0, s, mid, 0)], [(0, s, 0, 0)]]
    work = Work()
    out = reassign(lib, sheets, (0.0, 0.0, 100.0, 100.0), 1, work, 10**9, random.Random(1), lambda: False)
    assert len(out) == 1 and len(out[0]) == 2
    xs = sorted(e[2] / lib.scale for e in out[0])
    assert xs[0] == pytest.approx(0, abs=1e-6) and xs[1] == pytest.approx(50, abs=1e-6)
    # nothing to gain: two 60 x 100 parts cannot share a 100 x 100 sheet
    lib2 = ShapeLibrary([box(0, 0, 60, 100)], [(0.0,)], 0.0, 1e-7, 1000.0)
    s2 = lib2.item_shapes[0][0]
    same = reassign(lib2, [[(0, s2, 0, 0)], [(0, s2, 0, 0)]], (0.0, 0.0, 100.0, 100.0), 1, Work(), 10**9,
                    random.Random(1), lambda: False)
    assert len(same) == 2


def test_frames_windows_take_the_parts_that_fit_them():
    # Hand count: a 100 mm frame with an 80 mm window fills a 100 x 100 sheet,
    # so nine 20 mm squares (3 x 20 + 2 x 3 mm spacing + 2 x 3 mm to the window
    # edge = 72 <= 80) can only go into the window: one sheet for all ten.
    items = [NestItem("frame", frame(100, 80), 1, (0.0,)), NestItem("sq", box(0, 0, 20, 20), 9, (0.0,))]
    result = nest(items, sheet_mm=(100, 100), spacing_mm=3, effort=2, time_limit_s=600)
    verify(result, items)
    independent_check(result, items, 0, 3)
    assert len(result.sheets) == 1 and not result.unplaced


@pytest.mark.parametrize("sheet", [(40, 30), (65, 30), (100, 35)])
def test_parts_alike_in_size_keep_their_own_allowed_angles(sheet):
    # Source: the contract of NestItem.rotations_deg (a part turns only by the
    # angles it allows). Two parts of the same 30 x 10 box, one allowed a
    # quarter turn, one not: upright 10 x 30 boxes stack in columns, and only
    # the first may stand in them.
    items = [NestItem("turns", box(0, 0, 30, 10), 3, (0.0, 90.0)), NestItem("fixed", box(0, 0, 30, 10), 3, (0.0,))]
    result = nest(items, sheet_mm=sheet, effort=1, time_limit_s=600)
    verify(result, items)
    independent_check(result, items, 0, 0)
    for s in result.sheets:
        for p in s:
            assert p.angle_deg in items[p.item].rotations_deg


def test_strip_cost_never_trades_a_part_for_a_tidier_layout():
    # Internal cross-check of the strip search's cost (production/nesting/improve.py _strip_cost):
    # leaving a part out must cost more than any layout that places every part, however far right
    # that layout reaches, or the search would drop parts to tidy the rest; among layouts that place
    # every part, the one reaching less far costs less.
    from sheetgen.production.nesting.decode import Decoder
    from sheetgen.production.nesting.improve import _strip_cost
    from sheetgen.production.nesting.place import ShapeLibrary, Work

    lib = ShapeLibrary([box(0, 0, 10, 10), box(0, 0, 4, 4)], [(0.0,), (0.0,)], 0.0, 1e-7, 1000.0)
    parts = [0, 0, 0, 1]   # three 10 mm squares and a 4 mm one, in a strip 10 mm wide
    plan = [(p, None) for p in range(len(parts))]

    def cost_in(length):
        dec = Decoder(lib, parts, (0.0, 0.0, length, 10.0), 1, Work())
        cost, all_placed = _strip_cost(lib, parts, 0.0, length)
        d = dec.decode(plan)
        return cost(d), all_placed, d.final

    short, ceiling, st = cost_in(25.0)           # room for two squares and the small one
    assert st.unplaced and short >= 16.0 > ceiling  # at least the small square's area is left out
    roomy, _, st = cost_in(100.0)
    assert not st.unplaced and roomy < ceiling
    snug, _, st = cost_in(34.0)                  # the same layout in a strip it nearly fills
    assert not st.unplaced and roomy < snug < ceiling
