"""Solving a spec: the fixed point when one exists, else a refusal naming the nearest value that builds.
"""

from __future__ import annotations

from sheetgen.errors import ParameterError, SheetTooSmall
from sheetgen.design.solver.fixed_point import solve_core
from sheetgen.design.solver.model import NoLayout, Solution
from sheetgen.design.solver.refusal import refusal


def solve(spec):
    """The Spec with every "auto" key set, ``spec.derived`` saying by which rule."""
    return solve_with_figures(spec).spec


def solve_with_figures(spec) -> Solution:
    try:
        return solve_core(spec)
    except NoLayout as exc:
        raise ParameterError(refusal(spec, exc)) from None
    except SheetTooSmall as exc:
        raise ParameterError(refusal(spec, exc)) from None
