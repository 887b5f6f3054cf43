"""The kit in 3D (issue 7): solids, STEP, interference, floating parts, tabs,
clearance through the tracking range, gear mesh, mass and CG.

Outside references used here:

* OpenCascade (through cadquery, a registry package) as the reference
  geometry kernel: volumes, centres of mass, booleans and distances are
  measured on its solids, independently of the shapely formulas the checks
  use for plates on parallel axes.
* Geometry handbook facts: a prism's volume is its base area times its height
  (Cavalieri's principle); projecting along an axis never lengthens a
  distance.
* Gears: at the pitch point a tooth of one gear faces a space of the other,
  and the normal backlash is the circumferential backlash at the reference
  circle times cos(pressure angle) (ISO/TR 10064-2, from memory).

Internal cross-checks (two parts of sheetgen held against each other, marked
so beside the check): ``sheetgen.design.kit.frame_sweep``, a separate 2D silhouette
sweep of the turning frame, against the 3D sweep; ``sheetgen.mechanics``
(balance check: masses and CG from shapely areas and centroids) against the
solids' own mass properties; the tracking range of ``sheetgen.mechanics.solar``
(itself tested against Duffie & Beckman in tests/test_solar.py).

cadquery is slow: each kit's solids are built once per module, and the STEP file
read back is the one the session's shared demo build wrote (tests/conftest.py).
"""

from __future__ import annotations

import json
import math
import re
import subprocess
import sys

import numpy as np
import pytest
from click.testing import CliRunner
from hypothesis import example, given, settings
from hypothesis import strategies as st

from sheetgen.errors import ParameterError, SheetgenError
from sheetgen.design.kit import build_kit, frame_sweep
from sheetgen.mechanics.solar import tracking_range
from sheetgen.design.spec import load_spec
from tests import _refs as R
from tests.conftest import DEMO, PARAMS, ROOT, shipped

VARIANTS = sorted(PARAMS.glob("*.toml"))
WRONG = ["axle.height=60", "drive.pinion_angle=60"]


def _assembled(spec, kit, step_deg=1.0):
    from sheetgen.model3d import assemble

    return assemble(kit, spec, step_deg)


@pytest.fixture(scope="module")
def kits():
    """spec, kit, model and report of every shipped parameter file, built once."""
    out = {}
    for path in VARIANTS:
        spec, kit = shipped(path)
        model, report = _assembled(spec, kit)
        out[path.name] = (spec, kit, model, report)
    return out


@pytest.fixture(scope="module")
def wrong():
    spec = load_spec(DEMO, WRONG)
    kit = build_kit(spec, check_clearance=False)
    model, report = _assembled(spec, kit)
    return spec, kit, model, report


def _expected_solids(kit) -> int:
    """Parts and solid components: the solids the report lists (it leaves the fasteners out,
    as the balance check leaves out the hardware's mass)."""
    return sum(p.qty for p in kit.parts) + sum(1 for c in kit.components if c.shape != "point")


def _fastener_solids(kit) -> int:
    """The bolt and nut solids the STEP file adds: one bolt for each fastener that turns with the
    frame in the hardware list's hole stacks (design/hardware.py), and a nut on each through bolt."""
    from sheetgen.design.hardware import hole_stacks

    turning = [s for s in hole_stacks(kit) if s.kind in ("bolt", "tapped")
               and any(pl.rotating for pl in kit.part(s.parts[0]).placements)]
    return len(turning) + sum(1 for s in turning if s.kind == "bolt")


# ---------------------------------------------------------------------------
# the heavy library stays out of the light commands


def test_cadquery_is_not_loaded_by_the_light_commands(tmp_path):
    # reference: sys.modules after a run in a fresh interpreter
    code = f"""
import sys
from click.testing import CliRunner
from sheetgen.cli import main
res = CliRunner().invoke(main, ["parts", {str(DEMO)!r}, "-o", {str(tmp_path / "parts")!r}])
assert res.exit_code == 0, res.output
import sheetgen.model3d, sheetgen.io.step, sheetgen.commands.assemble, sheetgen.drive.gears
import sheetgen.mechanics.check, sheetgen.commands.balance, sheetgen.production.nesting
print(sorted(m for m in sys.modules if m.split(".")[0] in ("cadquery", "OCP")))
"""
    out = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, timeout=300)
    assert out.returncode == 0, out.stderr
    assert out.stdout.strip() == "[]"


