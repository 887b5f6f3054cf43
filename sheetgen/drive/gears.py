"""Gear blanks, the drive pair and the Lewis tooth bending check (pure core).

A :class:`GearSpec` says what the finished gear must be; :func:`gear_blank`
turns it into the polygon the laser follows (kerf included) and the dimensions
to check the cut gear with calipers. The sizes reported are those of the
finished gear (after the kerf has taken its half off the cut path); only the
polygon carries the kerf. Do not offset a blank's polygon again: the kerf
compensation here is the exact one (see :mod:`sheetgen.drive.involute`).

Hub (all holes shrink by kerf / 2 when cut):

* ``round``: a bore of ``bore_mm``;
* ``d``: a bore of ``bore_mm`` with one flat (motor shafts); ``across_flats_mm``
  is the distance from the flat to the opposite side of the bore; the flat is
  on the +y side of the blank;
* ``square`` / ``hex``: a square or hexagonal hole ``across_flats_mm`` across
  its flats (an axle of that section); if ``across_flats_mm`` is not given,
  ``bore_mm`` is taken as the size across flats. Square flats are parallel to
  the axes; the hexagon has flats on +-y.

Lightening (``Hub.lightening``): N windows between a hub ring and a rim under
the root circle, leaving N straight spokes. Rim, spokes and hub ring are all
``web_mm = max(3 mm, 2.7 m)`` wide: 2.7 m is a backup ratio (rim under the root
/ whole depth 2.25 m) of 1.2, above which the rim does not weaken the tooth
(AGMA 2001 rim thickness factor, from memory); 3 mm keeps webs of 3 mm sheet
from breaking in handling (common practice). N = round(2 pi r_mid / (depth + web)),
from 3 to 12, so that windows are roughly as wide as deep; window corners are
rounded with radius min(web / 2, depth / 4). Windows are only cut when they are
at least one web deep; otherwise a warning says so and the wheel is left solid.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from sheetgen.errors import GeometryBug, SheetgenError
from sheetgen.drive import involute as inv_m
from sheetgen.drive.involute import DEFAULT_CHORD_TOL_MM

# ranges accepted (also in the gear command's help)
MODULE_RANGE_MM = (0.3, 25.0)
TEETH_RANGE = (6, 500)
PRESSURE_ANGLE_RANGE_DEG = (14.5, 25.0)
SHIFT_RANGE = (-1.0, 1.5)
BACKLASH_MAX_MODULES = 0.5        # backlash up to 0.5 m
KERF_RANGE_MM = (0.0, 1.0)
CHORD_TOL_RANGE_MM = (0.0005, 0.05)
MIN_BORE_MM = 1.0
BORE_SHAPES = ("round", "d", "square", "hex")

MIN_TIP_LAND_MODULES = 0.2        # narrower tips are fragile (common practice: 0.2 m to 0.4 m)
MIN_CONTACT_RATIO = 1.2           # below this a pair runs rough (common practice)
MIN_CLEARANCE_MODULES = 0.1       # tip-to-root clearance of a mounted pair (ISO 53 gives 0.25 m)
WEB_MIN_MM = 3.0
RIM_MODULES = 2.7

# Field labels used in error messages; the command passes its option names,
# a parameter file loader can pass its key names.
DEFAULT_LABELS = {
    "module_mm": "module_mm",
    "teeth": "teeth",
    "pressure_angle_deg": "pressure_angle_deg",
    "shift": "shift",
    "backlash_mm": "backlash_mm",
    "kerf_mm": "kerf_mm",
    "chord_tol_mm": "chord_tol_mm",
    "bore_mm": "hub.bore_mm",
    "bore_shape": "hub.bore_shape",
    "across_flats_mm": "hub.across_flats_mm",
}


@dataclass(frozen=True)
class Hub:
    bore_mm: float = 0.0                    # 0 = no hole
    bore_shape: str = "round"               # "round" | "d" | "square" | "hex"
    across_flats_mm: float | None = None    # D: flat to opposite side; square/hex: across flats
    lightening: bool = False                # windows and spokes when there is room


@dataclass(frozen=True)
class GearSpec:
    module_mm: float
    teeth: int
    pressure_angle_deg: float = 20.0
    shift: float = 0.0                      # profile shift coefficient x
    backlash_mm: float = 0.0                # tooth thinning at the pitch circle, this gear
    hub: Hub = field(default_factory=Hub)


@dataclass(frozen=True)
class GearGeometry:
    spec: GearSpec
    polygon: object                         # shapely Polygon: the cut path, centred on the origin
    pitch_diameter_mm: float
    base_diameter_mm: float
    tip_diameter_mm: float
    root_diameter_mm: float
    span_teeth: int
    span_mm: float
    pin_diameter_mm: float
    over_pins_mm: float
    warnings: tuple[str, ...]
    form_diameter_mm: float = 0.0           # where the involute flank begins (finished gear)
    pitch_thickness_mm: float = 0.0         # arc tooth thickness at the pitch circle (finished gear)
    undercut: bool = False                  # the rack cuts into the involute near the root
    kerf_mm: float = 0.0                    # kerf the polygon is compensated for
    chord_tol_mm: float = DEFAULT_CHORD_TOL_MM
    round_holes_mm: tuple[tuple[float, float, float], ...] = ()   # (cx, cy, r) of round holes, finished size
    windows: int = 0                        # lightening windows cut


@dataclass(frozen=True)
class GearPair:
    pinion: GearGeometry
    wheel: GearGeometry
    centre_distance_mm: float
    ratio: float
    contact_ratio: float
    warnings: tuple[str, ...]
    working_pressure_angle_deg: float = 20.0
    effective_contact_ratio: float = 0.0    # counting only flanks that are true involutes
    clearance_mm: float = 0.0               # tip-to-root clearance, smaller of the two


# --------------------------------------------------------------------------
# validation
# --------------------------------------------------------------------------

def _fmt(v: float) -> str:
    return f"{v:g}"


def check_in_range(value, lo, hi, label, unit=""):
    if not isinstance(value, (int, float)) or isinstance(value, bool) or not math.isfinite(value) \
            or not lo <= value <= hi:
        u = f" {unit}" if unit else ""
        raise SheetgenError(f"{label} = {value!r}: must be from {_fmt(lo)} to {_fmt(hi)}{u}")


def check_gear_spec(spec: GearSpec, kerf_mm: float = 0.0, chord_tol_mm: float = DEFAULT_CHORD_TOL_MM,
                    labels: dict[str, str] | None = None) -> None:
    """Raise SheetgenError (one line naming the option and its range) for values out of range."""
    lab = dict(DEFAULT_LABELS, **(labels or {}))
    check_in_range(spec.module_mm, *MODULE_RANGE_MM, lab["module_mm"], "mm")
    if not isinstance(spec.teeth, int) or isinstance(spec.teeth, bool) \
            or not TEETH_RANGE[0] <= spec.teeth <= TEETH_RANGE[1]:
        raise SheetgenError(f"{lab['teeth']} = {spec.teeth!r}: must be a whole number from "
                            f"{TEETH_RANGE[0]} to {TEETH_RANGE[1]}")
    check_in_range(spec.pressure_angle_deg, *PRESSURE_ANGLE_RANGE_DEG, lab["pressure_angle_deg"], "deg")
    check_in_range(spec.shift, *SHIFT_RANGE, lab["shift"])
    check_in_range(spec.backlash_mm, 0.0, BACKLASH_MAX_MODULES * spec.module_mm, lab["backlash_mm"],
              "mm (0.5 x module)")
    check_in_range(kerf_mm, *KERF_RANGE_MM, lab["kerf_mm"], "mm")
    check_in_range(chord_tol_mm, *CHORD_TOL_RANGE_MM, lab["chord_tol_mm"], "mm")
    hub = spec.hub
    if hub.bore_shape not in BORE_SHAPES:
        raise SheetgenError(f"{lab['bore_shape']} = {hub.bore_shape!r}: must be one of {', '.join(BORE_SHAPES)}")
    if not isinstance(hub.bore_mm, (int, float)) or not math.isfinite(hub.bore_mm) or hub.bore_mm < 0 \
            or 0 < hub.bore_mm < MIN_BORE_MM:
        raise SheetgenError(f"{lab['bore_mm']} = {hub.bore_mm!r}: must be 0 (no hole) or at least {MIN_BORE_MM:g} mm")
    af = hub.across_flats_mm
    if hub.bore_shape == "round":
        if af is not None:
            raise SheetgenError(f"{lab['across_flats_mm']} = {af!r}: only for a d, square or hex hole "
                                f"({lab['bore_shape']} is round)")
    elif hub.bore_shape == "d":
        if hub.bore_mm <= 0:
            raise SheetgenError(f"{lab['bore_mm']} = {hub.bore_mm!r}: a d hole needs the bore diameter "
                                f"(at least {MIN_BORE_MM:g} mm)")
        if af is None or not (0.5 * hub.bore_mm < af < hub.bore_mm):
            raise SheetgenError(f"{lab['across_flats_mm']} = {af!r}: for a d hole of {_fmt(hub.bore_mm)} mm "
                                f"must be more than {_fmt(0.5 * hub.bore_mm)} and less than {_fmt(hub.bore_mm)} mm")
    else:
        size = af if af is not None else hub.bore_mm
        if af is not None and hub.bore_mm not in (0, 0.0) and abs(af - hub.bore_mm) > 1e-9:
            raise SheetgenError(f"{lab['across_flats_mm']} = {af!r} and {lab['bore_mm']} = {hub.bore_mm!r}: "
                                f"a {hub.bore_shape} hole has one size; give only {lab['across_flats_mm']}")
        if size is None or not math.isfinite(size) or size < MIN_BORE_MM:
            raise SheetgenError(f"{lab['across_flats_mm']} = {size!r}: a {hub.bore_shape} hole needs its size "
                                f"across flats, at least {MIN_BORE_MM:g} mm")


# --------------------------------------------------------------------------
# holes
# --------------------------------------------------------------------------

def _hole_size(hub: Hub) -> tuple[str, float, float]:
    """(shape, size, circumradius) of the finished hole; size 0 = no hole."""
    if hub.bore_shape in ("round", "d"):
        return hub.bore_shape, hub.bore_mm, hub.bore_mm / 2.0
    size = hub.across_flats_mm if hub.across_flats_mm is not None else hub.bore_mm
    if hub.bore_shape == "square":
        return "square", size, size / 2.0 * math.sqrt(2.0)
    return "hex", size, size / 2.0 / math.cos(math.pi / 6.0)


def hole_ring(hub: Hub, offset_mm: float, tol: float) -> np.ndarray | None:
    """The hub hole as a ring of points, moved inward (into the hole) by offset_mm."""
    shape, size, _ = _hole_size(hub)
    if not size:
        return None
    d = offset_mm
    if shape == "round":
        r = size / 2.0 - d
        return inv_m.arc_points(r, 0.0, 2.0 * math.pi, tol)[:-1]
    if shape == "d":
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


# --------------------------------------------------------------------------
# the blank
# --------------------------------------------------------------------------

def _max_shift_before_pointed(spec: GearSpec) -> float:
    """Largest shift for which the teeth still reach the tip circle with a land."""
    lo, hi = SHIFT_RANGE[0], SHIFT_RANGE[1]

    def half(x):
        return inv_m.tooth_form(spec.module_mm, spec.teeth, spec.pressure_angle_deg, x, spec.backlash_mm).tip_half_angle

    if half(hi) > 0:
        return hi
    return inv_m.bisect(lambda x: half(x) > 0, lo, hi, 60)[0]


def _undercut_limit(alpha_deg: float, shift: float) -> float:
    """Fewest teeth without undercut at this shift: the handbook's 2 (1 - x) / sin^2 a,
    or the rack's own limit where its straight flank reaches deeper."""
    s2 = math.sin(math.radians(alpha_deg)) ** 2
    rack = 2.0 * (inv_m.rack_min_shift_no_undercut(0, alpha_deg) - shift) / s2
    return max(inv_m.undercut_limit_teeth(alpha_deg, shift), rack)


