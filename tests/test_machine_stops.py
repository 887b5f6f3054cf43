"""The kit as a machine: end stops at the travel limit, the stall they cause, the polar wedge.

Measured on the model's prisms (sheetgen.model3d: the nominal solids, exact for plates
across the axle) and, for the polar variant, on the cadquery solids. The references are
written here from their sources: the Lewis bending formula and form factors (Shigley's
Mechanical Engineering Design, eq. 14-2 and table 14-2), uniform bearing pressure on a
contact line (statics), the tipping moments about a lee edge (statics), and the
materials' strengths as the materials table gives them, each marked with its source.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from hypothesis import Phase, given, settings
from hypothesis import strategies as st
from shapely import affinity
from shapely.geometry import LineString

from tests._refs import kept, refused
from tests.conftest import shipped

ROOT = Path(__file__).resolve().parents[1]
VARIANTS = sorted((ROOT / "params").glob("*.toml"))
PAST_DEG = 3.0  # "a few degrees past the travel limit"
G = 9.80665  # standard gravity (ISO 80000-3)

# Lewis form factor Y, 20 deg full depth, load at the tip: Shigley's Mechanical Engineering Design,
# table 14-2 (the rows the design notes list; linear between rows)
SHIGLEY_Y = ((12, 0.245), (15, 0.290), (17, 0.303), (20, 0.322), (30, 0.359), (50, 0.409), (100, 0.447))
# in-plane compressive strength of the sheet, as the materials table states it (all from memory there):
# MDF about 12 N/mm2, birch plywood about 20, cast PMMA about 100 (ISO 604 data sheets, lower end)
BEARING_STRENGTH_MPA = {"mdf": 12.0, "birch_plywood": 20.0, "cast_acrylic": 100.0}
BEARING_SAFETY = 3.0  # our rule, stated in sheetgen/mechanics/stops.py


def lewis_y(z: int) -> float:
    for (z0, y0), (z1, y1) in zip(SHIGLEY_Y, SHIGLEY_Y[1:]):
        if z0 <= z <= z1:
            return y0 + (y1 - y0) * (z - z0) / (z1 - z0)
    raise ValueError(z)


def _load(path, overrides=()):
    from sheetgen.design.spec import load_spec

    return load_spec(path, list(overrides))


def _kit(spec):
    from sheetgen.design.kit import build_kit

    return build_kit(spec)


def _stop_prisms(kit, spec):
    from sheetgen.model3d import model_bodies

    bodies = {b.source: b for b in model_bodies(kit, spec)}
    return bodies["stop-arm"].pieces[0], bodies["end-stop"].pieces[0]


def _meet(arm, stop, inside: float, past: float) -> float:
    """Bisection on the prisms: the angle where the turned arm first touches the end stop."""
    from sheetgen.model3d import parallel_distance_mm, parallel_shared_volume_mm3

    def apart(a):
        t = arm.turned(a)
        return parallel_shared_volume_mm3(t, stop) <= 1e-6 and parallel_distance_mm(t, stop) > 1e-4

    lo, hi = inside, past
    assert apart(lo) and not apart(hi)
    for _ in range(40):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if apart(mid) else (lo, mid)
    return 0.5 * (lo + hi)


def _check_stops_meet_at_the_limit(spec, kit):
    """Turned PAST_DEG past +-limit the arm shares volume with the end stop; they first touch at
    +-limit; inside the travel the stops keep apart and every other turning part clears the
    fixed parts by frame.clearance (the sweep, which leaves only the stop pair out)."""
    from sheetgen.design.kit import frame_sweep, travel_deg
    from sheetgen.model3d import parallel_distance_mm, parallel_shared_volume_mm3

    limit = spec.site.travel_limit_deg
    arm, stop = _stop_prisms(kit, spec)
    for sign in (1, -1):
        assert parallel_shared_volume_mm3(arm.turned(sign * (limit + PAST_DEG)), stop) > 1.0
        met = _meet(arm, stop, sign * (limit - 1.0), sign * (limit + PAST_DEG))
        assert met == pytest.approx(sign * limit, abs=0.05)
    for a in np.arange(-(limit - 1.0), limit - 1.0 + 1e-9, 1.0):
        t = arm.turned(float(a))
        assert parallel_shared_volume_mm3(t, stop) == 0.0
        assert parallel_distance_mm(t, stop) > 0.05
    sweep = frame_sweep(kit, travel_deg(spec))
    assert sweep.min_clearance_mm >= spec.frame.clearance_mm - 1e-6, sweep
    return met


@pytest.mark.parametrize("path", VARIANTS, ids=lambda p: p.stem)
def test_each_variant_stops_at_the_travel_limit(path):
    spec, kit = shipped(path)
    _check_stops_meet_at_the_limit(spec, kit)


def test_the_demo_model_reports_its_stops(demo_build_3):
    """The build's assembly check (cadquery solids) finds the stops meeting at +-60 deg, the
    demo's site.travel_limit, and nothing else touching through the travel."""
    _, summary = demo_build_3
    asm = summary["assembly"]
    assert asm["stops_ok"] is True
    (stops,) = asm["stops"]
    assert stops["meet_plus_deg"] == pytest.approx(60.0, abs=0.05)
    assert stops["meet_minus_deg"] == pytest.approx(-60.0, abs=0.05)
    assert stops["past_plus_mm3"] > 1.0 and stops["past_minus_mm3"] > 1.0
    assert not asm["touching"] and not asm["collisions"]


