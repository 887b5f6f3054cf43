"""The nester's memory and part-count ceiling.

Ceiling: before any work, :func:`estimate` gives the memory a run needs from
its part and vertex counts; a run above ``memory_limit_bytes`` (default
:data:`MEMORY_LIMIT_BYTES`) or above :data:`MAX_PARTS` parts is refused with
:class:`RunTooLarge`, naming the count and the limit.
"""

from __future__ import annotations

from collections.abc import Sequence

import shapely

from sheetgen.errors import SheetgenError
from sheetgen.production.nesting.model import NestItem


# The ceiling (see the module doc). The per-vertex and per-part figures are the
# memory a placed part costs until its sheet is written (placed polygon,
# contours, marks, layout records): the peak of `nest --kits 1000` on the demo
# kit (236 MB for 21,000 parts and 5 million vertices) and of 4000 kits (646 MB
# for 84,000 parts) are about half of what these figures estimate (430 MB, 1.3 GB).
MEMORY_LIMIT_BYTES = 2 * 1024**3
MAX_PARTS = 200_000
BYTES_PER_VERTEX = 48
BYTES_PER_PART = 2_000
BYTES_FIXED = 150 * 1024**2


class RunTooLarge(SheetgenError):
    """A run above the nester's ceiling: refused before any work."""


def estimate(items: Sequence[NestItem]) -> tuple[int, int]:
    """(parts, bytes): the part count of a run and the memory it needs, from
    the part and vertex counts alone (see the constants above)."""
    parts = sum(int(it.qty) for it in items)
    verts = sum(int(it.qty) * int(shapely.get_num_coordinates(it.polygon)) for it in items)
    return parts, BYTES_FIXED + parts * BYTES_PER_PART + verts * BYTES_PER_VERTEX


def check_ceiling(items: Sequence[NestItem], memory_limit_bytes: float = MEMORY_LIMIT_BYTES) -> None:
    """Raise :class:`RunTooLarge` when ``items`` are above the ceiling."""
    parts, need = estimate(items)
    gib = 1024**3
    if parts > MAX_PARTS:
        raise RunTooLarge(f"{parts:,} parts to nest: the limit is {MAX_PARTS:,} parts per run "
                          f"(split the run into smaller ones)")
    if need > memory_limit_bytes:
        per_part = (need - BYTES_FIXED) / parts
        fits = int((memory_limit_bytes - BYTES_FIXED) / per_part)
        raise RunTooLarge(f"{parts:,} parts to nest would need about {need / gib:.1f} GB of memory: the limit is "
                          f"{memory_limit_bytes / gib:.1f} GB (about {max(fits, 0):,} of these parts per run; "
                          f"split the run into smaller ones)")
