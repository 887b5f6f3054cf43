"""The kit works as a machine, read from its STEP file alone.

For the demo and every shipped variant the STEP file is written once (sheetgen's own
writer, the file a build puts in model/assembly.step) and read back with OpenCascade's
XCAF reader (sheetgen.model3d.stepread: names and groups as the file holds them). From
then on the checks see only the file's solids and the params file (materials, panel mass,
travel limit), and measure with OpenCascade (tests/_step_machine.py): the panel is held,
the motor clears all but its holders, the frame stops at the travel limit and only
there, the wheel and the ribs are keyed to the axle, and the counterweight balances the
frame. None of these reads the kit's prisms, layout or checks.
"""

from __future__ import annotations

import functools
import tomllib
from pathlib import Path

import numpy as np
import pytest

pytest.importorskip("cadquery", reason="the STEP checks need cadquery (the model extra)")

from tests import _step_machine as M  # noqa: E402
from tests.conftest import PARAMS  # noqa: E402

CASES = sorted(str(p) for p in PARAMS.glob("*.toml"))
# The design's stated gap between the motor (body and spinning shaft) and every part but its holders:
# MOTOR_GAP_MM = 1.0 in sheetgen/kitmodel/contacts.py (our design rule), written here as a number.
MOTOR_GAP_MM = 1.0
# The bare frame's CG this far off the axle or more gets a carried counterweight:
# CW_THRESHOLD_MM = 0.5 in sheetgen/design/parts/counterweight.py (our design rule).
CW_THRESHOLD_MM = 0.5
PAST_DEG = 3.0  # turned this far past the travel limit, the frame must meet its stop
INSIDE_DEG = 1.0  # turned this far short of it, nothing may share volume
BORE_OUT_OF_ROUND_MM = 0.2  # a keyed bore: least and largest wall distance differ by more than this


class Kit:
    def __init__(self, params: str, step: Path, figures: dict):
        self.params = params
        self.step = step
        self.figures = figures  # the kit's own figures, for the internal cross-check only
        self.solids = M.read(step)
        with open(params, "rb") as f:
            p = tomllib.load(f)
        self.sheet_material = p["sheet"]["material"]
        self.axle_material = p["axle"]["material"]
        self.panel_mass_kg = float(p["panel"]["mass"])
        self.travel_limit_deg = float(p["site"]["travel_limit"])
        self.point_masses = tuple((float(r["mass_kg"]), tuple(float(v) for v in r["position_mm"]))
                                  for r in p.get("rotating_mass", []))
        self.axis = M.axle_axis(self.solids)

    @functools.cached_property
    def counterweight_hardware(self) -> tuple[str, ...]:
        return M.counterweight_hardware(self.solids)


@pytest.fixture(scope="module", params=CASES, ids=lambda p: Path(p).stem)
def kit(request, tmp_path_factory) -> Kit:
    out = tmp_path_factory.mktemp(Path(request.param).stem) / "assembly.step"
    return Kit(request.param, *M.write_step_and_figures(request.param, out))


def test_the_file_holds_the_named_solids_in_their_groups(kit):
    s = kit.solids
    assert s["base#1"].group == "fixed"
    assert s["motor"].group == "fixed"
    assert s["panel"].group == "rotating" and s["axle"].group == "rotating"
    assert {x.group for x in s.values()} == {"fixed", "rotating"}


def test_the_panel_touches_a_part_above_and_one_below(kit):
    (up, over), (down, under) = M.panel_gaps(kit.solids)
    assert up < M.TOUCH_MM, f"{Path(kit.params).name}: nothing holds the panel from above ({over} {up:.3f} mm off)"
    assert down < M.TOUCH_MM, f"{Path(kit.params).name}: nothing bears the panel from below ({under} {down:.3f} mm off)"


def _not_a_subject(name: str) -> bool:
    # the motor's holders carry "motor" in their names (issue 13, item 7); the pinion rides on its shaft
    return "motor" in name or name.startswith("pinion")


