"""SVG previews: cut contours and marks drawn to scale (1 unit = 1 mm).

SVG's y axis points down; drawings are flipped so they look as the DXF does.
Output is plain text with fixed decimals, so equal input gives equal bytes.
"""

from __future__ import annotations

from collections.abc import Sequence
from html import escape

from shapely.geometry import Polygon

from sheetgen.kitmodel.part import LAYER_GUIDE, LAYER_LABEL, Mark

STYLE = {
    "cut": 'fill="#e9dcc4" fill-rule="evenodd" stroke="#b22222" stroke-width="{w}"',
    "sheet": 'fill="#fbfaf7" stroke="#888" stroke-width="{w}"',
    "usable": 'fill="none" stroke="#bbb" stroke-dasharray="{d}" stroke-width="{w}"',
}


def _f(v: float) -> str:
    s = f"{v:.3f}".rstrip("0").rstrip(".")
    return "0" if s in ("-0", "") else s


def ring_path(coords, height_mm: float) -> str:
    pts = list(coords)
    if len(pts) > 1 and pts[0] == pts[-1]:
        pts = pts[:-1]
    return "M" + " L".join(f"{_f(x)} {_f(height_mm - y)}" for x, y in pts) + " Z"


def polygon_path(poly: Polygon, height_mm: float) -> str:
    return " ".join([ring_path(poly.exterior.coords, height_mm)] +
                    [ring_path(r.coords, height_mm) for r in poly.interiors])


def mark_elements(marks: Sequence[Mark], height_mm: float) -> list[str]:
    out = []
    for m in marks:
        if m.kind == "text":
            (x, y), = m.points
            turn = f' transform="rotate({_f(-m.angle_deg)} {_f(x)} {_f(height_mm - y)})"' if m.angle_deg else ""
            out.append(f'<text x="{_f(x)}" y="{_f(height_mm - y)}" font-size="{_f(m.height_mm)}"{turn} '
                       f'font-family="sans-serif" text-anchor="middle" dominant-baseline="central" '
                       f'fill="#1f5f2a">{escape(m.text)}</text>')
        else:
            colour = "#2f6fb0" if m.layer == LAYER_GUIDE else "#1f5f2a" if m.layer == LAYER_LABEL else "#555"
            pts = " ".join(f"{_f(x)},{_f(height_mm - y)}" for x, y in m.points)
            out.append(f'<polyline points="{pts}" fill="none" stroke="{colour}" stroke-width="0.3" '
                       'stroke-dasharray="2 1"/>')
    return out


def svg_document(polygons: Sequence[Polygon], marks: Sequence[Mark], width_mm: float, height_mm: float, *,
                 title: str = "", sheet: bool = False, margin_mm: float = 0.0, pad_mm: float = 2.0,
                 fragment: bool = False) -> str:
    """An SVG of ``polygons`` in the box (0, 0)-(width, height) mm.

    ``sheet`` draws the stock and its usable area (``margin_mm`` inside).
    ``fragment`` leaves out the XML declaration, for inlining in HTML.
    """
    w = max(width_mm, height_mm) / 600 + 0.15
    parts = []
    head = "" if fragment else '<?xml version="1.0" encoding="UTF-8"?>\n'
    vb = f"{_f(-pad_mm)} {_f(-pad_mm)} {_f(width_mm + 2 * pad_mm)} {_f(height_mm + 2 * pad_mm)}"
    parts.append(f'{head}<svg xmlns="http://www.w3.org/2000/svg" width="{_f(width_mm + 2 * pad_mm)}mm" '
                 f'height="{_f(height_mm + 2 * pad_mm)}mm" viewBox="{vb}">')
    if title:
        parts.append(f"<title>{escape(title)}</title>")
    if sheet:
        parts.append(f'<rect x="0" y="0" width="{_f(width_mm)}" height="{_f(height_mm)}" '
                     + STYLE["sheet"].format(w=_f(w)) + "/>")
        if margin_mm > 0:
            parts.append(f'<rect x="{_f(margin_mm)}" y="{_f(margin_mm)}" width="{_f(width_mm - 2 * margin_mm)}" '
                         f'height="{_f(height_mm - 2 * margin_mm)}" '
                         + STYLE["usable"].format(w=_f(w), d=f"{_f(4 * w)} {_f(4 * w)}") + "/>")
    for poly in polygons:
        parts.append(f'<path d="{polygon_path(poly, height_mm)}" ' + STYLE["cut"].format(w=_f(w)) + "/>")
    parts.extend(mark_elements(marks, height_mm))
    parts.append("</svg>\n")
    return "\n".join(parts)
