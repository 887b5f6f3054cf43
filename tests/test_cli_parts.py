"""`sheetgen parts`: files checked from the DXF alone (read back with ezdxf)."""

from __future__ import annotations

import json
import subprocess
import sys

import ezdxf
import pytest
from click.testing import CliRunner

from sheetgen.cli import main
from sheetgen.geometry.kerf import cut_outline
from tests.conftest import DEMO, ROOT
from tests.dxfread import cut_rings, part_from_rings


def run(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


@pytest.fixture(scope="module")
def demo_out(tmp_path_factory):
    out = tmp_path_factory.mktemp("parts") / "out"
    res = run("parts", DEMO, "-o", out)
    assert res.exit_code == 0, res.output
    return out


def test_writes_a_dxf_and_svg_per_part_and_the_manifest(demo_out, demo_kit):
    manifest = json.loads((demo_out / "manifest.json").read_text())
    entries = manifest["parts"]
    assert len(entries) >= 6
    assert len(list(demo_out.glob("*.dxf"))) == len(entries) == len(demo_kit.parts)
    for e in entries:
        assert set(e) >= {"name", "file", "qty", "area_mm2", "bbox_mm", "mass_kg"}
        assert (demo_out / e["file"]).exists() and (demo_out / e["svg"]).exists()
        assert e["qty"] >= 1 and e["mass_kg"] > 0


def test_every_file_passes_ezdxf_audit_in_millimetres(demo_out):
    for f in sorted(demo_out.glob("*.dxf")):
        doc = ezdxf.readfile(str(f))
        auditor = doc.audit()
        assert not auditor.has_errors, (f.name, [str(e) for e in auditor.errors])
        assert doc.header["$INSUNITS"] == 4  # millimetres (DXF reference, $INSUNITS)
        assert doc.dxfversion == "AC1015"  # R2000


def test_round_trip_same_areas_and_contour_counts(demo_out, demo_kit, demo_spec):
    kerf = demo_spec.laser.kerf_mm
    for part in demo_kit.parts:
        _, rings = cut_rings(demo_out / f"{part.name}.dxf")
        cut = cut_outline(part.fit_outline, kerf)
        assert len(rings) == 1 + len(cut.interiors), part.name
        read = part_from_rings(rings)
        # true circles in the file vs chords within 0.01 mm in the polygon
        assert read.area == pytest.approx(cut.area, abs=0.01 * cut.length), part.name


def test_same_input_same_bytes(demo_out, tmp_path):
    res = run("parts", DEMO, "-o", tmp_path / "again")
    assert res.exit_code == 0
    for f in sorted(demo_out.glob("*")):
        assert (tmp_path / "again" / f.name).read_bytes() == f.read_bytes(), f.name


def _bbox(path):
    return part_from_rings(cut_rings(path)[1]).bounds


def _hole_sizes(path):
    shape = part_from_rings(cut_rings(path)[1])
    return sorted((round(b[2] - b[0], 4), round(b[3] - b[1], 4)) for b in (r.bounds for r in shape.interiors))


def test_kerf_override_seen_in_the_dxf(tmp_path):
    assert run("parts", DEMO, "-o", tmp_path / "k1", "--set", "laser.kerf=0.1").exit_code == 0
    assert run("parts", DEMO, "-o", tmp_path / "k3", "--set", "laser.kerf=0.3").exit_code == 0
    a, b = _bbox(tmp_path / "k1/tray.dxf"), _bbox(tmp_path / "k3/tray.dxf")
    # outer contour grows by the kerf difference (0.1 each side)
    assert (b[2] - b[0]) - (a[2] - a[0]) == pytest.approx(0.2, abs=1e-3)
    assert (b[3] - b[1]) - (a[3] - a[1]) == pytest.approx(0.2, abs=1e-3)
    # holes and slots shrink by it
    for (wa, ha), (wb, hb) in zip(_hole_sizes(tmp_path / "k1/tray.dxf"), _hole_sizes(tmp_path / "k3/tray.dxf")):
        assert wa - wb == pytest.approx(0.2, abs=2e-3) and ha - hb == pytest.approx(0.2, abs=2e-3)


def test_panel_size_override_seen_in_the_dxf(tmp_path):
    # the drive pinned (left at "auto" it follows the wind load of the larger panel)
    pins = [a for p in ("drive.wheel_teeth=70", "drive.module=1.5", "drive.layers=1") for a in ("--set", p)]
    assert run("parts", DEMO, "-o", tmp_path / "a", *pins).exit_code == 0
    assert run("parts", DEMO, "-o", tmp_path / "b", "--set", "panel.width=170", *pins).exit_code == 0
    a, b = _bbox(tmp_path / "a/tray.dxf"), _bbox(tmp_path / "b/tray.dxf")
    assert (b[2] - b[0]) - (a[2] - a[0]) == pytest.approx(20, abs=1e-6)
    assert (b[3] - b[1]) == pytest.approx(a[3] - a[1], abs=1e-6)
    for same in ("wheel", "pinion", "rib", "axle-support", "collar", "spacer", "motor-mount"):
        assert (tmp_path / f"a/{same}.dxf").read_bytes() == (tmp_path / f"b/{same}.dxf").read_bytes(), same


def test_r12_on_request(tmp_path):
    assert run("parts", DEMO, "-o", tmp_path / "r12", "--dxf-version", "R12").exit_code == 0
    doc = ezdxf.readfile(str(tmp_path / "r12/tray.dxf"))
    assert doc.dxfversion == "AC1009"
    assert not doc.audit().has_errors


@pytest.mark.parametrize("args, message", [
    (["--set", "panel.widht=3"], "error: --set panel.widht: unknown key; did you mean panel.width?"),
    (["--set", "panel.width=9"], "error: panel.width = 9: must be from 40 to 600 mm"),
    (["--set", "laser.kerf=abc"], "error: laser.kerf = 'abc': must be a number from 0.02 to 0.6 mm"),
    (["--set", "axle.height=30"], "error: axle.height = 30: the motor body would reach the base"),
])
def test_bad_input_one_line_exit_2_nothing_written(tmp_path, args, message):
    out = tmp_path / "never"
    res = run("parts", DEMO, "-o", out, *args)
    assert res.exit_code == 2
    assert res.output.startswith(message)
    assert res.output.count("\n") == 1 and "Traceback" not in res.output
    assert not out.exists()
    assert list(tmp_path.iterdir()) == []


def test_bad_files_exit_2(tmp_path):
    bad = tmp_path / "bad.toml"
    bad.write_text("[panel]\nwidth = = 3\n")
    for params in (tmp_path / "missing.toml", bad):
        res = run("parts", params, "-o", tmp_path / "out")
        assert res.exit_code == 2 and str(params.name) in res.output
        assert not (tmp_path / "out").exists()


def test_console_entry_points(tmp_path):
    # `python -m sheetgen` and the installed `sheetgen` script both work, exit 2 on bad input without a traceback
    res = subprocess.run([sys.executable, "-m", "sheetgen", "parts", str(DEMO), "-o", str(tmp_path / "o"),
                          "--set", "sheet.material=pvc"], capture_output=True, text=True, cwd=ROOT)
    assert res.returncode == 2
    assert res.stderr.strip().splitlines() == [
        "error: sheet.material = 'pvc': must be one of 'mdf', 'birch_plywood', 'cast_acrylic'"]
    res = subprocess.run([sys.executable, "-m", "sheetgen", "--help"], capture_output=True, text=True)
    assert res.returncode == 0 and "parts" in res.stdout
