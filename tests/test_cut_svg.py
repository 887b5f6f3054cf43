"""Cut-ready sheet SVGs (sheets/sheet-NN.svg beside each DXF).

References: the SVG files are parsed with the standard library's XML parser and their paths read
here (SVG 1.1 path grammar: M, L, A, Z; the W3C SVG recommendation); the DXF beside each is read
with ezdxf (tests/dxfread.py). Same contours, same order: each SVG cut element starts where the
DXF entity of the same rank starts (its pierce point) and has the same bounding box.
"""

from __future__ import annotations

import math
import re
import xml.etree.ElementTree as ET

import ezdxf
import pytest
from click.testing import CliRunner

from tests.conftest import DEMO
from tests.dxfread import entity_contour

NS = "{http://www.w3.org/2000/svg}"


def _numbers(text):
    return [float(v) for v in re.findall(r"-?\d+(?:\.\d+)?(?:e-?\d+)?", text)]


def _svg_contour(el):
    """(first point, bounding box) of one SVG cut element, in its own (DXF) coordinates."""
    if el.tag == NS + "circle":
        cx, cy, r = (float(el.get(k)) for k in ("cx", "cy", "r"))
        return (cx + r, cy), (cx - r, cy - r, cx + r, cy + r)
    d = el.get("d")
    tokens = re.findall(r"[MLAZ]|-?\d+(?:\.\d+)?", d)
    pts, arcs = [], []
    i, cmd = 0, None
    while i < len(tokens):
        t = tokens[i]
        if t in "MLAZ":
            cmd = t
            i += 1
            continue
        if cmd in ("M", "L"):
            pts.append((float(tokens[i]), float(tokens[i + 1])))
            i += 2
        elif cmd == "A":
            rx, ry, _, large, sweep, x, y = (float(v) for v in tokens[i:i + 7])
            assert rx == ry and large == 0 and sweep == 1
            arcs.append((pts[-1], (x, y), rx))
            pts.append((x, y))
            i += 7
    first = pts[0]
    closed = d.rstrip().endswith("Z")
    body = pts if closed else pts[1:]  # an open path starts with its lead-in
    if arcs:
        # two half circles: the centre is the midpoint of each arc's ends (|p1 - p0| = 2 r)
        (p0, p1, r) = arcs[0]
        assert math.dist(p0, p1) == pytest.approx(2 * r, abs=2e-3)
        cx, cy = (p0[0] + p1[0]) / 2, (p0[1] + p1[1]) / 2
        return first, (cx - r, cy - r, cx + r, cy + r)
    xs, ys = [p[0] for p in body], [p[1] for p in body]
    return first, (min(xs), min(ys), max(xs), max(ys))


def _check_sheet(svg_path, dxf_path, size_mm, colours=None):
    w, h = size_mm
    root = ET.parse(svg_path).getroot()
    assert root.tag == NS + "svg"
    # true size in mm, one user unit = 1 mm
    assert root.get("width") == f"{w:g}mm" and root.get("height") == f"{h:g}mm"
    assert _numbers(root.get("viewBox")) == [0, 0, w, h]
    groups = {g.get("id"): g for g in root.findall(NS + "g")}
    assert set(groups) == {"cut", "label", "guide"}
    for g in groups.values():
        # y kept as in the DXF: the group flips the DXF's coordinates onto the page
        assert _numbers(g.get("transform")) == [1, 0, 0, -1, 0, h]
    cut = list(groups["cut"])
    for el in cut:
        assert el.tag in (NS + "path", NS + "circle")
        assert el.get("fill") == "none" and "fill" not in (el.get("style") or "")
        assert float(el.get("stroke-width")) <= 0.1  # a hairline
        if colours:
            assert el.get("stroke") == colours["cut"]
    for gid in ("label", "guide"):
        for el in groups[gid]:
            assert el.get("fill") == "none"
            if colours:
                assert el.get("stroke") == colours[gid]
    doc = ezdxf.readfile(dxf_path)
    entities = [e for e in doc.modelspace() if e.dxf.layer == "CUT"]
    assert len(cut) == len(entities)
    for k, (el, e) in enumerate(zip(cut, entities)):
        poly, _, _, pierce = entity_contour(e)
        first, box = _svg_contour(el)
        assert first == pytest.approx(pierce, abs=2e-3), k
        assert box == pytest.approx(poly.bounds, abs=2e-3), k
    labels = [e for e in doc.modelspace() if e.dxf.layer == "LABEL" and e.dxftype() == "TEXT"]
    assert [t.text for t in groups["label"] if t.tag == NS + "text"] == [e.dxf.text for e in labels]
    guides = [e for e in doc.modelspace() if e.dxf.layer == "GUIDE"]
    assert len(list(groups["guide"])) == len(guides)
    return len(cut)


def test_demo_sheet_svgs_match_their_dxfs(demo_build_3):
    folder, summary = demo_build_3
    sheets = sorted((folder / "sheets").glob("sheet-*.dxf"))
    assert len(sheets) == summary["sheets"]
    total = 0
    for dxf in sheets:
        total += _check_sheet(dxf.with_suffix(".svg"), dxf, summary["sheet_size_mm"])
    assert total == summary["pierces"]


def test_lead_ins_and_colours_from_the_parameters(tmp_path):
    # one kit with lead-ins (open paths from the pierce point) and colours of the user's choosing
    from sheetgen.cli import main

    colours = {"cut": "#123456", "label": "#abcdef", "guide": "#0f0f0f"}
    out = tmp_path / "out"
    res = CliRunner().invoke(main, ["build", str(DEMO), "--kits", "1", "--no-model", "-o", str(out),
                                    "--set", "laser.lead_in=1.5", "--set", "nest.effort=1",
                                    "--set", f"svg.cut_colour={colours['cut']}",
                                    "--set", f"svg.label_colour={colours['label']}",
                                    "--set", f"svg.guide_colour={colours['guide']}", "--set", "svg.stroke=0.02"])
    assert res.exit_code in (0, 4), res.output
    for dxf in sorted((out / "sheets").glob("sheet-*.dxf")):
        _check_sheet(dxf.with_suffix(".svg"), dxf, (600, 400), colours)
        assert 'stroke-width="0.02"' in dxf.with_suffix(".svg").read_text(encoding="utf-8")


def test_nest_writes_cut_ready_svgs_too(tmp_path):
    from sheetgen.cli import main

    out = tmp_path / "nest"
    res = CliRunner().invoke(main, ["nest", str(DEMO), "--kits", "1", "--effort", "1", "-o", str(out)])
    assert res.exit_code == 0, res.output
    for dxf in sorted(out.glob("sheet-*.dxf")):
        _check_sheet(dxf.with_suffix(".svg"), dxf, (600, 400))


def test_a_colour_that_is_not_hex_is_refused():
    from sheetgen.cli import main

    res = CliRunner().invoke(main, ["balance", str(DEMO), "--set", "svg.cut_colour=red"])
    assert res.exit_code == 2
    assert "svg.cut_colour" in res.output and "#rrggbb" in res.output


def test_same_input_same_bytes(tmp_path):
    from sheetgen.io.cutsvg import cut_svg, default_style
    from sheetgen.geometry.contour import Contour

    contours = [Contour(circle=(10.0, 10.0, 2.0)), Contour(points=((0.0, 0.0), (30.0, 0.0), (30.0, 20.0)))]
    a = cut_svg(contours, [], 600, 400, default_style(), "t")
    b = cut_svg(list(contours), [], 600, 400, default_style(), "t")
    assert a == b and a.count("<circle") == 1 and a.count("<path") == 1
