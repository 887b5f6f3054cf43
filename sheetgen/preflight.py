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
are not cut geometry and are skipped with a note.

``read_cut_file`` does the reading (I/O); ``check`` is pure.
"""

from __future__ import annotations

import math
import re
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from sheetgen.errors import InputFileError, ParameterError

JOIN_TOL_MM = 0.01  # path ends closer than this are joined (our choice)
DUP_TOL_MM = 0.001  # segments this close are the same segment
ZERO_TOL_MM = 1e-4  # shorter than this is no length
FLATTEN_MM = 0.005  # chord error when curves are turned into polylines
SPIKE_ANGLE_DEG = 30.0
CUT_LAYER = "CUT"
PATH_TYPES = ("LINE", "ARC", "CIRCLE", "LWPOLYLINE", "POLYLINE", "ELLIPSE", "SPLINE")
KINDS = ("no-units", "open-contour", "branch", "zero-length", "duplicate", "self-crossing", "overlap",
         "off-sheet", "narrow")


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
class Segment:
    """One drawing primitive, in mm: a straight segment ``("line", p, q)`` or a
    Bezier curve ``("curve", p, c1, [c2,] q)`` as ezdxf's path gives arcs,
    circles, ellipses and splines."""

    kind: str
    points: tuple[tuple[float, float], ...]
    entity: int


@dataclass(frozen=True)
class CutGeometry:
    """What a cut file holds, in mm: per path entity its flattened polyline and
    its primitives. A path that runs in to a point and then round back to it is
    a closed contour with a lead-in: ``paths`` holds the contour, ``leads`` the
    lead-in."""

    paths: tuple[tuple[tuple[float, float], ...], ...]  # flattened, one per entity
    closed: tuple[bool, ...]
    segments: tuple[Segment, ...]
    entity_names: tuple[str, ...]  # e.g. "LWPOLYLINE #3"
    zero_entities: tuple[tuple[int, tuple[float, float]], ...]  # entities of no size, with a point
    units: str
    unit_faults: tuple[Fault, ...]
    notes: tuple[str, ...]
    layers: tuple[str, ...]
    leads: tuple[tuple[tuple[float, float], ...], ...] = ()  # per entity: its lead-in polyline, or ()


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
# reading (I/O edge)


def _units(doc) -> tuple[str, float, list[Fault], list[str]]:
    from ezdxf import units

    if doc.dxfversion <= "AC1009":
        return "mm", 1.0, [], ["R12 file: the format has no units field; lengths are read as mm"]
    if "$INSUNITS" not in doc.header:
        return "mm", 1.0, [Fault("no-units", "$INSUNITS is missing: the file does not say its units; "
                                             "lengths are read as mm")], []
    code = doc.header.get("$INSUNITS", 0)
    if code == 0:
        return "mm", 1.0, [Fault("no-units", "$INSUNITS = 0 (unitless): the file does not say its units; "
                                             "lengths are read as mm")], []
    try:
        factor = units.conversion_factor(code, units.MM)
        name = units.unit_name(code)
    except (TypeError, ValueError, KeyError, IndexError):
        return "mm", 1.0, [Fault("no-units", f"$INSUNITS = {code} is no known unit; lengths are read as mm")], []
    notes = [] if code == units.MM else [f"file units: {name}; positions are given in mm"]
    return "mm" if code == units.MM else name, float(factor), [], notes


def _flat_entities(entities, depth=0):
    """Path entities, with blocks (INSERT) exploded."""
    for e in entities:
        if e.dxftype() == "INSERT" and depth < 8:
            try:
                yield from _flat_entities(e.virtual_entities(), depth + 1)
            except Exception:  # a broken block reference: skipped, noted by the caller
                yield e
        else:
            yield e


def read_cut_file(path: str | Path, layer: str | None = None) -> CutGeometry:
    """Read the cut geometry of a DXF file. Unreadable -> InputFileError."""
    import ezdxf
    from ezdxf import path as ezpath

    path = Path(path)
    if not path.is_file():
        raise InputFileError(f"{path}: no such file")
    try:
        doc = ezdxf.readfile(str(path))
    except (OSError, UnicodeError) as exc:
        reason = getattr(exc, "strerror", None) or "not a DXF file"
        raise InputFileError(f"{path}: cannot be read as a DXF file ({reason})") from None
    except ezdxf.DXFError as exc:
        raise InputFileError(f"{path}: not a readable DXF file ({exc})") from None
    units_name, factor, unit_faults, notes = _units(doc)

    entities = list(_flat_entities(doc.modelspace()))
    on_layer: dict[str, int] = {}
    for e in entities:
        if e.dxftype() in PATH_TYPES:
            name = e.dxf.get("layer", "0")
            on_layer[name] = on_layer.get(name, 0) + 1
    if layer is not None:
        if not any(name.upper() == layer.upper() for name in on_layer):
            have = ", ".join(sorted(on_layer)) or "none"
            raise InputFileError(f"{path}: --layer {layer}: no cut geometry on that layer "
                                 f"(layers with geometry: {have})")
        layers = tuple(sorted(n for n in on_layer if n.upper() == layer.upper()))
    elif any(n.upper() == CUT_LAYER for n in on_layer):
        layers = tuple(sorted(n for n in on_layer if n.upper() == CUT_LAYER))
    else:
        layers = tuple(sorted(on_layer))
    wanted = {n.upper() for n in layers}

    paths, closed, leads, segments, names, zero = [], [], [], [], [], []
    skipped: dict[str, int] = {}

    def pt(v) -> tuple[float, float]:
        return (float(v[0]) * factor, float(v[1]) * factor)

    for e in entities:
        kind = e.dxftype()
        if e.dxf.get("layer", "0").upper() not in wanted:
            continue
        if kind not in PATH_TYPES:
            skipped[kind] = skipped.get(kind, 0) + 1
            continue
        if kind == "POLYLINE" and not e.is_2d_polyline:
            skipped["3D POLYLINE"] = skipped.get("3D POLYLINE", 0) + 1
            continue
        index = len(paths)
        name = f"{kind} #{e.dxf.handle}" if e.dxf.hasattr("handle") else kind
        if kind in ("CIRCLE", "ARC") and e.dxf.radius * factor < ZERO_TOL_MM:
            c = e.ocs().to_wcs(e.dxf.center)
            paths.append(())
            closed.append(False)
            leads.append(())
            names.append(name)
            zero.append((index, pt(c)))
            continue
        try:
            p = ezpath.make_path(e)
        except (TypeError, ValueError, ZeroDivisionError):
            skipped[kind + " (unreadable)"] = skipped.get(kind + " (unreadable)", 0) + 1
            continue
        here = pt(p.start)
        for cmd in p.commands():
            if cmd.type == ezpath.Command.MOVE_TO:
                here = pt(cmd.end)
                continue
            end = pt(cmd.end)
            if cmd.type == ezpath.Command.LINE_TO:
                segments.append(Segment("line", (here, end), index))
            elif cmd.type == ezpath.Command.CURVE3_TO:
                segments.append(Segment("curve", (here, pt(cmd.ctrl), end), index))
            else:
                segments.append(Segment("curve", (here, pt(cmd.ctrl1), pt(cmd.ctrl2), end), index))
            here = end
        flat = [pt(v) for v in p.flattening(FLATTEN_MM / factor)]
        if not flat:
            flat = [pt(p.start)]
        is_closed = len(flat) > 2 and math.dist(flat[0], flat[-1]) <= JOIN_TOL_MM
        lead: tuple = ()
        if not is_closed and len(flat) > 3:
            # a lead-in: the path runs in to a point and then round back to it
            for k in range(1, len(flat) - 3):
                if math.dist(flat[k], flat[-1]) <= JOIN_TOL_MM:
                    lead, flat, is_closed = tuple(flat[:k + 1]), flat[k:], True
                    break
        paths.append(tuple(flat))
        closed.append(is_closed)
        leads.append(lead)
        names.append(name)
    for kind, count in sorted(skipped.items()):
        notes.append(f"{count} {kind} entit{'y' if count == 1 else 'ies'} on the checked layers skipped "
                     f"(not a cut path)")
    return CutGeometry(tuple(paths), tuple(closed), tuple(segments), tuple(names), tuple(zero), units_name,
                       tuple(unit_faults), tuple(notes), layers, tuple(leads))


# ---------------------------------------------------------------------------
# the checks (pure)


def _dedupe(points: Sequence[tuple[float, float]]) -> list[tuple[float, float]]:
    out: list[tuple[float, float]] = []
    for p in points:
        if not out or math.dist(out[-1], p) > ZERO_TOL_MM:
            out.append(p)
    if len(out) > 1 and math.dist(out[0], out[-1]) <= JOIN_TOL_MM:
        out.pop()
    return out


def _zero_length_faults(geo: CutGeometry) -> list[Fault]:
    faults = []
    for index, p in geo.zero_entities:
        faults.append(Fault("zero-length", f"{geo.entity_names[index]} has radius 0", *p))
    for s in geo.segments:
        pts = np.asarray(s.points)
        if np.max(np.hypot(*(pts - pts[0]).T)) < ZERO_TOL_MM:
            what = "segment" if s.kind == "line" else "curve"
            faults.append(Fault("zero-length", f"{what} of length 0 in {geo.entity_names[s.entity]}", *s.points[0]))
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

    # curves (arcs, circles, splines): the same control points, either direction
    curves: dict[tuple, int] = {}
    for s in geo.segments:
        if s.kind != "curve":
            continue
        pts = [(round(x / DUP_TOL_MM), round(y / DUP_TOL_MM)) for x, y in s.points]
        key = min(tuple(pts), tuple(reversed(pts)))
        if len(set(key)) == 1:
            continue  # no length: a zero-length fault
        if key in curves:
            report(curves[key], s.entity, s.points[0], "arc or curve")
        else:
            curves[key] = s.entity
    # straight segments lying on each other, partly or wholly
    lines = [s for s in geo.segments if s.kind == "line" and math.dist(*s.points) >= ZERO_TOL_MM]
    if len(lines) > 1:
        geoms = shapely.linestrings([s.points for s in lines])
        tree = shapely.STRtree(geoms)
        left, right = tree.query(geoms, predicate="dwithin", distance=DUP_TOL_MM)
        for i, j in zip(left.tolist(), right.tolist()):
            if i >= j:
                continue
            p0, p1 = np.asarray(lines[i].points)
            q0, q1 = np.asarray(lines[j].points)
            d = p1 - p0
            length = float(np.hypot(*d))
            u = d / length
            normal = np.array([-u[1], u[0]])
            if abs(np.dot(q0 - p0, normal)) > DUP_TOL_MM or abs(np.dot(q1 - p0, normal)) > DUP_TOL_MM:
                continue
            t = sorted((float(np.dot(q0 - p0, u)), float(np.dot(q1 - p0, u))))
            lo, hi = max(0.0, t[0]), min(length, t[1])
            if hi - lo > DUP_TOL_MM:
                mid = p0 + u * (lo + hi) / 2
                report(lines[i].entity, lines[j].entity, (float(mid[0]), float(mid[1])),
                       f"segment ({hi - lo:.3f} mm)")
    return faults


def _node_key(p, cell):
    return (math.floor(p[0] / cell), math.floor(p[1] / cell))


def _chains(geo: CutGeometry) -> tuple[list[list[tuple[float, float]]], list[int], list[Fault]]:
    """Closed rings from closed entities and from open paths joined end to end,
    with the entity each came from (-1 when joined from several); faults for
    loose ends and branches."""
    rings = [list(p) for p, c in zip(geo.paths, geo.closed) if c]
    sources = [i for i, c in enumerate(geo.closed) if c]
    open_ids = [i for i, (p, c) in enumerate(zip(geo.paths, geo.closed))
                if not c and len(p) >= 2 and sum(math.dist(p[k], p[k + 1]) for k in range(len(p) - 1)) >= ZERO_TOL_MM]
    if not open_ids:
        return rings, sources, []
    # cluster path ends within JOIN_TOL_MM (union-find over a grid)
    ends = []
    for i in open_ids:
        ends.append(geo.paths[i][0])
        ends.append(geo.paths[i][-1])
    parent = list(range(len(ends)))

    def find(a):
        while parent[a] != a:
            parent[a] = parent[parent[a]]
            a = parent[a]
        return a

    grid: dict[tuple[int, int], list[int]] = {}
    for k, p in enumerate(ends):
        gx, gy = _node_key(p, JOIN_TOL_MM)
        for dx in (-1, 0, 1):
            for dy in (-1, 0, 1):
                for other in grid.get((gx + dx, gy + dy), ()):
                    if math.dist(ends[other], p) <= JOIN_TOL_MM:
                        ra, rb = find(k), find(other)
                        if ra != rb:
                            parent[max(ra, rb)] = min(ra, rb)
        grid.setdefault((gx, gy), []).append(k)
    node = [find(k) for k in range(len(ends))]
    degree: dict[int, int] = {}
    for n_ in node:
        degree[n_] = degree.get(n_, 0) + 1
    faults = []
    for n_, deg in sorted(degree.items()):
        if deg == 1:
            faults.append(Fault("open-contour", "loose end: the path does not close", *ends[n_]))
        elif deg > 2:
            faults.append(Fault("branch", f"{deg} path ends meet here", *ends[n_]))
    # walk the components whose nodes all have degree 2: closed chains
    edges_at: dict[int, list[int]] = {}
    for e_, i in enumerate(open_ids):
        edges_at.setdefault(node[2 * e_], []).append(e_)
        edges_at.setdefault(node[2 * e_ + 1], []).append(e_)
    used = [False] * len(open_ids)
    for e0 in range(len(open_ids)):
        if used[e0]:
            continue
        # collect the component
        comp, stack = [], [e0]
        used[e0] = True
        while stack:
            e_ = stack.pop()
            comp.append(e_)
            for nd in (node[2 * e_], node[2 * e_ + 1]):
                for f_ in edges_at[nd]:
                    if not used[f_]:
                        used[f_] = True
                        stack.append(f_)
        nodes = {node[2 * e_] for e_ in comp} | {node[2 * e_ + 1] for e_ in comp}
        if any(degree[nd] != 2 for nd in nodes):
            continue
        ring: list[tuple[float, float]] = []
        e_, at = comp[0], node[2 * comp[0]]
        seen = set()
        while e_ not in seen:
            seen.add(e_)
            pts = list(geo.paths[open_ids[e_]])
            if node[2 * e_] != at:
                pts.reverse()
            ring.extend(pts)
            at = node[2 * e_ + 1] if node[2 * e_] == at else node[2 * e_]
            nxt = [f_ for f_ in edges_at[at] if f_ not in seen]
            if not nxt:
                break
            e_ = nxt[0]
        rings.append(ring)
        sources.append(-1)
    return rings, sources, faults


_LOCATION = re.compile(r"\[\s*([-+0-9.eE]+)\s+([-+0-9.eE]+)")


def check(geo: CutGeometry, sheet_mm: tuple[float, float] | None = None,
          kerf_mm: float | None = None) -> PreflightReport:
    """All the checks on read geometry. Faults are sorted by kind, then position."""
    import shapely
    from shapely.geometry import LinearRing, Polygon

    faults: list[Fault] = list(geo.unit_faults)
    notes = list(geo.notes)
    faults += _zero_length_faults(geo)
    faults += _duplicate_faults(geo)
    raw_rings, raw_sources, chain_faults = _chains(geo)
    faults += chain_faults

    polys, rings, sources = [], [], []
    for pts, source in zip(raw_rings, raw_sources):
        pts = _dedupe(pts)
        poly = Polygon(pts) if len(pts) >= 3 else None
        if poly is not None and not poly.is_valid and shapely.length(poly) > ZERO_TOL_MM:
            reason = shapely.is_valid_reason(poly)
            m = _LOCATION.search(reason)
            where = (float(m.group(1)), float(m.group(2))) if m else pts[0]
            if not (poly.area < ZERO_TOL_MM ** 2 and _is_flat(pts)):
                faults.append(Fault("self-crossing", f"closed contour crosses or touches itself "
                                                     f"({reason.split('[')[0]})", *where))
                continue
        if poly is None or poly.area < ZERO_TOL_MM ** 2:
            if pts:
                faults.append(Fault("zero-length", "closed contour of no area", *pts[0]))
            continue
        polys.append(poly)
        rings.append(LinearRing(pts))
        sources.append(source)
    if sheet_mm is not None:
        faults += _off_sheet_faults(geo, sheet_mm)
    if rings:
        faults += _overlap_faults(polys, rings)
        faults += _lead_in_faults(geo, polys, rings, sources)
    if kerf_mm is not None and rings:
        faults += _narrow_faults(polys, rings, kerf_mm)
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
    faults = []
    tol = 1e-6
    for i, p in enumerate(geo.paths):
        if not p:
            continue
        a = np.asarray(p + (geo.leads[i] if i < len(geo.leads) else ()))
        over = np.maximum.reduce([-a[:, 0], a[:, 0] - w, -a[:, 1], a[:, 1] - h])
        k = int(np.argmax(over))
        if over[k] > tol:
            faults.append(Fault("off-sheet", f"{geo.entity_names[i]} reaches {over[k]:.3f} mm past the sheet "
                                             f"(0, 0)-({w:g}, {h:g})", float(a[k, 0]), float(a[k, 1])))
    return faults


def _lead_in_faults(geo: CutGeometry, polys, rings, sources) -> list[Fault]:
    """A lead-in starts on the waste side of its contour (outside an outer
    contour, inside a hole) and meets no contour but its own, where it joins it."""
    import shapely
    from shapely.geometry import LineString, Point

    from sheetgen.cutplan import enclosure_pairs

    if not any(len(lead) >= 2 for lead in geo.leads):
        return []
    depth = [0] * len(polys)
    for _, inner in enclosure_pairs(polys):
        depth[inner] += 1
    own = {src: j for j, src in enumerate(sources) if src >= 0}
    faults = []
    tree = shapely.STRtree(rings)
    for i, lead in enumerate(geo.leads):
        if len(lead) < 2 or i not in own:
            continue
        line = LineString(lead)
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


def _narrow_faults(polys, rings, kerf_mm: float) -> list[Fault]:
    import shapely
    from shapely.geometry import Polygon

    limit = 2.0 * kerf_mm
    faults = []
    tree = shapely.STRtree(rings)
    left, right = tree.query(rings, predicate="dwithin", distance=limit)
    for i, j in zip(left.tolist(), right.tolist()):
        if i >= j:
            continue
        d = rings[i].distance(rings[j])
        if 0 < d < limit:
            line = shapely.shortest_line(rings[i], rings[j])
            (x0, y0), (x1, y1) = line.coords
            faults.append(Fault("narrow", f"{d:.3f} mm between two contours, under 2 x kerf = {limit:.3f} mm",
                                (x0 + x1) / 2, (y0 + y1) / 2))
    from sheetgen.cutplan import enclosure_pairs

    depth = [0] * len(polys)
    for _, inner in enclosure_pairs(polys):
        depth[inner] += 1
    for poly, d in zip(polys, depth):
        inside = Polygon(poly.exterior)  # the contour's own region; holes are contours too
        outside = inside.envelope.buffer(4 * limit, join_style="mitre").difference(inside)
        material, waste = (inside, outside) if d % 2 == 0 else (outside, inside)
        for where in _thin_parts(material, kerf_mm):
            faults.append(Fault("narrow", f"material narrower than 2 x kerf = {limit:.3f} mm", *where))
        for where in _thin_parts(waste, kerf_mm / 2):
            faults.append(Fault("narrow", f"gap narrower than the kerf ({kerf_mm:.3f} mm): the beam cannot cut it "
                                          f"as drawn", *where))
    return faults


def _thin_parts(region, radius_mm: float) -> list[tuple[float, float]]:
    """Points inside the parts of ``region`` narrower than 2 x radius."""
    import shapely

    opened = region.buffer(-radius_mm, quad_segs=16).buffer(radius_mm, quad_segs=16)
    lost = region.difference(opened)
    if lost.is_empty:
        return []
    pieces = [g for g in getattr(lost, "geoms", [lost]) if g.geom_type == "Polygon" and g.area > 1e-9]
    comps = [g for g in getattr(opened, "geoms", [opened]) if not g.is_empty]
    spike = radius_mm * (1.0 / math.sin(math.radians(SPIKE_ANGLE_DEG / 2)) - 1.0)
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


def preflight_file(path: str | Path, sheet_mm: tuple[float, float] | None = None, kerf_mm: float | None = None,
                   layer: str | None = None) -> PreflightReport:
    return check(read_cut_file(path, layer), sheet_mm, kerf_mm)


def parse_sheet(text: str) -> tuple[float, float]:
    """``WxH`` in mm, e.g. ``600x400``."""
    parts = re.split(r"[xX*]", text.strip())
    try:
        w, h = (float(p) for p in parts)
    except ValueError:
        raise ParameterError(f"--sheet {text!r}: must be WIDTHxHEIGHT in mm, for example 600x400") from None
    if not (0 < w <= 10000 and 0 < h <= 10000) or not (math.isfinite(w) and math.isfinite(h)):
        raise ParameterError(f"--sheet {text!r}: width and height must be from 0 to 10000 mm (above 0)")
    return (w, h)
