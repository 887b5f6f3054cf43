"""Data of the nester: what goes in (:class:`NestItem`) and what comes out."""

from __future__ import annotations

from dataclasses import dataclass

from shapely.geometry import Polygon


@dataclass(frozen=True)
class NestItem:
    """A part to nest.

    ``polygon`` is the CUT outline (kerf already applied) in any position; holes
    are allowed and smaller parts may be nested inside them. ``rotations_deg``
    lists the allowed turns (counter-clockwise, degrees).
    """

    name: str
    polygon: Polygon
    qty: int
    rotations_deg: tuple[float, ...] = (0.0,)


@dataclass(frozen=True)
class PlacedPart:
    """One copy on a sheet. The placed polygon is the item's polygon turned CCW
    by ``angle_deg`` about (0, 0), then moved by (``x_mm``, ``y_mm``)."""

    item: int
    copy: int
    x_mm: float
    y_mm: float
    angle_deg: float
    polygon: Polygon


@dataclass(frozen=True)
class NestResult:
    """A finished layout.

    ``sheet_size_mm`` is (W, H) of the stock sheet, or in strip mode (strip
    length used, strip width). ``utilisation`` is, per sheet, the area of the
    placed cut outlines over the sheet (or used strip) area.
    ``area_lower_bound_sheets`` is ceil(total part area / usable sheet area),
    a weak bound that counts every window as usable (1 in strip mode);
    ``lower_bound_sheets`` is the honest one of
    :func:`sheetgen.production.nesting.bound.lower_bound_sheets` (1 in strip mode).
    ``stopped_by`` says what ended the search: "effort" (the work budget),
    "time_limit" (the wall-clock ceiling) or "converged"; ``work_units`` is the
    work done.

    ``remnant_mm`` is the usable remnant of the last sheet: the full-height
    rectangle (length along x, height along y) from the rightmost cut contour
    of the last sheet plus the spacing to the sheet's right edge. It is
    (0, H) when the last sheet is filled to the end, and None in strip mode,
    where the strip ends at the last part.
    """

    sheets: tuple[tuple[PlacedPart, ...], ...]
    unplaced: tuple[tuple[int, int], ...]
    sheet_size_mm: tuple[float, float]
    margin_mm: float
    spacing_mm: float
    strip_length_mm: float | None
    utilisation: tuple[float, ...]
    area_lower_bound_sheets: int
    remnant_mm: tuple[float, float] | None
    lower_bound_sheets: int = 1
    stopped_by: str = "converged"
    work_units: int = 0

    @property
    def parts_placed(self) -> int:
        return sum(len(s) for s in self.sheets)


def sheet_patterns(result: NestResult) -> tuple[tuple[int, ...], ...]:
    """Sheets cut from one program: groups of sheet indexes (0-based) whose
    parts are the same items at the same angles and places, in the same order.
    Groups are in the order of their first sheet."""
    groups: dict[tuple, list[int]] = {}
    for k, sheet in enumerate(result.sheets):
        key = tuple((p.item, p.angle_deg, round(p.x_mm, 9), round(p.y_mm, 9)) for p in sheet)
        groups.setdefault(key, []).append(k)
    return tuple(tuple(g) for g in groups.values())
