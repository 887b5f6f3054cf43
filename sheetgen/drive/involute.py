"""Involute spur-gear math: pure functions, radians inside, mm for lengths.

The tooth form is the one a generating rack cuts. The rack is the ISO 53 basic
rack (addendum 1.00 m, dedendum 1.25 m, root fillet 0.38 m; ISO 53:1998, from
memory), rolled without slip on the reference (pitch) circle, its datum line
moved out by the profile shift x m. Where the rack tip is too narrow for a
0.38 m fillet (pressure angles above about 23.1 deg) the tip is a full round.

Every point of the outline is computed in closed form:

* flanks: involutes of the base circle, from where the rack's straight flank
  stops cutting (the form circle) or, when the gear is undercut, from where the
  fillet path cuts into the involute, out to the tip circle;
* root fillet: the envelope of the rack's tip fillet as the rack rolls (the
  trochoidal root the rack really cuts, undercut included);
* root and tip: arcs of the root and tip circles.

Tooth thinning (backlash) and the kerf offset are both handled *in the rack*:
thinning thickens the rack tooth; an outward normal offset ``d`` of the gear
outline is exactly the outline cut by the rack offset inward by ``d`` (flanks
moved ``d`` along their normal, tip line moved ``d``, fillet radius ``rho - d``
about the same centre). Its flanks are involutes of the same base circle whose
base-circle arc thickness grows by ``d`` per flank, so the tooth thickness at
the pitch circle grows by exactly ``2 d / cos(alpha)``; tip and root radii grow
by ``d``; the tip corners stay sharp.

Polygonisation: every vertex lies on the true curve and every chord stays
within ``chord_tol_mm`` of it (vertices are chosen greedily as far apart as the
tolerance allows, from a dense sampling of each closed-form piece).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

# ISO 53 basic rack, in modules (ISO 53:1998, profile A; from memory).
RACK_ADDENDUM = 1.00      # gear addendum h_aP / m
RACK_DEDENDUM = 1.25      # gear dedendum h_fP / m (the rack tip that cuts the root)
RACK_ROOT_FILLET = 0.38   # rack tip fillet radius rho_fP / m

# Default chord tolerance. Vertices sit on the true curve, chords within this
# distance of it. 0.0025 mm keeps the tooth thickness measured across two
# flanks within 0.01 mm at every radius (error <= 2 tol / cos(alpha_r)).
DEFAULT_CHORD_TOL_MM = 0.0025


# --------------------------------------------------------------------------
# involute function and standard dimensions
# --------------------------------------------------------------------------

def inv(alpha_rad):
    """The involute function inv(a) = tan(a) - a (scalar or numpy array)."""
    return np.tan(alpha_rad) - alpha_rad if isinstance(alpha_rad, np.ndarray) else math.tan(alpha_rad) - alpha_rad


def inv_inverse(value: float) -> float:
    """The angle a in [0, pi/2) with tan(a) - a = value (value >= 0).

    Newton's method from t0 = (3 v)^(1/3), which lies at or right of the root
    because tan t - t >= t^3 / 3; on the convex, increasing function Newton
    then converges monotonically."""
    if value < 0:
        raise ValueError(f"inv_inverse({value}): the involute function is never negative")
    if value == 0:
        return 0.0
    t = min((3.0 * value) ** (1.0 / 3.0), math.pi / 2 - 1e-9)
    for _ in range(100):
        f = math.tan(t) - t - value
        step = f / math.tan(t) ** 2
        t -= step
        if abs(step) < 1e-15:
            break
    return t


def pitch_radius_mm(module_mm: float, teeth: int) -> float:
    return module_mm * teeth / 2.0


def base_radius_mm(module_mm: float, teeth: int, pressure_angle_deg: float) -> float:
    return module_mm * teeth * math.cos(math.radians(pressure_angle_deg)) / 2.0


def tip_radius_mm(module_mm: float, teeth: int, shift: float = 0.0) -> float:
    """Tip radius m (z + 2 + 2x) / 2 (no tip shortening)."""
    return module_mm * (teeth + 2.0 * RACK_ADDENDUM + 2.0 * shift) / 2.0


def root_radius_mm(module_mm: float, teeth: int, shift: float = 0.0) -> float:
    """Root radius m (z - 2.5 + 2x) / 2, cut by the rack tip line."""
    return module_mm * (teeth - 2.0 * RACK_DEDENDUM + 2.0 * shift) / 2.0


def pitch_tooth_thickness_mm(module_mm: float, pressure_angle_deg: float, shift: float = 0.0,
                             backlash_mm: float = 0.0) -> float:
    """Arc tooth thickness at the reference circle: m (pi/2 + 2 x tan a) - backlash."""
    a = math.radians(pressure_angle_deg)
    return module_mm * (math.pi / 2.0 + 2.0 * shift * math.tan(a)) - backlash_mm


def tooth_thickness_at_radius_mm(module_mm: float, teeth: int, pressure_angle_deg: float, shift: float,
                                 radius_mm: float, backlash_mm: float = 0.0) -> float:
    """Arc tooth thickness at radius r: s_r = r (s / r_p + 2 (inv a - inv a_r)), cos a_r = r_b / r."""
    a = math.radians(pressure_angle_deg)
    rp = pitch_radius_mm(module_mm, teeth)
    rb = rp * math.cos(a)
    if radius_mm < rb:
        raise ValueError(f"radius {radius_mm} mm is inside the base circle ({rb} mm)")
    s = pitch_tooth_thickness_mm(module_mm, pressure_angle_deg, shift, backlash_mm)
    ar = math.acos(rb / radius_mm)
    return radius_mm * (s / rp + 2.0 * (inv(a) - inv(ar)))


def span_over_teeth_mm(module_mm: float, teeth: int, pressure_angle_deg: float, shift: float, k: int,
                       backlash_mm: float = 0.0) -> float:
    """Base tangent length over k teeth (ISO 21771):
    W = m cos a [pi (k - 0.5) + z inv a] + 2 x m sin a, less backlash * cos a for thinned teeth."""
    a = math.radians(pressure_angle_deg)
    return (module_mm * math.cos(a) * (math.pi * (k - 0.5) + teeth * inv(a))
            + 2.0 * shift * module_mm * math.sin(a) - backlash_mm * math.cos(a))


def span_contact_radius_mm(module_mm: float, teeth: int, pressure_angle_deg: float, shift: float, k: int,
                           backlash_mm: float = 0.0) -> float:
    """Radius at which the caliper jaws touch the flanks when measuring the span over k teeth."""
    rb = base_radius_mm(module_mm, teeth, pressure_angle_deg)
    w = span_over_teeth_mm(module_mm, teeth, pressure_angle_deg, shift, k, backlash_mm)
    return math.hypot(rb, w / 2.0)


def span_teeth_k(teeth: int, pressure_angle_deg: float, shift: float = 0.0) -> int:
    """The usual number of teeth to span: the k whose jaws touch the flanks
    nearest the radius r + x m (the reference circle for unshifted gears)."""
    best_k, best_err = 1, math.inf
    target = pitch_radius_mm(1.0, teeth) + shift
    for k in range(1, max(2, teeth)):
        err = abs(span_contact_radius_mm(1.0, teeth, pressure_angle_deg, shift, k) - target)
        if err < best_err:
            best_k, best_err = k, err
    return best_k


def pin_centre_angle_rad(module_mm: float, teeth: int, pressure_angle_deg: float, shift: float,
                         pin_diameter_mm: float, backlash_mm: float = 0.0) -> float:
    """Pressure angle at the pin centre when a pin of this size sits in a tooth space:
    inv(phi) = d_p / (m z cos a) - pi / (2 z) + inv a + 2 x tan a / z - backlash / (m z)."""
    a = math.radians(pressure_angle_deg)
    v = (pin_diameter_mm / (module_mm * teeth * math.cos(a)) - math.pi / (2.0 * teeth) + inv(a)
         + 2.0 * shift * math.tan(a) / teeth - backlash_mm / (module_mm * teeth))
    return inv_inverse(v)


def dimension_over_pins_mm(module_mm: float, teeth: int, pressure_angle_deg: float, shift: float,
                           pin_diameter_mm: float, backlash_mm: float = 0.0) -> float:
    """Measurement over two pins (ISO 21771 / handbook formula):
    even z: M = d_b / cos(phi) + d_p; odd z: M = d_b cos(pi / 2z) / cos(phi) + d_p."""
    phi = pin_centre_angle_rad(module_mm, teeth, pressure_angle_deg, shift, pin_diameter_mm, backlash_mm)
    db = 2.0 * base_radius_mm(module_mm, teeth, pressure_angle_deg)
    centre = db / math.cos(phi)
    if teeth % 2:
        centre *= math.cos(math.pi / (2.0 * teeth))
    return centre + pin_diameter_mm


def pin_contact_radius_mm(module_mm: float, teeth: int, pressure_angle_deg: float, shift: float,
                          pin_diameter_mm: float, backlash_mm: float = 0.0) -> float:
    """Radius at which a pin of this size touches the flanks."""
    phi = pin_centre_angle_rad(module_mm, teeth, pressure_angle_deg, shift, pin_diameter_mm, backlash_mm)
    rb = base_radius_mm(module_mm, teeth, pressure_angle_deg)
    roll = math.tan(phi) - pin_diameter_mm / (2.0 * rb)
    return rb * math.sqrt(1.0 + roll * roll) if roll > 0 else rb


def ideal_pin_diameter_mm(module_mm: float, teeth: int, pressure_angle_deg: float, shift: float,
                          backlash_mm: float = 0.0, contact_radius_mm: float | None = None) -> float:
    """Pin diameter that touches the flanks at contact_radius_mm (default r + x m).

    The pin centre lies on the base tangent through the contact point, a pin
    radius further out: tan(phi) = tan(a_c) + d_p / d_b, which with the pin
    formula gives phi = tan(a_c) - C, C = inv a + 2 x tan a / z - pi / 2z - backlash / (m z)."""
    a = math.radians(pressure_angle_deg)
    rb = base_radius_mm(module_mm, teeth, pressure_angle_deg)
    rc = pitch_radius_mm(module_mm, teeth) + shift * module_mm if contact_radius_mm is None else contact_radius_mm
    gamma_c = math.sqrt(max(rc * rc / (rb * rb) - 1.0, 0.0))
    c = (inv(a) + 2.0 * shift * math.tan(a) / teeth - math.pi / (2.0 * teeth)
         - backlash_mm / (module_mm * teeth))
    phi = gamma_c - c
    return 2.0 * rb * (math.tan(phi) - gamma_c)


def undercut_limit_teeth(pressure_angle_deg: float, shift: float = 0.0) -> float:
    """Fewest teeth cut without undercut by a rack with 1.0 m of straight flank
    below its datum: z_min = 2 (1 - x) / sin^2 a (2 / sin^2 a = 17.1 at 20 deg)."""
    s = math.sin(math.radians(pressure_angle_deg))
    return 2.0 * (1.0 - shift) / (s * s)


def min_shift_no_undercut(teeth: int, pressure_angle_deg: float) -> float:
    """Smallest profile shift that avoids undercut: x_min = 1 - z sin^2 a / 2."""
    s = math.sin(math.radians(pressure_angle_deg))
    return 1.0 - teeth * s * s / 2.0


def rack_min_shift_no_undercut(teeth: int, pressure_angle_deg: float) -> float:
    """Smallest shift for which the rack actually used here (ISO 53, 0.38 m tip
    fillet or a full round above about 23.1 deg) does not undercut:
    x = h_s - z sin^2 a / 2 with h_s = 1.25 - rho (1 - sin a) / m the depth of the
    rack's straight flank below its datum (h_s = 1.00 at 20 deg)."""
    a = math.radians(pressure_angle_deg)
    sa = math.sin(a)
    half_tip = math.pi / 4.0 - RACK_DEDENDUM * math.tan(a)
    rho = max(0.0, min(RACK_ROOT_FILLET, half_tip * math.cos(a) / (1.0 - sa)))
    return RACK_DEDENDUM - rho * (1.0 - sa) - teeth * sa * sa / 2.0


