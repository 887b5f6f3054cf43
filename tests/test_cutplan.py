"""Cut plan: inside-first order, short travel, and the figures a DXF confirms.

Sources named beside the checks:
- inside-first cutting (holes before their part's outline, a part in a hole
  before its host): common practice, so nothing shifts after it is freed;
- lengths and counts read back from the written file with ezdxf (reference
  library from the package registry), containment recomputed with shapely;
- shortest open paths: triangle inequality, and exhaustive enumeration as the
  exact reference on small sheets;
- uncrossed paths: a path whose legs cross is shortened by reversing the stretch
  between them (the 2-opt move; Croes, Operations Research 6, 1958, from memory),
  so a 2-opt local optimum has no crossing legs.
"""

from __future__ import annotations

import itertools
import math
import random

import ezdxf
import pytest
from hypothesis import given
from hypothesis import strategies as st
from shapely.geometry import LineString, Point, Polygon, box

from sheetgen.production.cutplan import (
    CutPlan,
    LaserSettings,
    PlannedContour,
    cut_plan_contours,
    plan_sheet,
)
from sheetgen.errors import ParameterError, SheetgenError
from sheetgen.geometry.contour import Contour, polygon_contours
from sheetgen.io.dxf import dxf_bytes

SETTINGS = LaserSettings(cut_speed_mm_s=20.0, rapid_speed_mm_s=200.0, pierce_time_s=0.5)


def _ring(x0, y0, x1, y1):
    return Contour(points=((x0, y0), (x1, y0), (x1, y1), (x0, y1)))


def _circle(cx, cy, r):
    return Contour(circle=(cx, cy, r))


def _nested_sheet() -> list[Contour]:
    """Parts with holes, a part nested in a host's hole (with a hole of its own),
    written outlines-first so the order given breaks the inside-first rule."""
    host = _ring(100, 100, 300, 260)
    host_hole = _ring(130, 130, 270, 230)  # big window in the host
    guest = _ring(150, 150, 250, 210)  # nested in the window
    guest_hole = _circle(200, 180, 8)
    small = [_ring(20 + 40 * k, 20, 50 + 40 * k, 60) for k in range(5)]
    small_holes = [_circle(35 + 40 * k, 40, 4) for k in range(5)]
    return [host, guest, host_hole, guest_hole] + small + small_holes


def _read_cut(data: bytes):
    """Entities on layer CUT, in file order, as (polygon, length, kind), read with ezdxf alone."""
    from tests.dxfread import read_cut_contours

    return [(poly, length, kind) for poly, length, kind, _ in read_cut_contours(data)[1]]


@pytest.mark.parametrize("version", ["R2000", "R12"])
def test_cut_order_inside_first_checked_from_the_dxf(version):
    contours = _nested_sheet()
    plan = plan_sheet(contours, SETTINGS)
    data = dxf_bytes(cut_plan_contours(plan), dxf_version=version)
    cut = _read_cut(data)
    assert len(cut) == len(contours)
    # common practice: no contour is cut before one it encloses (shapely on the file alone)
    for i, j in itertools.combinations(range(len(cut)), 2):
        assert not cut[i][0].contains(cut[j][0]), f"entity {i} encloses entity {j} but is cut first"
    # the nested guest's hole comes before the guest, the guest before the host's window and the host
    order = list(plan.order)
    assert order.index(3) < order.index(1) < order.index(0)
    assert order.index(2) < order.index(0)


def test_pierces_and_cut_length_equal_what_the_dxf_measures():
    contours = _nested_sheet()
    plan = plan_sheet(contours, SETTINGS)
    cut = _read_cut(dxf_bytes(cut_plan_contours(plan)))
    # one pierce per closed entity on layer CUT; length from the file's own vertices and radii (ezdxf)
    assert plan.pierces == len(cut)
    assert plan.cut_length_mm == pytest.approx(sum(length for _, length, _ in cut), rel=1e-9)


