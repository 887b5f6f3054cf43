"""The Python API: the few calls a script needs, each a thin door to the core.

A five-line script that builds the demo kit and writes it::

    import sheetgen

    spec = sheetgen.load_params(overrides=["panel.width=160"])   # None: the shipped demo
    build = sheetgen.build(spec, kits=2, model=False)
    print(build.summary["sheets"], "sheets;", "checks pass" if not build.failing_checks else build.failing_checks)
    sheetgen.write_build(build, "out")

Every call raises :class:`sheetgen.errors.SheetgenError` (a subclass names the
key or file) for bad input, and :class:`sheetgen.errors.GeometryBug` when a
verification inside sheetgen fails.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from pathlib import Path
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from sheetgen.pipeline import BuildResult, NestRun
    from sheetgen.kitmodel.part import Kit
    from sheetgen.design.schema import Spec
    from sheetgen.mechanics.balance_report import BalanceReport
    from sheetgen.production.cutplan import CutPlan
    from sheetgen.production.runs import PlacedSheet


def load_params(path: str | Path | None = None,
                overrides: Iterable[str] | Mapping[str, Any] = ()) -> Spec:
    """Read a parameter file (None: the demo that ships with sheetgen) and apply
    overrides, given as ``"KEY=VALUE"`` strings like ``--set`` or as a mapping
    ``{"laser.kerf": 0.2}``. Derived keys left at ``"auto"`` are solved.

    >>> spec = load_params(overrides={"panel.width": 160})   # doctest: +SKIP
    """
    from sheetgen.design.spec import demo_params_path, load_spec

    if isinstance(overrides, Mapping):
        overrides = [f"{k}={_toml_value(v)}" for k, v in overrides.items()]
    return load_spec(demo_params_path() if path is None else path, tuple(overrides))


def build_kit(spec: Spec) -> Kit:
    """Every part of one kit with its joints, placements and the drive pair.

    >>> kit = build_kit(load_params()); [p.name for p in kit.parts][:2]   # doctest: +SKIP
    ['base', 'axle-support']
    """
    from sheetgen.design.kit import build_kit as _build_kit

    return _build_kit(spec)


def check_balance(spec: Spec, kit: Kit | None = None) -> BalanceReport:
    """Mass, balance, torques, drive in time, tracking through the year, teeth
    and tipping; ``report.ok`` is the verdict, ``report.checks`` the reasons.

    >>> check_balance(load_params()).ok   # doctest: +SKIP
    True
    """
    from sheetgen.mechanics.check import balance_check

    return balance_check(build_kit(spec) if kit is None else kit, spec)


def nest_kits(spec: Spec, kits: int = 1, *, jobs: int | None = None) -> NestRun:
    """``kits`` kits nested on the spec's sheet stock and verified.

    >>> run = nest_kits(load_params(), kits=3); len(run.sheets)   # doctest: +SKIP
    2
    """
    from sheetgen.pipeline import nest_run

    return nest_run(spec, build_kit(spec), kits, jobs=jobs)


def plan_cuts(spec: Spec, sheet: PlacedSheet) -> CutPlan:
    """The cut order, start points, lead-ins, time and cost of one nested sheet.

    >>> spec = load_params(); plan = plan_cuts(spec, nest_kits(spec).sheets[0])   # doctest: +SKIP
    """
    from sheetgen.production.cutplan import plan_sheet, settings_from_spec

    return plan_sheet(list(sheet.contours), settings_from_spec(spec),
                      sheet_size_mm=(spec.sheet.width_mm, spec.sheet.height_mm))


def build(spec: Spec, kits: int = 1, *, model: bool = True, jobs: int | None = None) -> BuildResult:
    """The whole job for a production run: kit, balance, nested sheets, cut
    plans and figures; with ``model`` the 3D model and its checks (cadquery).

    >>> b = build(load_params(), kits=3, model=False); b.summary["sheets"]   # doctest: +SKIP
    2
    """
    from sheetgen.pipeline import run_build, with_model

    result = run_build(spec, kits, jobs=jobs)
    return with_model(result) if model else result


def write_build(build: BuildResult, out_dir: str | Path, *, dxf_version: str = "R2000",
                into_existing: bool = False) -> Path:
    """Write a build into a folder (parts/, sheets/, model/, summary.json,
    report.html, assembly.html), as ``sheetgen build`` does; the folder must be new, empty or
    one sheetgen wrote before.

    >>> write_build(build(load_params(), model=False), "out")   # doctest: +SKIP
    """
    from sheetgen.buildout import write_build as _write_build

    return _write_build(build, out_dir, dxf_version=dxf_version, into_existing=into_existing)


def _toml_value(value: Any) -> str:
    """A Python value written as the TOML value ``--set`` reads."""
    import json

    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, float)):
        return repr(value)
    return json.dumps(str(value))  # a TOML basic string
