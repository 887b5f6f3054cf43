"""Nest time and memory against the size of a run, 1 to 1000 demo kits.

Run:  python tests/bench/bench_scaling.py [--kits 1,2,5,10,20,50,100,200,500,1000] [--effort 9] [--time 600]

Each size runs in a fresh process (so its peak memory is its own): the demo
kit's parts (demo kerf, spacing and margin) nested on the demo sheet with the
given work budget and wall-clock ceiling, then checked with ``verify``.
Prints, per size, the parts, the sheets and the lower bound, the distinct
patterns, what ended the search, the wall and CPU time and the peak memory
(resident set), with a text plot of time and memory. Targets: a 1000-kit nest
under 1 GB.
"""

from __future__ import annotations

import argparse
import json
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]

CHILD = r"""
import json, resource, sys, time
sys.path.insert(0, {root!r})
from sheetgen.design.kit import build_kit
from sheetgen.production.nesting import nest, sheet_patterns, verify
from sheetgen.production.runs import kit_items
from sheetgen.design.spec import load_spec

spec = load_spec({params!r})
items, _ = kit_items(build_kit(spec), spec.laser.kerf_mm, {kits})
t0, c0 = time.perf_counter(), time.process_time()
r = nest(items, sheet_mm=(spec.sheet.width_mm, spec.sheet.height_mm), margin_mm=spec.sheet.margin_mm,
         spacing_mm=spec.nest.spacing_mm, effort={effort}, time_limit_s={limit}, seed=1)
wall, cpu = time.perf_counter() - t0, time.process_time() - c0
verify(r, items)
print(json.dumps(dict(parts=sum(it.qty for it in items), sheets=len(r.sheets), bound=r.lower_bound_sheets,
                      patterns=len(sheet_patterns(r)), stopped_by=r.stopped_by, wall=wall, cpu=cpu,
                      rss_mb=resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024)))
"""


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--kits", default="1,2,5,10,20,50,100,200,500,1000")
    ap.add_argument("--effort", type=float, default=9.0, help="work budget (9: the demo's 5 s at the reference rate)")
    ap.add_argument("--time", type=float, default=600.0, help="wall-clock ceiling of the search, s")
    ap.add_argument("--params", default=str(ROOT / "params" / "demo.toml"))
    args = ap.parse_args()
    rows = []
    print(f"effort {args.effort:g}, ceiling {args.time:g} s")
    print(f"{'kits':>5s} {'parts':>6s} {'sheets':>6s} {'bound':>6s} {'patt':>5s} {'ended by':>10s} "
          f"{'wall s':>7s} {'cpu s':>7s} {'peak MB':>8s}")
    for kits in (int(k) for k in args.kits.split(",")):
        code = CHILD.format(root=str(ROOT), params=args.params, kits=kits, effort=args.effort, limit=args.time)
        out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
        r = json.loads(out.stdout.strip().splitlines()[-1])
        rows.append((kits, r))
        print(f"{kits:5d} {r['parts']:6d} {r['sheets']:6d} {r['bound']:6d} {r['patterns']:5d} {r['stopped_by']:>10s} "
              f"{r['wall']:7.1f} {r['cpu']:7.1f} {r['rss_mb']:8.0f}", flush=True)
    width = 50
    for label, key in (("cpu s", "cpu"), ("peak MB", "rss_mb")):
        top = max(r[key] for _, r in rows) or 1.0
        print(f"\n{label} against kits (bar = {top / width:.3g} {label.split()[-1]} per mark)")
        for kits, r in rows:
            print(f"{kits:5d} |{'#' * max(1, round(width * r[key] / top)):<{width}s}| {r[key]:.1f}")


if __name__ == "__main__":
    main()
