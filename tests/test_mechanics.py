"""Mass, balance, torques, drive, teeth and tipping against outside sources.

Sources are named beside each check. "common practice" marks a fact of the
trade; "from memory" a value recalled without reading it; "by hand" a
calculation written out in the comment from the named rule.
"""

from __future__ import annotations

import math
import tomllib
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from shapely.geometry import Polygon, box

from sheetgen.design import schema
from sheetgen.design import spec as spec_mod
from sheetgen.errors import ParameterError
from sheetgen.mechanics.teeth import lewis_form_factor
from sheetgen.mechanics import loads, materials
from sheetgen.mechanics.balance_text import render_text
from sheetgen.mechanics.check import balance_check
from sheetgen.mechanics.load_geometry import wind_plate_footprint
from sheetgen.mechanics.massprops import counterweight_at_arm, mass_properties, part_mass_each_kg
from sheetgen.kitmodel.part import Component, Kit, Part
from sheetgen.geometry.placement import place, rotation_x

X, Y, Z = (1.0, 0.0, 0.0), (0.0, 1.0, 0.0), (0.0, 0.0, 1.0)
DEMO = Path(__file__).resolve().parents[1] / "params" / "demo.toml"


def _plate(name, w, h, origin, rotating=True, material="mdf", t=3.0, holes=()):
    """A w x h plate lying flat (sheet square to z) with its local origin at ``origin``."""
    outline = Polygon(box(0, 0, w, h).exterior.coords, [list(hl.exterior.coords) for hl in holes])
    return Part(name, outline, t, material, 1, (place(X, Y, origin, rotating=rotating),))


def _kit(parts=(), comps=()):
    return Kit(tuple(parts), tuple(comps))


# ---------------------------------------------------------------------------
# materials


def test_mdf_density_and_strength_from_en_622_5():
    # EN 622-5:2009: MDF density 650-800 kg/m3; bending strength >= 23 N/mm2 up to 9 mm
    m = materials.sheet_material("mdf")
    assert m.density_range_kg_m3 == (650.0, 800.0)
    assert 650.0 <= m.density_kg_m3 <= 800.0
    assert m.bending_strength_MPa == 23.0
    assert "EN 622-5" in m.density_source and "EN 622-5" in m.bending_strength_source


def test_cast_acrylic_from_data_sheets():
    # cast PMMA data sheets: density 1190 kg/m3 (ISO 1183), flexural strength about 110 MPa (ISO 178)
    m = materials.sheet_material("cast_acrylic")
    assert m.density_kg_m3 == 1190.0
    assert m.bending_strength_MPa == pytest.approx(110.0)
    assert "ISO 1183" in m.density_source and "ISO 178" in m.bending_strength_source


def test_birch_plywood_from_data_sheets():
    # manufacturers' data sheets: birch plywood about 680 kg/m3; its strength is marked from memory
    m = materials.sheet_material("birch_plywood")
    assert m.density_kg_m3 == 680.0
    assert "from memory" in m.bending_strength_source


def test_rod_densities():
    # common practice: steel 7850 kg/m3, aluminium 2700 kg/m3; beech about 720 (from memory)
    assert materials.rod_material("steel").density_kg_m3 == 7850.0
    assert materials.rod_material("aluminium").density_kg_m3 == 2700.0
    assert 650.0 <= materials.rod_material("beech").density_kg_m3 <= 750.0
    assert "from memory" in materials.rod_material("beech").density_source


def test_tables_cover_the_spec_choices_and_name_sources():
    assert set(materials.SHEET_MATERIALS) == set(schema.MATERIAL_CHOICES)
    assert set(materials.ROD_MATERIALS) == set(schema.SCHEMA_BY_PATH["axle.material"].choices)
    for m in materials.SHEET_MATERIALS.values():
        assert m.density_source and m.bending_strength_source
        assert m.density_range_kg_m3[0] <= m.density_kg_m3 <= m.density_range_kg_m3[1]
    with pytest.raises(ParameterError, match="sheet.material"):
        materials.sheet_material("cardboard")


def test_axle_mass_by_hand():
    # by hand: pi/4 x 6^2 mm2 x 100 mm = 2827.43 mm3; x 7850 kg/m3 = 0.022195 kg
    assert materials.axle_mass_kg("steel", 6.0, 100.0) == pytest.approx(0.0221953, rel=1e-5)


