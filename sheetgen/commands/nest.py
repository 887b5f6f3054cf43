"""sheetgen nest: a production run nested onto sheet stock (or a strip)."""

from __future__ import annotations

import json
import sys
import time
from dataclasses import replace

import click

from sheetgen.cli import set_option
from sheetgen.errors import ParameterError


def parse_size(text: str, option: str) -> tuple[float, float]:
    """``600x400`` -> (600.0, 400.0)."""
    try:
        w, h = (float(v) for v in text.lower().replace("×", "x").split("x"))
    except ValueError:
        raise ParameterError(f"{option} {text}: must be W x H in mm, e.g. {option} 600x400") from None
    if not (w > 0 and h > 0) or w == float("inf") or h == float("inf"):
        raise ParameterError(f"{option} {text}: both sizes must be positive numbers of mm")
    return (w, h)


def parse_extra(text: str) -> tuple[str, int]:
    """``FILE.dxf[:QTY]`` -> (path, qty)."""
    path, qty = text, 1
    head, sep, tail = text.rpartition(":")
    if sep and tail.strip().lstrip("-").isdigit():
        path, qty = head, int(tail)
    if qty < 1:
        raise ParameterError(f"--extra {text}: quantity {qty}: must be a whole number >= 1")
    return path, qty


class Progress:
    """A progress line on stderr when it is a terminal and the run takes more than a second."""

    def __init__(self):
        self.enabled = sys.stderr.isatty()
        self.t0 = time.monotonic()
        self.shown = False

    def __call__(self, fraction: float, message: str) -> None:
        if not self.enabled or time.monotonic() - self.t0 < 1.0:
            return
        width = 30
        done = int(round(fraction * width))
        sys.stderr.write(f"\r[{'#' * done}{'.' * (width - done)}] {fraction * 100:5.1f}% {message[:40]:<40}")
        sys.stderr.flush()
        self.shown = True

    def close(self) -> None:
        if self.shown:
            sys.stderr.write("\r" + " " * 80 + "\r")
            sys.stderr.flush()


@click.command("nest")
@click.argument("params", required=False, type=click.Path(dir_okay=False))
@click.option("--kits", type=int, default=None, help="Kits to nest (default 1 with PARAMS).")
@click.option("--extra", "extras", multiple=True, metavar="FILE.dxf[:QTY]",
              help="Extra parts: each closed outer contour (with the contours inside it as holes) is one part.")
@click.option("--sheet", "sheet", metavar="WxH", help="Sheet stock size in mm (default: sheet.width x sheet.height).")
@click.option("--strip-width", type=float, default=None, metavar="W",
              help="Nest on a strip W mm wide along y, as short as possible along +x.")
@click.option("--rotations", default=None, metavar="LIST", help="Allowed rotations for every part, e.g. 0,180.")
@click.option("--spacing", type=float, default=None, help="Clear gap between cut contours, mm.")
@click.option("--margin", type=float, default=None, help="Clear border at the sheet edge, mm.")
@click.option("--kerf", type=float, default=None, help="Kerf, mm (default laser.kerf, or 0 without PARAMS).")
@click.option("--time-limit", type=float, default=None, metavar="SECONDS",
              help="Wall-clock ceiling on the search stage (default nest.time_limit, or 10). When it ends the "
                   "search, the layout depends on the machine's speed and load; the output says so.")
@click.option("--effort", type=float, default=None, metavar="E",
              help="Work budget of the search in millions of work units (about 0.5 s each on a small two-core "
                   "machine); the same seed and effort give the same layout on any machine. Default nest.effort, "
                   "or 1.8 per second of the time limit.")
@click.option("--seed", type=int, default=None, help="Seed of the improvement search.")
@click.option("--jobs", type=int, default=None, metavar="N",
              help="Processes for the layout searches and for writing the sheets (default: every core). The "
                   "layout does not depend on it.")