def test_the_motor_and_its_shaft_clear_all_but_their_holders_through_the_travel(kit):
    lim = kit.travel_limit_deg
    angles = sorted(set(np.linspace(-lim, lim, 13).round(6).tolist()))
    d, other, angle = M.motor_clearance(kit.solids, kit.axis, angles, _not_a_subject, at_least_mm=MOTOR_GAP_MM)
    assert d >= MOTOR_GAP_MM - 1e-6, (f"{Path(kit.params).name}: the motor comes {d:.3f} mm from {other} "
                                      f"(frame at {angle:g} deg), less than {MOTOR_GAP_MM:g} mm")


def test_the_motor_check_sees_a_motor_moved_half_a_gap_too_close(kit):
    """The check above is not vacuous: the motor moved straight toward the nearest solid it must
    clear (measured with the whole-solid distance, no reach) until 0.5 mm is left is reported."""
    import cadquery as cq

    if Path(kit.params).stem != "demo":
        pytest.skip("run on the demo only (one moved motor shows the check can fail)")
    lim = kit.travel_limit_deg
    d, other, angle = M.motor_clearance(kit.solids, kit.axis, [0.0], lambda n: _not_a_subject(n)
                                        or kit.solids[n].group == "rotating")
    motor = kit.solids["motor"].shape
    from OCP.BRepExtrema import BRepExtrema_DistShapeShape

    ext = BRepExtrema_DistShapeShape(motor.wrapped, kit.solids[other].shape.wrapped)
    p, q = ext.PointOnShape1(1), ext.PointOnShape2(1)
    step = np.array([q.X() - p.X(), q.Y() - p.Y(), q.Z() - p.Z()])
    step *= (d - 0.5) / np.linalg.norm(step)
    moved = dict(kit.solids)
    moved["motor"] = M.Solid("motor", "fixed", motor.moved(cq.Location(cq.Vector(*map(float, step)))))
    near, who, _ = M.motor_clearance(moved, kit.axis, [-lim, 0.0, lim], _not_a_subject, at_least_mm=MOTOR_GAP_MM)
    assert near == pytest.approx(0.5, abs=1e-6) and who == other


def test_the_holders_do_hold_the_motor(kit):
    """The motor touches a part carrying "motor" in its name (it is held, not floating)."""
    held = [n for n, s in kit.solids.items() if n != "motor" and "motor" in n
            and M.touches(kit.solids["motor"], s)]
    assert held, f"{Path(kit.params).name}: no holder touches the motor"


def test_inside_the_travel_no_turning_solid_meets_a_fixed_one(kit):
    lim = kit.travel_limit_deg
    for a in (-(lim - INSIDE_DEG), -lim / 2, 0.0, lim / 2, lim - INSIDE_DEG):
        hits = M.overlaps(kit.solids, kit.axis, a)
        assert not hits, f"{Path(kit.params).name}: at {a:g} deg {hits}"


@pytest.mark.parametrize("sign", (1, -1), ids=("plus", "minus"))
def test_past_the_travel_limit_the_frame_meets_its_stop(kit, sign):
    a = sign * (kit.travel_limit_deg + PAST_DEG)
    hits = M.overlaps(kit.solids, kit.axis, a)
    assert hits, f"{Path(kit.params).name}: turned to {a:g} deg the frame meets nothing"
    # what it meets is the stand's stop, and the stop alone: without the solids named as stops,
    # the same turn meets nothing (so the overlap found above is the stop's, not a false hit)
    stops = frozenset(n for n, s in kit.solids.items() if s.group == "fixed" and "stop" in n)
    assert stops and {f for _, f, _ in hits} <= stops, hits
    assert not M.overlaps(kit.solids, kit.axis, a, skip=stops)


