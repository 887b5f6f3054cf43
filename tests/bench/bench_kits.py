"""Production runs of the demo kit on the demo sheet: sheets against the honest bound.

Run:  python tests/bench/bench_kits.py [--kits 1,5,20,50,200] [--time 5] [--effort E] [--seed 1] [--pairs]

For each kit count: the parts of that many kits (cut outlines with the demo
kerf, the demo spacing and margin) nested on the demo sheet. Prints the parts,
the sheets used, the honest lower bound (sheetgen.production.nesting.bound) and the plain
area ratio, the fill of the sheets but the last (min, max, mean), the fill and
remnant of the last sheet, the distinct patterns, what ended the search, and
wall and CPU time, and the wall time past the ceiling (``over s``: the time
limit is a real ceiling; what may run past it is listed in
sheetgen/production/nesting/budget.py). Every layout is checked with ``verify``.
CPU time counts this process and its finished worker processes; on a loaded
machine the wall time is far above it, and a run cut by the ceiling has had
less of the machine, so its layout uses more sheets.

With ``--pairs``, first prints, per part of the kit, its best pair (the second
copy turned, sheetgen/production/nesting/pairs.py): the pair's grown box over two
grown single boxes, and whether the nester offers it.

Targets: 20 kits on at most 10 sheets, 200 kits on at most 97, within the
demo's time limit (5 s; without --effort the budget follows from it).
"""

from __future__ import annotations

import argparse
import os
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from sheetgen.design.kit import build_kit
from sheetgen.production.nesting import nest, sheet_patterns, verify
from sheetgen.production.runs import kit_items
from sheetgen.design.spec import load_spec


def _cpu() -> float:
    """CPU seconds of this process and of its finished worker processes."""
    import resource

    kids = resource.getrusage(resource.RUSAGE_CHILDREN)
    return time.process_time() + kids.ru_utime + kids.ru_stime


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--kits", default="1,5,20,50,200", help="comma-separated kit counts")
    ap.add_argument("--time", type=float, default=5.0, help="wall-clock ceiling of the search, s")
    ap.add_argument("--effort", type=float, default=None, help="work budget (default: from the time limit)")
    ap.add_argument("--jobs", type=int, default=os.cpu_count() or 1, help="processes for the searches")
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--params", default=str(ROOT / "params" / "demo.toml"))
    ap.add_argument("--pairs", action="store_true", help="first print each part's best pair (pairs.py)")
    args = ap.parse_args()
    spec = load_spec(args.params)
    kit = build_kit(spec)
    sheet = (spec.sheet.width_mm, spec.sheet.height_mm)
    margin, spacing, kerf = spec.sheet.margin_mm, spec.nest.spacing_mm, spec.laser.kerf_mm
    print(f"sheet {sheet[0]:g} x {sheet[1]:g} mm, margin {margin:g} mm, spacing {spacing:g} mm, kerf {kerf:g} mm, "
          f"ceiling {args.time:g} s, effort {args.effort}, seed {args.seed}")
    if args.pairs:
        _print_pairs(kit, kerf, spacing)
    print(f"{'kits':>5s} {'parts':>6s} {'sheets':>6s} {'bound':>6s} {'area':>5s} {'fill (not last)':>17s} "
          f"{'last':>6s} {'remnant':>8s} {'patt':>5s} {'ended by':>10s} {'wall s':>7s} {'over s':>6s} {'cpu s':>6s}")
    for n in (int(k) for k in args.kits.split(",")):
        items, _ = kit_items(kit, kerf, n)
        parts = sum(it.qty for it in items)
        t0, c0 = time.perf_counter(), _cpu()
        result = nest(items, sheet_mm=sheet, margin_mm=margin, spacing_mm=spacing, time_limit_s=args.time,
                      effort=args.effort, jobs=args.jobs, seed=args.seed)
        wall, cpu = time.perf_counter() - t0, _cpu() - c0
        verify(result, items)
        u = result.utilisation
        body = u[:-1] or u
        fill = f"{min(body) * 100:3.0f}-{max(body) * 100:3.0f} ({sum(body) / len(body) * 100:3.0f})"
        print(f"{n:5d} {parts:6d} {len(result.sheets):6d} {result.lower_bound_sheets:6d} "
              f"{result.area_lower_bound_sheets:5d} {fill:>17s} {u[-1] * 100:5.1f}% {result.remnant_mm[0]:6.0f}mm "
              f"{len(sheet_patterns(result)):5d} {result.stopped_by:>10s} {wall:7.1f} {wall - args.time:6.1f} {cpu:6.1f}",
              flush=True)


def _print_pairs(kit, kerf: float, spacing: float) -> None:
    """Per part of one kit: the best pair (second copy at any allowed angle) as its grown box
    over two grown single boxes; pairs at most PAIR_RATIO are offered to the nester."""
    from sheetgen.production.nesting.pairs import PAIR_RATIO, best_pair, may_pair
    from sheetgen.production.nesting.place import ShapeLibrary

    items, _ = kit_items(kit, kerf, 1)
    lib = ShapeLibrary([it.polygon for it in items], [tuple(float(a) % 360 for a in it.rotations_deg) for it in items],
                       spacing, 1e-7, 1000.0)
    print(f"pairs (offered at a ratio <= {PAIR_RATIO:g}):")
    for i, it in enumerate(items):
        if not may_pair(lib, i):
            print(f"  {it.name:24s} ruled out (its outline fills its grown box)")
            continue
        first = lib.item_shapes[i][0]
        best = min((best_pair(lib, first, b) for b in lib.item_shapes[i]), key=lambda p: (round(p.ratio, 9), p.second))
        print(f"  {it.name:24s} ratio {best.ratio:5.3f}  pair {best.width_mm:6.1f} x {best.height_mm:6.1f} mm, "
              f"second turned {lib.shapes[best.second].angle_deg - lib.shapes[first].angle_deg:g} deg"
              f"{'  offered' if best.ratio <= PAIR_RATIO else ''}")


if __name__ == "__main__":
    main()
