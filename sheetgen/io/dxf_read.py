"""The one DXF reader: every command that reads a cut file reads it here.

``read_cut_file`` turns a drawing into :class:`CutGeometry` (what ``preflight``
checks); ``read_dxf_parts`` turns the same geometry into parts (what ``nest
--extra`` places). One set of rules for both:

Entities. LINE, ARC, CIRCLE, LWPOLYLINE and 2D POLYLINE (arc segments given by
bulges are followed), ELLIPSE and SPLINE are cut paths; blocks (INSERT) are
exploded first (an entity on layer 0 inside a block takes the layer of the
INSERT, as the DXF reference says layer 0 does). Text, points, dimensions,
hatches and 3D polylines are not cut paths and are skipped (with a note).

Layers. With ``layer`` given, only that layer; otherwise the layer ``CUT``
(:data:`CUT_LAYER`, any case) when it holds cut paths, else every layer.

Units. ``$INSUNITS`` converts to mm through :data:`UNIT_MM` (a test checks it
against ezdxf's unit table); absent or 0 (unitless) is read as mm, and R12
files, which cannot carry the variable, too. :attr:`CutGeometry.units_state`
says which, so that ``preflight`` can report a file that does not say its
units.

Joining. Path ends closer than :data:`JOIN_TOL_MM` are one point: a path whose
ends meet is closed; open paths whose ends meet chain into closed contours
(:func:`closed_rings`). Curves are flattened to within :data:`FLATTEN_TOL_MM`.

Encoding. A DXF file is 8-bit text (UTF-8 from version R2007 on). A file that
starts with a byte-order mark or is UTF-16 is still read, and
:attr:`CutGeometry.encoding_issues` says so; text that is not valid in the
encoding the file declares gets a note.

Ceilings (bounded work): a file larger than :data:`MAX_FILE_BYTES` or holding
more than :data:`MAX_ENTITIES` entities (blocks exploded) is refused with
:class:`~sheetgen.errors.InputFileError` (exit code 2) before the checks run.
"""

from __future__ import annotations

import io
import math
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np

from sheetgen.errors import InputFileError
from sheetgen.geometry.cutpaths import FLATTEN_TOL_MM, JOIN_TOL_MM, ZERO_TOL_MM, CutGeometry, Segment, \
    closed_rings, drop_repeats

if TYPE_CHECKING:
    from sheetgen.production.preflight import PreflightReport

CUT_LAYER = "CUT"
MAX_ENTITIES = 250_000            # entities in model space, blocks exploded (about 1.6 GB, a minute)
MAX_FILE_BYTES = 200 * 1024 ** 2  # 200 MiB
MAX_CIRCLE_POINTS = 2048

# $INSUNITS code -> mm per drawing unit (DXF reference, header variable $INSUNITS; from memory,
# checked against ezdxf.units in tests/test_dxf_read.py). 0 = unitless, read as mm.
UNIT_MM = {0: 1.0, 1: 25.4, 2: 304.8, 3: 1_609_344.0, 4: 1.0, 5: 10.0, 6: 1000.0, 7: 1_000_000.0,
           8: 0.0000254, 9: 0.0254, 10: 914.4, 11: 1e-7, 12: 1e-6, 13: 0.001, 14: 100.0, 15: 10_000.0,
           16: 100_000.0, 17: 1e12, 18: 1.495978707e14, 19: 9.4607304725808e18, 20: 3.0856775814913673e19,
           21: 304.8006096012192}
UNIT_NAMES = {0: "unitless", 1: "inches", 2: "feet", 3: "miles", 4: "mm", 5: "cm", 6: "m", 7: "km",
              8: "microinches", 9: "mils", 10: "yards", 11: "angstroms", 12: "nanometres", 13: "microns",
              14: "decimetres", 15: "decametres", 16: "hectometres", 17: "gigametres",
              18: "astronomical units", 19: "light years", 20: "parsecs", 21: "US survey feet"}
PATH_TYPES = ("LINE", "ARC", "CIRCLE", "LWPOLYLINE", "POLYLINE", "ELLIPSE", "SPLINE")


# ---------------------------------------------------------------------------
# opening a drawing