# ---------------------------------------------------------------------------
# shipped kits


@pytest.mark.parametrize("name", [p.name for p in VARIANTS])
def test_shipped_kits_assemble_cleanly(kits, name):
    spec, kit, model, report = kits[name]
    # one solid per part instance, plus the panel, axle and motor
    assert len(report.solids) == _expected_solids(kit)
    # reference kernel: OpenCascade booleans / exact prism formulas: no shared volume anywhere
    assert report.interference == () and report.max_interference_mm3 == 0.0
    assert report.floating_parts == () and report.detached_parts == ()
    assert report.tabs and report.tabs_ok
    assert {(t.tab_part, t.slot_part) for t in report.tabs} == {(j.tab_part, j.slot_part) for j in kit.joints}
    # the sweep covers the tracking range in steps <= 2 deg (internal cross-check: sheetgen.mechanics.solar)
    tr = tracking_range(spec.site.latitude_deg, spec.site.axle, spec.site.travel_limit_deg)
    assert report.tracking_range_deg == pytest.approx(tr.range_deg)
    assert 0 < report.step_deg <= 2.0
    assert report.angles >= (tr.range_deg[1] - tr.range_deg[0]) / 2.0 + 1
    assert report.collisions == () and report.touching == ()
    assert report.min_clearance_mm > 0
    assert report.frame_clearance.distance_mm >= spec.frame.clearance_mm
    assert report.mesh and report.mesh_ok
    assert report.mass.ok and report.ok


@pytest.mark.parametrize("name", [p.name for p in VARIANTS])
def test_3d_frame_clearance_agrees_with_the_2d_sweep(kits, name):
    # internal cross-check: sheetgen.design.kit.frame_sweep, the separate 2D silhouette sweep; for a
    # plate across the axle facing a plate along it, the 2D distance is the 3D one
    spec, kit, _, report = kits[name]
    tr = tracking_range(spec.site.latitude_deg, spec.site.axle, spec.site.travel_limit_deg)
    flat = frame_sweep(kit, tr.range_deg, report.step_deg)
    fc = report.frame_clearance
    assert fc.distance_mm == pytest.approx(flat.min_clearance_mm, abs=1e-6)
    assert (fc.turning, fc.fixed, fc.angle_deg) == (flat.turning, flat.fixed, pytest.approx(flat.angle_deg))


def test_running_parts_and_least_clearance_of_the_demo(kits):
    spec, kit, model, report = kits["demo.toml"]
    # rod, collar and washers are round about the axle (common practice: they turn in place)
    spacers = {f"spacer#{i + 1}" for i in range(kit.part("spacer").qty)}
    assert set(report.running_parts) == {"axle", "collar#1"} | spacers
    # the axle runs in the support holes with half the diametral bearing clearance each side
    axle = next(r for r in report.running if r.turning == "axle")
    assert axle.distance_mm == pytest.approx(spec.axle.bearing_clearance_mm / 2, abs=1e-3)
    assert axle.fixed.startswith("axle-support")
    c = report.closest[0]
    # the wheel runs drive.mount_gap in front of the motor mount (set by the layout solver,
    # at least MOUNT_GAP_MM = 1 mm), a gap along the axle
    from sheetgen.design.layout import MOUNT_GAP_MM

    assert spec.drive.mount_gap_mm >= MOUNT_GAP_MM
    # (the nearest wheel layer: the demo's teeth take drive.layers = 2 to carry the motor stalled at the end stops)
    pair = next(x for x in report.closest if x.turning.startswith("wheel#") and x.fixed == "motor-mount#1")
    assert pair.distance_mm == pytest.approx(spec.drive.mount_gap_mm, abs=1e-9) and pair.steady
    assert c.distance_mm <= pair.distance_mm
    assert [x.distance_mm for x in report.closest] == sorted(x.distance_mm for x in report.closest)


