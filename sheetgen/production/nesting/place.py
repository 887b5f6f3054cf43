"""Placement: parts one after another on candidate positions.

Every part in a sequence goes to the free position that scores best under a
placement rule (:data:`RULES`; mostly furthest left, then lowest: layouts grow
along +x, so that the unused end of a sheet is one rectangle). The free
positions of a shape on a
sheet are the *feasible region*: the inner-fit rectangle minus the no-fit
polygons of the parts already there, each moved to its part's position. The
best position is a vertex of that region (the score is linear), and the
vertices include every no-fit-polygon vertex and every crossing of two no-fit
polygons that is free; holes of a no-fit polygon, where a small part sits in a
window of a large one, are part of the region like any other free area.

The region of each shape on each sheet is kept and only cut down by the parts
placed since it was last used, so repeated shapes cost little. Once a shape's
region on a sheet is empty it stays empty. No-fit polygons are cached per pair
of distinct outlines (copies and symmetric angles share one entry), and are
computed on the parts' clearance outlines (:func:`~sheetgen.production.nesting.nfp.clearance_outline`:
grown by half the spacing, finely drawn outlines coarsened outward).

Regions are computed with pyclipper on one integer grid per run (the largest
size spans about 2**42 grid units, so for a 1 m sheet a unit is about 2e-10 mm);
positions are grid points, so moving a no-fit polygon to a part is exact.

Touching positions: a no-fit polygon's boundary is allowed, and exact fits
(a part exactly as wide as a gap) are a line or a point of the region, which
polygon clipping would drop. Each no-fit polygon is therefore shrunk by a tiny
``eps`` (1e-10 of the working size) and the inner-fit rectangle grown by it, so
such positions keep a sliver of area; the chosen position is then clamped
back into the inner-fit rectangle. Parts may thus overlap by up to a few eps,
far below the verification tolerance (:mod:`sheetgen.production.nesting.verify`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import pyclipper
import shapely
from shapely.geometry import Polygon

from sheetgen.errors import GeometryBug
from sheetgen.production.nesting.nfp import clearance_outline, fast_nfp_paths, shape_of

# Placement rules (y weight, width weight): the score of a reference point
# (px, py) of a shape of width w is px + y_weight * py + width_weight * w. The
# first is "leftmost, then lowest, and of two angles the narrower"; others
# prefer the wider angle on ties (so that long parts lie along x and rows stack)
# or lean towards filling the bottom first. The search picks the rule together
# with the order.
RULES = ((1e-3, 1e-9), (1e-3, -1e-9), (0.1, 1e-9), (0.3, -1e-9), (1e3, 1e-9))


@dataclass(frozen=True)
class Shape:
    """One part outline at one angle, bounding box at the origin."""

    polygon: Polygon
    angle_deg: float
    offset: tuple[float, float]   # lower-left of the turned polygon's bounding box
    width: float
    height: float
    area: float
    canon: int                    # id of the geometrically identical shape used for caching


def _shape_key(poly: Polygon) -> tuple:
    coords = np.round(shapely.get_coordinates(shapely.normalize(poly)), 9)
    return tuple(coords.ravel().tolist()) + (len(poly.interiors),)


class ShapeLibrary:
    """All shapes of a run, with the no-fit polygons between them cached.

    ``item_shapes[i]`` lists the shape ids of item i, one per distinct allowed
    angle (angles giving the same outline, such as 0 and 180 for a rectangle,
    are merged). Geometrically identical shapes of different items share one
    cache entry. ``scale`` is grid units per mm; ``eps`` is in mm.
    """

    def __init__(self, polygons, rotations, spacing: float, eps: float, ref_size: float):
        self.spacing = float(spacing)
        self.eps = float(eps)
        self.scale = 2.0 ** math.floor(math.log2(2.0**42 / ref_size))
        self.eps_units = max(2, int(round(self.eps * self.scale)))
        self.shapes: list[Shape] = []
        self.item_shapes: list[tuple[int, ...]] = []
        canon_of: dict[tuple, int] = {}
        for poly, angles in zip(polygons, rotations):
            ids: list[int] = []
            seen: set[tuple] = set()
            for angle in angles:
                sh, off = shape_of(poly, angle)
                key = _shape_key(sh)
                if key in seen:
                    continue
                seen.add(key)
                canon = canon_of.setdefault(key, len(canon_of))
                x0, y0, x1, y1 = sh.bounds
                self.shapes.append(Shape(sh, float(angle), off, x1 - x0, y1 - y0, sh.area, canon))
                ids.append(len(self.shapes) - 1)
            self.item_shapes.append(tuple(ids))
        self._canon_rep: dict[int, int] = {}
        for i, s in enumerate(self.shapes):
            self._canon_rep.setdefault(s.canon, i)
        # clearance outlines (grown by half the spacing, coarsened if finely drawn), same frame as the shape
        self._outline = {c: clearance_outline(self.shapes[i].polygon, self.spacing / 2)
                         for c, i in self._canon_rep.items()}
        self._nfp: dict[tuple[int, int], tuple] = {}
        # clearance outline bounds in grid units, for a no-fit polygon's box before computing it
        self._obox = {c: tuple(v * self.scale for v in o.bounds) for c, o in self._outline.items()}
        self._hulls: list[float] | None = None
        self.nfp_computed = 0
        self.work: Work | None = None  # charged for the no-fit polygons computed
        # pairs (:mod:`~sheetgen.production.nesting.pairs`): composite shape id -> (real item, ((shape id, dx, dy),
        # ...) grid offsets of its parts), and real item -> its pair item (None: no pair worth offering)
        self.composites: dict[int, tuple[int, tuple[tuple[int, int, int], ...]]] = {}
        self.pair_items: dict[int, int | None] = {}
        self.composite_items: set[int] = set()   # the pair items
        self._next_canon = len(canon_of)
        self._composite_keys: dict[tuple, int] = {}     # (item, outline) -> composite shape id
        self._composite_canons: dict[tuple, int] = {}   # outline -> its canonical id (shared by twin items)

    def add_composite(self, item: int, parts: tuple[tuple[int, int, int], ...]) -> int | None:
        """A shape made of shapes of ``item`` at grid offsets ``parts``
        ((shape id, dx, dy), each offset of its reference point from the
        composite's lower-left corner): its clearance outline is the union of
        theirs, so it keeps their windows; area and box are the parts'. Returns
        its shape id (the same id when this item's composite of that outline was
        registered before), or None when the outlines do not join into one polygon."""
        outs = []
        for sid, dx, dy in parts:
            shift = np.array([dx, dy], dtype=float) / self.scale
            outs.append(shapely.transform(self._outline[self.shapes[sid].canon], _shifted(shift)))
        outline = shapely.union_all(outs)
        if not isinstance(outline, Polygon):
            return None
        geometry = _shape_key(outline)
        hit = self._composite_keys.get((item, geometry))
        if hit is not None:
            return hit
        width = max(dx / self.scale + self.shapes[sid].width for sid, dx, _dy in parts)
        height = max(dy / self.scale + self.shapes[sid].height for sid, _dx, dy in parts)
        # a composite of the same outline made for another item (two items of one shape) shares its
        # no-fit polygons, never its shape id: a shape id stands for the parts of one item
        canon = self._composite_canons.get(geometry)
        twin = canon is not None
        if canon is None:
            canon = self._next_canon
            self._next_canon += 1
            self._composite_canons[geometry] = canon
        first = self.shapes[parts[0][0]]
        # the polygon of a composite is its clearance outline (one polygon, holding the parts' windows);
        # its area is the parts' own
        self.shapes.append(Shape(outline, first.angle_deg, first.offset, width, height,
                                 sum(self.shapes[sid].area for sid, _dx, _dy in parts), canon))
        sid_new = len(self.shapes) - 1
        if not twin:
            self._canon_rep[canon] = sid_new
            self._outline[canon] = outline
            self._obox[canon] = tuple(v * self.scale for v in outline.bounds)
        self.composites[sid_new] = (item, tuple(parts))
        self._composite_keys[(item, geometry)] = sid_new
        return sid_new

    def parts_of(self, item: int) -> list[int]:
        """The real items an item stands for: itself, or a pair item's two copies."""
        if item not in self.composite_items:
            return [item]
        real, parts = self.composites[self.item_shapes[item][0]]
        return [real] * len(parts)

    def add_item(self, shape_ids: tuple[int, ...]) -> int:
        """One more item made of the given (composite) shapes; returns its index."""
        self.item_shapes.append(tuple(shape_ids))
        self._hulls = None
        self.composite_items.add(len(self.item_shapes) - 1)
        return len(self.item_shapes) - 1

    def hull_areas(self) -> list[float]:
        """Per item, the area of its outline's convex hull (computed once)."""
        if self._hulls is None:
            self._hulls = [self.shapes[ids[0]].polygon.convex_hull.area for ids in self.item_shapes]
        return self._hulls

    def nfp_box(self, fixed: int, moving: int) -> tuple[int, int, int, int]:
        """A box in grid units that contains the no-fit polygon of two shape ids
        (the exact one when it is cached, otherwise the bounds of fixed (+)
        (-moving) from the clearance outlines' boxes, two grid units wider):
        a placed part whose box misses a region cuts nothing from it, and its
        no-fit polygon need not be computed."""
        key = (self.shapes[fixed].canon, self.shapes[moving].canon)
        hit = self._nfp.get(key)
        if hit is not None:
            return hit[2]
        ax0, ay0, ax1, ay1 = self._obox[key[0]]
        bx0, by0, bx1, by1 = self._obox[key[1]]
        return (math.floor(ax0 - bx1) - 2, math.floor(ay0 - by1) - 2, math.ceil(ax1 - bx0) + 2,
                math.ceil(ay1 - by0) + 2)

    def nfp(self, fixed: int, moving: int):
        """The shrunk no-fit polygon of two shape ids, in grid units: (all vertices
        as an (n, 2) int64 array, (start, end) of each ring in it, bounds)."""
        key = (self.shapes[fixed].canon, self.shapes[moving].canon)
        hit = self._nfp.get(key)
        if hit is None:
            a = self._outline[key[0]]
            b = self._outline[key[1]]
            paths, quads = fast_nfp_paths(a, b, self.scale)
            # closed first (grown, then shrunk as much again): a sum of edge sweeps may keep a crack
            # of no width where the sweeps of two parallel edges only touch, and the crack, widened
            # by the shrink below, would be a free place with one part inside the other. Slots and
            # holes narrower than 2 eps go with it (fits tighter than 1e-10 of the working size)
            off = pyclipper.PyclipperOffset()
            off.MiterLimit = 5.0
            off.AddPaths(paths, pyclipper.JT_MITER, pyclipper.ET_CLOSEDPOLYGON)
            paths = off.Execute(self.eps_units)
            off = pyclipper.PyclipperOffset()
            off.MiterLimit = 5.0
            off.AddPaths(paths, pyclipper.JT_MITER, pyclipper.ET_CLOSEDPOLYGON)
            paths = off.Execute(-2 * self.eps_units)
            cuts, k = [], 0
            for p in paths:
                cuts.append((k, k + len(p)))
                k += len(p)
            if paths:
                flat = np.array([v for p in paths for v in p], dtype=np.int64)
                mn, mx = flat.min(axis=0), flat.max(axis=0)
                bounds = (int(mn[0]), int(mn[1]), int(mx[0]), int(mx[1]))
            else:  # cannot happen for polygons of positive area; kept safe
                flat, bounds = np.zeros((0, 2), dtype=np.int64), (0, 0, -1, -1)
            hit = (flat, tuple(cuts), bounds)
            self._nfp[key] = hit
            self.nfp_computed += 1
            if self.work is not None:
                self.work.add(NFP_UNITS * quads)
        return hit


def _shifted(shift: np.ndarray):
    """A coordinate transform adding ``shift`` (for shapely.transform)."""
    def move(xy: np.ndarray) -> np.ndarray:
        return xy + shift
    return move


class Work:
    """A deterministic measure of the work done (vertices handled by clipping
    plus a fixed charge per placement attempt), used to turn a time limit
    into a reproducible budget."""

    __slots__ = ("units",)

    def __init__(self):
        self.units = 0

    def add(self, n: int) -> None:
        self.units += n


# Work charges, fitted to wall time on the project's machine over the benchmark
# instances and a 20-kit run (per placement attempt, per placed part checked
# against a region, per no-fit-polygon vertex pair; one unit per vertex clipped).
ATTEMPT_UNITS = 18
CHECK_UNITS = 16
NFP_UNITS = 16


# Clipper paths in grid units: a list of closed paths, each a list of [x, y] points.
ClipperPaths = list[list[list[int]]]
# A shape's feasible region on a sheet: (paths, all their vertices as an (n, 2)
# int64 array, their bounding box in grid units, placed parts already cut from it);
# when nothing fits the paths are empty and vertices and box are None.
Region = tuple[ClipperPaths, np.ndarray | None, tuple[int, int, int, int] | None, int]


class Sheet:
    """One sheet (or the strip) being filled. Persistent: :meth:`with_part`
    returns a new sheet, so earlier states can be kept as snapshots.

    ``usable`` is in mm; positions are kept in grid units.
    """

    __slots__ = ("lib", "usable", "placed", "regions", "area", "x_max")

    def __init__(self, lib: ShapeLibrary, usable: tuple[float, float, float, float],
                 placed: tuple = (), regions: dict | None = None, area: float = 0.0, x_max: float = -math.inf):
        self.lib = lib
        self.usable = usable
        self.placed = placed          # ((shape id, px units, py units), ...)
        self.regions: dict[int, Region] = regions if regions is not None else {}  # canon id -> region
        self.area = area
        self.x_max = x_max

    def _fit_rect(self, sh: Shape) -> tuple[int, int, int, int] | None:
        """Exact inner-fit rectangle in grid units (reference points), or None."""
        x0, y0, x1, y1 = self.usable
        s = self.lib.scale
        r = (math.ceil(x0 * s), math.ceil(y0 * s), math.floor((x1 - sh.width) * s), math.floor((y1 - sh.height) * s))
        if r[2] < r[0] or r[3] < r[1]:
            return None
        return r

    def region(self, shape_id: int, work: Work) -> tuple[ClipperPaths, np.ndarray | None]:
        """The up-to-date feasible region of a shape: (clipper paths, all their
        vertices as an (n, 2) int64 array); empty paths (and None) when nothing fits."""
        sh = self.lib.shapes[shape_id]
        entry = self.regions.get(sh.canon)
        paths: ClipperPaths
        xy: np.ndarray | None
        bounds: tuple[int, int, int, int] | None
        if entry is None:
            r = self._fit_rect(sh)
            if r is None:
                paths, xy, bounds, applied = [], None, None, len(self.placed)
            else:
                e = self.lib.eps_units
                bounds = (r[0] - e, r[1] - e, r[2] + e, r[3] + e)
                paths = [[[bounds[0], bounds[1]], [bounds[2], bounds[1]], [bounds[2], bounds[3]],
                          [bounds[0], bounds[3]]]]
                xy = np.array(paths[0], dtype=np.int64)
                applied = 0
        else:
            paths, xy, bounds, applied = entry
        # non-empty paths always come with their vertices and box
        if applied < len(self.placed) and paths and xy is not None and bounds is not None:
            work.add(CHECK_UNITS * (len(self.placed) - applied))
            rx0, ry0, rx1, ry1 = bounds
            cut: ClipperPaths = []
            nverts = 0
            for sid, px, py in self.placed[applied:]:
                nb = self.lib.nfp_box(sid, shape_id)
                if nb[0] + px >= rx1 or nb[2] + px <= rx0 or nb[1] + py >= ry1 or nb[3] + py <= ry0:
                    continue  # the box holds the no-fit polygon: nothing to cut, nothing to compute
                flat, cuts, nb = self.lib.nfp(sid, shape_id)
                if nb[0] + px >= rx1 or nb[2] + px <= rx0 or nb[1] + py >= ry1 or nb[3] + py <= ry0:
                    continue
                moved = (flat + np.array([px, py], dtype=np.int64)).tolist()
                cut.extend(moved[i:j] for i, j in cuts)
                nverts += len(flat)
            if cut:
                work.add(nverts + len(xy))
                pc = pyclipper.Pyclipper()
                pc.AddPaths(paths, pyclipper.PT_SUBJECT, True)
                pc.AddPaths(cut, pyclipper.PT_CLIP, True)
                paths = pc.Execute(pyclipper.CT_DIFFERENCE, pyclipper.PFT_NONZERO, pyclipper.PFT_NONZERO)
                if paths:
                    xy = np.array([v for p in paths for v in p], dtype=np.int64)
                    mn, mx = xy.min(axis=0), xy.max(axis=0)
                    bounds = (int(mn[0]), int(mn[1]), int(mx[0]), int(mx[1]))
                else:
                    xy, bounds = None, None
            applied = len(self.placed)
        if entry is None or entry[3] != applied:
            self.regions = {**self.regions, sh.canon: (paths, xy, bounds, applied)}
        return paths, xy

    def best_position(self, shape_id: int, work: Work, y_weight: float = RULES[0][0]):
        """(score, px, py) of the best free position in grid units, or None."""
        paths, xy = self.region(shape_id, work)
        work.add(ATTEMPT_UNITS)
        if not paths or xy is None:  # no paths, no vertices (the two go together)
            return None
        work.add(len(xy))
        s = xy[:, 0] + y_weight * xy[:, 1]
        k = int(np.argmin(s))
        r = self._fit_rect(self.lib.shapes[shape_id])
        if r is None:
            raise GeometryBug(f"shape {shape_id}: a free region on a sheet it does not fit")
        px = min(max(int(xy[k, 0]), r[0]), r[2])
        py = min(max(int(xy[k, 1]), r[1]), r[3])
        return float(s[k]) / self.lib.scale, px, py

    def with_part(self, shape_id: int, px: int, py: int) -> "Sheet":
        sh = self.lib.shapes[shape_id]
        return Sheet(self.lib, self.usable, self.placed + ((shape_id, px, py),), self.regions,
                     self.area + sh.area, max(self.x_max, px / self.lib.scale + sh.width))


def place_one(sheet: Sheet, shape_ids, work: Work, rule: tuple[float, float] = RULES[0]):
    """Best (score, shape id, px, py) over the given shapes on one sheet under
    ``rule`` (see RULES), or None."""
    y_weight, width_weight = rule
    best = None
    for sid in shape_ids:
        hit = sheet.best_position(sid, work, y_weight)
        if hit is None:
            continue
        score, px, py = hit
        key = (score + width_weight * sheet.lib.shapes[sid].width, sid)
        if best is None or key < best[0]:
            best = (key, sid, px, py)
    if best is None:
        return None
    return best[0][0], best[1], best[2], best[3]
