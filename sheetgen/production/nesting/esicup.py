"""Readers for the academic strip-packing instances used as outside references.

Two formats (see ``tests/data/esicup/README.md``):

* ESICUP XML: ``problem/boards`` (the strip; its y-extent is the strip width),
  ``problem/lot/piece`` (quantity, allowed angles, component polygon),
  ``polygons/polygon/lines/segment`` (outlines), ``nfps/nfp`` (stored no-fit
  polygons) and ``solutions/solution`` (recorded layouts).
* JSON (jakobs1): ``Items[]`` with ``Demand``, ``AllowedOrientations`` and
  ``Shape.Data``; ``Strip.Height`` is the strip width.

These are benchmark readers, not user input: a malformed file raises
:class:`~sheetgen.errors.InputFileError` naming the file.
"""

from __future__ import annotations

import json
import xml.etree.ElementTree as ET
from dataclasses import dataclass
from pathlib import Path

from shapely.geometry import Polygon
from shapely.ops import unary_union

from sheetgen.errors import InputFileError
from sheetgen.production.nesting.model import NestItem


@dataclass(frozen=True)
class StoredNfp:
    """One ``nfps/nfp`` (or ``ifps/ifp``) entry: the no-fit (inner-fit) polygon of
    ``orbiting`` around (inside) ``static``."""

    static_polygon: str
    static_angle_deg: float
    orbiting_polygon: str
    orbiting_angle_deg: float
    polygon: Polygon


@dataclass(frozen=True)
class RecordedPlacement:
    piece: str
    x: float
    y: float
    angle_deg: float


@dataclass(frozen=True)
class RecordedSolution:
    algorithm: str
    strip_length: float | None
    placements: tuple[RecordedPlacement, ...]


@dataclass(frozen=True)
class Instance:
    name: str
    strip_width: float
    items: tuple[NestItem, ...]
    piece_ids: tuple[str, ...]          # item i is piece_ids[i]
    piece_polygon_ids: tuple[str, ...]  # item i uses polygons[piece_polygon_ids[i]]
    polygons: dict[str, Polygon]
    nfps: tuple[StoredNfp, ...] = ()
    ifps: tuple[StoredNfp, ...] = ()     # static = the board
    solutions: tuple[RecordedSolution, ...] = ()

    @property
    def total_area(self) -> float:
        return sum(it.polygon.area * it.qty for it in self.items)


def _local(tag: str) -> str:
    return tag.rsplit("}", 1)[-1]


def _children(el, name: str):
    return [c for c in el if _local(c.tag) == name]


def _child(el, name: str):
    for c in el:
        if _local(c.tag) == name:
            return c
    return None


def _polygon_of(el, path: Path) -> Polygon:
    lines = _child(el, "lines")
    if lines is None:
        raise InputFileError(f"{path}: polygon {el.get('id')!r} has no lines")
    pts = []
    for seg in _children(lines, "segment"):
        pts.append((float(seg.get("x0")), float(seg.get("y0"))))
    if len(pts) < 3:
        raise InputFileError(f"{path}: polygon {el.get('id')!r} has fewer than 3 segments")
    poly = Polygon(pts)
    if not poly.is_valid:
        poly = poly.buffer(0)
    return poly


def _stored_fits(root, section: str, tag: str, polygons) -> list[StoredNfp]:
    """The stored no-fit (``nfps``/``nfp``) or inner-fit (``ifps``/``ifp``) polygons."""
    out = []
    el = _child(root, section)
    for fit in _children(el, tag) if el is not None else []:
        st, orb, res = _child(fit, "staticPolygon"), _child(fit, "orbitingPolygon"), _child(fit, "resultingPolygon")
        out.append(StoredNfp(st.get("idPolygon"), float(st.get("angle", 0)), orb.get("idPolygon"),
                             float(orb.get("angle", 0)), polygons[res.get("idPolygon")]))
    return out


