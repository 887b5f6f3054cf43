"""The sweep's faster measures: the distance of two prisms measured on their clipped
near parts, and the slab bound (a plate seen along x slice by slice).

Reference: OpenCascade (through cadquery, a registry package) measuring the whole
solids: BRepExtrema_DistShapeShape for distances, a boolean common for shared
volume. Geometry facts (common practice): a subset is never nearer than the set it
is cut from; projecting along an axis never lengthens a distance.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from shapely import affinity
from shapely.geometry import Point, Polygon

from sheetgen.geometry.placement import Placement
from tests import _refs as R

pytest.importorskip("cadquery", reason="cadquery (the OpenCascade kernel) is needed for the 3D reference")


def _occ_full_distance(pa, pb) -> float:
    """OpenCascade's distance of the two whole prisms' boundaries."""
    from OCP.BRepExtrema import BRepExtrema_DistShapeShape

    from sheetgen.model3d.solids import prism_solid

    sa, sb = prism_solid(pa), prism_solid(pb)
    return float(BRepExtrema_DistShapeShape(sa.Shells()[0].wrapped, sb.Shells()[0].wrapped).Value())


def _occ_common_mm3(pa, pb) -> float:
    from sheetgen.model3d.solids import prism_solid

    return float(prism_solid(pa).intersect(prism_solid(pb)).Volume())


def _slab_bound(turning, fixed, angle_deg: float) -> float:
    from sheetgen.model3d.bodies import _x_gap
    from sheetgen.model3d.sweep import x_slabs

    proj = affinity.rotate(turning.yz_projection(), angle_deg, origin=(0.0, 0.0))
    return min(math.hypot(_x_gap(turning.x_range_mm(), rng), float(proj.distance(hull)))
               for hull, rng in x_slabs(fixed))


@pytest.fixture(scope="module")
def demo_model(demo_spec, demo_kit):
    from sheetgen.model3d.solids import build_model

    return build_model(demo_kit, demo_spec)


# a gear wheel against the motor box's side plate (perpendicular plates, thousands of faces on one
# side), the base against a stretcher and the tray against a rib (perpendicular, few faces)
PAIRS = [("wheel#2", "motor-brace#1"), ("wheel#1", "motor-brace#2"), ("tray#1", "rib#1")]
FIXED_PAIRS = [("base#1", "stretcher#1"), ("base#1", "axle-support#2")]


@pytest.mark.parametrize("turning, fixed", PAIRS)
def test_clipped_distance_of_turning_parts_is_the_kernels_whole_distance(demo_model, turning, fixed):
    from sheetgen.model3d.measures import _Measures

    meas = _Measures(demo_model)
    a, b = demo_model.body(turning), demo_model.body(fixed)
    for ang in (-60.0, -17.0, 0.0, 3.0, 44.0):
        pa, pb = a.pieces[0].turned(ang), b.pieces[0]
        if _occ_common_mm3(pa, pb) > 1e-6:
            continue  # the measure is for parts that share no volume
        d = _occ_full_distance(pa, pb)
        assert meas.distance_mm(a, b, ang, 0.0) == pytest.approx(d, abs=1e-6), (turning, fixed, ang)
        # the slab bound the sweep prunes with never exceeds the distance
        assert _slab_bound(pa.turned(0.0), pb, 0.0) <= d + 1e-6, (turning, fixed, ang)


@pytest.mark.parametrize("a_name, b_name", FIXED_PAIRS)
def test_clipped_distance_of_fixed_parts_is_the_kernels_whole_distance(demo_model, a_name, b_name):
    from sheetgen.model3d.measures import clipped_distance_mm

    pa, pb = demo_model.body(a_name).pieces[0], demo_model.body(b_name).pieces[0]
    assert clipped_distance_mm(pa, pb) == pytest.approx(_occ_full_distance(pa, pb), abs=1e-6)


def test_the_slab_bound_prunes_the_wheel_against_the_motor_box(demo_model):
    # a side plate of the motor box stands 2 mm beyond the wheel along x with a tab; its edge is
    # 5 mm beyond. Seen whole along x the bound is the 2 mm tab gap; slice by slice the plate's edge
    # gives hypot(5, radial gap), within a hundredth of the distance (the kernel's)
    a, b = demo_model.body("wheel#2").pieces[0], demo_model.body("motor-brace#1").pieces[0]
    d = _occ_full_distance(a, b)
    whole = math.hypot(2.0, float(a.yz_projection().distance(b.yz_projection())))
    sliced = _slab_bound(a, b, 0.0)
    assert whole < d - 2.0
    assert d - 0.01 <= sliced <= d + 1e-6


def _gear_like(teeth: int, r_root: float, r_tip: float, bore: float) -> Polygon:
    pts = []
    for k in range(teeth * 4):
        t = 2 * math.pi * k / (teeth * 4)
        r = r_tip if k % 4 in (1, 2) else r_root
        pts.append((r * math.cos(t), r * math.sin(t)))
    return Polygon(pts).difference(Point(0, 0).buffer(bore, 16))


def _rotation(yaw: float, pitch: float, roll: float) -> tuple:
    cy, sy, cp, sp, cr, sr = (math.cos(yaw), math.sin(yaw), math.cos(pitch), math.sin(pitch), math.cos(roll),
                              math.sin(roll))
    rz = np.array([[cy, -sy, 0], [sy, cy, 0], [0, 0, 1]])
    ry = np.array([[cp, 0, sp], [0, 1, 0], [-sp, 0, cp]])
    rx = np.array([[1, 0, 0], [0, cr, -sr], [0, sr, cr]])
    m = rz @ ry @ rx
    return tuple(tuple(float(v) for v in row) for row in m)


@settings(max_examples=12, deadline=None, derandomize=True)
@given(teeth=st.integers(12, 60), depth=st.floats(1.5, 8.0), yaw=st.floats(-3.2, 3.2), pitch=st.floats(-1.6, 1.6),
       roll=st.floats(-3.2, 3.2), dx=st.floats(-30, 30), dy=st.floats(-60, 60), dz=st.floats(-60, 60))
def test_clipped_distance_and_slab_bound_hold_for_random_plates(teeth, depth, yaw, pitch, roll, dx, dy, dz):
    from sheetgen.model3d.bodies import Prism
    from sheetgen.model3d.measures import clipped_distance_mm
    from sheetgen.model3d.sweep import x_slabs

    wheel = Prism(_gear_like(teeth, 30.0, 33.0, 4.0), 3.0,
                  Placement(((0.0, 0.0, 1.0), (1.0, 0.0, 0.0), (0.0, 1.0, 0.0)), (0.0, 0.0, 0.0), True))
    notched = Polygon([(0, 0), (40, 0), (40, 12), (25, 12), (25, 20), (15, 20), (15, 12), (0, 12)])
    plate = Prism(notched, depth, Placement(_rotation(yaw, pitch, roll), (dx, dy, dz), False))
    if _occ_common_mm3(wheel, plate) > 1e-6:
        R.refused("the plate cuts into the wheel")
        return
    R.kept()
    d = _occ_full_distance(wheel, plate)
    assert clipped_distance_mm(wheel, plate) == pytest.approx(d, abs=1e-6)
    assert clipped_distance_mm(plate, wheel) == pytest.approx(d, abs=1e-6)
    assert _slab_bound(wheel, plate, 0.0) <= d + 1e-6
    # every vertex of the plate lies in a slab's x range with its y-z inside that slab's polygon
    slabs = x_slabs(plate)
    for p in plate.corners():
        assert any(lo - 1e-6 <= p[0] <= hi + 1e-6 and hull.distance(Point(p[1], p[2])) <= 1e-6
                   for hull, (lo, hi) in slabs), p
