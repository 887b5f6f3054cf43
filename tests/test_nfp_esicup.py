"""No-fit polygons and inner-fit rectangles against the ESICUP reference files.
The no-fit polygons are checked on both roads: the edge sweep (``no_fit_polygon``)
and the sums of convex pieces that the nester takes (``convex_sum_paths``).

Outside source: the ESICUP 2D irregular data sets (shapes0.xml, shapes1.xml,
swim.xml; CC0; copied unmodified into tests/data/esicup, see its
README.md), which store a no-fit polygon (``nfps/nfp``) for every ordered pair
of (piece, angle) and an inner-fit polygon (``ifps/ifp``) for every piece.

What the comparison established about the files' conventions:

* The stored polygons use the same reference point as ours: the lower-left
  corner of each piece's bounding box after turning (checked: at angle 0 the
  stored polygon equals ours with no shift at all).
* At angle 0 the stored NFPs are exact for SHAPES (integer data) and agree to
  the two decimals written for SWIM, except the two SHAPES pairs
  polygon3/polygon4 (both files), which are not no-fit polygons of those
  pieces: sample points show the stored one is wrong, ours right (an overlap
  test with shapely decides).
* Entries with a piece at 180 degrees are approximate in the files (SHAPES1
  vertices at fractions such as 0.67 where all true vertices are integers;
  SWIM off by a few units; the stored IFPs up to two units off). For those we test
  ours against the overlap test directly, and for SWIM that the stored ones
  are within 1 % of ours by area.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
import shapely
from shapely import affinity

from sheetgen.production.nesting.convex import convex_sum_paths
from sheetgen.production.nesting.esicup import read_instance
from sheetgen.production.nesting.nfp import inner_fit_rect, nfp_scale, no_fit_polygon, paths_to_geometry, shape_of

ESICUP = Path(__file__).resolve().parent / "data" / "esicup"
# (polygon, polygon) pairs whose stored NFP does not describe those pieces
WRONG_IN_FILE = {("polygon3", "polygon4"), ("polygon4", "polygon3")}


@pytest.fixture(scope="module")
def instances():
    return {name: read_instance(ESICUP / rel) for name, rel in
            (("shapes0", "shapes/shapes0.xml"), ("shapes1", "shapes/shapes1.xml"), ("swim", "swim/swim.xml"))}


def _ours(inst, nfp):
    a, _ = shape_of(inst.polygons[nfp.static_polygon], nfp.static_angle_deg)
    b, _ = shape_of(inst.polygons[nfp.orbiting_polygon], nfp.orbiting_angle_deg)
    return a, b, no_fit_polygon(a, b)


def _oracle_errors(a, b, region, points) -> int:
    """Points of ``points`` where 'b moved there overlaps a' disagrees with
    'the point is inside region' (shapely overlap test; boundary points skipped)."""
    wrong = 0
    for x, y in points:
        if region.boundary.distance(shapely.Point(x, y)) < 1e-6:
            continue
        overlaps = affinity.translate(b, x, y).intersection(a).area > 1e-9
        if overlaps != region.contains(shapely.Point(x, y)):
            wrong += 1
    return wrong


def _convex(a, b):
    """The nester's fast path: the union of the sums of convex pieces
    (sheetgen/production/nesting/convex.py)."""
    scale = nfp_scale(a, b, 0.0)
    paths = convex_sum_paths(a, b, scale)
    assert paths is not None
    return paths_to_geometry(paths, scale)


@pytest.mark.parametrize("name, step, tol", [("shapes0", 1, 1e-9), ("shapes1", 1, 1e-9), ("swim", 3, 0.01)])
def test_unturned_nfps_match_the_stored_ones(instances, name, step, tol):
    # Source: ESICUP nfps/nfp entries with both angles 0 (exact integer data for
    # SHAPES; SWIM NFP vertices are written with two decimals).
    inst = instances[name]
    checked = 0
    for nfp in [n for n in inst.nfps if n.static_angle_deg == 0 and n.orbiting_angle_deg == 0][::step]:
        if (nfp.static_polygon, nfp.orbiting_polygon) in WRONG_IN_FILE:
            continue
        a, b, sweep = _ours(inst, nfp)
        for ours in (sweep, _convex(a, b)):  # the edge sweep, and the convex pieces the nester uses
            assert shapely.hausdorff_distance(ours.boundary, nfp.polygon.boundary) <= tol, nfp
            assert ours.area == pytest.approx(nfp.polygon.area, rel=1e-4)
        checked += 1
    assert checked >= {"shapes0": 14, "shapes1": 14, "swim": 30}[name]


def test_pairs_wrong_in_the_file_are_settled_by_the_overlap_test(instances):
    # Source: the overlap of the two pieces themselves (shapely), at points where
    # the stored NFP and ours disagree.
    inst = instances["shapes0"]
    rng = np.random.default_rng(5)
    for nfp in inst.nfps:
        if (nfp.static_polygon, nfp.orbiting_polygon) not in WRONG_IN_FILE:
            continue
        a, b, ours = _ours(inst, nfp)
        diff = ours.symmetric_difference(nfp.polygon)
        assert diff.area > 1.0  # they do disagree
        x0, y0, x1, y1 = diff.bounds
        pts = rng.uniform((x0, y0), (x1, y1), size=(3000, 2))
        pts = pts[shapely.contains_xy(diff, pts[:, 0], pts[:, 1])][:40]
        assert len(pts) >= 20
        assert _oracle_errors(a, b, ours, pts) == 0
        assert _oracle_errors(a, b, nfp.polygon, pts) >= len(pts) // 2


@pytest.mark.parametrize("name, step", [("shapes1", 5), ("swim", 29)])
def test_turned_nfps_agree_with_the_overlap_test(instances, name, step):
    # Source: shapely's overlap test of the two turned pieces (an independent
    # computation), at random points around each NFP.
    inst = instances[name]
    rng = np.random.default_rng(11)
    turned = [n for n in inst.nfps if n.static_angle_deg or n.orbiting_angle_deg][::step]
    assert turned
    for nfp in turned:
        a, b, ours = _ours(inst, nfp)
        x0, y0, x1, y1 = ours.bounds
        pts = rng.uniform((x0 - 1, y0 - 1), (x1 + 1, y1 + 1), size=(40, 2))
        assert _oracle_errors(a, b, ours, pts) == 0, nfp
        assert _oracle_errors(a, b, _convex(a, b), pts) == 0, nfp  # the convex pieces the nester uses
        if name == "swim":
            # the stored SWIM NFPs for turned pieces are approximate, but close
            assert ours.symmetric_difference(nfp.polygon).area <= 0.01 * ours.area


def test_convex_piece_sums_keep_the_room_inside_a_window():
    # Plane geometry (common practice): an s x s square lies inside a ww x wh window, clear of
    # its edges, exactly when its lower-left corner is inside a (ww - s) x (wh - s) rectangle
    # at the window's lower-left corner; so the no-fit polygon of a framed plate and the
    # square has that rectangle as its hole, and outside the plate it is the plate's box grown
    # by s to the left and below. Checked on a plate with a notch (not convex), so the plate
    # is cut into several pieces.
    plate = shapely.Polygon([(0, 0), (100, 0), (100, 80), (60, 80), (60, 70), (40, 70), (40, 80), (0, 80)],
                            [[(20, 15), (80, 15), (80, 55), (20, 55)]])
    square = shapely.box(0, 0, 12, 12)
    ours = _convex(plate, square)
    # by hand: the plate's box grown by 12 to the left and below; the notch (20 wide, 10 deep,
    # open at the top) takes the square with its corner at x in [40, 48], y in [70, 80]; the
    # window takes it with its corner in [20, 68] x [15, 43]
    expected = shapely.Polygon(shapely.box(-12, -12, 100, 80).difference(shapely.box(40, 70, 48, 80)).exterior,
                               [shapely.box(20, 15, 80 - 12, 55 - 12).exterior])
    assert ours.symmetric_difference(expected).area < 1e-9
    assert _oracle_errors(plate, square, ours, [(44, 69), (44, 71), (30, 60), (44, 50), (19, 30), (21, 30)]) == 0


@pytest.mark.parametrize("name", ["shapes0", "shapes1", "swim"])
def test_inner_fit_rectangles_match_the_stored_ones(instances, name):
    # Source: ESICUP ifps/ifp entries (board polygon0). Exact at angle 0; for
    # turned pieces the files are off by up to two units of their integer grid.
    inst = instances[name]
    board = inst.polygons["polygon0"].bounds
    for ifp in inst.ifps:
        sh, _ = shape_of(inst.polygons[ifp.orbiting_polygon], ifp.orbiting_angle_deg)
        x0, y0, x1, y1 = sh.bounds
        ours = inner_fit_rect(board, (x1 - x0, y1 - y0))
        tol = 1e-9 if ifp.orbiting_angle_deg == 0 else 2.0
        assert np.allclose(ours, ifp.polygon.bounds, atol=tol, rtol=0), ifp


def test_jakobs_json_reader():
    # Source: the README table of tests/data/esicup (25 pieces of 25
    # types, strip width 40, total area 392, angles 0/90/180/270).
    inst = read_instance(ESICUP / "jakobs" / "jakobs1.json")
    assert len(inst.items) == 25
    assert sum(it.qty for it in inst.items) == 25
    assert inst.strip_width == 40
    assert inst.total_area == pytest.approx(392.0)
    assert all(it.rotations_deg == (0.0, 90.0, 180.0, 270.0) for it in inst.items)


@pytest.mark.parametrize("name, pieces, area, width", [("shapes0", 43, 1596.0, 40.0), ("swim", 48, 25441305.0, 5752.0)])
def test_xml_reader_counts(instances, name, pieces, area, width):
    # Source: README table / instances_summary.csv of tests/data/esicup.
    inst = instances[name]
    assert sum(it.qty for it in inst.items) == pieces
    assert inst.total_area == pytest.approx(area)
    assert inst.strip_width == width


def _recorded_layout(inst, solution, reflect: bool):
    """A NestResult of a layout recorded in the file (and the items it uses)."""
    from sheetgen.production.nesting import NestItem, NestResult, PlacedPart
    from sheetgen.production.nesting.nfp import rotate_ccw

    items = [NestItem(it.name, affinity.scale(it.polygon, 1, -1, origin=(0, 0)) if reflect else it.polygon,
                      it.qty, it.rotations_deg) for it in inst.items]
    index = {pid: i for i, pid in enumerate(inst.piece_ids)}
    copies: dict[int, int] = {}
    placed = []
    for pl in solution.placements:
        i = index[pl.piece]
        c = copies.get(i, 0)
        copies[i] = c + 1
        poly = affinity.translate(rotate_ccw(items[i].polygon, pl.angle_deg), pl.x, pl.y)
        placed.append(PlacedPart(i, c, pl.x, pl.y, pl.angle_deg, poly))
    length = max(p.polygon.bounds[2] for p in placed)
    result = NestResult(sheets=(tuple(placed),), unplaced=(), sheet_size_mm=(length, inst.strip_width),
                        margin_mm=0.0, spacing_mm=0.0, strip_length_mm=length,
                        utilisation=(inst.total_area / (length * inst.strip_width),),
                        area_lower_bound_sheets=1, remnant_mm=None)
    return result, items


def test_verify_accepts_the_recorded_shapes1_layouts(instances):
    # Source: ESICUP recorded solutions for SHAPES1 (GLSHA 57, SAHA 56): no
    # overlap, inside [0, L] x [0, 40] (README: checked with shapely).
    from sheetgen.production.nesting import verify

    inst = instances["shapes1"]
    for sol in inst.solutions:
        result, items = _recorded_layout(inst, sol, reflect=False)
        verify(result, items)
        assert result.strip_length_mm == pytest.approx(sol.strip_length)


def test_verify_rejects_shapes0_layouts_read_without_the_reflection(instances):
    # Source: README of the benchmark folder: the SHAPES0 layouts reproduce only
    # with each piece reflected (y -> -y); used as written, pieces overlap.
    from sheetgen.errors import GeometryBug
    from sheetgen.production.nesting import verify

    inst = instances["shapes0"]
    for sol in inst.solutions:
        result, items = _recorded_layout(inst, sol, reflect=True)
        verify(result, items)
        result, items = _recorded_layout(inst, sol, reflect=False)
        with pytest.raises(GeometryBug, match="overlap|usable area"):
            verify(result, items)
