"""Kerf compensation: what a round beam leaves is the nominal part again.

The beam is round, one kerf across; its centre follows the cut path. The
oracle here is that round beam (tests/_refs.py): the material left is the path
polygon less the disks swept along every ring, never the code's own offset.
Kerf compensation offsets the path by half the kerf onto the waste side
(common practice). What the round beam must leave:

* every straight edge and every outer (convex) corner exactly where drawn: a
  disk sweeping round the outside of a sharp path corner leaves a sharp corner
  on the inside of the turn;
* in every reflex corner of the part (the inside corner of a slot, the corner
  of a notch) a fillet of radius kerf/2, since a round tool cannot reach a
  sharp inside corner (common practice); its area r^2 (cot(t/2) - (pi - t)/2)
  and its reach r / sin(t/2) - r follow from the corner's angle t (geometry);
* along curves tighter than the beam (gear roots, where the fillets overlap),
  the morphological closing of the part by the beam's disk (dilate, then erode:
  shapely's round buffer, a registry library).
"""

from __future__ import annotations

import math

import pytest
import shapely
from hypothesis import given, settings
from hypothesis import strategies as st
from shapely.geometry import Point, Polygon, box

from sheetgen.errors import ParameterError
from sheetgen.geometry.kerf import beam_leaves, cut_outline
from sheetgen.design.kit import build_kit
from sheetgen.design.spec import load_spec
from tests import _refs as R
from tests.conftest import DEMO

TOL = 0.01


def _same_boxes(a: Polygon, b: Polygon):
    assert all(abs(u - v) <= TOL for u, v in zip(a.bounds, b.bounds)), (a.bounds, b.bounds)
    ha = sorted(Polygon(r).bounds for r in a.interiors)
    hb = sorted(Polygon(r).bounds for r in b.interiors)
    assert len(ha) == len(hb)
    for u, v in zip(ha, hb):
        assert all(abs(p - q) <= TOL for p, q in zip(u, v)), (u, v)


def _noise_mm2(poly: Polygon) -> float:
    # the code snaps paths to a 1e-6 mm grid and the beam's disks are 256-gons: area noise of
    # the order of the outline's length times 1e-6 mm
    return 2e-6 * poly.length + 1e-6


def check_round_beam(nominal: Polygon, kerf: float) -> Polygon:
    """Cut ``nominal`` along its compensated path with a round beam and check what is left."""
    r = kerf / 2
    left = R.round_beam_leaves(cut_outline(nominal, kerf), kerf)
    noise = _noise_mm2(nominal)
    # the beam never cuts into the part
    assert nominal.difference(left).area <= noise
    extra = left.difference(nominal)
    fil = R.inside_corner_fillets(nominal, r)
    if fil.isolated:
        # closed form, corner by corner: the material kept in the reflex corners ...
        assert extra.area == pytest.approx(fil.area_mm2, rel=2e-3, abs=noise)
        # ... lies within each fillet's tangent length of its corner; edges elsewhere agree exactly
        if len(fil.corners_xy):
            near = shapely.union_all(shapely.buffer(shapely.points(fil.corners_xy), fil.tangent_mm + 1e-4))
            assert extra.difference(near).area <= noise
        else:
            assert extra.area <= noise
    else:
        # fillets overlap (curves tighter than the beam): the closing by the beam's disk
        closed = nominal.buffer(r, quad_segs=64).buffer(-r, quad_segs=64)
        assert left.symmetric_difference(closed).area <= 10 * noise
        # and never more than the corner sum allows per corner
        assert extra.area <= fil.area_mm2 * 1.5 + noise
    return left


def test_outer_grows_holes_shrink_by_half_kerf():
    # common practice: the path runs kerf/2 outside outer contours, kerf/2 inside holes
    part = box(0, 0, 100, 50).difference(box(40, 20, 43, 29))
    cut = cut_outline(part, 0.2)
    assert cut.bounds == pytest.approx((-0.1, -0.1, 100.1, 50.1), abs=1e-6)
    (hole,) = cut.interiors
    assert Polygon(hole).bounds == pytest.approx((40.1, 20.1, 42.9, 28.9), abs=1e-6)


