"""The motor side of the kit read as a machine: the gear-motor is held by its box of
plates and clears everything else, its shaft reaches the pinion and stays off the
support, the mount is braced and stiff enough for the backlash, and the all-pairs
assembly check flags a shaft that touches a support.

Clearances are measured here on the model's prisms (sheetgen.model3d.bodies, the
same solids the STEP file holds) with plain box-and-outline geometry written in this
file, not with the layout code that placed them. Every part of the kit is a plate
whose axes are the kit's axes, so a box (the motor body, or a box round its shaft,
which the shaft lies inside) seen in a plate's own frame is again a box, and its
distance to the plate is hypot(gap along the plate's thickness, 2D distance of the
box's footprint to the plate's outline): exact for the box, and a lower bound for
the shaft inside it (common geometry).
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, seed, settings
from hypothesis import strategies as st
from shapely import affinity
from shapely.geometry import MultiPoint, Point, Polygon, box

from sheetgen.design.kit import build_kit
from sheetgen.design.spec import load_spec
from sheetgen.errors import ParameterError
from tests import _refs as R
from tests.conftest import shipped

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "params" / "demo.toml"
VARIANTS = sorted((ROOT / "params").glob("*.toml"))

GAP_MM = 1.0  # the gap the design promises between the motor (and its shaft) and all but its holders (our rule)
HOLDERS = {"motor-mount", "motor-clamp"}
# a stronger gear-motor (invented scenario figures, as in tests/derive_cases.py)
STRONG = ["motor.body_width=37", "motor.body_height=37", "motor.body_length=60", "motor.shaft_diameter=6",
          "motor.shaft_flat=5.4", "motor.shaft_length=18", "motor.screw_spacing=28", "motor.screw_diameter=3.2",
          "motor.boss_diameter=12", "motor.mass=0.45", "motor.stall_torque=12", "motor.no_load_speed=5",
          "motor.voltage=12", "drive.pulse_capacitance=0", "drive.pulse_voltage=0"]


# ---------------------------------------------------------------------------
# plain geometry on the model's prisms


def _bodies(kit, spec):
    from sheetgen.model3d.bodies import model_bodies

    return {b.name: b for b in model_bodies(kit, spec)}


def _frame(prism):
    m = np.asarray(prism.placement.matrix, dtype=float)
    # the plate's thickness runs along a kit axis (gears may be turned about it)
    assert np.allclose(np.abs(m[:, 2]), np.round(np.abs(m[:, 2]))), "a plate off the kit's axes"
    return m, np.asarray(prism.placement.translation_mm, dtype=float)


def _footprint(local: np.ndarray) -> Polygon:
    """The box's section in the plate's plane: a box whose edges run along the kit's axes is a
    prism along the plate's axis too, its section the hull of its corners (a rectangle)."""
    hull = MultiPoint([tuple(p) for p in local[:, :2]]).convex_hull
    assert isinstance(hull, Polygon)
    return hull


def _corners(prism) -> np.ndarray:
    xy = np.asarray(prism.outline.exterior.coords[:-1], dtype=float)
    m, t = _frame(prism)
    local = np.vstack([np.column_stack([xy, np.zeros(len(xy))]), np.column_stack([xy, np.full(len(xy), prism.depth_mm)])])
    return local @ m.T + t


def _aabb(prism) -> tuple[np.ndarray, np.ndarray]:
    c = _corners(prism)
    return c.min(axis=0), c.max(axis=0)


def box_to_plate_mm(lo, hi, prism) -> float:
    """Distance from the box [lo, hi] (kit frame) to a plate on the kit's axes."""
    m, t = _frame(prism)
    pts = np.array([[x, y, z] for x in (lo[0], hi[0]) for y in (lo[1], hi[1]) for z in (lo[2], hi[2])])
    local = (pts - t) @ m  # kit -> the plate's own frame
    a, b = local.min(axis=0), local.max(axis=0)
    along = max(0.0, a[2] - prism.depth_mm, -b[2])
    return math.hypot(along, _footprint(local).distance(prism.outline))


def box_touches_plate(lo, hi, prism) -> bool:
    """The box meets the plate's material (distance 0) without entering it (no shared area
    where their depths overlap)."""
    m, t = _frame(prism)
    pts = np.array([[x, y, z] for x in (lo[0], hi[0]) for y in (lo[1], hi[1]) for z in (lo[2], hi[2])])
    local = (pts - t) @ m
    a, b = local.min(axis=0), local.max(axis=0)
    foot = _footprint(local)
    overlap = min(b[2], prism.depth_mm) - max(a[2], 0.0)
    shared = foot.intersection(prism.outline).area * max(0.0, overlap)
    return box_to_plate_mm(lo, hi, prism) < 1e-6 and shared < 1e-3  # mm3: coordinate noise of the snapped outlines