def test_part_mass_by_hand():
    # by hand: (100 x 50 - 20 x 10) mm2 x 3 mm = 14400 mm3; x 750 kg/m3 (MDF nominal) = 0.0108 kg
    p = _plate("p", 100, 50, (0, 0, 0), holes=(box(10, 10, 30, 20),))
    assert part_mass_each_kg(p, materials.sheet_material("mdf").density_kg_m3) == pytest.approx(0.0108)


# ---------------------------------------------------------------------------
# statics: lever rule, counterweight


def test_lever_rule_by_hand():
    # lever rule (statics, common practice): a 100 x 80 x 3 MDF plate (18 g) centred
    # at z = 11.5 mm, plus 10 g at y = 20 mm: CG = sum(m r) / sum(m),
    # U = |sum(m r)| = hypot(10 x 20, 18 x 11.5) g mm = 287.84 g mm
    plate = _plate("plate", 100, 80, (-50, -40, 10))
    kit = _kit([plate], [Component("probe", 0.010, "point", (0.0, 20.0, 0.0), rotating=True)])
    mp = mass_properties(kit)
    assert mp.rotating_mass_kg == pytest.approx(0.028)
    assert mp.rotating_cg_mm == pytest.approx((0.0, 200 / 28, 18 * 11.5 / 28))
    assert mp.static_unbalance_gmm == pytest.approx(math.hypot(200.0, 207.0))


def test_fixed_items_do_not_count_in_the_unbalance():
    plate = _plate("plate", 100, 80, (-50, -40, 10))
    base = _plate("base", 200, 100, (-100, -50, -90), rotating=False)
    kit = _kit([plate, base], [Component("motor", 0.03, "box", (120.0, 0.0, -40.0), (40, 20, 20))])
    mp = mass_properties(kit)
    assert mp.rotating_mass_kg == pytest.approx(0.018)
    assert mp.fixed_mass_kg == pytest.approx(0.03 + 200 * 100 * 3e-9 * 750)
    assert mp.static_unbalance_gmm == pytest.approx(18 * 11.5)


@settings(max_examples=40, deadline=None)
@given(m=st.floats(0.001, 1.0), y=st.floats(-200, 200), z=st.floats(-200, 200), x=st.floats(-100, 100))
def test_probe_mass_follows_lever_rule_and_counterweight_cancels(m, y, z, x):
    # lever rule (statics): adding a point mass m at p moves the CG to
    # (M c + m p) / (M + m); the suggested counterweight m_c = U / arm,
    # opposite the CG, brings the unbalance back to zero
    plate = _plate("plate", 120, 90, (-60, -30, 8))
    base = mass_properties(_kit([plate]))
    kit = _kit([plate], [Component("probe", m, "point", (x, y, z), rotating=True)])
    mp = mass_properties(kit)
    M, c = base.rotating_mass_kg, np.asarray(base.rotating_cg_mm)
    expect = (M * c + m * np.array([x, y, z])) / (M + m)
    assert mp.rotating_mass_kg == pytest.approx(M + m)
    np.testing.assert_allclose(mp.rotating_cg_mm, expect, atol=1e-9)
    cw = counterweight_at_arm(mp, 40.0)
    assert cw.mass_kg * 1000 * 40.0 == pytest.approx(mp.static_unbalance_gmm)
    kit2 = _kit([plate], [Component("probe", m, "point", (x, y, z), rotating=True),
                          Component("cw", cw.mass_kg, "point", cw.position_mm, rotating=True)])
    assert mass_properties(kit2).static_unbalance_gmm == pytest.approx(0.0, abs=1e-6 * (1 + mp.static_unbalance_gmm))