def test_round_beam_keeps_outer_corners_sharp_and_rounds_slot_corners():
    # a 20 mm square with a 3 x 9 mm slot, kerf 0.3: the round beam leaves the square's outer corners
    # sharp (exact), and in each of the slot's 4 corners a fillet of radius 0.15 mm whose area is
    # r^2 (1 - pi/4) = 0.0225 * 0.214602 = 0.0048285 mm2 and whose arc stands r (sqrt 2 - 1) = 0.0621 mm
    # off the corner (hand calculation)
    kerf, r = 0.3, 0.15
    part = box(0, 0, 20, 20).difference(box(8.5, 5, 11.5, 14))
    path = cut_outline(part, kerf)
    # the compensated path's outer corner is mitred: kerf/2 * sqrt 2 out along the diagonal
    assert min(Point(c).distance(Point(-0.15, -0.15)) for c in path.exterior.coords) < 1e-6
    left = check_round_beam(part, kerf)
    assert Polygon(left.exterior).symmetric_difference(box(0, 0, 20, 20)).area < 1e-6
    fil = R.inside_corner_fillets(part, r)
    assert fil.area_mm2 == pytest.approx(4 * 0.0048285, abs=1e-6)
    assert fil.reach_mm == pytest.approx(0.0621, abs=1e-4)
    (hole,) = left.interiors
    corner = Point(8.5, 5)
    assert Polygon(hole).exterior.distance(corner) == pytest.approx(r * (math.sqrt(2) - 1), abs=1e-4)
    # the slot's straight edges stay where drawn: the hole's box is the slot's
    assert Polygon(hole).bounds == pytest.approx((8.5, 5, 11.5, 14), abs=1e-6)
    # internal cross-check: the code's own inverse (a mitred erosion) gives the sharp slot back
    assert beam_leaves(path, kerf).symmetric_difference(part).area < 1e-6


def test_arcs_stay_round():
    # geometry: an offset circle is a circle of the same centre
    disc = Point(0, 0).buffer(10, quad_segs=64)
    cut = cut_outline(disc, 0.2)
    radii = [math.hypot(x, y) for x, y in cut.exterior.coords]
    assert min(radii) >= 10.1 - TOL and max(radii) <= 10.1 + TOL


@pytest.mark.parametrize("kerf", [0.1, 0.3, 0.5])
def test_round_beam_leaves_the_gears(demo_spec, kerf):
    # gear roots are curves tighter than a wide beam: the closing by the beam's disk is the reference
    kit = build_kit(load_spec(DEMO, [f"laser.kerf={kerf}"]))
    for name in ("pinion", "wheel"):
        part = kit.part(name)
        left = check_round_beam(part.fit_outline, kerf)
        _same_boxes(left, part.fit_outline)


@given(kerf=st.floats(0.05, 0.5), width=st.floats(60, 300), height=st.floats(50, 200))
@settings(max_examples=10)
def test_round_beam_leaves_the_nominal_part_for_every_kit_part(kerf, width, height):
    try:
        spec = load_spec(DEMO, [f"laser.kerf={kerf}", f"panel.width={width}", f"panel.height={height}",
                                "sheet.width=1000", "sheet.height=800", "axle.height=200"])
        kit = build_kit(spec)
    except ParameterError as exc:
        R.refused(str(exc).split(":")[0])
        return
    R.kept()
    for part in kit.parts:
        if part.name in ("pinion", "wheel"):
            continue        # the same for every panel size: test_round_beam_leaves_the_gears
        left = check_round_beam(part.fit_outline, kerf)
        # snug fit: the fit outline is the nominal outline except press-fit bores; edges where drawn
        _same_boxes(left, part.fit_outline)
        # outside bounding box is the nominal one whatever the fit
        assert all(abs(u - v) <= TOL for u, v in zip(left.bounds, part.outline.bounds))
        # internal cross-check: the code's own mitred inverse gives the fit outline back
        assert beam_leaves(cut_outline(part.fit_outline, kerf), kerf).symmetric_difference(
            part.fit_outline).area <= _noise_mm2(part.fit_outline) + 1e-3
