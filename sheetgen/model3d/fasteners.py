"""Solids of the fasteners that matter for clearance: the bolts that clamp the frame layers
(and their nuts), and the screw that holds the counterweight bar; pure (no cadquery).

Each stack of holes through parts of the turning frame that sheetgen.design.hardware
classifies as a through bolt ("bolt") or as a screw into the counterweight bar's tapped end
("tapped") gets

* ``bolt#N``: a plain washer on the face at the stack's high end along its axis (the
  axis as hole_stacks gives it: first non-zero component positive, so a vertical stack's
  head is on top), the socket head on it as a cylinder, and the shank, a cylinder at the
  nominal diameter, from under the head through the stack: the bolt's series length for a
  through bolt; for the tapped screw only to the bar's end face (the bar is drawn without
  its tapped hole, so the thread inside it is left out of the drawing);
* ``nut#N`` (through bolts only): a washer ring on the face at the low end and the nut as a
  hexagonal ring on it, both round the shank.

They ride on the part they clamp: turning with it when it turns. Sizes: the hardware list's
(ISO 273 size from the hole, ISO 4762 length, ISO 7089 washer, ISO 4032 nut thickness, all
there); the head and the nut's width across flats below (from memory). The checks treat them
like the other solids (shared volume, the turning sweep, the all-pairs check), except that a
fastener may touch the plates of its own stack and its own nut (the faces it clamps).
"""

from __future__ import annotations

import math

import numpy as np
from shapely.geometry import Polygon

from sheetgen.design.hardware import (ISO_4032_NUT_MM, ISO_7089_WASHER_MM, HoleStack, bolt_length_mm, hole_stacks,
                                      metric_size)
from sheetgen.kitmodel.part import Kit
from sheetgen.geometry.placement import place
from sheetgen.geometry.prism import Prism
from sheetgen.geometry.shapes import GRID_MM, disc
from sheetgen.model3d.body import Body

# ISO 4762 socket head cap screw: head diameter dk and height k, mm (from memory)
ISO_4762_HEAD_MM = {1.6: (3.0, 1.6), 2.0: (3.8, 2.0), 2.5: (4.5, 2.5), 3.0: (5.5, 3.0), 4.0: (7.0, 4.0),
                    5.0: (8.5, 5.0), 6.0: (10.0, 6.0), 8.0: (13.0, 8.0), 10.0: (16.0, 10.0), 12.0: (18.0, 12.0)}
# ISO 4032 hexagon nut: width across flats s, mm (from memory)
ISO_4032_ACROSS_FLATS_MM = {1.6: 3.2, 2.0: 4.0, 2.5: 5.0, 3.0: 5.5, 4.0: 7.0, 5.0: 8.0, 6.0: 10.0, 8.0: 13.0,
                            10.0: 16.0, 12.0: 18.0}
FASTENER_KINDS = ("bolt", "tapped")


def _snap(poly: Polygon) -> Polygon:
    import shapely

    out = shapely.set_precision(poly, GRID_MM)
    assert isinstance(out, Polygon)
    return out


def _hexagon(across_flats_mm: float) -> Polygon:
    r = across_flats_mm / 2 / math.cos(math.pi / 6)
    return Polygon([(r * math.cos(math.pi / 3 * k), r * math.sin(math.pi / 3 * k)) for k in range(6)])


def _basis(a: np.ndarray) -> tuple[tuple[float, float, float], tuple[float, float, float]]:
    """(u, v): unit vectors across the axis ``a`` with u x v = a."""
    ref = np.array([0.0, 0.0, 1.0]) if abs(a[2]) < 0.9 else np.array([1.0, 0.0, 0.0])
    u = np.cross(ref, a)
    u /= np.linalg.norm(u)
    v = np.cross(a, u)
    return (float(u[0]), float(u[1]), float(u[2])), (float(v[0]), float(v[1]), float(v[2]))


