"""The order: every solid item of a kit, in an order that lets each reach its place along a
free straight path (see the package's notes). Pure."""

from __future__ import annotations

import numpy as np

from sheetgen.design.assembly_order.blocking import Blocking
from sheetgen.design.assembly_order.items import NO_STRAIGHT_PATH, Item, Move, kit_directions, solid_items
from sheetgen.kitmodel.part import Component, Kit


def _natural_key(it: Item, box: np.ndarray) -> tuple:
    """The order a builder would try first: the fixed stand and what it carries, bottom up;
    the parts on the axle (the axle itself first); the turning frame bottom up; ties by name."""
    axial = all(abs(abs(p.placement.matrix[0, 2]) - 1.0) < 1e-9 for p in it.pieces)
    cat = 0 if not it.rotating else (1 if axial else 2)
    along_axle = 0 if (it.kind == "component" and cat == 1) else 1
    return (cat, along_axle, round(float(box[0, 2]), 3), round(float(box[0, 0]), 3), it.part, it.name)


class Planner:
    def __init__(self, kit: Kit):
        self.items = solid_items(kit)
        self.directions = kit_directions(self.items)
        self.blk = Blocking(self.items, self.directions)
        self.keys = [_natural_key(it, self.blk.boxes[i]) for i, it in enumerate(self.items)]
        from sheetgen.kitmodel.contacts import MESHING

        self.hits = self.blk.masks(MESHING)
        self.joints = kit.joints
        self.components = kit.components
        self._completes: dict[tuple[frozenset[int], frozenset[int]], bool] = {}
        parts_joined = {frozenset((j.tab_part, j.slot_part)) for j in kit.joints}
        n = len(self.items)
        self.adjacent: dict[int, set[int]] = {i: set() for i in range(n)}
        for i in range(n):
            for j in range(i + 1, n):
                if frozenset((self.items[i].part, self.items[j].part)) in parts_joined and self.touch(i, j):
                    self.adjacent[i].add(j)
                    self.adjacent[j].add(i)

    def component(self, name: str) -> Component:
        return next(c for c in self.components if c.name == name)

    def touch(self, i: int, j: int) -> bool:
        a, b = self.blk.boxes[i], self.blk.boxes[j]
        return bool(np.all(a[0] <= b[1] + 1e-6) and np.all(b[0] <= a[1] + 1e-6))

    def _components(self, rest: frozenset[int]) -> list[frozenset[int]]:
        seen: set[int] = set()
        out = []
        for i in sorted(rest, key=lambda x: self.keys[x]):
            if i in seen:
                continue
            comp, todo = {i}, [i]
            while todo:
                for j in self.adjacent[todo.pop()]:
                    if j in rest and j not in comp:
                        comp.add(j)
                        todo.append(j)
            seen |= comp
            if len(comp) > 1:
                out.append(frozenset(comp))
        return out

    def _way_out(self, group: frozenset[int], among: frozenset[int]) -> int | None:
        """The first side (index into the directions) the group can leave ``among`` by, or None."""
        others = sum(1 << i for i in among - group)
        for k in range(len(self.directions)):
            if not any(self.hits[k][a] & others for a in group):
                return k
        return None

    def completes(self, placed: frozenset[int], whole: frozenset[int]) -> bool:
        """The whole can be taken apart down to ``placed`` (so the rest can still go in)."""
        key = (placed, whole)
        if key not in self._completes:
            self._completes[key] = self._take_apart(placed, whole)
        return self._completes[key]

    def _take_apart(self, placed: frozenset[int], whole: frozenset[int]) -> bool:
        current = whole
        while current != placed:
            loose = current - placed
            step = next((frozenset((i,)) for i in sorted(loose, key=lambda x: self.keys[x])
                         if self._way_out(frozenset((i,)), current) is not None), None)
            if step is None:
                step = next((g for g in self._components(loose) if self._way_out(g, current) is not None), None)
            if step is None:
                return False
            current = current - step
        return True

    def _touches(self, i: int, placed: frozenset[int]) -> bool:
        """Item i rests against something placed (boxes touch and one stops the other)."""
        return any(self.touch(i, j) and any(self.hits[k][i] >> j & 1 for k in range(len(self.directions)))
                   for j in sorted(placed))

    def _pick(self, rest: frozenset[int], placed: frozenset[int], whole: frozenset[int]):
        """The next single item or bench group to put in, and the side it comes from.

        Candidates in natural order, those resting on something placed first within a
        category. When the first that fits would leave the rest unassemblable, the items
        it would shut out go first (the parts threaded on before the axle)."""
        cands = [frozenset((i,)) for i in rest] + self._components(rest)

        def key(g: frozenset[int]):
            k = min(self.keys[i] for i in g)
            return (k[0], not any(self._touches(i, placed) for i in g), len(g) > 1, k)

        cands.sort(key=key)
        ways = {g: self._way_out(g, placed | g) for g in cands}
        fits = [g for g in cands if ways[g] is not None]
        shut: frozenset[int] | None = None
        for g in fits:
            if self.completes(placed | g, whole):
                if shut is None:
                    return g, ways[g]
                break
            if shut is None and len(g) == 1:
                shut = g
        if shut is not None:
            for g in fits:
                if (len(g) == 1 and g != shut and self.completes(placed | g, whole)
                        and self._way_out(g, placed | g | shut) is None):
                    return g, ways[g]
        for g in fits:
            if self.completes(placed | g, whole):
                return g, ways[g]
        # no choice keeps every later item reachable: the first that fits now, then, where
        # nothing fits, the next single item with no straight path (the guide says so)
        singles = [g for g in fits if len(g) == 1]
        if singles:
            return singles[0], ways[singles[0]]
        return next(g for g in cands if len(g) == 1), None

    def order(self, whole: frozenset[int], bench: str = "") -> list[Move]:
        slots = {j.slot_part for j in self.joints}

        def root_key(i: int):
            # the part the others stand in (most joints' slot part), then the lowest
            it = self.items[i]
            others = {self.items[j].part for j in whole} - {it.part}
            held = sum(1 for j in self.joints if j.slot_part == it.part and j.tab_part in others)
            return (it.rotating, -held if it.part in slots else 0, self.keys[i])

        first = min(whole, key=root_key)
        placed = frozenset((first,))
        moves = [Move((self.items[first].name,), "", bench)]
        while placed != whole:
            rest = whole - placed
            g, k = self._pick(rest, placed, whole)
            names = tuple(self.items[i].name for i in sorted(g, key=lambda x: self.keys[x]))
            if len(g) > 1:
                moves += self.order(g, bench="+".join(sorted({self.items[i].part for i in g})))
            if k is None:
                moves.append(Move(names, NO_STRAIGHT_PATH, bench))
            else:
                moves.append(Move(names, self.directions[k][0], bench, self.directions[k][1]))
            placed = placed | g
        return moves


