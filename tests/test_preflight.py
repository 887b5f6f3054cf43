"""Preflight: each fault it claims is caught on a file crafted to hold it, and
clean files pass.

The crafted files are written with ezdxf (reference library from the package
registry) so they are DXF as another program would write it, not only as
sheetgen writes it. Sources beside the checks:
- $INSUNITS: the DXF header variable for drawing units, 0 = unitless, 4 = mm,
  1 = inch; it exists from R2000 on, R12 has no such field (AutoCAD DXF
  reference, HEADER section, from memory; ezdxf.units agrees);
- keep webs and gaps at least twice the kerf: common practice;
- a closed contour must not cross itself or another, and a path cut twice or of
  no length is waste: common practice.
"""

from __future__ import annotations

import math

import ezdxf
import pytest
from click.testing import CliRunner
from hypothesis import assume, given
from hypothesis import strategies as st

from sheetgen.commands.preflight import command
from sheetgen.production.cutplan import LaserSettings, cut_plan_contours, plan_sheet
from sheetgen.errors import InputFileError, ParameterError
from sheetgen.geometry.contour import Contour
from sheetgen.io.dxf import dxf_bytes
from sheetgen.io.dxf_read import preflight_file
from sheetgen.commands.preflight import parse_sheet

CUT = {"layer": "CUT"}


def _doc(version="R2000", units=4):
    doc = ezdxf.new(version)
    if version != "R12":
        doc.units = units
    return doc, doc.modelspace()


def _square(msp, x, y, s, **kw):
    msp.add_lwpolyline([(x, y), (x + s, y), (x + s, y + s), (x, y + s)], close=True, dxfattribs=CUT, **kw)


def _save(doc, tmp_path, name):
    path = tmp_path / name
    doc.saveas(path)
    return path


def _kinds(report):
    return [f.kind for f in report.faults]


def _near(fault, x, y, tol=0.05):
    return fault.x_mm is not None and math.hypot(fault.x_mm - x, fault.y_mm - y) <= tol


def test_clean_file_passes(tmp_path):
    doc, msp = _doc()
    _square(msp, 10, 10, 40)
    msp.add_circle((30, 30), 5, dxfattribs=CUT)
    msp.add_arc((100, 30), 10, 0, 180, dxfattribs=CUT)  # a half-round part from an arc and a line
    msp.add_line((90, 30), (110, 30), dxfattribs=CUT)
    msp.add_text("PART A", dxfattribs={"layer": "LABEL"}).set_placement((20, 60))
    report = preflight_file(_save(doc, tmp_path, "clean.dxf"), sheet_mm=(200, 100), kerf_mm=0.2)
    assert report.clean, [f.line() for f in report.faults]
    assert report.contours == 3
    assert report.layers == ("CUT",)


def test_open_contour(tmp_path):
    doc, msp = _doc()
    msp.add_lwpolyline([(0, 0), (20, 0), (20, 20), (0, 20)], close=False, dxfattribs=CUT)
    report = preflight_file(_save(doc, tmp_path, "open.dxf"))
    # the only path is open, so the file has nothing to cut as well
    assert _kinds(report) == ["nothing-to-cut", "open-contour", "open-contour"]
    assert _near(report.faults[1], 0, 0) and _near(report.faults[2], 0, 20)


def test_gap_wider_than_the_join_tolerance_is_open_and_a_closed_chain_is_not(tmp_path):
    doc, msp = _doc()
    for a, b in [((0, 0), (10, 0)), ((10, 0), (10, 10)), ((10, 10), (0, 10)), ((0, 10), (0, 0))]:
        msp.add_line(a, b, dxfattribs=CUT)  # four lines that close
    for a, b in [((20, 0), (30, 0)), ((30, 0), (30, 10)), ((30, 10), (20, 10)), ((20, 10), (20, 0.5))]:
        msp.add_line(a, b, dxfattribs=CUT)  # a 0.5 mm gap
    report = preflight_file(_save(doc, tmp_path, "chains.dxf"))
    assert _kinds(report) == ["open-contour", "open-contour"]
    assert {(round(f.x_mm, 3), round(f.y_mm, 3)) for f in report.faults} == {(20, 0), (20, 0.5)}
    assert report.contours == 1


def test_branch(tmp_path):
    doc, msp = _doc()
    for a, b in [((0, 0), (10, 0)), ((10, 0), (10, 10)), ((10, 10), (0, 10)), ((0, 10), (0, 0)), ((10, 0), (20, 0))]:
        msp.add_line(a, b, dxfattribs=CUT)
    report = preflight_file(_save(doc, tmp_path, "branch.dxf"))
    assert "branch" in _kinds(report)
    assert _near([f for f in report.faults if f.kind == "branch"][0], 10, 0)


