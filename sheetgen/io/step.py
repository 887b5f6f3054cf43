"""Writing the 3D model: the assembly as STEP, and a picture of it as SVG.

STEP (ISO 10303-21) files carry a time stamp in their header (FILE_NAME). It
is written here as a fixed value, ``STEP_TIME_STAMP``, and the ids of the
assembly links, which OpenCascade draws from a counter that runs on through
the process, are renumbered in file order (:func:`normalise_step`), so the
same parameters give the same bytes; the rest of the file is OpenCascade's,
which numbers its entities in a fixed order. The header names the file,
sheetgen as the originating system and the OpenCascade version that wrote
it. Parametric curves on faces are left out (optional in STEP; they would
triple the file for the many flat faces of the gear teeth).

The picture is our own drawing, not a rendering: each prism of the model is
projected along one isometric direction, its silhouette filled in a darker
shade and the face turned to the viewer in a lighter one, and the prisms are
painted back to front (where two silhouettes overlap, the one the sight line
enters first goes on top; parts that interlock, such as a tab in its slot,
fall back on the depth of their centres). It shows how the kit goes together;
it is not a measured drawing. cadquery is imported only by
:func:`write_step`.
"""

from __future__ import annotations

import re
from html import escape
from pathlib import Path

import numpy as np
import shapely
from shapely.geometry import Polygon

from sheetgen.version import __version__

STEP_TIME_STAMP = "2000-01-01T00:00:00"
_FILE_NAME = re.compile(r"FILE_NAME\(.*?\);\s*\n", re.S)
_FILE_DESCRIPTION = re.compile(r"FILE_DESCRIPTION\(.*?\);\s*\n", re.S)
_NAUO = re.compile(r"NEXT_ASSEMBLY_USAGE_OCCURRENCE\('[^']*'(.*?)\);", re.S)
_OCC_VERSION = re.compile(r"Open CASCADE \d+(\.\d+)*")

# seen from +x, -y, +z: the drive end, one long side and the panel's face
VIEW_FROM = np.array([1.0, -1.0, 1.0]) / np.sqrt(3.0)

COLOURS = {  # (silhouette, face toward the viewer)
    "fixed": ("#7f6a4d", "#ab916c"),
    "rotating": ("#c2a67a", "#efdcb8"),
    "panel": ("#1f3550", "#35557d"),
    "axle": ("#7d848c", "#b4bac0"),
    "motor": ("#4a5057", "#737a82"),
}
STROKE = "#3b3125"


def _step_string(text: str) -> str:
    return text.replace("'", "''")


def normalise_step(text: str, file_name: str) -> str:
    """The STEP text made repeatable: a fixed time stamp and our own header
    strings, and the assembly links (NEXT_ASSEMBLY_USAGE_OCCURRENCE), whose
    ids OpenCascade draws from a counter that runs on through the process,
    numbered 1, 2, 3... in file order."""
    m = _FILE_NAME.search(text)
    if m is None:
        raise ValueError("STEP text has no FILE_NAME header entry")
    occ = _OCC_VERSION.search(m.group(0))
    system = occ.group(0) if occ else "Open CASCADE"
    name = (f"FILE_NAME('{_step_string(file_name)}','{STEP_TIME_STAMP}',('sheetgen'),(''),"
            f"'sheetgen {__version__}','{_step_string(system)}','');\n")
    desc = "FILE_DESCRIPTION(('sheetgen kit assembly, nominal geometry, millimetres'),'2;1');\n"
    text = text[:m.start()] + name + text[m.end():]
    text = _FILE_DESCRIPTION.sub(lambda _: desc, text, count=1)
    counter = iter(range(1, 1 << 30))

    def renumber(m: re.Match) -> str:
        # one line, so that the writer's line breaks do not depend on the id's length
        rest = re.sub(r"\n\s*", "", m.group(1))
        return f"NEXT_ASSEMBLY_USAGE_OCCURRENCE('{next(counter)}'{rest});"

    return _NAUO.sub(renumber, text)


def write_step(assembly, path: str | Path) -> Path:
    """Write a cadquery Assembly to ``path`` (STEP AP214, millimetres), one
    named product per solid, with a fixed header."""
    path = Path(path)
    assembly.export(str(path), exportType="STEP", write_pcurves=False)
    text = path.read_text(encoding="latin-1")
    path.write_text(normalise_step(text, path.name), encoding="latin-1")
    return path


