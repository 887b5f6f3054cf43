"""The assembly guide: its order lets every part reach its place, the page holds a step
block with a picture for every step and names every part and bought item, it renders in a
real browser, and the engraved labels carry the step numbers.

The reach check is independent of the ordering code: it takes the solids of the 3D model
(sheetgen.model3d.bodies, the pinion turned into mesh as the model has it), fills each
solid with points a little inside its faces, slides those points from the item's place out
along the side it comes from (a kit axis, or the unit vector of a tilted plate's own side,
as the polar kit's ground plate has), and asks shapely whether any point enters a solid already
in place. "Reaches its place" is a fact of the machine (the kit goes together in that
order), not of the drawing. Tolerances: points 0.05 mm inside the faces, slid in steps of
0.5 mm; every solid of the kit is at least 2 mm thick, so no collision hides between
steps (internal tolerance, ours).
"""

from __future__ import annotations

import base64
import re
from html.parser import HTMLParser

import numpy as np
import pytest
import shapely
from hypothesis import given, settings
from hypothesis import strategies as st

from tests import _refs as R
from tests.conftest import DEMO, PARAMS, shipped
from tests._browser import screenshot

INSET_MM = 0.05
GRID_MM = 1.0
SLIDE_MM = 0.5
SIDES = {"+z": (0, 0, 1), "-z": (0, 0, -1), "+x": (1, 0, 0), "-x": (-1, 0, 0), "+y": (0, 1, 0), "-y": (0, -1, 0)}


# ---------------------------------------------------------------------------
# the independent reach check


def _fill(prism) -> np.ndarray:
    """Points inside a prism, INSET_MM inside every face, GRID_MM apart, in the kit frame."""
    inner = prism.outline.buffer(-INSET_MM, join_style="mitre")
    if inner.is_empty:
        return np.zeros((0, 3))
    x0, y0, x1, y1 = inner.bounds
    xs = np.arange(x0, x1 + GRID_MM, GRID_MM)
    ys = np.arange(y0, y1 + GRID_MM, GRID_MM)
    gx, gy = np.meshgrid(xs, ys)
    gx, gy = gx.ravel(), gy.ravel()
    inside = shapely.contains_xy(inner, gx, gy)
    # and the vertices of the inset outline, so thin tabs and teeth are never missed
    rings = [inner] if inner.geom_type == "Polygon" else list(inner.geoms)
    vx = np.concatenate([np.asarray(r.exterior.coords)[:, 0] for r in rings])
    vy = np.concatenate([np.asarray(r.exterior.coords)[:, 1] for r in rings])
    px, py = np.concatenate([gx[inside], vx]), np.concatenate([gy[inside], vy])
    d = prism.depth_mm
    zs = [INSET_MM, d / 2, d - INSET_MM]
    local = np.vstack([np.column_stack([px, py, np.full(len(px), z)]) for z in zs])
    return prism.placement.apply(local)


def _inside(prism, pts: np.ndarray) -> np.ndarray:
    """Which points lie strictly inside the prism."""
    m = prism.placement.matrix
    local = (pts - np.asarray(prism.placement.translation_mm)) @ m
    ok = (local[:, 2] > 0.0) & (local[:, 2] < prism.depth_mm)
    out = np.zeros(len(pts), dtype=bool)
    if ok.any():
        out[ok] = shapely.contains_xy(prism.outline, local[ok, 0], local[ok, 1])
    return out


def _aabb(prism) -> tuple[np.ndarray, np.ndarray]:
    c = prism.corners()
    return c.min(axis=0), c.max(axis=0)