def read_esicup_xml(path: str | Path) -> Instance:
    """Read an ESICUP XML instance with its stored NFPs and recorded solutions."""
    path = Path(path)
    try:
        root = ET.parse(path).getroot()
    except (OSError, ET.ParseError) as exc:
        raise InputFileError(f"{path}: cannot read as ESICUP XML ({exc})") from exc
    name_el = _child(root, "name")
    name = name_el.text.strip() if name_el is not None and name_el.text else path.stem
    polys_el = _child(root, "polygons")
    problem = _child(root, "problem")
    if polys_el is None or problem is None:
        raise InputFileError(f"{path}: no <problem> or <polygons> element")
    polygons = {p.get("id"): _polygon_of(p, path) for p in _children(polys_el, "polygon")}

    def piece_polygon(piece) -> tuple[Polygon, str]:
        parts = []
        first_id = None
        for comp in _children(piece, "component"):
            pid = comp.get("idPolygon")
            if pid not in polygons:
                raise InputFileError(f"{path}: piece {piece.get('id')!r} uses unknown polygon {pid!r}")
            first_id = first_id or pid
            dx, dy = float(comp.get("xOffset", 0)), float(comp.get("yOffset", 0))
            from shapely import affinity

            parts.append(affinity.translate(polygons[pid], dx, dy))
        if not parts or first_id is None:
            raise InputFileError(f"{path}: piece {piece.get('id')!r} has no component")
        geom = parts[0] if len(parts) == 1 else unary_union(parts)
        if not isinstance(geom, Polygon):
            raise InputFileError(f"{path}: the components of piece {piece.get('id')!r} do not join into one polygon")
        return geom, first_id

    boards = _child(problem, "boards")
    board = _child(boards, "piece") if boards is not None else None
    if board is None:
        raise InputFileError(f"{path}: no board piece")
    board_poly, _ = piece_polygon(board)
    strip_width = board_poly.bounds[3] - board_poly.bounds[1]

    items, ids, poly_ids = [], [], []
    lot = _child(problem, "lot")
    for piece in _children(lot, "piece") if lot is not None else []:
        geom, pid = piece_polygon(piece)
        orient = _child(piece, "orientation")
        angles = ((0.0,) if orient is None else
                  tuple(float(e.get("angle")) for e in _children(orient, "enumeration")))
        items.append(NestItem(name=piece.get("id"), polygon=geom, qty=int(piece.get("quantity", 1)),
                              rotations_deg=angles or (0.0,)))
        ids.append(piece.get("id"))
        poly_ids.append(pid)

    nfps = _stored_fits(root, "nfps", "nfp", polygons)
    ifps = _stored_fits(root, "ifps", "ifp", polygons)

    solutions = []
    sols = _child(root, "solutions")
    for sol in _children(sols, "solution") if sols is not None else []:
        places = tuple(RecordedPlacement(p.get("idPiece"), float(p.get("x")), float(p.get("y")),
                                         float(p.get("angle", 0))) for p in _children(sol, "placement"))
        info = _child(sol, "extraInfo")
        algo, length = "", None
        if info is not None:
            a, w = _child(info, "Algorithm"), _child(info, "solutionWidth")
            algo = a.text.strip() if a is not None and a.text else ""
            length = float(w.text) if w is not None and w.text else None
        solutions.append(RecordedSolution(algo, length, places))

    return Instance(name=name, strip_width=strip_width, items=tuple(items), piece_ids=tuple(ids),
                    piece_polygon_ids=tuple(poly_ids), polygons=polygons, nfps=tuple(nfps),
                    ifps=tuple(ifps), solutions=tuple(solutions))


def read_jakobs_json(path: str | Path) -> Instance:
    """Read a strip-packing instance in the JSON layout of jakobs1.json."""
    path = Path(path)
    try:
        data = json.loads(path.read_text())
        items = []
        for i, it in enumerate(data["Items"]):
            ring = [tuple(map(float, p)) for p in it["Shape"]["Data"]]
            items.append(NestItem(name=f"i_{i}", polygon=Polygon(ring), qty=int(it["Demand"]),
                                  rotations_deg=tuple(float(a) for a in it.get("AllowedOrientations", [0.0]))))
        width = float(data["Strip"]["Height"])
    except (OSError, ValueError, KeyError, TypeError) as exc:
        raise InputFileError(f"{path}: cannot read as a strip-packing JSON instance ({exc})") from exc
    return Instance(name=data.get("Name", path.stem), strip_width=width, items=tuple(items),
                    piece_ids=tuple(it.name for it in items), piece_polygon_ids=tuple(it.name for it in items),
                    polygons={it.name: it.polygon for it in items})


def read_instance(path: str | Path) -> Instance:
    path = Path(path)
    return read_jakobs_json(path) if path.suffix.lower() == ".json" else read_esicup_xml(path)
