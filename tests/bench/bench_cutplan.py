"""Benchmark: travel saved by the cut plan, time to plan, and how close the
plan comes to the exact shortest travel on small sheets.

Run: PYTHONPATH=. python tests/bench/bench_cutplan.py
Prints figures only; nothing is asserted.

Sheets are grids of small parts of random size (each with a square and a round
hole, every fifth a ring holding a small part in its window), 28 mm apart,
given either row by row (the order a bottom-left nester tends to write) or
shuffled part by part (holes always just before their outline).
"""

from __future__ import annotations

import random
import time

from shapely.geometry import Point, box

from sheetgen.production.cutplan import LaserSettings, plan_sheet
from sheetgen.geometry.contour import Contour, polygon_contours
from tests.test_cutplan import _exact_shortest  # the exhaustive reference of the tests

SETTINGS = LaserSettings(cut_speed_mm_s=20.0, rapid_speed_mm_s=200.0, pierce_time_s=0.5)


def grid_sheet(nx: int, ny: int, seed: int, shuffled: bool) -> list[Contour]:
    rng = random.Random(seed)
    parts = []
    for j in range(ny):
        for i in range(nx):
            x, y = 10 + 28 * i, 10 + 28 * j
            w, h = rng.uniform(16, 24), rng.uniform(16, 24)
            if (i + j * nx) % 5 == 4:  # a ring with a small part in its window
                ring = box(x, y, x + w, y + h).difference(box(x + 3, y + 3, x + w - 3, y + h - 3))
                guest = box(x + 6, y + 6, x + w - 6, y + h - 6)
                parts.append(polygon_contours(ring) + polygon_contours(guest))
                continue
            part = box(x, y, x + w, y + h).difference(box(x + 2, y + 2, x + 5, y + 5))
            part = part.difference(Point(x + w - 4, y + h - 4).buffer(2.0, quad_segs=16))
            parts.append(polygon_contours(part, [(x + w - 4, y + h - 4, 2.0)]))
    if shuffled:
        rng.shuffle(parts)
    return [c for p in parts for c in p]


def main() -> None:
    print("sheet                      contours  given mm  planned mm  saved   plan time")
    for nx, ny in ((6, 4), (12, 8), (20, 13)):
        for shuffled in (False, True):
            contours = grid_sheet(nx, ny, seed=1, shuffled=shuffled)
            t = time.perf_counter()
            plan = plan_sheet(contours, SETTINGS)
            dt = time.perf_counter() - t
            label = f"{nx}x{ny} parts, {'shuffled' if shuffled else 'row by row'}"
            saved = 100.0 * plan.travel_saved_mm / plan.travel_unplanned_mm
            print(f"{label:<26} {len(contours):>8}  {plan.travel_unplanned_mm:>8.0f}  {plan.travel_mm:>10.0f}"
                  f"  {saved:>5.1f}%  {dt:>7.2f} s")
    contours = grid_sheet(12, 8, seed=1, shuffled=False)
    lead = LaserSettings(cut_speed_mm_s=20.0, rapid_speed_mm_s=200.0, pierce_time_s=0.5, lead_in_mm=2.0)
    t = time.perf_counter()
    plan = plan_sheet(contours, lead)
    print(f"12x8 parts with 2 mm lead-ins: {plan.lead_ins} of {plan.pierces} contours got one, "
          f"planned in {time.perf_counter() - t:.2f} s")

    ratios = []
    for seed in range(20):
        rng = random.Random(seed)
        cells = rng.sample([(i, j) for i in range(4) for j in range(3)], 6)
        contours = []
        for i, j in cells:
            x, y = 5 + 30 * i + rng.uniform(0, 5), 5 + 30 * j + rng.uniform(0, 5)
            x1, y1 = x + rng.uniform(5, 20), y + rng.uniform(5, 20)
            contours.append(Contour(points=((x, y), (x1, y), (x1, y1), (x, y1))))
        ratios.append(plan_sheet(contours, SETTINGS).travel_mm / _exact_shortest(contours))
    print(f"6 parts, 20 random sheets: planned / exact shortest travel: mean {sum(ratios) / len(ratios):.4f}, "
          f"worst {max(ratios):.4f}, exact on {sum(r < 1 + 1e-9 for r in ratios)} of 20")


if __name__ == "__main__":
    main()