def _contact(kit, spec):
    """The contact line at +limit, measured on the turned arm's and the end stop's outlines
    seen along the axle: (length, radius of its middle)."""
    arm, stop = _stop_prisms(kit, spec)
    a = affinity.rotate(arm.yz_projection(), spec.site.travel_limit_deg, origin=(0.0, 0.0))
    line = a.boundary.intersection(stop.yz_projection().buffer(1e-4))
    segs = [g for g in getattr(line, "geoms", [line]) if isinstance(g, LineString) and g.length > 0.5]
    assert len(segs) == 1, line
    (seg,) = segs
    (y0, z0), (y1, z1) = seg.coords[0], seg.coords[-1]
    return seg.length, 0.5 * (math.hypot(y0, z0) + math.hypot(y1, z1))


@pytest.mark.parametrize("path", VARIANTS, ids=lambda p: p.stem)
def test_stall_and_stop_bearing_against_hand_figures(path):
    from sheetgen.mechanics.check import balance_check

    spec, kit = shipped(path)
    report = balance_check(kit, spec)
    d, mo = spec.drive, spec.motor
    # Lewis (Shigley eq. 14-2): the stalled motor's torque at the pinion's pitch circle
    face = d.layers * spec.sheet.thickness_mm
    force = mo.stall_torque_Nm / (d.module_mm * d.pinion_teeth / 2 * 1e-3)
    stall = force / (face * d.module_mm * lewis_y(d.pinion_teeth))
    listed = {12, 15, 17, 20, 30, 50, 100}
    # rows between the listed ones are interpolated here, read from memory of the table in the code
    assert report.tooth.stall_stress_MPa == pytest.approx(stall, rel=1e-6 if d.pinion_teeth in listed else 0.05)
    check = {c.name: c for c in report.checks}["teeth at motor stall"]
    assert check.binding  # with the stops in place the motor does stall there
    assert check.passed == (report.tooth.stall_stress_MPa <= report.tooth.allowable_MPa)
    assert check.passed, check.reason  # every shipped variant carries it
    # the stop: torque at the axle over the contact line's middle radius, on contact length x sheet
    length, r_mid = _contact(kit, spec)
    torque = mo.stall_torque_Nm * d.wheel_teeth / d.pinion_teeth + report.load_torque_Nm
    sigma = torque / (r_mid * 1e-3) / (length * spec.sheet.thickness_mm)
    st_ = report.stops
    assert st_ is not None
    assert st_.bearing_stress_MPa == pytest.approx(sigma, rel=2e-3)
    assert st_.allowable_MPa == pytest.approx(BEARING_STRENGTH_MPA[spec.sheet.material] / BEARING_SAFETY)
    bearing = {c.name: c for c in report.checks}["end stop bearing"]
    assert bearing.passed == (sigma <= st_.allowable_MPa) and bearing.passed


def test_polar_axle_is_tilted_at_the_latitude_on_the_solids():
    """The axle rod's axis against the ground plate's face, on the cadquery solids."""
    cq = pytest.importorskip("cadquery", reason="the 3D check needs cadquery (pip install '.[model]')")
    from sheetgen.model3d import build_model

    spec = _load(ROOT / "params" / "acrylic-polar.toml")
    assert spec.site.axle == "polar"
    model = build_model(_kit(spec), spec)
    axle = model.solids["axle"]
    ground = model.solids["ground-plate#1"]
    # the rod's axis: the principal direction of its vertices (a rod far longer than thick);
    # the plate's face normal: its largest face
    pts = np.array([v.toTuple() for v in axle.Vertices()])
    axis = np.linalg.svd(pts - pts.mean(axis=0), full_matrices=False)[2][0]
    big = max(ground.Faces(), key=lambda f: f.Area())
    normal = np.array(big.normalAt().toTuple())
    angle = math.degrees(math.asin(abs(float(axis @ normal)) / np.linalg.norm(axis) / np.linalg.norm(normal)))
    assert angle == pytest.approx(abs(spec.site.latitude_deg), abs=1e-6)
    assert isinstance(axle, cq.Shape)


