"""Gear blanks, pairs and the Lewis check, measured on the generated polygons.

Every dimension is measured on the polygon itself (as one would measure the cut
gear or its DXF) and held to an outside source named beside the check:
ISO 21771:2007 formulas (written in the tests or in tests/_refs.py from memory
of the standard, never taken from sheetgen), ISO 53:1998 basic rack proportions
(from memory), handbook values (Elements of Metric Gear Technology, "from
memory"), Shigley's Mechanical Engineering Design table 14-2, and hand
calculations shown in comments. Checks that compare two sheetgen functions are
marked "internal cross-check".
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from shapely import affinity
from shapely.geometry import Point, Polygon

from sheetgen.errors import SheetgenError
from sheetgen.drive.gears import (GearSpec, Hub, centre_distance_mm, check_gear_spec, contact_ratio, gear_blank,
                                  gear_pair, web_mm)
from sheetgen.mechanics.teeth import lewis_form_factor, lewis_stress_MPa
from tests import _refs as R
from tests._refs import tooth_thickness_at_diameter_mm

A20 = math.radians(20.0)


# ---------------------------------------------------------------------------
# measuring helpers (independent of the code under test)
# ---------------------------------------------------------------------------

def ring_xy(ring) -> np.ndarray:
    return np.asarray(ring.coords)[:-1]


def circle_crossings(ring: np.ndarray, r: float) -> np.ndarray:
    """Polar angles where a closed ring crosses the circle of radius r (exact per edge)."""
    out = []
    n = len(ring)
    for i in range(n):
        p, q = ring[i], ring[(i + 1) % n]
        d = q - p
        a, b, c = d @ d, 2 * p @ d, p @ p - r * r
        disc = b * b - 4 * a * c
        if disc < 0:
            continue
        for t in ((-b - math.sqrt(disc)) / (2 * a), (-b + math.sqrt(disc)) / (2 * a)):
            if 0 <= t < 1:
                x = p + t * d
                out.append(math.atan2(x[1], x[0]))
    out = np.sort(np.array(out))
    # a vertex lying on the circle counts once
    return out[np.concatenate([[True], np.diff(out) > 1e-9])] if len(out) else out


def thickness_at(ring: np.ndarray, r: float) -> float:
    """Arc thickness at radius r of the tooth centred on +x."""
    ang = circle_crossings(ring, r)
    pair = ang[np.argsort(np.abs(ang))[:2]]
    assert pair.min() < 0 < pair.max()
    return r * (pair.max() - pair.min())


def measured_span(poly: Polygon, z: int, k: int, r_min: float) -> float:
    """Caliper over k teeth: distance between two parallel jaws across the k-tooth group.

    The group is turned symmetric about +x, so the jaws are parallel to x; only
    the flanks from r_min out (where jaws can reach) are considered."""
    turn = 0.0 if k % 2 else math.pi / z
    xy = ring_xy(affinity.rotate(poly, turn, origin=(0, 0), use_radians=True).exterior)
    r = np.hypot(xy[:, 0], xy[:, 1])
    th = np.arctan2(xy[:, 1], xy[:, 0])
    sel = (r >= r_min) & (np.abs(th) <= k * math.pi / z)
    return xy[sel, 1].max() - xy[sel, 1].min()


def measured_over_pins(poly: Polygon, z: int, pin: float) -> float:
    """Seat a pin in the space at angle pi/z (and its opposite) and measure over both."""
    ext = poly.exterior

    def centre_radius(angle):
        lo, hi = 0.0, poly.bounds[2] + pin
        for _ in range(60):
            mid = 0.5 * (lo + hi)
            c = Point(mid * math.cos(angle), mid * math.sin(angle))
            if poly.contains(c) or ext.distance(c) < pin / 2:
                lo = mid
            else:
                hi = mid
        return 0.5 * (lo + hi)

    a1 = math.pi / z
    a2 = a1 + math.pi if z % 2 == 0 else a1 + math.pi - math.pi / z
    c1 = np.array([math.cos(a1), math.sin(a1)]) * centre_radius(a1)
    c2 = np.array([math.cos(a2), math.sin(a2)]) * centre_radius(a2)
    return float(np.hypot(*(c1 - c2))) + pin


# ---------------------------------------------------------------------------
# Lewis
# ---------------------------------------------------------------------------

@pytest.mark.parametrize("z, y", [(12, 0.245), (15, 0.290), (17, 0.303), (20, 0.322), (30, 0.359),
                                  (50, 0.409), (100, 0.447)])
def test_lewis_form_factor_table(z, y):
    # Shigley's Mechanical Engineering Design, table 14-2 (20 deg full depth)
    assert lewis_form_factor(z) == pytest.approx(y, abs=1e-12)


def test_lewis_form_factor_interpolation_and_limits():
    # table 14-2 rows 21 (0.328) and 22 (0.331), 24 (0.337): linear between rows (from memory of the table)
    assert lewis_form_factor(23) == pytest.approx((0.331 + 0.337) / 2)
    assert lewis_form_factor(40) == pytest.approx(0.384 + (0.397 - 0.384) * 2 / 5)
    # towards the rack (0.485, table 14-2): increasing, bounded
    assert lewis_form_factor(400) == pytest.approx(0.480)
    assert 0.480 < lewis_form_factor(800) < 0.485
    ys = [lewis_form_factor(z) for z in range(12, 600)]
    assert all(b >= a for a, b in zip(ys, ys[1:]))
    with pytest.raises(SheetgenError, match="12 teeth"):
        lewis_form_factor(11)


def test_lewis_stress_hand_calculation():
    # Shigley eq. 14-2 (SI): sigma = F / (b m Y); F 100 N, b 3 mm, m 1 mm, z 20 (Y 0.322):
    # 100 / (3 * 1 * 0.322) = 103.52 MPa (hand calculation)
    assert lewis_stress_MPa(100.0, 3.0, 1.0, 20) == pytest.approx(103.52, abs=0.005)
    with pytest.raises(SheetgenError, match="face width"):
        lewis_stress_MPa(100.0, 0.0, 1.0, 20)


# ---------------------------------------------------------------------------
# pair formulas
# ---------------------------------------------------------------------------

def test_contact_ratio_hand_calculation():
    # textbook formula eps = [sqrt(ra1^2 - rb1^2) + sqrt(ra2^2 - rb2^2) - a sin a] / (pi m cos a)
    # m 1, z 20/40, 20 deg (hand calculation):
    #   ra1 = 11, rb1 = 10 cos 20 = 9.396926 -> sqrt(121 - 88.302222) = 5.718197
    #   ra2 = 21, rb2 = 20 cos 20 = 18.793852 -> sqrt(441 - 353.208889) = 9.369691
    #   a sin a = 30 * 0.342020 = 10.260604;  p_b = pi cos 20 = 2.952131
    #   eps = (5.718197 + 9.369691 - 10.260604) / 2.952131 = 1.635186
    ra1, rb1, ra2, rb2 = 11.0, 10 * math.cos(A20), 21.0, 20 * math.cos(A20)
    eps = (math.sqrt(ra1 ** 2 - rb1 ** 2) + math.sqrt(ra2 ** 2 - rb2 ** 2) - 30.0 * math.sin(A20)) / (
        math.pi * 1.0 * math.cos(A20))
    assert eps == pytest.approx(1.635186, abs=2e-6)                    # the formula gives the hand value
    assert R.transverse_contact_ratio(1.0, 20, 40) == pytest.approx(eps, rel=1e-12)
    assert contact_ratio(1.0, 20, 40) == pytest.approx(1.635186, abs=2e-6)


@pytest.mark.parametrize("z1, z2, alpha, x1, x2", [
    (12, 36, 20.0, 0.4, 0.1), (10, 10, 25.0, 0.3, 0.3), (12, 24, 20.0, 0.6, 0.36), (17, 53, 14.5, 0.0, 0.0),
])
def test_contact_ratio_of_shifted_pairs_by_the_formula(z1, z2, alpha, x1, x2):
    # ISO 21771:2007: eps = (sqrt(ra1^2 - rb1^2) + sqrt(ra2^2 - rb2^2) - a_w sin a_w) / (pi m cos a),
    # at the working centre distance a_w = a cos a / cos a_w, inv a_w = inv a + 2 tan a (x1 + x2) / (z1 + z2),
    # tips m (z / 2 + 1 + x) (ISO 53 addendum): all written in tests/_refs.py, none from sheetgen
    for m in (1.0, 2.5):
        assert contact_ratio(m, z1, z2, alpha, x1, x2) == pytest.approx(
            R.transverse_contact_ratio(m, z1, z2, alpha, x1, x2), rel=1e-9)


def test_centre_distance_standard_and_shifted():
    # standard pair: a = m (z1 + z2) / 2 (ISO 21771)
    assert centre_distance_mm(1.5, 12, 36) == pytest.approx(36.0, abs=1e-12)
    # Elements of Metric Gear Technology, shifted-pair example (from memory):
    # m 3, z 12/24, x 0.6/0.36 -> a = 56.4999 mm (centre distance modification y = 0.83329)
    a = centre_distance_mm(3.0, 12, 24, 20.0, 0.6, 0.36)
    assert a == pytest.approx(56.4999, abs=5e-5)
    # ISO 21771:2007: a_w = a cos a / cos a_w (tests/_refs.py) gives the handbook value too
    assert R.working_centre_distance_mm(3.0, 12, 24, 20.0, 0.6, 0.36) == pytest.approx(56.4999, abs=5e-5)
    assert a == pytest.approx(R.working_centre_distance_mm(3.0, 12, 24, 20.0, 0.6, 0.36), abs=1e-9)
    assert (a - 54.0) / 3.0 == pytest.approx(0.83329, abs=5e-6)


# ---------------------------------------------------------------------------
# the blank, measured
# ---------------------------------------------------------------------------

@pytest.mark.parametrize("m, z, x, k_expected, w_expected", [
    (1.0, 20, 0.0, 3, 7.6604),    # Elements of Metric Gear Technology, span table (from memory)
    (1.0, 30, 0.0, 4, 10.7526),   # same (from memory)
    (3.0, 24, 0.4, 4, 32.8266),   # same handbook, shifted example (from memory)
])
def test_span_measured_on_polygon(m, z, x, k_expected, w_expected):
    g = gear_blank(GearSpec(m, z, shift=x))
    assert g.span_teeth == k_expected
    assert g.span_mm == pytest.approx(w_expected, abs=5e-5)
    # ISO 21771 base tangent length, measured between parallel jaws on the polygon
    w = measured_span(g.polygon, z, g.span_teeth, _involute_from_mm(m, z, 20.0, x))
    assert w == pytest.approx(w_expected, abs=0.01)


def test_over_pins_measured_on_polygon():
    # Elements of Metric Gear Technology, over-pins table: m 1, z 20, pin 1.7 -> 22.2941 (from memory)
    # (chord tolerance 0.001 mm: a pin seated on chords sits deeper by ~2.5 x the chord error per side)
    g = gear_blank(GearSpec(1.0, 20), chord_tol_mm=0.001)
    assert g.pin_diameter_mm == pytest.approx(1.7)
    assert g.over_pins_mm == pytest.approx(22.2941, abs=5e-5)
    assert measured_over_pins(g.polygon, 20, 1.7) == pytest.approx(22.2941, abs=0.01)


def test_over_pins_odd_teeth_measured():
    # ISO 21771:2007 (from memory): inv phi = s / d + inv a + d_p / d_b - pi / z, and for an odd tooth
    # count M = d_b cos(90 deg / z) / cos(phi) + d_p; computed here, held against a pin seated on the polygon
    m, z, x = 2.0, 25, 0.2
    g = gear_blank(GearSpec(m, z, shift=x), chord_tol_mm=0.001)
    d_p = g.pin_diameter_mm
    d, d_b = m * z, m * z * math.cos(A20)
    s = m * (math.pi / 2 + 2 * x * math.tan(A20))
    phi = R.inv_inverse(s / d + R.inv(A20) + d_p / d_b - math.pi / z)
    expected = d_b * math.cos(math.pi / (2 * z)) / math.cos(phi) + d_p
    assert measured_over_pins(g.polygon, z, d_p) == pytest.approx(expected, abs=0.01)
    assert g.over_pins_mm == pytest.approx(expected, abs=1e-6)
    # the even-count form M = d_b / cos(phi) + d_p reproduces the handbook's 22.2941 (m 1, z 20, pin 1.7)
    phi20 = R.inv_inverse(math.pi / 40 + R.inv(A20) + 1.7 / (20 * math.cos(A20)) - math.pi / 20)
    assert 20 * math.cos(A20) / math.cos(phi20) + 1.7 == pytest.approx(22.2941, abs=5e-5)


@pytest.mark.parametrize("m, z, a, x, j", [
    (1.0, 20, 20.0, 0.0, 0.0),
    (1.0, 12, 20.0, 0.0, 0.05),   # undercut
    (2.0, 30, 14.5, 0.3, 0.1),
    (0.8, 45, 25.0, -0.2, 0.0),
])
def test_thickness_tip_root_teeth_measured(m, z, a, x, j):
    g = gear_blank(GearSpec(m, z, a, x, j))
    ring = ring_xy(g.polygon.exterior)
    r = np.hypot(ring[:, 0], ring[:, 1])
    # tip m (z + 2 + 2x) and root m (z - 2.5 + 2x): ISO 53 rack, addendum 1.00 m, dedendum 1.25 m
    assert r.max() == pytest.approx(m * (z + 2 + 2 * x) / 2, abs=1e-9)
    assert m * (z - 2.5 + 2 * x) / 2 - g.chord_tol_mm <= r.min() <= m * (z - 2.5 + 2 * x) / 2 + 1e-9
    # tooth count: 2 z crossings of a circle through the flanks
    r_mid = (_involute_from_mm(m, z, a, x) + m * (z / 2 + 1 + x)) / 2
    assert len(circle_crossings(ring, r_mid)) == 2 * z
    # ISO 21771:2007: s_y = d_y (s / d + inv a - inv a_y), s = m (pi/2 + 2 x tan a) - j, at radii on the
    # involute: from the form circle the ISO 53 rack leaves (below), or the reference circle when undercut,
    # to the tip m (z / 2 + 1 + x)
    ra = m * (z / 2 + 1 + x)
    for r_meas in np.linspace(_involute_from_mm(m, z, a, x) + 0.01 * m, ra - 0.01 * m, 6):
        expected = tooth_thickness_at_diameter_mm(m, z, a, x, 2 * r_meas, j)
        assert thickness_at(ring, r_meas) == pytest.approx(expected, abs=0.01)


def _involute_from_mm(m, z, alpha_deg, x):
    """Radius from which the flank is surely involute (generating-rack geometry, ISO 53:1998 rack).

    The rack's straight flank ends h = (1.25 - x) m - rho (1 - sin a) inside the rolling line
    (rho the 0.38 m tip fillet, or the full round); it generates the involute down to the point
    of the line of action at t = r sin a - h / sin a from the base tangent point, so
    r_F = sqrt(r_b^2 + t^2). When t < 0 the rack undercuts; the undercut stays below the
    reference circle for the gears checked here, so the check starts there."""
    a = math.radians(alpha_deg)
    rp, rb = m * z / 2, m * z * math.cos(a) / 2
    rho = R.rack_tip_fillet_mm(m, alpha_deg, x)
    h = (R.ISO53_DEDENDUM - x) * m - rho * (1 - math.sin(a))
    t = rp * math.sin(a) - h / math.sin(a)
    return math.hypot(rb, t) if t >= 0 else rp


def test_form_circle_of_the_rack():
    # generating-rack geometry above, for a 20-tooth 20 deg gear: h = 1.25 - 0.38 (1 - sin 20) = 0.99997 m,
    # t = 10 sin 20 - h / sin 20 = 0.49639, r_F = sqrt(9.396926^2 + t^2) = 9.41003 (hand calculation)
    assert _involute_from_mm(1.0, 20, 20.0, 0.0) == pytest.approx(9.41003, abs=1e-5)
    assert gear_blank(GearSpec(1.0, 20)).form_diameter_mm / 2 == pytest.approx(9.41003, abs=1e-5)


def test_kerf_grows_teeth_exactly():
    # involute offset: thickness at the pitch circle grows by kerf / cos a (ISO 21771 geometry);
    # tip and root radii by kerf / 2; span by the kerf; holes shrink by kerf / 2
    kerf = 0.2
    m, z, x = 1.5, 24, 0.1
    spec = GearSpec(m, z, shift=x, hub=Hub(bore_mm=6.0))
    g0, g1 = gear_blank(spec), gear_blank(spec, kerf_mm=kerf)
    r0, r1 = ring_xy(g0.polygon.exterior), ring_xy(g1.polygon.exterior)
    rp = m * z / 2
    s = m * (math.pi / 2 + 2 * x * math.tan(A20))                      # ISO 21771:2007
    assert thickness_at(r1, rp) - thickness_at(r0, rp) == pytest.approx(kerf / math.cos(A20), abs=0.005)
    assert thickness_at(r1, rp) == pytest.approx(s + kerf / math.cos(A20), abs=0.01)
    # tip m (z + 2 + 2x) / 2 and root m (z - 2.5 + 2x) / 2 (ISO 53 rack), each plus kerf / 2
    assert np.hypot(*r1.T).max() == pytest.approx(m * (z + 2 + 2 * x) / 2 + kerf / 2, abs=1e-9)
    assert np.hypot(*r1.T).min() == pytest.approx(m * (z - 2.5 + 2 * x) / 2 + kerf / 2, abs=0.003)
    # ISO 21771:2007 base tangent length W = m cos a [pi (k - 0.5) + z inv a] + 2 x m sin a, plus the kerf
    k = g0.span_teeth
    w = m * math.cos(A20) * (math.pi * (k - 0.5) + z * R.inv(A20)) + 2 * x * m * math.sin(A20)
    w1 = measured_span(g1.polygon, z, k, _involute_from_mm(m, z, 20.0, x) + 0.1)
    assert w1 == pytest.approx(w + kerf, abs=0.01)
    hole = ring_xy(g1.polygon.interiors[0])
    assert np.hypot(*hole.T).max() == pytest.approx(3.0 - kerf / 2, abs=1e-9)
    # internal cross-check: the reported sizes stay those of the finished gear
    assert (g1.tip_diameter_mm, g1.span_mm, g1.over_pins_mm) == (g0.tip_diameter_mm, g0.span_mm, g0.over_pins_mm)


def test_backlash_thins_teeth():
    # backlash j thins the tooth by j at the pitch circle; span shrinks by j cos a (ISO 21771:2007 geometry:
    # a thinner tooth is its flanks moved j / 2 along the reference circle, j cos a / 2 along the normal)
    g0, g1 = gear_blank(GearSpec(1.0, 30)), gear_blank(GearSpec(1.0, 30, backlash_mm=0.1))
    r0, r1 = ring_xy(g0.polygon.exterior), ring_xy(g1.polygon.exterior)
    assert thickness_at(r0, 15.0) - thickness_at(r1, 15.0) == pytest.approx(0.1, abs=0.005)
    assert thickness_at(r1, 15.0) == pytest.approx(math.pi / 2 - 0.1, abs=0.01)
    k = g1.span_teeth
    w = math.cos(A20) * (math.pi * (k - 0.5) + 30 * R.inv(A20))           # ISO 21771:2007, m 1, x 0
    w1 = measured_span(g1.polygon, 30, k, _involute_from_mm(1.0, 30, 20.0, 0.0) + 0.1)
    assert w1 == pytest.approx(w - 0.1 * math.cos(A20), abs=0.01)
    assert g0.span_mm - g1.span_mm == pytest.approx(0.1 * math.cos(A20), abs=1e-12)   # internal cross-check


def test_undercut_warning_for_8_teeth():
    # Elements of Metric Gear Technology sec. 4.3: 8 < 17.1 teeth undercut; x_min = 1 - 8 sin^2 20 / 2 = 0.532
    assert f"{1 - 8 * math.sin(A20) ** 2 / 2:.3f}" == "0.532"
    g = gear_blank(GearSpec(1.0, 8))
    assert g.undercut
    assert any("undercut" in w and "0.532" in w for w in g.warnings)
    # the rack cuts a waist into an undercut tooth: narrower below the base circle than on it;
    # a tooth above the limit widens into its root fillet instead (generating-rack geometry)
    ring = ring_xy(g.polygon.exterior)
    rb = g.base_diameter_mm / 2
    assert g.form_diameter_mm / 2 > rb                   # internal cross-check: the flank starts above r_b
    assert thickness_at(ring, rb - 0.2) < thickness_at(ring, rb) - 0.1
    g20 = gear_blank(GearSpec(1.0, 20))
    ring20, rb20 = ring_xy(g20.polygon.exterior), g20.base_diameter_mm / 2
    assert thickness_at(ring20, rb20 - 0.2) > thickness_at(ring20, rb20)
    # enough shift removes the undercut (and, this close to pointed teeth, warns of the narrow tip land)
    shifted = gear_blank(GearSpec(1.0, 8, shift=0.55))
    assert not shifted.undercut and not any("undercut" in w for w in shifted.warnings)
    assert any("tip land" in w for w in shifted.warnings)


def test_no_warning_above_the_limit():
    assert gear_blank(GearSpec(1.0, 18)).warnings == ()


# ---------------------------------------------------------------------------
# meshing
# ---------------------------------------------------------------------------

def _mesh_sweep(pinion: GearSpec, wheel: GearSpec, steps: int = 48):
    pair = gear_pair(pinion, wheel)
    a, z1, z2 = pair.centre_distance_mm, pinion.teeth, wheel.teeth
    areas, gaps = [], []
    for i in range(steps + 1):
        t = 2 * math.pi / z1 * i / steps           # a full pitch of the pinion
        p = affinity.rotate(pair.pinion.polygon, t, origin=(0, 0), use_radians=True)
        w = affinity.rotate(pair.wheel.polygon, math.pi + math.pi / z2 - t * z1 / z2, origin=(0, 0), use_radians=True)
        w = affinity.translate(w, a, 0)
        areas.append(p.intersection(w).area)
        gaps.append(p.distance(w))
    return pair, max(areas), min(gaps), max(gaps)


def test_12_36_pair_meshes_without_overlap():
    # conjugate involutes: the normal gap between flanks is constant along the line of action and
    # equals half the normal backlash (j1 + j2) cos a / 2 each side (ISO 21771 geometry)
    j = 0.05
    pair, area, gmin, gmax = _mesh_sweep(GearSpec(1.0, 12, backlash_mm=j), GearSpec(1.0, 36, backlash_mm=j))
    assert pair.centre_distance_mm == pytest.approx(24.0)
    assert pair.ratio == pytest.approx(3.0)
    assert area == 0.0
    jn_half = 2 * j * math.cos(A20) / 2
    tol = pair.pinion.chord_tol_mm
    assert jn_half - 1e-6 <= gmin <= jn_half + 2 * tol
    assert gmax <= jn_half + 2 * tol


def test_zero_backlash_shifted_pair_meshes_tight_at_working_centre_distance():
    # ISO 21771: shifted gears mesh without backlash at a_w = a cos a / cos a_w
    pair, area, gmin, gmax = _mesh_sweep(GearSpec(1.0, 12, shift=0.4), GearSpec(1.0, 36, shift=0.1), steps=36)
    assert pair.centre_distance_mm == pytest.approx(R.working_centre_distance_mm(1.0, 12, 36, 20.0, 0.4, 0.1),
                                                    abs=1e-9)
    assert area < 1e-6
    assert gmax <= 2 * pair.pinion.chord_tol_mm      # only the chords leave a gap
    # and at the unmodified distance a = 24 mm the same gears would collide
    p = pair.pinion.polygon
    w = affinity.translate(affinity.rotate(pair.wheel.polygon, math.pi + math.pi / 36, origin=(0, 0),
                                           use_radians=True), 24.0 + 0.5 * (pair.centre_distance_mm - 24.0), 0)
    assert p.intersection(w).area > 1e-3


def test_pair_reports_contact_ratio_and_warnings():
    pair = gear_pair(GearSpec(1.0, 20), GearSpec(1.0, 40))
    assert pair.contact_ratio == pytest.approx(1.635186, abs=2e-6)    # hand calculation above
    assert pair.effective_contact_ratio == pytest.approx(pair.contact_ratio)   # internal cross-check
    assert pair.clearance_mm == pytest.approx(0.25)                   # ISO 53: c = 0.25 m
    assert pair.warnings == ()
    # 12 teeth: undercut pinion, the wheel tip meets the undercut root, contact on true involutes drops
    small = gear_pair(GearSpec(1.0, 12), GearSpec(1.0, 36))
    assert any("undercut" in w for w in small.warnings)
    assert small.effective_contact_ratio < small.contact_ratio
    # a pair with short contact warns below 1.2 (common practice)
    # 10/10 teeth at 25 deg, x 0.3 each (hand calculation with the ISO 21771 formula above):
    #   inv a_w = inv 25 + 2 tan 25 (0.6) / 20 = 0.029975 + 0.027980 = 0.057955 -> a_w = 30.53 deg
    #   a_w = 10 cos 25 / cos a_w = 10.5181; ra = 6.3, rb = 5 cos 25 = 4.531539
    #   eps = (2 sqrt(6.3^2 - 4.531539^2) - 10.5181 sin a_w) / (pi cos 25) = 1.184
    eps = R.transverse_contact_ratio(1.0, 10, 10, 25.0, 0.3, 0.3)
    assert eps == pytest.approx(1.184, abs=5e-4)
    short = gear_pair(GearSpec(1.0, 10, 25.0, 0.3), GearSpec(1.0, 10, 25.0, 0.3))
    assert short.contact_ratio == pytest.approx(eps, rel=1e-9)
    assert short.contact_ratio < 1.2
    assert any("contact ratio" in w and "1.2" in w for w in short.warnings)
    with pytest.raises(SheetgenError, match="module"):
        gear_pair(GearSpec(1.0, 12), GearSpec(1.5, 36))


# ---------------------------------------------------------------------------
# hub
# ---------------------------------------------------------------------------

def test_d_flat_square_hex_holes_with_kerf():
    kerf = 0.2
    # D bore 5 mm, 4.5 mm across the flat; all hole edges move kerf/2 into the hole
    g = gear_blank(GearSpec(1.0, 40, hub=Hub(5.0, "d", 4.5)), kerf_mm=kerf)
    h = ring_xy(g.polygon.interiors[0])
    assert h[:, 1].max() - h[:, 1].min() == pytest.approx(4.5 - kerf, abs=g.chord_tol_mm)
    assert h[:, 0].max() - h[:, 0].min() == pytest.approx(5.0 - kerf, abs=0.005)
    # square 6 mm and hex 8 mm across flats
    sq = ring_xy(gear_blank(GearSpec(1.0, 40, hub=Hub(0.0, "square", 6.0)), kerf_mm=kerf).polygon.interiors[0])
    assert sq[:, 0].max() - sq[:, 0].min() == pytest.approx(6.0 - kerf, abs=1e-9)
    assert len(sq) == 4
    hx = ring_xy(gear_blank(GearSpec(1.0, 40, hub=Hub(0.0, "hex", 8.0)), kerf_mm=kerf).polygon.interiors[0])
    assert hx[:, 1].max() - hx[:, 1].min() == pytest.approx(8.0 - kerf, abs=1e-9)
    assert len(hx) == 6


def test_lightening_windows_leave_webs():
    m = 1.5
    spec = GearSpec(m, 60, hub=Hub(8.0, lightening=True))
    g = gear_blank(spec)
    solid = gear_blank(GearSpec(m, 60, hub=Hub(8.0)))
    assert g.windows >= 3
    assert len(g.polygon.interiors) == g.windows + 1
    assert g.polygon.area < 0.8 * solid.polygon.area
    w = web_mm(m)
    windows = [Polygon(r) for r in g.polygon.interiors if Polygon(r).area > 60]
    bore = Point(0, 0).buffer(4.0)
    root = g.root_diameter_mm / 2
    for win in windows:
        # rim under the root and hub ring around the bore at least one web wide
        assert root - max(np.hypot(*ring_xy(win.exterior).T)) >= w - 1e-6
        assert win.distance(bore) >= w - 1e-6
    # spokes at least one web wide
    for i, a in enumerate(windows):
        for b in windows[i + 1:]:
            assert a.distance(b) >= w - 1e-6
    # no room: small gear stays solid, with a warning
    small = gear_blank(GearSpec(1.0, 20, hub=Hub(5.0, lightening=True)))
    assert small.windows == 0 and any("lightening" in x for x in small.warnings)


def test_bore_too_large_is_refused():
    with pytest.raises(SheetgenError, match="bore"):
        gear_blank(GearSpec(1.0, 20, hub=Hub(15.0)))


# ---------------------------------------------------------------------------
# bad input
# ---------------------------------------------------------------------------

@pytest.mark.parametrize("spec, kerf, pattern", [
    (GearSpec(0.1, 20), 0.0, r"--module = 0.1: must be from 0.3 to 25 mm"),
    (GearSpec(1.0, 5), 0.0, r"--teeth = 5: must be a whole number from 6 to 500"),
    (GearSpec(1.0, 20, 30.0), 0.0, r"--pressure-angle = 30.0: must be from 14.5 to 25 deg"),
    (GearSpec(1.0, 20, shift=2.0), 0.0, r"--shift = 2.0: must be from -1 to 1.5"),
    (GearSpec(1.0, 20, backlash_mm=0.8), 0.0, r"--backlash = 0.8: must be from 0 to 0.5"),
    (GearSpec(1.0, 20), 1.5, r"--kerf = 1.5: must be from 0 to 1 mm"),
    (GearSpec(1.0, 20, hub=Hub(5.0, "oval")), 0.0, r"bore-shape"),
    (GearSpec(1.0, 20, hub=Hub(5.0, "d")), 0.0, r"across-flats"),
    (GearSpec(1.0, 40, hub=Hub(6.0, "square", 5.0)), 0.0, r"one size"),
])
def test_bad_values_name_the_option(spec, kerf, pattern):
    labels = {"module_mm": "--module", "teeth": "--teeth", "pressure_angle_deg": "--pressure-angle",
              "shift": "--shift", "backlash_mm": "--backlash", "kerf_mm": "--kerf", "bore_mm": "--bore",
              "bore_shape": "--bore-shape", "across_flats_mm": "--across-flats"}
    with pytest.raises(SheetgenError, match=pattern):
        check_gear_spec(spec, kerf, labels=labels)
    with pytest.raises(SheetgenError):
        gear_blank(spec, kerf)


def test_pointed_teeth_refused_with_the_limit():
    with pytest.raises(SheetgenError, match="point.*at most"):
        gear_blank(GearSpec(1.0, 8, shift=1.0))


# ---------------------------------------------------------------------------
# properties
# ---------------------------------------------------------------------------

@given(m=st.floats(0.5, 4.0), z=st.integers(8, 120), x=st.floats(-0.5, 1.0), a=st.floats(14.5, 25.0),
       kerf=st.sampled_from([0.0, 0.15]))
@settings(max_examples=40, deadline=None)
def test_blank_properties(m, z, x, a, kerf):
    # ISO 21771:2007: the tooth thickness on the tip circle, s_a = d_a (s / d + inv a - inv a_a);
    # teeth that come to a point (s_a <= 0) are refused, and such draws are counted
    s_a = tooth_thickness_at_diameter_mm(m, z, a, x, m * (z + 2 + 2 * x))
    if abs(s_a) < 1e-6 * m:
        R.refused("on the pointed-tooth limit")
        return
    if s_a < 0:
        with pytest.raises(SheetgenError, match="point"):
            gear_blank(GearSpec(m, z, a, x), kerf)
        R.refused("pointed tooth")
        return
    R.kept()
    g = gear_blank(GearSpec(m, z, a, x), kerf)
    assert g.polygon.is_valid
    assert len(g.polygon.interiors) == 0
    ring = ring_xy(g.polygon.exterior)
    r = np.hypot(ring[:, 0], ring[:, 1])
    assert r.max() == pytest.approx(m * (z + 2 + 2 * x) / 2 + kerf / 2, abs=1e-9)
    r_mid = (_involute_from_mm(m, z, a, x) + m * (z / 2 + 1 + x)) / 2
    assert len(circle_crossings(ring, r_mid)) == 2 * z
    # z-fold symmetry: the outline turned by one pitch is the same outline
    turned = affinity.rotate(g.polygon, 2 * math.pi / z, origin=(0, 0), use_radians=True)
    assert turned.symmetric_difference(g.polygon).area < 1e-6 * g.polygon.area


# ---------------------------------------------------------------------------
# the command, measured from the DXF alone
# ---------------------------------------------------------------------------

def test_gear_command_dxf_measures_true(tmp_path):
    import ezdxf
    from click.testing import CliRunner

    from sheetgen.commands.gear import command

    out = tmp_path / "pinion.dxf"
    kerf, m, z = 0.15, 1.0, 12
    res = CliRunner().invoke(command, ["--module", str(m), "--teeth", str(z), "--bore", "3", "--kerf", str(kerf),
                                       "-o", str(out)])
    assert res.exit_code == 0, res.output
    # Elements of Metric Gear Technology sec. 4.3: x_min = 1 - 12 sin^2 20 / 2 = 0.298
    assert f"{1 - z * math.sin(A20) ** 2 / 2:.3f}" == "0.298"
    assert "undercut" in res.stderr and "0.298" in res.stderr
    # ISO 21771:2007 W = m cos a [pi (k - 0.5) + z inv a] over k = 2 teeth: 4.5963 mm
    w2 = m * math.cos(A20) * (math.pi * 1.5 + z * R.inv(A20))
    assert f"{w2:.4f}" == "4.5963"
    assert "span over 2 teeth" in res.stdout and "4.5963" in res.stdout
    doc = ezdxf.readfile(out)
    assert doc.header["$INSUNITS"] == 4                           # millimetres (DXF reference)
    cut = [e for e in doc.modelspace() if e.dxf.layer == "CUT"]
    rings = [np.array([(p[0], p[1]) for p in e.get_points("xy")]) for e in cut if e.dxftype() == "LWPOLYLINE"]
    circles = [e for e in cut if e.dxftype() == "CIRCLE"]
    ring = max(rings, key=lambda r: np.hypot(*r.T).max())
    # bore: 3 mm, shrunk by kerf / 2 all round
    assert len(circles) == 1 and circles[0].dxf.radius == pytest.approx(1.5 - kerf / 2, abs=1e-6)
    r = np.hypot(*ring.T)
    d = kerf / 2
    assert r.max() == pytest.approx(m * (z + 2) / 2 + d, abs=1e-5)                     # ISO 53 tip, plus kerf/2
    assert m * (z - 2.5) / 2 + d - 0.003 <= r.min() <= m * (z - 2.5) / 2 + d + 1e-5    # ISO 53 root, plus kerf/2
    rb = m * z * math.cos(A20) / 2
    rform = _involute_from_mm(m, z, 20.0, 0.0)         # 12 teeth are undercut: from the reference circle
    assert len(circle_crossings(ring, (rform + m * (z + 2) / 2) / 2)) == 2 * z
    # flanks: the involute thickness s_y of ISO 21771:2007 plus the offset 2 d r / r_b of an involute offset
    # by d (involute geometry: the offset of an involute is an involute of the same base circle)
    for r_meas in np.linspace(rform + 0.02, m * (z + 2) / 2 - 0.02, 5):
        expected = tooth_thickness_at_diameter_mm(m, z, 20.0, 0.0, 2 * r_meas) + 2 * d * r_meas / rb
        assert thickness_at(ring, r_meas) == pytest.approx(expected, abs=0.01)


def test_gear_command_bad_value_names_option(tmp_path):
    from click.testing import CliRunner

    from sheetgen.commands.gear import command

    out = tmp_path / "x.dxf"
    res = CliRunner().invoke(command, ["--module", "1", "--teeth", "20", "--pressure-angle", "30", "-o", str(out)])
    assert isinstance(res.exception, SheetgenError)
    assert "--pressure-angle = 30.0: must be from 14.5 to 25 deg" in str(res.exception)
    assert not out.exists() and not list(tmp_path.iterdir())
