"""Refusing: when no layout exists, the binding input and the nearest value of it that builds.

The nearest value is found by trying values with the solver itself.
Pure: no printing, no files.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

from sheetgen.errors import ParameterError, SheetTooSmall
from sheetgen.design.schema import SCHEMA_BY_PATH
from sheetgen.design.solver.fixed_point import solve_core
from sheetgen.design.solver.model import NoLayout, key_hi, key_lo, with_values


# ---------------------------------------------------------------------------
# refusing: the binding input and the nearest value that builds


def builds(spec) -> bool:
    """Whether the solver finds a layout and the kit builds and clears its travel."""
    from sheetgen.design.kit import build_kit

    try:
        build_kit(solve_core(spec).spec, step_labels=False)  # a probe: no assembly order needed
    except ParameterError:
        return False
    return True


def _try(spec, path: str, value) -> bool:
    k = SCHEMA_BY_PATH[path]
    return builds(with_values(spec, {path: k.kind(value)}))


def _bisect(spec, path: str, bad: float, good: float, step: float) -> float | None:
    """Nearest value to ``bad`` (on a grid of ``step`` from ``good``) that builds,
    or None when even ``good`` does not."""
    if not _try(spec, path, good):
        return None
    n = 0
    while abs(good - bad) > step + 1e-9 and n < 40:
        mid = good + round((bad - good) / 2 / step) * step
        if mid in (good, bad):
            break
        if _try(spec, path, mid):
            good = mid
        else:
            bad = mid
        n += 1
    return good


# inputs a designer may change, per kind of failure, in the order they are tried;
# "up" or "down" is the direction that helps
CANDIDATES = {
    "motor": (("motor.stall_torque", "up"), ("site.wind_speed", "down"), ("panel.mass", "down"),
              ("panel.width", "down"), ("panel.height", "down")),
    "shaft": (("motor.shaft_length", "up"), ("sheet.thickness", "down")),
    "module": (("sheet.thickness", "down"), ("sheet.height", "up"), ("sheet.width", "up")),
    "sheet": (("panel.width", "down"), ("panel.height", "down"), ("sheet.height", "up"), ("sheet.width", "up")),
}
STEP = {"panel.width": 1.0, "panel.height": 1.0, "sheet.width": 5.0, "sheet.height": 5.0,
        "site.wind_speed": 0.5, "sheet.thickness": 0.5, "panel.mass": 0.005}


def refusal(spec, exc, depth: int = 0) -> str:
    """One line: what fails, the binding input, and the nearest value of it that builds."""
    why = str(exc)
    kind = exc.kind if isinstance(exc, NoLayout) else "sheet"
    kind = kind if kind in CANDIDATES else "sheet"
    hint = None
    if kind == "motor":
        hint = exc.figures["stall_needed_Nm"]
    elif kind == "shaft":
        hint = exc.figures["need_mm"]
    order: Sequence[tuple[str, str]]
    if kind == "sheet" and spec.panel.width_mm > spec.panel.height_mm:
        order = CANDIDATES[kind]
    else:
        order = sorted(CANDIDATES[kind], key=lambda c: c[0] != "panel.height") if kind == "sheet" \
            else CANDIDATES[kind]
    for path, way in order:
        now = spec.value(path)
        unit = SCHEMA_BY_PATH[path].unit
        if way == "up":
            good = _grow_until_builds(spec, path, max(hint if (hint and path == order[0][0]) else now * 1.01, now))
        else:
            lo = key_lo(path)
            good = _bisect(spec, path, now, lo, STEP[path]) if now > lo else None
        if good is not None and good != now:
            word = "the highest" if way == "down" else "the least"
            head = why if why.startswith(f"{path} = ") else f"{path} = {now:g}: {why}"
            return f"{head}; {word} {path} that builds is {good:g} {unit}"
    if kind == "sheet":
        shape = _panel_scaled(spec, why)
        if shape:
            return shape
    if hint is not None and depth == 0:
        # no one input is enough: the first one's own need, then what binds next
        path = order[0][0]
        fixed = with_values(spec, {path: SCHEMA_BY_PATH[path].kind(_nice_up(hint))})
        try:
            solve_core(fixed)
        except (NoLayout, SheetTooSmall) as nxt:
            return (f"{path} = {spec.value(path):g}: {why}; with {path} = {_nice_up(hint):g}, then: "
                    + refusal(fixed, nxt, depth + 1))
    return why


def _panel_scaled(spec, why: str) -> str | None:
    """The panel scaled down as it is shaped, for when no one input is enough."""
    w, h = spec.panel.width_mm, spec.panel.height_mm
    lo = max(SCHEMA_BY_PATH["panel.width"].lo / w, SCHEMA_BY_PATH["panel.height"].lo / h)

    def scaled(f):
        return with_values(spec, {"panel.width": math.floor(w * f), "panel.height": math.floor(h * f)})

    if lo >= 1 or not builds(scaled(lo)):
        return None
    good, bad = lo, 1.0
    while bad - good > 1.0 / max(w, h):
        mid = (good + bad) / 2
        good, bad = (mid, bad) if builds(scaled(mid)) else (good, mid)
    return (f"panel.width x panel.height = {w:g} x {h:g}: {why}; the largest panel of this shape that builds "
            f"is {math.floor(w * good):g} x {math.floor(h * good):g} mm (or larger sheet stock)")


def _grow_until_builds(spec, path: str, first: float) -> float | None:
    """The least value from ``first`` upward that builds: doubling until one
    does, then bisection against the value below it to 2 %."""
    lo, hi = key_lo(path), key_hi(path)
    v = min(max(first, lo), hi)
    below = spec.value(path)
    while not _try(spec, path, _nice_up(v)):
        if v >= hi:
            return None
        below = v
        v = min(v * 2, hi)
    v = _nice_up(v)
    while v - below > 0.02 * v:
        mid = _nice_up((v + below) / 2)
        if mid >= v:
            break
        if _try(spec, path, mid):
            v = mid
        else:
            below = mid
    return v


def _nice_up(v: float) -> float:
    """Round up to three significant figures."""
    if v <= 0:
        return v
    step = 10 ** (math.floor(math.log10(v)) - 2)
    return round(math.ceil(v / step - 1e-9) * step, 10)
