"""``sheetgen balance PARAMS``: mass, balance, torques and the drive check.

Prints a readable table, or with ``--json`` one JSON object on stdout
(among its keys ``pulse_step_calm_deg``, ``pulse_step_wind_deg``,
``peak_tracking_rate_deg_per_h`` and ``shortest_day_tracked_h``). The
verdict is data: exit code 0 whether or not the design passes; bad input
raises SheetgenError (exit code 2 through the CLI group).
"""

from __future__ import annotations

import json

import click

from sheetgen.cli import set_option


@click.command("balance")
@click.argument("params", type=click.Path(dir_okay=False, path_type=str))
@set_option
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of the table.")
def command(params: str, overrides: tuple[str, ...], as_json: bool) -> None:
    """Check the turning frame's balance, the torque the drive needs and has,
    the angle one capacitor pulse turns the frame (calm air and design wind),
    the tracking rate over the year, the tooth stress, the counterweight and
    the ballast for the design wind.

    Anything larger than a desk kit: wind and snow loads follow local codes
    (for example ASCE 7, EN 1991-1-4) and a licensed engineer.
    """
    from sheetgen.design.kit import build_kit
    from sheetgen.mechanics.balance_text import render_text
    from sheetgen.mechanics.check import balance_check
    from sheetgen.design.solver import derived_lines, derived_values
    from sheetgen.design.spec import load_spec

    spec = load_spec(params, overrides)
    kit = build_kit(spec)
    report = balance_check(kit, spec)
    if as_json:
        out = report.to_json()
        out["derived"] = derived_values(spec, kit, report)
        click.echo(json.dumps(out, indent=2, allow_nan=False))
    else:
        click.echo(render_text(report))
        lines = derived_lines(spec, kit, report)
        if lines:
            click.echo("\nDerived from the inputs (key = value (rule); give a number in the file to pin one):")
            click.echo("\n".join(lines))
