"""The whole job in one pure step: parameters to everything the laser needs.

Spec -> kit -> balance check -> nested sheets -> cut plans -> figures, and,
on request, the 3D model and its checks. No files here:
:func:`sheetgen.buildout.write_build` writes what this returns.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import TYPE_CHECKING, Any

from sheetgen.kitmodel.part import Kit
from sheetgen.errors import GeometryBug
from sheetgen.design.schema import Spec
from sheetgen.drive.gears import GearPair
from sheetgen.mechanics.balance_report import BalanceReport
from sheetgen.production.cutplan import CutPlan
from sheetgen.production.nesting import NestItem, NestResult
from sheetgen.production.runs import PlacedSheet

if TYPE_CHECKING:
    from sheetgen.design.hardware import HardwareItem
    from sheetgen.model3d import AssemblyReport, Model
    from sheetgen.production.cost import KitCost


@dataclass(frozen=True)
class SheetRun:
    sheet: PlacedSheet
    plan: CutPlan
    utilisation: float


@dataclass(frozen=True)
class BuildResult:
    spec: Spec
    kit: Kit
    kits: int
    balance: BalanceReport
    drive: GearPair
    nest: NestResult
    sheets: tuple[SheetRun, ...]
    items: tuple[NestItem, ...]
    summary: dict[str, Any]  # what summary.json holds
    patterns: tuple[tuple[int, ...], ...] = ()  # sheet positions (0-based) cut from one layout
    model: Model | None = None  # the 3D model, when built (see :func:`with_model`)
    assembly: AssemblyReport | None = None
    hardware: tuple[HardwareItem, ...] = ()  # the bought items of one kit (sheetgen.design.hardware)
    kit_cost: KitCost | None = None  # cost per kit from the optional price list (sheetgen.production.cost)

    @property
    def failing_checks(self) -> list[str]:
        """Names of the binding design checks that fail: the balance and drive
        checks, and the 3D assembly check when the model was built."""
        return failing_checks(self.summary)


def failing_checks(summary: dict[str, Any]) -> list[str]:
    """Names of the binding design checks that fail in a build summary."""
    out = [c["name"] for c in summary["balance"]["checks"] if not c["pass"] and c.get("binding", True)]
    assembly = summary.get("assembly")
    if assembly is not None and not assembly.get("ok", False):
        out.append("3D assembly")
    return out


def with_model(build: BuildResult) -> BuildResult:
    """The same build with its 3D model built and checked (cadquery), the
    assembly figures in the summary and the verdict updated."""
    from sheetgen.model3d import assemble

    model, report = assemble(build.kit, build.spec)
    summary = dict(build.summary)
    summary["assembly"] = {k: v for k, v in report.to_json().items() if k not in ("timing_s", "occ_calls")}
    failing = failing_checks(summary)
    summary["checks_ok"] = not failing
    summary["failing_checks"] = failing
    return replace(build, summary=summary, model=model, assembly=report)


def _plan(args):
    from sheetgen.production.cutplan import plan_sheet

    contours, settings, sheet_mm = args
    return plan_sheet(list(contours), settings, sheet_size_mm=sheet_mm)


@dataclass(frozen=True)
class NestOptions:
    """Settings of a nest run that replace the spec's (None: the spec's value).

    Without a spec (extra parts only) kerf, spacing and margin default to 0,
    the time limit to 10 s and the seed to 1, and a sheet size or a strip width
    must be given. ``extra`` holds parts read from DXF files as (name, nominal
    polygon, circles, qty); ``rotations_deg`` replaces every part's allowed
    turns (extra parts default to quarter turns)."""

    sheet_mm: tuple[float, float] | None = None
    strip_width_mm: float | None = None
    margin_mm: float | None = None
    spacing_mm: float | None = None
    kerf_mm: float | None = None
    time_limit_s: float | None = None
    effort: float | None = None
    seed: int | None = None
    rotations_deg: tuple[float, ...] | None = None
    extra: tuple = ()


@dataclass(frozen=True)
class NestRun:
    """A production run nested and verified: the nest items (one per distinct
    part), the nester's result and every sheet's contours in the nester's order."""

    items: tuple[NestItem, ...]
    result: NestResult
    sheets: tuple[PlacedSheet, ...]
    patterns: tuple[tuple[int, ...], ...]  # sheet positions (0-based) cut from one layout
    settings: NestOptions | None = None    # the settings used, every default filled in


def _jobs(jobs: int | None) -> int:
    import os

    return max(1, os.cpu_count() or 1) if jobs is None else jobs