@settings(max_examples=25, deadline=None)
@given(angle=st.floats(-180, 180))
def test_turning_the_frame_turns_its_cg(angle):
    # rigid-body rotation: turning every rotating item by the angle about x turns the
    # CG by the same rotation and leaves the mass and the unbalance unchanged
    plate = _plate("plate", 120, 90, (-60, -30, 8))
    rib = Part("rib", box(0, 0, 50, 20), 3.0, "mdf", 1, (place(Y, Z, (30.0, -25.0, -12.0), rotating=True),))
    comps = (Component("probe", 0.02, "point", (10.0, 35.0, -5.0), rotating=True),)
    kit = _kit([plate, rib], comps)
    turned = _kit(
        [Part(p.name, p.outline, p.thickness_mm, p.material, p.qty, tuple(pl.turned(angle) for pl in p.placements))
         for p in kit.parts],
        [c.turned(angle) for c in comps])
    a, b = mass_properties(kit), mass_properties(turned)
    np.testing.assert_allclose(b.rotating_cg_mm, rotation_x(angle) @ np.asarray(a.rotating_cg_mm), atol=1e-9)
    assert b.static_unbalance_gmm == pytest.approx(a.static_unbalance_gmm)


# ---------------------------------------------------------------------------
# gravity and friction


def test_gravity_torque_by_hand():
    # statics, T = m g r sin(psi): 100 g at 10 mm (U = 1000 g mm) turned 90 deg
    # from the vertical -> 1e-3 kg m x 9.80665 m/s2 = 0.00980665 N m (standard gravity, ISO 80000-3)
    assert loads.gravity_torque_Nm(1000.0, 90.0, 0.0) == pytest.approx(0.00980665)
    # a polar axle at 60 deg carries cos 60 = half of it
    assert loads.gravity_torque_Nm(1000.0, 90.0, 60.0) == pytest.approx(0.00980665 / 2)


@settings(max_examples=40, deadline=None)
@given(y=st.floats(-50, 50), z=st.floats(-50, 50), m=st.floats(0.01, 1), tilt=st.floats(0, 66),
       rot=st.floats(-90, 90))
def test_gravity_torque_equals_cross_product(y, z, m, tilt, rot):
    # statics (common practice): the moment about the axle is the x part of r x F, with
    # gravity -g (sin tilt, 0, cos tilt) in the kit frame of an axle tilted up along x
    kit = _kit([], [Component("m", m, "point", (0.0, y, z), rotating=True)])
    mp = mass_properties(kit)
    r = rotation_x(rot) @ np.array([0.0, y, z]) * 1e-3
    t = math.radians(tilt)
    f = -m * loads.G_M_S2 * np.array([math.sin(t), 0.0, math.cos(t)])
    ref = np.cross(r, f)[0]
    mine = loads.gravity_torque_Nm(mp.static_unbalance_gmm, mp.cg_angle_deg + rot, tilt)
    assert mine == pytest.approx(ref, abs=1e-12)


@settings(max_examples=40, deadline=None)
@given(lo=st.floats(-200, 200), span=st.floats(0, 200))
def test_max_abs_sin_against_sampling(lo, span):
    s, at = loads.max_abs_sin_deg(lo, lo + span)
    grid = np.linspace(lo, lo + span, 20001)
    assert s >= np.abs(np.sin(np.radians(grid))).max() - 1e-9
    assert s == pytest.approx(abs(math.sin(math.radians(at))))
    assert lo - 1e-9 <= at <= lo + span + 1e-9


def test_friction_torque_by_hand():
    # journal friction T = mu N r (common practice): 0.35 x 10 N x 3 mm = 0.0105 N m
    assert loads.friction_torque_Nm(0.35, 10.0, 6.0) == pytest.approx(0.0105)


# ---------------------------------------------------------------------------
# wind


def test_isa_density_and_flat_plate_cd():
    # ISO 2533 (ISA) sea-level air density 1.225 kg/m3; Hoerner, Fluid-Dynamic Drag:
    # flat plate square to the flow Cd about 1.17
    assert loads.AIR_DENSITY_KG_M3 == 1.225
    assert loads.FLAT_PLATE_CD == pytest.approx(1.17)


def test_drag_worked_case():
    # worked case: 0.5 x 1.225 x 10^2 x 1.17 x 0.01 m2 = 0.717 N
    assert loads.drag_force_N(10.0, 0.01) == pytest.approx(0.717, abs=5e-4)


