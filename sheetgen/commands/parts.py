"""sheetgen parts PARAMS -o DIR: one cut file per distinct part."""

from __future__ import annotations

import time

import click

from sheetgen.cli import set_option


@click.command("parts")
@click.argument("params", type=click.Path(dir_okay=False))
@click.option("-o", "--out", "out_dir", required=True, type=click.Path(file_okay=False),
              help="Folder to write into (replaced when complete).")
@click.option("--dxf-version", type=click.Choice(["R2000", "R12"]), default="R2000", show_default=True,
              help="DXF flavour of the cut files.")
@set_option
def command(params, out_dir, dxf_version, overrides):
    """Write one kerf-compensated DXF and SVG per distinct part of the kit, and manifest.json."""
    from sheetgen.io.output import staged_dir
    from sheetgen.io.partfiles import write_part_files
    from sheetgen.kit import build_kit
    from sheetgen.spec import load_spec

    start = time.perf_counter()
    spec = load_spec(params, overrides)
    kit = build_kit(spec)
    with staged_dir(out_dir) as tmp:
        manifest = write_part_files(kit, spec, tmp, dxf_version)
    for e in manifest["parts"]:
        w, h = e["bbox_mm"]
        click.echo(f"{e['name']:<14} x{e['qty']:<3} {w:7.1f} x {h:6.1f} mm  {e['mass_kg'] * 1000:7.1f} g  {e['file']}")
    click.echo(f"{len(manifest['parts'])} parts written to {out_dir} in {time.perf_counter() - start:.2f} s")