def test_polar_tipping_uses_the_tilted_footprint():
    """Hand calculation: the ground is the ground plate's underside; the wind force's height is
    the axle middle's height over it plus the pressure centre's reach; the kit tips about the
    plate's edges across the axle (wind across it) and about its ends (the tilted panel also
    pushes along the ground): S F (|sin t| h + cos t u) or S F (sin a h + cos a u) against
    m g times the lever of the kit's centre of mass (statics)."""
    from sheetgen.mechanics.check import balance_check

    spec = _load(ROOT / "params" / "acrylic-polar.toml")
    kit = _kit(spec)
    report = balance_check(kit, spec)
    plate = kit.part("ground-plate")
    (pl,) = plate.placements
    m = np.asarray(pl.matrix)
    origin = np.asarray(pl.translation_mm)
    up, along = m[:, 2], m[:, 0]
    tilt = math.degrees(math.acos(float(up[2])))
    assert tilt == pytest.approx(abs(spec.site.latitude_deg), abs=1e-9)
    h_axle = float(origin @ -up)  # the axle middle (kit origin) over the plate's underside
    x0, y0, x1, y1 = plate.outline.bounds
    ends = [float((origin + x * along) @ along) for x in (x0, x1)]  # the ends along the ground, from the origin
    w = report.wind
    cp = math.hypot(w.centroid_y_mm, w.centroid_z_mm) + 0.25 * w.chord_mm
    h = h_axle + cp
    mass = report.mass.total_mass_kg
    cg = np.asarray(report.mass.total_cg_mm)
    cg_along = float(cg @ along)
    S, F = spec.check.tipping_safety, w.force_N
    lo, hi = report.tracking.range_deg
    thetas = np.radians(np.linspace(lo, hi, 20001))
    worst = []
    for edge, lever in ((y1, y1 - cg[1]), (y0, cg[1] - y0)):
        u = abs(edge) + cp
        over = S * F * float(np.max(np.abs(np.sin(thetas)) * h + np.cos(thetas) * u)) * 1e-3
        worst.append((over - mass * G * max(0.0, lever) * 1e-3, over))
    a = math.radians(tilt)
    for edge, lever in ((ends[1], ends[1] - cg_along), (ends[0], cg_along - ends[0])):
        u = abs(edge) + cp
        over = S * F * (math.sin(a) * h + math.cos(a) * u) * 1e-3
        worst.append((over - mass * G * max(0.0, lever) * 1e-3, over))
    short, over = max(worst)
    assert report.tipping.force_height_mm == pytest.approx(h, rel=1e-6)  # the parts sit on a 1e-6 mm grid
    assert report.tipping.overturning_Nm == pytest.approx(over, rel=1e-4)
    assert report.tipping.overturning_Nm - report.tipping.restoring_Nm == pytest.approx(short, rel=1e-4, abs=1e-9)
    assert not any("standing level" in n for n in report.notes)


def test_horizontal_kits_have_no_wedge():
    spec = _load(ROOT / "params" / "demo.toml")
    names = {p.name for p in _kit(spec).parts}
    assert "wedge" not in names and "ground-plate" not in names
    assert {"stop-arm", "end-stop"} <= names


@settings(max_examples=6, derandomize=True, deadline=None, database=None,
          phases=(Phase.explicit, Phase.generate))  # no shrinking: each draw builds a kit
@given(width=st.floats(60, 300), height=st.floats(50, 250), sheet_t=st.sampled_from([2.0, 3.0, 4.0, 6.0]),
       material=st.sampled_from(["mdf", "birch_plywood", "cast_acrylic"]), limit=st.floats(10, 90),
       polar=st.booleans(), latitude=st.floats(-66, 66))
def test_random_designs_stop_at_their_travel_limit(width, height, sheet_t, material, limit, polar, latitude):
    from sheetgen.errors import ParameterError

    overrides = [f"panel.width={width:.4g}", f"panel.height={height:.4g}", f"sheet.thickness={sheet_t:g}",
                 f'sheet.material="{material}"', f"site.travel_limit={limit:.4g}",
                 f'site.axle="{"polar" if polar else "horizontal"}"', f"site.latitude={latitude:.4g}",
                 "sheet.width=1200", "sheet.height=900"]
    try:
        spec = _load(ROOT / "params" / "demo.toml", overrides)
        kit = _kit(spec)
    except ParameterError as exc:
        refused(str(exc).split(" = ")[0])
        return
    kept()
    _check_stops_meet_at_the_limit(spec, kit)
    names = {p.name for p in kit.parts}
    assert ("wedge" in names) == (polar and abs(latitude) > 0)
