"""Tab-and-slot joints generated from the two parts' placements.

A tab grows out of an edge of one part (the *tab part*) and passes through the
other part (the *slot part*), whose face the edge rests on. The tabs are laid
out along the edge in the tab part's own plane; each tab's solid is carried
through both placements into the slot part's plane, where its footprint is the
slot. So a slot is always where its tab is, and a change of sheet thickness
flows to every tab depth and slot width.

Nominal geometry matches exactly (slot = tab footprint). The fit class lives in
the *fit outline* only: each slot is offset by the fit's clearance per side
(negative = interference). Kerf compensation is applied after that.

Fit allowances per side, slot against tab, after kerf compensation
(common practice for laser-cut 3 mm wood and acrylic, as taught in university
laser-lab notes: press fits want about 0.025 to 0.05 mm interference per side):

- press: -0.04 mm (interference; tap together, holds without glue)
- snug:   0.00 mm (line to line; pushes together by hand, glue recommended)
- slip:  +0.08 mm (clearance; slides in, for parts taken apart again)
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import shapely
from shapely.geometry import Polygon

from sheetgen.errors import GeometryBug, ParameterError
from sheetgen.geometry.placement import Placement



class TabMissesSlot(GeometryBug):
    """This tab placement does not pass through this slot part placement. The kit
    builder tries every pair and skips these; one that escapes is a bug (exit 3)."""


FIT_CLEARANCE_MM = {"press": -0.04, "snug": 0.0, "slip": 0.08}


def fit_clearance_mm(fit: str) -> float:
    try:
        return FIT_CLEARANCE_MM[fit]
    except KeyError:
        raise ParameterError(f"fit {fit!r}: must be one of {', '.join(FIT_CLEARANCE_MM)}") from None


def default_tab_width_mm(thickness_mm: float, tab_width_mm: float = 0.0) -> float:
    """Tab width along the edge: as given, else three sheet thicknesses, at least 6 mm."""
    return tab_width_mm if tab_width_mm > 0 else max(3.0 * thickness_mm, 6.0)


def tab_layout(edge_length_mm: float, thickness_mm: float, tab_width_mm: float = 0.0) -> tuple[tuple[float, ...], float]:
    """Tab centres (distance from the edge's start) and the tab width.

    Tabs keep an end distance of one tab width from each end of the edge
    (so corners of the slot part keep their material), and stand at least
    one tab width apart; the count grows with the edge: one tab per ~4 widths.
    """
    w = default_tab_width_mm(thickness_mm, tab_width_mm)
    usable = edge_length_mm - 2 * w
    if usable < w:
        # short edge: one tab, half the edge wide
        w = max(min(w, edge_length_mm / 2), thickness_mm)
        return ((edge_length_mm / 2,), w)
    n = max(1, int((usable + w) // (4 * w)) + 1)
    n = min(n, max(1, int((usable + w) // (2 * w))))
    if n == 1:
        return ((edge_length_mm / 2,), w)
    step = (usable - w) / (n - 1)
    return (tuple(w + w / 2 + i * step for i in range(n)), w)


@dataclass(frozen=True)
class Edge:
    """A straight edge of a part's outline in its own plane, with the side
    the tabs grow toward (+1: left of p0->p1, -1: right)."""

    p0: tuple[float, float]
    p1: tuple[float, float]
    side: int

    @property
    def length_mm(self) -> float:
        return math.dist(self.p0, self.p1)


def tab_rects(edge: Edge, centres: tuple[float, ...], width_mm: float, depth_mm: float) -> list[Polygon]:
    """Tab rectangles along ``edge`` in the tab part's plane."""
    p0 = np.asarray(edge.p0, dtype=float)
    d = (np.asarray(edge.p1, dtype=float) - p0) / edge.length_mm
    n = np.array([-d[1], d[0]]) * edge.side
    out = []
    for c in centres:
        a = p0 + d * (c - width_mm / 2)
        b = p0 + d * (c + width_mm / 2)
        out.append(Polygon([tuple(a), tuple(b), tuple(b + n * depth_mm), tuple(a + n * depth_mm)]))
    return out


def slot_footprint(tab: Polygon, tab_thickness_mm: float, tab_at: Placement, slot_at: Placement,
                   slot_thickness_mm: float) -> Polygon:
    """Where a tab (a rectangle in its part's plane, ``tab_thickness_mm`` thick)
    pierces the slot part: its footprint in the slot part's plane.

    Raises :class:`TabMissesSlot` if the tab does not pass squarely through the slot part.
    """
    xy = np.asarray(tab.exterior.coords[:-1], dtype=float)
    corners = np.vstack([np.column_stack([xy, np.zeros(len(xy))]),
                         np.column_stack([xy, np.full(len(xy), tab_thickness_mm)])])
    kit = tab_at.apply(corners)
    local = (kit - np.asarray(slot_at.translation_mm)) @ slot_at.matrix  # inverse of a rotation
    z = local[:, 2]
    if z.min() < -1e-6 or z.max() > slot_thickness_mm + 1e-6:
        raise TabMissesSlot(f"tab spans z {z.min():.3f}..{z.max():.3f} in the slot part, not 0..{slot_thickness_mm:g}")
    footprint = shapely.convex_hull(shapely.multipoints(np.round(local[:, :2], 9)))
    if not isinstance(footprint, Polygon) or footprint.area <= 0:
        raise TabMissesSlot("tab has no footprint in the slot part (the parts do not cross)")
    return footprint


def fit_slot(slot: Polygon, fit: str) -> Polygon:
    """The slot with the fit class applied (offset per side, corners kept)."""
    c = fit_clearance_mm(fit)
    if c == 0:
        return slot
    return slot.buffer(c, join_style="mitre", mitre_limit=10.0)
