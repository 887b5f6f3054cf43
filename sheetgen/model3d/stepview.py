"""Pictures of the kit at each assembly step, from its nominal geometry (no cadquery).

Every part instance and solid component is drawn as its outline extruded through its
thickness and carried into the kit by its placement; the items put in at the step are
drawn in a strong colour, the ones already there in light grey, from one fixed
isometric view. matplotlib (Agg) is imported inside the functions; the PNG is written
with a fixed size and resolution and no metadata, so the same kit gives the same bytes.
"""

from __future__ import annotations

import io
from typing import Any

import numpy as np
import shapely
from shapely.geometry import Polygon

from sheetgen.design.assembly_order import Prism, Step, kit_items
from sheetgen.design.part import Kit

NEW_COLOUR = "#d9480f"  # the items put in at this step
OLD_COLOUR = "#b8b8b8"  # the items already in place
EDGE_COLOUR = "#555555"
VIEW_ELEV_DEG = 28.0
VIEW_AZIM_DEG = -52.0
SIZE_IN = (4.8, 3.4)
DPI = 100
SIMPLIFY_MM = 0.25  # outline detail below this is not drawn (gear teeth keep their shape)


def prism_faces(p: Prism) -> list[np.ndarray]:
    """The faces of an extruded outline in the kit frame: both flat faces as triangles
    (holes kept open) and a quad for every edge of every ring."""
    outline = p.outline.simplify(SIMPLIFY_MM, preserve_topology=True)
    if not isinstance(outline, Polygon) or outline.is_empty:
        return []
    faces = []
    tris = shapely.constrained_delaunay_triangles(outline)
    for tri in getattr(tris, "geoms", []):
        xy = np.asarray(tri.exterior.coords[:3], dtype=float)
        for z in (0.0, p.depth_mm):
            faces.append(p.placement.apply(np.column_stack([xy, np.full(3, z)])))
    for ring in [outline.exterior, *outline.interiors]:
        xy = np.asarray(ring.coords, dtype=float)
        for a, b in zip(xy[:-1], xy[1:]):
            quad = np.array([[a[0], a[1], 0.0], [b[0], b[1], 0.0], [b[0], b[1], p.depth_mm], [a[0], a[1], p.depth_mm]])
            faces.append(p.placement.apply(quad))
    return faces


def step_picture_png(kit: Kit, step: Step, bounds_mm: np.ndarray | None = None) -> bytes:
    """The kit as it stands after ``step`` (``step.shown``), the new items highlighted.
    ``bounds_mm`` (2 x 3: min and max corner) fixes the frame of the view for every step."""
    import matplotlib

    matplotlib.use("Agg", force=False)
    from matplotlib.figure import Figure
    from mpl_toolkits.mplot3d.art3d import Poly3DCollection  # type: ignore[import-untyped]

    items = {it.name: it for it in kit_items(kit)}
    new = set(step.new)
    fig = Figure(figsize=SIZE_IN, dpi=DPI)
    ax: Any = fig.add_axes((0.0, 0.0, 1.0, 1.0), projection="3d")
    old_faces: list[np.ndarray] = []
    new_faces: list[np.ndarray] = []
    for name in step.shown:
        it = items.get(name)
        if it is None:
            continue
        for p in it.pieces:
            (new_faces if name in new else old_faces).extend(prism_faces(p))
    if old_faces:
        ax.add_collection3d(Poly3DCollection(old_faces, facecolors=OLD_COLOUR, edgecolors=OLD_COLOUR,
                                             linewidths=0.2, alpha=0.5))
    if new_faces:
        ax.add_collection3d(Poly3DCollection(new_faces, facecolors=NEW_COLOUR, edgecolors=EDGE_COLOUR,
                                             linewidths=0.15, alpha=1.0))
    if bounds_mm is None:
        bounds_mm = kit_bounds_mm(kit)
    lo, hi = np.asarray(bounds_mm[0], dtype=float), np.asarray(bounds_mm[1], dtype=float)
    ax.set_xlim(lo[0], hi[0])
    ax.set_ylim(lo[1], hi[1])
    ax.set_zlim(lo[2], hi[2])
    ax.set_box_aspect(tuple(float(v) for v in np.maximum(hi - lo, 1.0)), zoom=1.25)  # true proportions
    ax.view_init(elev=VIEW_ELEV_DEG, azim=VIEW_AZIM_DEG)
    ax.set_axis_off()
    buf = io.BytesIO()
    fig.savefig(buf, format="png", dpi=DPI, metadata={"Software": None})
    return buf.getvalue()


def kit_bounds_mm(kit: Kit) -> np.ndarray:
    """The box round every solid of the kit: min and max corner, kit frame."""
    pts = []
    for it in kit_items(kit):
        for p in it.pieces:
            xy = np.asarray(p.outline.exterior.coords, dtype=float)
            for z in (0.0, p.depth_mm):
                pts.append(p.placement.apply(np.column_stack([xy, np.full(len(xy), z)])))
    allp = np.vstack(pts)
    return np.vstack([allp.min(axis=0), allp.max(axis=0)])


def step_pictures(kit: Kit, steps: tuple[Step, ...]) -> tuple[bytes, ...]:
    """One PNG per step, all in the same frame."""
    bounds = kit_bounds_mm(kit)
    return tuple(step_picture_png(kit, s, bounds) for s in steps)


def describe_picture(step: Step) -> str:
    """What the picture shows, in words (the image's alt text)."""
    new = ", ".join(dict.fromkeys(n.split("#")[0] for n in step.new)) or "nothing new"
    old = len([n for n in step.shown if n not in set(step.new)])
    where = "on the bench" if step.bench else "in the kit"
    return (f"Step {step.number} {where}: the {new} in orange"
            + (f", the {old} item{'s' if old != 1 else ''} already in place in grey" if old else "")
            + "; view from the front left, above.")