# ---------------------------------------------------------------------------
# a deliberately wrong kit


def test_the_kit_itself_refuses_the_low_axle():
    # the same parameters are refused at validation when the kit checks its clearance
    with pytest.raises(ParameterError, match=r"^axle\.height = 60: .*must be at least"):
        build_kit(load_spec(DEMO, WRONG))


def test_a_frame_hitting_the_stand_is_caught_with_parts_and_angle(wrong):
    spec, kit, model, report = wrong
    assert not report.ok and report.collisions
    assert report.min_clearance_mm == 0.0
    # the 2D sweep has the parts only: the counterweight bar (a component) hits the stand in 3D,
    # and its bracket, whose end is the bar's section, stands for it in 2D
    parts = {p.name for p in kit.parts}
    collisions = [c for c in report.collisions if {c.turning.split("#")[0], c.fixed.split("#")[0]} <= parts]
    assert any(c.turning == "counterweight" for c in report.collisions)
    assert any(c.turning.startswith("counterweight-bracket") for c in collisions)
    # internal cross-check: the separate 2D silhouette sweep names one of the pairs, at an angle
    # where the 3D sweep finds it colliding
    tr = tracking_range(spec.site.latitude_deg, spec.site.axle, spec.site.travel_limit_deg)
    flat = frame_sweep(kit, tr.range_deg, report.step_deg)
    assert flat.min_clearance_mm == 0.0
    worst = next(c for c in collisions if (c.turning, c.fixed) == (flat.turning, flat.fixed))
    assert worst.first_deg <= flat.angle_deg <= worst.last_deg
    assert worst.worst_volume_mm3 > 1.0
    # every 3D collision overlaps in 2D at its worst angle, and is clear in 2D one step
    # nearer to rest than where the 3D sweep first finds it (2D clear implies 3D clear)
    from sheetgen.kitmodel.clearance import kit_silhouettes, sweep_clearance

    sils = {s.name: s for s in kit_silhouettes(kit)}
    for c in collisions:
        pair = [sils[c.turning], sils[c.fixed]]
        hit = sweep_clearance(pair, (c.worst_deg, c.worst_deg + 1e-9))
        assert hit.min_clearance_mm == 0.0
        before = c.nearest_rest_deg - math.copysign(report.step_deg, c.nearest_rest_deg)
        clear = sweep_clearance(pair, (before, before + 1e-9))
        assert clear.min_clearance_mm > 0.0, c
    names = {(c.turning.split("#")[0], c.fixed.split("#")[0]) for c in report.collisions}
    assert ("rib", "stretcher") in names
    # nothing else is wrong with it: at rest it is a clean assembly
    assert report.interference == () and report.floating_parts == () and report.tabs_ok


# ---------------------------------------------------------------------------
# solids against the part model


@pytest.mark.parametrize("name", [p.name for p in VARIANTS])
def test_each_solid_is_its_outline_area_times_thickness(kits, name):
    # Cavalieri: a prism's volume is base area x height; OpenCascade measures the solid
    _, kit, model, report = kits[name]
    import cadquery as cq

    vols = {s.name: s.volume_mm3 for s in report.solids}
    for part in kit.parts:
        for i in range(part.qty):
            name_i = f"{part.name}#{i + 1}"
            v = model.solids[name_i].Volume()
            centre = np.array(cq.Shape.centerOfMass(model.solids[name_i]).toTuple())
            assert v == pytest.approx(part.outline.area * part.thickness_mm, rel=1e-9), name_i
            assert vols[name_i] == pytest.approx(v, rel=1e-12)
            # and the solid sits where its placement puts the outline's centroid: the kit's
            # placement, except the pinion, turned about its own axis to mesh
            at = model.body(name_i).pieces[0].placement
            assert centre == pytest.approx(at.apply(part.local_centroid_mm())[0], abs=1e-6)
            if part.name != "pinion":
                assert at == part.placements[i]
            else:
                assert at.translation_mm == part.placements[i].translation_mm