# ---------------------------------------------------------------------------
# picture


def _screen_basis(view_from: np.ndarray):
    e = view_from / np.linalg.norm(view_from)
    right = np.cross([0.0, 0.0, 1.0], e)
    right /= np.linalg.norm(right)
    up = np.cross(e, right)
    return e, right, up


def _project(pts: np.ndarray, right: np.ndarray, up: np.ndarray) -> np.ndarray:
    return np.column_stack([pts @ right, -(pts @ up)])


def _ring3(coords, prism, z: float) -> np.ndarray:
    xy = np.asarray(coords, dtype=float)[:-1]
    return prism.placement.apply(np.column_stack([xy, np.full(len(xy), z)]))


def _prism_drawing(prism, e, right, up):
    """(silhouette, visible face or None, depth) of one prism on the screen."""
    rings = [prism.outline.exterior, *prism.outline.interiors]
    caps = []
    quads = []
    for z in (0.0, prism.depth_mm):
        ext = _project(_ring3(rings[0].coords, prism, z), right, up)
        holes = [_project(_ring3(r.coords, prism, z), right, up) for r in rings[1:]]
        caps.append(Polygon(ext, holes))
    for ring in rings:
        lo = _project(_ring3(ring.coords, prism, 0.0), right, up)
        hi = _project(_ring3(ring.coords, prism, prism.depth_mm), right, up)
        nxt = np.roll(np.arange(len(lo)), -1)
        for i, j in zip(range(len(lo)), nxt):
            q = Polygon([lo[i], lo[j], hi[j], hi[i]])
            if q.is_valid and q.area > 1e-9:
                quads.append(q)
    parts = [c.buffer(0) for c in caps if c.area > 1e-9] + quads
    silhouette = shapely.union_all(parts) if parts else Polygon()
    facing = float(prism.axis @ e)
    face = None
    if abs(facing) > 1e-6:
        face = caps[1] if facing > 0 else caps[0]
        face = face.buffer(0)
    centre = prism.corners().mean(axis=0)
    return silhouette, face, float(centre @ e)


def _entry_depth(prism, screen_xy, e, right, up) -> float | None:
    """How far toward the viewer the prism reaches along the sight line through
    a screen point (the depth where the line enters it), or None if it misses."""
    p0 = screen_xy[0] * right - screen_xy[1] * up
    r = prism.placement.matrix
    q0 = r.T @ (p0 - np.asarray(prism.placement.translation_mm))
    v = r.T @ e
    big = 1e6
    if abs(v[2]) > 1e-12:
        t1, t2 = sorted(((0.0 - q0[2]) / v[2], (prism.depth_mm - q0[2]) / v[2]))
    elif 0.0 <= q0[2] <= prism.depth_mm:
        t1, t2 = -big, big
    else:
        return None
    vxy = v[:2]
    n2 = float(vxy @ vxy)
    if n2 < 1e-18:
        return t2 if prism.outline.covers(shapely.Point(q0[0], q0[1])) else None
    a, b = q0[:2] + t1 * vxy, q0[:2] + t2 * vxy
    hit = prism.outline.intersection(shapely.LineString([a, b]))
    if hit.is_empty:
        return None
    pts = shapely.get_coordinates(hit)
    return float(np.max((pts - q0[:2]) @ vxy / n2))


def _paint_order(items, e, right, up) -> list[int]:
    """Back to front: where two silhouettes overlap, the one the sight line
    enters first is in front; the rest (and cycles) by the centres' depth."""
    n = len(items)
    behind: dict[int, set[int]] = {i: set() for i in range(n)}  # i -> the items drawn before i
    sils = [it[4] for it in items]
    tree = shapely.STRtree(sils)
    for i in range(n):
        for j in tree.query(sils[i]):
            j = int(j)
            if j <= i:
                continue
            common = sils[i].intersection(sils[j])
            if common.area < 1e-6:
                continue
            pt = common.representative_point()
            di = _entry_depth(items[i][3], (pt.x, pt.y), e, right, up)
            dj = _entry_depth(items[j][3], (pt.x, pt.y), e, right, up)
            if di is None or dj is None or abs(di - dj) < 1e-9:
                continue
            if di > dj:
                behind[i].add(j)
            else:
                behind[j].add(i)
    order: list[int] = []
    done: set[int] = set()
    rank = sorted(range(n), key=lambda i: (round(items[i][0], 6), items[i][1], items[i][2]))
    while len(order) < n:
        ready = [i for i in rank if i not in done and behind[i] <= done]
        pick = ready[0] if ready else next(i for i in rank if i not in done)  # a cycle: by depth
        order.append(pick)
        done.add(pick)
    return order