def working_pressure_angle_rad(pressure_angle_deg: float, z1: int, z2: int, x1: float = 0.0,
                               x2: float = 0.0) -> float:
    """inv(a_w) = inv(a) + 2 tan(a) (x1 + x2) / (z1 + z2) (zero-backlash mesh of shifted gears)."""
    a = math.radians(pressure_angle_deg)
    if x1 + x2 == 0:
        return a
    v = inv(a) + 2.0 * math.tan(a) * (x1 + x2) / (z1 + z2)
    if v <= 0:
        raise ValueError(f"shifts x1 + x2 = {x1 + x2}: no working pressure angle")
    return inv_inverse(v)


# --------------------------------------------------------------------------
# the generated tooth form
# --------------------------------------------------------------------------

@dataclass(frozen=True)
class ToothForm:
    """Closed-form description of one gear outline (radians and mm).

    Tooth 0 is centred on +x; the description covers its lower flank (angles
    from -pi/z to 0), the upper flank is the mirror image. Rack coordinates
    (u radial from the rolling line, v along it) describe the cutter tooth
    that sits in the space centred at -pi/z.
    """

    module_mm: float
    teeth: int
    alpha: float                 # pressure angle (rad)
    shift: float
    thinning_mm: float           # backlash: tooth thinning at the pitch circle
    offset_mm: float             # outward normal offset of the whole outline (kerf / 2)
    r_pitch: float
    r_base: float
    r_tip: float                 # with offset
    r_root: float                # with offset
    psi_base: float              # half tooth angle at the base circle (with offset)
    u_c: float                   # rack fillet centre, radial from the rolling line
    v_c: float                   # rack fillet centre, along the rolling line from the cutter tooth centre
    rho: float                   # rack fillet radius (after offset; 0 = sharp corner)
    rho_nominal: float           # rack fillet radius before offset
    undercut: bool               # the straight rack flank cuts past the interference point
    beta_end: float              # fillet envelope from beta = pi down to beta_end
    gamma_start: float           # involute flank from this roll angle ...
    gamma_tip: float             # ... to the tip

    @property
    def form_radius(self) -> float:
        """Radius where the involute flank begins."""
        return self.r_base * math.hypot(1.0, self.gamma_start)

    @property
    def tip_half_angle(self) -> float:
        """Half the tooth's angular width at the tip circle (<= 0: pointed)."""
        return self.psi_base - (self.gamma_tip - math.atan(self.gamma_tip))

    @property
    def root_half_angle(self) -> float:
        """Half the angular width of the root-circle arc at the bottom of a space."""
        return self.v_c / self.r_pitch

    # ---- points of the pieces (lower flank of tooth 0) --------------------

    def involute_xy(self, gamma: np.ndarray) -> np.ndarray:
        r = self.r_base * np.sqrt(1.0 + gamma * gamma)
        th = -(self.psi_base - (gamma - np.arctan(gamma)))
        return np.column_stack([r * np.cos(th), r * np.sin(th)])

    def fillet_xy(self, beta: np.ndarray) -> np.ndarray:
        """Envelope of the rack tip fillet, parametrised by the direction beta of
        its normal in rack coordinates (pi: the tip line, pi/2 + alpha: the flank).
        The contact point is where that normal passes through the pitch point."""
        tb = np.tan(beta)
        qu = self.r_pitch + self.u_c + self.rho * np.cos(beta)
        qv = self.u_c * tb + self.rho * np.sin(beta)
        phi = (self.u_c * tb - self.v_c) / self.r_pitch      # gear rotation at contact
        ang = -(phi + math.pi / self.teeth)
        c, s = np.cos(ang), np.sin(ang)
        return np.column_stack([c * qu - s * qv, s * qu + c * qv])

    def involute_angle(self, r: np.ndarray) -> np.ndarray:
        """Polar angle of the (lower) involute flank at radius r >= r_base."""
        g = np.sqrt(np.maximum(r * r / (self.r_base * self.r_base) - 1.0, 0.0))
        return -(self.psi_base - (g - np.arctan(g)))


