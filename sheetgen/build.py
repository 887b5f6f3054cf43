"""The whole job in one pure step: parameters to everything the laser needs.

Spec -> kit -> balance check -> nested sheets -> cut plans -> figures. No files
here: sheetgen/commands/build.py writes what this returns.
"""

from __future__ import annotations

from dataclasses import dataclass

from sheetgen.production.cutplan import CutPlan
from sheetgen.design.part import Kit
from sheetgen.production.runs import PlacedSheet


@dataclass(frozen=True)
class SheetRun:
    sheet: PlacedSheet
    plan: CutPlan
    utilisation: float


@dataclass(frozen=True)
class BuildResult:
    spec: object
    kit: Kit
    kits: int
    balance: object  # sheetgen.mechanics.check.BalanceReport
    drive: object  # sheetgen.drive.gears.GearPair
    nest: object  # sheetgen.production.nesting.NestResult
    sheets: tuple[SheetRun, ...]
    items: tuple
    summary: dict
    patterns: tuple[tuple[int, ...], ...] = ()  # sheet positions (0-based) cut from one layout


def _plan(args):
    from sheetgen.production.cutplan import plan_sheet

    contours, settings, sheet_mm = args
    return plan_sheet(list(contours), settings, sheet_size_mm=sheet_mm)


def run_build(spec, kits: int, progress=None, jobs: int | None = None) -> BuildResult:
    """Everything a build writes, computed. Sheets of one pattern share one
    cut plan (planned once); ``jobs`` processes run the layout searches and
    plan the distinct sheets (default every core; the result does not depend
    on it)."""
    import os

    from sheetgen.production.cutplan import settings_from_spec
    from sheetgen.errors import GeometryBug, ParameterError
    from sheetgen.io.sheets import map_jobs
    from sheetgen.design.kit import build_kit
    from sheetgen.mechanics.check import balance_check
    from sheetgen.production.nesting import nest, sheet_patterns, verify
    from sheetgen.production.runs import kit_items, placed_sheets

    if kits < 1:
        raise ParameterError(f"--kits {kits}: must be a whole number >= 1")
    kit = build_kit(spec)
    balance = balance_check(kit, spec)
    drive = kit.drive
    items, sources = kit_items(kit, spec.laser.kerf_mm, kits)
    sheet_mm = (spec.sheet.width_mm, spec.sheet.height_mm)
    jobs = max(1, os.cpu_count() or 1) if jobs is None else jobs
    result = nest(items, sheet_mm=sheet_mm, margin_mm=spec.sheet.margin_mm, spacing_mm=spec.nest.spacing_mm,
                  time_limit_s=spec.nest.time_limit_s, effort=spec.nest.effort or None, seed=spec.nest.seed,
                  progress=progress, jobs=jobs)
    try:
        verify(result, items)
    except GeometryBug as exc:
        raise GeometryBug(f"nested layout failed verification: {exc}") from None
    settings = settings_from_spec(spec)
    placed = placed_sheets(result, items, sources)
    patterns = sheet_patterns(result)
    plans = map_jobs(_plan, [(placed[g[0]].contours, settings, sheet_mm) for g in patterns], jobs)
    plan_of = {k: plan for g, plan in zip(patterns, plans) for k in g}
    runs = [SheetRun(sheet, plan_of[k], util) for k, (sheet, util) in enumerate(zip(placed, result.utilisation))]
    summary = _summary(spec, kit, kits, balance, drive, result, runs)
    return BuildResult(spec, kit, kits, balance, drive, result, tuple(runs), tuple(items), summary, patterns)


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
