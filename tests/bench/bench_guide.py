"""Benchmark: what the assembly guide adds to a build, per shipped kit.

Run: PYTHONPATH=. python tests/bench/bench_guide.py
Prints figures only; nothing is asserted. Columns: the kit without step labels,
the assembly order (blocking table and search), the steps with their words, the
step pictures, the whole page, and the page size.
"""

from __future__ import annotations

from pathlib import Path

from tests.bench.timing import best_of

ROOT = Path(__file__).resolve().parents[2]


def main() -> None:
    from sheetgen.design.assembly_order import assembly_moves, assembly_steps
    from sheetgen.design.kit import build_kit
    from sheetgen.design.spec import load_spec
    from sheetgen.io.assembly_html import assembly_guide_html
    from sheetgen.model3d.stepview import step_pictures

    print(f"{'kit':22s} {'steps':>5s} {'kit s':>7s} {'order s':>8s} {'steps s':>8s} {'pictures s':>10s} "
          f"{'page s':>7s} {'page kB':>8s}")
    for params in sorted((ROOT / "params").glob("*.toml")):
        spec = load_spec(params)
        t_kit, kit = best_of(lambda: build_kit(spec, step_labels=False), 1)
        assert kit is not None
        t_order, _ = best_of(lambda: assembly_moves(kit), 1)
        t_steps, steps = best_of(lambda: assembly_steps(kit, spec), 1)
        assert steps is not None
        t_pics, _ = best_of(lambda: step_pictures(kit, steps), 1)
        t_page, page = best_of(lambda: assembly_guide_html(kit, spec), 1)
        assert page is not None
        print(f"{params.name:22s} {len(steps):5d} {t_kit:7.2f} {t_order:8.2f} {t_steps:8.2f} {t_pics:10.2f} "
              f"{t_page:7.2f} {len(page.encode()) / 1000:8.0f}")


if __name__ == "__main__":
    main()
