"""One solid of the 3D model (:class:`Body`): the type that the model's
builders (:mod:`.bodies`, :mod:`.fasteners`) make and the checks read."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from sheetgen.geometry.prism import Prism


@dataclass(frozen=True)
class Body:
    """One solid of the model: a part instance (``rib#1``) or a component."""

    name: str
    source: str  # part name or component name
    kind: str  # "part" or "component"
    rotating: bool
    pieces: tuple[Prism, ...]
    material: str = ""  # sheet material key (parts)
    mass_kg: float | None = None  # components: as given in the kit
    clamps: tuple[str, ...] = ()  # fasteners (kind "fastener"): the parts (and nut) whose faces they may touch

    def aabb(self) -> tuple[np.ndarray, np.ndarray]:
        pts = np.vstack([p.corners() for p in self.pieces])
        return pts.min(axis=0), pts.max(axis=0)

    def x_range_mm(self) -> tuple[float, float]:
        lo, hi = self.aabb()
        return float(lo[0]), float(hi[0])
