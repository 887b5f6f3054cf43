"""Figures of the end stops and the polar wedge, per shipped variant (run from the checkout:
`python tests/bench/bench_stops.py`; pytest does not collect it).

For each params/*.toml: where the stop arm first touches the end stop each way (bisection
on the model's prisms), the least gap inside the travel, the stall check (Lewis stress at
the pinion vs the allowable), the stop's bearing stress vs its allowable, the axle's angle
to the ground plate (the placed prisms), and the tipping figures."""

from __future__ import annotations

import math
import sys
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from sheetgen.design.kit import build_kit  # noqa: E402
from sheetgen.design.spec import load_spec  # noqa: E402
from sheetgen.mechanics.check import balance_check  # noqa: E402
from sheetgen.model3d import model_bodies, parallel_distance_mm, parallel_shared_volume_mm3  # noqa: E402


def meet(arm, stop, inside, past):
    def apart(a):
        t = arm.turned(a)
        return parallel_shared_volume_mm3(t, stop) <= 1e-6 and parallel_distance_mm(t, stop) > 1e-4

    lo, hi = inside, past
    for _ in range(40):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if apart(mid) else (lo, mid)
    return 0.5 * (lo + hi)


def main() -> None:
    for path in sorted((ROOT / "params").glob("*.toml")):
        spec = load_spec(path)
        kit = build_kit(spec)
        r = balance_check(kit, spec)
        bodies = {b.source: b for b in model_bodies(kit, spec)}
        arm, stop = bodies["stop-arm"].pieces[0], bodies["end-stop"].pieces[0]
        lim = spec.site.travel_limit_deg
        plus, minus = meet(arm, stop, lim - 1, lim + 3), meet(arm, stop, -lim + 1, -lim - 3)
        inside = min(parallel_distance_mm(arm.turned(float(a)), stop) for a in np.arange(-lim + 1, lim - 1 + 1e-9, 1.0))
        tilt = "level"
        if "ground-plate" in bodies:
            axis = bodies["axle"].pieces[0].placement.matrix[:, 2]
            n = bodies["ground-plate"].pieces[0].placement.matrix[:, 2]
            tilt = f"{math.degrees(math.asin(abs(float(np.dot(axis, n))))):.4f} deg"
        t, s, tp = r.tooth, r.stops, r.tipping
        print(f"{path.stem}: limit +-{lim:g}; stops meet at {plus:+.3f} / {minus:+.3f} deg; least gap inside "
              f"{inside:.3f} mm; layers {spec.drive.layers}, module {spec.drive.module_mm:g}")
        print(f"  stall: pinion {t.stall_stress_MPa:.3g} MPa vs {t.allowable_MPa:.3g}; stop: {s.force_N:.3g} N at "
              f"{s.radius_mm:.1f} mm over {s.contact_length_mm:.1f} x {s.thickness_mm:g} mm -> "
              f"{s.bearing_stress_MPa:.3g} MPa vs {s.allowable_MPa:.3g}")
        print(f"  axle to ground: {tilt}; tipping: height {tp.force_height_mm:.1f} mm, overturning "
              f"{tp.overturning_Nm:.3g} N·m vs restoring {tp.restoring_Nm:.3g}, ballast {tp.ballast_kg:.3f} kg; "
              f"balance ok {r.ok}")


if __name__ == "__main__":
    main()
