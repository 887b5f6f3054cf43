"""Kerf calibration: the coupon holds what it says, and the caliper reading
gives the kerf.

Sources beside the checks:
- an outline drawn without compensation comes out one kerf smaller measured
  outside across two opposite edges (the beam removes half a kerf each side):
  common practice, so kerf = nominal - measured;
- sizes and labels read back from the file with ezdxf (reference library).
"""

from __future__ import annotations

import io

import ezdxf
import pytest
from click.testing import CliRunner
from hypothesis import given
from hypothesis import strategies as st
from shapely.geometry import Polygon, box

from sheetgen.commands.coupon import command as coupon_command
from sheetgen.commands.kerf import command as kerf_command
from sheetgen.io.dxf import coupon_dxf_bytes
from sheetgen.production.coupon import kerf_from_measurement, make_coupon, width_label
from sheetgen.errors import ParameterError
from sheetgen.io.dxf_read import preflight_file


def test_kerf_from_a_caliper_reading():
    # common practice: kerf = nominal - measured; 20.00 drawn, 19.82 measured -> 0.18
    assert kerf_from_measurement(20.00, 19.82) == pytest.approx(0.18, abs=1e-12)
    # both directions measured: their mean, (19.82 + 19.80) / 2 = 19.81 -> 0.19
    assert kerf_from_measurement(20.00, [19.82, 19.80]) == pytest.approx(0.19, abs=1e-12)


def test_kerf_command_prints_the_override_line():
    result = CliRunner().invoke(kerf_command, ["--nominal", "20.00", "--measured", "19.82"])
    assert result.exit_code == 0, result.output
    assert "kerf = 20 - 19.82 = 0.18 mm" in result.output
    assert "--set laser.kerf=0.18" in result.output


@pytest.mark.parametrize("nominal, measured, text", [
    (20.0, 20.1, "smaller than --nominal"),
    (20.0, 18.0, "outside"),  # 2 mm of kerf: a corner was measured, not the flats
    (0.0, 19.8, "--nominal"),
    (20.0, -1.0, "--measured"),
])
def test_kerf_from_a_bad_reading_is_a_clear_error(nominal, measured, text):
    with pytest.raises(ParameterError, match=text):
        kerf_from_measurement(nominal, measured)


def _read(data: bytes):
    doc = ezdxf.read(io.StringIO(data.decode("utf-8")))
    rings = [Polygon([(p[0], p[1]) for p in e.get_points("xy")])
             for e in doc.modelspace() if e.dxf.layer == "CUT" and e.dxftype() == "LWPOLYLINE"]
    labels = [(e.dxf.text, e.dxf.align_point.x, e.dxf.align_point.y)
              for e in doc.modelspace() if e.dxf.layer == "LABEL" and e.dxftype() == "TEXT"]
    return doc, rings, labels


