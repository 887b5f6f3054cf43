"""Regenerate output_samples/: ``python -m sheetgen.samples [FOLDER]``.

Runs the commands on the shipped parameters into FOLDER (default
output_samples/ beside params/), replacing it. A test runs the same into a
temporary folder and compares bytes, so the samples always show what the
current code writes. The 3D model is left out: its STEP file is large and
OCC's export is not byte-stable across platforms.
"""

from __future__ import annotations

import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]

BUILD_SAMPLE = "build-demo-3-kits"
# a fixed work budget and a far wall-clock ceiling: the same layout on any machine and load
BUILD_ARGS = ["build", "params/demo.toml", "--kits", "3", "--set", "nest.effort=9", "--set", "nest.time_limit=600"]
LEFT_OUT = (f"{BUILD_SAMPLE}/model/assembly.step",)
# (sub-folder or file, command line after `sheetgen`, stdout file or None)
RUNS = (
    (BUILD_SAMPLE, [*BUILD_ARGS, "-o", "{out}"], None),
    ("parts-large-6mm", ["parts", "params/large-6mm.toml", "-o", "{out}"], None),
    ("parts-acrylic-polar-r12", ["parts", "params/acrylic-polar.toml", "--dxf-version", "R12", "-o", "{out}"], None),
    ("balance-demo.json", ["balance", "params/demo.toml", "--json"], "stdout"),
    ("balance-large-6mm.txt", ["balance", "params/large-6mm.toml"], "stdout"),
    ("gear-m1.5-z60.dxf", ["gear", "--module", "1.5", "--teeth", "60", "--bore", "6", "--kerf", "0.18",
                           "-o", "{out}"], None),
    ("coupon-3mm.dxf", ["coupon", "--thickness", "3", "-o", "{out}"], None),
)


def command_line(args: list[str], out: Path) -> list[str]:
    """A sample's command line with its output folder and the parameter files' paths filled in."""
    argv = [a.replace("{out}", str(out)) for a in args]
    return [str(ROOT / a) if a.startswith("params/") else a for a in argv]


def generate(folder: Path, skip: tuple[str, ...] = ()) -> None:
    """Write every sample but those named in ``skip`` into ``folder`` (which must not exist yet)."""
    from click.testing import CliRunner

    from sheetgen.cli import main

    folder.mkdir(parents=True)
    runner = CliRunner()
    for name, args, capture in RUNS:
        if name in skip:
            continue
        target = folder / name
        res = runner.invoke(main, command_line(args, target))
        if res.exit_code != 0:
            raise RuntimeError(f"sheetgen {' '.join(args)} failed ({res.exit_code}): {res.output}")
        if capture == "stdout":
            target.write_text(res.stdout, encoding="utf-8")
    for name in LEFT_OUT:
        if name.split("/")[0] not in skip:
            (folder / name).unlink()


def main(argv: list[str] | None = None) -> int:
    import shutil
    import tempfile

    argv = sys.argv[1:] if argv is None else argv
    dest = Path(argv[0]) if argv else ROOT / "output_samples"
    tmp = Path(tempfile.mkdtemp(prefix=".samples-", dir=dest.parent))
    try:
        generate(tmp / "new")
        if dest.exists():
            shutil.rmtree(dest)
        (tmp / "new").rename(dest)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    print(f"samples written to {dest}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
