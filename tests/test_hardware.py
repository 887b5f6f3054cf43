"""The hardware list: every bought item, sized from the kit (summary.json ``hardware``, bom.csv).

Outside sources, written here and never imported from sheetgen:
- ISO 4762 (hexagon socket head cap screws): the nominal length series (from memory).
- ISO 4032 (hexagon nuts, style 1): largest nut thickness m (from memory).
- ISO 7089 (plain washers, normal series): thickness h (from memory).
- ISO 273 (clearance holes): fine series (from memory).
- Thread beyond the nut: at least two pitches of the ISO 261 coarse thread (common practice; pitches from memory).

The bolts are checked against the machine: what a rod down each bolt hole actually passes through
(every part whose outline covers the line, found with shapely from the placements), not against
the stacks the code under test found. The axle is checked against the written STEP file read back
with cadquery; the hole counts against the part DXFs read back with ezdxf.
"""

from __future__ import annotations

import csv
import io
import json
import math

import ezdxf
import numpy as np
import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st
from shapely.geometry import Point, Polygon

from sheetgen.errors import ParameterError
from tests import _refs
from tests.conftest import DEMO

# ISO 4762 nominal lengths l, mm (from memory)
ISO_4762_L = (3, 4, 5, 6, 8, 10, 12, 16, 20, 25, 30, 35, 40, 45, 50, 55, 60, 65, 70, 80, 90, 100, 110, 120, 130,
              140, 150, 160, 180, 200, 220, 240, 260, 280, 300)
# ISO 4032 nut thickness m max, mm (from memory)
ISO_4032_M = {1.6: 1.3, 2.0: 1.6, 2.5: 2.0, 3.0: 2.4, 4.0: 3.2, 5.0: 4.7, 6.0: 5.2, 8.0: 6.8, 10.0: 8.4}
# ISO 7089 washer thickness h, mm (from memory)
ISO_7089_H = {1.6: 0.3, 2.0: 0.3, 2.5: 0.5, 3.0: 0.5, 4.0: 0.8, 5.0: 1.0, 6.0: 1.6, 8.0: 1.6, 10.0: 2.0}
# ISO 273 fine clearance hole, mm (from memory)
ISO_273_FINE = {1.6: 1.7, 2.0: 2.2, 2.5: 2.7, 3.0: 3.2, 4.0: 4.3, 5.0: 5.3, 6.0: 6.4, 8.0: 8.4, 10.0: 10.5}
# ISO 261 coarse pitch, mm (from memory)
ISO_261_P = {1.6: 0.35, 2.0: 0.4, 2.5: 0.45, 3.0: 0.5, 4.0: 0.7, 5.0: 0.8, 6.0: 1.0, 8.0: 1.25, 10.0: 1.5}


# plates this close along a bolt are drawn together by it: a panel a few microns thicker than its rim
# layer lifts the bezel that much, and the clamped stack still closes (far below the sheet stock's own
# thickness tolerance of about 0.1 mm, common practice, from memory)
JOIN_MM = 0.01


def _columns(kit):
    """For every round hole of every part instance: the material a straight rod down its axis passes,
    as (hole diameter, part name, axis, (s_low, s_high) of the touching column of plates)."""
    plates = []  # (normal, s0, s1, part, placement) of every part instance
    for part in kit.parts:
        for pl in part.placements:
            m = pl.matrix
            n = m[:, 2]
            s0 = float(np.asarray(pl.translation_mm) @ n)
            plates.append((n, s0, s0 + part.thickness_mm, part, pl))
    out = []
    for part in kit.parts:
        for pl in part.placements:
            n = pl.matrix[:, 2]
            for c in part.circles:
                p = pl.apply(np.array([[c.x_mm, c.y_mm, 0.0]]))[0]
                spans = []
                for n2, s0, s1, other, pl2 in plates:
                    if abs(abs(float(n2 @ n)) - 1) > 1e-9:
                        continue
                    local = (np.asarray(p) - np.asarray(pl2.translation_mm)) @ pl2.matrix
                    if Polygon(other.outline.exterior).contains(Point(local[0], local[1])):
                        lo, hi = sorted((float(s0 * (n2 @ n)), float(s1 * (n2 @ n))))
                        spans.append((lo, hi))
                spans.sort()
                own = float(np.asarray(pl.translation_mm) @ n)
                lo, hi = own, own + part.thickness_mm
                grew = True
                while grew:  # grow the column over plates that touch it
                    grew = False
                    for a, b in spans:
                        if a <= hi + JOIN_MM and b >= lo - JOIN_MM and (a < lo - 1e-9 or b > hi + 1e-9):
                            lo, hi = min(lo, a), max(hi, b)
                            grew = True
                out.append((2 * c.radius_mm, part.name, tuple(np.round(n, 9)), (lo, hi)))
    return out


