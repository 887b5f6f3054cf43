"""Cut-ready sheet SVGs (``sheets/sheet-01.svg`` beside ``sheet-01.dxf``).

For laser software that takes SVG. The file holds what the sheet's DXF holds,
in the same order: every cut contour as one stroked element (no fill, so
nothing is read as an area to engrave), then the labels and the guides.

- True size: ``width="600mm" height="400mm"`` and ``viewBox="0 0 600 400"``,
  one user unit = 1 mm.
- y as in the DXF: coordinates are the DXF's (y up from the sheet's lower
  edge); each group flips them onto SVG's y-down page with
  ``transform="matrix(1 0 0 -1 0 H)"`` (H = the sheet height), so the drawing
  looks as the DXF does. Label text is turned back upright in place.
- One ``<g>`` per layer: ``id="cut"``, ``id="label"``, ``id="guide"``, each
  stroked in its own colour (``svg.cut_colour``, ``svg.label_colour``,
  ``svg.guide_colour``) with a hairline stroke (``svg.stroke``, default
  0.01 mm); every element carries ``fill="none"`` and its stroke itself too,
  for software that does not read inherited styles.
- Circles are ``<circle>``; a planned circle (with its start point) is two
  half-circle arcs from that start, as in the DXF; a contour with a lead-in is
  one open path from the pierce point in and round.

Same input, same bytes: fixed decimals, elements in the given order.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from html import escape

from sheetgen.kitmodel.part import LAYER_GUIDE, LAYER_LABEL, Mark
from sheetgen.geometry.contour import Contour


@dataclass(frozen=True)
class CutSvgStyle:
    cut_colour: str
    label_colour: str
    guide_colour: str
    stroke_mm: float


def style_from_spec(spec) -> CutSvgStyle:
    s = spec.svg
    return CutSvgStyle(s.cut_colour, s.label_colour, s.guide_colour, s.stroke_mm)


def default_style() -> CutSvgStyle:
    """The style the parameters give when they leave [svg] out (the schema's defaults)."""
    from sheetgen.design.schema import SCHEMA_BY_PATH

    d = {k: SCHEMA_BY_PATH[f"svg.{k}"].default for k in ("cut_colour", "label_colour", "guide_colour", "stroke")}
    return CutSvgStyle(d["cut_colour"], d["label_colour"], d["guide_colour"], float(d["stroke"]))


def _f(v: float) -> str:
    s = f"{v:.4f}".rstrip("0").rstrip(".")
    return "0" if s in ("-0", "") else s


def _pt(p: tuple[float, float]) -> str:
    return f"{_f(p[0])} {_f(p[1])}"


def contour_element(c: Contour, paint: str) -> str:
    """One cut contour as an SVG element in DXF coordinates (y up)."""
    lead_in: tuple[float, float] | None = getattr(c, "lead_in", None)
    if c.circle is not None:
        cx, cy, r = c.circle
        start: tuple[float, float] | None = getattr(c, "start", None)
        if start is None and lead_in is None:
            return f'<circle cx="{_f(cx)}" cy="{_f(cy)}" r="{_f(r)}" {paint}/>'
        if start is None:
            start = (cx + r, cy)
        far = (2 * cx - start[0], 2 * cy - start[1])
        arcs = f"A {_f(r)} {_f(r)} 0 0 1 {_pt(far)} A {_f(r)} {_f(r)} 0 0 1 {_pt(start)}"
        if lead_in is None:
            return f'<path d="M {_pt(start)} {arcs} Z" {paint}/>'
        return f'<path d="M {_pt(lead_in)} L {_pt(start)} {arcs}" {paint}/>'
    pts = list(c.points)
    ring = " L ".join(_pt(p) for p in pts)
    if lead_in is None:
        return f'<path d="M {ring} Z" {paint}/>'
    return f'<path d="M {_pt(lead_in)} L {ring} L {_pt(pts[0])}" {paint}/>'


def _paint(colour: str, stroke_mm: float) -> str:
    return f'fill="none" stroke="{colour}" stroke-width="{_f(stroke_mm)}"'


def mark_element(m: Mark, paint: str) -> str:
    if m.kind == "text":
        (x, y), = m.points
        turn = f" rotate({_f(-m.angle_deg)})" if m.angle_deg else ""
        return (f'<text transform="translate({_f(x)} {_f(y)}) scale(1 -1){turn}" font-size="{_f(m.height_mm)}" '
                f'font-family="sans-serif" text-anchor="middle" dominant-baseline="central" {paint}>'
                f"{escape(m.text)}</text>")
    pts = " ".join(f"{_f(x)},{_f(y)}" for x, y in m.points)
    return f'<polyline points="{pts}" {paint}/>'


def cut_svg(contours: Sequence[Contour], marks: Sequence[Mark], width_mm: float, height_mm: float,
            style: CutSvgStyle, title: str = "") -> str:
    """The cut-ready SVG of one sheet: ``contours`` in cut order, then the marks by layer."""
    flip = f'transform="matrix(1 0 0 -1 0 {_f(height_mm)})"'
    w, h = _f(width_mm), _f(height_mm)
    out = ['<?xml version="1.0" encoding="UTF-8"?>',
           f'<svg xmlns="http://www.w3.org/2000/svg" width="{w}mm" height="{h}mm" viewBox="0 0 {w} {h}">']
    if title:
        out.append(f"<title>{escape(title)}</title>")
    out.append("<desc>Cut-ready sheet: 1 unit = 1 mm, true size. Coordinates as in the DXF (y up); each group "
               "flips them onto the page. Cut contours in cut order, stroke only.</desc>")
    out.append(f'<g id="cut" {flip}>')
    paint = _paint(style.cut_colour, style.stroke_mm)
    out += [contour_element(c, paint) for c in contours]
    out.append("</g>")
    for layer, gid, colour in ((LAYER_LABEL, "label", style.label_colour), (LAYER_GUIDE, "guide", style.guide_colour)):
        paint = _paint(colour, style.stroke_mm)
        out.append(f'<g id="{gid}" {flip}>')
        out += [mark_element(m, paint) for m in marks if m.layer == layer]
        out.append("</g>")
    out.append("</svg>\n")
    return "\n".join(out)