def first_collision(moving, placed, side) -> str | None:
    """The name of the first solid of ``placed`` that the ``moving`` solids run into when
    slid from their places out along ``side`` (a name of SIDES, or a unit vector for a side
    askew to the kit's axes: a tilted plate's normal); None when the way is free."""
    d = np.asarray(SIDES[side] if isinstance(side, str) else side, dtype=float)
    assert abs(np.linalg.norm(d) - 1.0) < 1e-9, f"side {side}: not a unit vector"
    with np.errstate(divide="ignore", invalid="ignore"):
        inv = np.where(d != 0.0, 1.0 / np.where(d != 0.0, d, 1.0), 0.0)
    for body in moving:
        for piece in body.pieces:
            pts = _fill(piece)
            for other in placed:
                for q in other.pieces:
                    lo, hi = _aabb(q)
                    # where along the slide each point is within the placed piece's box (slab test)
                    t1, t2 = (lo - pts) * inv, (hi - pts) * inv
                    still = d == 0.0
                    inside_across = np.all(~still | ((pts > lo - 1e-9) & (pts < hi + 1e-9)), axis=1)
                    enter = np.max(np.where(still, -np.inf, np.minimum(t1, t2)), axis=1)
                    leave = np.min(np.where(still, np.inf, np.maximum(t1, t2)), axis=1)
                    near = inside_across & (leave > 0.0) & (enter < leave)
                    if not near.any():
                        continue
                    p = pts[near]
                    s_min = max(0.0, float(enter[near].min()))
                    s_max = float(leave[near].max())
                    for s in np.arange(s_min, s_max + SLIDE_MM, SLIDE_MM):
                        if _inside(q, p + s * d).any():
                            return other.name
    return None


def _check_order(kit, spec):
    """Walk the guide's moves; every item must reach its place past what is already there
    (on the kit, or in its group on the bench). Returns the moves checked."""
    from sheetgen.design.assembly_order import assembly_moves
    from sheetgen.model3d.bodies import model_bodies

    # the bolts and nuts are bought items: the guide fits them with its hardware lists
    # (test_each_bought_item_shows_its_own_size), not as moves of solids
    bodies = {b.name: b for b in model_bodies(kit, spec) if b.kind != "fastener"}
    moves = assembly_moves(kit)
    kit_placed: list[str] = []
    bench: dict[str, list[str]] = {}
    for mv in moves:
        here = bench.setdefault(mv.bench, []) if mv.bench else kit_placed
        assert mv.approach != "?", f"{', '.join(mv.items)}: the guide found no straight path"
        if mv.approach:
            side = mv.approach if mv.approach in SIDES else mv.direction  # a tilted plate's own side
            hit = first_collision([bodies[n] for n in mv.items], [bodies[n] for n in here], side)
            assert hit is None, f"{', '.join(mv.items)} coming {mv.approach} runs into {hit}"
        here.extend(n for n in mv.items if n not in here)
    assert sorted(kit_placed) == sorted(bodies), "every solid of the model is put in once"
    return moves


# ---------------------------------------------------------------------------
# the order


def test_the_checker_sees_a_blocked_path(demo_kit, demo_spec):
    # the check can fail: with the axle in place, a rib between the supports cannot come in
    # from above; with nothing in place, it can
    from sheetgen.model3d.bodies import model_bodies

    bodies = {b.name: b for b in model_bodies(demo_kit, demo_spec)}
    assert first_collision([bodies["rib#1"]], [bodies["axle"]], "+z") == "axle"
    assert first_collision([bodies["rib#1"]], [bodies["base#1"]], "+z") is None
    # the pinion cannot pass the motor mount's hole: it cannot reach the motor shaft from the
    # mount's side once the mount stands
    assert first_collision([bodies["pinion#1"]], [bodies["motor-mount#1"]], "+x") == "motor-mount#1"


def test_the_checker_sees_a_tilted_plate_blocked():
    # the polar kit's ground plate lies askew to the kit's axes: the wedges' tabs sit in its
    # slots along its own normal, so it cannot come off straight down (-z) past them, and can
    # along its normal, away from the wedges
    from sheetgen.design.kit import build_kit
    from sheetgen.design.spec import load_spec
    from sheetgen.model3d.bodies import model_bodies

    spec = load_spec(PARAMS / "acrylic-polar.toml")
    bodies = {b.name: b for b in model_bodies(build_kit(spec), spec)}
    plate, wedges = bodies["ground-plate#1"], [bodies["wedge#1"], bodies["wedge#2"]]
    normal = plate.pieces[0].placement.matrix[:, 2]
    assert abs(normal[2]) < 0.99, "the ground plate is askew to the kit's axes"
    assert first_collision([plate], wedges, "-z") in ("wedge#1", "wedge#2")
    assert first_collision([plate], wedges, tuple(normal)) in ("wedge#1", "wedge#2")
    assert first_collision([plate], wedges, tuple(-normal)) is None