def _outline_problem(tf: inv_m.ToothForm) -> str | None:
    if tf.tip_half_angle <= 0:
        return "pointed"
    if tf.gamma_start >= tf.gamma_tip:
        return "no involute"
    return None


def _circle_crossings(ring: np.ndarray, radius: float) -> np.ndarray:
    """Polar angles where the closed ring crosses the circle of this radius."""
    p = ring
    q = np.roll(ring, -1, axis=0)
    dvec = q - p
    a = np.einsum("ij,ij->i", dvec, dvec)
    b = 2.0 * np.einsum("ij,ij->i", p, dvec)
    c = np.einsum("ij,ij->i", p, p) - radius * radius
    disc = b * b - 4.0 * a * c
    out = []
    ok = (disc >= 0) & (a > 0)
    sq = np.sqrt(np.where(ok, disc, 0.0))
    for sign in (-1.0, 1.0):
        t = (-b + sign * sq) / np.where(a > 0, 2.0 * a, 1.0)
        hit = ok & (t >= 0) & (t < 1)
        pts = p[hit] + t[hit, None] * dvec[hit]
        out.append(np.arctan2(pts[:, 1], pts[:, 0]))
    return np.sort(np.concatenate(out))


def _verify(ring: np.ndarray, tf: inv_m.ToothForm, tol: float) -> None:
    """Measure the generated outline; any disagreement is a bug, not user error.

    Tip and root radii, the tooth count and the tooth thickness halfway up the
    involute flank (the pitch circle can lie in the fillet of a strongly
    shifted gear, so the check uses a radius on the involute)."""
    r = np.hypot(ring[:, 0], ring[:, 1])
    z = tf.teeth
    if abs(r.max() - tf.r_tip) > 1e-6 or not (tf.r_root - tol - 1e-9 <= r.min() <= tf.r_root + 1e-6):
        raise GeometryBug(f"gear outline: tip/root radii {r.max():.4f}/{r.min():.4f} mm, "
                          f"expected {tf.r_tip:.4f}/{tf.r_root:.4f} mm")
    r_check = 0.5 * (tf.form_radius + tf.r_tip)
    ang = _circle_crossings(ring, r_check)
    if len(ang) != 2 * z:
        raise GeometryBug(f"gear outline crosses the circle r = {r_check:.4f} mm {len(ang)} times, expected {2 * z}")
    # tooth 0 is centred on +x: its crossings are the pair around angle 0
    around = ang[np.argsort(np.abs(ang))[:2]]
    measured = r_check * (around.max() - around.min())
    expected = 2.0 * r_check * float(-tf.involute_angle(np.array([r_check]))[0])
    a_r = math.acos(tf.r_base / r_check)
    if abs(measured - expected) > 2.0 * tol / math.cos(a_r) + 1e-6:
        raise GeometryBug(f"gear outline: tooth thickness at r = {r_check:.4f} mm is {measured:.4f} mm, "
                          f"expected {expected:.4f} mm")


