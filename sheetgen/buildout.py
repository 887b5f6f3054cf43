"""Writing a build to a folder: parts, sheets in cut order, the 3D model,
summary.json, report.html and the assembly guide (assembly.html), staged so
that a failure leaves nothing behind."""

from __future__ import annotations

import json
from pathlib import Path
from typing import TYPE_CHECKING

from sheetgen.io.output import staged_dir

if TYPE_CHECKING:
    from sheetgen.pipeline import BuildResult


def write_build(build: BuildResult, out_dir: str | Path, *, dxf_version: str = "R2000",
                into_existing: bool = False) -> Path:
    """Write ``build`` into ``out_dir`` and return the folder.

    ``out_dir`` must be absent, empty, or a folder sheetgen wrote before (see
    :func:`sheetgen.io.output.staged_dir`); with ``into_existing`` the files are
    written beside the user's own, never over them. The 3D model is written
    when the build carries one (:func:`sheetgen.pipeline.with_model`).

    >>> import sheetgen
    >>> b = sheetgen.build(sheetgen.load_params(), kits=1, model=False)   # doctest: +SKIP
    >>> sheetgen.write_build(b, "out")                                    # doctest: +SKIP
    """
    from sheetgen.io.cutsvg import style_from_spec
    from sheetgen.io.partfiles import write_part_files
    from sheetgen.io.report import render_report
    from sheetgen.io.sheets import write_sheets
    from sheetgen.production.cutplan import cut_plan_contours

    spec = build.spec
    with staged_dir(out_dir, into_existing=into_existing) as tmp:
        (tmp / "parts").mkdir()
        (tmp / "sheets").mkdir()
        write_part_files(build.kit, spec, tmp / "parts", dxf_version)
        write_sheets(tmp / "sheets", [r.sheet for r in build.sheets], build.nest.sheet_size_mm,
                     build.nest.margin_mm, [cut_plan_contours(r.plan) for r in build.sheets], dxf_version,
                     patterns=build.patterns or None, svg_style=style_from_spec(spec))
        (tmp / "summary.json").write_text(json.dumps(build.summary, indent=2) + "\n", encoding="utf-8")
        if "hardware" in build.summary:
            from sheetgen.io.bom import bom_csv

            (tmp / "bom.csv").write_text(bom_csv(build.summary), encoding="utf-8", newline="")
        picture = None
        if build.model is not None:
            from sheetgen.io.step import assembly_svg, write_step
            from sheetgen.model3d import build_assembly

            (tmp / "model").mkdir()
            name = Path(spec.source).stem
            write_step(build_assembly(build.model, name=name), tmp / "model" / "assembly.step")
            picture = assembly_svg(build.model.bodies, f"sheetgen kit: {name}")
            (tmp / "model" / "assembly.svg").write_text(picture, encoding="utf-8")
        (tmp / "report.html").write_text(render_report(build, picture), encoding="utf-8")
        from sheetgen.io.assembly_html import assembly_guide_html

        (tmp / "assembly.html").write_text(assembly_guide_html(build.kit, spec), encoding="utf-8")
    return Path(out_dir)