def _yz_outline(prism, angle_deg: float) -> Polygon:
    """A plate across the axle seen along x, turned with the frame by angle_deg about x."""
    m, t = _frame(prism)
    assert abs(abs(m[0, 2]) - 1.0) < 1e-9
    xy = np.asarray(prism.outline.exterior.coords, dtype=float)
    kit = np.column_stack([xy, np.zeros(len(xy))]) @ m.T + t
    holes = [np.column_stack([np.asarray(r.coords, dtype=float), np.zeros(len(r.coords))]) @ m.T + t
             for r in prism.outline.interiors]
    poly = Polygon(kit[:, 1:], [h[:, 1:] for h in holes])
    return affinity.rotate(poly, angle_deg, origin=(0.0, 0.0))


def _motor_boxes(bodies):
    motor = bodies["motor"]
    body_box = _aabb(motor.pieces[0])
    shaft = motor.pieces[1]
    return body_box, _aabb(shaft), shaft


def _assert_motor_clear_and_held(spec, kit):
    bodies = _bodies(kit, spec)
    (blo, bhi), (slo, shi), shaft = _motor_boxes(bodies)
    travel = spec.site.travel_limit_deg
    seen_holders = set()
    for name, b in bodies.items():
        if name == "motor":
            continue
        for p in b.pieces:
            w = np.abs(np.asarray(p.placement.matrix, dtype=float)[:, 2])
            if not np.allclose(w, np.round(w)):
                # a plate off the kit's axes (the polar wedge): its bounding box, nearer than the
                # plate itself, keeps GAP_MM off the motor and its shaft
                c = p.corners()
                lo, hi = c.min(axis=0), c.max(axis=0)
                for a, z in ((blo, bhi), (slo, shi)):
                    gap = np.linalg.norm(np.maximum(0.0, np.maximum(lo - z, a - hi)))
                    assert gap >= GAP_MM - 1e-6, (name, gap)
                continue
            # the motor body: touches its holders, keeps GAP_MM off everything else
            if b.source in HOLDERS:
                if box_touches_plate(blo, bhi, p):
                    seen_holders.add(b.source)
            elif not b.rotating:
                assert box_to_plate_mm(blo, bhi, p) >= GAP_MM - 1e-6, (name, box_to_plate_mm(blo, bhi, p))
            else:
                # a turning plate: at least its gap along the axle, whatever the angle
                c = _corners(p)[:, 0]
                along = max(0.0, c.min() - bhi[0], blo[0] - c.max())
                assert along >= GAP_MM - 1e-6, (name, along)
            # the spinning shaft: keeps GAP_MM off all but the pinion it carries
            if b.source == "pinion":
                continue
            if not b.rotating:
                assert box_to_plate_mm(slo, shi, p) >= GAP_MM - 1e-6, (name, box_to_plate_mm(slo, shi, p))
            else:
                c = _corners(p)[:, 0]
                along = max(0.0, c.min() - shi[0], slo[0] - c.max())
                if along >= GAP_MM:
                    continue
                disc = Point(0.5 * (slo[1] + shi[1]), 0.5 * (slo[2] + shi[2])).buffer(
                    0.5 * (shi[1] - slo[1]), 64)
                for a in np.arange(-travel, travel + 1e-9, 2.0):
                    d = math.hypot(along, _yz_outline(p, float(a)).distance(disc))
                    assert d >= GAP_MM - 1e-3, (name, float(a), d)
    assert seen_holders == HOLDERS, f"the motor body touches only {sorted(seen_holders)} of its holders"
    # the shaft runs through the pinion's plate(s) far enough to grip it: the whole stack when it is
    # short, else max(2 mm, half a sheet) (our rule, tests/test_derive.py)
    pin_x = np.concatenate([_corners(b.pieces[0])[:, 0] for b in bodies.values() if b.source == "pinion"])
    t = spec.sheet.thickness_mm
    grip = min(pin_x.max() - pin_x.min(), max(2.0, 0.5 * t))
    assert min(shi[0], pin_x.max()) - max(slo[0], pin_x.min()) >= grip - 1e-6
    return bodies


def _assert_braced(kit):
    # each plate of the motor box is joined to at least two other parts (tabs in slots)
    joined: dict[str, set[str]] = {}
    for j in kit.joints:
        joined.setdefault(j.tab_part, set()).add(j.slot_part)
        joined.setdefault(j.slot_part, set()).add(j.tab_part)
    assert joined["motor-mount"] >= {"base", "motor-brace"}
    assert joined["motor-clamp"] >= {"base", "motor-brace"}
    assert joined["motor-brace"] >= {"base", "motor-mount", "motor-clamp"}
    assert all("motor" in name for name in HOLDERS | {"motor-brace"})  # the naming rule of the STEP groups


