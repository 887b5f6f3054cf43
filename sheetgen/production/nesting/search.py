"""Improvement search over the order of the parts and their angles.

A plan (see :mod:`sheetgen.production.nesting.decode`) is changed by one of three moves:
swap two genes, move one gene earlier (half the time the two genes are close
together), or change one gene's angle mode (one fixed angle, or "best of
all"). When some parts are left over, one move in three puts one of them
earlier. Now and then the angle mode of every copy of an item changes at
once, or the placement rule does. A changed plan is decoded again from its
first changed gene. Moves are accepted when they are no worse than the cost the
search had ``history`` steps ago (late acceptance), which lets it wander across
the wide plateaus that sheet counts and unplaced areas have.

The search stops when the work budget (see :class:`~sheetgen.production.nesting.place.Work`)
is spent, when ``stop()`` says so, or when the cost reaches ``target``.
Everything random comes from the ``random.Random`` passed in, so a run is
repeatable for a given seed and budget.
"""

from __future__ import annotations

import random
from collections.abc import Callable

from sheetgen.production.nesting.decode import Decoded, Decoder
from sheetgen.production.nesting.place import RULES

UNPLACED_MOVE = 0.33
ITEM_MODE_MOVE = 0.05
HISTORY = 30
NEAR_MOVE = 0.5
RULE_MOVE = 0.01


def _pair(rng: random.Random, n: int) -> tuple[int, int]:
    """Two positions i < j: anywhere, or (half the time) close together."""
    if rng.random() < NEAR_MOVE:
        i = rng.randrange(n - 1)
        j = min(n - 1, i + 1 + int(rng.expovariate(0.25)))
        return i, j
    i, j = sorted(rng.sample(range(n), 2))
    return i, j


def neighbour(plan: tuple, rng: random.Random, decoder: Decoder, unplaced: tuple[int, ...] = ()
              ) -> tuple[tuple, int] | None:
    """A changed copy of ``plan`` and the index of its first changed gene.

    When some parts are unplaced, one move in three takes one of them and
    puts it earlier in the plan."""
    n = len(plan)
    items = decoder.part_items
    lib = decoder.lib
    if unplaced and n >= 2 and rng.random() < UNPLACED_MOVE:
        part = rng.choice(unplaced)
        j = next(k for k, g in enumerate(plan) if g[0] == part)
        if j > 0:
            i = rng.randrange(j)
            new = list(plan)
            g = new.pop(j)
            new.insert(i, g)
            return tuple(new), i
    if rng.random() < ITEM_MODE_MOVE:  # one angle mode for every copy of an item
        part, mode = plan[rng.randrange(n)]
        item = items[part]
        options = [None, *lib.item_shapes[item]]
        if len(options) > 2:
            options.remove(mode)
            new_mode = rng.choice(options)
            new = [(p, new_mode) if items[p] == item else (p, m) for p, m in plan]
            first = next(k for k, g in enumerate(plan) if items[g[0]] == item and g[1] != new_mode)
            return tuple(new), first
    for _ in range(8):
        r = rng.random()
        if r < 0.4 and n >= 2:  # swap two genes of different items or modes
            i, j = _pair(rng, n)
            if items[plan[i][0]] == items[plan[j][0]] and plan[i][1] == plan[j][1]:
                continue
            new = list(plan)
            new[i], new[j] = new[j], new[i]
            return tuple(new), i
        if r < 0.7 and n >= 2:  # move a gene earlier
            i, j = _pair(rng, n)
            if all(items[plan[k][0]] == items[plan[j][0]] and plan[k][1] == plan[j][1] for k in range(i, j)):
                continue
            new = list(plan)
            g = new.pop(j)
            new.insert(i, g)
            return tuple(new), i
        # change the angle mode of one gene
        i = rng.randrange(n)
        part, mode = plan[i]
        options = [None, *lib.item_shapes[items[part]]]
        if len(options) <= 2:  # a single shape: "best of all" is the same
            continue
        options.remove(mode)
        new = list(plan)
        new[i] = (part, rng.choice(options))
        return tuple(new), i
    return None


def late_acceptance(decoder: Decoder, start: Decoded, cost: Callable[[Decoded], float], *,
                    rng: random.Random, budget_units: int, stop: Callable[[], bool],
                    target: float = -float("inf"), history: int = HISTORY, stall_limit: int | None = None,
                    on_step: Callable[[], None] | None = None,
                    stall_cost: Callable[[Decoded], float] | None = None) -> tuple[Decoded, float]:
    """Best decoded plan found from ``start`` and its cost.

    The search stops after ``stall_limit`` steps in a row that found nothing
    better; with ``stall_cost``, only a lower ``stall_cost`` counts as better
    there (a cost with a tie-break keeps improving in small steps, which
    should not keep a hopeless attempt alive)."""
    work = decoder.work
    current, cur_cost = start, cost(start)
    best, best_cost = current, cur_cost
    past = [cur_cost] * history
    step = 0
    stall = 0
    while best_cost > target and work.units < budget_units and not stop():
        rule = current.rule
        if len(RULES) > 1 and rng.random() < RULE_MOVE:
            rule = rng.choice([r for r in range(len(RULES)) if r != rule])
            plan, first = current.plan, 0
        else:
            move = neighbour(current.plan, rng, decoder, current.final.unplaced)
            if move is None:
                break
            plan, first = move
        cand = decoder.decode(plan, rule, base=current, start=first)
        c = cost(cand)
        slot = step % history
        if c <= cur_cost or c <= past[slot]:
            current, cur_cost = cand, c
        past[slot] = cur_cost
        step += 1
        if c < best_cost:
            gained = stall_cost is None or stall_cost(cand) < stall_cost(best)
            best, best_cost = cand, c
            stall = 0 if gained else stall + 1
        else:
            stall += 1
            if stall_limit is not None and stall >= stall_limit:
                break
        if on_step is not None:
            on_step()
    return best, best_cost
