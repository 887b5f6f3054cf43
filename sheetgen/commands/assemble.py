"""``sheetgen assemble PARAMS -o DIR``: the kit in 3D, written and checked.

Writes DIR/assembly.step (one named solid per part instance, plus the panel,
the axle and the motor) and DIR/assembly.svg (a picture for the report), and
checks the nominal model: shared volume between any two solids, parts that
float, tabs that miss their slots, the turning frame's clearance through the
tracking range, the gear mesh, and the mass and CG against the balance check.
The checks are data: exit code 0 whenever the command ran (the ``ok`` flag
says whether the model passed), 2 for bad input.
"""

from __future__ import annotations

import json
import math
import time
from pathlib import Path

import click

from sheetgen.cli import into_existing_option, set_option

CAUTIONS = (
    "The model is nominal: test the fits with a coupon cut before cutting a whole kit.",
    "The turning frame and the gears pinch fingers: keep hands clear while the motor can run.",
    "Run the laser only with fume extraction and never unattended; secure an outdoor tracker against wind, "
    "and follow local codes and a licensed engineer for anything larger than a desk kit.",
)


@click.command("assemble")
@click.argument("params", type=click.Path(dir_okay=False, path_type=str))
@click.option("-o", "--out", "out_dir", required=True, type=click.Path(file_okay=False),
              help="Folder to write assembly.step and assembly.svg into (a new or empty folder, or one sheetgen "
                   "wrote before).")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of the summary.")
@click.option("--sweep-step", "sweep_step_deg", type=click.FloatRange(0.1, 2.0), default=1.0, show_default=True,
              help="Angle step of the clearance sweep through the tracking range, degrees (at most 2).")
@into_existing_option
@set_option
def command(params: str, out_dir: str, as_json: bool, sweep_step_deg: float, overrides: tuple[str, ...],
            into_existing: bool) -> None:
    """Build the kit in 3D, write it as STEP with a picture, and check it:
    interference, floating parts, tabs in slots, clearance of the turning frame
    through the tracking range, gear mesh, mass and CG."""
    from sheetgen.io.output import check_output_dir, staged_dir
    from sheetgen.io.step import write_step, write_svg
    from sheetgen.design.kit import build_kit
    from sheetgen.model3d import build_assembly, build_model, check_model
    from sheetgen.design.spec import load_spec

    start = time.perf_counter()
    check_output_dir(out_dir, into_existing=into_existing)  # refuse a bad target before the long work
    spec = load_spec(params, overrides)
    kit = build_kit(spec)
    t_import = time.perf_counter()
    import cadquery  # noqa: F401 - heavy; loaded only here, after the parameters are known to be good

    import_s = time.perf_counter() - t_import
    model = build_model(kit, spec)
    report = check_model(model, kit, spec, sweep_step_deg)
    t_write = time.perf_counter()
    with staged_dir(out_dir, into_existing=into_existing) as tmp:
        write_step(build_assembly(model, name=Path(params).stem), tmp / "assembly.step")
        write_svg(model.bodies, tmp / "assembly.svg", f"sheetgen kit: {Path(params).stem}")
    written = time.perf_counter() - t_write
    total = time.perf_counter() - start
    data = report.to_json()
    data["timing_s"]["import_cadquery"] = round(import_s, 3)
    data["timing_s"]["write"] = round(written, 3)
    data["timing_s"]["total"] = round(total, 3)
    data["files"] = ["assembly.step", "assembly.svg"]
    data["cautions"] = list(CAUTIONS)
    if as_json:
        click.echo(json.dumps(data, indent=2, allow_nan=False))
    else:
        click.echo(render_text(report, out_dir, written, total, import_s))


def _deg(v: float) -> str:
    return f"{v:g} deg"


