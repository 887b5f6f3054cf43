"""Benchmark: time to build the 3D model of each shipped kit, check it and write it.

Run: PYTHONPATH=. python tests/bench/bench_assembly.py
Prints figures only; nothing is asserted. The last table shows why the
clearance sweep bounds distances in 2D first: one OpenCascade distance
between the gear wheel and the motor mount costs about as much as the whole
sweep, which would need one per pair and angle.
"""

from __future__ import annotations

import time
from pathlib import Path
from tempfile import TemporaryDirectory

ROOT = Path(__file__).resolve().parents[2]


def main() -> None:
    t = time.perf_counter()
    import cadquery  # noqa: F401

    print(f"loading cadquery: {time.perf_counter() - t:.2f} s\n")
    from sheetgen.io.step import write_step, write_svg
    from sheetgen.design.kit import build_kit
    from sheetgen.model3d import build_assembly, build_model, check_model
    from sheetgen.design.spec import load_spec

    stages = ("build", "interference", "connection", "tabs", "sweep", "mesh", "mass")
    head = f"{'kit':22s} {'solids':>6s} " + " ".join(f"{s:>12s}" for s in stages) + \
        f" {'step':>6s} {'svg':>6s} {'total':>6s} {'occ':>5s}"
    print("seconds per stage (occ: OpenCascade booleans and distances called by the checks)")
    print(head)
    last = None
    for path in sorted((ROOT / "params").glob("*.toml")):
        spec = load_spec(path)
        kit = build_kit(spec)
        start = time.perf_counter()
        model = build_model(kit, spec)
        report = check_model(model, kit, spec)
        with TemporaryDirectory() as tmp:
            t = time.perf_counter()
            write_step(build_assembly(model), Path(tmp) / "assembly.step")
            t_step = time.perf_counter() - t
            t = time.perf_counter()
            write_svg(model.bodies, Path(tmp) / "assembly.svg", path.stem)
            t_svg = time.perf_counter() - t
        total = time.perf_counter() - start
        tm = dict(report.timing_s)
        print(f"{path.name:22s} {len(report.solids):6d} " + " ".join(f"{tm[s]:12.3f}" for s in stages)
              + f" {t_step:6.2f} {t_svg:6.2f} {total:6.2f} {report.occ_calls:5d}")
        last = (model, report)

    from sheetgen.model3d.measures import distance_bound_mm
    from sheetgen.model3d.solids import _occ_distance, _shell

    model, report = last
    print("\none distance, wheel#1 to motor-mount#1 (large kit): seconds")
    a, b = model.solids["wheel#1"], model.solids["motor-mount#1"]
    t = time.perf_counter()
    d_bound, exact = distance_bound_mm(model.body("wheel#1"), model.body("motor-mount#1"), 17.0)
    t_bound = time.perf_counter() - t
    t = time.perf_counter()
    d_shell = _occ_distance(_shell(a), _shell(b))
    t_shell = time.perf_counter() - t
    t = time.perf_counter()
    d_solid = a.distance(b)
    t_solid = time.perf_counter() - t
    print(f"  2D bound (shapely)              {t_bound:8.4f}   {d_bound:.4f} mm (exact: {exact})")
    print(f"  OpenCascade, boundaries          {t_shell:8.4f}   {d_shell:.4f} mm")
    print(f"  OpenCascade, solids              {t_solid:8.4f}   {d_solid:.4f} mm")
    pairs = sum(1 for s in report.solids if s.group == "rotating") * sum(1 for s in report.solids if s.group == "fixed")
    print(f"  a sweep of {report.angles} angles x up to {pairs} pairs by OpenCascade alone: "
          f"~{report.angles * pairs * t_shell / 60:.0f} min at this pair's cost")


if __name__ == "__main__":
    main()
