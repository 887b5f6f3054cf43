"""Which parts of a kit are meant to touch, and how near the rest may come.

The rules that the kit's clearance sweep (:func:`sheetgen.design.kit.frame_sweep`),
the assembly guide and the 3D checks (:mod:`sheetgen.model3d`) share: pairs of a
turning and a fixed part that touch on purpose, the parts that hold the motor,
and the least gap every other part keeps off the motor.
"""

from __future__ import annotations

# Turning and fixed parts that are meant to touch.
MESHING = frozenset({("wheel", "pinion")})
# Turning and fixed parts meant to meet at the ends of the travel, and only there (the end stops:
# sheetgen/design/parts/stops.py); the clearance sweeps leave them out and model3d.stops checks them.
STOPS = frozenset({("stop-arm", "end-stop")})
# The parts that hold the motor body (they may touch it); every other part keeps MOTOR_GAP_MM off the
# motor and its shaft, and the spinning shaft touches nothing but the pinion (sheetgen.model3d checks it).
MOTOR_HOLDERS = frozenset({"motor-mount", "motor-clamp"})
MOTOR_GAP_MM = 1.0  # our rule: the same least gap as SHAFT_END_GAP_MM and MOUNT_GAP_MM in layout.py
