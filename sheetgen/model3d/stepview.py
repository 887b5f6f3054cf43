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

from sheetgen.design.assembly_order import Step, solid_items
from sheetgen.kitmodel.part import Kit
from sheetgen.geometry.prism import Prism

NEW_COLOUR = "#d9480f"  # the items put in at this step
OLD_COLOUR = "#b8b8b8"  # the items already in place
EDGE_COLOUR = "#555555"
VIEW_ELEV_DEG = 28.0
VIEW_AZIM_DEG = -52.0
SIZE_IN = (4.8, 3.4)
DPI = 100
SIMPLIFY_MM = 0.25  # outline detail below this is not drawn (gear teeth keep their shape)


def prism_faces(p: Prism) -> np.ndarray:
    """The faces of an extruded outline in the kit frame, as an (n, 4, 3) array: both flat
    faces as triangles (holes kept open; the fourth corner repeats the first) and a quad
    for every edge of every ring."""
    outline = p.outline.simplify(SIMPLIFY_MM, preserve_topology=True)
    if not isinstance(outline, Polygon) or outline.is_empty:
        return np.zeros((0, 4, 3))
    tris = shapely.get_coordinates(shapely.constrained_delaunay_triangles(outline)).reshape(-1, 4, 2)
    n = len(tris)
    flat = []
    for z in (0.0, p.depth_mm):
        flat.append(np.concatenate([tris, np.full((n, 4, 1), z)], axis=2))
    sides = []
    for ring in [outline.exterior, *outline.interiors]:
        xy = np.asarray(ring.coords, dtype=float)
        a, b = xy[:-1], xy[1:]
        m = len(a)
        z0, z1 = np.zeros((m, 1)), np.full((m, 1), p.depth_mm)
        sides.append(np.stack([np.hstack([a, z0]), np.hstack([b, z0]), np.hstack([b, z1]), np.hstack([a, z1])],
                              axis=1))
    local = np.concatenate(flat + sides, axis=0)
    return p.placement.apply(local.reshape(-1, 3)).reshape(-1, 4, 3)


def step_picture_png(kit: Kit, step: Step, bounds_mm: np.ndarray | None = None,
                     faces: dict[str, np.ndarray] | None = None) -> bytes:
    """The kit as it stands after ``step`` (``step.shown``), the new items highlighted.
    ``bounds_mm`` (2 x 3: min and max corner) fixes the frame of the view for every step;
    ``faces`` (item name -> faces, :func:`kit_faces`) saves drawing the items again."""
    return _render(kit, (step,), bounds_mm, faces)[0]


def _render(kit: Kit, steps: tuple[Step, ...], bounds_mm: np.ndarray | None,
            faces: dict[str, np.ndarray] | None) -> tuple[bytes, ...]:
    """The pictures of ``steps`` drawn on one figure in turn (setting up a 3D axes costs
    more than drawing): the view is set once, only the two collections change."""
    import matplotlib

    matplotlib.use("Agg", force=False)
    from matplotlib.figure import Figure
    from mpl_toolkits.mplot3d.art3d import Poly3DCollection  # type: ignore[import-untyped]

    faces = kit_faces(kit) if faces is None else faces
    bounds_mm = kit_bounds_mm(kit) if bounds_mm is None else bounds_mm
    fig = Figure(figsize=SIZE_IN, dpi=DPI)
    ax: Any = fig.add_axes((0.0, 0.0, 1.0, 1.0), projection="3d", computed_zorder=False)  # new parts on top
    lo, hi = np.asarray(bounds_mm[0], dtype=float), np.asarray(bounds_mm[1], dtype=float)
    ax.set_xlim(lo[0], hi[0])
    ax.set_ylim(lo[1], hi[1])
    ax.set_zlim(lo[2], hi[2])
    ax.set_box_aspect(tuple(float(v) for v in np.maximum(hi - lo, 1.0)), zoom=1.25)  # true proportions
    ax.view_init(elev=VIEW_ELEV_DEG, azim=VIEW_AZIM_DEG)
    ax.set_axis_off()
    out = []
    for step in steps:
        for c in list(ax.collections):
            c.remove()
        new = set(step.new)
        old = [faces[n] for n in step.shown if n in faces and n not in new]
        fresh = [faces[n] for n in step.shown if n in faces and n in new]
        # the view is fixed above: the collections must not rescale it
        if old:
            ax.add_collection3d(Poly3DCollection(np.concatenate(old), facecolors=OLD_COLOUR, edgecolors=OLD_COLOUR,
                                                 linewidths=0.2, alpha=0.5), autolim=False)
        if fresh:
            ax.add_collection3d(Poly3DCollection(np.concatenate(fresh), facecolors=NEW_COLOUR,
                                                 edgecolors=EDGE_COLOUR, linewidths=0.15, alpha=1.0), autolim=False)
        buf = io.BytesIO()
        fig.savefig(buf, format="png", dpi=DPI, metadata={"Software": None})
        out.append(buf.getvalue())
    return tuple(out)


def kit_bounds_mm(kit: Kit) -> np.ndarray:
    """The box round every solid of the kit: min and max corner, kit frame."""
    pts = []
    for it in solid_items(kit):
        for p in it.pieces:
            xy = np.asarray(p.outline.exterior.coords, dtype=float)
            for z in (0.0, p.depth_mm):
                pts.append(p.placement.apply(np.column_stack([xy, np.full(len(xy), z)])))
    allp = np.vstack(pts)
    return np.vstack([allp.min(axis=0), allp.max(axis=0)])


def kit_faces(kit: Kit) -> dict[str, np.ndarray]:
    """The drawn faces of every item of the kit, by item name."""
    out = {}
    for it in solid_items(kit):
        pieces = [prism_faces(p) for p in it.pieces]
        out[it.name] = np.concatenate(pieces) if pieces else np.zeros((0, 4, 3))
    return out


def step_pictures(kit: Kit, steps: tuple[Step, ...]) -> tuple[bytes, ...]:
    """One PNG per step, all in the same frame."""
    return _render(kit, steps, kit_bounds_mm(kit), kit_faces(kit))


def describe_picture(step: Step) -> str:
    """What the picture shows, in words (the image's alt text)."""
    new = ", ".join(dict.fromkeys(n.split("#")[0] for n in step.new)) or "nothing new"
    old = len([n for n in step.shown if n not in set(step.new)])
    where = "on the bench" if step.bench else "in the kit"
    return (f"Step {step.number} {where}: the {new} in orange"
            + (f", the {old} item{'s' if old != 1 else ''} already in place in grey" if old else "")
            + "; seen from above, from the drive end (+x) and the -y side.")
