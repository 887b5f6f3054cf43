"""output_samples/ shows what the current code writes (regenerate: python -m sheetgen.samples)."""

from __future__ import annotations

from pathlib import Path

from sheetgen.samples import BUILD_SAMPLE, LEFT_OUT, generate
from tests.conftest import ROOT


def _files(folder: Path) -> list[Path]:
    return sorted(p.relative_to(folder) for p in folder.rglob("*") if p.is_file())


def test_output_samples_are_current(tmp_path, demo_build_3):
    # the demo build is the session's shared one (tests/conftest.py runs the samples' command line)
    fresh = tmp_path / "samples"
    generate(fresh, skip=(BUILD_SAMPLE,))
    committed = ROOT / "output_samples"
    build = demo_build_3[0]
    left_out = {Path(n).relative_to(BUILD_SAMPLE) for n in LEFT_OUT if n.startswith(BUILD_SAMPLE + "/")}
    pairs = [(fresh / f, f) for f in _files(fresh)]
    pairs += [(build / f, BUILD_SAMPLE / f) for f in _files(build) if f not in left_out]
    new_files = sorted(name for _, name in pairs)
    assert new_files == _files(committed), "output_samples/ is stale: run `python -m sheetgen.samples`"
    stale = [str(name) for path, name in pairs if path.read_bytes() != (committed / name).read_bytes()]
    assert not stale, f"output_samples/ is stale ({', '.join(stale[:5])}): run `python -m sheetgen.samples`"
