"""The turning frame as a machine: the panel clamped, the torque path keyed,
the counterweight carried.

Each check reads the assembled kit (the nominal 3D model's prisms, the parts'
outlines and placements, the components) and holds it to geometry and
formulas written here or in tests/_refs.py, not to the code that chose the
stack, the flat or the weight.
"""

from __future__ import annotations

import functools
import math

import numpy as np
import pytest
from shapely import affinity
from shapely.geometry import Point, Polygon, box

from sheetgen.design.kit import build_kit
from sheetgen.design.spec import load_spec
from sheetgen.model3d.bodies import CONTACT_TOL_MM, SHARED_VOLUME_TOL_MM3, model_bodies
from tests import _refs
from tests.conftest import DEMO as _DEMO, PARAMS, shipped

DEMO = str(_DEMO)
SHIPPED = sorted(str(p) for p in PARAMS.glob("*.toml") if p.name != "demo.toml")
# panel thicknesses on the demo's 3 mm sheet: below one sheet, whole sheets, just over, between
THICKNESSES = (1.5, 2.0, 2.5, 3.0, 3.1, 3.3, 4.0, 4.5, 6.0, 7.0, 8.0)


@functools.lru_cache(maxsize=None)
def _kit(path: str, panel_thickness: float | None = None):
    if panel_thickness is None:
        return shipped(path)
    spec = load_spec(path, [f"panel.thickness={panel_thickness}"])
    return spec, build_kit(spec)


CASES = [(DEMO, None)] + [(p, None) for p in SHIPPED] + [(DEMO, t) for t in THICKNESSES]


def _id(case):
    path, t = case
    return path.split("/")[-1] + ("" if t is None else f"@{t:g}")


# ---------------------------------------------------------------------------
# 1. the clamp stack: the panel touches a frame part above and one below


def _flat_pieces(bodies):
    """(body name, footprint in kit x-y, z bottom, z top) of every prism lying flat (axis along z)."""
    out = []
    for b in bodies:
        for pr in b.pieces:
            m = pr.placement.matrix
            if abs(abs(m[2, 2]) - 1.0) > 1e-9:
                continue
            tx, ty, tz = pr.placement.translation_mm
            foot = affinity.affine_transform(pr.outline, [m[0, 0], m[0, 1], m[1, 0], m[1, 1], tx, ty])
            z0, z1 = sorted((tz, tz + m[2, 2] * pr.depth_mm))
            out.append((b.name, foot, z0, z1))
    return out


@pytest.mark.parametrize("case", CASES, ids=_id)
def test_the_panel_touches_a_frame_part_above_and_below_and_shares_no_volume(case):
    spec, kit = _kit(*case)
    panel = next(c for c in kit.components if c.name == "panel")
    cx, cy, cz = panel.centre_mm
    w, h, p = panel.size_mm
    assert p == pytest.approx(spec.panel.thickness_mm)
    z0, z1 = cz - p / 2, cz + p / 2
    foot = box(cx - w / 2, cy - h / 2, cx + w / 2, cy + h / 2)
    above, below = [], []
    for name, f, b0, b1 in _flat_pieces(model_bodies(kit, spec)):
        if name == "panel":
            continue
        area = f.intersection(foot).area
        if area <= 1.0:  # does not reach over or under the panel (1 mm2: more than grid noise)
            continue
        if abs(b0 - z1) <= CONTACT_TOL_MM:
            above.append(name)
        if abs(b1 - z0) <= CONTACT_TOL_MM:
            below.append(name)
        shared = area * max(0.0, min(b1, z1) - max(b0, z0))
        assert shared <= SHARED_VOLUME_TOL_MM3, f"{name} shares {shared:.3g} mm3 with the panel"
    assert any(n.startswith("bezel") for n in above), f"nothing bears on the panel from above: {above}"
    assert any(n.startswith("tray") for n in below), f"nothing under the panel: {below}"


# flexural moduli for the fingers' stress, the high end of each material (from memory):
# MDF about 2500-3500 MPa, birch plywood along the face grain up to about 9000 MPa, cast PMMA about 3300 MPa
MODULUS_MPA = {"mdf": 3500.0, "birch_plywood": 9000.0, "cast_acrylic": 3300.0}
# bending strengths: EN 622-5:2009 (MDF, at least 23 N/mm2), from memory for birch plywood (40) and
# cast PMMA (about 110 MPa, ISO 178 data sheets)
STRENGTH_MPA = {"mdf": 23.0, "birch_plywood": 40.0, "cast_acrylic": 110.0}
THICKNESS_TOL_MM = 0.2  # the fingers must still bear on a panel this much thinner (the stated clamp tolerance)


