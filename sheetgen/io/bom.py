"""bom.csv: the bill of materials of a build, beside summary.json.

One row per bought item (``kind`` = "hardware", from summary.json ``hardware``)
then one row per cut part (``kind`` = "cut part", from ``bill_of_materials``),
with the quantities per kit and for the whole run. Comma-separated, UTF-8,
a header row, "\\n" line ends; a cell that does not apply is empty.
"""

from __future__ import annotations

import csv
import io
from typing import Any

COLUMNS = ("kind", "item", "spec", "qty_per_kit", "qty_total", "length_mm", "diameter_mm", "standard")


def _cell(v: Any) -> str:
    if v is None:
        return ""
    if isinstance(v, float):
        return f"{v:g}"
    return str(v)


def bom_rows(summary: dict) -> list[dict[str, Any]]:
    rows: list[dict[str, Any]] = []
    for h in summary.get("hardware", []):
        rows.append({"kind": "hardware", "item": h["item"], "spec": h["spec"], "qty_per_kit": h["qty_per_kit"],
                     "qty_total": h["qty_total"], "length_mm": h.get("length_mm"),
                     "diameter_mm": h.get("diameter_mm"), "standard": h.get("standard")})
    t, material = summary["thickness_mm"], str(summary["material"]).replace("_", " ")
    for p in summary["bill_of_materials"]:
        w, h = p["bbox_mm"]
        spec = f"{t:g} mm {material}, {w:g} x {h:g} mm" + (f": {p['description']}" if p.get("description") else "")
        rows.append({"kind": "cut part", "item": p["name"], "spec": spec, "qty_per_kit": p["qty_per_kit"],
                     "qty_total": p["qty"], "length_mm": None, "diameter_mm": None, "standard": None})
    return rows


def bom_csv(summary: dict) -> str:
    """The text of bom.csv for a build's summary."""
    stream = io.StringIO()
    writer = csv.writer(stream, lineterminator="\n")
    writer.writerow(COLUMNS)
    for row in bom_rows(summary):
        writer.writerow([_cell(row[c]) for c in COLUMNS])
    return stream.getvalue()