def test_time_and_cost_worked_example():
    # one 10 mm square with its nearest corner at (30, 40): the 3-4-5 triangle puts it 50 mm from home
    # time = 40 mm / 20 mm/s + 50 mm / 100 mm/s + 1 pierce x 0.5 s = 3.0 s (arithmetic)
    settings = LaserSettings(cut_speed_mm_s=20.0, rapid_speed_mm_s=100.0, pierce_time_s=0.5,
                             rate_per_h=36.0, sheet_price=5.0)
    plan = plan_sheet([_ring(30, 40, 40, 50)], settings)
    assert plan.travel_mm == pytest.approx(50.0)
    assert plan.cut_length_mm == pytest.approx(40.0)
    assert plan.cut_time_s == pytest.approx(3.0)
    assert plan.cost == pytest.approx(36.0 * 3.0 / 3600.0 + 5.0)
    assert plan.contours[0].start == (30, 40)
    no_prices = plan_sheet([_ring(30, 40, 40, 50)], SETTINGS)
    assert no_prices.cost is None


def test_empty_sheet():
    plan = plan_sheet([], SETTINGS)
    assert (plan.pierces, plan.cut_length_mm, plan.travel_mm, plan.cut_time_s) == (0, 0, 0, 0)


def _grid_sheet(nx: int, ny: int, seed: int) -> list[Contour]:
    """Many small parts, each with a round and a square hole, in a row-by-row
    order with a part's holes just before its outline."""
    rng = random.Random(seed)
    out = []
    for j in range(ny):
        for i in range(nx):
            x, y = 10 + 28 * i, 10 + 28 * j
            w, h = rng.uniform(14, 24), rng.uniform(14, 24)
            part = box(x, y, x + w, y + h).difference(box(x + 2, y + 2, x + 5, y + 5))
            part = part.difference(Point(x + w - 4, y + h - 4).buffer(2.0, quad_segs=16))
            out.extend(polygon_contours(part, [(x + w - 4, y + h - 4, 2.0)]))
    return out


def test_travel_on_many_small_parts_is_shorter_than_the_nester_order():
    contours = _grid_sheet(10, 6, seed=7)
    plan = plan_sheet(contours, SETTINGS)
    assert plan.travel_mm < plan.travel_unplanned_mm
    assert plan.travel_saved_mm > 0
    assert sorted(plan.order) == list(range(len(contours)))


def test_points_on_a_line_give_the_exact_shortest_travel():
    # circles of radius 1 on the x axis, given shuffled: the head's last pierce lies on the farthest
    # circle, at least x_max - r from home, and the left-most points in x order reach that bound
    # (triangle inequality), so the optimum is x_max - r
    xs = [15.0, 95.0, 40.0, 70.0, 25.0, 55.0, 85.0]
    plan = plan_sheet([_circle(x, 0.0, 1.0) for x in xs], SETTINGS)
    assert plan.travel_mm == pytest.approx(max(xs) - 1.0, abs=1e-5)


def _exact_shortest(contours) -> float:
    """Exhaustive reference: every order and every start vertex (rings only, no nesting)."""
    best = math.inf
    for perm in itertools.permutations(range(len(contours))):
        costs = {p: math.dist((0.0, 0.0), p) for p in contours[perm[0]].points}
        for k in perm[1:]:
            costs = {q: min(c + math.dist(p, q) for p, c in costs.items()) for q in contours[k].points}
        best = min(best, min(costs.values()))
    return best


@given(st.integers(min_value=0, max_value=10_000))
def test_never_shorter_than_the_exact_optimum_and_never_longer_than_given(seed):
    rng = random.Random(seed)
    cells = rng.sample([(i, j) for i in range(4) for j in range(3)], 5)
    contours = []
    for i, j in cells:
        x, y = 5 + 30 * i + rng.uniform(0, 5), 5 + 30 * j + rng.uniform(0, 5)
        contours.append(_ring(round(x, 3), round(y, 3), round(x + rng.uniform(5, 20), 3),
                              round(y + rng.uniform(5, 20), 3)))
    plan = plan_sheet(contours, SETTINGS)
    exact = _exact_shortest(contours)  # exhaustive enumeration
    assert plan.travel_mm >= exact - 1e-9
    assert plan.travel_mm <= plan.travel_unplanned_mm + 1e-9


