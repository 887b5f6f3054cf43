"""What a cut file holds, as pure data: paths in mm and their closed rings.

The one DXF reader (:mod:`sheetgen.io.dxf_read`) fills :class:`CutGeometry`;
preflight and the nester's extra parts read it. Path ends closer than
:data:`JOIN_TOL_MM` are one point: open paths whose ends meet chain into closed
rings (:func:`closed_rings`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

JOIN_TOL_MM = 0.01      # path ends closer than this are one point (our choice, both commands)
FLATTEN_TOL_MM = 0.005  # chord error when curves are turned into polylines
ZERO_TOL_MM = 1e-4      # shorter than this is no length


@dataclass(frozen=True)
class Segment:
    """One drawing primitive, in mm: a straight segment ``("line", p, q)`` or a
    Bezier curve ``("curve", p, c1, [c2,] q)`` as ezdxf's path gives arcs,
    ellipses and splines. Circles are kept whole in :attr:`CutGeometry.circles`."""

    kind: str
    points: tuple[tuple[float, float], ...]
    entity: int


@dataclass(frozen=True)
class CutGeometry:
    """What a cut file holds, in mm: per path entity its flattened polyline (an
    (n, 2) array) and its primitives. A path that runs in to a point and then
    round back to it is a closed contour with a lead-in: ``paths`` holds the
    contour, ``leads`` the lead-in."""

    paths: tuple[np.ndarray, ...]
    closed: tuple[bool, ...]
    segments: tuple[Segment, ...]
    entity_names: tuple[str, ...]  # e.g. "LWPOLYLINE #3"
    zero_entities: tuple[tuple[int, tuple[float, float]], ...]  # entities of no size, with a point
    units: str
    units_state: str  # "declared", "missing", "unitless", "unknown", "r12"
    units_code: int
    notes: tuple[str, ...]
    layers: tuple[str, ...]
    leads: tuple[np.ndarray, ...] = ()  # per entity: its lead-in polyline ((0, 2) when none)
    circles: tuple[tuple[int, float, float, float], ...] = ()  # (entity, cx, cy, r) of CIRCLE entities
    encoding_issues: tuple[str, ...] = ()
    factor: float = 1.0  # mm per drawing unit


@dataclass(frozen=True)
class Joined:
    """Closed rings (arrays, not repeating the first point), the entity each came
    from (-1 when chained from several), loose ends and branch points (mm), and
    the open chains as (start, end, entity) for messages."""

    rings: tuple[np.ndarray, ...]
    sources: tuple[int, ...]
    loose_ends: tuple[tuple[float, float], ...]
    branches: tuple[tuple[tuple[float, float], int], ...]  # (point, how many ends meet)
    open_chains: tuple[tuple[tuple[float, float], tuple[float, float], int], ...]


def _length(p: np.ndarray) -> float:
    return float(np.sum(np.hypot(*np.diff(p, axis=0).T))) if len(p) > 1 else 0.0


def closed_rings(geo: CutGeometry) -> Joined:
    """Closed rings from closed entities and from open paths joined end to end
    (ends within JOIN_TOL_MM are one point)."""
    rings = [p for p, c in zip(geo.paths, geo.closed) if c]
    sources = [i for i, c in enumerate(geo.closed) if c]
    open_ids = [i for i, (p, c) in enumerate(zip(geo.paths, geo.closed))
                if not c and len(p) >= 2 and _length(p) >= ZERO_TOL_MM]
    if not open_ids:
        return Joined(tuple(rings), tuple(sources), (), (), ())
    ends = np.array([pt for i in open_ids for pt in (geo.paths[i][0], geo.paths[i][-1])], dtype=float)
    node = cluster_points(ends, JOIN_TOL_MM)
    degree = np.bincount(node, minlength=len(ends))
    loose = tuple((float(ends[k][0]), float(ends[k][1])) for k in range(len(ends))
                  if node[k] == k and degree[k] == 1)
    branches = tuple(((float(ends[k][0]), float(ends[k][1])), int(degree[k])) for k in range(len(ends))
                     if node[k] == k and degree[k] > 2)
    edges_at: dict[int, list[int]] = {}
    for e_ in range(len(open_ids)):
        edges_at.setdefault(int(node[2 * e_]), []).append(e_)
        edges_at.setdefault(int(node[2 * e_ + 1]), []).append(e_)
    used = [False] * len(open_ids)
    open_chains = []
    for e0 in range(len(open_ids)):
        if used[e0]:
            continue
        comp, stack = [], [e0]
        used[e0] = True
        while stack:
            e_ = stack.pop()
            comp.append(e_)
            for nd in (int(node[2 * e_]), int(node[2 * e_ + 1])):
                for f_ in edges_at[nd]:
                    if not used[f_]:
                        used[f_] = True
                        stack.append(f_)
        nodes = {int(node[2 * e_]) for e_ in comp} | {int(node[2 * e_ + 1]) for e_ in comp}
        if any(degree[nd] != 2 for nd in nodes):
            tips = [nd for nd in sorted(nodes) if degree[nd] == 1]
            a = ends[tips[0]] if tips else ends[min(nodes)]
            b = ends[tips[1]] if len(tips) > 1 else a
            open_chains.append(((float(a[0]), float(a[1])), (float(b[0]), float(b[1])), open_ids[comp[0]]))
            continue
        pieces: list[np.ndarray] = []
        e_, at = comp[0], int(node[2 * comp[0]])
        seen = set()
        while e_ not in seen:
            seen.add(e_)
            pts = geo.paths[open_ids[e_]]
            if int(node[2 * e_]) != at:
                pts = pts[::-1]
            pieces.append(pts if not pieces else pts[1:])
            at = int(node[2 * e_ + 1]) if int(node[2 * e_]) == at else int(node[2 * e_])
            nxt = [f_ for f_ in edges_at[at] if f_ not in seen]
            if not nxt:
                break
            e_ = nxt[0]
        rings.append(np.concatenate(pieces))
        sources.append(-1)
    return Joined(tuple(rings), tuple(sources), loose, branches, tuple(open_chains))


def cluster_points(points: np.ndarray, tol: float) -> np.ndarray:
    """For each point the index of its cluster's smallest member: points within
    ``tol`` of each other (transitively) are one cluster. Pairs come from an
    STRtree query; labels spread along the pairs until they settle."""
    import shapely

    n = len(points)
    labels = np.arange(n, dtype=np.int64)
    if n < 2:
        return labels
    geoms = shapely.points(points)
    assert isinstance(geoms, np.ndarray)  # (n, 2) coordinates give an array of points, never one
    left, right = shapely.STRtree(geoms).query(geoms, predicate="dwithin", distance=tol)
    keep = left < right
    left, right = left[keep], right[keep]
    while len(left):
        new = labels.copy()
        np.minimum.at(new, left, labels[right])
        np.minimum.at(new, right, labels[left])
        new = new[new]  # follow each label to its own label
        if np.array_equal(new, labels):
            break
        labels = new
    return labels


def drop_repeats(pts: np.ndarray) -> np.ndarray:
    """Consecutive points closer than ZERO_TOL_MM merged; the closing point dropped."""
    if len(pts) < 2:
        return pts
    keep = np.concatenate([[True], np.hypot(*np.diff(pts, axis=0).T) > ZERO_TOL_MM])
    pts = pts[keep]
    if len(pts) > 1 and math.dist(pts[0], pts[-1]) <= JOIN_TOL_MM:
        pts = pts[:-1]
    return pts
