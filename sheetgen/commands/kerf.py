"""``sheetgen kerf --nominal N --measured M``: the kerf from a caliper reading."""

from __future__ import annotations

import click


@click.command("kerf")
@click.option("--nominal", "nominal", type=float, default=20.0, show_default=True, metavar="N",
              help="Drawn size in mm of the square (the coupon's square unless told otherwise).")
@click.option("--measured", "measured", type=float, multiple=True, required=True, metavar="M",
              help="Caliper reading in mm across the square's flats; give it twice for both directions.")
def command(nominal: float, measured: tuple[float, ...]) -> None:
    """Turn the caliper reading of the coupon's square into the kerf for the
    parameters. The square is drawn without compensation and comes out one
    kerf smaller, so kerf = nominal - measured (mean of the readings)."""
    from sheetgen.production.coupon import kerf_from_measurement

    kerf = kerf_from_measurement(nominal, list(measured))
    shown = f"{measured[0]:g}" if len(measured) == 1 else "mean(" + ", ".join(f"{m:g}" for m in measured) + ")"
    click.echo(f"kerf = {nominal:g} - {shown} = {kerf:g} mm")
    click.echo(f"put laser.kerf = {kerf:g} in the parameter file, or add to the command line:")
    click.echo(f"  --set laser.kerf={kerf:g}")