@st.composite
def _sheets(draw):
    """Random small parts in grid cells, some with holes, in a random order that
    keeps each part's holes before its outline (as a nester writes them)."""
    nx = draw(st.integers(2, 6))
    ny = draw(st.integers(1, 4))
    seed = draw(st.integers(0, 10_000))
    rng = random.Random(seed)
    parts = []
    for j in range(ny):
        for i in range(nx):
            if rng.random() < 0.2:
                continue
            x, y = 8 + 25 * i + rng.uniform(0, 3), 8 + 25 * j + rng.uniform(0, 3)
            w, h = rng.uniform(8, 20), rng.uniform(8, 20)
            if rng.random() < 0.3:
                parts.append([_circle(round(x + w / 2, 3), round(y + h / 2, 3), round(min(w, h) / 2, 3))])
                continue
            group = []
            if w > 10 and h > 10 and rng.random() < 0.6:
                group.append(_circle(round(x + w / 2, 3), round(y + h / 2, 3), round(rng.uniform(1, 3), 3)))
            group.append(_ring(round(x, 3), round(y, 3), round(x + w, 3), round(y + h, 3)))
            parts.append(group)
    rng.shuffle(parts)
    return [c for g in parts for c in g]


@given(_sheets())
def test_plan_properties(contours):
    plan = plan_sheet(contours, SETTINGS)
    # every contour exactly once, as given apart from the start point
    assert sorted(plan.order) == list(range(len(contours)))
    assert plan.pierces == len(contours)
    for k, c in zip(plan.order, plan.contours):
        src = contours[k]
        if src.is_circle:
            assert c.circle == src.circle
            cx, cy, r = c.circle
            assert math.hypot(c.start[0] - cx, c.start[1] - cy) == pytest.approx(r, abs=2e-6)
        else:
            assert set(c.points) == set(src.points) and len(c.points) == len(src.points)
            assert c.points[0] == c.start
    # never longer than the nester's order (which is inside-first here)
    assert plan.travel_mm <= plan.travel_unplanned_mm + 1e-9
    # common practice: inside first
    polys = [Point(*c.circle[:2]).buffer(c.circle[2], quad_segs=64) if c.is_circle else Polygon(c.points)
             for c in plan.contours]
    for i, j in itertools.combinations(range(len(polys)), 2):
        assert not polys[i].contains(polys[j])
    # the figures add up: cut length from shapely's perimeters, time from its three terms
    length = sum(p.length if not c.is_circle else 2 * math.pi * c.circle[2] for p, c in zip(polys, plan.contours))
    assert plan.cut_length_mm == pytest.approx(length, rel=1e-9)
    assert plan.cut_time_s == pytest.approx(plan.cut_length_mm / 20.0 + plan.travel_mm / 200.0 + 0.5 * plan.pierces)


@given(st.lists(st.tuples(st.integers(0, 9), st.integers(0, 6)), min_size=8, max_size=30, unique=True),
       st.integers(0, 10_000))
def test_no_crossing_legs_without_nesting(cells, seed):
    # small circles on distinct, jittered grid points: nothing encloses anything, so the plan is 2-opt
    # optimal and no two legs of its path cross (Croes 1958: uncrossing shortens a path)
    rng = random.Random(seed)
    contours = [_circle(round(10.0 * i + 5 + rng.uniform(-3, 3), 3), round(10.0 * j + 5 + rng.uniform(-3, 3), 3),
                        0.5) for i, j in cells]
    plan = plan_sheet(contours, SETTINGS)
    path = [(0.0, 0.0)] + [c.start for c in plan.contours]
    legs = [LineString([path[k], path[k + 1]]) for k in range(len(path) - 1)]
    for a, b in itertools.combinations(range(len(legs)), 2):
        if b == a + 1:
            continue
        if legs[a].crosses(legs[b]):
            gain = (legs[a].length + legs[b].length
                    - math.dist(path[a], path[b]) - math.dist(path[a + 1], path[b + 1]))
            assert gain < 1e-6, f"legs {a} and {b} cross"


