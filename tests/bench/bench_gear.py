"""Benchmark: time to draw gear blanks, and their vertex counts.

Run: PYTHONPATH=. python tests/bench/bench_gear.py
Prints figures only; nothing is asserted.
"""

from __future__ import annotations


from timing import best_of  # tests/bench/timing.py, beside this script

from sheetgen.drive.gears import GearSpec, Hub, gear_blank, gear_pair



def main() -> None:
    cases = [
        ("60-tooth wheel, m 1", GearSpec(1.0, 60), 0.0),
        ("60-tooth wheel, m 1, kerf 0.15", GearSpec(1.0, 60), 0.15),
        ("60-tooth wheel, m 2, bore 8, lightened, kerf 0.15", GearSpec(2.0, 60, hub=Hub(8.0, lightening=True)), 0.15),
        ("12-tooth pinion, m 1 (undercut)", GearSpec(1.0, 12), 0.15),
        ("120-tooth wheel, m 1.5", GearSpec(1.5, 120), 0.15),
    ]
    print(f"{'case':52s} {'time ms':>8s} {'outline':>8s} {'per tooth':>9s} {'holes':>6s}")
    for name, spec, kerf in cases:
        dt, g = best_of(lambda: gear_blank(spec, kerf), repeat=7)
        n = len(g.polygon.exterior.coords) - 1
        holes = sum(len(r.coords) - 1 for r in g.polygon.interiors)
        print(f"{name:52s} {dt * 1e3:8.1f} {n:8d} {n / spec.teeth:9.1f} {holes:6d}")
    for tol in (0.01, 0.0025, 0.001):
        dt, g = best_of(lambda: gear_blank(GearSpec(1.0, 60), 0.0, tol), repeat=7)
        n = len(g.polygon.exterior.coords) - 1
        print(f"{'60-tooth wheel, m 1, chord tol ' + str(tol) + ' mm':52s} {dt * 1e3:8.1f} {n:8d} {n / 60:9.1f}")
    dt, p = best_of(lambda: gear_pair(GearSpec(1.0, 12), GearSpec(1.0, 36), 0.15), repeat=3)
    print(f"{'12/36 pair, m 1, kerf 0.15':52s} {dt * 1e3:8.1f}   centre distance {p.centre_distance_mm:.3f} mm, "
          f"contact ratio {p.contact_ratio:.3f} ({p.effective_contact_ratio:.3f} on true involutes)")


if __name__ == "__main__":
    main()