def tooth_form(module_mm: float, teeth: int, pressure_angle_deg: float, shift: float = 0.0,
               thinning_mm: float = 0.0, offset_mm: float = 0.0) -> ToothForm:
    """The closed-form tooth of a gear cut by the (thickened, offset) ISO 53 rack."""
    m, z = float(module_mm), int(teeth)
    a = math.radians(pressure_angle_deg)
    sa, ca, ta = math.sin(a), math.cos(a), math.tan(a)
    rp = m * z / 2.0
    rb = rp * ca
    d = float(offset_mm)
    s = pitch_tooth_thickness_mm(m, pressure_angle_deg, shift, thinning_mm)
    # cutter tooth = the gear space; its half thickness on the rolling line:
    half_e = (math.pi * m - s) / 2.0
    u_tip0 = -(RACK_DEDENDUM - shift) * m           # rack tip line (nominal)
    half_tip = half_e + u_tip0 * ta                 # half width of the rack tip line
    rho_full = half_tip * ca / (1.0 - sa)           # fillet that makes the tip a full round
    rho0 = max(0.0, min(RACK_ROOT_FILLET * m, rho_full))
    u_c = u_tip0 + rho0                             # fillet centre (unchanged by the offset)
    v_c = half_e + u_c * ta - rho0 / ca
    rho = max(rho0 - d, 0.0)
    if rho == 0.0 and d > rho0:
        # offset larger than the fillet: the offset rack has a sharp corner where
        # its offset flank meets its offset tip line (or, if the offset flanks
        # meet above that line, a sharp point on the tooth's centre line)
        u_c = u_tip0 + d
        v_c = half_e - d / ca + u_c * ta
        if v_c < 0.0:
            u_c = (d / ca - half_e) / ta
            v_c = 0.0
    v_c = max(v_c, 0.0)        # full-round tip: rounding noise must not reverse the root arc
    r_root = rp + u_c - rho
    r_tip = tip_radius_mm(m, z, shift) + d
    psi_base = s / (2.0 * rp) + inv(a) + d / rb
    gamma_tip = math.sqrt(max(r_tip * r_tip / (rb * rb) - 1.0, 0.0))

    # lowest point of the straight rack flank, as a distance t along the line of
    # action from the pitch point; the interference point is at t = rp sin a
    t_ft = -u_c / sa + rho
    t_interference = rp * sa
    base = dict(module_mm=m, teeth=z, alpha=a, shift=float(shift), thinning_mm=float(thinning_mm),
                offset_mm=d, r_pitch=rp, r_base=rb, r_tip=r_tip, r_root=r_root, psi_base=psi_base,
                u_c=u_c, v_c=v_c, rho=rho, rho_nominal=rho0, gamma_tip=gamma_tip)
    beta_flank = math.pi / 2.0 + a
    if t_ft <= t_interference:
        gamma_start = (t_interference - t_ft) / rb
        return ToothForm(undercut=False, beta_end=beta_flank, gamma_start=gamma_start, **base)
    probe = ToothForm(undercut=True, beta_end=beta_flank, gamma_start=0.0, **base)
    beta_x, r_x = _undercut_crossing(probe)
    gamma_start = math.sqrt(max(r_x * r_x / (rb * rb) - 1.0, 0.0))
    return ToothForm(undercut=True, beta_end=beta_x, gamma_start=gamma_start, **base)