def test_coupon_holds_the_labelled_slots_the_tab_and_the_square():
    coupon = make_coupon(3.0)
    doc, rings, labels = _read(coupon_dxf_bytes(coupon))
    assert doc.units == 4  # mm ($INSUNITS = 4)
    slots = [r for r in rings if abs(r.bounds[3] - r.bounds[1] - 12.0) < 1e-9]
    assert len(slots) == 11
    widths = []
    for slot in slots:
        x0, y0, x1, y1 = slot.bounds
        # the label right below the slot names its drawn width (measured from the file)
        text = min((lab for lab in labels if lab[2] < y0), key=lambda lab: abs(lab[1] - (x0 + x1) / 2))
        assert abs(text[1] - (x0 + x1) / 2) < 1e-6
        assert float(text[0]) == pytest.approx(x1 - x0, abs=1e-9)
        widths.append(round(x1 - x0, 6))
    assert sorted(widths) == pytest.approx([2.70 + 0.05 * k for k in range(11)], abs=1e-9)
    # the square: 20.00 x 20.00 mm as drawn, labelled with its size
    squares = [r for r in rings if r.area == pytest.approx(400.0) and len(r.exterior.coords) == 5]
    assert len(squares) == 1
    x0, y0, x1, y1 = squares[0].bounds
    assert (x1 - x0, y1 - y0) == pytest.approx((20.0, 20.0))
    assert any(t == "20.00" for t, _, _ in labels)
    # the tab: as tall as the sheet is thick, narrower than the slots are long
    tab_piece = [r for r in rings if len(r.exterior.coords) == 9]
    assert len(tab_piece) == 1
    ys = sorted({round(y, 6) for _, y in tab_piece[0].exterior.coords})
    assert ys[-1] - ys[-2] == pytest.approx(3.0)
    xs_top = sorted(x for x, y in tab_piece[0].exterior.coords if round(y, 6) == ys[-1])
    tab_w = xs_top[-1] - xs_top[0]
    assert tab_w == pytest.approx(10.0)
    # the tab's section (sheet thickness across, tab width along) goes into the slot drawn at the
    # sheet thickness with room to spare lengthwise, so only the width is tested (both measured from the file)
    slot_len = min(s.bounds[3] - s.bounds[1] for s in slots)
    assert tab_w < slot_len
    at_t = [s for s in slots if s.bounds[2] - s.bounds[0] == pytest.approx(3.0, abs=1e-9)]
    assert len(at_t) == 1
    cx, cy = at_t[0].centroid.x, at_t[0].centroid.y
    section = box(cx - 3.0 / 2 + 1e-9, cy - tab_w / 2, cx + 3.0 / 2 - 1e-9, cy + tab_w / 2)
    assert at_t[0].contains(section)
    # one slot narrower (2.95 mm) does not take it
    narrower = min((s for s in slots if s.bounds[2] - s.bounds[0] < 3.0 - 1e-9), key=lambda s: -(s.bounds[2] - s.bounds[0]))
    ncx, ncy = narrower.centroid.x, narrower.centroid.y
    assert not narrower.contains(box(ncx - 1.5, ncy - tab_w / 2, ncx + 1.5, ncy + tab_w / 2))


@given(st.floats(min_value=1.5, max_value=12.0))
def test_coupon_slots_step_around_the_thickness_and_pass_preflight(tmp_path_factory, thickness):
    coupon = make_coupon(thickness)
    w = coupon.slot_widths_mm
    t = round(thickness, 3)  # the coupon takes the thickness to 0.001 mm
    assert len(w) == 11 and w[0] == pytest.approx(t - 0.30) and w[-1] == pytest.approx(t + 0.20)
    assert all(float(width_label(x)) == x for x in w)  # every label is the exact drawn width
    assert all(b - a == pytest.approx(0.05) for a, b in zip(w, w[1:]))
    path = tmp_path_factory.mktemp("coupon") / "c.dxf"
    path.write_bytes(coupon_dxf_bytes(coupon))
    # the thickest kerf the parameters allow, on a sheet the coupon's own size
    report = preflight_file(path, sheet_mm=coupon.size_mm, kerf_mm=0.6)
    assert report.clean, [f.line() for f in report.faults]


def test_coupon_command_writes_the_same_bytes_twice(tmp_path):
    runner = CliRunner()
    a, b = tmp_path / "a.dxf", tmp_path / "b.dxf"
    r1 = runner.invoke(coupon_command, ["--thickness", "3", "-o", str(a)])
    r2 = runner.invoke(coupon_command, ["--thickness", "3", "-o", str(b)])
    assert r1.exit_code == 0 and r2.exit_code == 0, r1.output
    assert a.read_bytes() == b.read_bytes()
    assert "11 slots 2.70 to 3.20 mm" in r1.output
    assert "never PVC" in r1.output  # the laser caution


def test_coupon_bad_thickness():
    with pytest.raises(ParameterError, match="--thickness"):
        make_coupon(0.5)
    result = CliRunner().invoke(coupon_command, ["--thickness", "40", "-o", "x.dxf"])
    assert isinstance(result.exception, ParameterError)