def _choose_span_k(spec: GearSpec, r_form: float, r_tip: float) -> int:
    """The k whose caliper jaws touch nearest r + x m, kept on the involute
    (between the form circle and the tip, a twentieth of a module clear)."""
    m, z, a, x, j = spec.module_mm, spec.teeth, spec.pressure_angle_deg, spec.shift, spec.backlash_mm
    margin = 0.05 * m
    target = min(max(m * z / 2.0 + x * m, r_form + margin), r_tip - margin)
    ks = sorted(range(1, max(2, z)), key=lambda k: abs(inv_m.span_contact_radius_mm(m, z, a, x, k, j) - target))
    for k in ks:
        rc = inv_m.span_contact_radius_mm(m, z, a, x, k, j)
        if r_form + margin <= rc <= r_tip - margin:
            return k
    return ks[0]


def _choose_pin(spec: GearSpec, r_form: float, r_tip: float) -> float:
    """A pin touching near r + x m (kept on the involute), rounded to a size one
    can buy or borrow: 0.1 mm steps (drill shanks) for m >= 1, else 0.05 mm;
    finer if the rounded pin would touch off the involute."""
    m, z, a, x, j = spec.module_mm, spec.teeth, spec.pressure_angle_deg, spec.shift, spec.backlash_mm
    margin = 0.05 * m
    target = min(max(m * z / 2.0 + x * m, r_form + margin), r_tip - margin)
    ideal = inv_m.ideal_pin_diameter_mm(m, z, a, x, j, contact_radius_mm=target)
    for step in ((0.1 if m >= 1.0 else 0.05), 0.01, 0.001):
        pin = round(round(ideal / step) * step, 3)
        if pin <= 0:
            continue
        try:
            rc = inv_m.pin_contact_radius_mm(m, z, a, x, pin, j)
        except ValueError:              # too small to reach both flanks
            continue
        if r_form + margin <= rc <= r_tip - margin:
            return pin
    return round(ideal, 3)