@pytest.mark.parametrize("name", [p.name for p in VARIANTS])
def test_turning_mass_and_cg_equal_the_balance_check(kits, name):
    # internal cross-check: sheetgen.mechanics.check.balance_check (shapely areas and centroids)
    spec, kit, model, report = kits[name]
    from sheetgen.mechanics.check import balance_check

    ref = balance_check(kit, spec).to_json()
    m = report.mass
    assert m.mass_kg == pytest.approx(ref["rotating_mass_kg"], rel=1e-5)  # the report rounds to 6 figures
    assert m.cg_mm == pytest.approx(ref["cg_mm"], rel=1e-5, abs=1e-4)
    assert m.mass_deviation <= 0.005 and m.cg_deviation_mm <= m.cg_tolerance_mm
    assert m.kit_mass_kg == pytest.approx(ref["total_mass_kg"], rel=1e-5)


# ---------------------------------------------------------------------------
# gears in mesh


def test_pinion_turn_for_a_pinion_straight_below_the_wheel():
    # worked by hand: 36-tooth wheel, tooth 0 on +y, so a tooth points straight down (270 deg
    # is a multiple of 10 deg); the 12-tooth pinion must then face it with a space: half
    # its 30 deg pitch
    from sheetgen.model3d import mesh_turn_deg
    from sheetgen.geometry.placement import place

    wheel = place((0, 1, 0), (0, 0, 1), (0, 0, 0), rotating=True)
    pinion = place((0, 1, 0), (0, 0, 1), (0, 0, -36.43))
    assert mesh_turn_deg(36, 12, wheel, pinion) == pytest.approx(15.0)
    # 35 teeth: 270 deg is 26.25 wheel pitches, so the nearest wheel tooth stands a quarter
    # pitch before the centre line; the pinion tooth moves a quarter of its own pitch
    # (7.5 deg) the other way round from the half-pitch position: 15 + 7.5 deg
    assert mesh_turn_deg(35, 12, wheel, pinion) == pytest.approx(22.5)


@pytest.mark.parametrize("name", [p.name for p in VARIANTS])
def test_mesh_gap_is_the_normal_backlash_either_side(kits, name):
    # tooth in a space, centred: each flank clears by half the normal backlash,
    # j_n = j_t cos(alpha) (ISO/TR 10064-2, from memory); the polygon chords lie inside the
    # involute (CHORD_TOL 0.01 mm), so the drawn gap may be a little larger, never smaller
    spec, _, _, report = kits[name]
    half_normal = spec.drive.backlash_mm / 2 * math.cos(math.radians(spec.drive.pressure_angle_deg))
    for g in report.mesh:
        assert half_normal - 1e-4 <= g.min_gap_mm <= half_normal + 0.02, g
        assert g.max_overlap_mm3 == 0.0


def test_tooth_on_tooth_is_an_interference_by_both_methods(kits):
    # half a pinion pitch off the computed turn puts a tooth on a tooth; the exact prism
    # formula and OpenCascade's boolean must agree on the shared volume
    spec, kit, model, _ = kits["demo.toml"]
    from sheetgen.model3d import Prism, parallel_shared_volume_mm3, prism_solid, spun

    wheel = model.body("wheel#1").pieces[0]
    pin = model.body("pinion#1").pieces[0]
    wrong_pin = Prism(pin.outline, pin.depth_mm, spun(pin.placement, 180.0 / spec.drive.pinion_teeth))
    v = parallel_shared_volume_mm3(wheel, wrong_pin)
    assert v > 1.0
    assert prism_solid(wheel).intersect(prism_solid(wrong_pin)).Volume() == pytest.approx(v, rel=1e-6)
    assert parallel_shared_volume_mm3(wheel, pin) == 0.0


# ---------------------------------------------------------------------------
# the sweep's bound


