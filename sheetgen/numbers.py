"""Rounding figures for output: stable, readable JSON."""

from __future__ import annotations

import math


def sig(v, digits: int = 6):
    """Round to ``digits`` significant figures; infinities and NaN become None
    (JSON has none); None and booleans pass through."""
    if v is None or isinstance(v, bool):
        return v
    v = float(v)
    if not math.isfinite(v):
        return None
    if v == 0.0:
        return 0.0
    return float(f"{v:.{digits}g}")