def gear_blank(spec: GearSpec, kerf_mm: float = 0.0, chord_tol_mm: float = DEFAULT_CHORD_TOL_MM, *,
               labels: dict[str, str] | None = None) -> GearGeometry:
    """One gear blank: the cut polygon (kerf-compensated, centred on the origin,
    tooth 0 on +x) and the dimensions of the finished gear. ``labels`` names the
    options or keys in error messages (see DEFAULT_LABELS)."""
    from shapely.geometry import Polygon

    lab = dict(DEFAULT_LABELS, **(labels or {}))
    check_gear_spec(spec, kerf_mm, chord_tol_mm, lab)
    m, z, alpha_deg, x, j = spec.module_mm, spec.teeth, spec.pressure_angle_deg, spec.shift, spec.backlash_mm
    nominal = inv_m.tooth_form(m, z, alpha_deg, x, j, 0.0)
    problem = _outline_problem(nominal)
    if problem == "pointed":
        with_j = f"with {lab['backlash_mm']} = {j:g} " if j else ""
        raise SheetgenError(
            f"{lab['shift']} = {x:g}: the teeth of a {z}-tooth gear at {alpha_deg:g} deg come to a "
            f"point below the tip circle; {with_j}the shift must be at most {_max_shift_before_pointed(spec):.3f}")
    if problem == "no involute":
        raise SheetgenError(
            f"{lab['shift']} = {x:g}: a {z}-tooth gear at {alpha_deg:g} deg is undercut right up to "
            f"its tip; use a larger shift (at least {inv_m.min_shift_no_undercut(z, alpha_deg):.3f} avoids undercut)")
    warnings: list[str] = []
    # the handbook limit x_min = 1 - z sin^2 a / 2, or the rack's own if that is larger
    # (above about 23.1 deg the full-round rack tip leaves a longer straight flank)
    x_min = max(inv_m.min_shift_no_undercut(z, alpha_deg), inv_m.rack_min_shift_no_undercut(z, alpha_deg))
    if x < x_min - 1e-9 or nominal.undercut:
        warnings.append(
            f"{z} teeth at {alpha_deg:g} deg with shift {x:g}: undercut (the limit is "
            f"{_undercut_limit(alpha_deg, x):.1f} teeth); a profile shift of at least "
            f"x = {x_min:.3f} avoids it. The root is drawn as the rack cuts it.")
    tip_land = 2.0 * nominal.r_tip * nominal.tip_half_angle
    if tip_land < MIN_TIP_LAND_MODULES * m:
        warnings.append(f"tip land {tip_land:.3f} mm is under {MIN_TIP_LAND_MODULES:g} x module: "
                        f"the tooth tips are fragile; use a smaller shift")

    d = kerf_mm / 2.0
    tf = inv_m.tooth_form(m, z, alpha_deg, x, j, d) if d else nominal
    if _outline_problem(tf):
        raise SheetgenError(f"{lab['kerf_mm']} = {kerf_mm:g}: too large for module {m:g} mm")
    ring = inv_m.gear_outline_xy(tf, chord_tol_mm)
    outer = Polygon(ring)
    if not outer.is_valid:
        if d and Polygon(inv_m.gear_outline_xy(nominal, chord_tol_mm)).is_valid:
            raise SheetgenError(f"{lab['kerf_mm']} = {kerf_mm:g}: too large for module {m:g} mm "
                                f"(the cut path closes the tooth spaces)")
        raise SheetgenError(f"{lab['shift']} = {x:g}: the rack cuts the {z}-tooth gear's teeth "
                            f"through at the root; use a shift of at least {x_min:.3f}")
    _verify(ring, tf, chord_tol_mm)

    # hub: hole and lightening windows
    hub = spec.hub
    _, hole_size, hole_r = _hole_size(hub)
    rim = web_mm(m)
    if hole_size and hole_r > nominal.r_root - rim:
        limit = nominal.r_root - rim
        raise SheetgenError(f"{lab['bore_mm']}: a {hub.bore_shape} hole of {hole_size:g} mm reaches "
                            f"{hole_r:.2f} mm from the centre; this gear leaves room up to {limit:.2f} mm "
                            f"(a rim of {rim:g} mm under the root)")
    holes = []
    round_holes: tuple[tuple[float, float, float], ...] = ()
    hr = hole_ring(hub, d, chord_tol_mm)
    if hr is not None:
        holes.append(hr)
        if hub.bore_shape == "round":
            round_holes = ((0.0, 0.0, hub.bore_mm / 2.0),)
    n_windows = 0
    if hub.lightening:
        plan = plan_windows(nominal.r_root, hole_r, m)
        if plan is None:
            warnings.append(f"no room for lightening windows in a {z}-tooth, module {m:g} gear "
                            f"(webs of {rim:g} mm); the blank is left solid")
        else:
            holes.extend(window_rings(plan, d, chord_tol_mm))
            n_windows = plan.count
    poly = Polygon(ring, holes)
    if not poly.is_valid:
        raise GeometryBug("gear blank with its hub holes is not a valid polygon")

    r_form = nominal.form_radius
    k = _choose_span_k(spec, r_form, nominal.r_tip)
    pin = _choose_pin(spec, r_form, nominal.r_tip)
    return GearGeometry(
        spec=spec,
        polygon=poly,
        pitch_diameter_mm=2.0 * nominal.r_pitch,
        base_diameter_mm=2.0 * nominal.r_base,
        tip_diameter_mm=2.0 * nominal.r_tip,
        root_diameter_mm=2.0 * nominal.r_root,
        span_teeth=k,
        span_mm=inv_m.span_over_teeth_mm(m, z, alpha_deg, x, k, j),
        pin_diameter_mm=pin,
        over_pins_mm=inv_m.dimension_over_pins_mm(m, z, alpha_deg, x, pin, j),
        warnings=tuple(warnings),
        form_diameter_mm=2.0 * r_form,
        pitch_thickness_mm=inv_m.pitch_tooth_thickness_mm(m, alpha_deg, x, j),
        undercut=nominal.undercut,
        kerf_mm=float(kerf_mm),
        chord_tol_mm=float(chord_tol_mm),
        round_holes_mm=round_holes,
        windows=n_windows,
    )


