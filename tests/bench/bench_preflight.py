"""Benchmark: preflight on a large cut file, with and without the kerf check.

Run: PYTHONPATH=. python tests/bench/bench_preflight.py [--count N] [--kind circles|mixed] [--keep FILE]
Prints figures only; nothing is asserted.

The file holds N entities on layer CUT in millimetres: small circles on a grid
(``circles``, a perforated panel), or a mix of closed rectangles (polylines),
circles and squares drawn as four LINEs (``mixed``, what a nested sheet of
small parts looks like), 6 mm apart. It is clean: every run should report no
faults, so the figures measure the checks, not the printing of faults.
For peak memory run the command under /usr/bin/time -v, for example
``/usr/bin/time -v python -m sheetgen preflight FILE --kerf 0.2``.
"""

from __future__ import annotations

import argparse
import math
import tempfile
import time
from pathlib import Path


def write_file(path: Path, count: int, kind: str) -> int:
    import ezdxf

    doc = ezdxf.new("R2000", setup=False)
    doc.header["$INSUNITS"] = 4
    doc.layers.add("CUT")
    msp = doc.modelspace()
    side = math.ceil(math.sqrt(count))
    made = 0
    k = 0
    while made < count:
        i, j = k % side, k // side
        x, y = 5 + 6.0 * i, 5 + 6.0 * j
        k += 1
        if kind == "circles" or k % 3 == 0 or count - made < 4:
            msp.add_circle((x, y), 2.0, dxfattribs={"layer": "CUT"})
            made += 1
        elif k % 3 == 1:
            msp.add_lwpolyline([(x - 2, y - 1.5), (x + 2, y - 1.5), (x + 2, y + 1.5), (x - 2, y + 1.5)], close=True,
                               dxfattribs={"layer": "CUT"})
            made += 1
        else:
            corners = [(x - 1.5, y - 1.5), (x + 1.5, y - 1.5), (x + 1.5, y + 1.5), (x - 1.5, y + 1.5)]
            for a in range(4):
                if made < count:
                    msp.add_line(corners[a], corners[(a + 1) % 4], dxfattribs={"layer": "CUT"})
                    made += 1
    doc.saveas(path)
    return made


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--count", type=int, default=100_000)
    ap.add_argument("--kind", choices=("circles", "mixed"), default="circles")
    ap.add_argument("--keep", type=Path, default=None, help="write the file here and keep it")
    args = ap.parse_args()

    from sheetgen.io.dxf_read import preflight_file

    with tempfile.TemporaryDirectory() as tmp:
        path = args.keep or Path(tmp) / f"bench-{args.kind}-{args.count}.dxf"
        t0 = time.perf_counter()
        n = write_file(path, args.count, args.kind)
        print(f"wrote {n} {args.kind} entities to {path} ({path.stat().st_size / 1e6:.1f} MB) "
              f"in {time.perf_counter() - t0:.1f} s")
        for kerf in (None, 0.2):
            t0 = time.perf_counter()
            report = preflight_file(path, kerf_mm=kerf)
            dt = time.perf_counter() - t0
            print(f"preflight {'--kerf 0.2' if kerf else 'no kerf  '}: {dt:6.2f} s, {report.contours} contours, "
                  f"{len(report.faults)} faults")


if __name__ == "__main__":
    main()