@pytest.mark.parametrize("case", CASES, ids=_id)
def test_spring_fingers_bend_within_half_the_sheets_strength(case):
    spec, kit = _kit(*case)
    bezel = kit.part("bezel")
    for s in bezel.sprung:
        x0, y0, x1, y1 = s.region.bounds
        length = max(x1 - x0, y1 - y0)
        stress = _refs.cantilever_root_stress_MPa(MODULUS_MPA[spec.sheet.material], bezel.thickness_mm,
                                                  s.drop_mm + THICKNESS_TOL_MM, length)
        assert stress <= STRENGTH_MPA[spec.sheet.material] / 2 + 1e-9
        # the finger lies over the panel, not over the rim stack
        w, h = spec.panel.width_mm / 2, spec.panel.height_mm / 2
        assert box(-w, -h, w, h).contains(s.region)
    if bezel.sprung:
        assert "spring fingers" in bezel.description and "press the panel down" in bezel.description
    else:
        assert "bears on the panel" in bezel.description


def test_a_panel_a_whole_number_of_sheets_thick_needs_no_fingers():
    # 6 mm on 3 mm sheet: two rim layers meet it exactly (common practice: the stack is the clamp)
    _, kit = _kit(DEMO, 6.0)
    assert kit.part("rim").qty == 2 and not kit.part("bezel").sprung


def test_the_frame_bolts_pass_through_the_whole_stack():
    spec, kit = _kit(DEMO, None)
    d = spec.frame.bolt_diameter_mm
    for name in ("tray", "rim", "bezel"):
        rings = [Polygon(r) for r in kit.part(name).outline.interiors]
        bolts = [r for r in rings if abs(r.area - math.pi * d * d / 4) < 0.02 * math.pi * d * d / 4]
        assert len(bolts) == 4, name


# ---------------------------------------------------------------------------
# 2. the keyed torque path


def _bore(part):
    centre = Point(0.0, 0.0)
    return next(Polygon(r) for r in part.outline.interiors if Polygon(r).contains(centre))


def _radii(poly: Polygon) -> tuple[float, float]:
    centre = Point(0.0, 0.0)
    return poly.exterior.distance(centre), max(math.hypot(x, y) for x, y in poly.exterior.coords)


KEYED = ("rib", "wheel", "counterweight-bracket", "collar", "stop-arm")  # all that turn with the axle


@pytest.mark.parametrize("case", CASES[:1 + len(SHIPPED)], ids=_id)
def test_the_parts_that_turn_with_the_axle_have_d_bores_matching_its_flat(case):
    spec, kit = _kit(*case)
    d = spec.axle.diameter_mm
    r = d / 2
    axle = next(c for c in kit.components if c.name == "axle")
    flat = axle.flat_mm
    assert flat == pytest.approx(kit.figure("axle_flat_mm"))
    # a D flat at about 0.85-0.9 d across (common practice for D shafts; from memory)
    assert 0.85 * d - 0.05 <= flat <= 0.9 * d + 0.05
    for name in KEYED:
        if name not in {p.name for p in kit.parts}:
            continue
        bore = _bore(kit.part(name))
        near, far = _radii(bore)
        assert near == pytest.approx(flat - r, abs=0.02), name  # centre to the flat (plane geometry)
        assert far == pytest.approx(r, abs=0.02), name
        # not round: its area is the D profile's, a segment short of the circle
        # (within 1.5 %: the bore is a polygon of chords, up to 0.01 mm inside the circle)
        assert bore.area == pytest.approx(_refs.d_profile_area_mm2(d, flat), rel=0.015), name
        assert bore.area < math.pi * r * r - 0.5 * (math.pi * r * r - _refs.d_profile_area_mm2(d, flat))
        # the press allowance: the bore as cut (before kerf) is smaller than the axle's profile
        cut = next(Polygon(q) for q in kit.part(name).outline_to_cut.interiors if Polygon(q).contains(Point(0, 0)))
        assert cut.area < bore.area
    for name in ("spacer",):  # round: the spacers turn freely on the rod
        near, far = _radii(_bore(kit.part(name)))
        assert far - near < 0.02, name


@pytest.mark.parametrize("case", CASES[:1 + len(SHIPPED)], ids=_id)
def test_the_axle_solid_carries_its_flat_where_the_keyed_parts_sit(case):
    # the axle solid is the union of its pieces: the D profile, and the round rod where it is round;
    # every keyed part (collar and stop arm included) sits where the rod is D only
    spec, kit = _kit(*case)
    bodies = model_bodies(kit, spec)
    axle = next(b for b in bodies if b.name == "axle")
    circle = math.pi * (spec.axle.diameter_mm / 2) ** 2
    assert any(p.outline.area < circle * 0.99 for p in axle.pieces), "the axle has no flat"
    round_x = [p.x_range_mm() for p in axle.pieces if p.outline.area >= circle * 0.99]
    for b in bodies:
        x0, x1 = b.x_range_mm()
        over_round = any(a0 < x1 - 1e-6 and x0 < a1 - 1e-6 for a0, a1 in round_x)
        if b.source in KEYED:
            assert not over_round, f"{b.name} sits on the round length"