# --------------------------------------------------------------------------
# the pair
# --------------------------------------------------------------------------

def centre_distance_mm(module_mm: float, z1: int, z2: int, pressure_angle_deg: float = 20.0,
                       x1: float = 0.0, x2: float = 0.0) -> float:
    """Zero-backlash centre distance a_w = m (z1 + z2) / 2 * cos a / cos a_w (ISO 21771)."""
    aw = inv_m.working_pressure_angle_rad(pressure_angle_deg, z1, z2, x1, x2)
    return module_mm * (z1 + z2) / 2.0 * math.cos(math.radians(pressure_angle_deg)) / math.cos(aw)


def contact_ratio(module_mm: float, z1: int, z2: int, pressure_angle_deg: float = 20.0,
                  x1: float = 0.0, x2: float = 0.0) -> float:
    """Transverse contact ratio (textbook formula):
    eps = [sqrt(ra1^2 - rb1^2) + sqrt(ra2^2 - rb2^2) - a_w sin a_w] / (pi m cos a),
    tip radii m (z + 2 + 2x) / 2."""
    a = math.radians(pressure_angle_deg)
    aw = inv_m.working_pressure_angle_rad(pressure_angle_deg, z1, z2, x1, x2)
    cd = centre_distance_mm(module_mm, z1, z2, pressure_angle_deg, x1, x2)
    ra1, ra2 = inv_m.tip_radius_mm(module_mm, z1, x1), inv_m.tip_radius_mm(module_mm, z2, x2)
    rb1 = inv_m.base_radius_mm(module_mm, z1, pressure_angle_deg)
    rb2 = inv_m.base_radius_mm(module_mm, z2, pressure_angle_deg)
    length = math.sqrt(ra1 * ra1 - rb1 * rb1) + math.sqrt(ra2 * ra2 - rb2 * rb2) - cd * math.sin(aw)
    return length / (math.pi * module_mm * math.cos(a))