def test_wind_plate_fills_the_window_and_takes_the_quarter_chord():
    # what the wind sees: a 166 x 126 frame with a 138 x 98 window holding a 150 x 110 panel
    # is a 166 x 126 plate; its arm is a quarter of the 126 mm chord (upper bound, see loads)
    frame = _plate("frame", 166, 126, (-83, -63, 10), holes=(box(14, 14, 152, 112),))
    panel = Component("panel", 0.1, "box", (0.0, 0.0, 14.5), (150, 110, 3), rotating=True)
    fp = wind_plate_footprint(_kit([frame], [panel]))
    assert fp.area == pytest.approx(166 * 126)
    assert loads.wind_eccentricity_mm(fp.centroid.y, 126.0) == pytest.approx(31.5)


# ---------------------------------------------------------------------------
# drive and pulses


def test_drive_by_hand():
    # torque through a gear pair: T_motor = T_axle / (ratio x efficiency):
    # 0.1 / (36/12 x 0.85) = 0.0392157 N m; available 0.08 x 0.3 = 0.024 N m
    d = loads.drive_figures(0.1, 12, 36, 0.85, 0.08, 0.3, 150.0)
    assert d.gear_ratio == 3.0
    assert d.motor_torque_required_Nm == pytest.approx(0.0392157, rel=1e-5)
    assert d.motor_torque_available_Nm == pytest.approx(0.024)
    assert d.torque_margin == pytest.approx(0.024 / 0.0392157, rel=1e-5)
    # straight torque-speed line (permanent-magnet DC motor, common practice):
    # 150 rpm x (1 - 0.0392/0.08) / 3 x 21600 deg/h per rpm
    assert d.output_speed_deg_h == pytest.approx(150 * (1 - 0.0392157 / 0.08) / 3 * 21600, rel=1e-5)


def test_capacitor_energy_common_practice():
    # E = C V^2 / 2 (common practice): 1000 uF at 24 V holds 0.288 J
    assert loads.capacitor_energy_J(1000.0, 24.0) == pytest.approx(0.288)


# ---------------------------------------------------------------------------
# teeth


def test_lewis_stress_through_table_values():
    # Shigley, table 14-2 (20 deg full depth): Y(12) = 0.245, Y(30) = 0.359.
    # m = 2, b = 3 mm: pinion r = 12 mm, 0.12 N m -> 10 N -> 10 / (3 x 2 x 0.245) = 6.8027 MPa;
    # wheel r = 30 mm, 0.3 N m -> 10 N -> 10 / (3 x 2 x 0.359) = 4.6425 MPa
    assert lewis_form_factor(12) == pytest.approx(0.245)
    assert lewis_form_factor(30) == pytest.approx(0.359)
    t = loads.tooth_figures(0.3, 0.12, 2.0, 12, 30, 3.0, 23.0, 3.0, 0.2)
    assert t.pinion_stress_MPa == pytest.approx(10 / (3 * 2 * 0.245))
    assert t.wheel_stress_MPa == pytest.approx(10 / (3 * 2 * 0.359))
    assert t.weaker_gear == "pinion" and t.stress_MPa == t.pinion_stress_MPa
    # EN 622-5 MDF 23 N/mm2 over a safety of 3
    assert t.allowable_MPa == pytest.approx(23 / 3)
    assert t.stall_stress_MPa == pytest.approx((0.2 / 0.012) / (3 * 2 * 0.245))


# ---------------------------------------------------------------------------
# tipping


def test_tipping_by_hand():
    # moments about the lee edge (statics): F = 10 N; h = 0.2 m, u = 0.05 m; the worst
    # rotation within +-60 deg is 60 (atan(0.2/0.05) = 76 deg lies outside):
    # 1.5 x 10 x (0.2 sin 60 + 0.05 cos 60) = 2.9731 N m; the 1 kg kit at 0.05 m holds
    # 0.49033 N m; ballast at 0.05 m: (2.9731 - 0.49033) / (9.80665 x 0.05) = 5.0632 kg
    t = loads.tipping_figures(10.0, 200.0, 1.0, 50.0, 50.0, 50.0, 1.5, (-60.0, 60.0))
    assert t.worst_rotation_deg in (60.0, -60.0)
    assert t.overturning_Nm == pytest.approx(1.5 * 10 * (0.2 * math.sin(math.radians(60)) + 0.025))
    assert t.restoring_Nm == pytest.approx(1.0 * 9.80665 * 0.05)
    assert t.ballast_kg == pytest.approx((t.overturning_Nm - t.restoring_Nm) / (9.80665 * 0.05))


