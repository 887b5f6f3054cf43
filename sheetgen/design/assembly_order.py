"""The order of assembly, derived from the kit: which piece goes in when, and from where.

Pure: a :class:`~sheetgen.design.part.Kit` in, ordered :class:`Step` s out.

Every part instance and every solid component (axle, panel, motor with its
shaft) is a prism or a few prisms in the kit frame. An item can be put in place
along a straight line from outside the assembly when, moved from its place
along the opposite direction, it meets nothing already there. Which item blocks
which along each direction is computed once from the projections of the prisms
(shapely) and the extents along the direction on sample lines through their
common shadow. The order is then built forward, in a natural order (the fixed
stand from the bottom up, the parts on the axle, the turning frame from the
bottom up, the rest), taking at each step the first item that can go in *and*
leaves the rest of the kit assemblable (tested by taking the finished kit apart
down to what is placed: removing an item never blocks another, so a greedy
take-apart is enough). When no single item fits, a group of parts joined by
tabs is assembled on the bench and set in as one (the supports and the
stretchers whose end tabs pass through both, lowered onto the base).

Nothing here names a part: new part families land in a step by their
placements, joints and the rotating flag.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np
import shapely
from shapely import affinity
from shapely.geometry import LineString, Point, Polygon

from sheetgen.design.part import Component, Kit
from sheetgen.geometry.placement import Placement, mat3
from sheetgen.geometry.shapes import d_shape, disc

SLIVER_MM = 0.02  # overlaps of shadows thinner than twice this are a bore on its rod (outlines' chords within 0.01 mm)
EPS_MM = 1e-4  # overlaps along a line shorter than this are contact, not collision
AREA_EPS_MM2 = 1e-3  # shadows sharing less area than this only touch
FAR_MM = 1e5
DENSE_STEP_MM = 0.5  # the finest spacing of the lines tried through a shadow overlap
DENSE_POINTS = 400  # lines tried per piece of a shadow overlap, at most about
NO_STRAIGHT_PATH = "?"  # a Move's approach when no straight line brings the item past what is there

# the six directions an item may come from, named for the reader (kit frame: x along the axle, z up)
AXES: tuple[tuple[str, tuple[float, float, float]], ...] = (
    ("+z", (0.0, 0.0, 1.0)), ("-z", (0.0, 0.0, -1.0)),
    ("+x", (1.0, 0.0, 0.0)), ("-x", (-1.0, 0.0, 0.0)),
    ("+y", (0.0, 1.0, 0.0)), ("-y", (0.0, -1.0, 0.0)),
)


@dataclass(frozen=True)
class Prism:
    """A polygon in a local x-y plane swept along local +z by ``depth_mm``, placed in the kit."""

    outline: Polygon
    depth_mm: float
    placement: Placement


@dataclass(frozen=True)
class Item:
    """One thing put in place: a part instance (``rib#2``) or a solid component (``axle``)."""

    name: str
    part: str  # the part or component it is an instance of
    kind: str  # "part" or "component"
    rotating: bool
    pieces: tuple[Prism, ...]


@dataclass(frozen=True)
class Move:
    """Items put in place together, coming from ``approach`` (the name of a side, one of
    :func:`kit_directions`); ``bench`` names the group being built apart from the kit ('' for
    the kit); ``direction``: the side as a unit vector (the items are slid in against it)."""

    items: tuple[str, ...]
    approach: str
    bench: str = ""
    direction: tuple[float, float, float] = (0.0, 0.0, 0.0)  # the side as a unit vector, kit frame


# ---------------------------------------------------------------------------
# items


def solid_items(kit: Kit) -> tuple[Item, ...]:
    """Every part instance and solid component of the kit as prisms at rotation 0."""
    out = []
    for part in kit.parts:
        for i, pl in enumerate(part.placements):
            out.append(Item(f"{part.name}#{i + 1}", part.name, "part", pl.rotating,
                            (Prism(part.outline, part.thickness_mm, pl),)))
    for comp in kit.components:
        pieces = _component_prisms(comp, kit)
        if pieces:
            out.append(Item(comp.name, comp.name, "component", comp.rotating, pieces))
    return tuple(out)


def _component_prisms(comp: Component, kit: Kit) -> tuple[Prism, ...]:
    cx, cy, cz = comp.centre_mm
    if comp.shape == "box":
        dx, dy, dz = comp.size_mm
        ident = mat3(np.eye(3))
        body = Prism(shapely.box(-dx / 2, -dy / 2, dx / 2, dy / 2), dz, Placement(ident, (cx, cy, cz - dz / 2)))
        return (body, *_shafts(comp, kit))
    if comp.shape == "cylinder_x":
        length, diameter, _ = comp.size_mm
        rod = disc(0.0, 0.0, diameter / 2)  # the polygon the bores are cut from: a press bore meets it face to face
        r = mat3([[0.0, 0.0, 1.0], [1.0, 0.0, 0.0], [0.0, 1.0, 0.0]])  # local x -> kit y, y -> z, z -> x
        x0, x1 = cx - length / 2, cx + length / 2
        if comp.flat_mm > 0:  # a keyed rod: the D profile the keyed bores are cut from, and its round length
            xf = min(max(comp.flat_from_x_mm, x0), x1)
            pieces = [Prism(d_shape(0.0, 0.0, diameter, comp.flat_mm), x1 - xf, Placement(r, (xf, cy, cz)))]
            if xf > x0 + 1e-9:
                pieces.append(Prism(rod, xf - x0, Placement(r, (x0, cy, cz))))
            return tuple(pieces)
        return (Prism(rod, length, Placement(r, (x0, cy, cz))),)
    return ()  # a point mass has no shape to collide


def _shafts(comp: Component, kit: Kit) -> tuple[Prism, ...]:
    """A box component's output shaft: the bore of a fixed part facing +x on the box's own
    axis (a pinion on a motor), from that part to the box's face."""
    cx, cy, cz = comp.centre_mm
    face_x = cx - comp.size_mm[0] / 2
    out = []
    for part in kit.parts:
        for pl in part.placements:
            m = pl.matrix
            x, y, z = pl.translation_mm
            if (pl.rotating or abs(m[0, 2] - 1.0) > 1e-9 or abs(y - cy) > 1e-6 or abs(z - cz) > 1e-6
                    or x >= face_x):
                continue
            bore = next((Polygon(r) for r in part.outline.interiors if Polygon(r).contains(Point(0.0, 0.0))), None)
            if bore is not None:
                out.append(Prism(bore, face_x - x, Placement(pl.rotation, (x, y, z))))
    return tuple(out)


# ---------------------------------------------------------------------------
# directions: the kit's axes, then each plate's own normal and in-plane directions


def kit_directions(items: tuple[Item, ...]) -> tuple[tuple[str, tuple[float, float, float]], ...]:
    """The sides an item may come from: the kit's six axes, then, for every part plate that
    lies askew to them (a wedge's tilted ground plate), its normal and the two directions
    in its plane, each both ways. Opposite sides sit side by side (index k ^ 1)."""
    out = list(AXES)
    for it in items:
        if it.kind != "part":
            continue
        m = it.pieces[0].placement.matrix
        for col, tag in ((2, "n"), (0, "u"), (1, "v")):
            v = np.where(np.abs(m[:, col]) < 1e-12, 0.0, m[:, col])
            if any(np.allclose(v, d, atol=1e-9) or np.allclose(-v, d, atol=1e-9) for _, d in out):
                continue
            out.append((f"{it.part} +{tag}", (float(v[0]), float(v[1]), float(v[2]))))
            out.append((f"{it.part} -{tag}", (float(-v[0]) + 0.0, float(-v[1]) + 0.0, float(-v[2]) + 0.0)))
    return tuple(out)


def side_words(name: str, d: tuple[float, float, float]) -> str:
    """How a reader is told the side an item comes from: a kit axis by its name (SIDE), a
    plate's own direction by that plate's faces."""
    if name in SIDE:
        return SIDE[name]
    part, _, tag = name.rpartition(" ")
    if tag == "+n":
        return f"square to the {part}'s face, from its top side"
    if tag == "-n":
        return f"square to the {part}'s face, from its underside"
    return f"sliding along the {part}'s face"


# ---------------------------------------------------------------------------
# blocking: does A, moved along d from its place, run into B?


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


def _extents(p: Prism, qs: np.ndarray, d: np.ndarray,
             only: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray]:
    """For many lines q + s d (q: rows of ``qs``), the least and the greatest s inside the
    prism (NaN where a line misses it, or is not among ``only``): :func:`_extent` for
    arrays of lines."""
    m, t = p.placement.matrix, np.asarray(p.placement.translation_mm)
    l0 = (qs - t) @ m
    dl = m.T @ d
    n = len(qs)
    lo, hi = np.full(n, np.nan), np.full(n, np.nan)
    if abs(dl[2]) < 1e-12:
        ok = (l0[:, 2] > 0.0) & (l0[:, 2] < p.depth_mm)
        s0, s1 = np.full(n, -FAR_MM), np.full(n, FAR_MM)
    else:
        za, zb = (0.0 - l0[:, 2]) / dl[2], (p.depth_mm - l0[:, 2]) / dl[2]
        s0, s1 = np.minimum(za, zb), np.maximum(za, zb)
        ok = np.ones(n, dtype=bool)
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
    lines = shapely.linestrings(np.stack([a[idx], b[idx]], axis=1))
    shapely.prepare(p.outline)
    meets = shapely.intersects(lines, p.outline)  # a prepared test first: cutting lines is the cost
    idx, lines = idx[meets], lines[meets]
    if not len(idx):
        return lo, hi
    parts, which = shapely.get_parts(shapely.intersection(lines, p.outline), return_index=True)
    keep = (shapely.get_type_id(parts) == 1) & (shapely.length(parts) > 0.0)  # pieces of line, not touches
    coords, ci = shapely.get_coordinates(parts[keep], return_index=True)
    line = idx[which[keep][ci]]
    s = s0[line] + (s1 - s0)[line] * np.linalg.norm(coords - a[line], axis=1) / length[line]
    np.fmin.at(lo, line, s)
    np.fmax.at(hi, line, s)
    return lo, hi


class _Blocking:
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
            lo_a, _ = _extents(pa, qs, d)
            _, hi_b = _extents(pb, qs, d, ~np.isnan(lo_a))
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


# ---------------------------------------------------------------------------
# the order


def _natural_key(it: Item, box: np.ndarray) -> tuple:
    """The order a builder would try first: the fixed stand and what it carries, bottom up;
    the parts on the axle (the axle itself first); the turning frame bottom up; ties by name."""
    axial = all(abs(abs(p.placement.matrix[0, 2]) - 1.0) < 1e-9 for p in it.pieces)
    cat = 0 if not it.rotating else (1 if axial else 2)
    along_axle = 0 if (it.kind == "component" and cat == 1) else 1
    return (cat, along_axle, round(float(box[0, 2]), 3), round(float(box[0, 0]), 3), it.part, it.name)


class _Planner:
    def __init__(self, kit: Kit):
        self.items = solid_items(kit)
        self.directions = kit_directions(self.items)
        self.blk = _Blocking(self.items, self.directions)
        self.keys = [_natural_key(it, self.blk.boxes[i]) for i, it in enumerate(self.items)]
        from sheetgen.design.kit import MESHING

        self.hits = self.blk.masks(MESHING)
        self.joints = kit.joints
        self.components = kit.components
        self._completes: dict[tuple[frozenset[int], frozenset[int]], bool] = {}
        parts_joined = {frozenset((j.tab_part, j.slot_part)) for j in kit.joints}
        n = len(self.items)
        self.adjacent: dict[int, set[int]] = {i: set() for i in range(n)}
        for i in range(n):
            for j in range(i + 1, n):
                if frozenset((self.items[i].part, self.items[j].part)) in parts_joined and self._touch(i, j):
                    self.adjacent[i].add(j)
                    self.adjacent[j].add(i)

    def component(self, name: str) -> Component:
        return next(c for c in self.components if c.name == name)

    def _touch(self, i: int, j: int) -> bool:
        a, b = self.blk.boxes[i], self.blk.boxes[j]
        return bool(np.all(a[0] <= b[1] + 1e-6) and np.all(b[0] <= a[1] + 1e-6))

    def _components(self, rest: frozenset[int]) -> list[frozenset[int]]:
        seen: set[int] = set()
        out = []
        for i in sorted(rest, key=lambda x: self.keys[x]):
            if i in seen:
                continue
            comp, todo = {i}, [i]
            while todo:
                for j in self.adjacent[todo.pop()]:
                    if j in rest and j not in comp:
                        comp.add(j)
                        todo.append(j)
            seen |= comp
            if len(comp) > 1:
                out.append(frozenset(comp))
        return out

    def _way_out(self, group: frozenset[int], among: frozenset[int]) -> int | None:
        """The first side (index into the directions) the group can leave ``among`` by, or None."""
        others = sum(1 << i for i in among - group)
        for k in range(len(self.directions)):
            if not any(self.hits[k][a] & others for a in group):
                return k
        return None

    def completes(self, placed: frozenset[int], whole: frozenset[int]) -> bool:
        """The whole can be taken apart down to ``placed`` (so the rest can still go in)."""
        key = (placed, whole)
        if key not in self._completes:
            self._completes[key] = self._take_apart(placed, whole)
        return self._completes[key]

    def _take_apart(self, placed: frozenset[int], whole: frozenset[int]) -> bool:
        current = whole
        while current != placed:
            loose = current - placed
            step = next((frozenset((i,)) for i in sorted(loose, key=lambda x: self.keys[x])
                         if self._way_out(frozenset((i,)), current) is not None), None)
            if step is None:
                step = next((g for g in self._components(loose) if self._way_out(g, current) is not None), None)
            if step is None:
                return False
            current = current - step
        return True

    def _touches(self, i: int, placed: frozenset[int]) -> bool:
        """Item i rests against something placed (boxes touch and one stops the other)."""
        return any(self._touch(i, j) and any(self.hits[k][i] >> j & 1 for k in range(len(self.directions)))
                   for j in sorted(placed))

    def _pick(self, rest: frozenset[int], placed: frozenset[int], whole: frozenset[int]):
        """The next single item or bench group to put in, and the side it comes from.

        Candidates in natural order, those resting on something placed first within a
        category. When the first that fits would leave the rest unassemblable, the items
        it would shut out go first (the parts threaded on before the axle)."""
        cands = [frozenset((i,)) for i in rest] + self._components(rest)

        def key(g: frozenset[int]):
            k = min(self.keys[i] for i in g)
            return (k[0], not any(self._touches(i, placed) for i in g), len(g) > 1, k)

        cands.sort(key=key)
        ways = {g: self._way_out(g, placed | g) for g in cands}
        fits = [g for g in cands if ways[g] is not None]
        shut: frozenset[int] | None = None
        for g in fits:
            if self.completes(placed | g, whole):
                if shut is None:
                    return g, ways[g]
                break
            if shut is None and len(g) == 1:
                shut = g
        if shut is not None:
            for g in fits:
                if (len(g) == 1 and g != shut and self.completes(placed | g, whole)
                        and self._way_out(g, placed | g | shut) is None):
                    return g, ways[g]
        for g in fits:
            if self.completes(placed | g, whole):
                return g, ways[g]
        # no choice keeps every later item reachable: the first that fits now, then, where
        # nothing fits, the next single item with no straight path (the guide says so)
        singles = [g for g in fits if len(g) == 1]
        if singles:
            return singles[0], ways[singles[0]]
        return next(g for g in cands if len(g) == 1), None

    def order(self, whole: frozenset[int], bench: str = "") -> list[Move]:
        slots = {j.slot_part for j in self.joints}

        def root_key(i: int):
            # the part the others stand in (most joints' slot part), then the lowest
            it = self.items[i]
            others = {self.items[j].part for j in whole} - {it.part}
            held = sum(1 for j in self.joints if j.slot_part == it.part and j.tab_part in others)
            return (it.rotating, -held if it.part in slots else 0, self.keys[i])

        first = min(whole, key=root_key)
        placed = frozenset((first,))
        moves = [Move((self.items[first].name,), "", bench)]
        while placed != whole:
            rest = whole - placed
            g, k = self._pick(rest, placed, whole)
            names = tuple(self.items[i].name for i in sorted(g, key=lambda x: self.keys[x]))
            if len(g) > 1:
                moves += self.order(g, bench="+".join(sorted({self.items[i].part for i in g})))
            if k is None:
                moves.append(Move(names, NO_STRAIGHT_PATH, bench))
            else:
                moves.append(Move(names, self.directions[k][0], bench, self.directions[k][1]))
            placed = placed | g
        return moves


def part_steps(kit: Kit, moves: tuple[Move, ...] | None = None) -> dict[str, tuple[int, ...]]:
    """The step numbers each cut part is put in at (the numbering of :func:`assembly_steps`)."""
    moves = assembly_moves(kit) if moves is None else moves
    names = {p.name for p in kit.parts}
    out: dict[str, list[int]] = {}
    for number, (tag, mvs) in enumerate(_group_moves(moves), start=1):
        if tag == "group":
            continue
        for mv in mvs:
            for n in mv.items:
                part = n.split("#")[0]
                if part in names and number not in out.setdefault(part, []):
                    out[part].append(number)
    return {k: tuple(v) for k, v in out.items()}


def assembly_moves(kit: Kit) -> tuple[Move, ...]:
    """Every solid item of the kit, in an order that lets each reach its place."""
    planner = _Planner(kit)
    return tuple(planner.order(frozenset(range(len(planner.items)))))


# ---------------------------------------------------------------------------
# hardware the guide can see in the kit (the seam for a full hardware list)


@dataclass(frozen=True)
class GuideItem:
    """A bought item as the guide uses it: ``parts`` are the parts or components it
    joins or is (the step where the last of them lands is where it is fitted);
    ``final`` items are fitted when the kit is finished (anchors, counterweight)."""

    item: str
    spec: str
    qty_per_kit: int
    parts: tuple[str, ...] = ()
    final: bool = False


def guide_items(kit: Kit, spec) -> tuple[GuideItem, ...]:
    """The kit's hardware list (sheetgen.design.hardware) as the guide fits it: each item in
    the step where the last of the parts it joins lands; the rod, motor and panel with their
    own solids; anchor screws, the counterweight and carried items when the kit is finished."""
    from sheetgen.design.hardware import hardware_items

    solid_of = {"prices.axle_rod": "axle", "prices.motor": "motor", "prices.panel": "panel"}
    names = {c.name for c in kit.components}
    out = []
    for h in hardware_items(kit, spec):
        solid = solid_of.get(h.price_key)
        parts = (solid,) if solid in names else h.parts
        final = h.price_key in ("prices.anchor_screw", "prices.counterweight", "prices.payload") or not parts
        out.append(GuideItem(h.item, h.spec, h.qty_per_kit, tuple(parts), final))
    return tuple(out)


def _stacked(part) -> bool:
    """Several instances of one part lie face to face (layers to glue into one)."""
    if part.qty < 2:
        return False
    ws = [tuple(np.round(pl.matrix[:, 2], 9)) for pl in part.placements]
    if len(set(ws)) != 1:
        return False
    w = np.asarray(ws[0])
    offs = sorted(float(np.asarray(pl.translation_mm) @ w) for pl in part.placements)
    return all(abs(b - a - part.thickness_mm) < 1e-6 for a, b in zip(offs, offs[1:]))


# ---------------------------------------------------------------------------
# the steps


@dataclass(frozen=True)
class Step:
    """One step of the guide.

    ``parts``: (part, qty) of the cut parts put in; ``components``: solid components put
    in; ``hardware``: (item, qty) fitted here; ``new``: the instances put in (highlighted
    in the picture); ``shown``: every instance in the picture (the kit so far, or the
    group on the bench); ``approach``: the side the new items come from (a name of
    :func:`kit_directions`, '' for the first); ``bench``: true when the step builds a group apart from the kit."""

    number: int
    title: str
    how: str
    parts: tuple[tuple[str, int], ...]
    components: tuple[str, ...]
    hardware: tuple[tuple[str, int], ...]
    notes: tuple[str, ...]
    cautions: tuple[str, ...]
    new: tuple[str, ...]
    shown: tuple[str, ...]
    approach: str
    bench: bool = False


SIDE = {NO_STRAIGHT_PATH: "by tilting or flexing it past the parts already there (no straight path)",
        "+z": "from above", "-z": "from below", "+x": "from the drive end (+x)", "-x": "from the plain end (-x)",
        "+y": "from the +y side", "-y": "from the -y side", "": "flat on the bench"}

PRESS_NOTE = ("Press fit: press it home square with a vice or a clamp between two flat blocks, slowly and "
              "evenly; never hammer it.")
ACRYLIC_CAUTION = ("Press fits in acrylic crack: press slowly, support the part right round the bore, and stop "
                   "if white stress lines appear.")
PINCH_CAUTION = ("Pinch points: gears in mesh trap fingers. Keep the motor unpowered until the kit is finished "
                 "and keep fingers out of the mesh when turning the frame by hand.")
TURNING_CAUTION = ("The frame now turns on the axle and can swing down under its own weight: keep fingers out "
                   "of the gap between the frame and the supports.")
WIND_CAUTION = ("Outdoors the panel catches wind like a sail: screw the base down or ballast it as the balance "
                "check advises. Anything larger than a desk or classroom kit follows local codes for wind "
                "loads and the advice of a licensed engineer.")


def _group_moves(moves: tuple[Move, ...]) -> list[tuple[str, list[Move]]]:
    """Runs of moves that make one step: a bench group is one step (then the step that
    sets it in); consecutive moves of instances of one part from one side are one step."""
    out: list[tuple[str, list[Move]]] = []
    for mv in moves:
        part = mv.items[0].split("#")[0] if len(mv.items) == 1 else ""
        if mv.bench:
            if out and out[-1][0] == "bench:" + mv.bench:
                out[-1][1].append(mv)
            else:
                out.append(("bench:" + mv.bench, [mv]))
            continue
        tag = f"{part}|{mv.approach}" if part else "group"
        if part and out and out[-1][0] == tag:
            out[-1][1].append(mv)
        else:
            out.append((tag, [mv]))
    return out


def assembly_steps(kit: Kit, spec, hardware: tuple | None = None) -> tuple[Step, ...]:
    """The guide's steps: every cut part, solid component and hardware item in one of them.

    ``hardware``: the bought items (objects with ``item``, ``spec``, ``qty_per_kit`` and
    optionally ``parts``/``final``); by default :func:`guide_items`."""
    from sheetgen.design.kit import MESHING

    planner = _Planner(kit)
    moves = tuple(planner.order(frozenset(range(len(planner.items)))))
    hardware = guide_items(kit, spec) if hardware is None else hardware
    items = {it.name: it for it in planner.items}
    part_of = {name: it.part for name, it in items.items()}
    parts = {p.name: p for p in kit.parts}
    gears = {n for pair in MESHING for n in pair}
    acrylic = "acryl" in spec.sheet.material
    placed: list[str] = []
    first_step: dict[str, int] = {}
    raw: list[Step] = []
    for number, (tag, mvs) in enumerate(_group_moves(moves), start=1):
        new = [n for mv in mvs for n in mv.items]
        bench = tag.startswith("bench:")
        group = not bench and tag == "group"
        if group:
            shown = tuple(placed + new)
            fresh: list[str] = []
        else:
            shown = tuple(new) if bench else tuple(placed + new)
            fresh = new
        for n in fresh:
            first_step.setdefault(part_of[n], number)
        names = list(dict.fromkeys(part_of[n] for n in new))
        counts = () if group else tuple((p, sum(1 for n in new if part_of[n] == p)) for p in names if p in parts)
        comps = tuple(p for p in names if p not in parts)
        before = {part_of[n] for n in placed}
        title, how = _words(planner, mvs, names, placed, bench, group, number == 1)
        notes, cautions = [], []
        rods = _rods(planner)
        # a part presses on when the rod it grips is already there; else the rod presses through it later
        pressed = list(dict.fromkeys(
            part_of[n] for n in fresh if items[n].kind == "part" for r in rods
            if r in placed and _threaded(planner, planner.blk.index[n], r) and _grips(planner, n, r, kit)))
        gripping = list(dict.fromkeys(
            part_of[m] for n in fresh if n in rods for m in placed
            if items[m].kind == "part" and _threaded(planner, planner.blk.index[m], n) and _grips(planner, m, n, kit)))
        if gripping:
            notes.append(f"Press fit: the {' and '.join(gripping)} grip the rod. Push it through slowly and "
                         f"evenly (a vice or a clamp), backing each of them with a block so it stays square; "
                         f"never hammer.")
            pressed.append(gripping[0])
        elif pressed and not group:
            notes.append(PRESS_NOTE)
        if pressed and not group and acrylic:
            cautions.append(ACRYLIC_CAUTION)
        for p, q in counts:
            if q > 1 and _stacked(parts[p]):
                notes.append(f"Glue the {q} {p} layers face to face, aligned, before the glue sets.")
        tab_joints = [j for j in kit.joints if j.tab_part in names and (j.slot_part in before or j.slot_part in names)]
        tab_joints += [j for j in kit.joints if j.slot_part in names and j.tab_part in before]
        if tab_joints:
            fit = tab_joints[0].fit
            if fit == "press" and acrylic:
                cautions.append(ACRYLIC_CAUTION)
            notes.append("Tabs into slots: " + ("a press fit, close them with a clamp, never a hammer."
                                                if fit == "press" else "they go in by hand; square each joint "
                                                "before the next part."))
        if any(part_of[n] in gears for n in fresh) or (any(items[n].kind == "component" and not items[n].rotating
                                                        for n in fresh) and gears):
            cautions.append(PINCH_CAUTION)
        turning_now = any(items[n].rotating and items[n].kind == "component" and items[n].pieces
                          and abs(items[n].pieces[0].placement.matrix[0, 2]) > 0.5 for n in fresh)
        if turning_now:
            cautions.append(TURNING_CAUTION)
        raw.append(Step(number, title, how, counts, comps, (), tuple(notes), tuple(dict.fromkeys(cautions)),
                        tuple(new), shown, mvs[-1].approach, bench))
        if not bench:
            placed += [n for n in new if n not in placed]
    # hardware: in the step where the last of its parts lands; final items in a last step
    last = len(raw)
    where: dict[str, int] = {}
    for number, (_, mvs) in enumerate(_group_moves(moves), start=1):
        for mv in mvs:
            if not mv.bench:
                for n in mv.items:
                    where[part_of[n]] = number
    for name in [q.name for q in kit.parts] + [c.name for c in kit.components]:  # bench parts: their group
        where.setdefault(name, first_step.get(name, last))
    hw_at: dict[int, list[tuple[str, int]]] = {}
    finals: list = []
    for h in hardware:
        hp = tuple(getattr(h, "parts", ()) or ())
        if getattr(h, "final", False) or not hp or any(n not in where for n in hp):
            finals.append(h)
            continue
        hw_at.setdefault(max(where[n] for n in hp), []).append((h.item, h.qty_per_kit))
    steps = []
    for r in raw:
        hw = tuple(hw_at.get(r.number, ()))
        step_notes = r.notes
        if any(item == "bolt" for item, _ in hw):
            step_notes += ("Bolt the stack: a bolt through each hole, washer under the nut; tighten evenly, "
                           "snug, without crushing the sheet.",)
        steps.append(dataclasses.replace(r, hardware=hw, notes=step_notes))
    if finals:
        fin_parts = [h.item for h in finals]
        steps.append(Step(last + 1, "Finish and set up", "Fit the " + ", ".join(fin_parts) + "; set the kit where "
                          "it will stand and turn the frame by hand through its travel before powering the motor.",
                          (), (), tuple((h.item, h.qty_per_kit) for h in finals),
                          ("Fix the loose items where the spec gives them: the counterweight's place is what "
                           "the balance check assumed.",) if any("counterweight" in h.item for h in finals) else (),
                          (WIND_CAUTION, PINCH_CAUTION), (), tuple(placed), ""))
    else:
        steps[-1] = dataclasses.replace(steps[-1], cautions=steps[-1].cautions + (WIND_CAUTION,))
    return tuple(steps)


def _rods(planner: _Planner) -> set[str]:
    """Components that other items are threaded on: a rod, or a box with a shaft."""
    return {it.name for it in planner.items if it.kind == "component"
            and (len(it.pieces) > 1 or planner.component(it.name).shape == "cylinder_x")}


def _threaded(planner: _Planner, i: int, rod: str) -> bool:
    """Item i lies across the rod's line: the rod stops it every way in its own plane."""
    j = planner.blk.index[rod]
    w = planner.items[i].pieces[0].placement.matrix[:, 2]
    axis = "xyz"[int(np.argmax(np.abs(w)))]
    across = [k for k, (name, _) in enumerate(AXES) if name[1] != axis]
    return all(planner.hits[k][i] >> j & 1 for k in across)


def _grips(planner: _Planner, name: str, rod: str, kit: Kit) -> bool:
    """The instance's bore round the rod is cut tighter than drawn (a press fit on the rod)."""
    it = planner.items[planner.blk.index[name]]
    part = kit.part(it.part)
    pl = it.pieces[0].placement
    line = planner.items[planner.blk.index[rod]].pieces[-1].placement.translation_mm
    t = np.asarray(pl.translation_mm, dtype=float)
    local = pl.matrix.T @ (np.array([t[0], line[1], line[2]]) - t)
    at = Point(float(local[0]), float(local[1]))
    fit = part.outline_to_cut

    def bore(poly: Polygon) -> float:
        return next((Polygon(r).area for r in poly.interiors if Polygon(r).contains(at)), 0.0)

    return bore(fit) < bore(part.outline) - 1e-6


def _on(planner: _Planner, i: int, others: list[str], side: str) -> list[str]:
    """Of ``others``, the rods item i is threaded on or, for an item coming from above,
    the items it rests on (they stop it going down, touching)."""
    idx = planner.blk.index
    rods = _rods(planner)
    out = [n for n in others if n in rods and _threaded(planner, i, n)]
    if not out and side == "+z":
        down = next(k for k, (name, _) in enumerate(AXES) if name == "-z")
        out = [planner.items[idx[n]].part for n in others
               if planner.hits[down][i] >> idx[n] & 1 and planner._touch(i, idx[n])]
    return list(dict.fromkeys(out))


def _words(planner: _Planner, mvs, names, placed, bench, group, first) -> tuple[str, str]:
    """A step's title and how-to sentence, from what moves, from where, into what."""
    kit_joints = planner.joints
    side = mvs[-1].approach
    approach = side_words(side, mvs[-1].direction)
    what = " and ".join(names)
    before = {planner.items[planner.blk.index[n]].part for n in placed}
    if bench:
        tabs = [j for j in kit_joints if j.tab_part in names and j.slot_part in names]
        if tabs:
            return (f"On the bench: join the {what}",
                    f"Lay one {tabs[0].slot_part} flat; push the {tabs[0].tab_part} tabs into its slots, then press "
                    f"the other {tabs[0].slot_part} onto the free tab ends so the group stands square.")
        return f"On the bench: join the {what}", f"Put the {what} together {approach}."
    if group:
        below = sorted({j.slot_part for j in kit_joints if j.tab_part in names and j.slot_part in before})
        target = " and ".join(below) if below else "kit"
        return (f"Set the {what} group into the {target}",
                f"Bring the group {approach} and seat every tab in its slot.")
    if first:
        return f"Lay out the {what}", f"Put the {what} flat on the bench, top face up; everything else builds on it."
    i = planner.blk.index[mvs[0].items[0]]
    item = planner.items[i]
    into = sorted({j.slot_part for j in kit_joints if j.tab_part in names and j.slot_part in before})
    onto = sorted({j.tab_part for j in kit_joints if j.slot_part in names and j.tab_part in before})
    if into:
        return f"Fit the {what} into the {' and '.join(into)}", f"Bring it {approach} and push its tabs into the slots."
    if onto:
        tabs = " and ".join(onto)
        if side not in SIDE:  # a plate's own side, askew to the kit's axes
            return f"Fit the {what} onto the {tabs}", f"Press it onto the {tabs} tabs {approach}."
        return f"Fit the {what} onto the {tabs}", f"Lower it {approach} over the {tabs} tabs."
    if item.name in _rods(planner):
        passed = list(dict.fromkeys(planner.items[planner.blk.index[n]].part for n in placed
                                    if _threaded(planner, planner.blk.index[n], item.name)))
        if passed:
            rod = "shaft of the " + what if planner.component(item.name).shape == "box" else what
            return (f"Push the {rod} through the {', '.join(passed)}",
                    f"Bring it {approach} and slide it through the holes of the {', '.join(passed)} in turn.")
    on = _on(planner, i, list(placed), side)
    comps = [n for n in placed if n in _rods(planner) and _threaded(planner, i, n)]
    if comps:
        shaft = f"{comps[0]} shaft" if planner.component(comps[0]).shape == "box" else comps[0]
        return f"Put the {what} on the {shaft}", f"Slide it on {approach}."
    later = [it for it in planner.items if it.name in _rods(planner) and it.name not in placed
             and _threaded(planner, i, it.name)]
    if later:
        return (f"Stand the {what} in line",
                f"Bring it in {approach} and hold it in line with the holes either side; the {later[0].name} goes "
                f"through it in a later step.")
    if on:
        return f"Fit the {what} on the {' and '.join(on)}", f"Bring it {approach} onto the {' and '.join(on)}."
    return f"Fit the {what}", f"Bring it into place {approach}."