def gear_pair(pinion: GearSpec, wheel: GearSpec, kerf_mm: float = 0.0,
              chord_tol_mm: float = DEFAULT_CHORD_TOL_MM, *, labels: dict[str, str] | None = None) -> GearPair:
    """Pinion (on the motor) and wheel (on the axle) that mesh at the returned centre distance.

    The centre distance is the zero-backlash one for the shifts; backlash comes
    from the thinned teeth (each spec's backlash_mm), not from spreading the
    shafts. Errors in either gear are prefixed "pinion:" or "wheel:"."""
    if pinion.module_mm != wheel.module_mm:
        raise SheetgenError(f"pinion module {pinion.module_mm:g} mm and wheel module {wheel.module_mm:g} mm: "
                            f"a pair must share one module")
    if pinion.pressure_angle_deg != wheel.pressure_angle_deg:
        raise SheetgenError(f"pinion pressure angle {pinion.pressure_angle_deg:g} deg and wheel "
                            f"{wheel.pressure_angle_deg:g} deg: a pair must share one pressure angle")
    blanks = []
    for name, spec in (("pinion", pinion), ("wheel", wheel)):
        try:
            blanks.append(gear_blank(spec, kerf_mm, chord_tol_mm, labels=labels))
        except SheetgenError as exc:
            raise SheetgenError(f"{name}: {exc}") from None
    g1, g2 = blanks
    m, a_deg = pinion.module_mm, pinion.pressure_angle_deg
    z1, z2, x1, x2 = pinion.teeth, wheel.teeth, pinion.shift, wheel.shift
    if x1 + x2 < 0 and inv_m.inv(math.radians(a_deg)) + 2 * math.tan(math.radians(a_deg)) * (x1 + x2) / (z1 + z2) <= 0:
        raise SheetgenError(f"shifts {x1:g} + {x2:g}: too negative for {z1} + {z2} teeth")
    cd = centre_distance_mm(m, z1, z2, a_deg, x1, x2)
    aw = inv_m.working_pressure_angle_rad(a_deg, z1, z2, x1, x2)
    eps = contact_ratio(m, z1, z2, a_deg, x1, x2)
    warnings = [f"pinion: {w}" for w in g1.warnings] + [f"wheel: {w}" for w in g2.warnings]

    # path of contact along the line of action, measured from the pinion's base tangent point
    rb1, rb2 = g1.base_diameter_mm / 2.0, g2.base_diameter_mm / 2.0
    ra1, ra2 = g1.tip_diameter_mm / 2.0, g2.tip_diameter_mm / 2.0
    rf1, rf2 = g1.form_diameter_mm / 2.0, g2.form_diameter_mm / 2.0
    line = cd * math.sin(aw)
    start = line - math.sqrt(ra2 * ra2 - rb2 * rb2)       # wheel tip meets the pinion
    end = math.sqrt(ra1 * ra1 - rb1 * rb1)                # pinion tip leaves the wheel
    form1 = math.sqrt(max(rf1 * rf1 - rb1 * rb1, 0.0))
    form2 = line - math.sqrt(max(rf2 * rf2 - rb2 * rb2, 0.0))
    p_b = math.pi * m * math.cos(math.radians(a_deg))
    eps_eff = max(0.0, min(end, form2) - max(start, form1)) / p_b
    if start < form1 - 1e-9:
        warnings.append(f"the wheel tip reaches below the pinion's involute (form diameter {2 * rf1:.3f} mm): "
                        f"the rack-cut root clears it, but only {eps_eff:.2f} of the contact ratio "
                        f"{eps:.2f} runs on true involutes; a positive pinion shift helps")
    if end > form2 + 1e-9:
        warnings.append(f"the pinion tip reaches below the wheel's involute (form diameter {2 * rf2:.3f} mm)")
    if min(eps, eps_eff) < MIN_CONTACT_RATIO:
        warnings.append(f"contact ratio {min(eps, eps_eff):.2f} is below {MIN_CONTACT_RATIO}: the pair will run rough; "
                        f"use more teeth or a smaller pressure angle")
    clearance = min(cd - ra1 - g2.root_diameter_mm / 2.0, cd - ra2 - g1.root_diameter_mm / 2.0)
    if clearance < MIN_CLEARANCE_MODULES * m:
        warnings.append(f"tip-to-root clearance {clearance:.3f} mm is under {MIN_CLEARANCE_MODULES:g} x module: "
                        f"the tips may touch the roots; reduce the shifts")
    return GearPair(pinion=g1, wheel=g2, centre_distance_mm=cd, ratio=z2 / z1, contact_ratio=eps,
                    warnings=tuple(warnings), working_pressure_angle_deg=math.degrees(aw),
                    effective_contact_ratio=eps_eff, clearance_mm=clearance)