def open_drawing(path: str | Path):
    """``(doc, encoding_issues, encoding_notes)`` for a DXF file; anything
    unreadable raises InputFileError naming the file and the reason."""
    import ezdxf

    path = Path(path)
    if not path.is_file():
        raise InputFileError(f"{path}: no such file" if not path.exists() else f"{path}: not a regular file")
    try:
        size = path.stat().st_size
        if size > MAX_FILE_BYTES:
            raise InputFileError(f"{path}: {size / 1024 ** 2:.0f} MiB is more than sheetgen reads "
                                 f"({MAX_FILE_BYTES // 1024 ** 2} MiB); split the drawing")
        raw = path.read_bytes()
    except OSError as exc:
        raise InputFileError(f"{path}: cannot be read ({exc.strerror or exc})") from None
    issues: list[str] = []
    notes: list[str] = []
    text: str | None = None
    if raw.startswith(b"AutoCAD Binary DXF"):
        pass
    elif raw.startswith(b"\xef\xbb\xbf"):
        issues.append("the file starts with a UTF-8 byte-order mark (EF BB BF), which DXF does not have; "
                      "some laser software rejects such a file: save it again without the mark")
        text = raw[3:].decode("utf-8", errors="replace")
    elif raw.startswith((b"\xff\xfe", b"\xfe\xff")):
        issues.append("the file is UTF-16 text (byte-order mark " + raw[:2].hex(" ").upper() + "); DXF is "
                      "8-bit text: save it again as an ASCII or UTF-8 DXF")
        text = raw.decode("utf-16", errors="replace")
    elif b"\x00" in raw[:4096]:
        raise InputFileError(f"{path}: not a DXF file (it holds NUL bytes: UTF-16 text without a byte-order "
                             f"mark, or a binary file of another kind)")
    try:
        if text is not None:
            doc = ezdxf.read(io.StringIO(text))
        else:
            doc = ezdxf.readfile(str(path))
    except (OSError, UnicodeError) as exc:
        reason = getattr(exc, "strerror", None) or "not a DXF file"
        raise InputFileError(f"{path}: cannot be read as a DXF file ({reason})") from None
    except ezdxf.DXFError as exc:
        raise InputFileError(f"{path}: not a readable DXF file ({exc})") from None
    except Exception as exc:  # noqa: BLE001 - ezdxf raises many kinds on malformed files
        raise InputFileError(f"{path}: cannot read as a DXF drawing ({exc.__class__.__name__}: {exc})") from None
    if text is None and not raw.startswith(b"AutoCAD Binary DXF"):
        declared = "utf-8" if doc.dxfversion >= "AC1021" else (doc.encoding or "cp1252")
        try:
            raw.decode(declared)
        except UnicodeDecodeError as exc:
            notes.append(f"text in the file is not valid {declared} (the encoding it declares), first at byte "
                         f"{exc.start}: names and labels may read wrongly; the geometry is not affected")
        except LookupError:
            notes.append(f"the file declares an encoding Python does not know ({declared})")
    return doc, issues, notes


def drawing_units(doc) -> tuple[str, float, str, int]:
    """``(name, mm per unit, state, code)``; state is "declared", "missing",
    "unitless", "unknown" or "r12"."""
    if doc.dxfversion <= "AC1009":
        return "mm", 1.0, "r12", 0
    if "$INSUNITS" not in doc.header:
        return "mm", 1.0, "missing", 0
    try:
        code = int(doc.header.get("$INSUNITS", 0))
    except (TypeError, ValueError):
        return "mm", 1.0, "unknown", -1
    if code == 0:
        return "mm", 1.0, "unitless", 0
    if code not in UNIT_MM:
        return "mm", 1.0, "unknown", code
    return UNIT_NAMES[code], UNIT_MM[code], "declared", code


def _layer_of(e, parent_layer: str | None) -> str:
    layer = e.dxf.get("layer", "0")
    if parent_layer is not None and layer == "0":
        return parent_layer
    return layer


def _flat_entities(entities, path: Path, parent_layer: str | None = None, depth: int = 0, count=None):
    """``(entity, layer)`` with blocks (INSERT) exploded; refuses more than MAX_ENTITIES."""
    count = count if count is not None else [0]
    for e in entities:
        count[0] += 1
        if count[0] > MAX_ENTITIES:
            raise InputFileError(f"{path}: more than {MAX_ENTITIES:,} entities (blocks exploded), more than "
                                 f"sheetgen checks in one go; split the drawing")
        if e.dxftype() == "INSERT" and depth < 8:
            layer = _layer_of(e, parent_layer)
            try:
                subs = list(e.virtual_entities())
            except Exception:  # noqa: BLE001 - a broken block reference: kept as itself, noted by the caller
                yield e, layer
                continue
            yield from _flat_entities(subs, path, layer, depth + 1, count)
        else:
            yield e, _layer_of(e, parent_layer)