# ---------------------------------------------------------------------------
# the demo, each shipped variant, and a spread of sheets


@pytest.mark.parametrize("path", VARIANTS, ids=[p.stem for p in VARIANTS])
def test_each_variant_holds_and_clears_its_motor(path):
    spec, kit = shipped(path)
    _assert_motor_clear_and_held(spec, kit)
    _assert_braced(kit)


@pytest.mark.parametrize("thickness", [1.5, 2.0, 4.0, 6.0, 8.0, 10.0])
def test_the_demo_motor_reaches_its_pinion_on_any_sheet(thickness):
    # the demo's 10 mm shaft on sheets from 1.5 to 10 mm: it once had to pass a mount plate as thick as
    # the sheet before reaching the pinion, so thick sheets were refused for the shaft's length
    # (the panel as thick as the sheet, so the frame's clamp stack is a plain stack on every sheet)
    spec = load_spec(DEMO, [f"sheet.thickness={thickness}", f"panel.thickness={thickness}"])
    kit = build_kit(spec)
    _assert_motor_clear_and_held(spec, kit)


# ---------------------------------------------------------------------------
# random designs


@seed(1313)
@settings(max_examples=6, deadline=None)
@given(st.fixed_dictionaries({
    "panel.width": st.integers(60, 300),
    "panel.height": st.integers(50, 250),
    "panel.thickness": st.sampled_from([2.0, 3.0, 5.0, 8.0]),
    "sheet.thickness": st.sampled_from([2.0, 3.0, 4.0, 6.0, 9.0, 12.0]),
    "sheet.material": st.sampled_from(['"mdf"', '"birch_plywood"', '"cast_acrylic"']),
    "strong": st.booleans(),
}))
def test_random_designs_clear_their_motor(d):
    mass = d["panel.width"] * d["panel.height"] * d["panel.thickness"] * 1e-9 * 1200.0  # laminate (invented)
    over = [f"{k}={v}" for k, v in d.items() if k != "strong"]
    over += [f"panel.mass={mass:.4g}", "sheet.width=1200", "sheet.height=900"] + (STRONG if d["strong"] else [])
    try:
        spec = load_spec(DEMO, over)
        kit = build_kit(spec)
    except ParameterError as exc:
        key = str(exc).split(" = ")[0]
        assert key != "motor.shaft_length", str(exc)  # the motor's place is free: its shaft always reaches
        R.refused(key)
        return
    R.kept()
    _assert_motor_clear_and_held(spec, kit)
    _assert_braced(kit)


# ---------------------------------------------------------------------------
# stiffness: Roark's cantilever with an end load


def _section_i_mm4(outline: Polygon, v: float, t: float) -> float:
    """Second moment of the plate's section at height v for bending in its plane: the material
    pieces of a thin strip round v, each a t-deep rectangle of width w about its own centre
    (t w^3 / 12), moved to the section's centroid (parallel axis theorem, any strength of
    materials text)."""
    strip = outline.intersection(box(-1e4, v - 1e-4, 1e4, v + 1e-4))
    pieces = [g.bounds for g in getattr(strip, "geoms", [strip]) if g.area > 0]
    widths = np.array([b[2] - b[0] for b in pieces])
    centres = np.array([(b[2] + b[0]) / 2 for b in pieces])
    c = float(np.sum(widths * centres) / np.sum(widths))
    return float(np.sum(t * widths ** 3 / 12 + t * widths * (centres - c) ** 2))


# bending moduli, taken low (the values the check is to use; sources named in the material table)
E_MPA = {"mdf": 2500.0,  # EN 622-5:2009, MDF modulus in bending (from memory)
         "birch_plywood": 4000.0,  # thin birch plywood across its weaker direction (from memory)
         "cast_acrylic": 3000.0}  # cast PMMA flexural modulus, ISO 178 data sheets (from memory)


@pytest.mark.parametrize("over", [[], ["sheet.thickness=2"], ["sheet.thickness=6"],
                                  ['sheet.material="cast_acrylic"'], ['sheet.material="birch_plywood"',
                                                                      "sheet.thickness=4"]],
                         ids=["demo", "2mm", "6mm", "acrylic", "plywood-4mm"])
