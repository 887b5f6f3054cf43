"""Reading extra parts from a DXF drawing.

Each closed outer contour, with the closed contours inside it as its holes, is
one part. A contour inside a hole is a part of its own again (a small part
drawn in the window of a large one).

What counts as a contour:

* closed LWPOLYLINE and POLYLINE (2D; arc segments given by bulges are
  followed), CIRCLE, closed ELLIPSE and closed SPLINE;
* chains of LINE, ARC and open polylines whose ends meet (within
  ``JOIN_TOL_MM``) and that come back to where they started;
* blocks (INSERT) are exploded first.

If the drawing has a layer named ``CUT``, only that layer is read (sheetgen's
own files keep labels and guides on other layers); otherwise every layer is.
Text, points, dimensions and hatches are ignored. Curves are followed to
within ``FLATTEN_TOL_MM``. Lengths are converted to mm from the drawing's
``$INSUNITS`` (inches, feet, cm, m; unitless is taken as mm).

Anything unreadable, an open contour, a self-crossing one, or a drawing with
no closed contour raises :class:`~sheetgen.errors.InputFileError` naming the
file (and the ends of the open contour, in the drawing's own units).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from pathlib import Path

import numpy as np
from shapely.geometry import Polygon

from sheetgen.errors import InputFileError

JOIN_TOL_MM = 1e-3
FLATTEN_TOL_MM = 0.01
CUT_LAYER = "CUT"

# $INSUNITS code -> mm per drawing unit (0 = unitless, read as mm)
UNIT_MM = {0: 1.0, 1: 25.4, 2: 304.8, 4: 1.0, 5: 10.0, 6: 1000.0, 8: 0.0000254, 9: 0.0254, 10: 914.4,
           13: 0.001, 14: 100.0}
CURVES = {"LWPOLYLINE", "POLYLINE", "CIRCLE", "ARC", "LINE", "ELLIPSE", "SPLINE"}


@dataclass(frozen=True)
class DxfPart:
    """One part read from a drawing: its outline with holes (mm, as drawn) and
    its round holes as (cx, cy, r) so that writers can keep them true circles."""

    name: str
    polygon: Polygon
    circles: tuple[tuple[float, float, float], ...] = ()


@dataclass(frozen=True)
class _Ring:
    points: np.ndarray              # (n, 2), not closed
    circle: tuple[float, float, float] | None
    polygon: Polygon


def _fmt(x: float) -> str:
    return f"{x:.3f}".rstrip("0").rstrip(".")


def _entities(msp, only_cut: bool):
    for e in msp:
        kind = e.dxftype()
        if kind == "INSERT":
            for sub in e.virtual_entities():
                if sub.dxftype() in CURVES and (not only_cut or sub.dxf.layer.upper() == CUT_LAYER
                                                 or e.dxf.layer.upper() == CUT_LAYER):
                    yield sub
            continue
        if kind in CURVES and (not only_cut or e.dxf.layer.upper() == CUT_LAYER):
            yield e


def _is_closed(e) -> bool:
    kind = e.dxftype()
    if kind == "CIRCLE":
        return True
    if kind == "LWPOLYLINE":
        return bool(e.closed)
    if kind == "POLYLINE":
        return bool(e.is_closed)
    if kind == "ELLIPSE":
        span = (e.dxf.end_param - e.dxf.start_param) % (2 * math.pi)
        return span < 1e-9 or abs(span - 2 * math.pi) < 1e-9
    if kind == "SPLINE":
        return bool(e.closed)
    return False


def _points(e) -> np.ndarray:
    from ezdxf import path as dxfpath

    p = dxfpath.make_path(e)
    pts = np.array([(v.x, v.y) for v in p.flattening(FLATTEN_TOL_MM)], dtype=float)
    return pts


def read_dxf_parts(path: str | Path) -> list[DxfPart]:
    """The parts drawn in ``path`` (see the module doc), in mm."""
    import ezdxf

    path = Path(path)
    try:
        doc = ezdxf.readfile(str(path))
    except (OSError, ezdxf.DXFError, UnicodeDecodeError, ValueError) as exc:
        raise InputFileError(f"{path}: cannot read as a DXF drawing ({exc.__class__.__name__}: {exc})") from None
    try:
        unit = UNIT_MM.get(int(doc.header.get("$INSUNITS", 0)), 1.0)
        msp = doc.modelspace()
        only_cut = any(layer.dxf.name.upper() == CUT_LAYER for layer in doc.layers)
        closed: list[_Ring] = []
        pieces: list[tuple[np.ndarray, str]] = []
        for e in _entities(msp, only_cut):
            pts = _points(e) * unit
            if len(pts) < 2:
                continue
            if e.dxftype() == "CIRCLE":
                c, r = e.dxf.center, e.dxf.radius
                if r <= 0:
                    continue
                circle = (float(c[0]) * unit, float(c[1]) * unit, float(r) * unit)
                closed.append(_ring(pts, circle, path))
            elif _is_closed(e):
                closed.append(_ring(pts, None, path))
            else:
                pieces.append((pts, e.dxf.layer))
    except InputFileError:
        raise
    except Exception as exc:  # noqa: BLE001 - malformed entities inside a parsable file
        raise InputFileError(f"{path}: cannot read the drawing's contours ({exc.__class__.__name__}: {exc})") from None
    closed.extend(_join(pieces, path, unit))
    if not closed:
        raise InputFileError(f"{path}: no closed contour found (parts must be drawn as closed outlines"
                             f"{' on layer CUT' if only_cut else ''})")
    return _assemble(closed, path)


def _ring(pts: np.ndarray, circle, path: Path) -> _Ring:
    if len(pts) > 1 and np.allclose(pts[0], pts[-1], atol=JOIN_TOL_MM, rtol=0):
        pts = pts[:-1]
    if len(pts) < 3:
        raise InputFileError(f"{path}: degenerate contour at ({_fmt(pts[0][0])}, {_fmt(pts[0][1])}) "
                             f"with fewer than 3 points")
    poly = Polygon(pts)
    if not poly.is_valid or poly.area <= 0:
        x, y = pts[0]
        raise InputFileError(f"{path}: contour at ({_fmt(x)}, {_fmt(y)}) crosses itself or has no area")
    return _Ring(pts, circle, poly)


def _join(pieces: list[tuple[np.ndarray, str]], path: Path, unit: float = 1.0) -> list[_Ring]:
    """Closed rings from open pieces whose ends meet (an error names the open
    contour's ends in the drawing's own units)."""
    rings: list[_Ring] = []
    unused = list(range(len(pieces)))
    while unused:
        k = unused.pop(0)
        chain = [pieces[k][0]]
        layer = pieces[k][1]
        start = chain[0][0]
        while True:
            end = chain[-1][-1]
            if len(chain) > 1 or len(chain[0]) > 2:
                if np.hypot(*(end - start)) <= JOIN_TOL_MM:
                    break
            nxt = None
            for j in unused:
                pts = pieces[j][0]
                if np.hypot(*(pts[0] - end)) <= JOIN_TOL_MM:
                    nxt = pts
                elif np.hypot(*(pts[-1] - end)) <= JOIN_TOL_MM:
                    nxt = pts[::-1]
                if nxt is not None:
                    unused.remove(j)
                    break
            if nxt is None:
                raise InputFileError(f"{path}: open contour from ({_fmt(start[0] / unit)}, "
                                     f"{_fmt(start[1] / unit)}) to ({_fmt(end[0] / unit)}, {_fmt(end[1] / unit)}) "
                                     f"on layer {layer!r}: every outline must be closed")
            chain.append(nxt[1:])
        rings.append(_ring(np.concatenate(chain), None, path))
    return rings


def _assemble(rings: list[_Ring], path: Path) -> list[DxfPart]:
    """Outer contours with their holes; a contour at even depth is an outline."""
    order = sorted(range(len(rings)), key=lambda i: -rings[i].polygon.area)
    parent: dict[int, int | None] = {}
    depth: dict[int, int] = {}
    for pos, i in enumerate(order):
        rep = rings[i].polygon.representative_point()
        par = None
        for j in reversed(order[:pos]):  # smallest enclosing ring first
            if rings[j].polygon.contains(rep) and rings[j].polygon.contains(rings[i].polygon):
                par = j
                break
        parent[i] = par
        depth[i] = 0 if par is None else depth[par] + 1
    outers = [i for i in order if depth[i] % 2 == 0]
    parts = []
    for i in outers:
        holes = [j for j in order if parent[j] == i]
        poly = Polygon(rings[i].points, [rings[j].points for j in holes])
        if not poly.is_valid:
            x, y = rings[i].points[0]
            raise InputFileError(f"{path}: the holes of the outline at ({_fmt(x)}, {_fmt(y)}) touch it or "
                                 f"each other")
        circles = tuple(rings[j].circle for j in holes if rings[j].circle is not None)
        parts.append((poly, circles))
    parts.sort(key=lambda pc: (round(pc[0].bounds[1], 6), round(pc[0].bounds[0], 6)))
    stem = path.stem
    if len(parts) == 1:
        return [DxfPart(stem, parts[0][0], parts[0][1])]
    return [DxfPart(f"{stem}-{k + 1}", poly, circles) for k, (poly, circles) in enumerate(parts)]