def bisect(on_low_side, lo: float, hi: float, steps: int) -> tuple[float, float]:
    """Halve [lo, hi] ``steps`` times around the point where ``on_low_side``
    turns from True (at lo) to False (at hi); returns the last bracket."""
    for _ in range(steps):
        mid = 0.5 * (lo + hi)
        if on_low_side(mid):
            lo = mid
        else:
            hi = mid
    return lo, hi


def _undercut_crossing(tf: ToothForm) -> tuple[float, float]:
    """Where the fillet envelope cuts into the involute (undercut gears).

    Below the crossing the fillet lies inside the involute tooth (it removes
    material the involute would keep); the outline is the fillet up to the
    crossing and the involute above it. The involute exists only outside the
    base circle, so the search runs from where the fillet last rises through
    the base circle to the fillet's end; returns (beta, radius) of the crossing
    with the largest radius at which the fillet passes from inside to outside."""

    def radius(b: float) -> float:
        p = tf.fillet_xy(np.array([b]))[0]
        return math.hypot(p[0], p[1])

    def gfun(b: float) -> float:
        p = tf.fillet_xy(np.array([b]))[0]
        rr = max(math.hypot(p[0], p[1]), tf.r_base)
        return math.atan2(p[1], p[0]) - float(tf.involute_angle(np.array([rr]))[0])

    beta = np.linspace(math.pi, tf.beta_end, 4001)
    pts = tf.fillet_xy(beta)
    r = np.hypot(pts[:, 0], pts[:, 1])
    up = np.nonzero((r[:-1] < tf.r_base) & (r[1:] >= tf.r_base))[0]
    if len(up):
        # r(lo) < r_base <= r(hi)
        _, beta_b = bisect(lambda b: radius(b) < tf.r_base, beta[up[-1]], beta[up[-1] + 1], 80)
    else:
        beta_b = math.pi
    beta = np.linspace(beta_b, tf.beta_end, 4001)
    pts = tf.fillet_xy(beta)
    r = np.hypot(pts[:, 0], pts[:, 1])
    th = np.arctan2(pts[:, 1], pts[:, 0])
    g = np.where(r >= tf.r_base, th - tf.involute_angle(np.maximum(r, tf.r_base)), np.nan)
    best = None
    for i in range(len(beta) - 1):
        if g[i] > 0 and g[i + 1] <= 0:              # fillet leaves the involute tooth here
            if best is None or r[i] > r[best]:
                best = i
    if best is None:
        # The fillet meets the base circle at or outside the involute's cusp:
        # join it there to the involute's start.
        return beta_b, tf.r_base
    lo, hi = bisect(lambda b: gfun(b) > 0, beta[best], beta[best + 1], 80)  # g(lo) > 0 >= g(hi)
    b = 0.5 * (lo + hi)
    return b, max(radius(b), tf.r_base)