def test_mount_deflection_against_roark(over):
    from sheetgen.mechanics.check import balance_check

    spec = load_spec(DEMO, over)
    kit = build_kit(spec)
    d = spec.drive
    # worst tooth force: the stalled motor on the pinion's pitch radius m z / 2, with its radial part
    # F_r = F_t tan(alpha): resultant F_t / cos(alpha) (Shigley, spur gear force analysis; from memory)
    ft = spec.motor.stall_torque_Nm / (d.module_mm * d.pinion_teeth / 2 * 1e-3)
    force = math.hypot(ft, ft * math.tan(math.radians(d.pressure_angle_deg)))
    # the lever: base top to the pinion's axis, read from the placed parts
    base = kit.part("base")
    base_top = base.placements[0].translation_mm[2] + base.thickness_mm
    pinion_z = kit.part("pinion").placements[0].translation_mm[2]
    lever = pinion_z - base_top
    # the least section of the mount plate over the lever, on a 0.05 mm grid of heights
    plate = kit.part("motor-mount")
    at = plate.placements[0]
    assert np.allclose(np.asarray(at.matrix)[:, 1], (0.0, 0.0, 1.0))  # the plate's local y is the kit's z
    heights = np.arange(base_top + 0.025, pinion_z, 0.05) - at.translation_mm[2]
    inertia = min(_section_i_mm4(plate.outline, float(v), plate.thickness_mm) for v in heights)
    # Roark's Formulas for Stress and Strain, cantilever with an end load: delta = F L^3 / (3 E I)
    # (from memory)
    expected = force * lever ** 3 / (3 * E_MPA[spec.sheet.material] * inertia)
    report = balance_check(kit, spec)
    mount = report.mount
    assert mount is not None
    assert mount.deflection_mm == pytest.approx(expected, rel=1e-6)
    # the allowed give: a quarter of the backlash (our rule: see sheetgen/mechanics/mount.py)
    assert mount.limit_mm == pytest.approx(0.25 * d.backlash_mm)
    check = next(c for c in report.checks if c.name == "motor mount stiffness")
    assert check.passed == (expected <= 0.25 * d.backlash_mm) and check.binding
    assert check.passed  # the plates are sized for it
    assert report.to_json()["motor_mount"]["deflection_mm"] == pytest.approx(expected, rel=1e-5)


def test_with_no_backlash_the_stiffness_check_fails():
    # a quarter of no backlash is no give at all: any plate bends, so the check must say so
    from sheetgen.mechanics.check import balance_check

    spec = load_spec(DEMO, ["drive.backlash=0"])
    report = balance_check(build_kit(spec), spec)
    check = next(c for c in report.checks if c.name == "motor mount stiffness")
    assert report.mount is not None and report.mount.deflection_mm > 0
    assert not check.passed and not report.ok


# ---------------------------------------------------------------------------
# the all-pairs assembly check


@pytest.fixture(scope="module")
def demo_model():
    pytest.importorskip("cadquery", reason="the 3D model needs cadquery (the model extra)")
    from sheetgen.model3d import build_model

    spec = load_spec(DEMO)
    kit = build_kit(spec)
    return spec, kit, build_model(kit, spec)


def _pairs(spec, kit, model):
    from sheetgen.mechanics.solar import tracking_range
    from sheetgen.model3d.bodies import sweep_angles
    from sheetgen.model3d.pairs import all_pairs

    tr = tracking_range(spec.site.latitude_deg, spec.site.axle, spec.site.travel_limit_deg)
    return all_pairs(kit, model, sweep_angles(tr.range_deg, 2.0))


def test_the_demo_keeps_every_promised_gap(demo_model):
    spec, kit, model = demo_model
    nearest, faults, _ = _pairs(spec, kit, model)
    assert faults == []
    by = {g.subject: g for g in nearest}
    # the shaft ends 1 mm short of the +x support's face (the layout's promise, measured on the solids)
    assert by["motor shaft"].other == "axle-support#2"
    assert by["motor shaft"].distance_mm == pytest.approx(1.0, abs=1e-6)
    assert by["motor"].distance_mm >= GAP_MM - 1e-9


def test_a_shaft_flush_against_the_support_is_flagged(demo_model):
    # the demo's motor slid 1 mm toward the wheel: its shaft end now sits flush against support #2
    # (two fixed solids touching, which an at-rest interference check does not see)
    import dataclasses

    from sheetgen.model3d import build_model

    spec, kit, model = demo_model
    gap = dict(kit.figures)["shaft_end_gap_mm"]
    moved = tuple(dataclasses.replace(c, centre_mm=(c.centre_mm[0] - gap, *c.centre_mm[1:])) if c.name == "motor"
                  else c for c in kit.components)
    bad = dataclasses.replace(kit, components=moved)
    nearest, faults, _ = _pairs(spec, bad, build_model(bad, spec))
    hit = [g for g in faults if g.subject == "motor shaft" and g.other == "axle-support#2"]
    assert hit and hit[0].distance_mm < 1e-6