def test_same_input_same_bytes():
    contours = _grid_sheet(5, 3, seed=2)
    a = dxf_bytes(cut_plan_contours(plan_sheet(contours, SETTINGS)))
    b = dxf_bytes(cut_plan_contours(plan_sheet(list(contours), SETTINGS)))
    assert a == b


# ---------------------------------------------------------------------------
# lead-ins


def _waste_side_ok(contour: PlannedContour, plan: CutPlan) -> bool:
    """The lead-in's pierce point is outside an outer contour and inside a hole
    (a contour enclosed by an odd number of others is a hole), recomputed here."""
    polys = [Point(*c.circle[:2]).buffer(c.circle[2], quad_segs=64) if c.is_circle else Polygon(c.points)
             for c in plan.contours]
    me = plan.contours.index(contour)
    depth = sum(1 for k, p in enumerate(polys) if k != me and p.contains(polys[me]))
    inside = polys[me].contains(Point(contour.lead_in))
    return inside if depth % 2 else not inside


def test_lead_ins_start_on_the_waste_side_and_cross_nothing():
    contours = _nested_sheet() + [_circle(400, 40, 0.6)]  # a hole smaller than the lead-in
    settings = LaserSettings(cut_speed_mm_s=20.0, rapid_speed_mm_s=200.0, pierce_time_s=0.5, lead_in_mm=2.0)
    plan = plan_sheet(contours, settings)
    assert plan.lead_ins == len(contours)
    shapes = []
    for c in plan.contours:
        shapes.append(Point(*c.circle[:2]).buffer(c.circle[2], quad_segs=64).exterior if c.is_circle
                      else Polygon(c.points).exterior)
    for k, c in enumerate(plan.contours):
        assert c.lead_in is not None
        assert 0 < c.lead_in_length_mm <= 2.0 + 2e-6  # pierce points are written to 1e-6 mm
        assert _waste_side_ok(c, plan)
        seg = LineString([c.lead_in, c.start])
        for j, other in enumerate(shapes):
            if j != k:
                assert not seg.intersects(other), f"lead-in of contour {k} meets contour {j}"
    # the lead-ins are cut: they count in the cut length, and travel runs to each pierce
    perimeters = sum(c.perimeter_mm for c in plan.contours)
    assert plan.cut_length_mm == pytest.approx(perimeters + sum(c.lead_in_length_mm for c in plan.contours))
    here, travel = (0.0, 0.0), 0.0
    for c in plan.contours:
        travel += math.dist(here, c.lead_in)
        here = c.start
    assert plan.travel_mm == pytest.approx(travel)


def test_lead_in_moves_away_from_a_close_neighbour():
    # two squares 1 mm apart: a 3 mm lead-in cannot start in the gap, so it starts elsewhere
    contours = [_ring(10, 10, 30, 30), _ring(31, 10, 51, 30)]
    settings = LaserSettings(cut_speed_mm_s=20.0, rapid_speed_mm_s=200.0, pierce_time_s=0.5, lead_in_mm=3.0)
    plan = plan_sheet(contours, settings, sheet_size_mm=(100, 100))
    for c in plan.contours:
        assert c.lead_in is not None
        other = [o for o in plan.contours if o is not c][0]
        assert not LineString([c.lead_in, c.start]).intersects(Polygon(other.points))
        assert 0 <= c.lead_in[0] <= 100 and 0 <= c.lead_in[1] <= 100


