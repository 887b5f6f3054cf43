"""Timing for the benchmark scripts (run from the checkout; pytest does not collect them)."""

from __future__ import annotations

import time
from collections.abc import Callable
from typing import TypeVar

T = TypeVar("T")


def best_of(fn: Callable[[], T], repeat: int = 3) -> tuple[float, T | None]:
    """The shortest of ``repeat`` wall-clock runs of ``fn`` (seconds), and its last result."""
    best, out = float("inf"), None
    for _ in range(repeat):
        t = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t)
    return best, out