def test_sweep_bound_never_exceeds_the_3d_distance(kits):
    # projecting along x never lengthens a distance (geometry); for two plates across the
    # axle the bound is the distance. Reference: OpenCascade distances of the turned solids
    _, _, model, _ = kits["demo.toml"]
    import cadquery as cq
    from OCP.BRepExtrema import BRepExtrema_DistShapeShape

    from sheetgen.model3d.measures import _Measures, distance_bound_mm

    meas = _Measures(model)
    # (turning, fixed): plates across/across the axle, along/along, across/along, box/along, along/across
    pairs = [("rib#1", "axle-support#1"), ("tray#1", "base#1"), ("rib#2", "stretcher#1"),
             ("panel", "stretcher#2"), ("bezel#1", "axle-support#2")]
    for a, b in pairs:
        ba, bb = model.body(a), model.body(b)
        for ang in (-60.0, -23.0, 0.0, 41.0, 60.0):
            bound, exact = distance_bound_mm(ba, bb, ang)
            sa = model.solids[a].moved(cq.Location(cq.Vector(0, 0, 0), cq.Vector(1, 0, 0), ang))
            d = BRepExtrema_DistShapeShape(sa.Shells()[0].wrapped, model.solids[b].Shells()[0].wrapped).Value()
            assert bound <= d + 1e-6, (a, b, ang)
            if exact:
                assert bound == pytest.approx(d, abs=1e-6), (a, b, ang)
            # the sweep's exact distance (shapely formula or OpenCascade) is the kernel's
            assert meas.distance_mm(ba, bb, ang, 0.0) == pytest.approx(d, abs=1e-6), (a, b, ang)


def test_sweep_angles_cover_the_range_in_steps_of_at_most_two_degrees():
    from sheetgen.model3d import sweep_angles

    a = sweep_angles((-60.0, 60.0), 2.0)
    assert a[0] == -60.0 and a[-1] == 60.0 and len(a) == 61
    assert np.max(np.diff(sweep_angles((-47.3, 52.9), 1.7))) <= 1.7
    with pytest.raises(ParameterError, match="at most 2"):
        sweep_angles((-60.0, 60.0), 2.5)


# ---------------------------------------------------------------------------
# floating and detached parts are found


def _moved(kit, part_name, dz=0.0, comp_name=None, dx=0.0):
    import dataclasses

    from sheetgen.geometry.placement import Placement

    parts = []
    for p in kit.parts:
        if p.name == part_name:
            pl = [Placement(q.rotation, tuple(np.add(q.translation_mm, (0.0, 0.0, dz))), q.rotating)
                  for q in p.placements]
            p = dataclasses.replace(p, placements=tuple(pl))
        parts.append(p)
    comps = []
    for c in kit.components:
        if c.name == comp_name:
            c = dataclasses.replace(c, centre_mm=(c.centre_mm[0] + dx, c.centre_mm[1], c.centre_mm[2]))
        comps.append(c)
    return dataclasses.replace(kit, parts=tuple(parts), components=tuple(comps))


def test_a_lifted_bezel_floats_and_a_motor_off_its_mount_is_cut_off(demo_spec, demo_kit, monkeypatch):
    from sheetgen.model3d import build_model, find_floating, find_interference

    # the plates alone: the moved kit's bolts would be drawn through the whole (gapped) stack and
    # hang the lifted bezel on their heads
    monkeypatch.setattr("sheetgen.model3d.fasteners.fastener_bodies", lambda kit: ())
    reach = 1e-3 + demo_spec.axle.bearing_clearance_mm / 2
    lifted = build_model(_moved(demo_kit, "bezel", dz=2.0), demo_spec)
    floating, detached = find_floating(lifted, reach)
    assert floating == ["bezel#1"] and detached == []
    # the motor with its box of plates left out still carries the pinion on its shaft: the two hang
    # together, apart from the kit (with a backlash whose flank gap, 0.14 mm, is wider than the
    # axle's running clearance, the mesh does not count as a contact either)
    import dataclasses

    spec = load_spec(DEMO, ["drive.backlash=0.3"])
    kit = build_kit(spec)
    unheld = dataclasses.replace(kit, parts=tuple(p for p in kit.parts
                                                  if p.name not in ("motor-mount", "motor-clamp", "motor-brace")))
    off = build_model(unheld, spec)
    floating, detached = find_floating(off, reach)
    pinions = [f"pinion#{i + 1}" for i in range(spec.drive.layers)]  # one per drive layer
    assert floating == [] and sorted(detached) == ["motor", *pinions]
    assert find_interference(off) == []


