"""The kit as a whole: parts, placements, propagation of a panel size change."""

from __future__ import annotations

import pytest
from hypothesis import given
from hypothesis import strategies as st

from sheetgen.errors import ParameterError
from sheetgen.kit import build_kit, frame_sweep, travel_deg
from sheetgen.spec import load_spec
from tests.conftest import DEMO, PARAMS

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


def test_panel_width_change_flows_to_the_frame_and_nothing_else(demo_spec):
    a = _outlines(build_kit(demo_spec))
    b = _outlines(build_kit(load_spec(DEMO, ["panel.width=170"])))
    changed = {n for n in a if not a[n].equals_exact(b[n], 1e-9)}
    # the frame layers are 20 mm longer; the fixed frame spreads with them
    assert FRAME <= changed
    assert changed == FRAME | {"base", "stretcher"}
    for n in FRAME:
        assert (b[n].bounds[2] - b[n].bounds[0]) - (a[n].bounds[2] - a[n].bounds[0]) == pytest.approx(20)


def test_panel_height_change_flows_to_the_frame_and_ribs():
    a = _outlines(build_kit(load_spec(DEMO, ["axle.height=100"])))
    b = _outlines(build_kit(load_spec(DEMO, ["panel.height=120", "axle.height=100"])))
    changed = {n for n in a if not a[n].equals_exact(b[n], 1e-9)}
    assert FRAME | {"rib"} <= changed
    assert not changed & {"wheel", "pinion", "collar", "spacer", "motor-mount"}
    for n in FRAME:
        assert (b[n].bounds[3] - b[n].bounds[1]) - (a[n].bounds[3] - a[n].bounds[1]) == pytest.approx(10)


@pytest.mark.parametrize("path", sorted(PARAMS.glob("*.toml")), ids=lambda p: p.name)
def test_shipped_kits_clear_the_base_through_their_travel(path):
    spec = load_spec(path)
    kit = build_kit(spec)
    assert frame_sweep(kit, travel_deg(spec)).min_clearance_mm >= spec.frame.clearance_mm


def test_axle_too_low_is_refused_with_the_least_height():
    with pytest.raises(ParameterError, match=r"^axle\.height = 60: the turning .* comes within .* must be at least"):
        build_kit(load_spec(DEMO, ["axle.height=60", "drive.pinion_angle=60"]))


def test_part_too_large_for_the_sheet_names_part_and_sizes():
    with pytest.raises(ParameterError, match=r"part base \(.* mm\) does not fit the usable sheet 190 x 140 mm"):
        build_kit(load_spec(DEMO, ["sheet.width=200", "sheet.height=150"]))


@given(width=st.floats(40, 400), height=st.floats(40, 300), t=st.sampled_from([2.0, 3.0, 4.0, 6.0]),
       kerf=st.floats(0.05, 0.4), fit=st.sampled_from(["press", "snug", "slip"]))
def test_any_valid_parameter_set_builds_or_is_refused_clearly(width, height, t, kerf, fit):
    try:
        spec = load_spec(DEMO, [f"panel.width={width}", f"panel.height={height}", f"sheet.thickness={t}",
                                f"laser.kerf={kerf}", f"joints.fit={fit}", "sheet.width=1200",
                                "sheet.height=900", f"motor.shaft_length={3 * t + 1}",
                                f"axle.height={0.7 * height + 50}"])
        kit = build_kit(spec)
    except ParameterError as exc:
        assert "\n" not in str(exc)
        return
    for p in kit.parts:
        assert p.outline.is_valid and not p.outline.is_empty
        assert p.fit_outline.is_valid
