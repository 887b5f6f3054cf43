"""Cost per kit: sheets, machine time and hardware from the optional price list.

The expected figures are plain arithmetic written here (price x quantity, the run's sheets and
laser time shared by its kits) on the demo's invented price list; the point under test is that a
price not given is absent (None in Python, null in JSON, "-" in the report), never zero, and
that the total is then absent too, with the missing keys named.
"""

from __future__ import annotations

from types import SimpleNamespace

import pytest

from tests.conftest import DEMO


@pytest.fixture(scope="module")
def demo_hardware(demo_kit, demo_spec):
    from sheetgen.design.hardware import hardware_items

    return hardware_items(demo_kit, demo_spec)


def _spec(*overrides):
    from sheetgen.design.spec import load_spec

    return load_spec(DEMO, list(overrides))


def test_full_price_list_gives_the_sum(demo_spec, demo_hardware):
    from sheetgen.production.cost import kit_cost

    cost = kit_cost(demo_spec, demo_hardware, kits=3, sheets=2, cut_time_s=2340.0)
    p = demo_spec.prices
    price_of = {"prices.bolt": p.bolt, "prices.nut": p.nut, "prices.washer": p.washer,
                "prices.anchor_screw": p.anchor_screw, "prices.motor_screw": p.motor_screw,
                "prices.motor": p.motor, "prices.panel": p.panel, "prices.counterweight": p.counterweight}
    expected_hw = 0.0
    for h in demo_hardware:
        if h.price_key in price_of:
            expected_hw += h.qty_per_kit * price_of[h.price_key]
        elif h.price_key == "prices.axle_rod":
            expected_hw += h.qty_per_kit * h.length_mm / 1000 * p.axle_rod_per_m
    expected_hw += p.payload if any(h.price_key == "prices.payload" for h in demo_hardware) else 0.0
    expected_hw += p.glue if any(h.price_key == "prices.glue" for h in demo_hardware) else 0.0
    assert cost.missing == ()
    assert cost.sheets == pytest.approx(2 * demo_spec.sheet.price / 3)
    assert cost.machine == pytest.approx(2340.0 / 3600 * demo_spec.laser.rate_per_h / 3)
    assert cost.hardware_total == pytest.approx(expected_hw)
    assert cost.total == pytest.approx(cost.sheets + cost.machine + expected_hw)


@pytest.mark.parametrize("key", ["prices.motor", "prices.bolt", "prices.axle_rod", "sheet.price", "laser.rate"])
def test_a_missing_price_is_absent_not_zero(demo_kit, key):
    from sheetgen.design.hardware import hardware_items
    from sheetgen.production.cost import kit_cost

    spec = _spec(f"{key}=0")
    cost = kit_cost(spec, hardware_items(demo_kit, spec), kits=3, sheets=2, cut_time_s=2340.0)
    data = cost.to_json()
    assert key in cost.missing and data["missing"] == [key]
    assert cost.total is None and data["total"] is None
    if key == "sheet.price":
        assert data["sheets"] is None and data["machine"] is not None
    elif key == "laser.rate":
        assert data["machine"] is None and data["sheets"] is not None
    else:
        line = next(ln for ln in data["hardware"] if ln["price_key"] == key)
        assert line["price"] is None and line["cost"] is None
        assert data["hardware_total"] is None
        # the other lines keep their figures
        assert all(ln["cost"] is not None for ln in data["hardware"] if ln["price_key"] != key)


def test_report_shows_an_absent_price_as_a_dash(demo_kit):
    from sheetgen.design.hardware import hardware_items
    from sheetgen.io.report import _hardware_and_cost
    from sheetgen.production.cost import kit_cost

    spec = _spec("prices.motor=0")
    hardware = hardware_items(demo_kit, spec)
    cost = kit_cost(spec, hardware, kits=1, sheets=1, cut_time_s=600.0)
    summary = {"hardware": [h.to_json(1) for h in hardware], "cost_per_kit": cost.to_json(), "sheets": 1,
               "cut_time_s": 600.0}
    html = "".join(_hardware_and_cost(SimpleNamespace(summary=summary, kits=1)))
    motor_row = next(row for row in html.split("<tr>") if "gear-motor" in row and "prices.motor" in row)
    assert ">-<" in motor_row and "0.00" not in motor_row
    total_row = next(row for row in html.split("<tr>") if "total per kit" in row)
    assert "<b>-</b>" in total_row
    assert "<code>prices.motor</code>" in html


def test_demo_build_summary_carries_the_cost_per_kit(demo_build_3):
    _, summary = demo_build_3
    c = summary["cost_per_kit"]
    assert c["kits"] == summary["kits"] == 3 and c["missing"] == []
    assert c["total"] == pytest.approx(c["sheets"] + c["machine"] + c["hardware_total"], abs=0.011)
    assert c["machine"] == pytest.approx(summary["cut_time_s"] / 3600 * 18 / 3, abs=0.006)  # laser.rate = 18 in the demo
    assert c["sheets"] == pytest.approx(summary["sheets"] * 4.80 / 3, abs=0.006)  # sheet.price = 4.80 in the demo