def test_overlapping_parts(tmp_path):
    doc, msp = _doc()
    _square(msp, 0, 0, 20)
    _square(msp, 15, 15, 20)
    report = preflight_file(_save(doc, tmp_path, "overlap.dxf"))
    assert _kinds(report) == ["overlap"]
    assert "overlap" in report.faults[0].message
    f = report.faults[0]
    assert 15 - 1e-6 <= f.x_mm <= 20 + 1e-6 and 15 - 1e-6 <= f.y_mm <= 20 + 1e-6


def test_touching_parts(tmp_path):
    doc, msp = _doc()
    _square(msp, 0, 0, 20)
    msp.add_circle((30, 10), 10, dxfattribs=CUT)  # touches the square's right edge at (20, 10)
    report = preflight_file(_save(doc, tmp_path, "touch.dxf"))
    assert _kinds(report) == ["overlap"]
    assert "touch" in report.faults[0].message and _near(report.faults[0], 20, 10, tol=0.01)


def test_hole_touching_its_outline(tmp_path):
    doc, msp = _doc()
    _square(msp, 0, 0, 30)
    _square(msp, 0, 10, 10)  # a hole sharing the outline's left edge
    report = preflight_file(_save(doc, tmp_path, "hole_touch.dxf"))
    assert "overlap" in _kinds(report)
    assert "duplicate" in _kinds(report)  # the shared edge would be cut twice


def test_off_sheet(tmp_path):
    doc, msp = _doc()
    _square(msp, 10, 10, 20)
    msp.add_circle((195, 50), 10, dxfattribs=CUT)  # reaches x = 205 on a 200 mm sheet
    report = preflight_file(_save(doc, tmp_path, "off.dxf"), sheet_mm=(200, 100))
    assert _kinds(report) == ["off-sheet"]
    assert _near(report.faults[0], 205, 50, tol=0.01) and "5.000 mm" in report.faults[0].message
    assert preflight_file(tmp_path / "off.dxf", sheet_mm=(300, 100)).clean


def test_duplicate_segments(tmp_path):
    doc, msp = _doc()
    _square(msp, 0, 0, 20)
    msp.add_line((5, 0), (15, 0), dxfattribs=CUT)  # lies on the square's bottom edge
    report = preflight_file(_save(doc, tmp_path, "dup_line.dxf"))
    dup = [f for f in report.faults if f.kind == "duplicate"]
    assert len(dup) == 1 and _near(dup[0], 10, 0)
    doc, msp = _doc()
    msp.add_circle((10, 10), 4, dxfattribs=CUT)
    msp.add_circle((10, 10), 4, dxfattribs=CUT)
    report = preflight_file(_save(doc, tmp_path, "dup_circle.dxf"))
    assert _kinds(report) == ["duplicate"]


def test_zero_length_segments(tmp_path):
    doc, msp = _doc()
    msp.add_lwpolyline([(0, 0), (20, 0), (20, 0), (20, 20), (0, 20)], close=True, dxfattribs=CUT)
    msp.add_line((50, 50), (50, 50), dxfattribs=CUT)
    msp.add_circle((80, 80), 0, dxfattribs=CUT)
    report = preflight_file(_save(doc, tmp_path, "zero.dxf"))
    assert _kinds(report) == ["zero-length"] * 3
    assert {(round(f.x_mm), round(f.y_mm)) for f in report.faults} == {(20, 0), (50, 50), (80, 80)}


def test_self_crossing(tmp_path):
    doc, msp = _doc()
    msp.add_lwpolyline([(0, 0), (10, 10), (10, 0), (0, 10)], close=True, dxfattribs=CUT)
    report = preflight_file(_save(doc, tmp_path, "bowtie.dxf"))
    assert _kinds(report) == ["self-crossing"]
    assert _near(report.faults[0], 5, 5)


def test_narrow_gap_between_parts(tmp_path):
    doc, msp = _doc()
    _square(msp, 0, 0, 20)
    _square(msp, 20.3, 0, 20)  # 0.3 mm apart: under 2 x 0.2 mm kerf
    path = _save(doc, tmp_path, "gap.dxf")
    report = preflight_file(path, kerf_mm=0.2)
    assert _kinds(report) == ["narrow"] and "0.300 mm" in report.faults[0].message
    assert 20 <= report.faults[0].x_mm <= 20.3
    assert preflight_file(path, kerf_mm=0.1).clean  # 0.3 mm >= 2 x 0.1 mm (common practice rule)