def _bolt_checks(kit, hardware):
    bolts = [h for h in hardware if h.item == "bolt"]
    columns = _columns(kit)
    for b in bolts:
        size = b.diameter_mm
        # ISO 273: the hole clears the bolt (fine series or larger), and no larger size would pass it
        assert ISO_273_FINE[size] <= b.hole_mm + 1e-9
        bigger = [d for d in ISO_273_FINE if d > size]
        assert not bigger or ISO_273_FINE[min(bigger)] > b.hole_mm
        stacks = [hi - lo for d, name, _, (lo, hi) in columns if name in b.parts and abs(d - b.hole_mm) < 1e-9]
        assert stacks, b
        stack = max(stacks)
        # at least the stack it passes plus nut and washer (ISO 4032, ISO 7089), and a length of ISO 4762
        assert b.length_mm >= stack + ISO_4032_M[size] + ISO_7089_H[size] - 1e-9, (b, stack)
        assert b.length_mm in ISO_4762_L
        # rounded up to the next length: the one below would not hold the stack, a washer each side,
        # the nut and two pitches of thread beyond it (common practice)
        need = stack + ISO_4032_M[size] + 2 * ISO_7089_H[size] + 2 * ISO_261_P[size]
        assert b.length_mm >= need - 1e-9
        shorter = [v for v in ISO_4762_L if v < b.length_mm]
        assert not shorter or shorter[-1] < need - 1e-9
    return bolts


def test_demo_bolts_hold_their_stack_and_come_from_the_series(demo_kit, demo_spec):
    from sheetgen.design.hardware import hardware_items

    hardware = hardware_items(demo_kit, demo_spec)
    bolts = _bolt_checks(demo_kit, hardware)
    # the demo clamps tray, one rim layer and bezel: 9 mm of 3 mm MDF at four corners
    # four frame bolts through the tray, rim(s) and bezel (the bar's screw goes into its tapped end)
    assert sum(b.qty_per_kit for b in bolts if "tray" in b.parts) == 4
    nuts = sum(h.qty_per_kit for h in hardware if h.item == "nut")
    assert nuts == sum(b.qty_per_kit for b in bolts)


@settings(max_examples=8, deadline=None)
@given(t=st.sampled_from([2.0, 3.0, 4.0, 6.0]), panel_t=st.floats(1.0, 14.0), bolt=st.sampled_from([2.2, 2.7, 3.2, 4.3]))
@example(t=2.0, panel_t=2.0078125, bolt=2.2)  # a panel 8 microns thicker than its rim layer (found by a CI run)
def test_bolts_follow_any_stack(t, panel_t, bolt):
    # property: whatever the sheet and panel thickness (so the number of rim layers) and bolt hole,
    # every bolt holds the plates a rod down its hole passes, nut and washer included
    from sheetgen.design.hardware import hardware_items
    from sheetgen.design.kit import build_kit
    from sheetgen.design.spec import load_spec

    try:
        spec = load_spec(DEMO, [f"sheet.thickness={t}", f"panel.thickness={panel_t}", f"frame.bolt_diameter={bolt}",
                                "laser.kerf=0.1"])
        kit = build_kit(spec)
    except ParameterError as exc:
        _refs.refused(str(exc).split(":")[0])
        return
    _refs.kept()
    bolts = _bolt_checks(kit, hardware_items(kit, spec))
    # four frame bolts through the tray, rim(s) and bezel (the bar's screw goes into its tapped end)
    assert sum(b.qty_per_kit for b in bolts if "tray" in b.parts) == 4