def part_steps(kit: Kit, moves: tuple[Move, ...] | None = None) -> dict[str, tuple[int, ...]]:
    """The step numbers each cut part is put in at (the numbering of :func:`assembly_steps`)."""
    moves = assembly_moves(kit) if moves is None else moves
    names = {p.name for p in kit.parts}
    out: dict[str, list[int]] = {}
    for number, (tag, mvs) in enumerate(group_moves(moves), start=1):
        if tag == "group":
            continue
        for mv in mvs:
            for n in mv.items:
                part = n.split("#")[0]
                if part in names and number not in out.setdefault(part, []):
                    out[part].append(number)
    return {k: tuple(v) for k, v in out.items()}


def assembly_moves(kit: Kit) -> tuple[Move, ...]:
    """Every solid item of the kit, in an order that lets each reach its place."""
    planner = Planner(kit)
    return tuple(planner.order(frozenset(range(len(planner.items)))))


def group_moves(moves: tuple[Move, ...]) -> list[tuple[str, list[Move]]]:
    """Runs of moves that make one step: a bench group is one step (then the step that
    sets it in); consecutive moves of instances of one part from one side are one step."""
    out: list[tuple[str, list[Move]]] = []
    for mv in moves:
        part = mv.items[0].split("#")[0] if len(mv.items) == 1 else ""
        if mv.bench:
            if out and out[-1][0] == "bench:" + mv.bench:
                out[-1][1].append(mv)
            else:
                out.append(("bench:" + mv.bench, [mv]))
            continue
        tag = f"{part}|{mv.approach}" if part else "group"
        if part and out and out[-1][0] == tag:
            out[-1][1].append(mv)
        else:
            out.append((tag, [mv]))
    return out
