"""The tooth form the generating rack cuts, in closed form.

Every point of the outline is computed in closed form:

* flanks: involutes of the base circle, from where the rack's straight flank
  stops cutting (the form circle) or, when the gear is undercut, from where the
  fillet path cuts into the involute, out to the tip circle;
* root fillet: the envelope of the rack's tip fillet as the rack rolls (the
  trochoidal root the rack really cuts, undercut included);
* root and tip: arcs of the root and tip circles.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from sheetgen.drive.involute.dimensions import (RACK_DEDENDUM, RACK_ROOT_FILLET, inv, pitch_tooth_thickness_mm,
                                                tip_radius_mm)


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