@click.option("-o", "--out", "out_dir", required=True, type=click.Path(file_okay=False))
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object on stdout.")
@set_option
def command(params, kits, extras, sheet, strip_width, rotations, spacing, margin, kerf, time_limit, effort, seed,
            jobs, out_dir, as_json, overrides):
    """Nest kits and extra parts onto sheets; write sheet-01.dxf, ... and SVG previews into OUT.

    Ceiling: a run above 200,000 parts, or whose part and vertex counts would
    need more than 2 GB, is refused (exit 2) before any work; the message names
    the count and the limit (about 7,000 demo kits fit).
    """
    from sheetgen.io.output import staged_dir
    from sheetgen.io.sheets import write_sheets
    from sheetgen.pipeline import NestOptions, nest_run, resolve_nest_options
    from sheetgen.production.runs import nest_summary, parse_rotations

    start = time.perf_counter()
    angles = parse_rotations(rotations) if rotations is not None else None
    spec, kit = None, None
    svg_style = None  # the cut-ready SVG's colours: the parameters' when given, else the defaults
    if params is not None:
        from sheetgen.design.kit import build_kit
        from sheetgen.design.spec import load_spec

        spec = load_spec(params, overrides)
        from sheetgen.io.cutsvg import style_from_spec

        svg_style = style_from_spec(spec)
        sheet_mm = parse_size(sheet, "--sheet") if sheet is not None else None
        o = resolve_nest_options(spec, NestOptions(sheet_mm=sheet_mm, strip_width_mm=strip_width, margin_mm=margin,
                                                   spacing_mm=spacing, kerf_mm=kerf, time_limit_s=time_limit,
                                                   effort=effort, seed=seed))
        _check_kerf(o.kerf_mm or 0.0)
        kit = build_kit(spec)
        if kits is not None and kits < 1:
            raise ParameterError(f"--kits {kits}: must be a whole number >= 1")
    else:
        if overrides:
            raise ParameterError("--set needs a parameter file (PARAMS)")
        if kits is not None:
            raise ParameterError("--kits needs a parameter file (PARAMS)")
        if sheet is None and strip_width is None:
            raise ParameterError("give --sheet WxH or --strip-width W (or a parameter file)")
        sheet_mm = parse_size(sheet, "--sheet") if sheet is not None else None
        o = resolve_nest_options(None, NestOptions(sheet_mm=sheet_mm, strip_width_mm=strip_width, margin_mm=margin,
                                                   spacing_mm=spacing, kerf_mm=kerf, time_limit_s=time_limit,
                                                   effort=effort, seed=seed))
        _check_kerf(o.kerf_mm or 0.0)
    if sheet is not None and strip_width is not None:
        raise ParameterError("--sheet and --strip-width: give one, not both")
    for name, value, hi in (("--spacing", o.spacing_mm, 100.0), ("--margin", o.margin_mm, 500.0),
                            ("--time-limit", o.time_limit_s, 3600.0),
                            ("--effort", 0.0 if o.effort is None else o.effort, 100000.0)):
        if not (0 <= float(value or 0.0) <= hi):
            raise ParameterError(f"{name} {value:g}: must be from 0 to {hi:g}")
    jobs = resolve_jobs(jobs)
    found = []
    if extras:
        from sheetgen.io.dxf_read import read_dxf_parts

        for text in extras:
            path, qty = parse_extra(text)
            for part in read_dxf_parts(path):
                found.append((part.name, part.polygon, part.circles, qty))
    o = replace(o, rotations_deg=angles, extra=tuple(found))

    progress = Progress()
    try:
        run = nest_run(spec, kit, 1 if kits is None else kits, progress, jobs, o)
    finally:
        progress.close()
    result, size = run.result, run.result.sheet_size_mm
    with staged_dir(out_dir) as tmp:
        files = write_sheets(tmp, list(run.sheets), size, o.margin_mm, patterns=run.patterns, jobs=jobs,
                             svg_style=svg_style)
    from sheetgen.production.nesting.budget import EFFORT_PER_SECOND

    time_limit = o.time_limit_s
    used_effort = o.effort if o.effort is not None else round(time_limit * EFFORT_PER_SECOND, 6)
    summary = nest_summary(result) | {"kerf_mm": o.kerf_mm, "seed": o.seed, "effort": used_effort,
                                      "time_limit_s": time_limit, "files": files,
                                      "time_s": round(time.perf_counter() - start, 2)}
    if as_json:
        click.echo(json.dumps(summary))
        return
    mode = (f"strip {size[1]:g} mm wide, {result.strip_length_mm:.1f} mm long" if result.strip_length_mm is not None
            else f"{len(result.sheets)} sheet(s) of {size[0]:g} x {size[1]:g} mm")
    click.echo(f"{result.parts_placed} parts on {mode} "
               f"(lower bound {result.lower_bound_sheets}, {len(summary['patterns'])} distinct pattern(s), "
               f"search ended by {result.stopped_by.replace('_', ' ')}); "
               f"utilisation {', '.join(f'{u * 100:.1f} %' for u in result.utilisation)}")
    if result.unplaced:
        click.echo(f"{len(result.unplaced)} parts could not be placed", err=True)
    click.echo(f"written to {out_dir}: {', '.join(files)} ({summary['time_s']} s)")


def resolve_jobs(jobs: int | None) -> int:
    """``--jobs``: a whole number >= 1, default every core."""
    import os

    if jobs is None:
        return max(1, os.cpu_count() or 1)
    if jobs < 1:
        raise ParameterError(f"--jobs {jobs}: must be a whole number >= 1")
    return jobs


def _check_kerf(kerf: float) -> None:
    if not (0 <= kerf <= 0.6):
        raise ParameterError(f"--kerf {kerf:g}: must be from 0 to 0.6 mm")
