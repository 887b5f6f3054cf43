"""The gears as the STEP file carries them: flat faces cut into sectors, the same solid.

References: OpenCascade (through cadquery, a registry package) checks the solid
(BRepCheck_Analyzer) and measures it; a prism's volume is its base area times its
height (Cavalieri's principle, common practice), the area from shapely.
"""

from __future__ import annotations

import pytest
from shapely.ops import unary_union

pytest.importorskip("cadquery", reason="cadquery (the OpenCascade kernel) is needed for the STEP solids")


@pytest.fixture(scope="module")
def demo_model(demo_spec, demo_kit):
    from sheetgen.model3d.solids import build_model

    return build_model(demo_kit, demo_spec)


def _most_edges_on_a_face(solid) -> int:
    return max(len(f.Edges()) for f in solid.Faces())


def test_gear_faces_are_cut_into_sectors_and_the_solid_is_unchanged(demo_model):
    from OCP.BRepCheck import BRepCheck_Analyzer

    from sheetgen.model3d.solids import CAP_EDGES, step_solid

    gears = [b for b in demo_model.bodies
             if len(b.pieces) == 1 and len(b.pieces[0].outline.exterior.coords) - 1 > CAP_EDGES]
    assert {b.source for b in gears} >= {"wheel"}  # the wheel's teeth are drawn finely
    for b in gears:
        whole = demo_model.solids[b.name]
        cut = step_solid(b, whole)
        assert BRepCheck_Analyzer(cut.wrapped).IsValid(), b.name
        assert len(cut.Solids()) == 1
        piece = b.pieces[0]
        assert cut.Volume() == pytest.approx(piece.outline.area * piece.depth_mm, rel=1e-9), b.name
        wb, cb = whole.BoundingBox(), cut.BoundingBox()
        assert (cb.xmin, cb.ymin, cb.zmin, cb.xmax, cb.ymax, cb.zmax) == pytest.approx(
            (wb.xmin, wb.ymin, wb.zmin, wb.xmax, wb.ymax, wb.zmax), abs=1e-6)
        # the whole plate has a face bounded by every outline edge; the written one, none above ~200
        assert _most_edges_on_a_face(whole) > CAP_EDGES
        assert _most_edges_on_a_face(cut) <= 200, b.name
        # nothing of the plate is lost or added: on each flat face the sectors' caps, taken back to
        # the part's frame, tile the part's outline (a valid closed solid with both caps equal to the
        # outline and the prism's volume is the prism)
        for z_mm in (0.0, piece.depth_mm):
            caps = _caps_at(cut, piece.placement, z_mm)
            assert len(caps) > 1, b.name  # cut into sectors
            assert sum(c.area for c in caps) == pytest.approx(piece.outline.area, rel=1e-9), b.name
            assert unary_union(caps).symmetric_difference(piece.outline).area <= 1e-6 * piece.outline.area


def _caps_at(solid, placement, z_mm: float) -> list:
    """The planar faces of ``solid`` lying in the part's plane z = ``z_mm`` (part frame), as
    shapely polygons in the part's x, y (their edges are straight: the vertices give them)."""
    import numpy as np
    from shapely.geometry import Polygon

    r, t = placement.matrix, np.asarray(placement.translation_mm, dtype=float)
    out = []
    for f in solid.Faces():
        outer = _ring(f.outerWire()) - t
        outer = outer @ r  # p_local = R^T (p - t)
        if np.ptp(outer[:, 2]) > 1e-6 or abs(outer[0, 2] - z_mm) > 1e-6:
            continue
        holes = [((_ring(w) - t) @ r)[:, :2] for w in f.innerWires()]
        out.append(Polygon(outer[:, :2], holes))
    return out


def _ring(wire):
    """The wire's vertices in their order round it (BRepTools_WireExplorer walks the edges
    end to end; each step's vertex is where its edge starts)."""
    import numpy as np
    from OCP.BRep import BRep_Tool
    from OCP.BRepTools import BRepTools_WireExplorer

    pts = []
    walk = BRepTools_WireExplorer(wire.wrapped)
    while walk.More():
        p = BRep_Tool.Pnt_s(walk.CurrentVertex())
        pts.append((p.X(), p.Y(), p.Z()))
        walk.Next()
    return np.array(pts)


def test_plates_with_few_edges_are_written_as_they_are(demo_model):
    from sheetgen.model3d.solids import step_solid

    b = next(b for b in demo_model.bodies if b.source == "rib")
    assert step_solid(b, demo_model.solids[b.name]) is demo_model.solids[b.name]