def resolve_nest_options(spec: Spec | None, options: NestOptions | None = None) -> NestOptions:
    """``options`` with every unset value taken from ``spec`` (or the defaults
    of a run without one, see :class:`NestOptions`)."""
    o = options or NestOptions()
    if spec is None:
        sheet = o.sheet_mm if o.strip_width_mm is None else None
        return replace(o, sheet_mm=sheet, kerf_mm=o.kerf_mm or 0.0, spacing_mm=o.spacing_mm or 0.0,
                       margin_mm=o.margin_mm or 0.0, time_limit_s=10.0 if o.time_limit_s is None else o.time_limit_s,
                       seed=1 if o.seed is None else o.seed)
    effort = o.effort if o.effort is not None else (spec.nest.effort or None)
    if o.strip_width_mm is not None:
        sheet = None
    else:
        sheet = o.sheet_mm if o.sheet_mm is not None else (spec.sheet.width_mm, spec.sheet.height_mm)
    return replace(o, sheet_mm=sheet,
                   kerf_mm=spec.laser.kerf_mm if o.kerf_mm is None else o.kerf_mm,
                   spacing_mm=spec.nest.spacing_mm if o.spacing_mm is None else o.spacing_mm,
                   margin_mm=spec.sheet.margin_mm if o.margin_mm is None else o.margin_mm,
                   time_limit_s=spec.nest.time_limit_s if o.time_limit_s is None else o.time_limit_s,
                   effort=effort, seed=spec.nest.seed if o.seed is None else o.seed)


def nest_run(spec: Spec | None, kit: Kit | None, kits: int, progress: Any = None, jobs: int | None = None,
             options: NestOptions | None = None) -> NestRun:
    """``kits`` copies of the kit's parts (none without a kit) and the extra
    parts of ``options``, kerf-compensated, nested on the sheet stock (or the
    strip) and verified (``jobs`` processes; the layout does not depend on it).
    Unset ``options`` come from ``spec``: see :func:`resolve_nest_options`."""
    from sheetgen.errors import ParameterError
    from sheetgen.production.nesting import nest, sheet_patterns, verify
    from sheetgen.production.runs import extra_items, kit_items, placed_sheets

    if kits < 1:
        raise ParameterError(f"--kits {kits}: must be a whole number >= 1")
    o = resolve_nest_options(spec, options)
    kerf = float(o.kerf_mm or 0.0)
    items: list[NestItem] = []
    sources: list = []
    if kit is not None:
        items, sources = kit_items(kit, kerf, kits, o.rotations_deg)
    if o.extra:
        e_items, e_sources = extra_items(list(o.extra), kerf, o.rotations_deg or (0.0, 90.0, 180.0, 270.0))
        items += e_items
        sources += e_sources
    if not items:
        raise ParameterError("nothing to nest: give a parameter file or --extra FILE.dxf")
    result = nest(items, sheet_mm=o.sheet_mm, strip_width_mm=o.strip_width_mm, margin_mm=o.margin_mm or 0.0,
                  spacing_mm=o.spacing_mm or 0.0, time_limit_s=10.0 if o.time_limit_s is None else o.time_limit_s,
                  effort=o.effort, seed=1 if o.seed is None else o.seed, progress=progress, jobs=_jobs(jobs))
    try:
        verify(result, items)
    except GeometryBug as exc:
        raise GeometryBug(f"nested layout failed verification: {exc}") from None
    return NestRun(tuple(items), result, tuple(placed_sheets(result, items, sources)),
                   tuple(tuple(g) for g in sheet_patterns(result)), o)


def run_build(spec: Spec, kits: int, progress: Any = None, jobs: int | None = None) -> BuildResult:
    """Everything a build writes, computed. Sheets of one pattern share one
    cut plan (planned once); ``jobs`` processes run the layout searches and
    plan the distinct sheets (default every core; the result does not depend
    on it)."""
    from sheetgen.design.kit import build_kit
    from sheetgen.io.sheets import map_jobs
    from sheetgen.mechanics.check import balance_check
    from sheetgen.production.cutplan import settings_from_spec

    kit = build_kit(spec)
    balance = balance_check(kit, spec)
    drive = kit.drive
    if drive is None:  # build_kit always cuts the wheel and pinion from a pair
        raise GeometryBug("the kit carries no drive gear pair")
    run = nest_run(spec, kit, kits, progress, jobs)
    result, placed, patterns = run.result, run.sheets, run.patterns
    sheet_mm = (spec.sheet.width_mm, spec.sheet.height_mm)
    settings = settings_from_spec(spec)
    plans = map_jobs(_plan, [(placed[g[0]].contours, settings, sheet_mm) for g in patterns], _jobs(jobs))
    plan_of = {k: plan for g, plan in zip(patterns, plans) for k in g}
    runs = [SheetRun(sheet, plan_of[k], util) for k, (sheet, util) in enumerate(zip(placed, result.utilisation))]
    summary = _summary(spec, kit, kits, balance, drive, result, runs)
    hardware, cost = _hardware(spec, kit, kits, runs)
    summary["hardware"] = [h.to_json(kits) for h in hardware]
    summary["cost_per_kit"] = cost.to_json()
    summary["failing_checks"] = failing_checks(summary)
    return BuildResult(spec, kit, kits, balance, drive, result, tuple(runs), run.items, summary, patterns,
                       hardware=hardware, kit_cost=cost)


