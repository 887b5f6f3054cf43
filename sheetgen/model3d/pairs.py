"""The all-pairs check: every pair of solids, moving or not, against the gaps the
design promises (sheetgen.design.kit: MOTOR_HOLDERS, MOTOR_GAP_MM, JOINTS, MESHING).

* Two fixed parts may touch only where a joint joins them (a tab in its slot);
  any other contact between fixed solids is a fault (a shaft end flush against
  a support, a plate resting on a part it is not fixed to).
* The motor body keeps MOTOR_GAP_MM off every solid but its holders (the parts
  of MOTOR_HOLDERS may touch it); its spinning shaft keeps MOTOR_GAP_MM off every
  solid but the pinion it carries.
* The pinion spins: its tip circle swept through its thickness touches nothing
  but the wheel it meshes with (checked rolled, in the mesh check) and the shaft.
* Against the turning frame the subjects above are measured at every angle of
  the sweep (a lower bound first, the exact distance only where the bound falls
  short of the promised gap); turning parts against each other move together
  and are left to the interference check.

Pure of cadquery at import; OpenCascade is reached through the model's solids.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np
import shapely
from shapely import affinity

from sheetgen.kitmodel.contacts import MESHING, MOTOR_GAP_MM, MOTOR_HOLDERS
from sheetgen.kitmodel.part import Kit
from sheetgen.geometry.placement import place
from sheetgen.geometry.shapes import disc, rect
from sheetgen.model3d.fasteners import may_touch
from sheetgen.model3d.bodies import CONTACT_TOL_MM, MOTOR, Body, Prism, _aabb_gap, _x_gap, parallel_distance_mm
from sheetgen.model3d.solids import Model


@dataclass(frozen=True)
class PairGap:
    """The least distance of a subject to the solids it must clear, and whether it keeps the gap."""

    subject: str  # a body, or a piece of one ("motor shaft", "pinion (spinning)")
    other: str
    distance_mm: float
    required_mm: float  # the promised gap (CONTACT_TOL_MM: must not touch)
    angle_deg: float  # frame angle where it is least (0 for two fixed solids)
    rule: str

    @property
    def ok(self) -> bool:
        return self.distance_mm >= self.required_mm - 1e-9

    def to_json(self) -> dict:
        from sheetgen.numbers import sig

        return {"subject": self.subject, "other": self.other, "distance_mm": sig(self.distance_mm),
                "required_mm": sig(self.required_mm), "angle_deg": sig(self.angle_deg), "rule": self.rule,
                "ok": self.ok}


@dataclass(frozen=True)
class _Subject:
    name: str
    body: str  # the body it belongs to (never measured against itself)
    prism: Prism
    required_mm: float
    exempt: frozenset[str]  # sources it may touch
    rule: str


def _solid_of(prism: Prism) -> Any:
    from sheetgen.model3d.solids import prism_solid

    return prism_solid(prism)


class _Shells:
    def __init__(self, model: Model):
        self.model = model
        self.cache: dict[tuple[str, int, float], Any] = {}
        self.occ_calls = 0

    def piece(self, body: Body, k: int, angle: float):
        from sheetgen.model3d.solids import _shell, _turn_location

        key = (body.name, k, round(angle, 9) if body.rotating else 0.0)
        if key not in self.cache:
            s = self.model.piece_solids[(body.name, k)]
            if body.rotating and angle:
                s = s.moved(_turn_location(angle))
            self.cache[key] = _shell(s)
        return self.cache[key]


def _distance(sub: _Subject, sub_shell, body: Body, angle: float, shells: _Shells) -> float:
    from sheetgen.model3d.solids import _occ_distance

    best = math.inf
    for k, p in enumerate(body.pieces):
        q = p.turned(angle) if body.rotating and angle else p
        d = parallel_distance_mm(sub.prism, q)
        if d is None:
            shells.occ_calls += 1
            d = _occ_distance(sub_shell(), shells.piece(body, k, angle))
        best = min(best, d)
    return best


def _bounds(sub: _Subject, body: Body, angles: list[float], turned_sub: np.ndarray) -> np.ndarray:
    """hypot(x gap, y-z projection distance) at each frame angle: a lower bound of the
    3D distance (turning the body by a is turning the subject by -a, seen along x)."""
    r0 = sub.prism.x_range_mm()
    best = np.full(len(angles), np.inf)
    for p in body.pieces:
        q = p.yz_projection()
        gap = _x_gap(r0, p.x_range_mm())
        d = shapely.distance(turned_sub, q) if body.rotating else \
            np.full(len(angles), float(sub.prism.yz_projection().distance(q)))
        best = np.minimum(best, np.hypot(gap, d))
    return best


def _subjects(kit: Kit, model: Model) -> list[_Subject]:
    out = []
    names = {b.name for b in model.bodies}
    pinions = [p for _, p in MESHING if p in {pt.name for pt in kit.parts}]
    if MOTOR in names:
        motor = model.body(MOTOR)
        lo, hi = motor.pieces[0].corners().min(axis=0), motor.pieces[0].corners().max(axis=0)
        # the box as a prism along the axle, so that plates across the axle meet it on parallel axes (exact)
        box = Prism(rect(float(lo[1]), float(lo[2]), float(hi[1]), float(hi[2])), float(hi[0] - lo[0]),
                    place((0.0, 1.0, 0.0), (0.0, 0.0, 1.0), (float(lo[0]), 0.0, 0.0)))
        out.append(_Subject("motor", MOTOR, box, MOTOR_GAP_MM, MOTOR_HOLDERS,
                            f"the motor body clears all but its holders ({', '.join(sorted(MOTOR_HOLDERS))}) "
                            f"by {MOTOR_GAP_MM:g} mm"))
        if len(motor.pieces) > 1:
            out.append(_Subject("motor shaft", MOTOR, motor.pieces[1], MOTOR_GAP_MM, frozenset(pinions),
                                f"the spinning motor shaft clears all but the pinion by {MOTOR_GAP_MM:g} mm"))
    for name in pinions:
        for b in (b for b in model.bodies if b.source == name):
            p = b.pieces[0]
            xy = np.asarray(p.outline.exterior.coords, dtype=float)
            tip = float(np.hypot(xy[:, 0], xy[:, 1]).max())
            wheels = frozenset(w for w, pn in MESHING if pn == name)
            out.append(_Subject(f"{b.name} (spinning)", b.name, Prism(disc(0.0, 0.0, tip), p.depth_mm, p.placement),
                                CONTACT_TOL_MM, wheels | {MOTOR, name},  # its own glued layers too
                                "the spinning pinion's tip circle touches nothing but the wheel and its shaft"))
    return out


def all_pairs(kit: Kit, model: Model, angles: np.ndarray) -> tuple[list[PairGap], list[PairGap], int]:
    """(the nearest solid each subject must clear, every fault, OpenCascade calls).

    Subjects: the motor body, its shaft, the spinning pinion, and every fixed
    part against every other fixed part not joined to it."""
    shells = _Shells(model)
    bodies = model.bodies
    boxes = {b.name: b.aabb() for b in bodies}
    nearest: list[PairGap] = []
    faults: list[PairGap] = []
    turning_angles = [float(a) for a in angles] or [0.0]

    for sub in _subjects(kit, model):
        cache: list[Any] = []

        def sub_shell(sub=sub, cache=cache):
            from sheetgen.model3d.solids import _shell

            if not cache:
                cache.append(_shell(_solid_of(sub.prism)))
            return cache[0]

        entries = []  # (lower bound, body index, frame angle)
        proj = sub.prism.yz_projection()
        turned_sub = np.array([affinity.rotate(proj, -a, origin=(0.0, 0.0)) for a in turning_angles], dtype=object)
        for bi, b in enumerate(bodies):
            if b.name == sub.body or b.source in sub.exempt or b.name in sub.exempt:
                continue
            if b.rotating:
                lb = _bounds(sub, b, turning_angles, turned_sub)
                entries += [(float(v), bi, a) for v, a in zip(lb, turning_angles)]
            else:
                entries.append((float(_bounds(sub, b, [0.0], turned_sub[:1])[0]), bi, 0.0))
        entries.sort(key=lambda e: (round(e[0], 9), e[1], e[2]))
        best: PairGap | None = None
        faulted: set[int] = set()
        for bound, bi, a in entries:
            if bound >= max(best.distance_mm if best else math.inf, sub.required_mm) - 1e-12:
                break  # branch and bound: no later entry can be nearer, or fall short of the gap
            if bi in faulted:
                continue
            d = _distance(sub, sub_shell, bodies[bi], a, shells)
            g = PairGap(sub.name, bodies[bi].name, d, sub.required_mm, a, sub.rule)
            if best is None or d < best.distance_mm - 1e-12:
                best = g
            if not g.ok:
                faults.append(g)
                faulted.add(bi)
        if best is None and entries:  # everything clears by the gap: the nearest by its bound, measured
            _, bi, a = entries[0]
            best = PairGap(sub.name, bodies[bi].name, _distance(sub, sub_shell, bodies[bi], a, shells),
                           sub.required_mm, a, sub.rule)
        if best is not None:
            nearest.append(best)

    joined = {(j.tab_part, j.slot_part) for j in kit.joints} | {(j.slot_part, j.tab_part) for j in kit.joints}
    fixed = [b for b in bodies if not b.rotating and b.name != MOTOR and b.source not in {p for _, p in MESHING}]
    for i, fa in enumerate(fixed):
        for fb in fixed[i + 1:]:
            if (fa.source, fb.source) in joined or _aabb_gap(boxes[fa.name], boxes[fb.name]) > CONTACT_TOL_MM:
                continue
            if may_touch(fa, fb):
                continue  # a fastener on the faces it clamps (model3d/fasteners.py)
            d = math.inf
            for ka, pa in enumerate(fa.pieces):
                for kb, pb in enumerate(fb.pieces):
                    e = parallel_distance_mm(pa, pb)
                    if e is None:
                        from sheetgen.model3d.solids import _occ_distance

                        shells.occ_calls += 1
                        e = _occ_distance(shells.piece(fa, ka, 0.0), shells.piece(fb, kb, 0.0))
                    d = min(d, e)
            if d <= CONTACT_TOL_MM:
                faults.append(PairGap(fa.name, fb.name, d, CONTACT_TOL_MM, 0.0,
                                      "two fixed parts touch only where a joint joins them"))
    return nearest, faults, shells.occ_calls
