"""The gears as the STEP file carries them: flat faces cut into sectors, the same solid.

References: OpenCascade (through cadquery, a registry package) checks the solid
(BRepCheck_Analyzer) and measures it; a prism's volume is its base area times its
height (Cavalieri's principle, common practice), the area from shapely.
"""

from __future__ import annotations

import pytest

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
        # nothing of the plate is lost or added: the two solids share their whole volume
        assert whole.intersect(cut).Volume() == pytest.approx(whole.Volume(), rel=1e-6)


def test_plates_with_few_edges_are_written_as_they_are(demo_model):
    from sheetgen.model3d.solids import step_solid

    b = next(b for b in demo_model.bodies if b.source == "rib")
    assert step_solid(b, demo_model.solids[b.name]) is demo_model.solids[b.name]
