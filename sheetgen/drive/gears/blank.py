"""The gear blank: the kerf-compensated polygon the laser follows and the
dimensions to check the cut gear with calipers.

A :class:`GearSpec` says what the finished gear must be; :func:`gear_blank`
turns it into the polygon the laser follows (kerf included) and the dimensions
to check the cut gear with calipers. The sizes reported are those of the
finished gear (after the kerf has taken its half off the cut path); only the
polygon carries the kerf. Do not offset a blank's polygon again: the kerf
compensation here is the exact one (see :mod:`sheetgen.drive.involute`).
"""

from __future__ import annotations

import math

import numpy as np

from sheetgen.errors import GeometryBug, SheetgenError
from sheetgen.drive import involute as inv_m
from sheetgen.drive.involute import DEFAULT_CHORD_TOL_MM
from sheetgen.drive.gears.hub import hole_ring, hole_size, plan_windows, web_mm, window_rings
from sheetgen.drive.gears.spec import (DEFAULT_LABELS, GearGeometry, GearSpec, MIN_TIP_LAND_MODULES, SHIFT_RANGE,
                                       check_gear_spec)


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


def undercut_limit(alpha_deg: float, shift: float) -> float:
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
            f"{undercut_limit(alpha_deg, x):.1f} teeth); a profile shift of at least "
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
    _, hole_mm, hole_r = hole_size(hub)
    rim = web_mm(m)
    if hole_mm and hole_r > nominal.r_root - rim:
        limit = nominal.r_root - rim
        raise SheetgenError(f"{lab['bore_mm']}: a {hub.bore_shape} hole of {hole_mm:g} mm reaches "
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
