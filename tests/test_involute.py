"""Involute math and the generated tooth form, held to outside sources.

Sources named beside each check:
* ISO 21771 (span / base tangent length formula, working pressure angle);
* Elements of Metric Gear Technology (handbook tables; values "from memory");
* the definition of the involute function;
* first principles: the generating rack (ISO 53:1998 basic rack, from memory,
  written in tests/_refs.py with nothing taken from sheetgen) rolled on the pitch
  circle and subtracted from the blank, simulated with shapely.

Checks that compare two sheetgen functions are marked "internal cross-check".
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import shapely
from hypothesis import given, settings
from hypothesis import strategies as st
from shapely.geometry import Point, Polygon

from sheetgen.drive import involute as I
from tests import _refs as R

# ---------------------------------------------------------------------------
# the involute function and standard dimensions
# ---------------------------------------------------------------------------

def test_inv_20_degrees():
    # definition inv(a) = tan a - a; 0.014904 at 20 deg (Elements of Metric Gear Technology table, from memory)
    assert R.inv(math.radians(20.0)) == pytest.approx(0.014904, abs=5e-7)
    assert I.inv(math.radians(20.0)) == pytest.approx(0.014904, abs=5e-7)
    assert I.inv(math.radians(20.0)) == pytest.approx(math.tan(math.radians(20)) - math.radians(20), rel=1e-15)


@given(st.floats(min_value=1e-4, max_value=1.4))
@settings(max_examples=60, deadline=None)
def test_inv_inverse_round_trip(alpha):
    # definition of the inverse: inv(inv_inverse(v)) = v
    v = I.inv(alpha)
    assert I.inv_inverse(v) == pytest.approx(alpha, abs=1e-10)


@pytest.mark.parametrize("m, z, x, k, expected", [
    (1.0, 20, 0.0, 3, 7.6604),    # Elements of Metric Gear Technology, span table (from memory)
    (1.0, 30, 0.0, 4, 10.7526),   # same table (from memory)
    (3.0, 24, 0.4, 4, 32.8266),   # same handbook, shifted-gear example (from memory)
])
def test_span_over_teeth_handbook(m, z, x, k, expected):
    # ISO 21771: W = m cos a [pi (k - 0.5) + z inv a] + 2 x m sin a
    assert I.span_over_teeth_mm(m, z, 20.0, x, k) == pytest.approx(expected, abs=5e-5)


def test_span_teeth_k_usual_choice():
    # common practice: k = z a / 180 + 0.5 rounded (unshifted 20 deg gears): z 20 -> 3, z 30 -> 4, z 60 -> 7
    assert I.span_teeth_k(20, 20.0) == 3
    assert I.span_teeth_k(30, 20.0) == 4
    assert I.span_teeth_k(60, 20.0) == 7


def test_dimension_over_pins_handbook():
    # Elements of Metric Gear Technology, over-pins table: m 1, z 20, pin 1.7 mm -> 22.2941 (from memory)
    assert I.dimension_over_pins_mm(1.0, 20, 20.0, 0.0, 1.7) == pytest.approx(22.2941, abs=5e-5)


def test_ideal_pin_touches_at_pitch_circle():
    # geometry of the pin: the pin that touches at r_p; rounded to 0.1 mm it is the 1.7 mm pin
    # the handbook example above uses for m 1, z 20 (Elements of Metric Gear Technology, from memory)
    d = I.ideal_pin_diameter_mm(1.0, 20, 20.0, 0.0)
    assert I.pin_contact_radius_mm(1.0, 20, 20.0, 0.0, d) == pytest.approx(10.0, abs=1e-9)
    assert round(d, 1) == 1.7
    # the contact radius of the 1.7 mm pin itself stays on the flank near the pitch circle
    assert I.pin_contact_radius_mm(1.0, 20, 20.0, 0.0, 1.7) == pytest.approx(10.0, abs=0.05)


def test_undercut_limit():
    # Elements of Metric Gear Technology sec. 4.3: z_min = 2 / sin^2 a = 17.1 at 20 deg
    assert I.undercut_limit_teeth(20.0) == pytest.approx(17.1, abs=0.05)
    # 14.5 deg: 2 / sin^2(14.5 deg) = 31.9 (same section, from memory: "32 teeth")
    assert I.undercut_limit_teeth(14.5) == pytest.approx(31.9, abs=0.05)
    # x_min = 1 - z sin^2 a / 2 (same section): 12 teeth need 0.298 at 20 deg
    assert I.min_shift_no_undercut(12, 20.0) == pytest.approx(1 - 12 * math.sin(math.radians(20)) ** 2 / 2)
    assert I.min_shift_no_undercut(12, 20.0) == pytest.approx(0.298, abs=5e-4)


def test_working_pressure_angle_handbook_example():
    # Elements of Metric Gear Technology, profile-shifted pair example (from memory):
    # m 3, z 12/24, x 0.6/0.36 -> inv a_w 0.034316, a_w 26.0886 deg
    aw = I.working_pressure_angle_rad(20.0, 12, 24, 0.6, 0.36)
    assert I.inv(aw) == pytest.approx(0.034316, abs=5e-7)
    assert math.degrees(R.working_pressure_angle_rad(20.0, 12, 24, 0.6, 0.36)) == pytest.approx(26.0886, abs=5e-5)
    assert math.degrees(aw) == pytest.approx(26.0886, abs=5e-5)
    # ISO 21771: inv a_w = inv a + 2 tan a (x1 + x2) / (z1 + z2)
    assert I.inv(aw) == pytest.approx(I.inv(math.radians(20)) + 2 * math.tan(math.radians(20)) * 0.96 / 36, rel=1e-12)


def test_tooth_thickness_formula_at_pitch():
    # s_r at r = r_p reduces to s = m (pi/2 + 2 x tan a) (ISO 21771)
    for x in (-0.3, 0.0, 0.5):
        s = I.tooth_thickness_at_radius_mm(2.0, 25, 20.0, x, 25.0)
        assert s == pytest.approx(2.0 * (math.pi / 2 + 2 * x * math.tan(math.radians(20))), rel=1e-12)


# ---------------------------------------------------------------------------
# polygonisation
# ---------------------------------------------------------------------------

def _dist_to_polyline(q: np.ndarray, poly: np.ndarray) -> np.ndarray:
    a, b = poly[:-1], poly[1:]
    ab = b - a
    L2 = np.einsum("ij,ij->i", ab, ab)
    t = np.clip(np.einsum("kij,ij->ki", q[:, None, :] - a[None], ab) / L2, 0, 1)
    e = q[:, None, :] - (a[None] + t[..., None] * ab[None])
    return np.min(np.hypot(e[..., 0], e[..., 1]), axis=1)


@given(tol=st.sampled_from([0.001, 0.0025, 0.01]), teeth=st.integers(8, 80), shift=st.floats(-0.3, 0.6))
@settings(max_examples=20, deadline=None)
def test_involute_chords_within_tolerance(tol, teeth, shift):
    # definition of a chord tolerance: vertices on the curve, every curve point within tol of the polyline
    tf = I.tooth_form(1.0, teeth, 20.0, shift)
    pts = I.sample_curve(tf.involute_xy, tf.gamma_start, tf.gamma_tip, tol)
    dense = tf.involute_xy(np.linspace(tf.gamma_start, tf.gamma_tip, 3000))
    assert _dist_to_polyline(dense, pts).max() <= tol * 1.0001
    r = np.hypot(*pts.T)
    g = np.sqrt(r * r / tf.r_base ** 2 - 1)
    assert np.allclose(pts, tf.involute_xy(g), atol=1e-9)      # vertices lie on the involute
    # "no more vertices than needed": most chords use much of the tolerance
    dev = [_dist_to_polyline(tf.involute_xy(np.linspace(g[i], g[i + 1], 50)), pts[i:i + 2]).max()
           for i in range(len(pts) - 2)]
    if dev:
        assert np.median(dev) > 0.5 * tol


def test_arc_points_sagitta():
    # circle geometry: sagitta r (1 - cos(step / 2)) within tol
    p = I.arc_points(10.0, 0.0, math.pi, 0.01)
    step = abs(math.atan2(p[1, 1], p[1, 0]) - math.atan2(p[0, 1], p[0, 0]))
    assert 10.0 * (1 - math.cos(step / 2)) <= 0.01
    assert len(p) - 1 == math.ceil(math.pi / (2 * math.acos(1 - 0.01 / 10)))


# ---------------------------------------------------------------------------
# the generated outline against a simulated generating rack
# ---------------------------------------------------------------------------

@pytest.mark.parametrize("m, z, alpha, x, thinning, offset", [
    (1.0, 8, 20.0, 0.0, 0.0, 0.0),      # heavily undercut
    (1.0, 20, 25.0, 0.0, 0.0, 0.0),     # full-round rack tip, no undercut
    (1.0, 12, 20.0, 0.3, 0.05, 0.45),   # kerf offset larger than the rack fillet
])
def test_outline_matches_simulated_rack_cut(m, z, alpha, x, thinning, offset):
    # first principles: the gear is what the generating rack leaves when it rolls on the reference circle.
    # The rack is the ISO 53:1998 basic rack (dedendum 1.25 m, tip fillet 0.38 m or a full round, flanks at
    # the pressure angle), its datum line x m outside the rolling line (ISO 21771:2007), built in
    # tests/_refs.py from those figures alone.
    # With a kerf offset d the outline is a cut path: a round beam of radius d whose centre follows it
    # leaves the path eroded by d. A round tool cannot cut a concave fillet tighter than itself (common
    # practice), so the beam leaves the gear that a rack with tip fillet max(rho, d) would cut.
    rho = max(R.rack_tip_fillet_mm(m, alpha, x, thinning), offset)
    space = R.rack_generated_space(m, z, alpha, x, thinning, fillet_mm=rho)
    tf = I.tooth_form(m, z, alpha, x, thinning, offset)
    ours = Polygon(I.gear_outline_xy(tf, 0.0025))
    if offset:
        ours = ours.buffer(-offset, quad_segs=256)          # what the round beam leaves
    r_tip = m * (z / 2 + R.ISO53_ADDENDUM + x)              # ISO 53 addendum 1.00 m, plus the shift
    assert tf.r_tip == pytest.approx(r_tip + offset, abs=1e-12)
    rr = r_tip - 0.02 * m
    wedge = Polygon([(0, 0), (3 * rr * math.cos(-0.98 * math.pi / z), 3 * rr * math.sin(-0.98 * math.pi / z)),
                     (3 * rr, 0)]).intersection(Point(0, 0).buffer(rr, quad_segs=512))
    a = ours.intersection(wedge)
    b = wedge.difference(space)
    # the simulation scallops (step 0.004 mm of rack travel) and our chords (0.0025 mm) both stay small
    assert a.boundary.hausdorff_distance(b.boundary) < 0.005
    assert a.symmetric_difference(b).area < 0.01 * m


def test_simulated_rack_is_the_iso53_rack():
    # the reference rack itself, against ISO 53:1998 (from memory): on the datum line tooth = space = p / 2
    # (the generating tooth fills a gear space, so it is pi m / 2 wide there), flanks at the pressure angle,
    # 1.25 m from the datum line to the tip, which carries the 0.38 m fillet at 20 deg
    m, x = 2.0, 0.25
    tooth = R.generating_tooth(m, 20.0, x)
    u_datum = x * m
    cut = tooth.intersection(shapely.geometry.LineString([(u_datum, -10), (u_datum, 10)]))
    assert cut.length == pytest.approx(math.pi * m / 2, abs=1e-5)    # the opening is polygonised
    assert tooth.bounds[0] == pytest.approx(u_datum - 1.25 * m, abs=1e-3)
    assert R.rack_tip_fillet_mm(m, 20.0, x) == pytest.approx(0.38 * m)
    # flank angle: the width grows by 2 tan a per unit height between the datum line and 0.5 m below it
    u2 = u_datum - 0.5 * m
    cut2 = tooth.intersection(shapely.geometry.LineString([(u2, -10), (u2, 10)]))
    assert (cut.length - cut2.length) / (0.5 * m) == pytest.approx(2 * math.tan(math.radians(20.0)), abs=1e-6)
    # at 25 deg the tip is too narrow for 0.38 m: the fillet is the full round b cos a / (1 - sin a),
    # b = pi m / 4 - 1.25 m tan 25 = 0.20251 m, cos 25 = 0.906308, 1 - sin 25 = 0.577382 -> 0.31788 m
    # (hand calculation)
    assert R.rack_tip_fillet_mm(1.0, 25.0, 0.0) == pytest.approx(0.31788, abs=1e-5)


def test_kerf_offset_is_the_involute_of_the_same_base_circle():
    # involute geometry: the normal offset d of an involute is the involute of the same base
    # circle with base arc thickness + d per flank, so thickness at the pitch circle + 2 d / cos a
    # (the thicknesses below are read from the tooth form's own base angle: an internal cross-check;
    # the distances after them are measured)
    m, z, a = 1.5, 24, 20.0
    d = 0.1
    t0 = I.tooth_form(m, z, a, 0.2)
    t1 = I.tooth_form(m, z, a, 0.2, offset_mm=d)
    assert t1.r_base == t0.r_base
    assert t1.psi_base - t0.psi_base == pytest.approx(d / t0.r_base, rel=1e-12)
    s0 = 2 * t0.r_pitch * (t0.psi_base - I.inv(math.radians(a)))
    s1 = 2 * t1.r_pitch * (t1.psi_base - I.inv(math.radians(a)))
    assert s1 - s0 == pytest.approx(2 * d / math.cos(math.radians(a)), rel=1e-12)
    # and every point of the offset flank lies exactly d from the nominal flank
    g = np.linspace(t0.gamma_start + 0.05, t0.gamma_tip, 40)
    p0 = t0.involute_xy(g)
    dense = t1.involute_xy(np.linspace(0, t1.gamma_tip + 0.2, 20001))
    dist = np.min(np.hypot(p0[:, None, 0] - dense[None, :, 0], p0[:, None, 1] - dense[None, :, 1]), axis=1)
    assert np.allclose(dist, d, atol=2e-5)


def test_rack_straight_flank_ends_at_one_module():
    # ISO 53 (from memory): the 0.38 m tip fillet of the 1.25 m dedendum rack leaves a straight
    # flank to 1.00 m at 20 deg (0.38 (1 - sin 20) = 0.250), so the rack's own undercut limit
    # is the handbook's x_min = 1 - z sin^2 a / 2 (Elements of Metric Gear Technology sec. 4.3)
    s20 = math.sin(math.radians(20.0))
    assert 1.25 - 0.38 * (1 - s20) == pytest.approx(1.0, abs=1e-4)
    for z in (8, 12, 17):
        assert I.rack_min_shift_no_undercut(z, 20.0) == pytest.approx(1 - z * s20 ** 2 / 2, abs=1e-4)
    # at other angles the rack's limit is its straight-flank depth h = 1.25 - rho (1 - sin a), rho the
    # ISO 53 fillet or the full round (tests/_refs.py), less z sin^2 a / 2 (generating-rack geometry)
    for z, a in ((9, 14.5), (12, 24.5), (30, 25.0)):
        sa = math.sin(math.radians(a))
        h = 1.25 - R.rack_tip_fillet_mm(1.0, a, 0.0) * (1 - sa)
        assert I.rack_min_shift_no_undercut(z, a) == pytest.approx(h - z * sa ** 2 / 2, abs=1e-9)
    # and the generated form turns undercut exactly there (generating-rack geometry)
    for z, a in ((12, 20.0), (9, 14.5), (12, 24.5)):
        x0 = I.rack_min_shift_no_undercut(z, a)
        assert I.tooth_form(1.0, z, a, x0 - 1e-6).undercut
        assert not I.tooth_form(1.0, z, a, x0 + 1e-6).undercut