# ---------------------------------------------------------------------------
# properties over the parameter space


def _overrides(d: dict) -> list[str]:
    t, layers = d["sheet.thickness"], d["drive.layers"]
    out = [f"{k}={v}" for k, v in d.items()]
    # a motor whose shaft just carries the pinion through the mount (see the strict xfail below)
    out += ["sheet.width=1000", "sheet.height=800", f"motor.shaft_length={t + 1 + layers * t:g}"]
    return out


KIT_PARAMS = st.fixed_dictionaries({
    "panel.width": st.integers(80, 240),
    "panel.height": st.integers(60, 180),
    "panel.thickness": st.sampled_from([2.0, 3.0, 4.5, 6.0]),
    "sheet.thickness": st.sampled_from([2.0, 3.0, 4.0, 6.0]),
    "axle.height": st.integers(60, 180),
    "axle.diameter": st.sampled_from([4.0, 6.0, 8.0, 10.0]),
    "drive.module": st.sampled_from([1.0, 1.5, 2.0]),
    "drive.pinion_teeth": st.integers(12, 18),
    "drive.wheel_teeth": st.integers(30, 54),
    "drive.pinion_angle": st.integers(-60, 60),
    "drive.layers": st.integers(1, 2),
    "site.travel_limit": st.integers(30, 75),
    "joints.fit": st.sampled_from(["press", "snug", "slip"]),
})


# derandomized: with five draws of a kit that takes seconds to assemble, a random run would fail the
# refused-draw tally (most draws refused) now and then by chance (about 1 run in 150 at the 20 % refusal
# rate seen with random draws); the fixed draws are all kept (pytest --hypothesis-show-statistics)
@settings(max_examples=5, deadline=None, derandomize=True)
@given(KIT_PARAMS)
@example({"panel.width": 200, "panel.height": 140, "panel.thickness": 4.5, "sheet.thickness": 4.0,
          "axle.height": 130, "axle.diameter": 8.0, "drive.module": 1.5, "drive.pinion_teeth": 14,
          "drive.wheel_teeth": 44, "drive.pinion_angle": -35, "drive.layers": 2, "site.travel_limit": 55,
          "joints.fit": "press"})
def test_any_valid_kit_assembles_cleanly_or_is_refused_clearly(params):
    # the property: cut files for a new panel size are safe
    try:
        spec = load_spec(DEMO, _overrides(params))
        kit = build_kit(spec)
    except SheetgenError as exc:
        msg = str(exc)
        assert isinstance(exc, ParameterError), msg
        assert "\n" not in msg and re.search(r"\b[a-z_]+\.[a-z_]+\b", msg) and "must" in msg, msg
        R.refused(msg.split(":")[0])
        return
    R.kept()
    _, report = _assembled(spec, kit, 2.0)
    assert report.ok, json.dumps({k: v for k, v in report.to_json().items() if k != "solids"})[:2000]


@pytest.mark.parametrize("length", [12.0, 13.0, 30.0])
def test_a_long_motor_shaft_moves_the_wheel_out_and_clears(demo_spec, length):
    # the layout solver adds spacers between the +x support and the wheel (and mount gap), so the
    # shaft ends at least SHAFT_END_GAP_MM short of the support: no hole, no contact
    from sheetgen.design.layout import SHAFT_END_GAP_MM

    spec = load_spec(DEMO, [f"motor.shaft_length={length}"])
    kit = build_kit(spec)
    from sheetgen.model3d import build_model, find_interference

    assert len(kit.part("axle-support").outline.interiors) == 3  # bearing, two stretcher slots
    assert dict(kit.figures)["shaft_end_gap_mm"] >= SHAFT_END_GAP_MM - 1e-9
    assert find_interference(build_model(kit, spec)) == []