@pytest.mark.parametrize("params", sorted(p.name for p in PARAMS.glob("*.toml")))
def test_every_item_reaches_its_place_in_the_guides_order(params):
    spec, kit = shipped(PARAMS / params)
    moves = _check_order(kit, spec)
    assert len(moves) >= 10


KITS = st.fixed_dictionaries({
    "panel.width": st.integers(80, 240),
    "panel.height": st.integers(60, 180),
    "sheet.thickness": st.sampled_from([2.0, 3.0, 4.0, 6.0]),
    "axle.height": st.integers(60, 180),
    "axle.diameter": st.sampled_from([4.0, 6.0, 8.0]),
    "drive.layers": st.integers(1, 2),
    "joints.fit": st.sampled_from(["press", "snug", "slip"]),
})


# derandomized and few: each draw builds a kit and sweeps every item of it (seconds each)
@settings(max_examples=4, deadline=None, derandomize=True)
@given(KITS)
def test_any_kit_goes_together_in_its_guides_order(params):
    # the order is derived, not listed: for kits of other sizes every item still reaches its
    # place, and every cut part is in a step as many times as the kit holds it
    from sheetgen.design.assembly_order import assembly_steps
    from sheetgen.design.kit import build_kit
    from sheetgen.design.spec import load_spec
    from sheetgen.errors import SheetgenError

    try:
        spec = load_spec(DEMO, [f"{k}={v}" for k, v in params.items()] + ["sheet.width=1000", "sheet.height=800"])
        kit = build_kit(spec)
    except SheetgenError as exc:
        R.refused(str(exc).split(":")[0])
        return
    R.kept()
    _check_order(kit, spec)
    steps = assembly_steps(kit, spec)
    qty: dict[str, int] = {}
    for s in steps:
        for name, q in s.parts:
            qty[name] = qty.get(name, 0) + q
    assert qty == {p.name: p.qty for p in kit.parts}


def test_every_part_and_item_is_in_a_step(demo_kit, demo_spec):
    from sheetgen.design.assembly_order import assembly_steps
    from sheetgen.design.hardware import hardware_items

    steps = assembly_steps(demo_kit, demo_spec)
    assert [s.number for s in steps] == list(range(1, len(steps) + 1))
    qty: dict[str, int] = {}
    for s in steps:
        for name, q in s.parts:
            qty[name] = qty.get(name, 0) + q
    assert qty == {p.name: p.qty for p in demo_kit.parts}, "each cut part, as many as the kit holds"
    fitted = {item for s in steps for item, _ in s.hardware}
    assert {h.item for h in hardware_items(demo_kit, demo_spec)} <= fitted, "every item of the hardware list"
    # the frame bolts follow from the holes through the frame stack
    bolts = next(h for h in hardware_items(demo_kit, demo_spec) if h.price_key == "prices.bolt")
    assert bolts.qty_per_kit == len(next(p for p in demo_kit.parts if p.name == "tray").circles)


def test_each_bought_item_shows_its_own_size(demo_kit, demo_spec):
    # the demo has two bolt sizes (the frame stack and the counterweight bracket): each step
    # lists each item with the spec of its own size, and a nut goes on with the bolts of its
    # size (a nut is useless in a later step than its bolt)
    from sheetgen.design.assembly_order import assembly_steps
    from sheetgen.design.hardware import hardware_items

    listed = {(h.item, h.spec) for h in hardware_items(demo_kit, demo_spec)}
    # the frame bolts (M3, with nuts) and the counterweight's screw into its tapped bar (M4, no nut)
    assert len({spec for item, spec in listed if item in ("bolt", "counterweight screw")}) >= 2, \
        "the demo has two screw sizes"
    nuts = 0
    for s in assembly_steps(demo_kit, demo_spec):
        assert len(s.hardware_specs) == len(s.hardware)
        fitted = [(item, spec) for (item, _), spec in zip(s.hardware, s.hardware_specs)]
        assert set(fitted) <= listed, s.number
        for item, spec in fitted:
            if item == "nut":
                nuts += 1
                size = spec.split()[-1]  # "hexagon nut ISO 4032 M3"
                assert any(i == "bolt" and f" {size} " in sp for i, sp in fitted), (s.number, spec)
    assert nuts >= 1


