"""The package layout is the pipeline: each stage imports only the stages below it.

Internal architecture check (no outside source): every import is read with ``ast``
(at module level, inside functions, and under ``TYPE_CHECKING``) and every arrow
must run down the floors listed in FLOORS, or stay on its own floor. No core
module may import io, commands, click or cadquery at module level (inside a
function it may load cadquery: the 3D model's lazy import).
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

PKG = Path(__file__).resolve().parents[1] / "sheetgen"

# lowest floor first; a module may import its own floor and the floors below
FLOORS = (
    ("errors", "numbers", "version"),
    ("geometry",),
    ("drive",),
    ("kitmodel",),
    ("mechanics",),
    ("design",),
    ("production", "model3d"),
    ("io",),
    ("pipeline", "buildout", "api"),
    ("commands", "cli", "__main__", "__init__", "samples"),
)
CORE = ("geometry", "drive", "kitmodel", "mechanics", "design", "production", "model3d")
FORBIDDEN_IN_CORE = ("sheetgen.io", "sheetgen.commands", "sheetgen.cli", "click", "cadquery", "OCP")


def _floor(stage: str) -> int:
    for n, names in enumerate(FLOORS):
        if stage in names:
            return n
    raise AssertionError(f"sheetgen/{stage}: not on any floor of tests/test_layers.py FLOORS")


def _stage(module: str) -> str:
    parts = module.split(".")
    return parts[1] if len(parts) > 1 else "__init__"


def _modules():
    for path in sorted(PKG.rglob("*.py")):
        rel = path.relative_to(PKG.parent).with_suffix("")
        name = ".".join(rel.parts)
        if name.endswith(".__init__"):
            name = name[: -len(".__init__")]
        yield name, path


def _names(nodes, pkg: str) -> list[str]:
    out = []
    for sub in nodes:
        if isinstance(sub, ast.Import):
            out += [a.name for a in sub.names]
        elif isinstance(sub, ast.ImportFrom):
            if sub.level:
                base = pkg.split(".")[: len(pkg.split(".")) - sub.level + 1]
                out.append(".".join(base + ([sub.module] if sub.module else [])))
            else:
                out.append(sub.module or "")
    return out


def _top_level_imports(path: Path, module: str) -> list[str]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    pkg = module if path.name == "__init__.py" else module.rpartition(".")[0]
    nodes = []
    for node in tree.body:  # module level only: not inside functions
        if isinstance(node, ast.If) and "TYPE_CHECKING" in ast.unparse(node.test):
            continue
        nodes += list(ast.walk(node)) if isinstance(node, (ast.If, ast.Try)) else [node]
    return _names(nodes, pkg)


def _all_imports(path: Path, module: str) -> list[str]:
    """Every import of the module: module level, inside functions, under TYPE_CHECKING."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    pkg = module if path.name == "__init__.py" else module.rpartition(".")[0]
    return _names(ast.walk(tree), pkg)


MODULES = list(_modules())


def test_every_module_is_on_a_floor():
    for name, _ in MODULES:
        if name != "sheetgen":
            _floor(_stage(name))


@pytest.mark.parametrize("name,path", MODULES, ids=[m for m, _ in MODULES])
def test_imports_run_down_the_floors(name, path):
    own = _floor(_stage(name)) if name != "sheetgen" else len(FLOORS) - 1
    for imp in _all_imports(path, name):
        if imp.startswith("sheetgen."):
            target = _floor(_stage(imp))
            assert target <= own, f"{name} imports {imp}: an arrow back up the pipeline"
    for imp in _top_level_imports(path, name):
        if _stage(name) in CORE:
            assert not any(imp == f or imp.startswith(f + ".") for f in FORBIDDEN_IN_CORE), \
                f"core module {name} imports {imp} at module level"
