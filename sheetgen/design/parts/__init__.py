"""Part families: one factory function per family, registered in PART_FAMILIES.

A factory takes the validated Spec, the Layout (every shared dimension, see
sheetgen/design/layout.py) and the drive data, and returns a :class:`Blank`: the
part's plain outline, its holes, its placements in the kit frame, and the
named edges that joints may grow tabs from. Tabs and slots are added by the
kit builder (sheetgen/design/kit.py) from its JOINTS table, never by a factory, so
that a slot is always computed from its tab's placement.
"""

from __future__ import annotations

from dataclasses import dataclass

from shapely.geometry import Polygon

from sheetgen.geometry.joints import Edge, fit_clearance_mm
from sheetgen.geometry.shapes import disc
from sheetgen.kitmodel.part import Circle, Mark, Sprung
from sheetgen.geometry.placement import Placement


@dataclass(frozen=True)
class Hole:
    """A hole of a part: its nominal shape and its shape as cut before kerf
    (the fit allowance applied). ``circle`` (cx, cy, r of the fit shape) when
    the hole is round, so writers can emit a true circle."""

    nominal: Polygon
    fit: Polygon
    circle: Circle | None = None


def round_hole(cx: float, cy: float, diameter_mm: float, fit: str | None = None) -> Hole:
    """A round hole of nominal ``diameter_mm``; ``fit`` 'press' makes the cut
    bore grip its shaft (see sheetgen.geometry.joints for the allowances)."""
    d_fit = diameter_mm + (2 * fit_clearance_mm(fit) if fit else 0.0)
    return Hole(disc(cx, cy, diameter_mm / 2), disc(cx, cy, d_fit / 2), Circle(cx, cy, d_fit / 2))


def plain_hole(shape: Polygon) -> Hole:
    return Hole(shape, shape)


@dataclass(frozen=True)
class Blank:
    name: str
    outline: Polygon
    placements: tuple[Placement, ...]
    description: str
    holes: tuple[Hole, ...] = ()
    edges: tuple[tuple[str, Edge], ...] = ()
    guides: tuple[Mark, ...] = ()
    # None: free rotation in steps of 90 degrees (or 0/180 on a grained sheet)
    rotations_deg: tuple[float, ...] | None = None
    sprung: tuple[Sprung, ...] = ()  # spring fingers pressed down in the assembled kit

    def edge(self, name: str) -> Edge:
        return dict(self.edges)[name]


def part_families():
    """The registered factories, in the order parts are listed."""
    from sheetgen.design.parts import axle_hardware, drive, frame, motor, stand, stops, wedge

    return (
        stand.base,
        stand.axle_support,
        stand.stretcher,
        motor.motor_mount,
        motor.motor_clamp,
        motor.motor_brace,
        frame.tray,
        frame.rim,
        frame.bezel,
        frame.rib,
        axle_hardware.collar,
        axle_hardware.spacer,
        drive.wheel,
        drive.pinion,
        stops.stop_arm,
        stops.end_stop,
        wedge.wedge,  # polar axle only (None otherwise)
        wedge.ground_plate,  # polar axle only (None otherwise)
    )
