"""The solver's types: the refusal, a rule, a solution, and the state the rules read.

Pure: no printing, no files.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from typing import Callable

from sheetgen.errors import ParameterError
from sheetgen.design.schema import SCHEMA, SCHEMA_BY_PATH


class NoLayout(ParameterError):
    """No layout exists for these inputs; ``kind`` says which input binds."""

    def __init__(self, message: str, kind: str, **figures):
        super().__init__(message)
        self.kind = kind
        self.figures = figures


def key_lo(path: str) -> float:
    """The lower limit of a schema key the solver searches over (each such key has one)."""
    lo = SCHEMA_BY_PATH[path].lo
    if lo is None:
        raise RuntimeError(f"{path}: the schema gives no lower limit, and the solver needs one")
    return lo


def key_hi(path: str) -> float:
    """The upper limit of a schema key the solver searches over (each such key has one)."""
    hi = SCHEMA_BY_PATH[path].hi
    if hi is None:
        raise RuntimeError(f"{path}: the schema gives no upper limit, and the solver needs one")
    return hi


@dataclass(frozen=True)
class Rule:
    name: str
    sets: tuple[str, ...]
    doc: str
    fn: Callable[["State"], dict]


@dataclass(frozen=True)
class Solution:
    spec: object
    rounds: int
    settled: bool


# ---------------------------------------------------------------------------
# state


def with_values(spec, values: dict):
    """A copy of ``spec`` with these keys (dotted paths) replaced."""
    per_section: dict[str, dict] = {}
    for path, v in values.items():
        k = SCHEMA_BY_PATH[path]
        per_section.setdefault(k.section, {})[k.attr] = v
    return dataclasses.replace(spec, **{s: dataclasses.replace(getattr(spec, s), **kw)
                                        for s, kw in per_section.items()})


class State:
    def __init__(self, spec, auto: frozenset[str]):
        self.spec = spec
        self.auto = auto
        self.load_Nm: float | None = None
        self.module_cap_mm: float | None = None  # set when the wheel's limit binds the motor
        self._memo: dict = {}

    def is_auto(self, path: str) -> bool:
        return path in self.auto

    def v(self, path: str):
        return self.spec.value(path)

    def snapshot(self, leave_out: tuple[str, ...] = ()) -> tuple:
        return tuple(self.v(k.path) for k in SCHEMA if k.path not in leave_out)

    def memo(self, tag: str, key: tuple, fn):
        k = (tag, key)
        if k not in self._memo:
            self._memo[k] = fn()
        return self._memo[k]
