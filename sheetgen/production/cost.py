"""Cost per kit: sheets, machine time and hardware, from the optional price list.

Every price is optional. A price of 0 in the parameters means "not given"
(``sheet.price``, ``laser.rate`` and the ``[prices]`` keys document it so): the
figure it would price is absent (None), never zero, and the total per kit is
absent while anything is; ``missing`` names the keys to give.

A run of several kits shares its sheets and machine time: the per-kit share is
the run's figure divided by the number of kits (so it falls as the run grows).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from sheetgen.design.hardware import HardwareItem


@dataclass(frozen=True)
class CostLine:
    """One priced line of the hardware: every item priced by one key of [prices]."""

    price_key: str
    items: tuple[str, ...]
    qty_per_kit: float  # pieces, metres, or 1 for a per-kit price
    unit: str  # "each", "metre" or "kit"
    price: float | None  # per unit; None when not given
    cost: float | None  # per kit; None when the price is not given


@dataclass(frozen=True)
class KitCost:
    kits: int
    sheets: float | None  # the run's sheets over its kits
    machine: float | None  # the run's laser time at laser.rate, over its kits
    hardware: tuple[CostLine, ...]
    missing: tuple[str, ...]  # price keys not given, in the order they are met

    @property
    def hardware_total(self) -> float | None:
        costs = [ln.cost for ln in self.hardware]
        return None if any(c is None for c in costs) else sum(c for c in costs if c is not None)

    @property
    def total(self) -> float | None:
        hw = self.hardware_total
        if self.sheets is None or self.machine is None or hw is None:
            return None
        return self.sheets + self.machine + hw

    def to_json(self) -> dict:
        def r(v):
            return None if v is None else round(v, 2)

        return {
            "kits": self.kits,
            "sheets": r(self.sheets),
            "machine": r(self.machine),
            "hardware": [{"price_key": ln.price_key, "items": list(ln.items), "qty_per_kit": round(ln.qty_per_kit, 4),
                          "unit": ln.unit, "price": ln.price, "cost": r(ln.cost)} for ln in self.hardware],
            "hardware_total": r(self.hardware_total),
            "total": r(self.total),
            "missing": list(self.missing),
        }


def _given(value: float) -> float | None:
    return value if value > 0 else None


def kit_cost(spec, hardware: Sequence[HardwareItem], kits: int, sheets: int, cut_time_s: float) -> KitCost:
    """The cost of one kit of a run of ``kits`` kits cut from ``sheets`` sheets in ``cut_time_s``."""
    if kits < 1:
        raise ValueError("kits must be at least 1")
    missing: list[str] = []
    sheet_price = _given(spec.sheet.price)
    rate = _given(spec.laser.rate_per_h)
    if sheet_price is None:
        missing.append("sheet.price")
    if rate is None:
        missing.append("laser.rate")
    lines: dict[str, list[HardwareItem]] = {}
    for item in hardware:
        lines.setdefault(item.price_key, []).append(item)
    out = []
    for key, items in lines.items():
        price = _given(float(spec.value(key)))
        unit = items[0].priced_per
        if unit == "metre":
            qty = sum(i.qty_per_kit * (i.length_mm or 0.0) for i in items) / 1000.0
        elif unit == "kit":
            qty = 1.0
        else:
            qty = float(sum(i.qty_per_kit for i in items))
        if price is None:
            missing.append(key)
        out.append(CostLine(key, tuple(dict.fromkeys(i.item for i in items)), qty, unit, price,
                            None if price is None else qty * price))
    return KitCost(
        kits=kits,
        sheets=None if sheet_price is None else sheets * sheet_price / kits,
        machine=None if rate is None else cut_time_s / 3600.0 * rate / kits,
        hardware=tuple(out),
        missing=tuple(missing),
    )