def test_narrow_features_within_a_contour(tmp_path):
    doc, msp = _doc()
    # a part with a tab 0.3 mm wide and 5 mm long (material under 2 x 0.2 mm), and a part with a
    # slot 0.15 mm wide and 8 mm long as a hole (a gap under the 0.2 mm beam)
    msp.add_lwpolyline([(0, 0), (30, 0), (30, 10), (15.15, 10), (15.15, 15), (14.85, 15), (14.85, 10), (0, 10)],
                       close=True, dxfattribs=CUT)
    msp.add_lwpolyline([(50, 0), (80, 0), (80, 20), (50, 20)], close=True, dxfattribs=CUT)
    msp.add_lwpolyline([(60, 5), (60.15, 5), (60.15, 13), (60, 13)], close=True, dxfattribs=CUT)
    msp.add_lwpolyline([(70, 5), (70.3, 5), (70.3, 13), (70, 13)], close=True, dxfattribs=CUT)  # 0.3 mm: fine
    path = _save(doc, tmp_path, "thin.dxf")
    report = preflight_file(path, kerf_mm=0.2)
    narrow = [f for f in report.faults if f.kind == "narrow"]
    assert len(narrow) == 2, [f.line() for f in report.faults]
    assert any(14.8 <= f.x_mm <= 15.2 and 10 <= f.y_mm <= 15 and "material" in f.message for f in narrow)
    assert any(59.9 <= f.x_mm <= 60.2 and 5 <= f.y_mm <= 13 and "gap" in f.message for f in narrow)
    # with a 0.1 mm kerf both are wide enough; right-angled corners are never narrow features
    assert preflight_file(path, kerf_mm=0.1).clean


def test_short_bridge(tmp_path):
    # two 10 mm squares joined by a bridge 0.3 mm wide and only 0.5 mm long, as one contour
    doc, msp = _doc()
    msp.add_lwpolyline([(0, 0), (10, 0), (10, 4.85), (10.5, 4.85), (10.5, 0), (20.5, 0), (20.5, 10),
                        (10.5, 10), (10.5, 5.15), (10, 5.15), (10, 10), (0, 10)], close=True, dxfattribs=CUT)
    path = _save(doc, tmp_path, "bridge.dxf")
    report = preflight_file(path, kerf_mm=0.2)
    assert _kinds(report) == ["narrow"] and "material" in report.faults[0].message
    assert 9.9 <= report.faults[0].x_mm <= 10.6 and 4.8 <= report.faults[0].y_mm <= 5.2
    assert preflight_file(path, kerf_mm=0.1).clean


def test_lead_ins(tmp_path):
    # a lead-in is an open path that runs in to a contour's start and round back to it
    doc, msp = _doc()
    msp.add_lwpolyline([(8, 8), (10, 10), (30, 10), (30, 30), (10, 30), (10, 10)], close=False, dxfattribs=CUT)
    # a round hole of the same part with a lead-in from near its centre: two half circles (bulge 1)
    msp.add_lwpolyline([(20, 20, 0), (22, 20, 1), (18, 20, 1), (22, 20, 0)], format="xyb", close=False,
                       dxfattribs=CUT)
    path = _save(doc, tmp_path, "lead_ok.dxf")
    report = preflight_file(path, kerf_mm=0.2)
    assert report.clean, [f.line() for f in report.faults]
    assert report.contours == 2
    # a lead-in that starts inside its part, and one that runs through a neighbour
    doc, msp = _doc()
    msp.add_lwpolyline([(12, 12), (10, 10), (30, 10), (30, 30), (10, 30), (10, 10)], close=False, dxfattribs=CUT)
    msp.add_lwpolyline([(38, 20), (41, 20), (60, 20), (60, 30), (41, 30), (41, 20)], close=False, dxfattribs=CUT)
    _square(msp, 38.5, 19.5, 1)  # a small part across the second lead-in
    report = preflight_file(_save(doc, tmp_path, "lead_bad.dxf"))
    msgs = [f.message for f in report.faults]
    assert _kinds(report) == ["overlap", "overlap"], msgs
    assert any("part's side" in m for m in msgs) and any("meets another contour" in m for m in msgs)


def test_missing_units(tmp_path):
    doc, msp = _doc(units=0)  # $INSUNITS = 0: unitless
    _square(msp, 0, 0, 10)
    report = preflight_file(_save(doc, tmp_path, "unitless.dxf"))
    assert _kinds(report) == ["no-units"] and report.faults[0].x_mm is None
    doc, msp = _doc()
    del doc.header["$INSUNITS"]
    _square(msp, 0, 0, 10)
    report = preflight_file(_save(doc, tmp_path, "nounits.dxf"))
    assert _kinds(report) == ["no-units"] and "missing" in report.faults[0].message


