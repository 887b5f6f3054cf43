"""The turning frame: tray, rim layer(s), bezel, and the two ribs on the axle."""

from __future__ import annotations

from sheetgen.geometry.joints import Edge
from sheetgen.geometry.shapes import disc, hull, rect
from sheetgen.design.layout import PANEL_CLEARANCE_MM, Layout
from sheetgen.design.part import LAYER_GUIDE, Mark
from sheetgen.geometry.placement import place
from sheetgen.design.parts import Blank, plain_hole, round_hole

X, Y, Z = (1.0, 0.0, 0.0), (0.0, 1.0, 0.0), (0.0, 0.0, 1.0)


def _frame_plate(L: Layout):
    return rect(-L.tray_half_x_mm, -L.tray_half_y_mm, L.tray_half_x_mm, L.tray_half_y_mm)


def _bolt_holes(spec, L: Layout):
    return tuple(round_hole(x, y, spec.frame.bolt_diameter_mm) for x, y in L.bolt_points)


def _window(L: Layout):
    return plain_hole(rect(-L.window_half_x_mm, -L.window_half_y_mm, L.window_half_x_mm, L.window_half_y_mm))


def tray(spec, L: Layout, drive) -> Blank:
    """Lowest frame layer: the panel rests on its ledge; the ribs' tabs pass through it."""
    w, h = spec.panel.width_mm / 2, spec.panel.height_mm / 2
    guide = Mark(LAYER_GUIDE, "line", ((-w, -h), (w, -h), (w, h), (-w, h), (-w, -h)))
    return Blank(
        name="tray",
        outline=_frame_plate(L),
        placements=(place(X, Y, (0.0, 0.0, L.tray_z_mm), rotating=True),),
        description="frame layer the panel rests on; ledge under the panel edge, window behind it",
        holes=(_window(L),) + _bolt_holes(spec, L),
        guides=(guide,),
    )


def rim(spec, L: Layout, drive) -> Blank:
    """Frame layer(s) around the panel edge; as many as the panel is thick."""
    w = spec.panel.width_mm / 2 + PANEL_CLEARANCE_MM
    h = spec.panel.height_mm / 2 + PANEL_CLEARANCE_MM
    placements = tuple(place(X, Y, (0.0, 0.0, L.tray_z_mm + L.t_mm * (1 + i)), rotating=True)
                       for i in range(L.rim_layers))
    return Blank(
        name="rim",
        outline=_frame_plate(L),
        placements=placements,
        description="frame layer with an opening the panel drops into",
        holes=(plain_hole(rect(-w, -h, w, h)),) + _bolt_holes(spec, L),
    )


def bezel(spec, L: Layout, drive) -> Blank:
    """Top frame layer: overlaps the panel edge by the ledge, holding it down."""
    z = L.tray_z_mm + L.t_mm * (1 + L.rim_layers)
    return Blank(
        name="bezel",
        outline=_frame_plate(L),
        placements=(place(X, Y, (0.0, 0.0, z), rotating=True),),
        description="top frame layer; holds the panel down by its edge",
        holes=(_window(L),) + _bolt_holes(spec, L),
    )


def rib(spec, L: Layout, drive) -> Blank:
    """Two ribs carry the tray on the axle (drawn with the axle at the origin,
    local x = kit y, local y = kit z)."""
    bar_h = max(2 * L.t_mm, 8.0)
    outline = hull(rect(-L.rib_half_y_mm, L.tray_z_mm - bar_h, L.rib_half_y_mm, L.tray_z_mm),
                   disc(0.0, 0.0, L.hub_r_mm))
    t = L.t_mm
    placements = tuple(place(Y, Z, (x - t / 2, 0.0, 0.0), rotating=True) for x in (-L.rib_x_mm, L.rib_x_mm))
    top = Edge((-L.rib_half_y_mm, L.tray_z_mm), (L.rib_half_y_mm, L.tray_z_mm), +1)
    return Blank(
        name="rib",
        outline=outline,
        placements=placements,
        description="carries the tray on the axle; press fit on the axle",
        holes=(round_hole(0.0, 0.0, spec.axle.diameter_mm, fit="press"),),
        edges=(("top", top),),
    )
