"""sheetgen: laser-cut single-axis sun-tracker kits from one parameter file.

The Python API (see :mod:`sheetgen.api`)::

    import sheetgen

    spec = sheetgen.load_params()                  # the shipped demo; or a path, with overrides
    build = sheetgen.build(spec, kits=3, model=False)
    sheetgen.write_build(build, "out")

Importing sheetgen costs nothing: each call imports the core it needs.
"""

from __future__ import annotations

from typing import Any

__all__ = ["build", "build_kit", "check_balance", "load_params", "nest_kits", "plan_cuts", "write_build",
           "__version__"]


def __getattr__(name: str) -> Any:
    if name == "__version__":
        from sheetgen.version import __version__

        return __version__
    if name in __all__:
        from sheetgen import api

        return getattr(api, name)
    raise AttributeError(f"module 'sheetgen' has no attribute {name!r}")