def test_r12_has_no_units_field_and_is_a_note(tmp_path):
    doc, msp = _doc("R12")
    msp.add_polyline2d([(0, 0), (10, 0), (10, 10)], close=True, dxfattribs=CUT)
    report = preflight_file(_save(doc, tmp_path, "r12.dxf"))
    assert report.clean and any("R12" in n for n in report.notes)


def test_inch_file_is_converted_to_mm(tmp_path):
    doc, msp = _doc(units=1)  # inch
    _square(msp, 1, 1, 2)  # 25.4 .. 76.2 mm
    path = _save(doc, tmp_path, "inch.dxf")
    assert preflight_file(path, sheet_mm=(80, 80)).clean
    report = preflight_file(path, sheet_mm=(70, 80))
    assert _kinds(report) == ["off-sheet"] and _near(report.faults[0], 76.2, 25.4, tol=1e-3)


def test_a_planned_sheet_from_our_writer_passes(tmp_path):
    contours = []
    for i in range(6):
        for j in range(4):
            x, y = 10 + 30 * i, 10 + 30 * j
            contours.append(Contour(circle=(x + 10, y + 10, 3)))
            contours.append(Contour(points=((x, y), (x + 20, y), (x + 20, y + 20), (x, y + 20))))
    plan = plan_sheet(contours, LaserSettings(cut_speed_mm_s=20, rapid_speed_mm_s=200, pierce_time_s=0.5))
    for version in ("R2000", "R12"):
        path = tmp_path / f"sheet-{version}.dxf"
        path.write_bytes(dxf_bytes(cut_plan_contours(plan), dxf_version=version))
        report = preflight_file(path, sheet_mm=(200, 140), kerf_mm=0.2)
        assert report.clean, [f.line() for f in report.faults]
        assert report.contours == len(contours)


@given(st.floats(min_value=0.05, max_value=5.0), st.floats(min_value=0.02, max_value=0.6))
def test_gap_rule_property(gap_mm, kerf_mm):
    # common practice rule: two contours closer than 2 x kerf are reported, farther ones are not
    import tempfile
    from pathlib import Path

    assume(abs(round(gap_mm, 3) - 2 * kerf_mm) > 1e-6)  # not exactly on the limit
    doc, msp = _doc()
    _square(msp, 0, 0, 20)
    _square(msp, 20 + round(gap_mm, 3), 0, 20)
    with tempfile.TemporaryDirectory() as d:
        path = Path(d) / "g.dxf"
        doc.saveas(path)
        report = preflight_file(path, kerf_mm=kerf_mm)
    expect = round(gap_mm, 3) < 2 * kerf_mm
    assert (_kinds(report) == ["narrow"]) == expect and (report.clean != expect)


# ---------------------------------------------------------------------------
# the command


def test_command_exit_codes(tmp_path):
    doc, msp = _doc()
    _square(msp, 10, 10, 20)
    clean = _save(doc, tmp_path, "ok.dxf")
    doc, msp = _doc()
    msp.add_lwpolyline([(0, 0), (20, 0), (20, 20)], close=False, dxfattribs=CUT)
    faulty = _save(doc, tmp_path, "bad.dxf")
    runner = CliRunner()
    ok = runner.invoke(command, [str(clean), "--sheet", "100x100", "--kerf", "0.2"])
    assert ok.exit_code == 0, ok.output
    assert ok.output.strip().splitlines()[-1].endswith("clean: 1 closed contours on layer CUT, no faults")
    bad = runner.invoke(command, [str(faulty)])
    assert bad.exit_code == 1
    assert "open-contour at (0.000, 0.000)" in bad.output and "open-contour at (20.000, 20.000)" in bad.output


def test_unreadable_file_is_an_input_error(tmp_path):
    junk = tmp_path / "junk.dxf"
    junk.write_text("this is not a drawing\n")
    with pytest.raises(InputFileError, match="junk.dxf"):
        preflight_file(junk)
    with pytest.raises(InputFileError, match="no such file"):
        preflight_file(tmp_path / "missing.dxf")
    result = CliRunner().invoke(command, [str(junk)])
    assert isinstance(result.exception, InputFileError)