# --------------------------------------------------------------------------
# polygonisation
# --------------------------------------------------------------------------

def _chord_deviation(pts: np.ndarray, i: int, j: int) -> float:
    """Largest distance of pts[i+1:j] from the segment pts[i] -> pts[j]."""
    if j <= i + 1:
        return 0.0
    a, b = pts[i], pts[j]
    q = pts[i + 1:j] - a
    ab = b - a
    L2 = float(ab @ ab)
    if L2 == 0.0:
        return float(np.max(np.hypot(q[:, 0], q[:, 1])))
    t = np.clip((q @ ab) / L2, 0.0, 1.0)
    e = q - np.outer(t, ab)
    return float(np.max(np.hypot(e[:, 0], e[:, 1])))


def _greedy_vertices(pts: np.ndarray, tol: float) -> np.ndarray:
    """Fewest dense points (endpoints kept) whose chords stay within tol of all
    skipped points: from each kept point, the farthest next point that passes."""
    n = len(pts)
    keep = [0]
    i = 0
    while i < n - 1:
        step = 1
        good = i + 1
        while True:                                  # gallop
            j = min(i + 2 * step, n - 1)
            if _chord_deviation(pts, i, j) <= tol:
                good = j
                if j == n - 1:
                    break
                step *= 2
            else:
                bad = j
                break
        if good < n - 1 or _chord_deviation(pts, i, n - 1) > tol:
            if good != n - 1:
                lo, hi = good, bad                   # binary search between good and bad
                while hi - lo > 1:
                    mid = (lo + hi) // 2
                    if _chord_deviation(pts, i, mid) <= tol:
                        lo = mid
                    else:
                        hi = mid
                good = lo
        keep.append(good)
        i = good
    return pts[keep]


