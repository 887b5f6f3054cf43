"""Per-part cut files: one DXF and one SVG per distinct part, and a manifest.

Each part is drawn in its own plane, kerf-compensated, and moved so that its
cut outline starts at (0, 0); holes come before the outline in the DXF.
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from pathlib import Path

from shapely import affinity
from shapely.geometry import Polygon

from sheetgen.errors import GeometryBug
from sheetgen.geometry.kerf import cut_outline
from sheetgen.geometry.contour import circles_of, polygon_contours
from sheetgen.io.dxf import dxf_bytes
from sheetgen.io.svg import svg_document
from sheetgen.kitmodel.part import Mark, Part


@dataclass(frozen=True)
class PartDrawing:
    """A part ready to write: cut outline, circles and marks, all at the origin."""

    part: Part
    cut: Polygon
    circles: tuple[tuple[float, float, float], ...]  # round holes before compensation, moved
    marks: tuple[Mark, ...]
    kerf_mm: float


def part_drawing(part: Part, kerf_mm: float) -> PartDrawing:
    cut = cut_outline(part.outline_to_cut, kerf_mm)
    if not cut.is_valid or cut.is_empty:
        raise GeometryBug(f"part {part.name}: cut outline is not valid")
    dx, dy = -cut.bounds[0], -cut.bounds[1]
    moved = affinity.translate(cut, dx, dy)
    circles = tuple((x + dx, y + dy, r) for x, y, r in circles_of(part.circles))
    marks = tuple(Mark(m.layer, m.kind, tuple((x + dx, y + dy) for x, y in m.points), m.text, m.height_mm)
                  for m in part.marks)
    return PartDrawing(part, moved, circles, marks, kerf_mm)


def drawing_dxf(d: PartDrawing, dxf_version: str = "R2000") -> bytes:
    return dxf_bytes(polygon_contours(d.cut, d.circles, d.kerf_mm / 2), d.marks, dxf_version)


def drawing_svg(d: PartDrawing) -> str:
    x0, y0, x1, y1 = d.cut.bounds
    return svg_document([d.cut], d.marks, x1, y1, title=f"{d.part.name} (x{d.part.qty})")


def manifest_entry(part: Part, density_kg_m3: float, file: str) -> dict:
    from sheetgen.mechanics.massprops import part_mass_each_kg

    w, h = part.bbox_mm
    return {
        "name": part.name,
        "file": file,
        "svg": file[:-4] + ".svg",
        "qty": part.qty,
        "area_mm2": round(part.area_mm2, 3),
        "bbox_mm": [round(w, 3), round(h, 3)],
        "mass_kg": round(part_mass_each_kg(part, density_kg_m3), 6),
        "material": part.material,
        "thickness_mm": part.thickness_mm,
        "description": part.description,
    }


def write_part_files(kit, spec, out_dir: Path, dxf_version: str = "R2000") -> dict:
    """Write <part>.dxf, <part>.svg and manifest.json into ``out_dir``; return the manifest."""
    from sheetgen.mechanics.materials import sheet_material

    density = sheet_material(spec.sheet.material).density_kg_m3
    entries = []
    for part in kit.parts:
        d = part_drawing(part, spec.laser.kerf_mm)
        name = f"{part.name}.dxf"
        (out_dir / name).write_bytes(drawing_dxf(d, dxf_version))
        (out_dir / (part.name + ".svg")).write_text(drawing_svg(d), encoding="utf-8")
        entries.append(manifest_entry(part, density, name))
    manifest = {
        "kit_source": Path(spec.source).name if spec.source else "",
        "kerf_mm": spec.laser.kerf_mm,
        "dxf_version": dxf_version,
        "units": "mm",
        "parts": entries,
    }
    (out_dir / "manifest.json").write_text(json.dumps(manifest, indent=2) + "\n", encoding="utf-8")
    return manifest