def render_text(report, out_dir: str, written_s: float, total_s: float, import_s: float = 0.0) -> str:
    """A readable summary of an AssemblyReport."""
    r = report
    rot = sum(1 for s in r.solids if s.group == "rotating")
    lines = [f"Assembly: {'OK' if r.ok else 'FAULTS FOUND'}", "",
             f"  {len(r.solids)} solids ({rot} turning, {len(r.solids) - rot} fixed) -> "
             f"{out_dir}/assembly.step, {out_dir}/assembly.svg"]
    if r.interference:
        lines.append(f"  interference: {len(r.interference)} pair(s), worst {r.max_interference_mm3:.3f} mm3")
        lines += [f"    {i.a} and {i.b}: {i.volume_mm3:.3f} mm3" for i in r.interference]
    else:
        lines.append("  interference: none (no two solids share volume)")
    if r.floating_parts or r.detached_parts:
        lines.append(f"  floating: {', '.join(r.floating_parts) or '-'}; cut off from the kit: "
                     f"{', '.join(r.detached_parts) or '-'}")
    else:
        lines.append("  every part touches another or runs on the axle in its fit clearance")
    for t in r.tabs:
        state = "seated" if t.ok else (f"MISSING in {', '.join(t.missing)}" if t.missing else
                                      f"{t.found_mm3:.2f} of {t.expected_mm3:.2f} mm3 in the slots")
        lines.append(f"  tabs {t.tab_part} -> {t.slot_part}: {t.tab_count} tab(s) {state}")
    lo, hi = r.tracking_range_deg
    lines.append(f"  sweep: {_deg(lo)} to {_deg(hi)}, {r.angles} angles {r.step_deg:.3g} deg apart")
    if r.running:
        gaps = ", ".join(f"{g.turning} {g.distance_mm:.3f} mm" + (f" from {g.fixed}" if g.fixed else "")
                         for g in r.running)
        lines.append(f"  turning in place on the axle (checked at rest): {gaps}")
    for c in r.collisions:
        lines.append(f"    COLLISION: the turning {c.turning} runs into the fixed {c.fixed} from "
                     f"{_deg(c.nearest_rest_deg)} on (sampled {_deg(c.first_deg)} to {_deg(c.last_deg)}), "
                     f"worst {c.worst_volume_mm3:.1f} mm3 shared at {_deg(c.worst_deg)}")
    for t in r.touching:
        lines.append(f"    touching: {t.turning} rubs {t.fixed} from {_deg(t.first_deg)} to {_deg(t.last_deg)}")
    for g in r.pair_gaps:
        lines.append(f"  {g.subject}: nearest {g.other} {g.distance_mm:.3f} mm"
                     + (f" at {_deg(g.angle_deg)}" if g.angle_deg else "") + f" (at least {g.required_mm:g} mm)")
    for g in r.pair_faults:
        lines.append(f"    GAP NOT KEPT: {g.subject} and {g.other} {g.distance_mm:.3f} mm apart "
                     f"(at least {g.required_mm:g} mm: {g.rule})")
    if r.closest and not r.collisions:
        c = r.closest[0]
        how = " (a gap along the axle)" if c.x_gap_mm > 0 and abs(c.distance_mm - c.x_gap_mm) < 1e-6 else ""
        where = "at every angle" if c.steady else f"at {_deg(c.angle_deg)}"
        lines.append(f"  least clearance: {c.distance_mm:.3f} mm, {c.turning} to {c.fixed} {where}{how}")
    if r.frame_clearance is not None:
        f = r.frame_clearance
        lines.append(f"  frame over the fixed parts: {f.distance_mm:.3f} mm, {f.turning} to {f.fixed} at "
                     f"{_deg(f.angle_deg)} (frame.clearance = {r.frame_clearance_required_mm:g} mm"
                     f"{'' if r.frame_clearance_ok else ': TOO CLOSE'})")
    for g in r.mesh:
        gap = "no gap" if not math.isfinite(g.min_gap_mm) else f"least gap {g.min_gap_mm:.3f} mm"
        lines.append(f"  mesh {g.wheel} / {g.pinion}: pinion turned {g.pinion_turn_deg:.3f} deg to sit a tooth in a "
                     f"space; {gap} through the travel"
                     + (", no overlap" if g.max_overlap_mm3 <= 1e-3 else f", OVERLAP {g.max_overlap_mm3:.3f} mm3"))
    m = r.mass
    lines.append(f"  turning assembly: {m.mass_kg * 1000:.1f} g, CG [{', '.join(f'{v:.2f}' for v in m.cg_mm)}] mm "
                 f"(balance check {m.ref_mass_kg * 1000:.1f} g, CG off by {m.cg_deviation_mm:.2g} mm: "
                 f"{'agrees' if m.ok else 'DISAGREES'})")
    timing = dict(r.timing_s)
    lines.append(f"  time: {total_s:.1f} s (loading cadquery {import_s:.1f} s, solids {timing.get('build', 0):.1f} s, "
                 f"checks {sum(v for k, v in timing.items() if k != 'build'):.1f} s, "
                 f"files {written_s:.1f} s)")
    lines += [""] + list(CAUTIONS)
    return "\n".join(lines)
