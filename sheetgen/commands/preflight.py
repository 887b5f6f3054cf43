"""``sheetgen preflight FILE.dxf``: check a cut file before it goes to the laser."""

from __future__ import annotations

import math
import re

import click

from sheetgen.errors import ParameterError


def _kerf_range() -> tuple[float, float]:
    from sheetgen.design.schema import SCHEMA_BY_PATH

    key = SCHEMA_BY_PATH["laser.kerf"]
    assert key.lo is not None and key.hi is not None  # the schema bounds this key on both sides
    return key.lo, key.hi


def parse_sheet(text: str) -> tuple[float, float]:
    """``WxH`` in mm, e.g. ``600x400``."""
    parts = re.split(r"[xX*]", text.strip())
    try:
        w, h = (float(p) for p in parts)
    except ValueError:
        raise ParameterError(f"--sheet {text!r}: must be WIDTHxHEIGHT in mm, for example 600x400") from None
    if not (0 < w <= 10000 and 0 < h <= 10000) or not (math.isfinite(w) and math.isfinite(h)):
        raise ParameterError(f"--sheet {text!r}: width and height must be from 0 to 10000 mm (above 0)")
    return (w, h)


@click.command("preflight")
@click.argument("file", metavar="FILE.dxf")
@click.option("--sheet", "sheet", metavar="WxH", default=None,
              help="Sheet size in mm, e.g. 600x400 (sheet at (0,0)-(W,H)): report contours off the sheet.")
@click.option("--kerf", "kerf", type=float, default=None, metavar="K",
              help="Kerf in mm: report material or gaps narrower than 2 x kerf.")
@click.option("--layer", "layer", default=None, metavar="NAME",
              help="Layer to check (default: CUT when the file has it, else every layer).")
def command(file: str, sheet: str | None, kerf: float | None, layer: str | None) -> None:
    """Check FILE.dxf for faults: open contours, overlapping or touching parts,
    parts off the sheet, duplicate or zero-length segments, features narrower
    than the kerf can cut, missing units, nothing to cut, a byte-order mark.
    Exit code 1 when there is any, 0 when the file is clean; 2 when the file
    cannot be read or holds more than 250,000 entities (the ceiling)."""
    from sheetgen.io.dxf_read import preflight_file

    sheet_mm = parse_sheet(sheet) if sheet is not None else None
    if kerf is not None:
        lo, hi = _kerf_range()
        if not lo <= kerf <= hi:
            raise ParameterError(f"--kerf {kerf:g}: must be from {lo:g} to {hi:g} mm")
    report = preflight_file(file, sheet_mm=sheet_mm, kerf_mm=kerf, layer=layer)
    for note in report.notes:
        click.echo(f"{file}: note: {note}")
    for fault in report.faults:
        click.echo(f"{file}: {fault.line()}")
    layers = ", ".join(report.layers) or "none"
    if report.clean:
        click.echo(f"{file}: clean: {report.contours} closed contours on layer {layers}, no faults")
        return
    n = len(report.faults)
    click.echo(f"{file}: {n} fault{'s' if n != 1 else ''} ({report.contours} closed contours on layer {layers})")
    click.get_current_context().exit(1)
