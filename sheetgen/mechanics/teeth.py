"""Tooth strength: the Lewis bending stress of a spur gear tooth.

Shigley's Mechanical Engineering Design, section 14-1: the tooth as a
cantilever loaded at its tip, sigma = F_t / (b m Y).
"""

from __future__ import annotations

from sheetgen.drive.gears import MODULE_RANGE_MM, check_in_range
from sheetgen.errors import SheetgenError


# Lewis form factor Y, 20 deg full-depth teeth, load at the tip: Shigley's
# Mechanical Engineering Design, table 14-2. Rows 12, 15, 17, 20, 30, 50, 100
# and the rack are the values the design notes list from that table; the other rows
# are from memory of the same table.
LEWIS_Y_TABLE: tuple[tuple[int, float], ...] = (
    (12, 0.245), (13, 0.261), (14, 0.277), (15, 0.290), (16, 0.296), (17, 0.303), (18, 0.309),
    (19, 0.314), (20, 0.322), (21, 0.328), (22, 0.331), (24, 0.337), (26, 0.346), (28, 0.353),
    (30, 0.359), (34, 0.371), (38, 0.384), (43, 0.397), (50, 0.409), (60, 0.422), (75, 0.435),
    (100, 0.447), (150, 0.460), (300, 0.472), (400, 0.480),
)
LEWIS_Y_RACK = 0.485


def lewis_form_factor(teeth: int) -> float:
    """Y for 20 deg full-depth teeth: linear in z between table rows; beyond 400
    teeth linear in 1/z towards the rack. Fewer than 12 teeth is refused: the
    table does not cover them (and such pinions are undercut)."""
    if not isinstance(teeth, int) or isinstance(teeth, bool) or teeth < LEWIS_Y_TABLE[0][0]:
        raise SheetgenError(f"teeth = {teeth!r}: the Lewis form factor table covers 12 teeth and more")
    for (z0, y0), (z1, y1) in zip(LEWIS_Y_TABLE, LEWIS_Y_TABLE[1:]):
        if z0 <= teeth <= z1:
            return y0 + (y1 - y0) * (teeth - z0) / (z1 - z0)
    z0, y0 = LEWIS_Y_TABLE[-1]
    return LEWIS_Y_RACK + (y0 - LEWIS_Y_RACK) * (z0 / teeth)


def lewis_stress_MPa(tangential_force_N: float, face_width_mm: float, module_mm: float, teeth: int) -> float:
    """Lewis bending stress sigma = F_t / (b m Y) in N/mm^2 = MPa (Shigley eq. 14-2, SI form)."""
    check_in_range(tangential_force_N, 0.0, 1e7, "tangential force", "N")
    check_in_range(face_width_mm, 1e-3, 1e4, "face width", "mm")
    check_in_range(module_mm, *MODULE_RANGE_MM, "module", "mm")
    return tangential_force_N / (face_width_mm * module_mm * lewis_form_factor(teeth))
