"""`sheetgen build`: the whole job, checked from the files it writes."""

from __future__ import annotations

import itertools
import json

import pytest
from click.testing import CliRunner

from sheetgen.cli import main
from tests.conftest import DEMO
from tests.dxfread import read_cut_contours
from tests._browser import screenshot

KITS = 3


def run(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


@pytest.fixture(scope="module")
def out(demo_build_3):
    return demo_build_3[0]  # the session's one three-kit demo build (tests/conftest.py)


@pytest.fixture(scope="module")
def summary(demo_build_3):
    return demo_build_3[1]


def test_writes_parts_sheets_report_and_summary(out, summary):
    assert (out / "parts" / "manifest.json").exists()
    assert len(list((out / "parts").glob("*.dxf"))) >= 6
    sheets = sorted((out / "sheets").glob("sheet-*.dxf"))
    assert [p.name for p in sheets] == [f"sheet-{k:02d}.dxf" for k in range(1, summary["sheets"] + 1)]
    assert len(list((out / "sheets").glob("sheet-*.svg"))) == len(sheets)
    assert (out / "report.html").exists()
    for key in ("pierces", "cut_length_mm", "travel_mm", "cut_time_s", "cost", "sheets", "sheet_runs"):
        assert key in summary
    assert summary["kits"] == KITS


def test_every_kit_part_is_on_a_sheet(out, summary, demo_kit):
    assert summary["parts"] == KITS * sum(p.qty for p in demo_kit.parts)
    assert sum(r["parts"] for r in summary["sheet_runs"]) == summary["parts"]


def test_cut_order_inside_first_from_the_dxf_alone(out):
    # common practice: a contour is cut before any contour that encloses it
    for path in sorted((out / "sheets").glob("sheet-*.dxf")):
        _, contours = read_cut_contours(path)
        polys = [c[0] for c in contours]
        for i, j in itertools.combinations(range(len(polys)), 2):
            assert not polys[i].contains(polys[j]), f"{path.name}: entity {i} encloses {j} but is cut first"


def test_summary_pierces_and_lengths_equal_what_the_dxf_measures(out, summary):
    total_pierces, total_len = 0, 0.0
    for run_, path in zip(summary["sheet_runs"], sorted((out / "sheets").glob("sheet-*.dxf"))):
        _, contours = read_cut_contours(path)
        length = sum(c[1] for c in contours)
        assert run_["pierces"] == len(contours)
        assert run_["cut_length_mm"] == pytest.approx(length, abs=0.1)
        total_pierces += len(contours)
        total_len += length
    assert summary["pierces"] == total_pierces
    assert summary["cut_length_mm"] == pytest.approx(total_len, abs=0.1 * summary["sheets"])


def test_planned_travel_never_longer_than_the_nester_order(summary):
    for r in summary["sheet_runs"]:
        assert r["travel_mm"] <= r["travel_unplanned_mm"] + 1e-6


def test_time_and_cost_follow_the_laser_profile(summary, demo_spec):
    laser = demo_spec.laser
    expect = (summary["cut_length_mm"] / laser.cut_speed_mm_s + summary["travel_mm"] / laser.rapid_speed_mm_s
              + summary["pierces"] * laser.pierce_time_s)
    assert summary["cut_time_s"] == pytest.approx(expect, rel=1e-3)
    cost = summary["sheets"] * demo_spec.sheet.price + summary["cut_time_s"] / 3600 * laser.rate_per_h
    assert summary["cost"] == pytest.approx(cost, abs=0.02)


def test_preflight_passes_every_sheet(out, demo_spec):
    for path in sorted((out / "sheets").glob("sheet-*.dxf")):
        res = run("preflight", path, "--sheet", f"{demo_spec.sheet.width_mm:g}x{demo_spec.sheet.height_mm:g}",
                  "--kerf", demo_spec.laser.kerf_mm)
        assert res.exit_code == 0, res.output


def test_two_builds_are_byte_identical(out, tmp_path):
    from sheetgen.samples import BUILD_ARGS, command_line

    again = tmp_path / "again"
    assert run(*command_line([*BUILD_ARGS, "-o", "{out}"], again)).exit_code == 0
    files = sorted(p.relative_to(out) for p in out.rglob("*") if p.is_file())
    assert files == sorted(p.relative_to(again) for p in again.rglob("*") if p.is_file())
    for f in files:
        assert (again / f).read_bytes() == (out / f).read_bytes(), str(f)


def test_without_params_it_runs_the_shipped_demo(tmp_path):
    res = run("build", "--no-model", "-o", tmp_path / "demo")
    assert res.exit_code == 0, res.output
    assert json.loads((tmp_path / "demo" / "summary.json").read_text())["parameters"] == "demo.toml"


def test_bad_input_writes_nothing(tmp_path):
    res = run("build", DEMO, "--kits", 0, "-o", tmp_path / "x")
    assert res.exit_code == 2 and res.output.startswith("error: --kits 0: must be a whole number >= 1")
    assert not (tmp_path / "x").exists()


def test_report_is_self_contained_and_carries_the_cautions(out):
    html = (out / "report.html").read_text()
    assert "http://" not in html.replace('xmlns="http://www.w3.org/2000/svg"', "")
    assert "https://" not in html and "<script" not in html
    for word in ("PVC", "ventilate", "unattended", "pinch", "wind", "licensed engineer"):
        assert word in html
    assert html.count("<svg") >= 1


def test_report_renders_in_headless_chromium(out, tmp_path):
    # A real browser (Debian's chromium, installed by .ci/run) draws the page; we look at the pixels.
    img = screenshot(out / "report.html", tmp_path, 1200, 8000)  # the whole report, tables and sheets
    assert img.shape[0] >= 2000 and img.shape[1] >= 1000
    assert img.std() > 20, "the screenshot is blank"
    r, g, b = img[..., 0], img[..., 1], img[..., 2]
    part_fill = (abs(r - 0xE9) < 6) & (abs(g - 0xDC) < 6) & (abs(b - 0xC4) < 6)  # parts on the sheets
    cut_line = (r > 150) & (g < 80) & (b < 80)  # cut contours
    assert part_fill.sum() > 20000, "no sheets drawn"
    assert cut_line.sum() > 2000, "no cut contours drawn"


def test_a_failing_design_check_exits_4_and_still_writes_the_files(tmp_path):
    # contract (README exit codes): 4 = files written, a design check fails; with the gear
    # module pinned, a motor of 0.03 N·m stall torque turns the frame at the most teeth that
    # module allows, but short of check.torque_margin (the balance check names "motor torque")
    weak = ("--set", "motor.stall_torque=0.03", "--set", "drive.module=1.5", "--no-model")
    out = tmp_path / "weak"
    res = run("build", DEMO, *weak, "-o", out)
    assert res.exit_code == 4, res.output
    assert "motor torque" in res.output and "Traceback" not in res.output
    summary = json.loads((out / "summary.json").read_text())
    assert summary["checks_ok"] is False and "motor torque" in summary["failing_checks"]
    assert (out / "sheets" / "sheet-01.dxf").is_file()
    html = (out / "report.html").read_text()
    assert "A design check fails" in html and "FAIL" in html
    res = run("build", DEMO, *weak, "--allow-failing", "-o", out)
    assert res.exit_code == 0, res.output