def choose_layers(on_layer: dict[str, int], layer: str | None, path: Path) -> tuple[str, ...]:
    """The cut-layer rule (module doc)."""
    if layer is not None:
        if not any(name.upper() == layer.upper() for name in on_layer):
            have = ", ".join(sorted(on_layer)) or "none"
            raise InputFileError(f"{path}: --layer {layer}: no cut geometry on that layer "
                                 f"(layers with geometry: {have})")
        return tuple(sorted(n for n in on_layer if n.upper() == layer.upper()))
    if any(n.upper() == CUT_LAYER for n in on_layer):
        return tuple(sorted(n for n in on_layer if n.upper() == CUT_LAYER))
    return tuple(sorted(on_layer))


def _circle_points(circles: list[tuple[int, float, float, float]]) -> dict[int, np.ndarray]:
    """Flattened circles, all at once: per entity index an (n + 1, 2) closed
    polyline whose chords stay within FLATTEN_TOL_MM of the circle."""
    if not circles:
        return {}
    a = np.asarray(circles, dtype=float)
    r = a[:, 3]
    n = np.full(len(a), 8, dtype=np.int64)
    big = r > FLATTEN_TOL_MM
    n[big] = np.ceil(np.pi / np.arccos(np.maximum(-1.0, 1.0 - FLATTEN_TOL_MM / r[big]))).astype(np.int64)
    n = np.clip(n, 8, MAX_CIRCLE_POINTS)
    out: dict[int, np.ndarray] = {}
    for count in np.unique(n).tolist():
        rows = np.nonzero(n == count)[0]
        t = np.linspace(0.0, 2.0 * math.pi, count + 1)
        unit = np.stack([np.cos(t), np.sin(t)], axis=1)  # (count + 1, 2)
        pts = a[rows, None, 1:3] + a[rows, None, 3:4] * unit[None]
        for k, row in enumerate(rows.tolist()):
            out[int(a[row, 0])] = pts[k]
    return out


def _is_flat_extrusion(e) -> bool:
    ex = e.dxf.get("extrusion", None)
    return ex is None or (abs(ex[0]) < 1e-12 and abs(ex[1]) < 1e-12 and ex[2] > 0)