def test_a_pinned_motor_place_that_reaches_the_support_is_refused():
    # by hand: gap 1 + pinion 3 + one 3 mm spacer, less the 1 mm kept from the support = 6 mm
    # (the motor's face is flush with its mount plate: no plate in the shaft's way)
    with pytest.raises(ParameterError, match=r"^motor\.shaft_length = 14: would reach within 1 mm of the "
                                             r"drive-side axle support .* must be at most 6 mm"):
        build_kit(load_spec(DEMO, ["motor.shaft_length=14", "drive.wheel_spacers=1", "drive.mount_gap=1"]))


# ---------------------------------------------------------------------------
# the command, and the STEP file read back


@pytest.fixture(scope="module")
def demo_run(tmp_path_factory):
    from sheetgen.commands.assemble import command

    out = tmp_path_factory.mktemp("assembly") / "out"
    res = CliRunner().invoke(command, [str(DEMO), "-o", str(out), "--json", "--sweep-step", "2"])
    assert res.exit_code == 0, res.output
    return out, json.loads(res.output)


def test_command_json_has_the_figures(demo_run, demo_kit):
    out, data = demo_run
    for key in ("solids", "interference", "max_interference_mm3", "floating_parts", "min_clearance_mm",
                "min_clearance_angle_deg", "mass_kg", "cg_mm", "ok", "closest", "tabs", "timing_s"):
        assert key in data, key
    assert data["ok"] is True and data["interference"] == [] and data["floating_parts"] == []
    assert data["solid_count"] == len(data["solids"]) == _expected_solids(demo_kit)
    assert data["min_clearance_mm"] > 0 and len(data["cg_mm"]) == 3
    assert sorted(p.name for p in out.iterdir()) == [".sheetgen-output.json", "assembly.step", "assembly.svg"]


def _bbox(s):
    b = s.BoundingBox()
    return np.array([b.xmin, b.ymin, b.zmin]), np.array([b.xmax, b.ymax, b.zmax])


def test_step_read_back_holds_one_solid_per_part_none_sharing_volume_none_floating(demo_build_3, demo_kit, demo_spec):
    # reference: a separate reading of the file with cadquery's STEP importer (OpenCascade); the file is
    # the one `sheetgen build` writes (model/assembly.step, the session's shared demo build), its figures
    # the build summary's "assembly" section
    import cadquery as cq
    from OCP.BRepExtrema import BRepExtrema_DistShapeShape

    folder, summary = demo_build_3
    data = summary["assembly"]
    step = folder / "model" / "assembly.step"
    text = step.read_text(encoding="latin-1")
    for s in data["solids"]:
        assert f"PRODUCT('{s['name']}'" in text, s["name"]
    solids = cq.importers.importStep(str(step)).solids().vals()
    assert len(solids) == _expected_solids(demo_kit) + _fastener_solids(demo_kit)
    # the same solids: each of the report's volumes matches one solid of the file (the rest are the
    # bolts and nuts, which the report leaves out)
    left = sorted(s.Volume() for s in solids)
    for v in sorted(s["volume_mm3"] for s in data["solids"]):
        k = next((k for k, w in enumerate(left) if w == pytest.approx(v, rel=1e-5)), None)
        assert k is not None, v
        left.pop(k)
    assert len(left) == _fastener_solids(demo_kit)
    boxes = [_bbox(s) for s in solids]
    n = len(solids)
    near = {i: [] for i in range(n)}
    reach = 1e-3 + demo_spec.axle.bearing_clearance_mm / 2
    for i in range(n):
        for j in range(i + 1, n):
            (alo, ahi), (blo, bhi) = boxes[i], boxes[j]
            gap = np.maximum(0, np.maximum(blo - ahi, alo - bhi))
            if np.linalg.norm(gap) <= reach + 1e-6:
                near[i].append(j)
                near[j].append(i)
            if np.all(alo < bhi) and np.all(blo < ahi):
                assert solids[i].intersect(solids[j]).Volume() <= 1e-3, (i, j)
    for i in range(n):
        shell_i = solids[i].Shells()[0].wrapped
        found = False
        for j in sorted(near[i], key=lambda j: len(solids[j].Faces())):
            if BRepExtrema_DistShapeShape(shell_i, solids[j].Shells()[0].wrapped).Value() <= reach:
                found = True
                break
        assert found, f"solid {i} ({solids[i].Volume():.1f} mm3) floats"


