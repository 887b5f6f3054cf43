"""The package layout is the pipeline: each stage imports only the stages below it.

Internal architecture check (no outside source): module-level imports are read with
``ast`` and every arrow must run down the floors listed in FLOORS. Imports inside
functions are allowed to reach up (the CLI's lazy imports), except that no core
module may import io, commands, click or cadquery at module level.
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

PKG = Path(__file__).resolve().parents[1] / "sheetgen"

# lowest floor first; a module may import its own floor and the floors below
FLOORS = (
    ("errors", "numbers"),
    ("geometry",),
    ("drive",),
    ("design",),
    ("mechanics",),
    ("production", "model3d"),
    ("io",),
    ("pipeline", "api", "samples"),
    ("commands", "cli", "__main__", "__init__"),
)
CORE = ("geometry", "drive", "design", "mechanics", "production", "model3d")
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


def _top_level_imports(path: Path, module: str) -> list[str]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    out = []
    pkg = module if path.name == "__init__.py" else module.rpartition(".")[0]
    for node in tree.body:  # module level only: not inside functions
        if isinstance(node, ast.If) and "TYPE_CHECKING" in ast.unparse(node.test):
            continue
        for sub in ast.walk(node) if isinstance(node, (ast.If, ast.Try)) else (node,):
            if isinstance(sub, ast.Import):
                out += [a.name for a in sub.names]
            elif isinstance(sub, ast.ImportFrom):
                if sub.level:
                    base = pkg.split(".")[: len(pkg.split(".")) - sub.level + 1]
                    out.append(".".join(base + ([sub.module] if sub.module else [])))
                else:
                    out.append(sub.module or "")
    return out


MODULES = list(_modules())


def test_every_module_is_on_a_floor():
    for name, _ in MODULES:
        if name != "sheetgen":
            _floor(_stage(name))


@pytest.mark.parametrize("name,path", MODULES, ids=[m for m, _ in MODULES])
def test_imports_run_down_the_floors(name, path):
    own = _floor(_stage(name)) if name != "sheetgen" else len(FLOORS) - 1
    for imp in _top_level_imports(path, name):
        if imp.startswith("sheetgen.") or imp == "sheetgen":
            if imp == "sheetgen":
                continue
            target = _floor(_stage(imp))
            assert target <= own, f"{name} imports {imp} at module level: an arrow back up the pipeline"
        if _stage(name) in CORE:
            assert not any(imp == f or imp.startswith(f + ".") for f in FORBIDDEN_IN_CORE), \
                f"core module {name} imports {imp} at module level"
