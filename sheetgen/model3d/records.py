"""What the assembly checks found: frozen records and the report."""

from __future__ import annotations
from __future__ import annotations

import math
from dataclasses import dataclass, field


from sheetgen.numbers import sig
from sheetgen.model3d.bodies import SHARED_VOLUME_TOL_MM3
from sheetgen.model3d.pairs import PairGap



# ---------------------------------------------------------------------------
# report records


@dataclass(frozen=True)
class Interference:
    a: str
    b: str
    volume_mm3: float


@dataclass(frozen=True)
class TabCheck:
    tab_part: str
    slot_part: str
    tab_count: int
    expected_mm3: float  # tabs x tab width x tab thickness x slot part thickness
    found_mm3: float  # tab material inside the slot part's plate
    missing: tuple[str, ...]  # tab part instances that reach no slot part
    ok: bool


@dataclass(frozen=True)
class Clearance:
    turning: str
    fixed: str
    distance_mm: float
    angle_deg: float
    x_gap_mm: float  # gap between their x ranges (the distance itself when the gap is along the axle)
    steady: bool = False  # the same at every angle of the sweep (exactly known: plates across the axle)


@dataclass(frozen=True)
class Collision:
    turning: str
    fixed: str
    first_deg: float  # range of sampled angles where they share volume
    last_deg: float
    samples: int
    nearest_rest_deg: float  # the colliding angle nearest to rotation 0
    worst_deg: float
    worst_volume_mm3: float


@dataclass(frozen=True)
class Touch:
    turning: str
    fixed: str
    first_deg: float
    last_deg: float
    samples: int


@dataclass(frozen=True)
class MeshCheck:
    wheel: str
    pinion: str
    pinion_turn_deg: float
    min_gap_mm: float
    min_gap_deg: float
    max_overlap_mm3: float


@dataclass(frozen=True)
class MassCheck:
    mass_kg: float  # rotating assembly, from the solids
    cg_mm: tuple[float, float, float]
    ref_mass_kg: float  # the balance check's figures (sheetgen.mechanics.massprops)
    ref_cg_mm: tuple[float, float, float]
    mass_deviation: float  # relative
    cg_deviation_mm: float
    cg_tolerance_mm: float
    kit_mass_kg: float
    kit_cg_mm: tuple[float, float, float]
    ok: bool


@dataclass(frozen=True)
class SolidInfo:
    name: str
    source: str
    group: str  # "rotating" or "fixed"
    volume_mm3: float
    mass_kg: float


@dataclass(frozen=True)
class StopCheck:
    """A turning stop against its fixed stop (sheetgen.kitmodel.contacts.STOPS), measured on the solids."""

    turning: str
    fixed: str
    limit_deg: float  # site.travel_limit: where they must meet
    meet_plus_deg: float  # the first angle, turning +, where they touch (bisection on the solids)
    meet_minus_deg: float  # ... turning -
    inside_min_mm: float  # least gap at the sampled angles inside the travel (|angle| <= limit - inside_deg)
    inside_deg: float
    past_deg: float  # turned this far past the limit ...
    past_plus_mm3: float  # ... the stops share this volume (turning +)
    past_minus_mm3: float
    ok: bool