def test_step_is_repeatable_and_names_each_solid(kits, tmp_path):
    from sheetgen.io.step import STEP_TIME_STAMP, normalise_step, write_step
    from sheetgen.model3d import build_assembly

    _, _, model, _ = kits["acrylic-polar.toml"]
    (tmp_path / "a").mkdir()
    (tmp_path / "b").mkdir()
    a = write_step(build_assembly(model), tmp_path / "a" / "assembly.step")
    b = write_step(build_assembly(model), tmp_path / "b" / "assembly.step")
    ta, tb = a.read_bytes(), b.read_bytes()
    assert ta == tb
    text = ta.decode("latin-1")
    # ISO 10303-21 header: FILE_NAME(name, time_stamp, ...)
    assert f"FILE_NAME('assembly.step','{STEP_TIME_STAMP}'" in text
    assert normalise_step(text, "assembly.step") == text
    ids = [int(m) for m in re.findall(r"NEXT_ASSEMBLY_USAGE_OCCURRENCE\('(\d+)'", text)]
    assert ids == list(range(1, len(ids) + 1))
    products = set(re.findall(r"PRODUCT\('([^']*)'", text))
    assert {b.name for b in model.bodies} <= products and {"fixed", "rotating"} <= products


def test_picture_draws_every_solid(kits):
    from sheetgen.io.step import assembly_svg

    _, _, model, _ = kits["large-6mm.toml"]
    svg = assembly_svg(model.bodies, "large kit")
    assert svg.startswith("<?xml") and svg.rstrip().endswith("</svg>")
    titles = re.findall(r"<g><title>([^<]*)</title>", svg)
    assert sorted(t.split(" (")[0] for t in titles if " (" not in t) == sorted(
        b.name for b in model.bodies if len(b.pieces) == 1)
    assert assembly_svg(model.bodies, "large kit") == svg


def test_text_summary_names_the_figures(kits):
    from sheetgen.commands.assemble import render_text

    spec, _, _, report = kits["demo.toml"]
    text = render_text(report, "out", 1.0, 2.0, 0.5)
    assert text.startswith("Assembly: OK")
    # the demo's derived drive.mount_gap (the layout solver) is the wheel's gap to the mount
    # (its outer layer: the demo's wheel has drive.layers layers)
    assert (f"least clearance: {spec.drive.mount_gap_mm:.3f} mm, wheel#{spec.drive.layers} to motor-mount#1 "
            "at every angle" in text)
    assert "frame over the fixed parts" in text and "pinch" in text


def test_bad_input_exits_2_with_one_line_and_writes_nothing(tmp_path):
    import sheetgen.cli as cli

    out = tmp_path / "out"
    res = CliRunner().invoke(cli.main, ["assemble", str(DEMO), "-o", str(out), "--set", "panel.width=5"])
    assert res.exit_code == 2
    assert res.output.strip().count("\n") == 0 and "panel.width = 5" in res.output
    assert not out.exists()
    res = CliRunner().invoke(cli.main, ["assemble", str(DEMO), "-o", str(out), "--sweep-step", "3"])
    assert res.exit_code == 2 and not out.exists()
    res = CliRunner().invoke(cli.main, ["assemble", str(tmp_path / "missing.toml"), "-o", str(out)])
    assert res.exit_code == 2 and "no such parameter file" in res.output