def sample_curve(func, t0: float, t1: float, tol: float) -> np.ndarray:
    """Points on the curve func(t) (array in, (N, 2) out) from t0 to t1, both
    ends included, every chord within tol of the curve."""
    if t0 == t1:
        return func(np.array([t0]))
    n = 256
    dense_tol = tol / 25.0
    for _ in range(12):
        t = np.linspace(t0, t1, n + 1)
        pts = func(t)
        mid = func(0.5 * (t[:-1] + t[1:]))
        chord_mid = 0.5 * (pts[:-1] + pts[1:])
        sag = float(np.max(np.hypot(*(mid - chord_mid).T)))
        if sag <= dense_tol:
            break
        n = int(n * min(8.0, max(1.5, 1.2 * math.sqrt(sag / dense_tol))))
    return _greedy_vertices(pts, tol * 0.96)


def arc_points(radius: float, a0: float, a1: float, tol: float, centre=(0.0, 0.0)) -> np.ndarray:
    """Points on a circular arc from angle a0 to a1 (both included), chords within tol."""
    span = abs(a1 - a0)
    if span * radius < 1e-9 or radius <= 0.0:        # a point (e.g. the root arc under a full-round rack tip)
        return np.array([[centre[0] + radius * math.cos(a0), centre[1] + radius * math.sin(a0)]])
    if tol >= radius:
        n = max(1, math.ceil(span / (math.pi / 2)))
    else:
        max_step = 2.0 * math.acos(1.0 - tol / radius)
        n = max(1, math.ceil(span / max_step - 1e-12))
    ang = np.linspace(a0, a1, n + 1)
    return np.column_stack([centre[0] + radius * np.cos(ang), centre[1] + radius * np.sin(ang)])