def read_cut_file(path: str | Path, layer: str | None = None) -> CutGeometry:
    """Read the cut geometry of a DXF file (module doc). Unreadable -> InputFileError."""
    from ezdxf import path as ezpath

    path = Path(path)
    doc, encoding_issues, notes = open_drawing(path)
    units_name, factor, units_state, units_code = drawing_units(doc)

    entities = list(_flat_entities(doc.modelspace(), path))
    on_layer: dict[str, int] = {}
    for e, lay in entities:
        if e.dxftype() in PATH_TYPES:
            on_layer[lay] = on_layer.get(lay, 0) + 1
    layers = choose_layers(on_layer, layer, path)
    wanted = {n.upper() for n in layers}

    paths: list[np.ndarray] = []
    closed: list[bool] = []
    leads: list[np.ndarray] = []
    segments: list[Segment] = []
    names: list[str] = []
    zero: list[tuple[int, tuple[float, float]]] = []
    circles: list[tuple[int, float, float, float]] = []
    skipped: dict[str, int] = {}
    no_lead = np.zeros((0, 2))

    def add(pts: np.ndarray, is_closed: bool, name: str, lead: np.ndarray = no_lead) -> None:
        paths.append(pts)
        closed.append(is_closed)
        leads.append(lead)
        names.append(name)

    for e, lay in entities:
        kind = e.dxftype()
        if lay.upper() not in wanted:
            continue
        if kind not in PATH_TYPES:
            skipped[kind] = skipped.get(kind, 0) + 1
            continue
        if kind == "POLYLINE" and not e.is_2d_polyline:
            skipped["3D POLYLINE"] = skipped.get("3D POLYLINE", 0) + 1
            continue
        index = len(paths)
        name = f"{kind} #{e.dxf.handle}" if e.dxf.hasattr("handle") else kind
        try:
            if kind in ("CIRCLE", "ARC") and e.dxf.radius * factor < ZERO_TOL_MM:
                c = e.ocs().to_wcs(e.dxf.center)
                add(np.zeros((0, 2)), False, name)
                zero.append((index, (float(c[0]) * factor, float(c[1]) * factor)))
                continue
            if kind == "CIRCLE":
                c = e.dxf.center if _is_flat_extrusion(e) else e.ocs().to_wcs(e.dxf.center)
                cx, cy, r = float(c[0]) * factor, float(c[1]) * factor, float(e.dxf.radius) * factor
                add(no_lead, True, name)  # its points are made below, for all circles at once
                circles.append((index, cx, cy, r))
                continue
            if kind == "LINE":
                s, t = e.dxf.start, e.dxf.end
                a = (float(s[0]) * factor, float(s[1]) * factor)
                b = (float(t[0]) * factor, float(t[1]) * factor)
                segments.append(Segment("line", (a, b), index))
                add(np.array([a, b]), False, name)
                continue
            if kind == "LWPOLYLINE" and _is_flat_extrusion(e):
                pts = np.asarray(e.get_points("xyb"), dtype=float).reshape(-1, 3)
                if len(pts) and not np.any(pts[:, 2]):
                    xy = pts[:, :2] * factor
                    if e.closed and len(xy) > 1:
                        xy = np.vstack([xy, xy[:1]])
                    for k in range(len(xy) - 1):
                        segments.append(Segment("line", (tuple(xy[k]), tuple(xy[k + 1])), index))
                    _add_flat(add, xy, name)
                    continue
            p = ezpath.make_path(e)
        except (TypeError, ValueError, ZeroDivisionError, AttributeError, IndexError):
            skipped[kind + " (unreadable)"] = skipped.get(kind + " (unreadable)", 0) + 1
            continue
        here = _pt(p.start, factor)
        for cmd in p.commands():
            if isinstance(cmd, ezpath.MoveTo):
                here = _pt(cmd.end, factor)
                continue
            end = _pt(cmd.end, factor)
            if isinstance(cmd, ezpath.LineTo):
                segments.append(Segment("line", (here, end), index))
            elif isinstance(cmd, ezpath.Curve3To):
                segments.append(Segment("curve", (here, _pt(cmd.ctrl, factor), end), index))
            else:
                segments.append(Segment("curve", (here, _pt(cmd.ctrl1, factor), _pt(cmd.ctrl2, factor), end), index))
            here = end
        flat = np.array([(v.x, v.y) for v in p.flattening(FLATTEN_TOL_MM / factor)], dtype=float).reshape(-1, 2)
        if not len(flat):
            flat = np.array([(p.start.x, p.start.y)], dtype=float)
        _add_flat(add, flat * factor, name)
    for index, pts in _circle_points(circles).items():
        paths[index] = pts
    for kind, count in sorted(skipped.items()):
        notes.append(f"{count} {kind} entit{'y' if count == 1 else 'ies'} on the checked layers skipped "
                     f"(not a cut path)")
    return CutGeometry(tuple(paths), tuple(closed), tuple(segments), tuple(names), tuple(zero), units_name,
                       units_state, units_code, tuple(notes), layers, tuple(leads), tuple(circles),
                       tuple(encoding_issues), factor)


def _pt(v, factor: float) -> tuple[float, float]:
    return (float(v[0]) * factor, float(v[1]) * factor)


def _add_flat(add, flat: np.ndarray, name: str) -> None:
    """A flattened path: closed when its ends meet; a lead-in when it runs in to a
    point and then round back to it."""
    is_closed = len(flat) > 2 and math.dist(flat[0], flat[-1]) <= JOIN_TOL_MM
    if not is_closed and len(flat) > 3:
        d = np.hypot(*(flat[1:len(flat) - 3] - flat[-1]).T)
        hit = np.nonzero(d <= JOIN_TOL_MM)[0]
        if len(hit):
            k = int(hit[0]) + 1
            add(flat[k:], True, name, flat[:k + 1])
            return
    add(flat, is_closed, name)


# ---------------------------------------------------------------------------
# joining open paths into closed contours (pure)


# ---------------------------------------------------------------------------
# parts (nest --extra)


