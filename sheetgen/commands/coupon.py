"""``sheetgen coupon --thickness T -o FILE.dxf``: a kerf test piece to cut."""

from __future__ import annotations

import click

LASER_CAUTION = ("Laser safety: cut only materials known to be safe (never PVC, vinyl or other chlorinated "
                 "plastics), run the fume extraction, keep a fire extinguisher at hand and never leave the "
                 "laser unattended while it cuts.")


@click.command("coupon")
@click.option("--thickness", "thickness", type=float, required=True, metavar="T",
              help="Sheet thickness in mm (as on the calipers); the slots step around it.")
@click.option("--square", "square", type=float, default=20.0, show_default=True, metavar="N",
              help="Size in mm of the square to measure.")
@click.option("-o", "--output", "output", required=True, metavar="FILE.dxf", help="Cut file to write.")
@click.option("--dxf-version", "dxf_version", type=click.Choice(["R2000", "R12"]), default="R2000",
              show_default=True, help="DXF version (R12 for older laser software; it carries no units).")
def command(thickness: float, square: float, output: str, dxf_version: str) -> None:
    """Write a kerf calibration coupon: a row of labelled slots around the sheet
    thickness, a tab to try in them, and a square to measure. It is drawn
    without kerf compensation; after cutting, measure the square and run
    `sheetgen kerf`."""
    from sheetgen.io.dxf import coupon_dxf_bytes
    from sheetgen.production.coupon import make_coupon, width_label
    from sheetgen.io.output import check_output_file, staged_file

    check_output_file(output)  # refuse a bad target before any work
    coupon = make_coupon(thickness, square)
    data = coupon_dxf_bytes(coupon, dxf_version)
    with staged_file(output) as tmp:
        tmp.write_bytes(data)
    w, h = coupon.size_mm
    widths = coupon.slot_widths_mm
    click.echo(f"wrote {output}: {len(widths)} slots {width_label(widths[0])} to {width_label(widths[-1])} mm, "
               f"a tab piece and a {coupon.square_mm:.2f} mm square ({w:.0f} x {h:.0f} mm)")
    click.echo("Cut it as drawn (no kerf compensation). Try the tab in each slot: the one that holds it the way "
               "your joints should hold is the drawn width for that fit.")
    click.echo(f"Measure the square across its flats both ways, then: sheetgen kerf --nominal {coupon.square_mm:.2f} "
               f"--measured X --measured Y")
    click.echo(LASER_CAUTION)