def _join(pieces: list[np.ndarray], what: str) -> np.ndarray:
    out = [pieces[0]]
    for p in pieces[1:]:
        gap = float(np.hypot(*(out[-1][-1] - p[0])))
        if gap > 1e-6:
            from sheetgen.errors import GeometryBug

            raise GeometryBug(f"gear outline: pieces of the {what} do not meet (gap {gap:.2e} mm)")
        out.append(p[1:])
    return np.vstack(out)


def gear_outline_xy(tf: ToothForm, tol: float = DEFAULT_CHORD_TOL_MM) -> np.ndarray:
    """The closed outline (N, 2), counter-clockwise, first point not repeated.

    One pitch is built from: the whole root arc of the space at -pi/z, the
    lower fillet and involute of tooth 0, its whole tip arc, then the upper
    involute and fillet (mirror images); z rotated copies make the gear."""
    z = tf.teeth
    a_root = tf.root_half_angle
    fillet = sample_curve(tf.fillet_xy, math.pi, tf.beta_end, tol)
    flank = sample_curve(tf.involute_xy, tf.gamma_start, tf.gamma_tip, tol)
    half_tip = tf.tip_half_angle
    root = arc_points(tf.r_root, -math.pi / z - a_root, -math.pi / z + a_root, tol)
    tip = arc_points(tf.r_tip, -half_tip, half_tip, tol)
    lower = _join([root, fillet, flank, tip], "tooth")
    upper = _join([flank[::-1], fillet[::-1]], "upper flank") * np.array([1.0, -1.0])
    unit = _join([lower, upper], "tooth")
    # the unit ends where the next pitch's root arc starts: drop that point
    end_expected = np.array([tf.r_root * math.cos(math.pi / z - a_root), tf.r_root * math.sin(math.pi / z - a_root)])
    if float(np.hypot(*(unit[-1] - end_expected))) > 1e-6:
        from sheetgen.errors import GeometryBug

        raise GeometryBug("gear outline: one pitch does not close onto the next")
    unit = unit[:-1]
    step = np.hypot(*np.diff(unit, axis=0).T)
    unit = unit[np.concatenate([[True], step > 1e-9])]   # no zero-length edges
    ang = 2.0 * math.pi * np.arange(z) / z
    c, s = np.cos(ang)[:, None], np.sin(ang)[:, None]
    x = c * unit[None, :, 0] - s * unit[None, :, 1]
    y = s * unit[None, :, 0] + c * unit[None, :, 1]
    return np.column_stack([x.ravel(), y.ravel()])