# ---------------------------------------------------------------------------
# 3. the counterweight carried


def _unbalance_gmm(kit, leave_out=()):
    """U about the axle of the turning items, summed here from the parts' outlines
    (area x thickness x the materials table's density, centroid carried by each placement,
    spring fingers at their drop) and the components' masses at their centres."""
    from sheetgen.mechanics.materials import SHEET_MATERIALS

    masses, points = [], []
    for part in kit.parts:
        if part.name in leave_out:
            continue
        rho = SHEET_MATERIALS[part.material].density_kg_m3
        t = part.thickness_mm
        pieces = [(part.outline, 0.0)]
        if part.sprung:
            plate = part.outline
            for s in part.sprung:
                plate = plate.difference(s.region)
            pieces = [(plate, 0.0)] + [(s.region, s.drop_mm) for s in part.sprung]
        for pl in part.placements:
            if not pl.rotating:
                continue
            for poly, drop in pieces:
                c = poly.centroid
                masses.append(poly.area * t * 1e-9 * rho)
                points.append(pl.apply(np.array([[c.x, c.y, t / 2 - drop]]))[0])
    for comp in kit.components:
        if comp.rotating and comp.name not in leave_out:
            x, y, z = comp.centre_mm
            if comp.flat_mm > 0:  # the keyed axle: its D length is lighter on the flat's side (kit +z)
                length, d, _ = comp.size_mm
                x0, x1 = x - length / 2, x + length / 2
                a_r = math.pi * d * d / 4
                a_d = _refs.d_profile_area_mm2(d, comp.flat_mm)
                v_r, v_d = a_r * (comp.flat_from_x_mm - x0), a_d * (x1 - comp.flat_from_x_mm)
                z -= v_d * _refs.d_profile_centroid_offset_mm(d, comp.flat_mm) / (v_r + v_d)
            masses.append(comp.mass_kg)
            points.append((x, y, z))
    return _refs.static_unbalance_gmm(masses, points)


@pytest.mark.parametrize("case", CASES, ids=_id)
def test_the_counterweight_leaves_at_most_a_quarter_of_the_bare_unbalance(case):
    spec, kit = _kit(*case)
    bare = _unbalance_gmm(kit, leave_out=("counterweight-bracket", "counterweight"))
    residual = _unbalance_gmm(kit)
    names = {c.name for c in kit.components}
    if "counterweight" not in names:
        turning = sum(p.qty for p in kit.parts if p.rotating)
        assert turning and bare <= 0.5 * 1000 * 2.0, "an unbalanced frame carries no counterweight"
        return
    assert "counterweight-bracket" in {p.name for p in kit.parts}
    assert residual <= bare / 4, f"residual {residual:.0f} g·mm against bare {bare:.0f}"
    bar = next(c for c in kit.components if c.name == "counterweight")
    assert bar.rotating and bar.shape == "cylinder_x"
    length, dia, _ = bar.size_mm
    # a steel bar: mass = 7850 kg/m3 x pi d^2 / 4 x length (common practice for carbon steel)
    assert bar.mass_kg == pytest.approx(7850e-9 * math.pi * dia ** 2 / 4 * length, rel=1e-9)
    assert dia in (10.0, 12.0, 16.0, 20.0, 25.0)  # stock bright bar sizes (from memory)


def test_the_demo_no_longer_pins_a_counterweight_and_still_passes_its_balance_check():
    from sheetgen.mechanics.check import balance_check

    spec, kit = _kit(DEMO, None)
    assert not any("counterweight" in m.name for m in spec.rotating_masses)
    report = balance_check(kit, spec)
    assert report.ok, [c.name for c in report.checks if c.binding and not c.passed]
    assert report.counterweight.carried


def test_the_counterweight_and_its_bracket_are_solids_of_the_turning_group():
    pytest.importorskip("cadquery", reason="cadquery (the model extra) builds the STEP assembly")
    from sheetgen.model3d.solids import build_assembly, build_model

    spec, kit = _kit(DEMO, None)
    asm = build_assembly(build_model(kit, spec))
    groups = {child.name: {c.name for c in child.children} for child in asm.children}
    assert {"counterweight", "counterweight-bracket#1", "axle"} <= groups["rotating"]
