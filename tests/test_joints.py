"""Tab-and-slot joints: tab against slot for every fit class, after kerf.

The parts are cut by a round beam following the compensated path
(tests/_refs.py), and tab and slot are measured on what it leaves.
Allowances per side, slot against tab (common practice for laser-cut 3 mm
sheet, from memory): a press fit wants 0.025 to 0.05 mm of interference per
side, a snug fit is line to line, a slip fit has a small clearance (0.05 to
0.1 mm per side); the code's chosen values (press -0.04, snug 0, slip +0.08 mm)
are held to those ranges.
"""

from __future__ import annotations

import pytest
from shapely.geometry import LineString, Polygon

from sheetgen.geometry.joints import FIT_CLEARANCE_MM, tab_layout
from sheetgen.geometry.kerf import cut_outline
from sheetgen.design.kit import build_kit
from sheetgen.design.spec import load_spec
from tests import _refs as R
from tests.conftest import DEMO

TOL = 0.01
# clearance per side, slot against tab (common practice, from memory; see the module docstring)
ALLOWANCE_RANGE_MM = {"press": (-0.05, -0.025), "snug": (0.0, 0.0), "slip": (0.05, 0.10)}


def _as_cut(part, kerf):
    """The part as a round beam of diameter ``kerf`` leaves it, following the compensated path."""
    return R.round_beam_leaves(cut_outline(part.fit_outline, kerf), kerf)


def _rect_holes(poly: Polygon, rel: float = 1e-9):
    """Narrow near-rectangular holes (slots): their area within ``rel`` of their box's
    (a round beam leaves kerf/2 fillets in a slot's corners, a few hundredths of a mm2)."""
    out = []
    for ring in poly.interiors:
        p = Polygon(ring)
        x0, y0, x1, y1 = p.bounds
        # rectangular and narrow: a slot (windows are rectangular too, but wide)
        if abs(p.area - (x1 - x0) * (y1 - y0)) <= rel * (x1 - x0) * (y1 - y0) and min(x1 - x0, y1 - y0) < 15:
            out.append(sorted((x1 - x0, y1 - y0)))
    return out


def _tab_widths(poly: Polygon, y: float):
    cross = poly.intersection(LineString([(-1e4, y), (1e4, y)]))
    segs = getattr(cross, "geoms", [cross])
    return [s.length for s in segs if not s.is_empty]


@pytest.mark.parametrize("fit", ["press", "snug", "slip"])
@pytest.mark.parametrize("kerf", [0.12, 0.2, 0.3])
def test_tab_against_slot_after_kerf(fit, kerf):
    spec = load_spec(DEMO, [f"joints.fit={fit}", f"laser.kerf={kerf}"])
    kit = build_kit(spec)
    t = spec.sheet.thickness_mm
    c = FIT_CLEARANCE_MM[fit]
    lo, hi = ALLOWANCE_RANGE_MM[fit]
    assert lo <= c <= hi
    support = kit.part("axle-support")
    base = kit.part("base")
    # tabs on the support's foot, measured half way down the tab
    foot_y = -spec.axle.height_mm - t / 2
    widths = _tab_widths(_as_cut(support, kerf), foot_y)
    assert widths, "no tabs found on the support foot"
    tab = widths[0]
    assert all(abs(w - tab) < TOL for w in widths)
    # what fits where: the tab's width against the slot's length as cut (fillets included)
    slots = _rect_holes(_as_cut(base, kerf), rel=0.01)
    assert len(slots) == len(_rect_holes(base.outline))
    for short, long in slots:
        assert lo - TOL / 2 <= (short - t) / 2 <= hi + TOL / 2  # across the sheet thickness
        assert lo - TOL / 2 <= (long - tab) / 2 <= hi + TOL / 2  # along the edge
        # internal cross-check: exactly the code's chosen allowance
        assert short - t == pytest.approx(2 * c, abs=TOL)
        assert long - tab == pytest.approx(2 * c, abs=TOL)


def test_sheet_thickness_flows_to_every_slot():
    for t in (3.0, 4.0, 6.0):
        spec = load_spec(DEMO, [f"sheet.thickness={t}", f"motor.shaft_length={3 * t + 1}", "motor.stall_torque=0.3"])
        kit = build_kit(spec)
        for part in kit.parts:
            for short, _ in _rect_holes(part.outline):
                assert short == pytest.approx(t, abs=1e-6), part.name
        for j in kit.joints:
            assert j.slot_width_mm == pytest.approx(t, abs=1e-6)


def test_tab_layout_rules():
    centres, w = tab_layout(200, 3)
    assert w == 9  # three sheet thicknesses
    assert centres[0] - w / 2 >= w - 1e-9 and centres[-1] + w / 2 <= 200 - w + 1e-9
    assert all(b - a >= 2 * w for a, b in zip(centres, centres[1:]))
    (only,), _ = tab_layout(20, 3)
    assert only == 10
