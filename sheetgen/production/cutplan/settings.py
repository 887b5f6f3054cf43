"""Cut planning: the laser's settings, the planned contour and the plan's figures."""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from sheetgen.errors import ParameterError
from sheetgen.geometry.contour import Contour

HOME_MM = (0.0, 0.0)
CIRCLE_CANDIDATES = 64  # start points tried on a circle before refinement
CIRCLE_FINE = 180  # samples on a circle before golden-section refinement
MAX_RING_CANDIDATES = 96  # start points tried on a ring: every k-th vertex of longer ones
CIRCLE_QUAD_SEGS = 64  # polygon approximation of a circle for containment
MIN_GAIN_MM = 1e-9
MAX_ROUNDS = 8  # order improvement <-> start point choice alternations
MAX_SWEEPS = 200  # 2-opt / Or-opt sweeps per round (a bound, rarely reached)
OR_OPT_MAX_LEN = 3
LEAD_IN_FRACTIONS = (1.0, 0.5, 0.25)
ROUND_DIGITS = 6


@dataclass(frozen=True)
class LaserSettings:
    """What the laser needs to know to time and price a sheet.

    ``rate_per_h`` (machine rate, currency per hour) and ``sheet_price``
    (currency per sheet) are optional: None or 0 means not given. The cost is
    None when neither is given.
    """

    cut_speed_mm_s: float
    rapid_speed_mm_s: float
    pierce_time_s: float
    lead_in_mm: float = 0.0
    rate_per_h: float | None = None
    sheet_price: float | None = None

    def __post_init__(self):
        _check_number("laser.cut_speed", self.cut_speed_mm_s, "above 0 mm/s", lambda v: v > 0)
        _check_number("laser.rapid_speed", self.rapid_speed_mm_s, "above 0 mm/s", lambda v: v > 0)
        _check_number("laser.pierce_time", self.pierce_time_s, "at least 0 s", lambda v: v >= 0)
        _check_number("laser.lead_in", self.lead_in_mm, "at least 0 mm", lambda v: v >= 0)
        if self.rate_per_h is not None:
            _check_number("laser.rate", self.rate_per_h, "at least 0 per hour", lambda v: v >= 0)
        if self.sheet_price is not None:
            _check_number("sheet.price", self.sheet_price, "at least 0", lambda v: v >= 0)


def _check_number(key: str, value, allowed: str, ok) -> None:
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value) or not ok(value):
        raise ParameterError(f"{key} = {value!r}: must be a finite number {allowed}")


def settings_from_spec(spec) -> LaserSettings:
    """Laser settings from a validated :class:`sheetgen.design.schema.Spec`."""
    rate = spec.value("laser.rate")
    price = spec.value("sheet.price")
    return LaserSettings(
        cut_speed_mm_s=spec.value("laser.cut_speed"),
        rapid_speed_mm_s=spec.value("laser.rapid_speed"),
        pierce_time_s=spec.value("laser.pierce_time"),
        lead_in_mm=spec.value("laser.lead_in"),
        rate_per_h=rate or None,
        sheet_price=price or None,
    )


@dataclass(frozen=True)
class PlannedContour(Contour):
    """A contour as it is cut: a ring rotated so that ``points[0]`` is its
    start, or a circle with its ``start`` point, and the pierce point
    ``lead_in`` when it has a lead-in.

    The beam pierces at ``lead_in`` (or at ``start`` when there is none), cuts
    straight to ``start``, round the contour and back to ``start``.
    """

    start: tuple[float, float] = (0.0, 0.0)
    lead_in: tuple[float, float] | None = None

    @property
    def pierce(self) -> tuple[float, float]:
        return self.lead_in if self.lead_in is not None else self.start

    @property
    def end(self) -> tuple[float, float]:
        return self.start

    @property
    def perimeter_mm(self) -> float:
        return contour_perimeter_mm(self)

    @property
    def lead_in_length_mm(self) -> float:
        if self.lead_in is None:
            return 0.0
        return math.dist(self.lead_in, self.start)


@dataclass(frozen=True)
class CutPlan:
    """The cut plan of one sheet. ``order[k]`` is the index, in the list given to
    :func:`plan_sheet`, of the k-th contour cut."""

    contours: tuple[PlannedContour, ...]
    order: tuple[int, ...]
    pierces: int
    cut_length_mm: float
    travel_mm: float
    travel_unplanned_mm: float
    cut_time_s: float
    cost: float | None
    lead_ins: int = 0

    @property
    def travel_saved_mm(self) -> float:
        return self.travel_unplanned_mm - self.travel_mm


def contour_perimeter_mm(contour: Contour) -> float:
    """Length of one closed contour (a ring's closing edge included)."""
    if contour.circle is not None:
        return 2.0 * math.pi * contour.circle[2]
    pts = contour.points
    return sum(math.dist(pts[i], pts[(i + 1) % len(pts)]) for i in range(len(pts)))


def path_travel_mm(contours: Sequence[PlannedContour], home: tuple[float, float] = HOME_MM) -> float:
    """Rapid travel from ``home`` through the contours in the order given."""
    total = 0.0
    here = home
    for c in contours:
        total += math.dist(here, c.pierce)
        here = c.end
    return total


def cut_plan_contours(plan: CutPlan) -> list[Contour]:
    """The plan's contours in cut order, for the DXF writer (entity order on
    layer CUT is the cut order). Each is a :class:`PlannedContour`: a
    :class:`Contour` that also carries its start point and lead-in."""
    return list(plan.contours)

def _circle_point(circle, angle: float) -> np.ndarray:
    """Point of a circle at ``angle`` (radians), rounded as it will be written:
    the planner works on the written coordinates, so its figures are exact."""
    cx, cy, r = circle
    return np.round(np.array([cx + r * math.cos(angle), cy + r * math.sin(angle)]), ROUND_DIGITS) + 0.0

def _round_pt(p) -> tuple[float, float]:
    return (round(float(p[0]), ROUND_DIGITS) + 0.0, round(float(p[1]), ROUND_DIGITS) + 0.0)

def _planned(contour: Contour, start, lead_in=None) -> PlannedContour:
    if contour.is_circle:
        return PlannedContour(circle=contour.circle, start=_round_pt(start), lead_in=lead_in)
    pts = tuple((x, y) for x, y in contour.points)
    k = min(range(len(pts)), key=lambda i: (pts[i][0] - start[0]) ** 2 + (pts[i][1] - start[1]) ** 2)
    rotated = pts[k:] + pts[:k]
    return PlannedContour(points=rotated, start=rotated[0], lead_in=lead_in)
