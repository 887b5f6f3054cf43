"""The fixed-point loop: the rules run in rounds until a round changes nothing.

Whole numbers must be equal and lengths within SETTLE_MM; at most MAX_ROUNDS rounds.
Pure: no printing, no files.
"""

from __future__ import annotations

import dataclasses

from sheetgen.design.schema import AUTO, SCHEMA, Derived, check_cross_rules
from sheetgen.design.solver.model import Solution, State, with_values
from sheetgen.design.solver.rules import (BORDER_MIN_MM, LOAD_KEYS, MIN_PINION_TEETH, RULES, load_torque_Nm,
                                          module_floor_mm)


SETTLE_MM = 0.5
MAX_ROUNDS = 8


# ---------------------------------------------------------------------------
# solving


def _values_equal(a, b) -> bool:
    if isinstance(a, str) or isinstance(b, str):
        return a == b
    if isinstance(a, float) or isinstance(b, float):
        return abs(float(a) - float(b)) <= SETTLE_MM
    return a == b


def solve_core(spec) -> Solution:
    auto = frozenset(k.path for k in SCHEMA if k.derived and spec.value(k.path) == AUTO)
    if not auto:
        return Solution(dataclasses.replace(spec, derived=()), 0, True)
    # a starting point for the keys the rules read before they set them
    t = spec.sheet.thickness_mm
    seed = {"frame.border": BORDER_MIN_MM, "drive.module": module_floor_mm(t), "drive.layers": 1,
            "drive.pinion_teeth": MIN_PINION_TEETH, "drive.pinion_shift": 0.0, "drive.wheel_teeth": 60,
            "drive.wheel_spacers": 1, "drive.mount_gap": 1.0, "axle.height": AUTO}
    st = State(with_values(spec, {p: seed[p] for p in auto}), auto)
    last = None
    settled = False
    rounds = 0
    for rounds in range(1, MAX_ROUNDS + 1):
        if rounds > 1:
            check_cross_rules(st.spec)  # pinned values against the derived ones, before weighing the kit
            st.load_Nm = load_torque_Nm(st)
        for rule in RULES:
            if not any(st.is_auto(p) for p in rule.sets):
                continue
            if rule.name == "axle_clears_travel" and st.load_Nm is None and auto & LOAD_KEYS:
                continue  # the gears are still seeds: sweep once they follow the load
            out = rule.fn(st)
            st.spec = with_values(st.spec, {p: v for p, v in out.items() if st.is_auto(p)})
        now = {p: st.v(p) for p in sorted(auto)}
        if last is not None and all(_values_equal(now[p], last[p]) for p in now):
            settled = True
            break
        last = now
    derived = tuple(Derived(k.path, st.v(k.path), k.rule) for k in SCHEMA if k.path in auto)
    return Solution(dataclasses.replace(st.spec, derived=derived), rounds, settled)