def _prism(outline: Polygon, from_mm: np.ndarray, to_mm: np.ndarray, a: np.ndarray, rotating: bool):
    """A prism of ``outline`` (in the plane across ``a``) between two points on the axis."""
    lo, hi = (from_mm, to_mm) if float((to_mm - from_mm) @ a) >= 0 else (to_mm, from_mm)
    u, v = _basis(a)
    depth = float((hi - lo) @ a)
    return Prism(outline, depth, place(u, v, (float(lo[0]), float(lo[1]), float(lo[2])), rotating))


def _rides_turning(kit: Kit, stack: HoleStack) -> bool:
    part = kit.part(stack.parts[0])
    return any(pl.rotating for pl in part.placements)


def fastener_bodies(kit: Kit) -> tuple[Body, ...]:
    """The ``bolt#N`` and ``nut#N`` bodies of the kit (see the module notes)."""
    out = []
    # the ones that matter for clearance: those that turn with the frame (the frame bolts, the bar's
    # screw); bolts through fixed plates (a polar kit's base and ground plate) stay undrawn
    stacks = [s for s in hole_stacks(kit) if s.kind in FASTENER_KINDS and _rides_turning(kit, s)]
    bar = next((c for c in kit.components if c.name == "counterweight"), None)
    for n, s in enumerate(stacks, start=1):
        where = "holes in " + " + ".join(dict.fromkeys(s.parts))
        size = metric_size(s.diameter_mm, where)
        a = np.asarray(s.axis, dtype=float)
        a = a / np.linalg.norm(a)  # the stack's axis is rounded to 6 decimals (a tilted plate's)
        lo, hi = np.asarray(s.start_mm, dtype=float), np.asarray(s.end_mm, dtype=float)
        turning = _rides_turning(kit, s)
        h, d2 = ISO_7089_WASHER_MM[size]
        dk, k = ISO_4762_HEAD_MM[size]
        shank = _snap(disc(0.0, 0.0, size / 2))
        head_end, far_end, out_dir = hi, lo, a
        if s.kind == "tapped" and bar is not None:
            # the head on the end away from the bar
            bar_x = float(bar.centre_mm[0])
            if abs(float(hi[0]) - bar_x) < abs(float(lo[0]) - bar_x):
                head_end, far_end, out_dir = lo, hi, -a
        under_head = head_end + h * out_dir
        pieces = [_prism(_snap(disc(0.0, 0.0, d2 / 2)), head_end, under_head, a, turning),
                  _prism(_snap(disc(0.0, 0.0, dk / 2)), under_head, under_head + k * out_dir, a, turning)]
        if s.kind == "bolt":
            _, length = bolt_length_mm(s.length_mm, size)
            pieces.append(_prism(shank, under_head, under_head - length * out_dir, a, turning))
        else:
            pieces.append(_prism(shank, under_head, far_end, a, turning))
        clamps = tuple(dict.fromkeys(s.parts))
        out.append(Body(f"bolt#{n}", "bolt", "fastener", turning, tuple(pieces), clamps=clamps))
        if s.kind == "bolt":
            m = ISO_4032_NUT_MM[size]
            ring = _snap(Polygon(disc(0.0, 0.0, d2 / 2).exterior, [shank.exterior]))
            hexagon = _snap(Polygon(_hexagon(ISO_4032_ACROSS_FLATS_MM[size]).exterior, [shank.exterior]))
            w_end = far_end - h * out_dir
            nut = (_prism(ring, far_end, w_end, a, turning), _prism(hexagon, w_end, w_end - m * out_dir, a, turning))
            out.append(Body(f"nut#{n}", "nut", "fastener", turning, nut, clamps=clamps + (f"bolt#{n}",)))
    return tuple(out)


def may_touch(a, b) -> bool:
    """Whether two bodies are a fastener and a face it clamps (a plate of its stack, its own nut)."""
    return (a.kind == "fastener" and (b.source in a.clamps or b.name in a.clamps)) or \
        (b.kind == "fastener" and (a.source in b.clamps or a.name in b.clamps))
