"""The kit as a whole: parts, placements, propagation of a panel size change."""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from sheetgen.errors import ParameterError
from sheetgen.design.kit import build_kit, frame_sweep, travel_deg
from sheetgen.design.spec import load_spec
from tests.conftest import DEMO, PARAMS, shipped

FRAME = {"tray", "rim", "bezel"}


def _outlines(kit):
    return {p.name: p.outline for p in kit.parts}


def test_demo_kit_has_at_least_six_distinct_outlines(demo_kit):
    names = [p.name for p in demo_kit.parts]
    assert len(set(names)) == len(names) >= 6
    for p in demo_kit.parts:
        assert p.outline.is_valid and p.fit_outline.is_valid
        assert len(p.placements) == p.qty


def test_every_part_instance_is_placed_once(demo_kit):
    # one source of truth: placements live on the parts, one per instance
    total = sum(p.qty for p in demo_kit.parts)
    assert total == sum(len(p.placements) for p in demo_kit.parts)
    turning = {p.name for p in demo_kit.parts if p.rotating}
    assert {"tray", "rim", "bezel", "rib", "wheel", "collar"} <= turning
    assert not {"base", "axle-support", "stretcher", "motor-mount", "pinion"} & turning


# the drive and the stand pinned at the demo's derived values, so a panel change shows only
# what follows from the panel itself (with them at "auto" the drive follows the load too)
PINNED = ["axle.height=100", "drive.module=1.5", "drive.pinion_teeth=12", "drive.pinion_shift=0.3",
          "drive.wheel_teeth=70", "drive.layers=1", "drive.wheel_spacers=2", "drive.mount_gap=2", "frame.border=8"]


def test_panel_width_change_flows_to_the_frame_and_nothing_else():
    a = _outlines(build_kit(load_spec(DEMO, PINNED)))
    b = _outlines(build_kit(load_spec(DEMO, PINNED + ["panel.width=170"])))
    changed = {n for n in a if not a[n].equals_exact(b[n], 1e-9)}
    # the frame layers are 20 mm longer; the fixed frame spreads with them
    assert FRAME <= changed
    # the counterweight's bracket follows the frame's unbalance, which the wider frame moves
    assert changed == FRAME | {"base", "stretcher", "counterweight-bracket"}
    for n in FRAME:
        assert (b[n].bounds[2] - b[n].bounds[0]) - (a[n].bounds[2] - a[n].bounds[0]) == pytest.approx(20)


def test_panel_height_change_flows_to_the_frame_and_ribs():
    a = _outlines(build_kit(load_spec(DEMO, PINNED)))
    b = _outlines(build_kit(load_spec(DEMO, PINNED + ["panel.height=120"])))
    changed = {n for n in a if not a[n].equals_exact(b[n], 1e-9)}
    assert FRAME | {"rib"} <= changed
    assert not changed & {"wheel", "pinion", "collar", "spacer", "motor-mount", "motor-clamp", "motor-brace"}
    for n in FRAME:
        assert (b[n].bounds[3] - b[n].bounds[1]) - (a[n].bounds[3] - a[n].bounds[1]) == pytest.approx(10)


def test_with_the_drive_at_auto_a_larger_panel_gets_a_larger_ratio(demo_spec):
    # more wind on a larger panel: the solver gives the wheel more teeth (wheel_for_torque_margin)
    big = load_spec(DEMO, ["panel.width=200", "panel.height=150"])
    assert big.drive.wheel_teeth > demo_spec.drive.wheel_teeth
    assert big.axle.height_mm > demo_spec.axle.height_mm


@pytest.mark.parametrize("path", sorted(PARAMS.glob("*.toml")), ids=lambda p: p.name)
def test_shipped_kits_clear_the_base_through_their_travel(path):
    spec, kit = shipped(path)
    assert frame_sweep(kit, travel_deg(spec)).min_clearance_mm >= spec.frame.clearance_mm


def test_axle_too_low_is_refused_with_the_least_height():
    with pytest.raises(ParameterError, match=r"^axle\.height = 60: the turning .* comes within .* must be at least"):
        build_kit(load_spec(DEMO, ["axle.height=60", "drive.pinion_angle=60"]))


def test_part_too_large_for_the_sheet_names_part_sizes_and_what_builds():
    with pytest.raises(ParameterError, match=r"part base \(.* mm\) does not fit the usable sheet 190 x 140 mm.*"
                                             r"the (largest|smallest|highest|least) .* that builds is"):
        load_spec(DEMO, ["sheet.width=200", "sheet.height=150"])


@settings(max_examples=8, derandomize=True)
@given(width=st.floats(40, 400), height=st.floats(40, 300), t=st.sampled_from([2.0, 3.0, 4.0, 6.0]),
       kerf=st.floats(0.05, 0.4), fit=st.sampled_from(["press", "snug", "slip"]))
def test_any_valid_parameter_set_builds_or_is_refused_clearly(width, height, t, kerf, fit):
    try:
        spec = load_spec(DEMO, [f"panel.width={width}", f"panel.height={height}", f"sheet.thickness={t}",
                                f"laser.kerf={kerf}", f"joints.fit={fit}", "sheet.width=1200",
                                "sheet.height=900", "motor.stall_torque=2"])
        kit = build_kit(spec)
    except ParameterError as exc:
        assert "\n" not in str(exc)
        return
    for p in kit.parts:
        assert p.outline.is_valid and not p.outline.is_empty
        assert p.fit_outline.is_valid
