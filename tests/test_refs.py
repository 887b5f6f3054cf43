"""The test references themselves (tests/_refs.py), held to closed forms and hand calculations,
and the refused-draw tally shown to fail a test that refuses most of its draws."""

from __future__ import annotations

import math

import pytest
from shapely.geometry import Point, box

from tests import _refs as R

pytest_plugins = ["pytester"]


def test_round_beam_on_a_notched_square():
    # a round beam of radius 0.25 mm along a path: the part left is the path eroded by the disk
    # (a swept disk); for an L-shaped path the one reflex corner keeps a quarter-disk fillet
    # r^2 (1 - pi/4) = 0.0625 * 0.214602 = 0.013413 mm2 (hand calculation)
    path = box(0, 0, 10, 10).difference(box(5, 5, 11, 11))
    left = R.round_beam_leaves(path, 0.5, quad_segs=256)
    eroded_ref = path.buffer(-0.25, join_style="mitre")        # sharp inside, then add the fillet
    assert left.area == pytest.approx(eroded_ref.area + 0.013413, abs=2e-5)
    fil = R.inside_corner_fillets(eroded_ref, 0.25)
    assert fil.isolated and fil.area_mm2 == pytest.approx(0.013413, abs=1e-6)
    assert fil.reach_mm == pytest.approx(0.25 * (math.sqrt(2) - 1), abs=1e-12)
    assert len(fil.corners_xy) == 1 and tuple(fil.corners_xy[0]) == pytest.approx((4.75, 4.75))


def test_corner_angles_of_a_square_hole():
    # the waste side of a square hole's corners spans 90 deg; the outer corners of the part are convex
    part = box(0, 0, 10, 10).difference(box(4, 4, 6, 6))
    fil = R.inside_corner_fillets(part, 0.1)
    assert len(fil.corners_xy) == 4
    assert fil.area_mm2 == pytest.approx(4 * 0.01 * (1 - math.pi / 4), rel=1e-12)
    # a disk has no reflex corners at all
    assert R.inside_corner_fillets(Point(0, 0).buffer(5), 0.1).area_mm2 == 0.0


def test_inverse_involute_by_bisection():
    # inv 20 deg = 0.014904 (Elements of Metric Gear Technology table, from memory)
    assert math.degrees(R.inv_inverse(0.014904)) == pytest.approx(20.0, abs=1e-3)


def test_tally_fails_a_test_that_refuses_most_draws(pytester):
    pytester.makeconftest("from tests.conftest import pytest_runtest_call  # noqa: F401\n")
    pytester.makepyfile(test_probe="""
        from hypothesis import given, strategies as st
        from tests import _refs as R

        @given(st.integers(0, 9))
        def test_mostly_refused(n):
            if n < 8:
                R.refused("small")
                return
            R.kept()

        @given(st.integers(0, 9))
        def test_mostly_kept(n):
            if n < 2:
                R.refused("small")
                return
            R.kept()
    """)
    result = pytester.runpytest_inprocess("-p", "no:cacheprovider")
    result.assert_outcomes(passed=1, failed=1)
    result.stdout.fnmatch_lines(["*test_mostly_refused: 8 of 10 draws refused (small x8)*"])
