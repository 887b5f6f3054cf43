"""sheetgen parts PARAMS -o DIR: one cut file per distinct part."""

from __future__ import annotations

import time

import click

from sheetgen.cli import into_existing_option, set_option


@click.command("parts")
@click.argument("params", type=click.Path(dir_okay=False))
@click.option("-o", "--out", "out_dir", required=True, type=click.Path(file_okay=False),
              help="Folder to write into (a new or empty folder, or one sheetgen wrote before).")
@click.option("--dxf-version", type=click.Choice(["R2000", "R12"]), default="R2000", show_default=True,
              help="DXF flavour of the cut files.")
@into_existing_option
@set_option
def command(params, out_dir, dxf_version, overrides, into_existing):
    """Write one kerf-compensated DXF and SVG per distinct part of the kit, and manifest.json."""
    from sheetgen.io.output import check_output_dir, staged_dir
    from sheetgen.io.partfiles import write_part_files
    from sheetgen.design.kit import build_kit
    from sheetgen.design.spec import load_spec

    start = time.perf_counter()
    check_output_dir(out_dir, into_existing=into_existing)  # refuse a bad target before the long work
    spec = load_spec(params, overrides)
    kit = build_kit(spec)
    with staged_dir(out_dir, into_existing=into_existing) as tmp:
        manifest = write_part_files(kit, spec, tmp, dxf_version)
    for e in manifest["parts"]:
        w, h = e["bbox_mm"]
        click.echo(f"{e['name']:<14} x{e['qty']:<3} {w:7.1f} x {h:6.1f} mm  {e['mass_kg'] * 1000:7.1f} g  {e['file']}")
    click.echo(f"{len(manifest['parts'])} parts written to {out_dir} in {time.perf_counter() - start:.2f} s")
