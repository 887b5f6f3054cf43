"""Kerf compensation: what the beam leaves is the nominal part again.

The beam removes a band one kerf wide centred on its path, so the part left
inside a cut path is the path's polygon eroded by kerf/2 (common practice:
kerf compensation offsets the path by half the kerf onto the waste side).
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st
from shapely.geometry import Point, Polygon, box

from sheetgen.errors import ParameterError
from sheetgen.geometry.kerf import beam_leaves, cut_outline
from sheetgen.kit import build_kit
from sheetgen.spec import load_spec
from tests.conftest import DEMO

TOL = 0.01


def _hole_boxes(poly: Polygon):
    return sorted(tuple(round(v, 1) for v in Polygon(r).bounds) for r in poly.interiors), \
        sorted(Polygon(r).bounds for r in poly.interiors)


def _same_boxes(a: Polygon, b: Polygon):
    assert all(abs(u - v) <= TOL for u, v in zip(a.bounds, b.bounds)), (a.bounds, b.bounds)
    ha = sorted(Polygon(r).bounds for r in a.interiors)
    hb = sorted(Polygon(r).bounds for r in b.interiors)
    assert len(ha) == len(hb)
    for u, v in zip(ha, hb):
        assert all(abs(p - q) <= TOL for p, q in zip(u, v)), (u, v)


def test_outer_grows_holes_shrink_by_half_kerf():
    part = box(0, 0, 100, 50).difference(box(40, 20, 43, 29))
    cut = cut_outline(part, 0.2)
    assert cut.bounds == pytest.approx((-0.1, -0.1, 100.1, 50.1), abs=1e-6)
    (hole,) = cut.interiors
    assert Polygon(hole).bounds == pytest.approx((40.1, 20.1, 42.9, 28.9), abs=1e-6)


def test_sharp_corners_stay_sharp():
    # A mitred corner of the cut path reaches kerf/2 * sqrt(2) out at 90 degrees;
    # the part it leaves keeps its sharp nominal corner.
    square = box(0, 0, 20, 20)
    cut = cut_outline(square, 0.3)
    assert len(cut.exterior.coords) == 5
    assert Point(-0.15, -0.15).distance(Point(cut.exterior.coords[0])) < 1e-6 or \
        min(Point(c).distance(Point(-0.15, -0.15)) for c in cut.exterior.coords) < 1e-6
    left = beam_leaves(cut, 0.3)
    assert left.symmetric_difference(square).area < 1e-6


def test_arcs_stay_round():
    disc = Point(0, 0).buffer(10, quad_segs=64)
    cut = cut_outline(disc, 0.2)
    radii = [math.hypot(x, y) for x, y in cut.exterior.coords]
    assert min(radii) >= 10.1 - TOL and max(radii) <= 10.1 + TOL


@given(kerf=st.floats(0.05, 0.5), width=st.floats(60, 300), height=st.floats(50, 200))
def test_beam_leaves_the_nominal_part_for_every_kit_part(kerf, width, height):
    try:
        spec = load_spec(DEMO, [f"laser.kerf={kerf}", f"panel.width={width}", f"panel.height={height}",
                                "sheet.width=1000", "sheet.height=800", "axle.height=200"])
        kit = build_kit(spec)
    except ParameterError:
        return
    for part in kit.parts:
        left = beam_leaves(cut_outline(part.fit_outline, kerf), kerf)
        # snug fit: the fit outline is the nominal outline except press-fit bores
        _same_boxes(left, part.fit_outline)
        assert abs(left.area - part.fit_outline.area) < 0.01 * part.fit_outline.length * TOL + 1e-3
        # outside bounding box is the nominal one whatever the fit
        assert all(abs(u - v) <= TOL for u, v in zip(left.bounds, part.outline.bounds))
