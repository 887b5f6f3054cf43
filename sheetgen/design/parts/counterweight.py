"""The counterweight the frame carries: a bracket cut from the sheet and a bought
steel bar, sized from the bare frame's static unbalance (rule counterweight_balance).

The bare frame is every turning part and component of the kit before the
counterweight (the panel, the frame layers, the ribs, the axle hardware, the
wheel and the user's [[rotating_mass]] entries). When its centre of gravity sits
more than CW_THRESHOLD_MM off the axle, the kit gets:

- ``counterweight-bracket``: a plate across the axle against the inner face of
  the +x rib, keyed on the axle's flat (D-bore, press fit) like the rib and
  bolted to it through the hub by two frame bolts (when frame.bolt_diameter
  gives them room); its arm reaches straight opposite the bare CG;
- ``counterweight``: a round steel bar of a stock diameter, laid along the axle
  against the bracket's inner face at the arm's end, screwed to it on its axis.

The arm is the farthest (1 mm steps) that keeps the bar inside the turning
frame's own reach and off the other turning parts; the bracket's end disc is the
bar's own section, so the clearance sweep of the bracket (a part) covers the bar.
The bar's mass cancels what is left of the unbalance with the bracket fitted
(lever rule, m a = U), its length is rounded to BAR_LENGTH_STEP_MM, and the
residual is what that rounding and the bracket's off-line mass leave.

Pure: no printing, no files.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from shapely.ops import unary_union

from sheetgen.design.layout import Layout
from sheetgen.kitmodel.part import Component, Kit, Part
from sheetgen.design.parts import Blank, Hole, round_hole
from sheetgen.geometry.placement import place
from sheetgen.geometry.shapes import disc, hull, one_polygon

Y, Z = (0.0, 1.0, 0.0), (0.0, 0.0, 1.0)

# A frame whose CG sits within 0.5 mm of the axle gets no counterweight: that is
# the order of what the frame's own build tolerances move it (sheet thickness and
# density spread, panel mass spread: our rule), so a weight smaller than that
# corrects nothing one can rely on.
CW_THRESHOLD_MM = 0.5
# bright round steel bar, common stock diameters (from memory)
BAR_DIAMETERS_MM = (10.0, 12.0, 16.0, 20.0, 25.0)
BAR_LENGTH_STEP_MM = 0.5  # the bar is cut to the nearest half millimetre
MIN_BAR_LENGTH_MM = 3.0
BAR_MAX_LENGTH_D = 6.0  # a longer bar than 6 diameters takes the next stock size: a compact weight (our rule)
BAR_SCREW_HOLE_MM = 4.5  # the bar is drilled and tapped M4 on its axis; M4 clearance hole (ISO 273 medium, from memory)
BAR_GAP_MM = 1.0  # least gap, the bar's free end to the -x rib
BOLT_MATERIAL_MM = 1.0  # least material round a bracket bolt in the hub (our rule)
STEEL_KG_MM3 = 7850e-9  # common practice (carbon steel, 7850 kg/m3)
BRACKET = "counterweight-bracket"
COUNTERWEIGHT = "counterweight"


@dataclass(frozen=True)
class CounterweightPlan:
    bracket: Blank
    rib_holes: tuple[Hole, ...]  # the bracket's bolts through the rib
    component: Component
    arm_mm: float
    bar_diameter_mm: float
    bar_length_mm: float
    bare_unbalance_gmm: float
    residual_gmm: float


def plan_counterweight(spec, L: Layout, parts: tuple[Part, ...],
                       components: tuple[Component, ...]) -> CounterweightPlan | None:
    """The bracket and bar that balance the bare frame, or None when it needs none
    (or no arm opposite its CG is free: the balance check then says so)."""
    from sheetgen.kitmodel.clearance import kit_silhouettes
    from sheetgen.mechanics.massprops import mass_properties
    from sheetgen.mechanics.materials import sheet_material

    bare = Kit(parts, components)
    mp = mass_properties(bare)
    _, cy, cz = mp.rotating_cg_mm
    r = math.hypot(cy, cz)
    if r <= CW_THRESHOLD_MM:
        return None
    u = np.array([-cy / r, -cz / r])
    u_bare = mp.rotating_mass_kg * 1000.0 * np.array([cy, cz])  # g·mm
    t = L.t_mm
    x_face = L.rib_x_mm - t / 2  # inner face of the +x rib
    span = x_face - t - (-L.rib_x_mm + t / 2) - BAR_GAP_MM  # room for the bar toward the -x rib
    sils = [s for s in kit_silhouettes(bare) if s.rotating]
    reach = max(float(np.hypot(*np.asarray(s.shape.exterior.coords).T).max()) for s in sils)
    # how deep the bare frame reaches below the axle through the travel: the bracket
    # and bar stay within it, so the stand needs no more room than the frame does
    turn = np.radians(np.linspace(-spec.site.travel_limit_deg, spec.site.travel_limit_deg, 61))
    pts = np.vstack([np.asarray(s.shape.exterior.coords) for s in sils])
    depth = float(max(-(pts[:, 0] * np.sin(a) + pts[:, 1] * np.cos(a)).min() for a in turn))
    density = sheet_material(spec.sheet.material).density_kg_m3
    d = spec.axle.diameter_mm
    bolt = spec.frame.bolt_diameter_mm
    # no bolts through the rib: both ribs are one part, so holes for the bracket would leave two
    # idle holes in the -x rib; the keyed press-fit bore carries the bar's torque and the rib's
    # face stops the bracket along the axle
    bolts: tuple[tuple[float, float], ...] = ()
    from sheetgen.design.parts.frame import keyed_bore

    bore = keyed_bore(spec, L)
    for dia in BAR_DIAMETERS_MM:
        rad = dia / 2
        low = float(max(-(u[0] * np.sin(a) + u[1] * np.cos(a)) for a in turn))  # the arm's depth share
        arm = math.floor(min(reach - rad, (depth - rad) / low if low > 1e-9 else math.inf))
        a_min = d / 2 + rad  # the bar clear of the axle
        while arm >= a_min:
            end = (float(arm * u[0]), float(arm * u[1]))
            outline = hull(disc(0.0, 0.0, L.hub_r_mm), disc(end[0], end[1], rad))
            holes = (bore,) + tuple(round_hole(x, y, bolt) for x, y in bolts)
            if rad - BAR_SCREW_HOLE_MM / 2 >= BOLT_MATERIAL_MM:
                holes += (round_hole(end[0], end[1], BAR_SCREW_HOLE_MM),)
            plate = one_polygon(outline.difference(unary_union([h.nominal for h in holes])), BRACKET)
            m_br = plate.area * t * density * 1e-9 * 1000.0  # g
            c = plate.centroid
            u_br = m_br * np.array([c.x, c.y])
            need = -float((u_bare + u_br) @ u)  # g·mm the bar must give
            if need <= 0:  # the bracket alone overshoots: a shorter arm
                arm -= 1
                continue
            mass_g = need / arm
            length = mass_g / 1000.0 / (STEEL_KG_MM3 * math.pi * rad ** 2)
            length = max(MIN_BAR_LENGTH_MM, round(length / BAR_LENGTH_STEP_MM) * BAR_LENGTH_STEP_MM)
            if length > span or (length > BAR_MAX_LENGTH_D * dia and dia < BAR_DIAMETERS_MM[-1]):
                break  # a thicker bar
            x0 = x_face - t - length
            if _runs_into(sils, outline, (x0, x_face)):
                arm -= 1
                continue
            mass_kg = STEEL_KG_MM3 * math.pi * rad ** 2 * length
            resid = u_bare + u_br + mass_kg * 1000.0 * arm * u
            bracket = Blank(
                name=BRACKET,
                outline=outline,
                placements=(place(Y, Z, (x_face - t, 0.0, 0.0), rotating=True),),
                description=(f"carries the counterweight ({dia:g} mm steel bar, {length:g} mm long, "
                             f"{mass_kg * 1000:.0f} g) {arm} mm from the axle opposite the frame's CG; keyed on "
                             "the axle's flat (D-bore, press fit) against the +x rib"
                             + (", bolted to it through the hub" if bolts else "")),
                holes=holes,
            )
            comp = Component(COUNTERWEIGHT, mass_kg, "cylinder_x", (x0 + length / 2, end[0], end[1]),
                             (length, dia, dia), rotating=True)
            return CounterweightPlan(bracket, tuple(round_hole(x, y, bolt) for x, y in bolts), comp, float(arm),
                                     dia, length, float(np.hypot(*u_bare)), float(np.hypot(*resid)))
    return None


def _runs_into(sils, outline, x_range: tuple[float, float]) -> bool:
    """Whether the bracket and bar (seen along the axle: the bracket's outline)
    overlap a turning part they share x with (touching is fine)."""
    for s in sils:
        if s.x_range_mm[0] < x_range[1] - 1e-9 and x_range[0] < s.x_range_mm[1] - 1e-9:
            if s.shape.intersection(outline).area > 1e-6:
                return True
    return False
