"""The kit as a machine, from its STEP file alone, per shipped variant (run from the checkout:
`python tests/bench/bench_step_machine.py [params/x.toml ...]`; pytest does not collect it).

For the demo and each params/*.toml: the STEP file is written by sheetgen's writer and read
back (sheetgen.model3d.stepread); then, from the file's solids and the params file only
(tests/_step_machine.py, OpenCascade measures): the panel's gap to the nearest part over
and under its faces; the motor's (body and shaft) least clearance to a solid that is not a
holder or the pinion, through the travel, and to what; the bolts' and nuts' least clearance to
the fixed solids through the travel; the angles where the turning group
first shares volume with a fixed solid each way (bisection to 0.02 deg); the keyed bores'
least and largest wall distance from the axle axis; the bare and residual unbalance (N*m,
axle level, CG at its worst); and the seconds each took."""

from __future__ import annotations

import sys
import tempfile
import time
import tomllib
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from tests import _step_machine as M  # noqa: E402


def run(params: str, tmp: Path) -> None:
    t0 = time.perf_counter()
    step = M.write_step_of(params, tmp / f"{Path(params).stem}.step")
    t_write = time.perf_counter() - t0
    t0 = time.perf_counter()
    solids = M.read(step)
    t_read = time.perf_counter() - t0
    with open(params, "rb") as f:
        p = tomllib.load(f)
    lim = float(p["site"]["travel_limit"])
    points = tuple((float(r["mass_kg"]), tuple(float(v) for v in r["position_mm"])) for r in p.get("rotating_mass", []))
    axis = M.axle_axis(solids)
    t0 = time.perf_counter()
    (up, over), (down, under) = M.panel_gaps(solids)
    angles = sorted(set(np.linspace(-lim, lim, 13).round(6).tolist()))
    d, other, at = M.motor_clearance(solids, axis, angles, lambda n: "motor" in n or n.startswith("pinion"))
    fd, fr, ff, fa = M.turning_clearance(solids, axis, angles, lambda n: n.startswith(("bolt#", "nut#")))
    t_near = time.perf_counter() - t0
    t0 = time.perf_counter()
    plus = M.first_overlap_deg(solids, axis, lim - 1.0, lim + 3.0)
    minus = M.first_overlap_deg(solids, axis, -(lim - 1.0), -(lim + 3.0))
    met = sorted({f for _, f, _ in M.overlaps(solids, axis, lim + 3.0)} | {f for _, f, _ in M.overlaps(solids, axis, -(lim + 3.0))})
    t_stop = time.perf_counter() - t0
    r = M.axle_radius_mm(solids, axis)
    bores = {n: M.bore_walls(solids[n].shape, axis, r) for n in solids if n.startswith(("wheel#", "rib#"))}
    args = (solids, axis, p["sheet"]["material"], p["axle"]["material"], float(p["panel"]["mass"]))
    bare, bare_off = M.unbalance_Nm(*args, leave_out=M.counterweight_hardware(solids), point_masses=points)
    resid, _ = M.unbalance_Nm(*args, point_masses=points)
    name = Path(params).name
    print(f"{name}: {len(solids)} solids; write {t_write:.1f} s, read {t_read:.1f} s, "
          f"panel+motor {t_near:.1f} s, stops {t_stop:.1f} s")
    print(f"  panel gap above {up:.4f} mm ({over}), below {down:.4f} mm ({under})")
    print(f"  motor: least clearance to a non-holder {d:.3f} mm, to {other} (frame at {at:g} deg)")
    print(f"  fasteners: {sum(n.startswith('bolt#') for n in solids)} bolts, {sum(n.startswith('nut#') for n in solids)}"
          f" nuts; least clearance to a fixed solid through the travel {fd:.3f} mm ({fr} to {ff} at {fa:g} deg)")
    print(f"  stops: travel limit +-{lim:g} deg; first overlap at {plus:+.2f} / {minus:+.2f} deg, "
          f"with {', '.join(met) or 'nothing'}")
    walls = sorted({(round(a, 3), round(b, 3)) for a, b in bores.values()})
    print(f"  bores ({', '.join(sorted(bores))}): wall from the axis min/max {walls} mm; axle radius {r:.3f} mm")
    print(f"  unbalance: bare {bare:.5f} N*m (CG {bare_off:.2f} mm off the axle), residual {resid:.5f} N*m "
          f"({resid / bare:.3f} of bare)" if bare else f"  unbalance: bare 0, residual {resid:.5f} N*m")
    sys.stdout.flush()


def main(argv: list[str]) -> None:
    files = argv or sorted(str(p) for p in (ROOT / "params").glob("*.toml"))
    with tempfile.TemporaryDirectory() as tmp:
        for params in files:
            run(params, Path(tmp))


if __name__ == "__main__":
    main(sys.argv[1:])