# ---------------------------------------------------------------------------
# the page


class _Page(HTMLParser):
    def __init__(self):
        super().__init__()
        self.sections: list[dict] = []
        self.depth = 0
        self.text: list[str] = []
        self.links: list[str] = []

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if tag == "section" and "step" in (a.get("class") or "").split():
            self.sections.append({"imgs": [], "id": a.get("id")})
        if tag == "img" and self.sections:
            self.sections[-1]["imgs"].append(a)
        if tag == "a":
            self.links.append(a.get("href") or "")

    def handle_data(self, data):
        self.text.append(data)


@pytest.fixture(scope="module")
def out(demo_build_3):
    return demo_build_3[0]


@pytest.fixture(scope="module")
def page(out):
    p = _Page()
    p.feed((out / "assembly.html").read_text(encoding="utf-8"))
    return p


def test_guide_has_a_step_block_with_a_picture_for_every_step(out, page, demo_kit, demo_spec):
    from sheetgen.design.assembly_order import assembly_steps

    steps = assembly_steps(demo_kit, demo_spec)
    assert len(page.sections) == len(steps)
    for sec in page.sections:
        assert len(sec["imgs"]) == 1
        src = sec["imgs"][0]["src"]
        assert src.startswith("data:image/png;base64,")
        assert base64.b64decode(src.split(",", 1)[1])[:8] == b"\x89PNG\r\n\x1a\n"
        assert sec["imgs"][0].get("alt")
    html = (out / "assembly.html").read_text(encoding="utf-8")
    assert "break-inside:avoid" in html and "page-break-inside:avoid" in html
    assert "http://" not in html and "https://" not in html and "<script" not in html
    report = _Page()
    report.feed((out / "report.html").read_text(encoding="utf-8"))
    assert "assembly.html" in report.links


def test_guide_names_every_part_and_bought_item(page, demo_kit, demo_spec):
    from sheetgen.design.hardware import hardware_items

    text = " ".join(page.text)
    for p in demo_kit.parts:
        assert p.name in text
    for h in hardware_items(demo_kit, demo_spec):
        assert h.item in text
    assert "vice" in text and "Pinch" in text


def test_guide_is_the_same_bytes_for_the_same_kit(out, tmp_path):
    # same input, same bytes: a second build of the same parameters writes the same page
    from sheetgen.api import build, load_params, write_build

    b = build(load_params(PARAMS / "demo.toml"), kits=1, model=False)
    write_build(b, tmp_path / "again")
    assert (tmp_path / "again" / "assembly.html").read_bytes() == (out / "assembly.html").read_bytes()


def test_guide_renders_in_headless_chromium(out, tmp_path):
    img = screenshot(out / "assembly.html", tmp_path, 1000, 3000)
    assert img.std() > 20, "the screenshot is blank"
    r, g, b = img[..., 0], img[..., 1], img[..., 2]
    new_parts = (abs(r - 0xD9) < 30) & (abs(g - 0x48) < 30) & (abs(b - 0x0F) < 30)  # the highlight colour
    assert new_parts.sum() > 2000, "no highlighted parts drawn in the pictures"


# ---------------------------------------------------------------------------
# the labels


def test_labels_carry_the_step_numbers(out, demo_kit, demo_spec):
    import ezdxf

    from sheetgen.design.assembly_order import assembly_steps

    steps = assembly_steps(demo_kit, demo_spec)
    want = {p.name: [str(s.number) for s in steps if p.name in dict(s.parts)] for p in demo_kit.parts}
    for name, numbers in want.items():
        doc = ezdxf.readfile(out / "parts" / f"{name}.dxf")
        texts = [e.dxf.text for e in doc.modelspace() if e.dxf.layer == "LABEL" and e.dxftype() in ("TEXT", "MTEXT")]
        assert len(texts) == 1, name
        m = re.fullmatch(r"([0-9,]+)( (.+))?", texts[0])
        assert m, texts[0]
        assert m.group(1).split(",") == numbers, (name, texts[0])
        assert m.group(3) in (None, name)
