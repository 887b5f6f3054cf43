"""The order planner's line tests and sides (sheetgen.design.assembly_order).

Internal cross-checks (no outside source): the vectorised extents of many lines through
a prism (used where a plate is seen askew) agree with the one-line extent the planner
used first, drawn over random plates, placements and lines; and the guide and the 3D model
build the kit's solid components from one rule.
"""

from __future__ import annotations

import math

import numpy as np
from hypothesis import given
from hypothesis import strategies as st
from shapely.geometry import Polygon

from tests import _refs as R
from tests.conftest import PARAMS

UNIT = st.floats(-1.0, 1.0, allow_nan=False)


def _unit(v) -> np.ndarray | None:
    a = np.asarray(v, dtype=float)
    n = float(np.linalg.norm(a))
    return a / n if n > 0.1 else None


@given(w=st.floats(5.0, 60.0), h=st.floats(5.0, 60.0), hole=st.floats(0.1, 0.8), depth=st.floats(1.0, 8.0),
       u=st.tuples(UNIT, UNIT, UNIT), t=st.tuples(UNIT, UNIT, UNIT), d=st.tuples(UNIT, UNIT, UNIT),
       kind=st.sampled_from(["any", "normal", "in-plane"]), seed=st.integers(0, 2**16))
def test_many_lines_agree_with_one_line_at_a_time(w, h, hole, depth, u, t, d, kind, seed):
    # internal cross-check: _extents (arrays of lines) against _extent (one line), on a
    # plate with a hole, placed anywhere in any attitude, along any side, its normal or a
    # direction in its plane
    from sheetgen.design.assembly_order.blocking import _extent, _extents
    from sheetgen.geometry.placement import place
    from sheetgen.geometry.prism import Prism

    uu = _unit(u)
    if uu is None:
        R.refused("u too short to set an attitude")
        return
    a = np.eye(3)[int(np.argmin(np.abs(uu)))]
    vv = np.cross(uu, a)
    vv /= np.linalg.norm(vv)
    pl = place(tuple(uu), tuple(vv), tuple(50.0 * np.asarray(t)))
    outer = [(0, 0), (w, 0), (w, h), (0, h)]
    hw, hh = hole * w / 2, hole * h / 2
    inner = [(w / 2 - hw, h / 2 - hh), (w / 2 - hw, h / 2 + hh), (w / 2 + hw, h / 2 + hh), (w / 2 + hw, h / 2 - hh)]
    prism = Prism(Polygon(outer, [inner]), depth, pl)
    m = pl.matrix
    dd = {"normal": m[:, 2], "in-plane": m[:, 0] * math.cos(seed) + m[:, 1] * math.sin(seed)}.get(kind, _unit(d))
    if dd is None:
        R.refused("d too short to be a side")
        return
    R.kept()
    rng = np.random.default_rng(seed)
    # lines through points of the plate's box, so that most of them meet it
    local = rng.uniform([-2.0, -2.0, -0.5], [w + 2.0, h + 2.0, depth + 0.5], size=(40, 3))
    qs = pl.apply(local)
    lo, hi = _extents(prism, qs, dd)
    for i, q in enumerate(qs):
        one = _extent(prism, q, dd)
        if not one:
            assert math.isnan(lo[i]) and math.isnan(hi[i]), (i, lo[i], hi[i])
        else:
            assert abs(lo[i] - min(s for s, _ in one)) < 1e-6
            assert abs(hi[i] - max(s for _, s in one)) < 1e-6


def test_the_polar_kit_adds_its_ground_plates_sides():
    # the kit's axes come first, then the askew plate's normal and in-plane direction both
    # ways; every side is a unit vector and its opposite sits beside it
    from sheetgen.design.assembly_order import AXES, kit_directions, side_words, solid_items
    from sheetgen.design.kit import build_kit
    from sheetgen.design.spec import load_spec

    spec = load_spec(PARAMS / "acrylic-polar.toml")
    dirs = kit_directions(solid_items(build_kit(spec, step_labels=False)))
    assert dirs[: len(AXES)] == AXES
    extra = [name for name, _ in dirs[len(AXES):]]
    assert extra == ["ground-plate +n", "ground-plate -n", "ground-plate +u", "ground-plate -u"]
    for k in range(0, len(dirs), 2):
        a, b = np.asarray(dirs[k][1]), np.asarray(dirs[k + 1][1])
        assert abs(np.linalg.norm(a) - 1.0) < 1e-9 and np.allclose(a, -b)
    assert "square to the ground-plate's face" in side_words(*dirs[len(AXES) + 1])
    demo = load_spec(PARAMS / "demo.toml")
    assert kit_directions(solid_items(build_kit(demo, step_labels=False))) == AXES, "a square kit: its axes only"


def test_the_guide_and_the_model_share_the_component_solids(demo_kit, demo_spec):
    # internal cross-check: the axle rod and the boxes are the same prisms in the guide and
    # in the 3D model (one rule); only the motor's shaft differs, as far as the kit shows it
    # in the guide and the spec's length in the model
    from sheetgen.design.assembly_order import solid_items
    from sheetgen.model3d.bodies import model_bodies

    guide = {it.name: it.pieces for it in solid_items(demo_kit)}
    model = {b.name: b.pieces for b in model_bodies(demo_kit, demo_spec) if b.kind == "component"}
    assert set(model) <= set(guide)
    for name, pieces in model.items():
        if name == "motor":
            assert guide[name][0] == pieces[0], "the motor's body"
            continue
        assert guide[name] == pieces, name
