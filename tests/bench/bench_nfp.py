"""No-fit polygons of the demo kit's parts: the edge sweep against the sums of convex pieces.

Run:  python tests/bench/bench_nfp.py [--pairs 600] [--seed 1]

The parts of one demo kit (cut outlines with the demo kerf), at every allowed
angle, grown to the nester's clearance outlines (half the demo spacing); a
random sample of ordered pairs of them whose outlines are not both convex (the
pairs that take the general road). For each pair, the no-fit polygon by the
edge sweep (``nfp_paths``: every edge of one swept along every edge of the
other, then a union) and by the union of the sums of convex pieces
(``convex_sum_paths``, what the nester uses). Prints the time of each road
per pair (the pieces cut first, once per outline, as the nester keeps them),
the speed-up, and the largest difference in area between the two results
(they are the same set; the grid's rounding may differ by a sliver).
"""

from __future__ import annotations

import argparse
import random
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from sheetgen.design.kit import build_kit
from sheetgen.design.spec import load_spec
from sheetgen.production.nesting.convex import convex_sum_paths
from sheetgen.production.nesting.nfp import (clearance_outline, fill_small_holes, is_convex, nfp_paths,
                                             nfp_scale, paths_to_geometry, shape_of)
from sheetgen.production.runs import kit_items


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--pairs", type=int, default=600, help="ordered pairs of outlines to time")
    ap.add_argument("--seed", type=int, default=1)
    args = ap.parse_args()

    spec = load_spec(ROOT / "params" / "demo.toml")
    items, _ = kit_items(build_kit(spec), spec.laser.kerf_mm, 1)
    outlines = []
    for it in items:
        for angle in it.rotations_deg:
            shape, _ = shape_of(it.polygon, angle)
            outlines.append((f"{it.name}@{angle:g}", clearance_outline(shape, spec.nest.spacing_mm / 2)))
    pairs = []
    for a_name, a in outlines:
        for b_name, b in outlines:
            fa = fill_small_holes(a, b.bounds[2] - b.bounds[0], b.bounds[3] - b.bounds[1])
            fb = fill_small_holes(b, a.bounds[2] - a.bounds[0], a.bounds[3] - a.bounds[1])
            if not (is_convex(fa) and is_convex(fb)):
                pairs.append((f"{a_name} / {b_name}", fa, fb))
    random.Random(args.seed).shuffle(pairs)
    pairs = pairs[:args.pairs]
    scales = [nfp_scale(a, b, 0.0) for _n, a, b in pairs]

    t = time.perf_counter()
    sweep = [nfp_paths(a, b, 0.0, s) for (_n, a, b), s in zip(pairs, scales)]
    t_sweep = time.perf_counter() - t
    t = time.perf_counter()
    convex_sum_paths(pairs[0][1], pairs[0][2], scales[0])  # import and first-call costs out of the clock
    for (_n, a, b), s in zip(pairs, scales):   # the pieces, cut once per outline (kept per process)
        convex_sum_paths(a, b, s)
    t_cut = time.perf_counter() - t
    t = time.perf_counter()
    fast = [convex_sum_paths(a, b, s) for (_n, a, b), s in zip(pairs, scales)]
    t_fast = time.perf_counter() - t

    worst, worst_pair, fallbacks = 0.0, "-", 0
    for (name, _a, _b), s, p1, p2 in zip(pairs, scales, sweep, fast):
        if p2 is None:
            fallbacks += 1
            continue
        g1, g2 = paths_to_geometry(p1, s), paths_to_geometry(p2, s)
        rel = g1.symmetric_difference(g2).area / g1.area
        if rel > worst:
            worst, worst_pair = rel, name
    n = len(pairs)
    print(f"demo kit: {len(outlines)} outlines (part x angle), {n} ordered pairs not both convex")
    print(f"edge sweep           {1000 * t_sweep / n:7.2f} ms per pair")
    print(f"convex piece sums    {1000 * t_fast / n:7.2f} ms per pair   (the first pass, which cuts the pieces: "
          f"{1000 * t_cut / n:.2f} ms per pair)")
    print(f"speed-up             {t_sweep / t_fast:7.1f} x")
    print(f"largest area difference {worst:.1e} of the no-fit polygon ({worst_pair}); "
          f"pairs left to the edge sweep: {fallbacks}")


if __name__ == "__main__":
    main()