def test_no_ballast_in_calm_air():
    t = loads.tipping_figures(0.0, 200.0, 1.0, 50.0, 50.0, 50.0, 1.5, (-60.0, 60.0))
    assert t.ballast_kg == 0.0


# ---------------------------------------------------------------------------
# the demo kit from outside: probe mass and counterweight through [[rotating_mass]]


def _demo_doc():
    """The demo file with its derived values pinned, so an added mass changes only what it should."""
    doc = tomllib.loads(DEMO.read_text(encoding="utf-8"))
    for d in spec_mod.load_spec(DEMO).derived:
        section, name = d.path.split(".")
        doc.setdefault(section, {})[name] = d.value
    return doc


def _report(doc, overrides=()):
    from sheetgen.design.kit import build_kit

    s = spec_mod.spec_from_dict(doc, tuple(overrides))
    return balance_check(build_kit(s), s)


def _bare(kit):
    """The kit without the counterweight it carries (bracket and bar)."""
    from sheetgen.kitmodel.part import Kit

    return Kit(tuple(p for p in kit.parts if p.name != "counterweight-bracket"),
               tuple(c for c in kit.components if c.name != "counterweight"))


def test_demo_probe_mass_and_counterweight():
    # lever rule through the parameter file: a 50 g probe at [0, 40, 0] moves the bare frame's
    # rotating mass and CG as (M c + m p) / (M + m); the kit re-derives the counterweight it
    # carries for the new unbalance and leaves at most a quarter of it
    from sheetgen.design.kit import build_kit
    from sheetgen.mechanics.massprops import mass_properties

    def bare(doc):
        s = spec_mod.spec_from_dict(doc)
        kit = build_kit(s)
        return mass_properties(_bare(kit)), balance_check(kit, s)

    base, _ = bare(_demo_doc())
    M, c = base.rotating_mass_kg, np.asarray(base.rotating_cg_mm)
    doc_p = _demo_doc()
    doc_p["rotating_mass"].append({"name": "probe", "mass_kg": 0.05, "position_mm": [0.0, 40.0, 0.0]})
    probed, report = bare(doc_p)
    assert probed.rotating_mass_kg == pytest.approx(M + 0.05)
    np.testing.assert_allclose(probed.rotating_cg_mm, (M * c + 0.05 * np.array([0, 40, 0])) / (M + 0.05),
                               atol=1e-9)
    cw = report.counterweight
    assert cw.carried and cw.bare_unbalance_gmm == pytest.approx(probed.static_unbalance_gmm)
    assert report.mass.static_unbalance_gmm <= probed.static_unbalance_gmm / 4


def test_demo_counterweight_clears_the_fixed_parts():
    # the carried bar, swept through the travel with the kit's own clearance sweep,
    # keeps frame.clearance from every fixed part and lies opposite the bare frame's CG
    from shapely.geometry import Point

    from sheetgen.kitmodel.clearance import Silhouette, kit_silhouettes, sweep_clearance
    from sheetgen.design.kit import build_kit
    from sheetgen.mechanics.massprops import mass_properties

    s = spec_mod.spec_from_dict(_demo_doc())
    kit = build_kit(s)
    r = balance_check(kit, s)
    cw = r.counterweight
    assert cw.mass_kg > 0 and cw.carried
    x, y, z = cw.position_mm
    bar_c = next(c for c in kit.components if c.name == "counterweight")
    length, dia, _ = bar_c.size_mm
    # bar mass from its size: steel 7850 kg/m3 (common practice) over its cross-section
    assert cw.mass_kg == pytest.approx(7850 * math.pi * (dia / 2 * 1e-3) ** 2 * length * 1e-3)
    bar = Silhouette("cw#1", Point(y, z).buffer(dia / 2), (x - length / 2, x + length / 2), True)
    fixed = [x for x in kit_silhouettes(kit) if not x.rotating]
    lim = s.site.travel_limit_deg
    assert sweep_clearance(fixed + [bar], (-lim, lim)).min_clearance_mm >= s.frame.clearance_mm - 1e-6
    c = np.asarray(mass_properties(_bare(kit)).rotating_cg_mm[1:])
    # opposite the bare CG, to within the bracket's own small off-line moment (1 degree)
    assert np.dot(c, [y, z]) <= -np.linalg.norm(c) * cw.arm_mm * math.cos(math.radians(1.0))