def test_lead_in_shortens_in_a_tight_window():
    # a part nested in a window with 1 mm all round: a 3 mm lead-in fits nowhere, half of it
    # (1.5 mm) neither (the corner gap is sqrt(2) mm on the diagonal, 1 mm square to an edge),
    # a quarter (0.75 mm) does
    contours = [_ring(0, 0, 40, 40), _ring(10, 10, 30, 30), _ring(11, 11, 29, 29)]
    settings = LaserSettings(cut_speed_mm_s=20.0, rapid_speed_mm_s=200.0, pierce_time_s=0.5, lead_in_mm=3.0)
    plan = plan_sheet(contours, settings)
    lengths = {k: c.lead_in_length_mm for k, c in zip(plan.order, plan.contours)}
    assert lengths[2] == pytest.approx(0.75, abs=2e-6)
    assert lengths[1] == pytest.approx(0.75, abs=2e-6)
    assert lengths[0] == pytest.approx(3.0, abs=2e-6)
    rings = {k: Polygon(c.points).exterior for k, c in zip(plan.order, plan.contours)}
    for k, c in zip(plan.order, plan.contours):
        seg = LineString([c.lead_in, c.start])
        assert all(not seg.intersects(r) for j, r in rings.items() if j != k)


def _write_with_lead_ins(plan: CutPlan, path) -> None:
    """The plan written by the project's DXF writer: a contour with a lead-in
    is one open LWPOLYLINE from the pierce point, in to the start and round
    back to it; a planned circle is two half circles (bulge 1) from its start."""
    from sheetgen.io.dxf import dxf_bytes

    path.write_bytes(dxf_bytes(cut_plan_contours(plan)))


def test_lead_ins_written_as_proposed_measure_and_pass_preflight(tmp_path):
    from ezdxf.math import bulge_to_arc

    from sheetgen.io.dxf_read import preflight_file

    contours = _nested_sheet()
    settings = LaserSettings(cut_speed_mm_s=20.0, rapid_speed_mm_s=200.0, pierce_time_s=0.5, lead_in_mm=2.0)
    plan = plan_sheet(contours, settings)
    path = tmp_path / "leads.dxf"
    _write_with_lead_ins(plan, path)
    doc = ezdxf.readfile(path)
    entities = [e for e in doc.modelspace() if e.dxf.layer == "CUT"]
    # one pierce per entity; the length of each from its vertices and bulges (ezdxf's bulge_to_arc)
    assert len(entities) == plan.pierces
    total = 0.0
    for e in entities:
        pts = e.get_points("xyb")
        for (x0, y0, b), (x1, y1, _) in zip(pts, pts[1:]):
            if b:
                _, a0, a1, r = bulge_to_arc((x0, y0), (x1, y1), b)
                total += r * ((a1 - a0) % (2 * math.pi))
            else:
                total += math.dist((x0, y0), (x1, y1))
    assert total == pytest.approx(plan.cut_length_mm, rel=1e-6)
    # the file is a clean cut file with the kerf of a typical laser (common practice: 0.15-0.25 mm)
    report = preflight_file(path, kerf_mm=0.2)
    assert report.clean, [f.line() for f in report.faults]
    assert report.contours == len(contours)


def test_lead_ins_off_by_default():
    plan = plan_sheet(_nested_sheet(), SETTINGS)
    assert plan.lead_ins == 0
    assert all(c.lead_in is None for c in plan.contours)


# ---------------------------------------------------------------------------
# bad input


@pytest.mark.parametrize("kwargs, key", [
    (dict(cut_speed_mm_s=0.0), "laser.cut_speed"),
    (dict(rapid_speed_mm_s=-5.0), "laser.rapid_speed"),
    (dict(pierce_time_s=float("nan")), "laser.pierce_time"),
    (dict(lead_in_mm=-1.0), "laser.lead_in"),
    (dict(rate_per_h=-1.0), "laser.rate"),
])
def test_bad_settings_name_the_key(kwargs, key):
    base = dict(cut_speed_mm_s=20.0, rapid_speed_mm_s=200.0, pierce_time_s=0.5)
    base.update(kwargs)
    with pytest.raises(ParameterError, match=key):
        LaserSettings(**base)


def test_bad_contour_is_a_clear_error():
    with pytest.raises(SheetgenError, match="contour 1"):
        plan_sheet([_ring(0, 0, 1, 1), Contour(points=((0, 0), (1, 1)))], SETTINGS)
    with pytest.raises(SheetgenError, match="contour 0"):
        plan_sheet([_circle(5, 5, 0.0)], SETTINGS)
