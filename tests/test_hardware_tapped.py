"""The counterweight bar's screw goes into the bar's tapped end: a screw and a washer, no nut.

Checked on the machine: the bracket's hole that lines up with the bar's axis and whose plate
face the bar's end face touches is the one the screw passes; that screw is listed without a
nut, long enough to pass the bracket and its washer and engage the thread, and not so long
that it bottoms in the bar.

Sources: ISO 7089 plain washer thickness h (from memory); ISO 4762 length series (from memory);
thread engagement into a tapped hole in steel of about 1 to 1.5 diameters (common practice,
from memory).
"""

from __future__ import annotations

import numpy as np
import pytest

from sheetgen.design.hardware import hardware_items
from sheetgen.design.kit import build_kit
from sheetgen.design.spec import load_spec
from tests.conftest import PARAMS, shipped

CASES = sorted(str(p) for p in PARAMS.glob("*.toml"))
ISO_7089_H = {3.0: 0.5, 4.0: 0.8, 5.0: 1.0}  # ISO 7089 washer thickness h, mm (from memory)
ISO_4762_L = (3, 4, 5, 6, 8, 10, 12, 16, 20, 25, 30, 35, 40, 45, 50)  # ISO 4762 lengths, mm (from memory)
MIN_ENGAGEMENT_D = 1.0  # into steel: at least one diameter of thread (common practice, from memory)


def _bar_screw_hole(kit):
    """(hole diameter, plate thickness) of the bracket hole on the bar's axis at the bar's end face."""
    bar = next(c for c in kit.components if c.name == "counterweight")
    cx, cy, cz = bar.centre_mm
    length = bar.size_mm[0]
    ends = (cx - length / 2, cx + length / 2)
    found = []
    for part in kit.parts:
        for pl in part.placements:
            if abs(abs(float(pl.matrix[0, 2])) - 1.0) > 1e-9:
                continue  # only plates across the axle hold a screw along the bar's axis
            for c in part.circles:
                p0 = pl.apply(np.array([[c.x_mm, c.y_mm, 0.0]]))[0]
                p1 = pl.apply(np.array([[c.x_mm, c.y_mm, part.thickness_mm]]))[0]
                on_axis = np.hypot(p0[1] - cy, p0[2] - cz) < 1e-6
                at_end = any(abs(x - e) < 1e-6 for x in (p0[0], p1[0]) for e in ends)
                if on_axis and at_end:
                    found.append((2 * c.radius_mm, part.thickness_mm, part.name))
    return found, length


@pytest.mark.parametrize("params", CASES, ids=lambda p: p.split("/")[-1])
def test_the_bar_screw_goes_into_the_tapped_end_without_a_nut(params):
    spec, kit = shipped(params)
    if not any(c.name == "counterweight" for c in kit.components):
        pytest.skip("this kit carries no counterweight")
    holes, bar_length = _bar_screw_hole(kit)
    assert len(holes) == 1, holes
    hole_mm, stack_mm, part = holes[0]
    hw = hardware_items(kit, spec)
    screws = [h for h in hw if h.item == "counterweight screw"]
    assert len(screws) == 1 and screws[0].qty_per_kit == 1, screws
    s = screws[0]
    assert part in s.parts and s.hole_mm == pytest.approx(hole_mm)
    d = s.diameter_mm
    assert d is not None and s.length_mm is not None
    # no nut for it: one nut per through bolt, and none more
    bolts = sum(h.qty_per_kit for h in hw if h.item == "bolt")
    nuts = sum(h.qty_per_kit for h in hw if h.item == "nut")
    assert nuts == bolts
    assert "no nut" in s.spec
    # long enough to pass plate and washer and engage one diameter of thread; short of bottoming
    washer = ISO_7089_H[d]
    assert s.length_mm in ISO_4762_L
    thread = s.length_mm - stack_mm - washer
    assert thread >= min(MIN_ENGAGEMENT_D * d, bar_length) - 1e-9, (s.length_mm, stack_mm, bar_length)
    assert thread <= bar_length + 1e-9, f"an M{d:g} x {s.length_mm:g} screw bottoms in a {bar_length:g} mm bar"


def test_a_through_bolt_still_gets_its_nut():
    """The frame bolts (through tray, rim and bezel) keep their nuts: the tapped rule is narrow."""
    spec = load_spec(str(PARAMS / "demo.toml"), [])
    hw = hardware_items(build_kit(spec), spec)
    frame = [h for h in hw if h.item == "bolt" and "tray" in h.parts]
    assert sum(h.qty_per_kit for h in frame) == 4
    assert sum(h.qty_per_kit for h in hw if h.item == "nut") == 4
