"""Which item blocks which: does item a, moved along a direction from its place, run into
item b? From the projections of their prisms along the direction (shapely) and their
extents along sample lines through the common shadow. Pure."""

from __future__ import annotations

import numpy as np
import shapely
from shapely import affinity
from shapely.geometry import LineString, Point, Polygon

from sheetgen.design.assembly_order.items import AXES, Item
from sheetgen.geometry.prism import Prism

SLIVER_MM = 0.02  # overlaps of shadows thinner than twice this are a bore on its rod (outlines' chords within 0.01 mm)
EPS_MM = 1e-4  # overlaps along a line shorter than this are contact, not collision
AREA_EPS_MM2 = 1e-3  # shadows sharing less area than this only touch
FAR_MM = 1e5
DENSE_STEP_MM = 0.5  # the finest spacing of the lines tried through a shadow overlap
DENSE_POINTS = 400  # lines tried per piece of a shadow overlap, at most about


def _basis(d: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    a = np.eye(3)[int(np.argmin(np.abs(d)))]
    e1 = np.cross(d, a)
    e1 /= np.linalg.norm(e1)
    return e1, np.cross(d, e1)


def _shadow(p: Prism, d: np.ndarray) -> Polygon:
    """The prism seen along d, in the plane's (e1, e2) coordinates."""
    e1, e2 = _basis(d)
    m, t = p.placement.matrix, np.asarray(p.placement.translation_mm)
    w = m[:, 2]
    if abs(abs(float(w @ d)) - 1.0) < 1e-9:
        u, v = m[:, 0], m[:, 1]
        return affinity.affine_transform(p.outline, [e1 @ u, e1 @ v, e2 @ u, e2 @ v, e1 @ t, e2 @ t])
    xy = np.asarray(p.outline.exterior.coords, dtype=float)
    world = np.vstack([p.placement.apply(np.column_stack([xy, np.full(len(xy), z)])) for z in (0.0, p.depth_mm)])
    hull = shapely.convex_hull(shapely.multipoints(np.column_stack([world @ e1, world @ e2])))
    return hull if isinstance(hull, Polygon) else Polygon()


def _extent(p: Prism, q: np.ndarray, d: np.ndarray) -> list[tuple[float, float]]:
    """Where the line q + s d runs inside the prism: intervals of s."""
    m, t = p.placement.matrix, np.asarray(p.placement.translation_mm)
    l0 = m.T @ (q - t)
    dl = m.T @ d
    if abs(dl[2]) < 1e-12:
        if not (0.0 < l0[2] < p.depth_mm):
            return []
        s0, s1 = -FAR_MM, FAR_MM
    else:
        s0, s1 = sorted(((0.0 - l0[2]) / dl[2], (p.depth_mm - l0[2]) / dl[2]))
    a = l0[:2] + s0 * dl[:2]
    b = l0[:2] + s1 * dl[:2]
    if np.linalg.norm(b - a) < 1e-9:
        return [(s0, s1)] if p.outline.contains(Point(a)) else []
    inside = LineString([a, b]).intersection(p.outline)
    out = []
    for g in getattr(inside, "geoms", [inside]):
        if isinstance(g, LineString) and not g.is_empty:
            c = np.asarray(g.coords)
            ss = [s0 + (s1 - s0) * float(np.linalg.norm(cc - a)) / float(np.linalg.norm(b - a)) for cc in c]
            out.append((min(ss), max(ss)))
    return out


def _samples(region) -> list[tuple[float, float]]:
    """A few points inside each piece of a shadow overlap: its representative point and
    the points of a 3 x 3 grid over its bounds that fall inside."""
    pts = []
    for g in getattr(region, "geoms", [region]):
        if not isinstance(g, Polygon) or g.area < AREA_EPS_MM2:
            continue
        r = g.representative_point()
        pts.append((r.x, r.y))
        x0, y0, x1, y1 = g.bounds
        f = np.array([1 / 6, 0.5, 5 / 6])
        gx, gy = np.meshgrid(x0 + f * (x1 - x0), y0 + f * (y1 - y0))
        inside = shapely.contains_xy(g, gx.ravel(), gy.ravel())
        pts += [(float(a), float(b)) for a, b in zip(gx.ravel()[inside], gy.ravel()[inside])]
    return pts


def _askew(p: Prism, d: np.ndarray) -> bool:
    """The prism's plate is neither square to d nor seen edge-on along it."""
    c = abs(float(p.placement.matrix[:, 2] @ d))
    return 1e-9 < c < 1.0 - 1e-9


def _grid(region, max_points: int = DENSE_POINTS) -> np.ndarray:
    """Points on a square grid inside each piece of a shadow overlap, at most about
    ``max_points`` per piece and never closer than DENSE_STEP_MM: where a tab sits in a
    slot of a plate seen askew, the lines that pass through both are a few mm wide."""
    out = []
    for g in getattr(region, "geoms", [region]):
        if not isinstance(g, Polygon) or g.area < AREA_EPS_MM2:
            continue
        x0, y0, x1, y1 = g.bounds
        h = max(DENSE_STEP_MM, float(np.sqrt((x1 - x0) * (y1 - y0) / max_points)))
        gx, gy = np.meshgrid(np.arange(x0 + h / 2, x1, h), np.arange(y0 + h / 2, y1, h))
        gx, gy = gx.ravel(), gy.ravel()
        inside = shapely.contains_xy(g, gx, gy)
        out.append(np.column_stack([gx[inside], gy[inside]]))
    return np.vstack(out) if out else np.zeros((0, 2))


def _slab(p: Prism, qs: np.ndarray, d: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Where many lines q + s d run between the two faces of the prism's plate: s from, s to
    (+-FAR_MM for a line in the plate's plane), which lines do at all, and the lines' start
    and direction in the prism's own frame."""
    m, t = p.placement.matrix, np.asarray(p.placement.translation_mm)
    l0 = (qs - t) @ m
    dl = m.T @ d
    n = len(qs)
    if abs(dl[2]) < 1e-12:
        ok = (l0[:, 2] > 0.0) & (l0[:, 2] < p.depth_mm)
        s0, s1 = np.full(n, -FAR_MM), np.full(n, FAR_MM)
    else:
        za, zb = (0.0 - l0[:, 2]) / dl[2], (p.depth_mm - l0[:, 2]) / dl[2]
        s0, s1 = np.minimum(za, zb), np.maximum(za, zb)
        ok = np.ones(n, dtype=bool)
    return s0, s1, ok, l0, dl


def _extents(p: Prism, qs: np.ndarray, d: np.ndarray,
             only: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray]:
    """For many lines q + s d (q: rows of ``qs``), the least and the greatest s inside the
    prism (NaN where a line misses it, or is not among ``only``): :func:`_extent` for
    arrays of lines."""
    n = len(qs)
    lo, hi = np.full(n, np.nan), np.full(n, np.nan)
    s0, s1, ok, l0, dl = _slab(p, qs, d)
    if only is not None:
        ok &= only
    a = l0[:, :2] + s0[:, None] * dl[:2]
    b = l0[:, :2] + s1[:, None] * dl[:2]
    length = np.linalg.norm(b - a, axis=1)
    if float(np.linalg.norm(dl[:2])) < 1e-12:  # along the prism's own axis: the lines are points of its outline
        hit = ok & shapely.contains_xy(p.outline, a[:, 0], a[:, 1])
        lo[hit], hi[hit] = s0[hit], s1[hit]
        return lo, hi
    idx = np.nonzero(ok & (length > 1e-9))[0]
    if not len(idx):
        return lo, hi
    segments = np.stack([a[idx], b[idx]], axis=1)
    shapely.prepare(p.outline)
    meets = shapely.intersects(shapely.linestrings(segments), p.outline)  # a prepared test first: cutting is the cost
    idx = idx[meets]
    if not len(idx):
        return lo, hi
    lines = shapely.linestrings(segments[meets])
    parts, which = shapely.get_parts(shapely.intersection(lines, p.outline), return_index=True)
    keep = (shapely.get_type_id(parts) == 1) & (shapely.length(parts) > 0.0)  # pieces of line, not touches
    coords, ci = shapely.get_coordinates(parts[keep], return_index=True)
    line = idx[which[keep][ci]]
    s = s0[line] + (s1 - s0)[line] * np.linalg.norm(coords - a[line], axis=1) / length[line]
    np.fmin.at(lo, line, s)
    np.fmax.at(hi, line, s)
    return lo, hi


class Blocking:
    """blocks(a, b, k): item a moved along directions[k] from its place runs into item b."""

    def __init__(self, items: tuple[Item, ...], directions=AXES):
        self.items = items
        self.directions = tuple(directions)
        self.index = {it.name: i for i, it in enumerate(items)}
        self.points = [self._points(it) for it in items]
        self.boxes = [np.vstack([p.min(axis=0), p.max(axis=0)]) for p in self.points]
        self._cache: dict[tuple[int, int, int], bool] = {}
        self._shadows: dict[tuple[int, int], list[Polygon]] = {}
        self._spans: dict[tuple[int, int], np.ndarray] = {}

    @staticmethod
    def _points(it: Item) -> np.ndarray:
        pts = []
        for p in it.pieces:
            xy = np.asarray(p.outline.exterior.coords, dtype=float)
            for z in (0.0, p.depth_mm):
                pts.append(p.placement.apply(np.column_stack([xy, np.full(len(xy), z)])))
        return np.vstack(pts)

    def spans(self, i: int, k: int) -> np.ndarray:
        """Item i's extent along directions[k] and the two directions across it: 3 x (min, max)."""
        key = (i, k)
        if key not in self._spans:
            d = np.asarray(self.directions[k][1])
            e1, e2 = _basis(d)
            proj = self.points[i] @ np.column_stack([d, e1, e2])
            self._spans[key] = np.column_stack([proj.min(axis=0), proj.max(axis=0)])
        return self._spans[key]

    def shadows(self, i: int, k: int) -> list[Polygon]:
        key = (i, k)
        if key not in self._shadows:
            d = np.asarray(self.directions[k][1])
            self._shadows[key] = [_shadow(p, d) for p in self.items[i].pieces]
        return self._shadows[key]

    def blocks(self, a: int, b: int, k: int) -> bool:
        key = (a, b, k)
        if key not in self._cache:
            self._cache[key] = self._blocks(a, b, k)
            self._cache[(b, a, k ^ 1)] = self._cache[key]  # a moving along d into b == b moving along -d into a
        return self._cache[key]

    def _blocks(self, a: int, b: int, k: int) -> bool:
        d = np.asarray(self.directions[k][1])
        sa_, sb_ = self.spans(a, k), self.spans(b, k)
        # b wholly behind a along d, or their shadows' boxes apart: no collision
        if sb_[0, 1] <= sa_[0, 0] + EPS_MM:
            return False
        for o in (1, 2):
            if sb_[o, 1] <= sa_[o, 0] + EPS_MM or sb_[o, 0] >= sa_[o, 1] - EPS_MM:
                return False
        e1, e2 = _basis(d)
        ia, ib = self.items[a], self.items[b]
        overlaps = []
        for pa, sa in zip(ia.pieces, self.shadows(a, k)):
            for pb, sb in zip(ib.pieces, self.shadows(b, k)):
                common = sa.intersection(sb).buffer(-SLIVER_MM)
                if common.area < AREA_EPS_MM2:
                    continue
                for u, v in _samples(common):
                    q = u * e1 + v * e2
                    ea, eb = _extent(pa, q, d), _extent(pb, q, d)
                    if ea and eb and max(h for _, h in eb) > min(lo for lo, _ in ea) + EPS_MM:
                        return True
                if _askew(pa, d) or _askew(pb, d):
                    overlaps.append((pa, pb, common))
        # where a plate is seen askew (its shadow the hull of its corners, not its outline) the
        # few sample lines can miss: lines on a grid through the overlap (a tab in the slot of
        # a tilted plate blocks only along lines a few mm wide)
        for pa, pb, common in overlaps:
            uv = _grid(common)
            if not len(uv):
                continue
            qs = uv[:, :1] * e1 + uv[:, 1:] * e2
            s0_a, _, in_a, _, _ = _slab(pa, qs, d)
            _, s1_b, in_b, _, _ = _slab(pb, qs, d)
            maybe = in_a & in_b & (s1_b > s0_a + EPS_MM)  # b's slab ends past where a's begins
            if not maybe.any():
                continue
            lo_a, _ = _extents(pa, qs, d, maybe)
            _, hi_b = _extents(pb, qs, d, maybe & ~np.isnan(lo_a))
            if bool(np.any(hi_b > lo_a + EPS_MM)):  # NaN (a line missing either) compares False
                return True
        return False

    def share_volume(self, a: int, b: int) -> bool:
        """Items a and b overlap where they stand (not merely interlock, as plates joined by
        tabs along a direction that is none of the kit's axes do)."""
        for k in range(0, len(AXES), 2):
            d = np.asarray(AXES[k][1])
            e1, e2 = _basis(d)
            for pa, sa in zip(self.items[a].pieces, self.shadows(a, k)):
                for pb, sb in zip(self.items[b].pieces, self.shadows(b, k)):
                    common = sa.intersection(sb).buffer(-SLIVER_MM)
                    if common.area < AREA_EPS_MM2:
                        continue
                    for u, v in _samples(common):
                        q = u * e1 + v * e2
                        for lo_a, hi_a in _extent(pa, q, d):
                            for lo_b, hi_b in _extent(pb, q, d):
                                if min(hi_a, hi_b) - max(lo_a, lo_b) > EPS_MM:
                                    return True
        return False

    def masks(self, meshing: frozenset = frozenset()) -> list[list[int]]:
        """hits[k][a]: the items a runs into along directions[k], as a bit mask over item indices.
        Parts of a ``meshing`` pair (gears) never stop each other: their teeth are turned
        into mesh by hand as the second goes in."""
        n = len(self.items)
        hits = [[0] * n for _ in self.directions]
        pairs = {frozenset(p) for p in meshing}
        for k in range(len(self.directions)):
            for a in range(n):
                for b in range(n):
                    if frozenset((self.items[a].part, self.items[b].part)) in pairs:
                        continue
                    if a != b and self.blocks(a, b, k):
                        hits[k][a] |= 1 << b
        # two items that stop each other every way already share volume: an interference the
        # 3D check reports; it says nothing about the order, so the pair is left out
        for a in range(n):
            for b in range(n):
                if all(hits[k][a] >> b & 1 for k in range(len(self.directions))) and self.share_volume(a, b):
                    for k in range(len(self.directions)):
                        hits[k][a] &= ~(1 << b)
                        hits[k][b] &= ~(1 << a)
        return hits