def _hardware(spec, kit, kits, runs):
    """The kit's bought items and the cost per kit of this run."""
    from sheetgen.design.hardware import hardware_items
    from sheetgen.production.cost import kit_cost

    hardware = hardware_items(kit, spec)
    return hardware, kit_cost(spec, hardware, kits, len(runs), sum(r.plan.cut_time_s for r in runs))


def _r(v, nd=3):
    return None if v is None else round(float(v), nd)


def _summary(spec, kit, kits, balance, drive, result, runs) -> dict:
    from sheetgen.io.sheets import sheet_name
    from sheetgen.mechanics.massprops import part_mass_each_kg
    from sheetgen.mechanics.materials import sheet_material
    from sheetgen.production.runs import patterns_json
    from sheetgen.design.solver import derived_values

    density = sheet_material(spec.sheet.material).density_kg_m3
    costs = [r.plan.cost for r in runs]
    total_cost = None if any(c is None for c in costs) else round(sum(costs), 2)
    sheets = []
    for r in runs:
        p = r.plan
        sheets.append({
            "file": f"sheets/{sheet_name(r.sheet.index)}.dxf",
            "parts": len(r.sheet.polygons),
            "utilisation": _r(r.utilisation, 4),
            "pierces": p.pierces,
            "cut_length_mm": _r(p.cut_length_mm, 1),
            "travel_mm": _r(p.travel_mm, 1),
            "travel_unplanned_mm": _r(p.travel_unplanned_mm, 1),
            "travel_saved_mm": _r(p.travel_unplanned_mm - p.travel_mm, 1),
            "cut_time_s": _r(p.cut_time_s, 1),
            "cost": _r(p.cost, 2),
        })
    bom = [{
        "name": part.name,
        "qty_per_kit": part.qty,
        "qty": part.qty * kits,
        "bbox_mm": [_r(v, 1) for v in part.bbox_mm],
        "area_mm2": _r(part.area_mm2, 1),
        "mass_kg": _r(part_mass_each_kg(part, density), 5),
        "description": part.description,
    } for part in kit.parts]
    return {
        "kits": kits,
        "parameters": spec.source.rsplit("/", 1)[-1] if spec.source else "",
        "material": spec.sheet.material,
        "sheet_size_mm": [spec.sheet.width_mm, spec.sheet.height_mm],
        "thickness_mm": spec.sheet.thickness_mm,
        "kerf_mm": spec.laser.kerf_mm,
        "sheets": len(runs),
        "lower_bound_sheets": result.lower_bound_sheets,
        "area_lower_bound_sheets": result.area_lower_bound_sheets,
        "patterns": patterns_json(result),
        "stopped_by": result.stopped_by,
        "parts": sum(len(r.sheet.polygons) for r in runs),
        "pierces": sum(r.plan.pierces for r in runs),
        "cut_length_mm": _r(sum(r.plan.cut_length_mm for r in runs), 1),
        "travel_mm": _r(sum(r.plan.travel_mm for r in runs), 1),
        "travel_unplanned_mm": _r(sum(r.plan.travel_unplanned_mm for r in runs), 1),
        "cut_time_s": _r(sum(r.plan.cut_time_s for r in runs), 1),
        "cost": total_cost,
        "utilisation": [_r(r.utilisation, 4) for r in runs],
        "remnant_mm": None if result.remnant_mm is None else [_r(v, 1) for v in result.remnant_mm],
        "checks_ok": bool(balance.ok),
        "derived": derived_values(spec, kit, balance),
        "balance": balance.to_json(),
        "gears": gear_data(drive),
        "bill_of_materials": bom,
        "sheet_runs": sheets,
    }


def gear_data(drive) -> dict:
    """Caliper figures of the drive pair."""
    def one(g):
        s = g.spec
        return {
            "teeth": s.teeth,
            "module_mm": s.module_mm,
            "pressure_angle_deg": s.pressure_angle_deg,
            "shift": s.shift,
            "pitch_diameter_mm": _r(g.pitch_diameter_mm, 4),
            "base_diameter_mm": _r(g.base_diameter_mm, 4),
            "tip_diameter_mm": _r(g.tip_diameter_mm, 4),
            "root_diameter_mm": _r(g.root_diameter_mm, 4),
            "span_teeth": g.span_teeth,
            "span_mm": _r(g.span_mm, 4),
            "pin_diameter_mm": _r(g.pin_diameter_mm, 4),
            "over_pins_mm": _r(g.over_pins_mm, 4),
            "warnings": list(g.warnings),
        }

    return {
        "pinion": one(drive.pinion),
        "wheel": one(drive.wheel),
        "centre_distance_mm": _r(drive.centre_distance_mm, 4),
        "ratio": _r(drive.ratio, 4),
        "contact_ratio": _r(drive.contact_ratio, 4),
        "warnings": list(drive.warnings),
    }
