"""The solid items of a kit for the assembly order (every part instance and solid
component as prisms at rotation 0), the sides they may come from, and the moves that put
them in place. Pure: a Kit in."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from sheetgen.kitmodel.part import Kit
from sheetgen.design.prisms import component_prisms
from sheetgen.geometry.prism import Prism

NO_STRAIGHT_PATH = "?"  # a Move's approach when no straight line brings the item past what is there

# the six directions an item may come from, named for the reader (kit frame: x along the axle, z up)
AXES: tuple[tuple[str, tuple[float, float, float]], ...] = (
    ("+z", (0.0, 0.0, 1.0)), ("-z", (0.0, 0.0, -1.0)),
    ("+x", (1.0, 0.0, 0.0)), ("-x", (-1.0, 0.0, 0.0)),
    ("+y", (0.0, 1.0, 0.0)), ("-y", (0.0, -1.0, 0.0)),
)


@dataclass(frozen=True)
class Item:
    """One thing put in place: a part instance (``rib#2``) or a solid component (``axle``)."""

    name: str
    part: str  # the part or component it is an instance of
    kind: str  # "part" or "component"
    rotating: bool
    pieces: tuple[Prism, ...]


@dataclass(frozen=True)
class Move:
    """Items put in place together, coming from ``approach`` (the name of a side, one of
    :func:`kit_directions`); ``bench`` names the group being built apart from the kit ('' for
    the kit); ``direction``: the side as a unit vector (the items are slid in against it)."""

    items: tuple[str, ...]
    approach: str
    bench: str = ""
    direction: tuple[float, float, float] = (0.0, 0.0, 0.0)  # the side as a unit vector, kit frame


def solid_items(kit: Kit) -> tuple[Item, ...]:
    """Every part instance and solid component of the kit as prisms at rotation 0."""
    out = []
    for part in kit.parts:
        for i, pl in enumerate(part.placements):
            out.append(Item(f"{part.name}#{i + 1}", part.name, "part", pl.rotating,
                            (Prism(part.outline, part.thickness_mm, pl),)))
    for comp in kit.components:
        pieces = component_prisms(comp, kit)  # the shaft as far as the kit shows it (no spec here)
        if pieces:
            out.append(Item(comp.name, comp.name, "component", comp.rotating, pieces))
    return tuple(out)


# ---------------------------------------------------------------------------
# directions: the kit's axes, then each plate's own normal and in-plane directions


def kit_directions(items: tuple[Item, ...]) -> tuple[tuple[str, tuple[float, float, float]], ...]:
    """The sides an item may come from: the kit's six axes, then, for every part plate that
    lies askew to them (a wedge's tilted ground plate), its normal and the two directions
    in its plane, each both ways. Opposite sides sit side by side (index k ^ 1)."""
    out = list(AXES)
    for it in items:
        if it.kind != "part":
            continue
        m = it.pieces[0].placement.matrix
        for col, tag in ((2, "n"), (0, "u"), (1, "v")):
            v = np.where(np.abs(m[:, col]) < 1e-12, 0.0, m[:, col])
            if any(np.allclose(v, d, atol=1e-9) or np.allclose(-v, d, atol=1e-9) for _, d in out):
                continue
            out.append((f"{it.part} +{tag}", (float(v[0]), float(v[1]), float(v[2]))))
            out.append((f"{it.part} -{tag}", (float(-v[0]) + 0.0, float(-v[1]) + 0.0, float(-v[2]) + 0.0)))
    return tuple(out)