def test_bad_options(tmp_path):
    with pytest.raises(ParameterError, match="--sheet"):
        parse_sheet("600 by 400")
    with pytest.raises(ParameterError, match="--sheet"):
        parse_sheet("0x400")
    assert parse_sheet("600x400") == (600.0, 400.0)
    doc, msp = _doc()
    _square(msp, 0, 0, 10)
    path = _save(doc, tmp_path, "a.dxf")
    result = CliRunner().invoke(command, [str(path), "--kerf", "3"])
    assert isinstance(result.exception, ParameterError) and "--kerf" in str(result.exception)
    result = CliRunner().invoke(command, [str(path), "--layer", "ENGRAVE"])
    assert isinstance(result.exception, InputFileError) and "ENGRAVE" in str(result.exception)


# ---------------------------------------------------------------------------
# nothing to cut, encodings, the entity ceiling (contract: README exit codes; DXF is
# 8-bit text, UTF-8 from R2007 on: DXF reference, from memory)


def _cli(*args):
    from sheetgen.cli import main

    return CliRunner().invoke(main, ["preflight", *map(str, args)])


def test_text_only_file_has_nothing_to_cut(tmp_path):
    doc, msp = _doc()
    msp.add_text("ENGRAVE ME", dxfattribs={"layer": "CUT"}).set_placement((10, 10))
    path = _save(doc, tmp_path, "words.dxf")
    report = preflight_file(path)
    assert _kinds(report) == ["nothing-to-cut"]
    res = _cli(path)
    assert res.exit_code == 1, res.output
    assert "nothing to cut" in res.output and "clean" not in res.output


def test_an_empty_drawing_has_nothing_to_cut(tmp_path):
    doc, _ = _doc()
    res = _cli(_save(doc, tmp_path, "empty.dxf"))
    assert res.exit_code == 1 and "nothing-to-cut" in res.output, res.output


def test_byte_order_marks_are_named_and_the_file_still_checked(tmp_path):
    doc, msp = _doc()
    _square(msp, 10, 10, 40)
    plain = _save(doc, tmp_path, "plain.dxf")
    raw = plain.read_bytes()
    utf8 = tmp_path / "bom8.dxf"
    utf8.write_bytes(b"\xef\xbb\xbf" + raw)
    utf16 = tmp_path / "bom16.dxf"
    utf16.write_bytes(raw.decode("utf-8").encode("utf-16"))  # Python writes the BOM first
    assert preflight_file(plain).clean
    for path, words in ((utf8, "UTF-8 byte-order mark"), (utf16, "UTF-16")):
        report = preflight_file(path)
        assert _kinds(report) == ["encoding"], report.faults
        assert words in report.faults[0].message
        assert report.contours == 1  # the square was read all the same
        res = _cli(path)
        assert res.exit_code == 1 and words in res.output, res.output


def test_utf16_without_a_mark_is_refused_with_a_reason(tmp_path):
    doc, msp = _doc()
    _square(msp, 10, 10, 40)
    raw = _save(doc, tmp_path, "plain.dxf").read_bytes()
    path = tmp_path / "wide.dxf"
    path.write_bytes(raw.decode("utf-8").encode("utf-16-le"))
    res = _cli(path)
    assert res.exit_code == 2 and "UTF-16" in res.output and "Traceback" not in res.output, res.output


def test_text_in_another_encoding_gets_a_note(tmp_path):
    doc = ezdxf.new("R2018")  # R2007 and later are UTF-8 by definition
    doc.units = 4
    _square(doc.modelspace(), 10, 10, 40)
    doc.modelspace().add_text("CAFE", dxfattribs={"layer": "LABEL"})
    path = _save(doc, tmp_path, "latin.dxf")
    path.write_bytes(path.read_bytes().replace(b"CAFE", "CAFÉ".encode("latin-1")))
    report = preflight_file(path)
    assert report.clean
    assert any("not valid utf-8" in n for n in report.notes), report.notes


def test_more_entities_than_the_ceiling_is_refused(tmp_path, monkeypatch):
    import sheetgen.io.dxf_read as dxf_read

    doc, msp = _doc()
    for k in range(12):
        _square(msp, 10 * k, 0, 5)
    path = _save(doc, tmp_path, "many.dxf")
    monkeypatch.setattr(dxf_read, "MAX_ENTITIES", 10)
    res = _cli(path)
    assert res.exit_code == 2 and "more than 10 entities" in res.output, res.output
    monkeypatch.setattr(dxf_read, "MAX_ENTITIES", 12)
    assert _cli(path).exit_code == 0


def test_the_documented_ceiling_is_the_one_enforced():
    from pathlib import Path

    from sheetgen.io.dxf_read import MAX_ENTITIES

    shown = f"{MAX_ENTITIES:,}"
    assert shown in command.help
    assert shown in (Path(__file__).resolve().parents[1] / "README.md").read_text(encoding="utf-8")