def test_the_wheel_and_the_ribs_are_keyed_to_the_axle(kit):
    r = M.axle_radius_mm(kit.solids, kit.axis)
    keyed = [n for n in kit.solids if n.startswith(("wheel#", "rib#"))]
    assert any(n.startswith("wheel#") for n in keyed) and any(n.startswith("rib#") for n in keyed)
    for n in keyed:
        near, far = M.bore_walls(kit.solids[n].shape, kit.axis, r)
        assert far - near > BORE_OUT_OF_ROUND_MM, f"{n}: bore walls {near:.3f} to {far:.3f} mm from the axis: round"
    # the axle carries the flat the bores grip: its own profile is not round either
    near, far = M.bore_walls(kit.solids["axle"].shape, kit.axis, r)
    assert far - near > BORE_OUT_OF_ROUND_MM


def test_the_counterweight_balances_the_frame(kit):
    args = (kit.solids, kit.axis, kit.sheet_material, kit.axle_material, kit.panel_mass_kg)
    bare_Nm, bare_off_mm = M.unbalance_Nm(*args, leave_out=kit.counterweight_hardware,
                                          point_masses=kit.point_masses)
    residual_Nm, _ = M.unbalance_Nm(*args, point_masses=kit.point_masses)
    if bare_off_mm < CW_THRESHOLD_MM:
        pytest.skip(f"bare frame's CG {bare_off_mm:.2f} mm off the axle: no counterweight needed")
    cw = kit.solids.get("counterweight")
    assert cw is not None and cw.group == "rotating", "the kit carries no counterweight on its turning frame"
    assert residual_Nm <= bare_Nm / 4, f"residual {residual_Nm:.5f} N*m against bare {bare_Nm:.5f} N*m"


def test_the_unbalance_agrees_with_the_kits_own_figures(kit):
    """Internal cross-check (not the reference): the kit's balance figures against the file's."""
    figures = kit.figures
    args = (kit.solids, kit.axis, kit.sheet_material, kit.axle_material, kit.panel_mass_kg)
    # the kit's own balance figures leave the bought fasteners' mass out: so does this comparison
    fasteners = tuple(n for n in kit.solids if n.startswith(("bolt#", "nut#")))
    bare_Nm, _ = M.unbalance_Nm(*args, leave_out=kit.counterweight_hardware + fasteners,
                                point_masses=kit.point_masses)
    ours_gmm = bare_Nm / M.G_M_S2 * 1e6
    assert ours_gmm == pytest.approx(figures["bare_unbalance_gmm"], rel=0.05, abs=1.0)


def test_the_bolts_are_drawn_in_their_holes_on_the_faces_they_clamp(kit):
    """The frame bolts and the counterweight bar's screw are solids of the file (issue 13, item 7):
    each bolt and nut turns with the frame it clamps, touches a plate (head or nut on its face)
    and shares volume with nothing (the shank clears its hole, the nut rings the shank)."""
    fasteners = {n: s for n, s in kit.solids.items() if n.startswith(("bolt#", "nut#"))}
    assert sum(n.startswith("bolt#") for n in fasteners) >= 4, sorted(fasteners)
    for n, f in fasteners.items():
        assert f.group == "rotating", n
        box, reach = f.box, M.obb(f.shape, M.TOUCH_MM, planar=f.planar)
        near = [s for m, s in kit.solids.items() if m != n and M.bbox_gap(box, s.box) == 0.0
                and not M.boxes_apart(reach, s.oriented)]
        for s in near:
            v = M.common_mm3(f.shape, s.shape)
            assert v <= M.OVERLAP_TOL_MM3, f"{n} shares {v:.3f} mm3 with {s.name}"
        plates = [s for s in near if not s.name.startswith(("bolt#", "nut#"))]
        # the quick look first (a touch it finds is one), the full measure only where it finds none
        plate = (next((s.name for s in plates if M.touches(f, s, quick=True)), None)
                 or next((s.name for s in plates if M.touches(f, s)), None))
        assert plate, f"{n} touches no plate"
