"""The honest lower bound of sheets (sheetgen.production.nesting.bound): windows that hold
at most one of their large parts, and parts with windows of their own lying in a window.

Expected values are hand counts from the area argument written out in each test; the
two-disc fit rule is plane geometry (common practice): two discs of diameter d fit side by
side in a W x H rectangle (d <= W, d <= H) exactly when their centres, confined to a
(W - d) x (H - d) rectangle, can be d apart, i.e. when (W - d)^2 + (H - d)^2 >= d^2.
"""

from __future__ import annotations

import math

import pytest
import shapely
from hypothesis import given, settings
from hypothesis import strategies as st
from shapely.geometry import Point, Polygon, box

from sheetgen.production.nesting import NestItem, lower_bound_sheets, nest, verify
from sheetgen.production.nesting.bound import _triangles

CEILING_S = 120.0
SEGS = 64  # sides of a polygon disc (its area is within 0.2 % of the circle's)


def disc(d: float) -> Polygon:
    return Point(d / 2, d / 2).buffer(d / 2, quad_segs=SEGS // 4)


def frame_with_window(w: float, h: float, ww: float, wh: float) -> Polygon:
    """A w x h plate with a centred ww x wh window."""
    mx, my = (w - ww) / 2, (h - wh) / 2
    return Polygon(box(0, 0, w, h).exterior, [box(mx, my, mx + ww, my + wh).exterior])


def two_discs_fit(d: float, w: float, h: float) -> bool:
    """Plane geometry (module doc): two discs of diameter d side by side in w x h."""
    return d <= w and d <= h and (w - d) ** 2 + (h - d) ** 2 >= d ** 2


def test_the_two_disc_rule_decides_the_cases_below():
    # the rule itself, on the sizes used here (hand arithmetic): 66 mm discs in 120 x 80:
    # 54^2 + 14^2 = 3,112 < 4,356; 50 mm discs: 70^2 + 30^2 = 5,800 >= 2,500
    assert not two_discs_fit(66, 120, 80)
    assert two_discs_fit(50, 120, 80)


def test_a_window_that_holds_one_large_disc_leaves_the_second_outside():
    # A 200 x 160 plate with a 120 x 80 window on a 200 x 160 sheet (no margin, no spacing):
    # the plate covers the sheet but its window, so anything else goes in the window or on
    # another sheet. Two 66 mm discs cannot share the window (two-disc rule): hand count by
    # the area argument: plate 32,000 - 9,600 = 22,400; discs 2 x a; the window holds at most
    # one disc, so at least 9,600 - a of it stays empty:
    #   (22,400 + 2a + 9,600 - a) / 32,000 > 1  ->  2 sheets.
    items = [NestItem("plate", frame_with_window(200, 160, 120, 80), 1, (0.0,)),
             NestItem("disc", disc(66), 2, (0.0, 90.0, 180.0, 270.0))]
    a = items[1].polygon.area
    assert (22_400 + 2 * a + 9_600 - a) / 32_000 > 1
    assert lower_bound_sheets(items, (200, 160), 0, 0) == 2
    result = nest(items, sheet_mm=(200, 160), effort=0.36, time_limit_s=CEILING_S)
    verify(result, items)
    assert len(result.sheets) == 2 and result.lower_bound_sheets == 2


def test_a_window_that_holds_two_discs_is_counted_full():
    # The same plate with two 50 mm discs: they fit side by side in the window (two-disc
    # rule), so the area argument allows one sheet, and one sheet it is.
    items = [NestItem("plate", frame_with_window(200, 160, 120, 80), 1, (0.0,)),
             NestItem("disc", disc(50), 2, (0.0, 90.0, 180.0, 270.0))]
    assert lower_bound_sheets(items, (200, 160), 0, 0) == 1
    result = nest(items, sheet_mm=(200, 160), effort=0.36, time_limit_s=CEILING_S)
    verify(result, items)
    assert len(result.sheets) == 1


def test_the_spacing_is_counted_in_the_window():
    # Spacing 2: a disc lies 2 mm from the window's edge and from the other disc, so the
    # question is two discs of d + 2 in a window of (124 - 2) x (84 - 2) (each grown by half
    # the spacing, the window shrunk by it). 56 mm discs: 58 in 122 x 82: 64^2 + 24^2 = 4,672
    # >= 3,364 fits; 62 mm: 64 in 122 x 82: 58^2 + 18^2 = 3,688 < 4,096 does not.
    assert two_discs_fit(58, 122, 82) and not two_discs_fit(64, 122, 82)
    plate = NestItem("plate", frame_with_window(204, 164, 124, 84), 1, (0.0,))
    sheet = (206, 166)  # 1 mm either side of the plate: nothing fits beside it
    fits = [plate, NestItem("disc", disc(56), 2, (0.0,))]
    tight = [plate, NestItem("disc", disc(62), 2, (0.0,))]
    assert lower_bound_sheets(fits, sheet, 0, 2) == 1
    assert lower_bound_sheets(tight, sheet, 0, 2) == 2
    result = nest(fits, sheet_mm=sheet, spacing_mm=2, effort=0.36, time_limit_s=CEILING_S)
    verify(result, fits)
    assert len(result.sheets) == 1


def test_a_ring_in_a_window_with_a_part_in_its_own_hole_is_one_sheet():
    # A 100 mm plate with an 80 mm window; a 70 mm ring with a 50 mm hole fits the window and a
    # 10 mm square fits the ring's hole: all three on one 100 x 100 sheet, as a hand layout
    # shows (ring centred in the window, square centred in the ring). The ring's hole lies
    # inside the plate's window, so it is not empty room twice: hand count by the area argument,
    # plate 10,000 - 6,400 = 3,600, ring 4,900 - 2,500 = 2,400, square 100; the windows (6,400 +
    # 2,500) less what the parts in them fill (ring with its hole closed, 4,900, and the square,
    # 100) leave 3,900: (3,600 + 2,400 + 100 + 3,900) / 10,000 = 1 sheet.
    plate = Polygon(box(0, 0, 100, 100).exterior, [box(10, 10, 90, 90).exterior])
    ring = Polygon(box(0, 0, 70, 70).exterior, [box(10, 10, 60, 60).exterior])
    items = [NestItem("plate", plate, 1, (0.0,)), NestItem("ring", ring, 1, (0.0,)),
             NestItem("square", box(0, 0, 10, 10), 1, (0.0,))]
    layout = [plate, shapely.affinity.translate(ring, 15, 15), box(45, 45, 55, 55)]
    assert all(not a.overlaps(b) and a.intersection(b).area == 0
               for i, a in enumerate(layout) for b in layout[i + 1:])
    assert (3_600 + 2_400 + 100 + (6_400 + 2_500 - 4_900 - 100)) / 10_000 == 1.0
    assert lower_bound_sheets(items, (100, 100), 0, 0) == 1


@settings(max_examples=25)
@given(st.floats(30, 110), st.floats(60, 140), st.floats(40, 100), st.sampled_from([0.0, 1.0, 3.0]))
def test_the_bound_agrees_with_the_two_disc_rule(d, ww, wh, spacing):
    # Property: a plate that fills its sheet but for a window, and two equal discs. Far from
    # the rule's edge (5 % on d), the bound says 2 exactly when the two-disc rule says they
    # cannot share the window and the area argument then needs a second sheet, else 1
    # (plane geometry as in the module doc; the discs are 64-gons, inside their circles).
    g = d + spacing
    w_in, h_in = ww - spacing, wh - spacing
    if not (g <= w_in and g <= h_in):
        return
    edge = [two_discs_fit(g * f, w_in, h_in) for f in (0.95, 1.0, 1.05)]
    if len(set(edge)) > 1:
        return  # too near the rule's edge for a 64-gon
    w, h = ww + 60, wh + 60
    items = [NestItem("plate", frame_with_window(w, h, ww, wh), 1, (0.0,)),
             NestItem("disc", disc(d), 2, (0.0, 90.0, 180.0, 270.0))]
    bound = lower_bound_sheets(items, (w + spacing, h + spacing), spacing / 2, spacing)
    assert bound == (1 if edge[1] else 2)


def test_the_convex_pieces_cover_the_region_exactly():
    # Internal cross-check of the exclusion proof's pieces: each convex, none overlapping,
    # their union the region (a part with a hole and a notch).
    region = Polygon([(0, 0), (60, 0), (60, 40), (35, 40), (35, 20), (25, 20), (25, 40), (0, 40)],
                     [[(5, 5), (15, 5), (15, 15), (5, 15)]])
    pieces = [Polygon(p) for p in _triangles(region)]
    assert len(pieces) < len(shapely.get_parts(shapely.constrained_delaunay_triangles(region)))
    for p in pieces:
        assert p.is_valid and p.convex_hull.area == pytest.approx(p.area, rel=1e-9)
    assert sum(p.area for p in pieces) == pytest.approx(region.area, rel=1e-9)
    assert shapely.union_all(pieces).symmetric_difference(region).area < 1e-9


def test_the_bound_of_a_run_on_two_cores_is_the_hand_count_and_its_proofs_stay_with_the_caller():
    # Internal cross-check of the concurrent path (sheetgen/production/nesting/engine.py, _Bound):
    # with two jobs the bound is computed in a second process while the layouts are made. The
    # run is the first case above, whose bound is 2 by the hand count written there; the run on
    # two cores reports that bound, lays out the same sheets as on one core, and the proofs the
    # second process made are kept by the caller (a second count here makes none anew).
    from sheetgen.production.nesting import bound as bound_mod

    items = [NestItem("plate", frame_with_window(200, 160, 120, 80), 1, (0.0,)),
             NestItem("disc", disc(66), 2, (0.0, 90.0, 180.0, 270.0))]
    bound_mod._EXCLUSIVE.clear()
    on_two = nest(items, sheet_mm=(200, 160), effort=0.36, time_limit_s=CEILING_S, jobs=2)
    value, fresh = bound_mod.bound_and_proofs(items, (200, 160), 0, 0)
    assert value == 2 and fresh == {}
    on_one = nest(items, sheet_mm=(200, 160), effort=0.36, time_limit_s=CEILING_S, jobs=1)

    def layout(r):
        return [[(p.item, p.copy, p.x_mm, p.y_mm, p.angle_deg) for p in sheet] for sheet in r.sheets]

    for result in (on_two, on_one):
        verify(result, items)
        assert result.lower_bound_sheets == 2
    assert layout(on_two) == layout(on_one)
