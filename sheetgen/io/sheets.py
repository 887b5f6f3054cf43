"""Writing nested sheets: sheet-01.dxf, sheet-01.svg, ... in a folder."""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

from sheetgen.io.dxf import Contour, dxf_bytes
from sheetgen.io.svg import svg_document
from sheetgen.production import PlacedSheet


def sheet_name(index: int) -> str:
    return f"sheet-{index:02d}"


def sheet_svg(sheet: PlacedSheet, size_mm: tuple[float, float], margin_mm: float, *, fragment: bool = False) -> str:
    w, h = size_mm
    return svg_document(list(sheet.polygons), list(sheet.marks), w, h, sheet=True, margin_mm=margin_mm,
                        title=f"{sheet_name(sheet.index)}: {len(sheet.polygons)} parts", fragment=fragment)


def write_sheets(out_dir: Path, sheets: Sequence[PlacedSheet], size_mm: tuple[float, float], margin_mm: float,
                 ordered_contours: Sequence[Sequence[Contour]] | None = None, dxf_version: str = "R2000") -> list[str]:
    """Write each sheet's DXF (contours in the order given: the cut order when
    ``ordered_contours`` is given, else the nester's) and its SVG preview."""
    names = []
    for k, sheet in enumerate(sheets):
        contours = ordered_contours[k] if ordered_contours is not None else sheet.contours
        name = sheet_name(sheet.index)
        (out_dir / f"{name}.dxf").write_bytes(dxf_bytes(list(contours), list(sheet.marks), dxf_version))
        (out_dir / f"{name}.svg").write_text(sheet_svg(sheet, size_mm, margin_mm), encoding="utf-8")
        names.append(f"{name}.dxf")
    return names
