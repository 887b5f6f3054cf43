"""The layout solver over random primary inputs: how many draws build, how many
are refused and why, how many pass the balance check, and the time a
derivation takes.

Run:  python tests/bench/bench_derive.py [--draws 200] [--seed 12]

Each draw takes the panel size, thickness and mass, the sheet material and
thickness, the kerf, the latitude and the design wind uniformly over the
schema's ranges (tests/derive_cases.py), with the demo's gear-motor on even
draws and a stronger one on odd draws, on a 1200 x 900 mm sheet. A refused
draw's suggested value is tried once: the figure "suggestion builds" counts
those that then build.
"""

from __future__ import annotations

import argparse
import collections
import random
import statistics
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from tests.derive_cases import MATERIALS, PANEL_DENSITY_KG_M3, RANGES, Draw, judge, suggestion  # noqa: E402

DEMO = ROOT / "params" / "demo.toml"


def draw(rng: random.Random, strong: bool) -> Draw:
    v = {k: rng.uniform(lo, hi) for k, (lo, hi) in RANGES.items()}
    v["panel_density"] = rng.uniform(*PANEL_DENSITY_KG_M3)
    v["sheet.material"] = rng.choice(MATERIALS)
    return Draw(v, strong)


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--draws", type=int, default=200)
    ap.add_argument("--seed", type=int, default=12)
    ap.add_argument("--no-retry", action="store_true", help="do not try the refusals' suggested values")
    args = ap.parse_args()
    rng = random.Random(args.seed)
    built = collections.Counter()
    refused = collections.Counter()
    passed = collections.Counter()
    failing = collections.Counter()  # (motor, balance check) -> built draws failing it
    retried = collections.Counter()
    t_built, t_refused = [], []
    for i in range(args.draws):
        strong = i % 2 == 1
        motor = "strong motor" if strong else "demo motor"
        d = draw(rng, strong)
        t0 = time.perf_counter()
        out = judge(DEMO, d.overrides())
        dt = time.perf_counter() - t0
        if out.built:
            built[motor] += 1
            passed[motor] += bool(out.balance_ok)
            for name in out.failing:
                failing[(motor, name)] += 1
            t_built.append(dt)
        else:
            refused[(motor, out.reason)] += 1
            t_refused.append(dt)
            if not args.no_retry:
                s = suggestion(out.message)
                ok = bool(s) and judge(DEMO, d.overrides() + s).built
                retried[ok] += 1
                if not ok:
                    print(f"  suggestion did not build: {out.message}", flush=True)
        print(f"{i + 1:4d} {motor:12s} {'built' if out.built else 'refused: ' + out.reason:32s} {dt:6.2f} s",
              flush=True)
    n = args.draws
    print()
    print(f"draws: {n} (seed {args.seed})")
    for motor in ("demo motor", "strong motor"):
        total = sum(v for (m, _), v in refused.items() if m == motor) + built[motor]
        print(f"  {motor}: {total} draws, {built[motor]} built ({passed[motor]} pass the balance check), "
              f"{total - built[motor]} refused")
        for (m, why), c in sorted(refused.items(), key=lambda x: -x[1]):
            if m == motor:
                print(f"      refused, binding {why}: {c}")
        for (m, name), c in sorted(failing.items(), key=lambda x: -x[1]):
            if m == motor:
                print(f"      built but failing the balance check {name!r}: {c}")
    print(f"built {sum(built.values())}, refused {sum(refused.values())}, "
          f"pass the balance check {sum(passed.values())}")
    if retried:
        print(f"refusals whose suggested value then builds: {retried[True]} of {sum(retried.values())}")
    if t_built:
        print(f"time per derivation and kit (built draws): median {statistics.median(t_built):.2f} s, "
              f"max {max(t_built):.2f} s")
    if t_refused:
        print(f"time per refusal (with the search for the nearest value): median "
              f"{statistics.median(t_refused):.2f} s, max {max(t_refused):.2f} s")


if __name__ == "__main__":
    main()