@pytest.fixture
def cq():
    return pytest.importorskip("cadquery", reason="cadquery (the model extra) reads the STEP file back")


def test_axle_rod_is_the_step_axle(cq, demo_build_3):
    # reference: the written model/assembly.step read back with cadquery's STEP importer (OpenCascade):
    # the one solid as thick as the rod both ways across x is the axle; its length along x is the rod's
    folder, summary = demo_build_3
    rods = [h for h in summary["hardware"] if h["item"] == "axle rod"]
    assert len(rods) == 1
    rod = rods[0]
    solids = cq.importers.importStep(str(folder / "model" / "assembly.step")).solids().vals()
    axles = []
    for s in solids:
        b = s.BoundingBox()
        if b.ylen <= rod["diameter_mm"] + 1e-6 and b.zlen <= rod["diameter_mm"] + 1e-6 and b.xlen > 5 * b.ylen:
            axles.append(b)
    assert len(axles) == 1
    assert rod["length_mm"] == pytest.approx(axles[0].xlen, abs=1e-6)
    # the model's rod is a fine polygon round its axis: its width is the diameter within 0.01 mm
    assert max(axles[0].ylen, axles[0].zlen) == pytest.approx(rod["diameter_mm"], abs=0.01)
    assert rod["qty_total"] == rod["qty_per_kit"] * summary["kits"]


def _dxf_circles(path, kerf):
    """Nominal diameters of the round holes cut in one part DXF (ezdxf; the kerf put back)."""
    doc = ezdxf.readfile(path)
    return [round(2 * e.dxf.radius + kerf, 4) for e in doc.modelspace() if e.dxftype() == "CIRCLE"
            and e.dxf.layer == "CUT"]


def test_fastener_counts_match_the_holes_in_the_part_dxfs(demo_build_3, demo_spec):
    # reference: the part files the build wrote (parts/*.dxf, read with ezdxf) and their quantities
    # (parts/manifest.json): every round hole is passed by one fastener, or by the axle or motor shaft
    folder, summary = demo_build_3
    kerf = summary["kerf_mm"]
    manifest = json.loads((folder / "parts" / "manifest.json").read_text(encoding="utf-8"))
    entries = manifest["parts"] if isinstance(manifest, dict) else manifest
    holes: dict[float, int] = {}
    for entry in entries:
        for d in _dxf_circles(folder / "parts" / entry["file"], kerf):
            holes[d] = holes.get(d, 0) + entry["qty"]
    fasteners = [h for h in summary["hardware"] if h.get("holes")]
    by_size: dict[float, int] = {}
    for h in fasteners:
        by_size[round(h["hole_mm"], 4)] = by_size.get(round(h["hole_mm"], 4), 0) + h["holes"] * h["qty_per_kit"]
    rod_min = min(demo_spec.axle.diameter_mm, demo_spec.motor.shaft_diameter_mm) - 0.2  # press bores grip
    for d, n in holes.items():
        match = [s for s in by_size if abs(s - d) < 2e-3]
        if match:
            assert by_size[match[0]] == n, (d, n, by_size)
        else:
            assert d >= rod_min, f"a {d} mm hole has no fastener"
    for s in by_size:
        assert any(abs(s - d) < 2e-3 for d in holes), s
    # the demo: 4 frame bolts, the counterweight bar's screw into its tapped end (no nut), 4 base
    # anchors, no motor screws (the motor's box of plates clamps its body); a nut per bolt; a washer
    # each side of a bolt and under every screw head
    count = {h["item"]: 0 for h in summary["hardware"]}
    for h in summary["hardware"]:
        count[h["item"]] += h["qty_per_kit"]
    assert (count["bolt"], count["counterweight screw"], count["anchor screw"],
            count.get("motor screw", 0)) == (4, 1, 4, 0)
    assert count["nut"] == count["bolt"]
    assert count["washer"] == (2 * count["bolt"] + count["counterweight screw"] + count["anchor screw"]
                               + count.get("motor screw", 0))
    for h in summary["hardware"]:
        assert h["qty_total"] == h["qty_per_kit"] * summary["kits"]


