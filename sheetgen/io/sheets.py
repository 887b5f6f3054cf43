"""Writing nested sheets: sheet-01.dxf, sheet-01.svg, ... in a folder.

The SVG beside each DXF is the cut-ready one (sheetgen.io.cutsvg: the same
contours in the same order, stroke only, true size); the filled preview
(:func:`sheet_svg`) is drawn inside the report only.

Sheets cut from one pattern (the same parts at the same places) are drawn
once: the DXF bytes are reused and the SVG differs only in its title.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

from sheetgen.geometry.contour import Contour
from sheetgen.io.cutsvg import CutSvgStyle, cut_svg, default_style
from sheetgen.io.dxf import dxf_bytes
from sheetgen.io.svg import svg_document
from sheetgen.production.runs import PlacedSheet


def sheet_name(index: int) -> str:
    return f"sheet-{index:02d}"


def sheet_title(sheet: PlacedSheet) -> str:
    return f"{sheet_name(sheet.index)}: {len(sheet.polygons)} parts"


def sheet_svg(sheet: PlacedSheet, size_mm: tuple[float, float], margin_mm: float, *, fragment: bool = False) -> str:
    w, h = size_mm
    return svg_document(list(sheet.polygons), list(sheet.marks), w, h, sheet=True, margin_mm=margin_mm,
                        title=sheet_title(sheet), fragment=fragment)


def _drawn(args) -> tuple[bytes, str]:
    contours, sheet, size_mm, dxf_version, style = args
    w, h = size_mm
    return (dxf_bytes(list(contours), list(sheet.marks), dxf_version),
            cut_svg(list(contours), list(sheet.marks), w, h, style, title=sheet_title(sheet)))


def map_jobs(fn, args: list, jobs: int) -> list:
    """``[fn(a) for a in args]``, in a process pool of ``jobs`` workers when
    that pays (results in the order of ``args``, so the output never depends
    on ``jobs``)."""
    if jobs <= 1 or len(args) < 4:
        return [fn(a) for a in args]
    from concurrent.futures import ProcessPoolExecutor

    with ProcessPoolExecutor(max_workers=min(jobs, len(args))) as pool:
        return list(pool.map(fn, args, chunksize=max(1, len(args) // (4 * jobs))))


def write_sheets(out_dir: Path, sheets: Sequence[PlacedSheet], size_mm: tuple[float, float], margin_mm: float,
                 ordered_contours: Sequence[Sequence[Contour]] | None = None, dxf_version: str = "R2000",
                 patterns: Sequence[Sequence[int]] | None = None, jobs: int = 1,
                 svg_style: CutSvgStyle | None = None) -> list[str]:
    """Write each sheet's DXF (contours in the order given: the cut order when
    ``ordered_contours`` is given, else the nester's) and its cut-ready SVG
    (the same contours in the same order; ``svg_style`` its colours and stroke,
    default the parameters' defaults). ``margin_mm`` is kept for callers; the
    cut-ready SVG draws no sheet border.

    ``patterns`` groups sheet positions (0-based) that are the same layout;
    each group is drawn once. Without it, sheets that share one contours tuple
    (as :func:`sheetgen.production.runs.placed_sheets` gives the sheets of one
    pattern) are one group; their ordered contours must then be the same."""
    if patterns is not None:
        groups = [tuple(g) for g in patterns]
    else:
        by_id: dict[int, list[int]] = {}
        for k, sheet in enumerate(sheets):
            by_id.setdefault(id(sheet.contours), []).append(k)
        groups = [tuple(g) for g in by_id.values()]
    args = []
    for g in groups:
        k = g[0]
        contours = ordered_contours[k] if ordered_contours is not None else sheets[k].contours
        args.append((contours, sheets[k], size_mm, dxf_version, svg_style or default_style()))
    drawn = map_jobs(_drawn, args, jobs)
    names: dict[int, str] = {}  # sheet position -> file name; the groups cover every position
    for g, (dxf, svg) in zip(groups, drawn):
        first_title = sheet_title(sheets[g[0]])
        for k in g:
            sheet = sheets[k]
            name = sheet_name(sheet.index)
            (out_dir / f"{name}.dxf").write_bytes(dxf)
            text = svg if k == g[0] else svg.replace(first_title, sheet_title(sheet), 1)
            (out_dir / f"{name}.svg").write_text(text, encoding="utf-8")
            names[k] = f"{name}.dxf"
    return [names[k] for k in range(len(sheets))]
