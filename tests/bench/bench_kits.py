"""Production runs of the demo kit on the demo sheet: sheet count and time.

Run:  python tests/bench/bench_kits.py [--kits 1,5,20,50,200] [--time 20] [--seed 1]

For each kit count: the parts of that many kits (cut outlines with the demo
kerf, the demo spacing and margin) nested on the demo sheet. Prints the parts,
the sheets used, the area lower bound (ceil(total part area / usable sheet
area)), how many sheets above it, the mean utilisation, the time to the first
layout, the total time, and the time per part. Every layout is checked with
``verify``.

Targets (issue 5): 20 kits at most one sheet above the area bound in under
30 s; 200 kits under 5 minutes. The time limit given is for the improvement
search; the first layout is always finished and is reported separately.
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from sheetgen.kit import build_kit  # noqa: E402
from sheetgen.nesting import nest, verify  # noqa: E402
from sheetgen.production import kit_items  # noqa: E402
from sheetgen.spec import load_spec  # noqa: E402


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--kits", default="1,5,20,50,200", help="comma-separated kit counts")
    ap.add_argument("--time", type=float, default=20.0, help="search time limit per run, s")
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--params", default=str(ROOT / "params" / "demo.toml"))
    args = ap.parse_args()
    spec = load_spec(args.params)
    kit = build_kit(spec)
    sheet = (spec.sheet.width_mm, spec.sheet.height_mm)
    margin, spacing, kerf = spec.sheet.margin_mm, spec.nest.spacing_mm, spec.laser.kerf_mm
    print(f"sheet {sheet[0]:g} x {sheet[1]:g} mm, margin {margin:g} mm, spacing {spacing:g} mm, kerf {kerf:g} mm, "
          f"search limit {args.time:g} s, seed {args.seed}")
    print(f"{'kits':>5s} {'parts':>6s} {'sheets':>6s} {'bound':>6s} {'above':>6s} {'util':>6s} "
          f"{'first s':>8s} {'total s':>8s} {'ms/part':>8s}")
    for n in (int(k) for k in args.kits.split(",")):
        items, _ = kit_items(kit, kerf, n)
        parts = sum(it.qty for it in items)
        t0 = time.perf_counter()
        first = nest(items, sheet_mm=sheet, margin_mm=margin, spacing_mm=spacing, time_limit_s=0.0, seed=args.seed)
        t_first = time.perf_counter() - t0
        t0 = time.perf_counter()
        result = nest(items, sheet_mm=sheet, margin_mm=margin, spacing_mm=spacing, time_limit_s=args.time,
                      seed=args.seed)
        total = time.perf_counter() - t0
        verify(first, items)
        verify(result, items)
        sheets = len(result.sheets)
        bound = result.area_lower_bound_sheets
        util = sum(result.utilisation) / sheets
        print(f"{n:5d} {parts:6d} {sheets:6d} {bound:6d} {sheets - bound:6d} {util:6.3f} "
              f"{t_first:8.1f} {total:8.1f} {1000 * total / parts:8.2f}   (first layout: {len(first.sheets)} sheets)")


if __name__ == "__main__":
    main()
