"""The layout solver: every derived key follows from the primary inputs.

A derived key (``Key.rule`` set in sheetgen/design/spec.py) is "auto" unless a number
pins it. The solver sets each "auto" key by one named rule (RULES in rules.py, each
written once) and leaves pinned values alone. The rules run in the order the
dependencies run:

    border_holds_bolts       frame.border         sheet, bolts, ledge
    teeth_carry_load         drive.module, layers load torque, teeth, sheet material
    pinion_fits_shaft        drive.pinion_teeth   module, motor shaft
    pinion_no_undercut       drive.pinion_shift   pinion teeth, pressure angle
    wheel_for_torque_margin  drive.wheel_teeth    load torque, motor, check.torque_margin
    motor_shaft_reach        drive.wheel_spacers, drive.mount_gap   shaft length, layers, sheet
    axle_clears_travel       axle.height          everything above (the kit swept through its travel)

Some depend on each other in a circle (the load torque depends on the wheel,
the wheel on the load; the module on the pinion and back), so the rules run
in rounds until a round changes nothing (a fixed point: whole numbers equal,
lengths within SETTLE_MM), at most MAX_ROUNDS rounds. The load torque is read
at the start of each round from the kit the previous round described.

When no layout exists (the frame cannot fit the sheet, the motor cannot turn
the frame at any ratio the module allows, the shaft cannot reach the pinion)
the solver raises ParameterError naming the binding input and the nearest
value of it that builds, found by trying values with the solver itself.
Pure: no printing, no files.

Modules: model (the types and the state the rules read), rules (the rules and their
order), fixed_point (the rounds), refusal (the binding input and the nearest value
that builds), run (solve), derived (what was derived, for the report).
"""

from sheetgen.design.solver.model import NoLayout, Rule, Solution, with_values
from sheetgen.design.solver.rules import RULES, RULE_BY_NAME, module_floor_mm, undercut_free_shift, wheel_teeth_limits
from sheetgen.design.solver.fixed_point import MAX_ROUNDS, SETTLE_MM
from sheetgen.design.solver.refusal import builds
from sheetgen.design.solver.run import solve, solve_with_figures
from sheetgen.design.solver.derived import FIGURE_RULES, derived_lines, derived_values, rule_doc

__all__ = ["FIGURE_RULES", "MAX_ROUNDS", "NoLayout", "RULES", "RULE_BY_NAME", "Rule", "SETTLE_MM", "Solution",
           "builds", "derived_lines", "derived_values", "module_floor_mm", "rule_doc", "solve",
           "solve_with_figures", "undercut_free_shift", "wheel_teeth_limits", "with_values"]