def _path(geom) -> str:
    polys = [geom] if isinstance(geom, Polygon) else list(getattr(geom, "geoms", []))
    out = []
    for p in polys:
        if not isinstance(p, Polygon) or p.is_empty:
            continue
        for ring in [p.exterior, *p.interiors]:
            pts = np.asarray(ring.coords)[:-1]
            out.append("M" + " L".join(f"{x:.2f} {y:.2f}" for x, y in pts) + " Z")
    return " ".join(out)


def _palette(body) -> tuple[str, str]:
    if body.kind == "component" and body.name in COLOURS:
        return COLOURS[body.name]
    return COLOURS["rotating" if body.rotating else "fixed"]


def assembly_svg(bodies, title: str, view_from: np.ndarray = VIEW_FROM) -> str:
    """An isometric picture of the model's bodies (see the module notes)."""
    e, right, up = _screen_basis(np.asarray(view_from, dtype=float))
    items = []
    for order, b in enumerate(bodies):
        for k, prism in enumerate(b.pieces):
            sil, face, depth = _prism_drawing(prism, e, right, up)
            items.append((depth, order, k, prism, sil, face, b))
    items = [items[i] for i in _paint_order(items, e, right, up)]
    allg = shapely.union_all([it[4] for it in items]) if items else Polygon()
    x0, y0, x1, y1 = allg.bounds if not allg.is_empty else (0.0, 0.0, 1.0, 1.0)
    pad = 0.06 * max(x1 - x0, y1 - y0) + 5.0
    head = 14.0
    width, height = (x1 - x0) + 2 * pad, (y1 - y0) + 2 * pad + head
    ox, oy = pad - x0, pad + head - y0
    stroke = max(0.15, 0.0015 * max(width, height))
    lines = [
        '<?xml version="1.0" encoding="UTF-8"?>',
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{width:.1f}mm" height="{height:.1f}mm" '
        f'viewBox="0 0 {width:.2f} {height:.2f}">',
        f'<title>{escape(title)}</title>',
        f'<rect x="0" y="0" width="{width:.2f}" height="{height:.2f}" fill="#fbfaf7"/>',
        f'<text x="{pad:.2f}" y="{pad * 0.5 + 6:.2f}" font-family="sans-serif" font-size="6" fill="#333">'
        f'{escape(title)}</text>',
        f'<text x="{pad:.2f}" y="{pad * 0.5 + 12:.2f}" font-family="sans-serif" font-size="3.5" fill="#555">'
        'nominal assembly at rest, seen from +x, -y, +z; turning frame light, fixed stand dark</text>',
        f'<g transform="translate({ox:.2f} {oy:.2f})" stroke="{STROKE}" stroke-width="{stroke:.2f}" '
        'stroke-linejoin="round" fill-rule="evenodd">',
    ]
    for _, _, k, _, sil, face, b in items:
        dark, light = _palette(b)
        label = escape(b.name if len(b.pieces) == 1 else f"{b.name} ({k + 1})")
        lines.append(f'<g><title>{label}</title>')
        if not sil.is_empty:
            lines.append(f'<path d="{_path(sil)}" fill="{dark}"/>')
        if face is not None and not face.is_empty:
            lines.append(f'<path d="{_path(face)}" fill="{light}"/>')
        lines.append("</g>")
    lines += ["</g>", "</svg>", ""]
    return "\n".join(lines)


def write_svg(bodies, path: str | Path, title: str) -> Path:
    path = Path(path)
    path.write_text(assembly_svg(bodies, title), encoding="utf-8")
    return path

