"""Kerf calibration: a test piece to cut on the user's laser, and the kerf from
a caliper reading.

The coupon is drawn at nominal size, without kerf compensation, and holds:

- a slot plate: a row of slots whose widths step from ``thickness - 0.30`` to
  ``thickness + 0.20`` mm in 0.05 mm steps, each labelled with its drawn width
  on the marking layer;
- a tab piece whose tab (sheet thickness wide across, ``TAB_WIDTH_MM`` along)
  goes into the slots: the slot that holds the tab the way the joint should
  hold shows which drawn width gives that fit on this laser and sheet. Slots
  are ``SLOT_EXTRA_MM`` longer than the tab so only the width is tested;
- a square of known size (``square_mm``, 20.00 mm unless asked otherwise),
  labelled with it, to measure across its flats with calipers.

Kerf from the square: the beam removes half a kerf on each side of the line it
follows, so a part drawn without compensation comes out one kerf smaller than
drawn, measured outside across two opposite edges (common practice):
``kerf = nominal - measured``. Measure both directions and give both readings;
their mean is used.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from shapely.geometry import Polygon, box

from sheetgen.errors import ParameterError
from sheetgen.kitmodel.part import LAYER_LABEL, Mark

SLOT_BELOW_MM = 0.30
SLOT_ABOVE_MM = 0.20
SLOT_STEP_MM = 0.05
SLOT_LENGTH_MM = 12.0
TAB_WIDTH_MM = 10.0
SLOT_EXTRA_MM = SLOT_LENGTH_MM - TAB_WIDTH_MM
LABEL_HEIGHT_MM = 2.5
TITLE_HEIGHT_MM = 3.0
GAP_MM = 5.0  # between pieces and from the origin
EDGE_MM = 6.0  # from a slot to the plate's edge
SQUARE_RANGE_MM = (10.0, 100.0)
NOMINAL_RANGE_MM = (1.0, 1000.0)


@dataclass(frozen=True)
class Coupon:
    thickness_mm: float
    square_mm: float
    slot_widths_mm: tuple[float, ...]
    polygons: tuple[Polygon, ...]  # slot plate (slots as holes), tab piece, square
    marks: tuple[Mark, ...]
    size_mm: tuple[float, float]


def _thickness_range() -> tuple[float, float]:
    from sheetgen.design.schema import SCHEMA_BY_PATH

    key = SCHEMA_BY_PATH["sheet.thickness"]
    assert key.lo is not None and key.hi is not None  # the schema bounds this key on both sides
    return key.lo, key.hi


def _kerf_range() -> tuple[float, float]:
    from sheetgen.design.schema import SCHEMA_BY_PATH

    key = SCHEMA_BY_PATH["laser.kerf"]
    assert key.lo is not None and key.hi is not None  # the schema bounds this key on both sides
    return key.lo, key.hi


def width_label(width_mm: float) -> str:
    """A drawn width as labelled: two decimals, three when needed (3.175)."""
    text = f"{width_mm:.3f}"
    return text[:-1] if text.endswith("0") else text


def slot_widths(thickness_mm: float) -> tuple[float, ...]:
    lo = round(SLOT_BELOW_MM / SLOT_STEP_MM)
    hi = round(SLOT_ABOVE_MM / SLOT_STEP_MM)
    return tuple(round(thickness_mm + k * SLOT_STEP_MM, 6) for k in range(-lo, hi + 1))


def make_coupon(thickness_mm: float, square_mm: float = 20.0) -> Coupon:
    """The coupon for a sheet ``thickness_mm`` thick, laid out from (GAP, GAP)."""
    lo, hi = _thickness_range()
    if not isinstance(thickness_mm, (int, float)) or not math.isfinite(thickness_mm) or not lo <= thickness_mm <= hi:
        raise ParameterError(f"--thickness {thickness_mm}: must be from {lo:g} to {hi:g} mm")
    slo, shi = SQUARE_RANGE_MM
    if not isinstance(square_mm, (int, float)) or not math.isfinite(square_mm) or not slo <= square_mm <= shi:
        raise ParameterError(f"--square {square_mm}: must be from {slo:g} to {shi:g} mm")
    t = round(float(thickness_mm), 3)  # to 0.001 mm, so every label is the exact drawn width
    widths = slot_widths(t)
    w_max = max(widths)
    pitch = max(9.0, w_max + 5.0)
    marks: list[Mark] = []

    # slot plate: labels in a band along the bottom, slots above, title on top
    x0 = y0 = GAP_MM
    label_band = 2 * LABEL_HEIGHT_MM + 2.0
    plate_w = 2 * EDGE_MM + w_max + (len(widths) - 1) * pitch
    plate_h = label_band + SLOT_LENGTH_MM + 2 * TITLE_HEIGHT_MM + 4.0
    plate = box(x0, y0, x0 + plate_w, y0 + plate_h)
    slot_y0 = y0 + label_band
    holes = []
    for k, w in enumerate(widths):
        cx = x0 + EDGE_MM + w_max / 2 + k * pitch
        holes.append(box(cx - w / 2, slot_y0, cx + w / 2, slot_y0 + SLOT_LENGTH_MM))
        marks.append(Mark(LAYER_LABEL, "text", ((_r(cx), _r(y0 + label_band / 2)),), width_label(w), LABEL_HEIGHT_MM))
    plate = Polygon(plate.exterior, [h.exterior for h in holes])
    title_y = slot_y0 + SLOT_LENGTH_MM + 2.0 + TITLE_HEIGHT_MM
    marks.append(Mark(LAYER_LABEL, "text", ((_r(x0 + plate_w / 2), _r(title_y)),),
                      f"SHEET {width_label(t)}, NO KERF COMP.", TITLE_HEIGHT_MM))

    # tab piece: a body with one tab standing up, as long as the sheet is thick
    bx0 = x0 + plate_w + GAP_MM
    body_w, body_h = TAB_WIDTH_MM + 20.0, 14.0
    tab_x0 = bx0 + (body_w - TAB_WIDTH_MM) / 2
    tab_piece = Polygon([
        (bx0, y0), (bx0 + body_w, y0), (bx0 + body_w, y0 + body_h),
        (tab_x0 + TAB_WIDTH_MM, y0 + body_h), (tab_x0 + TAB_WIDTH_MM, y0 + body_h + t),
        (tab_x0, y0 + body_h + t), (tab_x0, y0 + body_h), (bx0, y0 + body_h),
    ])
    marks.append(Mark(LAYER_LABEL, "text", ((_r(bx0 + body_w / 2), _r(y0 + body_h / 2)),), "TAB", LABEL_HEIGHT_MM))

    # the square to measure
    sx0 = bx0 + body_w + GAP_MM
    square = box(sx0, y0, sx0 + square_mm, y0 + square_mm)
    marks.append(Mark(LAYER_LABEL, "text", ((_r(sx0 + square_mm / 2), _r(y0 + square_mm / 2)),),
                      f"{square_mm:.2f}", min(TITLE_HEIGHT_MM, square_mm / 6)))

    width = sx0 + square_mm + GAP_MM
    height = y0 + max(plate_h, body_h + t, square_mm) + GAP_MM
    return Coupon(t, float(square_mm), widths, (plate, tab_piece, square), tuple(marks), (width, height))


def _r(v: float) -> float:
    return round(v, 6) + 0.0


def kerf_from_measurement(nominal_mm: float, measured_mm: float | Sequence[float]) -> float:
    """Kerf from the outside size of a part drawn without compensation:
    ``nominal - measured`` (mean of the readings), rounded to 0.001 mm."""
    readings = [measured_mm] if isinstance(measured_mm, (int, float)) else list(measured_mm)
    nlo, nhi = NOMINAL_RANGE_MM
    if not isinstance(nominal_mm, (int, float)) or not math.isfinite(nominal_mm) or not nlo <= nominal_mm <= nhi:
        raise ParameterError(f"--nominal {nominal_mm}: must be from {nlo:g} to {nhi:g} mm")
    if not readings:
        raise ParameterError("--measured: give the caliper reading of the square, e.g. --measured 19.82")
    for m in readings:
        if not isinstance(m, (int, float)) or not math.isfinite(m) or m <= 0:
            raise ParameterError(f"--measured {m}: must be a length above 0 mm")
        if m >= nominal_mm:
            raise ParameterError(
                f"--measured {m:g}: must be smaller than --nominal {nominal_mm:g} (a part drawn without kerf "
                f"compensation comes out smaller, measured outside across its flats)")
    kerf = round(nominal_mm - sum(readings) / len(readings), 3) + 0.0
    lo, hi = _kerf_range()
    if not lo <= kerf <= hi:
        raise ParameterError(
            f"--measured {', '.join(f'{m:g}' for m in readings)}: gives kerf {kerf:g} mm, outside {lo:g} to {hi:g} mm "
            f"(laser.kerf); measure across the flats of the square, not its corners, and check --nominal")
    return kerf
