"""output_samples/ shows what the current code writes (regenerate: python -m sheetgen.samples)."""

from __future__ import annotations

from sheetgen.samples import generate
from tests.conftest import ROOT


def test_output_samples_are_current(tmp_path):
    fresh = tmp_path / "samples"
    generate(fresh)
    committed = ROOT / "output_samples"
    new_files = sorted(p.relative_to(fresh) for p in fresh.rglob("*") if p.is_file())
    old_files = sorted(p.relative_to(committed) for p in committed.rglob("*") if p.is_file())
    assert new_files == old_files, "output_samples/ is stale: run `python -m sheetgen.samples`"
    stale = [str(f) for f in new_files if (fresh / f).read_bytes() != (committed / f).read_bytes()]
    assert not stale, f"output_samples/ is stale ({', '.join(stale[:5])}): run `python -m sheetgen.samples`"