@dataclass(frozen=True)
class DxfPart:
    """One part read from a drawing: its outline with holes (mm, as drawn) and
    its round holes as (cx, cy, r) so that writers can keep them true circles."""

    name: str
    polygon: object  # shapely Polygon
    circles: tuple[tuple[float, float, float], ...] = ()


def _fmt(x: float) -> str:
    return f"{x:.3f}".rstrip("0").rstrip(".")


def read_dxf_parts(path: str | Path) -> list[DxfPart]:
    """The parts drawn in ``path``: each closed outer contour, with the closed
    contours inside it as its holes, is one part; a contour inside a hole is a
    part of its own again. An open contour, a self-crossing one or a drawing
    with no closed contour raises InputFileError naming the file (and the ends
    of the open contour, in the drawing's own units)."""
    from shapely.geometry import Polygon

    path = Path(path)
    geo = read_cut_file(path)
    joined = closed_rings(geo)
    unit = geo.factor
    if joined.open_chains:
        (ax, ay), (bx, by), entity = joined.open_chains[0]
        layer_note = f" on layer {geo.layers[0]!r}" if len(geo.layers) == 1 else ""
        raise InputFileError(f"{path}: open contour from ({_fmt(ax / unit)}, {_fmt(ay / unit)}) to "
                             f"({_fmt(bx / unit)}, {_fmt(by / unit)}){layer_note} ({geo.entity_names[entity]}): "
                             f"every outline must be closed")
    circle_of = {i: (cx, cy, r) for i, cx, cy, r in geo.circles}
    rings = []
    for pts, source in zip(joined.rings, joined.sources):
        pts = drop_repeats(pts)
        if len(pts) < 3:
            x, y = pts[0] if len(pts) else (0.0, 0.0)
            raise InputFileError(f"{path}: degenerate contour at ({_fmt(x)}, {_fmt(y)}) with fewer than 3 points")
        poly = Polygon(pts)
        if not poly.is_valid or poly.area <= 0:
            x, y = pts[0]
            raise InputFileError(f"{path}: contour at ({_fmt(x)}, {_fmt(y)}) crosses itself or has no area")
        rings.append((pts, circle_of.get(source), poly))
    if not rings:
        raise InputFileError(f"{path}: no closed contour found (parts must be drawn as closed outlines"
                             f"{' on layer ' + CUT_LAYER if any(n.upper() == CUT_LAYER for n in geo.layers) else ''})")
    return _assemble(rings, path)


def _assemble(rings, path: Path) -> list[DxfPart]:
    """Outer contours with their holes; a contour at even depth is an outline."""
    from shapely.geometry import Polygon

    order = sorted(range(len(rings)), key=lambda i: -rings[i][2].area)
    parent: dict[int, int | None] = {}
    depth: dict[int, int] = {}
    for pos, i in enumerate(order):
        rep = rings[i][2].representative_point()
        par = None
        for j in reversed(order[:pos]):  # smallest enclosing ring first
            if rings[j][2].contains(rep) and rings[j][2].contains(rings[i][2]):
                par = j
                break
        parent[i] = par
        depth[i] = 0 if par is None else depth[par] + 1
    outers = [i for i in order if depth[i] % 2 == 0]
    parts = []
    for i in outers:
        holes = [j for j in order if parent[j] == i]
        poly = Polygon(rings[i][0], [rings[j][0] for j in holes])
        if not poly.is_valid:
            x, y = rings[i][0][0]
            raise InputFileError(f"{path}: the holes of the outline at ({_fmt(x)}, {_fmt(y)}) touch it or "
                                 f"each other")
        circles = tuple(rings[j][1] for j in holes if rings[j][1] is not None)
        parts.append((poly, circles))
    parts.sort(key=lambda pc: (round(pc[0].bounds[1], 6), round(pc[0].bounds[0], 6)))
    stem = path.stem
    if len(parts) == 1:
        return [DxfPart(stem, parts[0][0], parts[0][1])]
    return [DxfPart(f"{stem}-{k + 1}", poly, circles) for k, (poly, circles) in enumerate(parts)]


def preflight_file(path: str | Path, sheet_mm: tuple[float, float] | None = None, kerf_mm: float | None = None,
                   layer: str | None = None) -> PreflightReport:
    """Read a cut file with the one reader and check it
    (:func:`sheetgen.production.preflight.check`)."""
    from sheetgen.production.preflight import check

    return check(read_cut_file(path, layer), sheet_mm, kerf_mm)
