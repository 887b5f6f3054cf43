"""The turning frame: tray, rim layer(s), bezel, and the two ribs on the axle."""

from __future__ import annotations

from shapely.geometry import Polygon
from shapely.ops import unary_union

from sheetgen.geometry.joints import Edge, fit_clearance_mm
from sheetgen.geometry.shapes import d_shape, disc, hull, one_polygon, rect
from sheetgen.design.layout import CLAMP_TOL_MM, FINGER_SLOT_MM, PANEL_CLEARANCE_MM, Layout
from sheetgen.kitmodel.part import LAYER_GUIDE, Mark, Sprung
from sheetgen.geometry.placement import place
from sheetgen.design.parts import Blank, Hole, plain_hole, round_hole

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


def finger_regions(L: Layout) -> tuple[tuple[Polygon, Polygon], ...]:
    """The bezel's spring fingers: (finger, the slot that frees it) per window
    edge in L.finger_sides, in the bezel's plane (= kit x, y). Each finger runs
    along its window edge, centred on it, root at its -x (or -y) end; the slot
    runs along its outer side and across its free end into the window."""
    if L.clamp_mode != "fingers":
        return ()
    n, w, s = L.finger_len_mm, L.finger_width_mm, FINGER_SLOT_MM
    wx, wy = L.window_half_x_mm, L.window_half_y_mm
    out = []
    for side in L.finger_sides:
        sign = 1.0 if side[0] == "+" else -1.0
        if side[1] == "y":  # along x, on the window edge at y = sign * wy
            a0, a1 = -n / 2, n / 2
            finger = rect(a0, min(sign * wy, sign * (wy + w)), a1, max(sign * wy, sign * (wy + w)))
            slot = unary_union([
                rect(a0, min(sign * (wy + w), sign * (wy + w + s)), a1 + s, max(sign * (wy + w), sign * (wy + w + s))),
                rect(a1, min(sign * (wy - 1.0), sign * (wy + w)), a1 + s, max(sign * (wy - 1.0), sign * (wy + w))),
            ])
        else:  # along y, on the window edge at x = sign * wx
            a0, a1 = -n / 2, n / 2
            finger = rect(min(sign * wx, sign * (wx + w)), a0, max(sign * wx, sign * (wx + w)), a1)
            slot = unary_union([
                rect(min(sign * (wx + w), sign * (wx + w + s)), a0, max(sign * (wx + w), sign * (wx + w + s)), a1 + s),
                rect(min(sign * (wx - 1.0), sign * (wx + w)), a1, max(sign * (wx - 1.0), sign * (wx + w)), a1 + s),
            ])
        out.append((finger, one_polygon(slot, "finger slot")))
    return tuple(out)


def bezel(spec, L: Layout, drive) -> Blank:
    """Top frame layer over the panel edge. When the rim stack matches the panel
    (within CLAMP_TOL_MM) the bezel bears on the panel itself and the frame bolts
    clamp it; else it rests on the rim stack and spring fingers cut along the
    window's edges are pressed down onto the panel (see layout.CLAMP_TOL_MM)."""
    fingers = finger_regions(L)
    if fingers:
        window = one_polygon(unary_union([_window(L).nominal] + [slot for _, slot in fingers]), "bezel window")
        holes = (plain_hole(window),)
        sprung = tuple(Sprung(f, L.clamp_gap_mm) for f, _ in fingers)
        how = (f"top frame layer; rests on the rim stack and its {len(fingers)} spring fingers "
               f"({L.finger_len_mm:g} x {L.finger_width_mm:g} mm) press the panel down: each bends "
               f"{L.clamp_gap_mm:.2f} mm onto the panel and holds a panel up to {CLAMP_TOL_MM:g} mm thinner")
    else:
        holes, sprung = (_window(L),), ()
        how = ("top frame layer; bears on the panel by its edge, clamped by the frame bolts"
               + (f" (they close the {L.stack_gap_mm:.2f} mm left over the rim stack)" if L.stack_gap_mm > 1e-6
                  else "") if spec.frame.bolt_diameter_mm > 0 else
               "top frame layer; bears on the panel by its edge (no frame bolts: glue or clamp the stack)")
    return Blank(
        name="bezel",
        outline=_frame_plate(L),
        placements=(place(X, Y, (0.0, 0.0, L.bezel_z_mm), rotating=True),),
        description=how,
        holes=holes + _bolt_holes(spec, L),
        sprung=sprung,
    )


def keyed_bore(spec, L: Layout) -> Hole:
    """The D-bore of a part keyed on the axle's flat (press fit): the axle's
    D profile (flat on local +y, as the axle solid's), shrunk by the press-fit
    allowance."""
    nominal = d_shape(0.0, 0.0, spec.axle.diameter_mm, L.axle_flat_mm)
    return Hole(nominal, nominal.buffer(fit_clearance_mm("press"), join_style="mitre"))


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
        description="carries the tray on the axle; keyed on the axle's flat (D-bore, press fit)",
        holes=(keyed_bore(spec, L),),
        edges=(("top", top),),
    )