def test_every_bought_item_is_listed(demo_build_3, demo_spec):
    folder, summary = demo_build_3
    items = {h["item"] for h in summary["hardware"]}
    assert {"axle rod", "bolt", "nut", "washer", "anchor screw", "gear-motor", "panel",
            "counterweight"} <= items
    motor = next(h for h in summary["hardware"] if h["item"] == "gear-motor")
    m = demo_spec.motor
    for figure in (f"{m.voltage_V:g} V", f"{m.stall_torque_Nm:g} N·m", f"{m.no_load_speed_rpm:g} rpm",
                   f"shaft {m.shaft_diameter_mm:g} mm", f"flat {m.shaft_flat_mm:g} mm",
                   f"{m.shaft_length_mm:g} mm beyond", f"{m.body_length_mm:g} x {m.body_width_mm:g} x {m.body_height_mm:g}"):
        assert figure in motor["spec"], figure
    # the counterweight is the one the balance check carries (derived: balance.counterweight)
    cw = next(h for h in summary["hardware"] if h["item"] == "counterweight")
    assert f"{summary['balance']['counterweight']['mass_kg'] * 1000:g} g" in cw["spec"]


def test_bom_csv_lists_the_hardware_and_the_cut_parts(demo_build_3):
    folder, summary = demo_build_3
    text = (folder / "bom.csv").read_text(encoding="utf-8")
    rows = list(csv.DictReader(io.StringIO(text)))
    hw = [r for r in rows if r["kind"] == "hardware"]
    cut = [r for r in rows if r["kind"] == "cut part"]
    assert [(r["item"], r["spec"], int(r["qty_per_kit"]), int(r["qty_total"])) for r in hw] == \
        [(h["item"], h["spec"], h["qty_per_kit"], h["qty_total"]) for h in summary["hardware"]]
    assert [(r["item"], int(r["qty_per_kit"]), int(r["qty_total"])) for r in cut] == \
        [(p["name"], p["qty_per_kit"], p["qty"]) for p in summary["bill_of_materials"]]
    for r, h in zip(hw, summary["hardware"]):
        assert (float(r["length_mm"]) if r["length_mm"] else None) == h.get("length_mm")
    assert "\r" not in text


def test_report_has_the_hardware_table(demo_build_3):
    folder, summary = demo_build_3
    html = (folder / "report.html").read_text(encoding="utf-8")
    assert "<h2>Hardware</h2>" in html
    for h in summary["hardware"]:
        assert h["spec"].replace("&", "&amp;").replace("'", "&#x27;") in html


def test_glue_appears_where_layers_are_glued(tmp_path):
    # the large variant stacks two wheel layers (its description says to glue them): one glue item
    from sheetgen.design.hardware import hardware_items
    from sheetgen.design.kit import build_kit
    from sheetgen.design.spec import load_spec
    from tests.conftest import PARAMS

    spec = load_spec(PARAMS / "large-6mm.toml")
    kit = build_kit(spec)
    glued = [p.name for p in kit.parts if p.qty > 1 and "glue" in p.description]
    glue = [h for h in hardware_items(kit, spec) if h.item == "glue"]
    assert glued and len(glue) == 1 and set(glue[0].parts) == set(glued)


def test_a_hole_no_bolt_fits_is_refused_naming_the_parts(demo_spec):
    from sheetgen.design.hardware import metric_size

    with pytest.raises(ParameterError, match="tray"):
        metric_size(1.2, "holes in tray + rim + bezel")
    assert math.isclose(metric_size(3.2, "x"), 3.0)
