"""Turning a sequence of parts into a layout (first fit over sheets).

A *plan* is a sequence of genes ``(part, mode)``: ``part`` indexes the list of
part copies, ``mode`` is None (try every allowed angle and keep the best
position) or one shape id (that angle only). Each part goes onto the first
open sheet where it fits, at its best position there; when it fits on none, a
new sheet is opened (up to ``max_sheets``; past that it stays unplaced).

The decoder records its state after every gene, so a changed plan is decoded
again only from the first gene that changed.
"""

from __future__ import annotations

from dataclasses import dataclass

from sheetgen.production.nesting.place import RULES, Sheet, ShapeLibrary, Work, place_one


@dataclass(frozen=True)
class State:
    sheets: tuple[Sheet, ...]
    failed: tuple[frozenset, ...]          # per sheet: shape-set keys that no longer fit there
    placements: tuple[tuple[int, int, int, float, float], ...]  # (part, sheet, shape id, px, py)
    unplaced: tuple[int, ...]
    unplaced_area: float


EMPTY = State((), (), (), (), 0.0)


@dataclass(frozen=True)
class Decoded:
    plan: tuple[tuple[int, int | None], ...]
    rule: int                   # index into place.RULES
    states: tuple[State, ...]   # states[k] = after the first k genes; len = len(plan) + 1

    @property
    def final(self) -> State:
        return self.states[-1]


class Decoder:
    def __init__(self, lib: ShapeLibrary, part_items: list[int], usable: tuple[float, float, float, float],
                 max_sheets: int, work: Work):
        self.lib = lib
        self.part_items = part_items
        self.usable = usable
        self.max_sheets = max_sheets
        self.work = work
        self.shape_area = [min(lib.shapes[s].area for s in ids) for ids in lib.item_shapes]

    def shapes_for(self, item: int, mode: int | None) -> tuple[int, ...]:
        return self.lib.item_shapes[item] if mode is None else (mode,)

    def step(self, st: State, part: int, mode: int | None, rule_w: tuple[float, float]) -> State:
        item = self.part_items[part]
        sids = self.shapes_for(item, mode)
        key = tuple(sorted({self.lib.shapes[s].canon for s in sids}))
        sheets, failed = st.sheets, st.failed
        for si, sheet in enumerate(sheets):
            if key in failed[si]:
                continue
            hit = place_one(sheet, sids, self.work, rule_w)
            if hit is not None:
                _, sid, px, py = hit
                sheets = sheets[:si] + (sheet.with_part(sid, px, py),) + sheets[si + 1:]
                return State(sheets, failed, st.placements + ((part, si, sid, px, py),), st.unplaced, st.unplaced_area)
            failed = failed[:si] + (failed[si] | {key},) + failed[si + 1:]
        if len(sheets) < self.max_sheets:
            sheet = Sheet(self.lib, self.usable)
            hit = place_one(sheet, sids, self.work, rule_w)
            if hit is not None:
                _, sid, px, py = hit
                return State(sheets + (sheet.with_part(sid, px, py),), failed + (frozenset(),),
                             st.placements + ((part, len(sheets), sid, px, py),), st.unplaced, st.unplaced_area)
        return State(sheets, failed, st.placements, st.unplaced + (part,),
                     st.unplaced_area + self.lib.shapes[sids[0]].area)

    def decode(self, plan, rule: int = 0, base: Decoded | None = None, start: int = 0, progress=None) -> Decoded:
        """Decode ``plan`` with placement rule ``rule``, reusing ``base``'s states
        for the first ``start`` genes."""
        plan = tuple(plan)
        rule_w = RULES[rule]  # the (y weight, width weight) pair
        if base is None or base.rule != rule:
            start = 0
            states = [EMPTY]
        else:
            states = list(base.states[: start + 1])
        st = states[-1]
        n = len(plan)
        for k in range(start, n):
            part, mode = plan[k]
            st = self.step(st, part, mode, rule_w)
            states.append(st)
            if progress is not None and (k % 16 == 0 or k == n - 1):
                progress((k + 1) / n)
        return Decoded(plan, rule, tuple(states))
