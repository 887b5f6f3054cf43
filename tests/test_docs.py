"""The README states what the code does: its parameter table is generated from the schema."""

from __future__ import annotations

from sheetgen.design.schema_docs import reference_markdown
from tests.conftest import ROOT


def test_readme_parameter_reference_is_current():
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    start = readme.index("<!-- parameter-reference:start")
    start = readme.index("\n", start) + 1
    end = readme.index("<!-- parameter-reference:end")
    assert readme[start:end].strip() == reference_markdown().strip(), (
        "README parameter table is stale: paste the output of `python -m sheetgen.design.spec`")


def test_readme_starts_with_the_job_then_two_commands():
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    blocks = readme.split("```")
    assert "pip install" in blocks[1] and "sheetgen build" in blocks[1]
    assert "pip install" in blocks[3] and "pytest" in blocks[3]
    ci = (ROOT / ".ci" / "run").read_text()
    # CI runs exactly the test command the README gives (the part after the install)
    command = blocks[3].strip().split("&&")[-1].strip()
    assert command.startswith("python -m pytest")
    assert any(line.strip() == command for line in ci.splitlines()), (command, ci)


def test_the_demo_parameters_are_the_shipped_demo():
    # `sheetgen build` without PARAMS runs sheetgen/data/demo.toml; params/demo.toml must be the same file
    assert (ROOT / "params" / "demo.toml").read_bytes() == (ROOT / "sheetgen" / "data" / "demo.toml").read_bytes()