@dataclass(frozen=True)
class AssemblyReport:
    solids: tuple[SolidInfo, ...]
    interference: tuple[Interference, ...]
    floating_parts: tuple[str, ...]
    detached_parts: tuple[str, ...]  # not connected, through contacts, to the largest group
    tabs: tuple[TabCheck, ...]
    tracking_range_deg: tuple[float, float]
    step_deg: float
    angles: int
    running: tuple[Clearance, ...]  # parts round about the axle (they turn in place): gap to the nearest fixed part
    closest: tuple[Clearance, ...]  # least clearance first
    frame_clearance: Clearance | None  # part over part where their x ranges overlap (what frame.clearance means)
    frame_clearance_required_mm: float
    collisions: tuple[Collision, ...]  # the worst first
    touching: tuple[Touch, ...]
    mesh: tuple[MeshCheck, ...]
    mass: MassCheck
    timing_s: tuple[tuple[str, float], ...] = field(default=())
    occ_calls: int = 0  # OpenCascade booleans and distances the checks needed
    stops: tuple[StopCheck, ...] = ()  # the end stops meet at the travel limit (sheetgen.model3d.stops)
    pair_gaps: tuple[PairGap, ...] = ()  # all-pairs check: each subject's nearest solid it must clear
    pair_faults: tuple[PairGap, ...] = ()  # ... and every promised gap not kept (sheetgen.model3d.pairs)

    @property
    def running_parts(self) -> tuple[str, ...]:
        return tuple(r.turning for r in self.running)

    @property
    def max_interference_mm3(self) -> float:
        return max((i.volume_mm3 for i in self.interference), default=0.0)

    @property
    def min_clearance_mm(self) -> float:
        if self.collisions:
            return 0.0
        return self.closest[0].distance_mm if self.closest else math.inf

    @property
    def min_clearance_angle_deg(self) -> float | None:
        if self.collisions:
            return self.collisions[0].worst_deg
        return self.closest[0].angle_deg if self.closest else None

    @property
    def tabs_ok(self) -> bool:
        return all(t.ok for t in self.tabs)

    @property
    def frame_clearance_ok(self) -> bool:
        fc = self.frame_clearance
        return fc is None or fc.distance_mm >= self.frame_clearance_required_mm - 1e-6

    @property
    def mesh_ok(self) -> bool:
        return all(m.max_overlap_mm3 <= SHARED_VOLUME_TOL_MM3 for m in self.mesh)

    @property
    def ok(self) -> bool:
        return (not self.interference and not self.floating_parts and not self.detached_parts and self.tabs_ok
                and not self.collisions and not self.touching and self.min_clearance_mm > 0
                and self.frame_clearance_ok and self.mesh_ok and self.mass.ok and self.stops_ok
                and not self.pair_faults)

    @property
    def stops_ok(self) -> bool:
        return all(s.ok for s in self.stops)

    def to_json(self) -> dict:
        m = self.mass
        cl = [_clearance_json(c) for c in self.closest]
        worst = self.collisions[0] if self.collisions else None
        return {
            "ok": self.ok,
            "solid_count": len(self.solids),
            "solids": [{"name": s.name, "source": s.source, "group": s.group, "volume_mm3": sig(s.volume_mm3),
                        "mass_kg": sig(s.mass_kg)} for s in self.solids],
            "interference": [{"a": i.a, "b": i.b, "volume_mm3": sig(i.volume_mm3)} for i in self.interference],
            "max_interference_mm3": sig(self.max_interference_mm3),
            "floating_parts": list(self.floating_parts),
            "detached_parts": list(self.detached_parts),
            "tabs_ok": self.tabs_ok,
            "tabs": [{"tab_part": t.tab_part, "slot_part": t.slot_part, "tabs": t.tab_count,
                      "expected_mm3": sig(t.expected_mm3), "found_mm3": sig(t.found_mm3),
                      "missing": list(t.missing), "ok": t.ok} for t in self.tabs],
            "tracking_range_deg": [sig(self.tracking_range_deg[0]), sig(self.tracking_range_deg[1])],
            "sweep_step_deg": sig(self.step_deg),
            "sweep_angles": self.angles,
            "min_clearance_mm": sig(self.min_clearance_mm),
            "min_clearance_angle_deg": sig(self.min_clearance_angle_deg),
            "min_clearance_pair": ([worst.turning, worst.fixed] if worst else
                                   [self.closest[0].turning, self.closest[0].fixed] if self.closest else None),
            "closest": cl,
            "frame_clearance": None if self.frame_clearance is None else _clearance_json(self.frame_clearance),
            "frame_clearance_required_mm": sig(self.frame_clearance_required_mm),
            "frame_clearance_ok": self.frame_clearance_ok,
            "collisions": [{"turning": c.turning, "fixed": c.fixed, "first_deg": sig(c.first_deg),
                            "last_deg": sig(c.last_deg), "samples": c.samples,
                            "nearest_rest_deg": sig(c.nearest_rest_deg), "worst_deg": sig(c.worst_deg),
                            "worst_volume_mm3": sig(c.worst_volume_mm3)} for c in self.collisions],
            "touching": [{"turning": t.turning, "fixed": t.fixed, "first_deg": sig(t.first_deg),
                          "last_deg": sig(t.last_deg), "samples": t.samples} for t in self.touching],
            "running_parts": [{"name": r.turning, "nearest_fixed": r.fixed, "gap_mm": sig(r.distance_mm)}
                              for r in self.running],
            "mesh": [{"wheel": g.wheel, "pinion": g.pinion, "pinion_turn_deg": sig(g.pinion_turn_deg),
                      "min_gap_mm": sig(g.min_gap_mm), "min_gap_deg": sig(g.min_gap_deg),
                      "max_overlap_mm3": sig(g.max_overlap_mm3)} for g in self.mesh],
            "mass_kg": sig(m.mass_kg),
            "cg_mm": [sig(v) for v in m.cg_mm],
            "mass_check": {"balance_mass_kg": sig(m.ref_mass_kg), "balance_cg_mm": [sig(v) for v in m.ref_cg_mm],
                           "mass_deviation": sig(m.mass_deviation), "cg_deviation_mm": sig(m.cg_deviation_mm),
                           "cg_tolerance_mm": sig(m.cg_tolerance_mm), "ok": m.ok},
            "kit_mass_kg": sig(m.kit_mass_kg),
            "kit_cg_mm": [sig(v) for v in m.kit_cg_mm],
            "timing_s": {k: round(v, 3) for k, v in self.timing_s},
            "occ_calls": self.occ_calls,
            "stops_ok": self.stops_ok,
            "stops": [{"turning": c.turning, "fixed": c.fixed, "limit_deg": sig(c.limit_deg),
                       "meet_plus_deg": sig(c.meet_plus_deg), "meet_minus_deg": sig(c.meet_minus_deg),
                       "inside_min_mm": sig(c.inside_min_mm), "inside_deg": sig(c.inside_deg),
                       "past_deg": sig(c.past_deg), "past_plus_mm3": sig(c.past_plus_mm3),
                       "past_minus_mm3": sig(c.past_minus_mm3), "ok": c.ok} for c in self.stops],
            "all_pairs": {"ok": not self.pair_faults, "nearest": [g.to_json() for g in self.pair_gaps],
                          "faults": [g.to_json() for g in self.pair_faults]},
        }


def _clearance_json(c: Clearance) -> dict:
    return {"turning": c.turning, "fixed": c.fixed, "distance_mm": sig(c.distance_mm), "angle_deg": sig(c.angle_deg),
            "x_gap_mm": sig(c.x_gap_mm), "along_axle": abs(c.distance_mm - c.x_gap_mm) < 1e-6 and c.x_gap_mm > 0,
            "steady": c.steady}



