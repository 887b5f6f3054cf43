"""Primary-input draws for the layout solver: what a designer changes (panel,
sheet, laser, site) with the demo's gear-motor or a stronger one, and how a
draw is judged: it builds (parts kerf-exact, the balance check answers, the
frame clears the stand through its travel), or it is refused with one line
that names the binding input and a value that, tried, builds.

Shared by tests/test_derive.py (hypothesis) and tests/bench/bench_derive.py.
The motors and the sheet are invented scenario values (not a product's data).
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from sheetgen.errors import ParameterError, SheetgenError

MATERIALS = ("mdf", "birch_plywood", "cast_acrylic")
# the demo's own motor is in params/demo.toml; a stronger one (invented figures)
STRONG_MOTOR = ["motor.body_width=37", "motor.body_height=37", "motor.body_length=60", "motor.shaft_diameter=6",
                "motor.shaft_flat=5.4", "motor.shaft_length=18", "motor.screw_spacing=28", "motor.screw_diameter=3.2",
                "motor.boss_diameter=12", "motor.mass=0.45", "motor.stall_torque=12", "motor.no_load_speed=5",
                "motor.voltage=12", "drive.pulse_capacitance=0", "drive.pulse_voltage=0"]
# a large laser bed, so the whole panel range can fit (a scenario choice)
SHEET = ["sheet.width=1200", "sheet.height=900"]

RANGES = {  # the schema's full ranges for the drawn keys (sheetgen/design/spec.py)
    "panel.width": (40.0, 600.0),
    "panel.height": (40.0, 600.0),
    "panel.thickness": (1.0, 25.0),
    "sheet.thickness": (1.5, 12.0),
    "laser.kerf": (0.02, 0.6),
    "site.latitude": (-66.0, 66.0),
    "site.wind_speed": (0.0, 60.0),
}
PANEL_DENSITY_KG_M3 = (500.0, 2600.0)  # laminate to glass, for the panel's mass (common practice: glass ~2500)


@dataclass(frozen=True)
class Draw:
    values: dict
    strong_motor: bool

    def overrides(self) -> list[str]:
        v = self.values
        mass = v["panel.width"] * v["panel.height"] * v["panel.thickness"] * 1e-9 * v["panel_density"]
        mass = min(5.0, max(0.005, mass))
        out = [f"{k}={v[k]:.4g}" for k in RANGES] + [f"panel.mass={mass:.4g}",
                                                        f'sheet.material="{v["sheet.material"]}"']
        return SHEET + out + (STRONG_MOTOR if self.strong_motor else [])


@dataclass(frozen=True)
class Outcome:
    built: bool
    reason: str  # the binding key, or "built"
    message: str
    balance_ok: bool | None = None
    clearance_mm: float | None = None
    spec: object = None
    kit: object = None
    failing: tuple[str, ...] = ()  # the binding balance checks a built kit fails


NUM = r"(-?[0-9]+(?:\.[0-9]+)?(?:e-?[0-9]+)?)"
BUILDS = re.compile(r"([a-z_]+\.[a-z_]+) that builds is " + NUM)
THEN = re.compile(r"with ([a-z_]+\.[a-z_]+) = " + NUM + ", then")
SHAPE = re.compile(r"panel of this shape that builds is " + NUM + " x " + NUM)
AT_MOST = re.compile(r"^([a-z_]+\.[a-z_]+) = [^:]+: must be at most .*so at most " + NUM)


def suggestion(message: str) -> list[str]:
    """The overrides a refusal says would build, read from its one line."""
    out = [f"{k}={v}" for k, v in THEN.findall(message)]
    out += [f"{k}={v}" for k, v in BUILDS.findall(message)]
    m = SHAPE.search(message)
    if m:
        out += [f"panel.width={m[1]}", f"panel.height={m[2]}"]
    m = AT_MOST.match(message)
    if m:
        out.append(f"{m[1]}={m[2]}")
    return out


def kerf_exact(kit, kerf_mm: float) -> bool:
    """What the beam leaves of each cut outline is the part as designed (common practice:
    the path is offset by half the kerf onto the waste side). The erosion is shapely's
    own mitred buffer (a reference library), not sheetgen's offset code."""
    from sheetgen.geometry.kerf import cut_outline

    for part in kit.parts:
        left = cut_outline(part.fit_outline, kerf_mm).buffer(-kerf_mm / 2, join_style="mitre", mitre_limit=10)
        if left.symmetric_difference(part.fit_outline).area > 1e-3 * part.fit_outline.length:
            return False
    return True


def judge(base, overrides: list[str]) -> Outcome:
    from sheetgen.design.kit import build_kit, frame_sweep, travel_deg
    from sheetgen.mechanics.check import balance_check
    from sheetgen.design.spec import load_spec

    try:
        spec = load_spec(base, overrides)
        kit = build_kit(spec)
    except SheetgenError as exc:
        msg = str(exc)
        if not isinstance(exc, ParameterError):
            raise
        key = msg.split(" = ")[0].split(":")[0]
        return Outcome(False, key, msg)
    report = balance_check(kit, spec)
    clear = frame_sweep(kit, travel_deg(spec)).min_clearance_mm
    if not kerf_exact(kit, spec.laser.kerf_mm):
        raise AssertionError(f"a part is not kerf-exact: {overrides}")
    failing = tuple(c.name for c in report.checks if c.binding and not c.passed)
    return Outcome(True, "built", "", report.ok, clear, spec, kit, failing)
