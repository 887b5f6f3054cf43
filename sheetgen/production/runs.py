"""A production run: kits (and extra parts) to nest items, nest results to sheets.

Pure: no files. The nester sees kerf-compensated cut outlines; each item keeps
what it came from (round holes, labels) so that sheets can be written with true
circles and part labels in the right place.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from shapely.geometry import Polygon

from sheetgen.errors import ParameterError
from sheetgen.geometry.kerf import cut_outline
from sheetgen.geometry.shapes import turn_point
from sheetgen.geometry.contour import Contour, circles_of, polygon_contours
from sheetgen.production.nesting import NestItem, NestResult, sheet_patterns
from sheetgen.kitmodel.part import LAYER_LABEL, Mark


@dataclass(frozen=True)
class ItemSource:
    """What a nest item came from: the part's round holes (before kerf), how
    far kerf compensation moved them, and its marks (all in the item's frame)."""

    name: str
    circles: tuple[tuple[float, float, float], ...] = ()
    circle_offset_mm: float = 0.0
    marks: tuple[Mark, ...] = ()


@dataclass(frozen=True)
class PlacedSheet:
    """One sheet ready to plan and write: contours in the nester's order (each
    part's holes before its outline), marks, and the parts' placed cut outlines."""

    index: int
    contours: tuple[Contour, ...]
    marks: tuple[Mark, ...]
    polygons: tuple[Polygon, ...]
    labels: tuple[str, ...]  # part name per polygon


def parse_rotations(text: str) -> tuple[float, ...]:
    """``--rotations 0,90,180,270`` -> angles in degrees."""
    try:
        angles = tuple(float(a) for a in text.replace(" ", "").split(",") if a != "")
    except ValueError:
        raise ParameterError(f"--rotations {text}: must be angles in degrees separated by commas, e.g. 0,180") from None
    if not angles or any(not math.isfinite(a) for a in angles):
        raise ParameterError(f"--rotations {text}: must be angles in degrees separated by commas, e.g. 0,180")
    return tuple(dict.fromkeys(a % 360.0 for a in angles))


def kit_items(kit, kerf_mm: float, kits: int, rotations_deg: tuple[float, ...] | None = None):
    """Nest items for ``kits`` kits: one item per distinct part, qty x kits copies."""
    if kits < 1:
        raise ParameterError(f"--kits {kits}: must be a whole number >= 1")
    items, sources = [], []
    for part in kit.parts:
        items.append(NestItem(part.name, cut_outline(part.outline_to_cut, kerf_mm), part.qty * kits,
                              rotations_deg or part.rotations_deg))
        sources.append(ItemSource(part.name, tuple(circles_of(part.circles)), kerf_mm / 2, part.marks))
    return items, sources


def extra_items(parts, kerf_mm: float, rotations_deg: tuple[float, ...]):
    """Nest items for extra parts read from DXF files.

    ``parts``: (name, nominal polygon, circles, qty). Their drawings are taken
    as nominal outlines and compensated like kit parts."""
    items, sources = [], []
    for name, polygon, circles, qty in parts:
        if qty < 1:
            raise ParameterError(f"--extra {name}: quantity {qty}: must be a whole number >= 1")
        items.append(NestItem(name, cut_outline(polygon, kerf_mm), qty, rotations_deg))
        label = Mark(LAYER_LABEL, "text", ((polygon.centroid.x, polygon.centroid.y),), name, 3.0)
        sources.append(ItemSource(name, tuple(circles), kerf_mm / 2,
                                  (label,) if polygon.contains(polygon.centroid) else ()))
    return items, sources


def placed_sheets(result: NestResult, items, sources) -> list[PlacedSheet]:
    """Every sheet's contours and marks, parts in the nester's order. Sheets of
    one pattern (see :func:`sheetgen.production.nesting.sheet_patterns`) share them."""
    out: dict[int, PlacedSheet] = {}  # sheet position -> sheet; the patterns cover every position
    for group in sheet_patterns(result):
        sheet = result.sheets[group[0]]
        contours: list[Contour] = []
        marks: list[Mark] = []
        polys, labels = [], []
        for p in sheet:
            src = sources[p.item]
            circles = [turn_point(cx, cy, p.angle_deg, p.x_mm, p.y_mm) + (r,) for cx, cy, r in src.circles]
            contours.extend(polygon_contours(p.polygon, circles, src.circle_offset_mm))
            marks.extend(m.moved(p.angle_deg, p.x_mm, p.y_mm) for m in src.marks)
            polys.append(p.polygon)
            labels.append(items[p.item].name)
        parts = (tuple(contours), tuple(marks), tuple(polys), tuple(labels))
        for k in group:
            out[k] = PlacedSheet(k + 1, *parts)
    return [out[k] for k in range(len(result.sheets))]


def patterns_json(result: NestResult) -> list[dict]:
    """The run as sheet patterns: sheet numbers (from 1) cut from each, and how many."""
    return [{"sheets": [k + 1 for k in group], "count": len(group), "parts": len(result.sheets[group[0]])}
            for group in sheet_patterns(result)]


def nest_summary(result: NestResult) -> dict:
    """The figures of a nesting run, as the JSON output names them.

    ``lower_bound_sheets`` is the honest bound (see
    :mod:`sheetgen.production.nesting.bound`); ``area_lower_bound_sheets`` is the plain
    area ratio, which counts every window as usable and so is weaker.
    ``stopped_by``: "effort", "time_limit" or "converged"."""
    return {
        "sheets": len(result.sheets),
        "sheet_size_mm": [round(v, 3) for v in result.sheet_size_mm],
        "margin_mm": result.margin_mm,
        "spacing_mm": result.spacing_mm,
        "parts_placed": result.parts_placed,
        "parts_unplaced": len(result.unplaced),
        "utilisation": [round(u, 4) for u in result.utilisation],
        "lower_bound_sheets": result.lower_bound_sheets,
        "area_lower_bound_sheets": result.area_lower_bound_sheets,
        "patterns": patterns_json(result),
        "stopped_by": result.stopped_by,
        "work_units": result.work_units,
        "strip_length_mm": None if result.strip_length_mm is None else round(result.strip_length_mm, 3),
        "remnant_mm": None if result.remnant_mm is None else [round(v, 3) for v in result.remnant_mm],
    }
