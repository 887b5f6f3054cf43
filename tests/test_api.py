"""The Python API: the README's example runs as written, and the calls agree
with the command line (internal cross-checks: the same core behind both)."""

from __future__ import annotations

import json
import re
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]


def _readme_example() -> str:
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    m = re.search(r"<!-- api-example:start -->\n```python\n(.*?)```\n<!-- api-example:end -->", text, re.S)
    assert m, "README.md lost its API example block"
    return m.group(1)


def test_readme_example_builds_the_demo(tmp_path):
    code = _readme_example()
    assert len([line for line in code.splitlines() if line.strip() and not line.startswith("#")]) <= 6
    res = subprocess.run([sys.executable, "-c", code], cwd=tmp_path, capture_output=True, text=True, timeout=600,
                         env={"PYTHONPATH": str(ROOT), "PATH": "/usr/bin:/bin"})
    assert res.returncode == 0, res.stderr
    assert re.match(r"\d+ sheets;", res.stdout)
    out = tmp_path / "api-out"
    summary = json.loads((out / "summary.json").read_text())
    assert summary["kits"] == 2 and summary["sheets"] == int(res.stdout.split()[0])
    assert (out / "report.html").is_file() and sorted(p.name for p in (out / "sheets").glob("*.dxf"))
    assert (out / ".sheetgen-output.json").is_file()


def test_importing_sheetgen_loads_no_core():
    code = "import sys, sheetgen; print(sorted(m for m in sys.modules if m.startswith('sheetgen')))"
    res = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT)
    assert res.stdout.strip() == "['sheetgen']"


def test_calls_reach_the_core(tmp_path):
    import sheetgen
    from sheetgen.errors import ParameterError

    spec = sheetgen.load_params(overrides=["laser.kerf=0.2"])
    assert spec.laser.kerf_mm == 0.2
    assert sheetgen.load_params(overrides={"sheet.material": "birch_plywood"}).sheet.material == "birch_plywood"
    kit = sheetgen.build_kit(spec)
    assert {p.name for p in kit.parts} >= {"base", "tray", "wheel", "pinion"}
    report = sheetgen.check_balance(spec, kit)
    assert report.ok == all(c.passed for c in report.checks if c.binding)
    run = sheetgen.nest_kits(spec, kits=1)
    plan = sheetgen.plan_cuts(spec, run.sheets[0])
    assert plan.pierces == len(run.sheets[0].contours)
    with pytest.raises(ParameterError, match="panel.width"):
        sheetgen.load_params(overrides={"panel.width": 5})
    with pytest.raises(AttributeError):
        sheetgen.no_such_call  # noqa: B018
