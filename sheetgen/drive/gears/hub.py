"""The holes of a gear blank: the hub's bore and the lightening windows.

Hub (all holes shrink by kerf / 2 when cut):

* ``round``: a bore of ``bore_mm``;
* ``d``: a bore of ``bore_mm`` with one flat (motor shafts); ``across_flats_mm``
  is the distance from the flat to the opposite side of the bore; the flat is
  on the +y side of the blank;
* ``square`` / ``hex``: a square or hexagonal hole ``across_flats_mm`` across
  its flats (an axle of that section); if ``across_flats_mm`` is not given,
  ``bore_mm`` is taken as the size across flats. Square flats are parallel to
  the axes; the hexagon has flats on +-y.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from sheetgen.errors import GeometryBug
from sheetgen.drive import involute as inv_m
from sheetgen.drive.gears.spec import Hub, RIM_MODULES, WEB_MIN_MM


# --------------------------------------------------------------------------
# holes
# --------------------------------------------------------------------------

def hole_size(hub: Hub) -> tuple[str, float, float]:
    """(shape, size, circumradius) of the finished hole; size 0 = no hole."""
    if hub.bore_shape in ("round", "d"):
        return hub.bore_shape, hub.bore_mm, hub.bore_mm / 2.0
    size = hub.across_flats_mm if hub.across_flats_mm is not None else hub.bore_mm
    if hub.bore_shape == "square":
        return "square", size, size / 2.0 * math.sqrt(2.0)
    return "hex", size, size / 2.0 / math.cos(math.pi / 6.0)


def hole_ring(hub: Hub, offset_mm: float, tol: float) -> np.ndarray | None:
    """The hub hole as a ring of points, moved inward (into the hole) by offset_mm."""
    shape, size, _ = hole_size(hub)
    if not size:
        return None
    d = offset_mm
    if shape == "round":
        r = size / 2.0 - d
        return inv_m.arc_points(r, 0.0, 2.0 * math.pi, tol)[:-1]
    if shape == "d":
        if hub.across_flats_mm is None:  # check_gear_spec refuses a d hole without it
            raise GeometryBug("a d hole without across_flats_mm reached the blank")
        r = size / 2.0 - d
        h = hub.across_flats_mm - size / 2.0 - d          # flat's distance from the centre (+y side)
        a = math.asin(h / r)
        arc = inv_m.arc_points(r, math.pi - a, 2.0 * math.pi + a, tol)
        return arc                                        # the flat closes the ring
    apothem = size / 2.0 - d
    n = 4 if shape == "square" else 6
    first = math.pi / 4.0 if n == 4 else 0.0
    rc = apothem / math.cos(math.pi / n)
    ang = first + 2.0 * math.pi * np.arange(n) / n
    return np.column_stack([rc * np.cos(ang), rc * np.sin(ang)])


def web_mm(module_mm: float) -> float:
    """Width of rim (under the root), spokes and hub ring of a lightened wheel."""
    return max(WEB_MIN_MM, RIM_MODULES * module_mm)


@dataclass(frozen=True)
class _Windows:
    count: int
    r_in: float
    r_out: float
    half_spoke: float
    fillet: float


def plan_windows(root_radius_mm: float, hole_circumradius_mm: float, module_mm: float) -> _Windows | None:
    """Lightening windows for a wheel, or None when there is no room (see module doc)."""
    w = web_mm(module_mm)
    r_out = root_radius_mm - w
    r_in = (hole_circumradius_mm if hole_circumradius_mm > 0 else 0.0) + w
    depth = r_out - r_in
    if depth < w:
        return None
    fillet = min(w / 2.0, depth / 4.0)
    r_mid = 0.5 * (r_out + r_in)
    n = int(min(12, max(3, round(2.0 * math.pi * r_mid / (depth + w)))))
    # spokes are parallel-sided: near the hub the window narrows; move its inner
    # edge out until the inner fillets fit
    r_in = max(r_in, (w / 2.0 + 2.0 * fillet) / math.sin(math.pi / n))
    if r_out - r_in < max(w, 2.0 * fillet):
        return None
    return _Windows(n, r_in, r_out, w / 2.0, fillet)


def _fillet_arc(c: np.ndarray, rho: float, p0: np.ndarray, p1: np.ndarray, tol: float) -> np.ndarray:
    a0 = math.atan2(p0[1] - c[1], p0[0] - c[0])
    a1 = math.atan2(p1[1] - c[1], p1[0] - c[0])
    while a1 - a0 > math.pi:
        a1 -= 2.0 * math.pi
    while a1 - a0 < -math.pi:
        a1 += 2.0 * math.pi
    return inv_m.arc_points(rho, a0, a1, tol, centre=(c[0], c[1]))


def window_rings(plan: _Windows, offset_mm: float, tol: float) -> list[np.ndarray]:
    """The windows, each moved inward (into the window) by offset_mm, sharp-exact:
    arcs stay concentric, spoke edges move parallel, fillet radii shrink."""
    d = offset_mm
    ro, ri = plan.r_out - d, plan.r_in + d
    h = plan.half_spoke + d
    rho = max(plan.fillet - d, 0.0)
    half = math.pi / plan.count                  # window centred on +x, spoke axes at +-half
    e = np.array([math.cos(half), math.sin(half)])
    n = np.array([math.sin(half), -math.cos(half)])   # into the window from the upper spoke axis
    t_out = math.sqrt((ro - rho) ** 2 - (h + rho) ** 2)
    t_in = math.sqrt((ri + rho) ** 2 - (h + rho) ** 2)
    c_out = (h + rho) * n + t_out * e
    c_in = (h + rho) * n + t_in * e
    p_out_arc = c_out * ro / (ro - rho) if rho > 0 else c_out
    p_out_line = c_out - rho * n
    p_in_line = c_in - rho * n
    p_in_arc = c_in * ri / (ri + rho) if rho > 0 else c_in
    a_out = math.atan2(p_out_arc[1], p_out_arc[0])
    a_in = math.atan2(p_in_arc[1], p_in_arc[0])
    if t_out <= t_in or a_out <= 0 or a_in <= 0:
        raise GeometryBug("lightening window has no room left after the kerf offset")
    # upper half, from the outer arc's middle round to the inner arc's middle
    upper = [inv_m.arc_points(ro, 0.0, a_out, tol)]
    if rho > 0:
        upper.append(_fillet_arc(c_out, rho, p_out_arc, p_out_line, tol)[1:])
    upper.append(p_in_line[None, :])
    if rho > 0:
        upper.append(_fillet_arc(c_in, rho, p_in_line, p_in_arc, tol)[1:])
    upper.append(inv_m.arc_points(ri, a_in, 0.0, tol)[1:])
    up = np.vstack(upper)
    lower = up[::-1][1:-1] * np.array([1.0, -1.0])      # mirror, skip the two points on the x axis
    ring = np.vstack([up, lower])
    rings = []
    for k in range(plan.count):
        ang = 2.0 * math.pi * k / plan.count
        c, s = math.cos(ang), math.sin(ang)
        rings.append(np.column_stack([c * ring[:, 0] - s * ring[:, 1], s * ring[:, 0] + c * ring[:, 1]]))
    return rings