def test_no_counterweight_place_over_the_panel():
    # a heavy lump straight under the axle puts the CG below it: the weight would have to
    # sit over the panel (shading it), so the report says there is no place for it
    doc = _demo_doc()
    doc["rotating_mass"] = [{"name": "lump", "mass_kg": 0.3, "position_mm": [0.0, 0.0, -60.0]}]
    r = _report(doc)
    assert r.mass.rotating_cg_mm[2] < 0
    assert r.counterweight.rule.startswith("no place") and not r.counterweight.found


def test_demo_report_is_consistent():
    r = _report(_demo_doc())
    # the load is the sum of its parts, and the drive divides it by ratio x efficiency
    assert r.load_torque_Nm == pytest.approx(r.gravity_torque_max_Nm + r.friction_torque_Nm + r.wind.torque_Nm)
    assert r.drive.motor_torque_required_Nm == pytest.approx(r.load_torque_Nm / (r.drive.gear_ratio * 0.85))
    # ok is exactly the binding checks
    assert r.ok == all(c.passed for c in r.checks if c.binding)
    text = render_text(r)
    assert "EN 1991-1-4" in text and "ASCE 7" in text and "licensed engineer" in text


def test_failing_variants_say_which_check_and_why():
    # a strong drive and a tooth safety factor of 20: only the tooth check fails
    # (gear size pinned: left at "auto" the layout solver would add layers until the teeth carry the load;
    # continuous drive, so the pulse checks stay out of it)
    strong = [("drive.wheel_teeth", 72), ("motor.usable_fraction", 0.9), ("motor.stall_torque", 0.5),
              ("drive.module", 1.5), ("drive.layers", 1), ("drive.pulse_capacitance", 0.0), ("drive.pulse_voltage", 0.0),
              # one layer where the demo derives two (its teeth carry the motor stalled at the end stops):
              # the motor's place follows the thinner stack
              ("drive.wheel_spacers", "auto"), ("drive.mount_gap", "auto")]
    r = _report(_demo_doc(), strong + [("check.tooth_safety", 20.0)])
    failed = [c for c in r.checks if c.binding and not c.passed]
    # (the stalled motor at the end stops loads the same teeth harder: that check fails with it)
    assert not r.ok and [c.name for c in failed] == ["tooth stress", "teeth at motor stall"]
    assert "Lewis" in failed[0].reason and "drive.layers" in failed[0].reason
    assert "drive.layers" in failed[1].reason
    assert _report(_demo_doc(), strong + [("drive.layers", 4), ("check.tooth_safety", 1.0)]).ok
    # a motor far too weak: the torque check fails and says what it needs and what would help
    r = _report(_demo_doc(), [("motor.stall_torque", 0.004), ("drive.wheel_teeth", 60)])
    failed = {c.name: c for c in r.checks if c.binding and not c.passed}
    assert not r.ok and "motor torque" in failed
    assert "needs" in failed["motor torque"].reason and "gear ratio" in failed["motor torque"].reason


def test_demo_pulse_fix_passes_when_built_in():
    # check the machine: the change the failing pulse check names (a smaller capacitor: the
    # kit already carries its counterweight) is put into the parameters and the kit checked
    # again; the demo with a large 4700 µF pulse fails
    doc = _demo_doc()
    doc["drive"]["pulse_capacitance"] = 4700
    r = _report(doc)
    step = next(c for c in r.checks if c.name == "pulse step in calm air")
    assert not step.passed and "would pass" in step.reason
    fix = r.drive_time.fixes[0]
    assert r.counterweight.carried
    assert fix.key == "drive.pulse_capacitance" and "counterweight" not in fix.text
    doc["drive"]["pulse_capacitance"] = fix.value
    again = _report(doc)
    checks = {c.name: c for c in again.checks}
    assert checks["pulse step in calm air"].passed, checks["pulse step in calm air"].reason
    assert checks["pulse moves the frame in the design wind"].passed
    assert again.pulse_step_calm_deg <= doc["drive"].get("max_step", 5.0)
