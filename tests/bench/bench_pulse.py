"""Benchmark: time the drive-in-time model takes: one pulse, the sweep over
the travel, the search for values that pass, and the whole balance check.

Run: PYTHONPATH=. python tests/bench/bench_pulse.py [PARAMS]
Prints figures only; nothing is asserted.
"""

from __future__ import annotations

import sys
from pathlib import Path

from timing import best_of  # tests/bench/timing.py, beside this script

ROOT = Path(__file__).resolve().parents[2]


def main() -> None:
    from sheetgen.design.kit import build_kit
    from sheetgen.mechanics import drive as drv
    from sheetgen.mechanics.check import balance_check
    from sheetgen.mechanics.pulse import Drive, Motor
    from sheetgen.design.spec import load_spec

    params = sys.argv[1] if len(sys.argv) > 1 else str(ROOT / "params" / "demo.toml")
    spec = load_spec(params, ())
    kit = build_kit(spec)
    t_check, rep = best_of(lambda: balance_check(kit, spec), 2)
    m, d = spec.motor, spec.drive
    dt = rep.drive_time
    drive = Drive(Motor.from_ratings(m.stall_torque_Nm, m.no_load_speed_rpm, m.voltage_V), rep.drive.gear_ratio,
                  d.efficiency, dt.frame_inertia_kgm2)
    c, v, lim = d.pulse_capacitance_uF * 1e-6, d.pulse_voltage_V, spec.site.travel_limit_deg
    print(f"parameters: {params}")
    if c > 0:
        for name, load in (("calm", rep.calm_load), ("design wind", rep.wind_load)):
            for start in (-lim, 0.0):
                t, r = best_of(lambda: drv._step(drive, load, c, v, start, 1, lim), 5)
                print(f"one pulse, {name}, from {start:g} deg turning +: {t * 1e3:.1f} ms, {r.steps} steps, "
                      f"{r.step_deg:.3g} deg, ended {r.ended}")
        t, sw = best_of(lambda: drv.pulse_sweep(drive, rep.calm_load, rep.wind_load, c, v, lim), 2)
        print(f"sweep over the travel: {sw.pulses} pulses, {sw.steps} steps, {t:.2f} s "
              f"({t / sw.pulses * 1e3:.1f} ms per pulse)")
        t, fixes = best_of(lambda: drv.pulse_fixes(drive, rep.calm_load, rep.wind_load, c, v, lim, dt.max_step_deg,
                                                    sw, d.pinion_teeth), 1)
        print(f"search for passing values (without the balanced retry): {t:.2f} s, {len(fixes)} found")
    t, _ = best_of(lambda: drv.continuous_drive(drive, rep.wind_load, m.voltage_V, rep.load_torque_Nm, lim), 3)
    print(f"continuous drive (two crossings): {t * 1e3:.1f} ms")
    print(f"whole balance check: {t_check:.2f} s")


if __name__ == "__main__":
    main()
