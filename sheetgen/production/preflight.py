"""Preflight: check a cut file before it goes to the laser.

Reads any DXF (R12 to current) and names every fault with its position in mm:

``open-contour``  a path that does not close: each loose end (gaps up to
                  ``JOIN_TOL_MM`` count as joined).
``branch``        three or more path ends meet at one point.
``self-crossing`` a closed contour that crosses or touches itself.
``overlap``       two closed contours that cross or touch (overlapping or touching
                  parts, a hole touching its outline, shared edges); a lead-in
                  that meets another contour, crosses its own or starts on the
                  part's side of it.
``off-sheet``     a contour outside the sheet (0, 0)-(W, H), with ``--sheet``.
``duplicate``     the same segment, arc or circle drawn twice, or straight segments
                  that lie on each other (the laser would cut there twice).
``zero-length``   a segment, arc or circle of no length, or a closed contour of no
                  area (a pierce that cuts nothing).
``narrow``        with ``--kerf``: two contours closer than twice the kerf; material
                  narrower than twice the kerf within a contour (thin tabs, short
                  bridges, sharp spikes); a gap narrower than the kerf itself
                  within a contour (a slot or notch the beam cannot cut as drawn).
``no-units``      the file does not say its units ($INSUNITS absent or unitless).
``nothing-to-cut`` no closed contour on the checked layers (a file of text only,
                  or only open paths): nothing would be cut.
``encoding``      the file starts with a byte-order mark or is UTF-16: DXF is
                  8-bit text and some laser software rejects such a file (it is
                  still read and checked).

The narrow rule. Cut contours are the beam's centre line. Rule of thumb (common
practice): keep every web of material and every strip between two cuts at
least twice the kerf wide between centre lines; what is thinner burns away,
chars, warps, or comes loose and tips up into the head. Between two contours
this is their distance. Within one contour each side is checked by a
morphological opening with a disk: on the material side (inside an outer
contour, outside a hole; which is which comes from containment, as in the cut
plan) of radius = kerf, so material narrower than 2 x kerf is found; on the
waste side (inside a hole, a notch into an outline) of radius = kerf / 2, so a
gap narrower than the beam itself is found. What the disk cannot reach is
reported when it reaches further than a 30 degree corner would
(``SPIKE_ANGLE_DEG``; sharper spikes are reported too) or when it splits the
region (a bridge).

Units. $INSUNITS is the DXF header variable for drawing units (R2000 and later;
absent or 0 means unitless) and is a fault here: a file that does not say its
units can be cut at the wrong scale. R12 files cannot carry it: they are read as
millimetres with a note, not a fault (old laser software wants R12). Files in
other units are converted to mm and the positions are given in mm.

Layers. With ``layer`` given only that layer is checked; otherwise the layer
``CUT`` when it has geometry, else every layer. Text and other non-path entities
are not cut geometry and are skipped with a note; a file with no closed contour
on the checked layers has nothing to cut, which is a fault.

Reading is the one DXF reader, :mod:`sheetgen.io.dxf_read` (the same reader
``nest --extra`` uses: one join tolerance, one unit table, one cut-layer rule);
``check`` is pure.

Bounded work. The reader refuses files over ``MAX_FILE_BYTES`` or
``MAX_ENTITIES`` entities (exit code 2). The checks are vectorised (shapely 2
array functions over all contours at once, STRtree for pairs) so that 100,000
entities are checked in seconds (tests/bench/bench_preflight.py measures it).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np

from sheetgen.errors import ParameterError
from sheetgen.geometry.cutpaths import JOIN_TOL_MM, ZERO_TOL_MM, CutGeometry, closed_rings, drop_repeats

DUP_TOL_MM = 0.001  # segments this close are the same segment
SPIKE_ANGLE_DEG = 30.0
KINDS = ("encoding", "no-units", "nothing-to-cut", "open-contour", "branch", "zero-length", "duplicate",
         "self-crossing", "overlap", "off-sheet", "narrow")


@dataclass(frozen=True)
class Fault:
    kind: str
    message: str
    x_mm: float | None = None
    y_mm: float | None = None

    def line(self) -> str:
        where = "file header" if self.x_mm is None else f"({self.x_mm:.3f}, {self.y_mm:.3f})"
        return f"{self.kind} at {where}: {self.message}"



@dataclass(frozen=True)
class PreflightReport:
    faults: tuple[Fault, ...]
    notes: tuple[str, ...]
    contours: int
    layers: tuple[str, ...]
    units: str

    @property
    def clean(self) -> bool:
        return not self.faults


# ---------------------------------------------------------------------------


# ---------------------------------------------------------------------------
# the checks (pure)


def _unit_faults(geo: CutGeometry) -> tuple[list[Fault], list[str]]:
    if geo.units_state == "r12":
        return [], ["R12 file: the format has no units field; lengths are read as mm"]
    if geo.units_state == "missing":
        return [Fault("no-units", "$INSUNITS is missing: the file does not say its units; lengths are read as mm")], []
    if geo.units_state == "unitless":
        return [Fault("no-units", "$INSUNITS = 0 (unitless): the file does not say its units; "
                                  "lengths are read as mm")], []
    if geo.units_state == "unknown":
        return [Fault("no-units", f"$INSUNITS = {geo.units_code} is no known unit; lengths are read as mm")], []
    return [], ([] if geo.units == "mm" else [f"file units: {geo.units}; positions are given in mm"])


def _zero_length_faults(geo: CutGeometry) -> list[Fault]:
    faults = []
    for index, p in geo.zero_entities:
        faults.append(Fault("zero-length", f"{geo.entity_names[index]} has radius 0", *p))
    lines = [s for s in geo.segments if s.kind == "line"]
    if lines:
        a = np.array([s.points for s in lines], dtype=float)  # (n, 2, 2)
        short = np.hypot(*(a[:, 1] - a[:, 0]).T) < ZERO_TOL_MM
        for k in np.nonzero(short)[0].tolist():
            s = lines[k]
            faults.append(Fault("zero-length", f"segment of length 0 in {geo.entity_names[s.entity]}", *s.points[0]))
    for s in geo.segments:
        if s.kind == "line":
            continue
        pts = np.asarray(s.points)
        if np.max(np.hypot(*(pts - pts[0]).T)) < ZERO_TOL_MM:
            faults.append(Fault("zero-length", f"curve of length 0 in {geo.entity_names[s.entity]}", *s.points[0]))
    return faults


def _duplicate_faults(geo: CutGeometry) -> list[Fault]:
    import shapely

    faults = []
    seen_pairs: set[tuple[int, int]] = set()

    def report(e1: int, e2: int, where, what: str) -> None:
        key = (min(e1, e2), max(e1, e2))
        if key in seen_pairs:
            return
        seen_pairs.add(key)
        if e1 == e2:
            msg = f"{what} drawn twice within {geo.entity_names[e1]}"
        else:
            msg = f"{what} drawn twice: {geo.entity_names[key[0]]} and {geo.entity_names[key[1]]}"
        faults.append(Fault("duplicate", msg, *where))

    # circles: the same centre and radius
    seen_circles: dict[tuple[int, int, int], int] = {}
    for index, cx, cy, r in geo.circles:
        key = (round(cx / DUP_TOL_MM), round(cy / DUP_TOL_MM), round(r / DUP_TOL_MM))
        if key in seen_circles:
            report(seen_circles[key], index, (cx + r, cy), "circle")
        else:
            seen_circles[key] = index
    # curves (arcs, ellipses, splines): the same control points, either direction
    curves: dict[tuple, int] = {}
    for s in geo.segments:
        if s.kind != "curve":
            continue
        pts = [(round(x / DUP_TOL_MM), round(y / DUP_TOL_MM)) for x, y in s.points]
        curve_key = min(tuple(pts), tuple(reversed(pts)))
        if len(set(curve_key)) == 1:
            continue  # no length: a zero-length fault
        if curve_key in curves:
            report(curves[curve_key], s.entity, s.points[0], "arc or curve")
        else:
            curves[curve_key] = s.entity
    # straight segments lying on each other, partly or wholly
    lines = [s for s in geo.segments if s.kind == "line" and math.dist(*s.points) >= ZERO_TOL_MM]
    if len(lines) > 1:
        geoms = shapely.linestrings([s.points for s in lines])
        tree = shapely.STRtree(geoms)
        left, right = tree.query(geoms, predicate="dwithin", distance=DUP_TOL_MM)
        keep = left < right
        left, right = left[keep], right[keep]
        seg = np.array([s.points for s in lines], dtype=float)  # (n, 2, 2)
        p0, p1 = seg[left, 0], seg[left, 1]
        q0, q1 = seg[right, 0], seg[right, 1]
        d = p1 - p0
        length = np.hypot(d[:, 0], d[:, 1])
        u = d / length[:, None]
        normal = np.stack([-u[:, 1], u[:, 0]], axis=1)
        off0 = np.abs(np.sum((q0 - p0) * normal, axis=1))
        off1 = np.abs(np.sum((q1 - p0) * normal, axis=1))
        t0 = np.sum((q0 - p0) * u, axis=1)
        t1 = np.sum((q1 - p0) * u, axis=1)
        lo = np.maximum(0.0, np.minimum(t0, t1))
        hi = np.minimum(length, np.maximum(t0, t1))
        on = (off0 <= DUP_TOL_MM) & (off1 <= DUP_TOL_MM) & (hi - lo > DUP_TOL_MM)
        for k in np.nonzero(on)[0].tolist():
            mid = p0[k] + u[k] * (lo[k] + hi[k]) / 2
            report(lines[left[k]].entity, lines[right[k]].entity, (float(mid[0]), float(mid[1])),
                   f"segment ({hi[k] - lo[k]:.3f} mm)")
    return faults



_LOCATION = re.compile(r"\[\s*([-+0-9.eE]+)\s+([-+0-9.eE]+)")


def check(geo: CutGeometry, sheet_mm: tuple[float, float] | None = None,
          kerf_mm: float | None = None) -> PreflightReport:
    """All the checks on read geometry. Faults are sorted by kind, then position."""
    import shapely

    faults: list[Fault] = [Fault("encoding", issue) for issue in geo.encoding_issues]
    unit_faults, unit_notes = _unit_faults(geo)
    faults += unit_faults
    notes = list(unit_notes) + list(geo.notes)
    faults += _zero_length_faults(geo)
    faults += _duplicate_faults(geo)
    joined = closed_rings(geo)
    faults += [Fault("open-contour", "loose end: the path does not close", *p) for p in joined.loose_ends]
    faults += [Fault("branch", f"{deg} path ends meet here", *p) for p, deg in joined.branches]

    # every ring at once: drop repeated points, build, test validity and area in one go
    circle_of = {i: r for i, _x, _y, r in geo.circles}
    cleaned = [pts[:-1] if src in circle_of else drop_repeats(np.asarray(pts, dtype=float))
               for pts, src in zip(joined.rings, joined.sources)]
    usable = [k for k, pts in enumerate(cleaned) if len(pts) >= 3]
    for k, pts in enumerate(cleaned):
        if len(pts) < 3 and len(pts):
            faults.append(Fault("zero-length", "closed contour of no area", *pts[0]))
    all_rings: np.ndarray
    all_polys: np.ndarray
    valid: np.ndarray
    areas: np.ndarray
    if usable:  # array in, array out (np.asarray only tells the type checker)
        counts = np.array([len(cleaned[k]) for k in usable])
        coords = np.concatenate([cleaned[k] for k in usable])
        all_rings = np.asarray(shapely.linearrings(coords, indices=np.repeat(np.arange(len(usable)), counts)))
        all_polys = np.asarray(shapely.polygons(all_rings))
        valid = np.asarray(shapely.is_valid(all_polys))
        areas = np.asarray(shapely.area(all_polys))
    else:
        all_rings = all_polys = np.zeros(0, dtype=object)
        valid = areas = np.zeros(0)
    keep: list[int] = []
    for pos, k in enumerate(usable):
        pts, poly = cleaned[k], all_polys[pos]
        if not valid[pos] and shapely.length(poly) > ZERO_TOL_MM:
            reason = shapely.is_valid_reason(poly)
            m = _LOCATION.search(reason)
            where = (float(m.group(1)), float(m.group(2))) if m else tuple(pts[0])
            if not (areas[pos] < ZERO_TOL_MM ** 2 and _is_flat(pts)):
                faults.append(Fault("self-crossing", f"closed contour crosses or touches itself "
                                                     f"({reason.split('[')[0]})", *where))
                continue
        if areas[pos] < ZERO_TOL_MM ** 2:
            faults.append(Fault("zero-length", "closed contour of no area", *pts[0]))
            continue
        keep.append(pos)
    polys = list(all_polys[keep])
    rings = list(all_rings[keep])
    sources = [joined.sources[usable[pos]] for pos in keep]
    if not rings and not any(f.kind == "self-crossing" for f in faults):
        layers = f"layer {', '.join(geo.layers)}" if geo.layers else "any layer"
        faults.append(Fault("nothing-to-cut", f"no closed contour on {layers}: the file has nothing to cut"))
    if sheet_mm is not None:
        faults += _off_sheet_faults(geo, sheet_mm)
    if rings:
        faults += _overlap_faults(polys, rings)
        faults += _lead_in_faults(geo, polys, rings, sources)
    if kerf_mm is not None and rings:
        radii = [circle_of.get(src) for src in sources]
        faults += _narrow_faults(polys, rings, kerf_mm, radii)
    elif kerf_mm is None:
        notes.append("no --kerf: narrow features not checked")

    order = {k: i for i, k in enumerate(KINDS)}
    faults.sort(key=lambda f: (order.get(f.kind, len(KINDS)), f.x_mm is not None,
                               round(f.y_mm or 0.0, 6), round(f.x_mm or 0.0, 6), f.message))
    return PreflightReport(tuple(faults), tuple(notes), len(rings), geo.layers, geo.units)


def _is_flat(pts) -> bool:
    """All points on one line (a contour that goes out and back)."""
    a = np.asarray(pts, dtype=float)
    a = a - a.mean(axis=0)
    return bool(np.linalg.svd(a, compute_uv=False)[-1] < ZERO_TOL_MM)


def _off_sheet_faults(geo: CutGeometry, sheet_mm) -> list[Fault]:
    w, h = sheet_mm
    tol = 1e-6
    pieces = [(i, np.concatenate([p, geo.leads[i]]) if i < len(geo.leads) and len(geo.leads[i]) else p)
              for i, p in enumerate(geo.paths) if len(p)]
    if not pieces:
        return []
    a = np.concatenate([pts for _, pts in pieces])
    starts = np.cumsum([0] + [len(pts) for _, pts in pieces[:-1]])
    over = np.maximum.reduce([-a[:, 0], a[:, 0] - w, -a[:, 1], a[:, 1] - h])
    worst = np.maximum.reduceat(over, starts)
    faults = []
    for n in np.nonzero(worst > tol)[0].tolist():
        i, pts = pieces[n]
        seg = over[starts[n]:starts[n] + len(pts)]
        k = int(np.argmax(seg))
        faults.append(Fault("off-sheet", f"{geo.entity_names[i]} reaches {seg[k]:.3f} mm past the sheet "
                                         f"(0, 0)-({w:g}, {h:g})", float(pts[k, 0]), float(pts[k, 1])))
    return faults


def _lead_in_faults(geo: CutGeometry, polys, rings, sources) -> list[Fault]:
    """A lead-in starts on the waste side of its contour (outside an outer
    contour, inside a hole) and meets no contour but its own, where it joins it."""
    import shapely
    from shapely.geometry import LineString, Point

    from sheetgen.production.cutplan import enclosure_pairs

    if not any(len(lead) >= 2 for lead in geo.leads):
        return []
    depth = [0] * len(polys)
    for _, inner in enclosure_pairs(polys):
        depth[inner] += 1
    own = {src: j for j, src in enumerate(sources) if src >= 0}
    faults = []
    tree = shapely.STRtree(rings)
    for i, lead_xy in enumerate(geo.leads):
        if len(lead_xy) < 2 or i not in own:
            continue
        line = LineString(lead_xy)
        lead = [tuple(p) for p in lead_xy]
        name = geo.entity_names[i]
        j_own = own[i]
        if polys[j_own].contains(Point(lead[0])) == (depth[j_own] % 2 == 0):
            faults.append(Fault("overlap", f"the lead-in of {name} starts on the part's side of its contour "
                                           f"(it would cut into the part)", *lead[0]))
        for j in tree.query(line, predicate="intersects").tolist():
            meet = line.intersection(rings[j])
            if j == j_own:
                if meet.geom_type == "Point" and math.dist((meet.x, meet.y), lead[-1]) <= JOIN_TOL_MM:
                    continue
                what = f"the lead-in of {name} crosses its own contour"
                where = line.intersection(rings[j]).difference(Point(lead[-1]).buffer(JOIN_TOL_MM))
                where = where if not where.is_empty else meet
            else:
                what = f"the lead-in of {name} meets another contour"
                where = meet
            p = where.representative_point()
            faults.append(Fault("overlap", what, p.x, p.y))
    return faults


def _overlap_faults(polys, rings) -> list[Fault]:
    import shapely

    faults = []
    tree = shapely.STRtree(rings)
    left, right = tree.query(rings, predicate="intersects")
    for i, j in zip(left.tolist(), right.tolist()):
        if i >= j:
            continue
        where = rings[i].intersection(rings[j]).representative_point()
        a, b = polys[i], polys[j]
        if a.symmetric_difference(b).area < 1e-6:
            continue  # the same contour twice: a duplicate fault
        shared = a.intersection(b).area
        if shared > 1e-9 and not (a.within(b) or b.within(a)):
            what = f"two contours overlap ({shared:.3f} mm2 in common)"
        else:
            what = "two contours touch"
        faults.append(Fault("overlap", what, where.x, where.y))
    return faults



def _narrow_faults(polys, rings, kerf_mm: float, radii=None) -> list[Fault]:
    """Narrow features (module doc). ``radii``: per contour the radius when it is
    a true circle (a disk's narrowest part is its diameter; outside a disk
    nothing is narrow), else None."""
    import shapely

    limit = 2.0 * kerf_mm
    faults = []
    ring_arr = np.asarray(rings, dtype=object)
    tree = shapely.STRtree(ring_arr)
    left, right = tree.query(ring_arr, predicate="dwithin", distance=limit)
    for i, j in zip(left.tolist(), right.tolist()):
        if i >= j:
            continue
        d = rings[i].distance(rings[j])
        if 0 < d < limit:
            line = shapely.shortest_line(rings[i], rings[j])
            (x0, y0), (x1, y1) = line.coords
            faults.append(Fault("narrow", f"{d:.3f} mm between two contours, under 2 x kerf = {limit:.3f} mm",
                                (x0 + x1) / 2, (y0 + y1) / 2))
    from sheetgen.production.cutplan import enclosure_pairs

    depth = [0] * len(polys)
    for _, inner in enclosure_pairs(polys):
        depth[inner] += 1
    radii = radii or [None] * len(polys)
    material_msg = f"material narrower than 2 x kerf = {limit:.3f} mm"
    waste_msg = f"gap narrower than the kerf ({kerf_mm:.3f} mm): the beam cannot cut it as drawn"
    general, sides = [], []
    for poly, d, r in zip(polys, depth, radii):
        inside_is_material = d % 2 == 0
        if r is not None:
            # a true circle: inside, the narrowest width is the diameter; outside nothing is narrow
            need = kerf_mm if inside_is_material else kerf_mm / 2
            if r < need:
                c = poly.centroid
                faults.append(Fault("narrow", material_msg if inside_is_material else waste_msg, c.x, c.y))
            continue
        general.append(poly)
        sides.append(inside_is_material)
    regions: np.ndarray = np.zeros(0, dtype=object)
    radius: np.ndarray = np.zeros(0)
    message: list[str] = []
    if general:
        inside = shapely.polygons(shapely.get_exterior_ring(np.asarray(general, dtype=object)))
        frame = shapely.buffer(shapely.envelope(inside), 4 * limit, join_style="mitre")
        outside = shapely.difference(frame, inside)
        material = np.asarray(sides)
        regions = np.concatenate([inside, outside])
        is_mat = np.concatenate([material, ~material])
        radius = np.where(is_mat, kerf_mm, kerf_mm / 2)
        message = [material_msg if m else waste_msg for m in is_mat.tolist()]
    if len(regions):
        for k, where in _thin_parts_all(regions, radius):
            faults.append(Fault("narrow", message[k], *where))
    return faults


def _spike_depth(radius_mm):
    return radius_mm * (1.0 / math.sin(math.radians(SPIKE_ANGLE_DEG / 2)) - 1.0)


def _thin_parts_all(regions: np.ndarray, radii: np.ndarray) -> list[tuple[int, tuple[float, float]]]:
    """``(region index, point)`` for the parts of each region narrower than 2 x its
    radius. All regions are opened at once (shapely array functions); only those
    the opening changes by more than a corner would (Hausdorff distance above the
    spike depth, or split in pieces) get the detailed look of :func:`_thin_parts`."""
    import shapely

    opened = shapely.buffer(shapely.buffer(regions, -radii, quad_segs=16), radii, quad_segs=16)
    reach = shapely.hausdorff_distance(regions, opened)
    pieces = shapely.get_num_geometries(opened)
    empty = shapely.is_empty(opened)
    suspect = empty | (pieces > 1) | ~(reach <= _spike_depth(radii) * 1.01)
    out = []
    for k in np.nonzero(suspect)[0].tolist():
        for where in _thin_parts(regions[k], float(radii[k]), opened[k]):
            out.append((k, where))
    return out


def _thin_parts(region, radius_mm: float, opened=None) -> list[tuple[float, float]]:
    """Points inside the parts of ``region`` narrower than 2 x radius."""
    import shapely

    if opened is None:
        opened = region.buffer(-radius_mm, quad_segs=16).buffer(radius_mm, quad_segs=16)
    lost = region.difference(opened)
    if lost.is_empty:
        return []
    pieces = [g for g in getattr(lost, "geoms", [lost]) if g.geom_type == "Polygon" and g.area > 1e-9]
    comps = [g for g in getattr(opened, "geoms", [opened]) if not g.is_empty]
    spike = _spike_depth(radius_mm)
    out = []
    for piece in pieces:
        if opened.is_empty:
            depth = math.inf
        else:
            coords = shapely.get_coordinates(piece)
            depth = float(np.max(shapely.distance(shapely.points(coords), opened)))
        touching = sum(1 for c in comps if piece.distance(c) < 1e-6)
        if depth > spike * 1.01 or touching >= 2:
            p = piece.representative_point()
            out.append((p.x, p.y))
    return out
