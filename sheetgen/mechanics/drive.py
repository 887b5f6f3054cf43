"""The drive over the travel: one pulse at each frame angle, in calm air and
in the design wind; what to change when a pulse turns the frame too far;
the continuous drive's speed and time to cross the travel.

Builds on the time-domain model of :mod:`sheetgen.mechanics.pulse`. Pure.

Pulses are figured from start angles spread over the travel
(-limit .. +limit), turning + (about +x) from every angle short of +limit
and turning - from every angle short of -limit, so "at the travel ends"
means the pulse that leaves each end. In calm air only gravity and the
bearing resist; in the design wind the bearing also carries the wind force
and the wind torque acts against the drive (the balance check's worst case).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from sheetgen.mechanics.pulse import AxleLoad, Drive, Motor, PulseResult, run_pulse

SWEEP_POINTS = 9  # start angles over the travel (both ends included)
PULSE_RTOL = 1e-6  # relative tolerance of the integration in the check
PULSE_MAX_STEPS = 4000  # a pulse still moving after this many steps is a lower bound
DEG_H_PER_RAD_S = math.degrees(1.0) * 3600.0


@dataclass(frozen=True)
class PulseSweep:
    angles_deg: tuple[float, ...]
    calm_plus_deg: tuple[float, ...]  # nan where no pulse leaves that angle in that sense
    calm_minus_deg: tuple[float, ...]
    wind_plus_deg: tuple[float, ...]
    wind_minus_deg: tuple[float, ...]
    calm_max_deg: float  # largest calm step over the travel
    calm_max_at: tuple[float, int]  # (start angle, direction)
    wind_min_deg: float  # smallest design-wind step over the travel
    wind_min_at: tuple[float, int]
    at_rest: dict  # {"calm": (plus, minus), "wind": (plus, minus)} at angle 0
    at_ends: dict  # {"calm": (from -limit turning +, from +limit turning -), "wind": (...)}
    held_by_gearbox: bool  # some pulse ends with the load leaning on the gearbox
    runs_to_end: bool  # some calm or wind pulse runs the frame into the travel end
    unsure: bool  # some pulse hit the time or step limit of the integration (its step is a lower bound)
    longest_pulse_s: float
    steps: int  # accepted integration steps over the sweep
    pulses: int


@dataclass(frozen=True)
class PulseFix:
    change: str  # "capacitance", "voltage" or "ratio"
    key: str
    value: float
    unit: str
    calm_max_deg: float  # with the change
    wind_min_deg: float
    text: str


@dataclass(frozen=True)
class ContinuousDrive:
    voltage_V: float
    steady_speed_deg_h: float  # under the worst load (balance check), steady supply at rated voltage
    crossing_time_s: float  # from one travel end to the other, the slower sense, in the design wind
    crossing_time_steady_s: float  # travel / steady speed (the same, with inertia and gravity's swing ignored)
    crosses: bool


@dataclass(frozen=True)
class DriveTime:
    motor_k_Nm_A: float
    motor_resistance_ohm: float
    frame_inertia_kgm2: float
    max_step_deg: float
    sweep: PulseSweep | None
    fixes: tuple[PulseFix, ...]
    continuous: ContinuousDrive


def sweep_angles(travel_limit_deg: float, n: int = SWEEP_POINTS) -> np.ndarray:
    return np.linspace(-travel_limit_deg, travel_limit_deg, n)


def _step(drive, load, c_F, v_V, start, direction, limit) -> PulseResult:
    """One pulse from ``start``, stopped at the travel end it runs toward."""
    to_end = limit - direction * float(start)
    return run_pulse(drive, load, c_F, v_V, float(start), direction, rtol=PULSE_RTOL, travel_deg=to_end,
                     max_steps=PULSE_MAX_STEPS)


def pulse_sweep(drive: Drive, calm: AxleLoad, wind: AxleLoad, capacitance_F: float, voltage_V: float,
                travel_limit_deg: float, n: int = SWEEP_POINTS) -> PulseSweep:
    """Angle per pulse from each start angle, both senses, calm and design wind."""
    angles = sweep_angles(travel_limit_deg, n)
    table = {}
    steps = pulses = 0
    held = to_end = unsure = False
    longest = 0.0
    for name, load in (("calm", calm), ("wind", wind)):
        for direction in (1, -1):
            row = []
            for j, a in enumerate(angles):
                if (direction == 1 and j == len(angles) - 1) or (direction == -1 and j == 0):
                    row.append(math.nan)
                    continue
                r = _step(drive, load, capacitance_F, voltage_V, a, direction, travel_limit_deg)
                to_end = to_end or r.ended == "travel"
                unsure = unsure or r.ended in ("time", "steps")
                steps += r.steps
                pulses += 1
                held = held or r.held_by_gearbox
                longest = max(longest, r.duration_s)
                row.append(r.step_deg)
            table[name, direction] = tuple(row)

    def extreme(name, pick):
        best, at = None, None
        for direction in (1, -1):
            for a, v in zip(angles, table[name, direction]):
                if math.isnan(v):
                    continue
                if best is None or pick(v, best):
                    best, at = v, (float(a), direction)
        return best, at

    cmax, cmax_at = extreme("calm", lambda v, b: v > b)
    wmin, wmin_at = extreme("wind", lambda v, b: v < b)
    mid = len(angles) // 2
    at_rest = {name: (table[name, 1][mid], table[name, -1][mid]) for name in ("calm", "wind")}
    at_ends = {name: (table[name, 1][0], table[name, -1][-1]) for name in ("calm", "wind")}
    return PulseSweep(tuple(float(a) for a in angles), table["calm", 1], table["calm", -1], table["wind", 1],
                      table["wind", -1], cmax, cmax_at, wmin, wmin_at, at_rest, at_ends, held, to_end, unsure, longest, steps,
                      pulses)


def start_voltage_V(drive: Drive, load: AxleLoad, travel_limit_deg: float, n: int = 181) -> float:
    """Least voltage at which the motor starts the frame from every angle of
    the travel in both senses: stall torque at the axle > friction + wind -
    gravity along the motion (closed form of the straight motor line)."""
    th = np.radians(np.linspace(-travel_limit_deg, travel_limit_deg, n))
    g = load.unbalance_Nm * np.sin(math.radians(load.cg_angle_deg) + th)
    need = float(np.max(load.friction_Nm + load.wind_Nm + np.abs(g)))
    m = drive.motor
    return need / (drive.efficiency * drive.ratio) * m.resistance_ohm / m.k_Nm_A


def free_run_deg(load: AxleLoad, travel_limit_deg: float, step_deg: float = 0.1) -> float:
    """The longest way gravity alone carries the frame once a pulse has set it
    moving, over starts in the travel and both senses.

    The frame can only come to rest where gravity along the motion is at most
    the bearing's hold (the drive at rest only pushes forward: the capacitor
    voltage never goes below 0, and with the frame at rest its current cannot
    brake). So from a start where gravity along the motion beats the bearing,
    a pulse turns the frame at least to the first angle where it no longer does
    (or to the travel end), whatever the capacitor, voltage or ratio."""
    th = np.arange(-travel_limit_deg, travel_limit_deg + step_deg / 2, step_deg)
    g = load.unbalance_Nm * np.sin(np.radians(load.cg_angle_deg + th))
    best = 0.0
    for s in (1, -1):
        pull = s * g - load.wind_Nm > load.friction_Nm  # gravity along the motion beats the bearing
        order = th if s == 1 else th[::-1]
        p = pull if s == 1 else pull[::-1]
        run = 0.0
        for j in range(len(order) - 1, -1, -1):
            run = (run + step_deg) if p[j] else 0.0
            best = max(best, run)
    return best


def _bisect(f, lo, hi, iters=40, rel=0.002):
    """Largest x in [lo, hi] with f(x) true, f monotone (true below, false above);
    geometric bisection. f(lo) must be true."""
    for _ in range(iters):
        if hi / lo - 1.0 < rel:
            break
        mid = math.sqrt(lo * hi)
        if f(mid):
            lo = mid
        else:
            hi = mid
    return lo


def _round_down(x: float, digits: int = 2) -> float:
    if x <= 0:
        return x
    e = math.floor(math.log10(x)) - digits + 1
    return math.floor(x / 10 ** e) * 10 ** e


def pulse_fixes(drive: Drive, calm: AxleLoad, wind: AxleLoad, capacitance_F: float, voltage_V: float,
                travel_limit_deg: float, max_step_deg: float, sweep: PulseSweep, pinion_teeth: int,
                max_wheel_teeth: int = 400, balanced: tuple[Drive, AxleLoad, AxleLoad, str] | None = None,
                ) -> tuple[PulseFix, ...]:
    """Values of capacitance, voltage or gear ratio that make the pulse
    pass (calm step <= max_step, moves in the design wind everywhere), each
    found by bisection on the model and verified over the whole sweep.

    An unbalanced frame that gravity turns harder than the bearing holds
    runs on after any pulse that sets it moving downhill; no capacitor fixes
    that. When nothing passes and ``balanced`` is given (the drive and loads
    with the counterweight fitted, and a phrase naming it), the search is
    repeated on it and each fix says to fit the counterweight first."""
    if sweep.calm_max_deg <= max_step_deg and sweep.wind_min_deg > 0.0 and not sweep.unsure:
        return ()
    found: tuple[PulseFix, ...] = ()
    if free_run_deg(calm, travel_limit_deg) <= max_step_deg:
        found = _fixes(drive, calm, wind, capacitance_F, voltage_V, travel_limit_deg, max_step_deg, sweep,
                       pinion_teeth, max_wheel_teeth, "")
    if found or balanced is None:
        return found
    bdrive, bcalm, bwind, phrase = balanced
    bsweep = pulse_sweep(bdrive, bcalm, bwind, capacitance_F, voltage_V, travel_limit_deg, len(sweep.angles_deg))
    if bsweep.calm_max_deg <= max_step_deg and bsweep.wind_min_deg > 0.0 and not bsweep.unsure:
        return (PulseFix("balance", "[[rotating_mass]]", 0.0, "", bsweep.calm_max_deg, bsweep.wind_min_deg,
                         phrase),)
    return _fixes(bdrive, bcalm, bwind, capacitance_F, voltage_V, travel_limit_deg, max_step_deg, bsweep,
                  pinion_teeth, max_wheel_teeth, phrase + ", and ")


def _fixes(drive, calm, wind, capacitance_F, voltage_V, travel_limit_deg, max_step_deg, sweep, pinion_teeth,
           max_wheel_teeth, prefix) -> tuple[PulseFix, ...]:
    fixes: list[PulseFix] = []
    v_start = start_voltage_V(drive, wind, travel_limit_deg)
    n = len(sweep.angles_deg)

    def worst_calm(d, c, v, at):
        r = _step(d, calm, c, v, at[0], at[1], travel_limit_deg)
        return math.inf if r.ended in ("time", "steps") else r.step_deg

    def verified(d, c, v):
        s = pulse_sweep(d, calm, wind, c, v, travel_limit_deg, n)
        return s, (s.calm_max_deg <= max_step_deg and s.wind_min_deg > 0.0 and not s.unsure)

    def search(make, lo, hi, rounder):
        """Largest parameter in [lo, hi] whose pulses all pass."""
        at = sweep.calm_max_at
        for _ in range(4):
            if worst_calm(*make(lo), at) > max_step_deg:
                return None
            x = rounder(_bisect(lambda p: worst_calm(*make(p), at) <= max_step_deg, lo, hi))
            if x < lo:
                return None
            s, ok = verified(*make(x))
            if ok:
                return x, s
            if s.calm_max_deg > max_step_deg and s.calm_max_at != at:
                at, hi = s.calm_max_at, x
            else:
                return None
        return None

    if sweep.wind_min_deg > 0.0:
        # capacitance: the start does not depend on it, the step shrinks with it
        got = search(lambda c: (drive, c, voltage_V), capacitance_F * 1e-3, capacitance_F, _round_down)
        if got:
            c, s = got
            fixes.append(PulseFix("capacitance", "drive.pulse_capacitance", c * 1e6, "µF", s.calm_max_deg,
                                  s.wind_min_deg, f"{prefix}drive.pulse_capacitance = {c * 1e6:.3g} µF"))
        # voltage: between the start voltage in the wind and the present one
        if v_start * 1.01 < voltage_V:
            got = search(lambda v: (drive, capacitance_F, v), v_start * 1.01, voltage_V,
                         lambda v: math.floor(v * 100) / 100)
            if got:
                v, s = got
                fixes.append(PulseFix("voltage", "drive.pulse_voltage", v, "V", s.calm_max_deg, s.wind_min_deg,
                                      f"{prefix}drive.pulse_voltage = {v:.3g} V (above {v_start:.3g} V, "
                                      "which starts the frame in the design wind)"))
        # ratio: more wheel teeth (the step need not fall steadily with the ratio: walk up)
        wheel0 = round(drive.ratio * pinion_teeth)
        last = sweep.calm_max_deg
        for wheel in _teeth_ladder(wheel0, max_wheel_teeth):
            d = replace(drive, ratio=wheel / pinion_teeth)
            got = worst_calm(d, capacitance_F, voltage_V, sweep.calm_max_at)
            if math.isinf(got):
                break  # the drive grows too stiff for the explicit integrator: stop looking
            if wheel >= 2 * wheel0 and got >= 0.95 * last:
                break  # twice the ratio and the step hardly falls: the ratio is not the lever here
            last = got
            if got <= max_step_deg:
                s, ok = verified(d, capacitance_F, voltage_V)
                if ok:
                    fixes.append(PulseFix("ratio", "drive.wheel_teeth", float(wheel), "teeth", s.calm_max_deg,
                                          s.wind_min_deg, f"{prefix}drive.wheel_teeth = {wheel} "
                                          f"(ratio {wheel / pinion_teeth:.3g})"))
                    break
    else:
        # the motor cannot start the frame somewhere in the wind: more voltage or more ratio
        v = math.ceil(v_start * 1.02 * 100) / 100
        s, ok = verified(drive, capacitance_F, v)
        fixes.append(PulseFix("voltage", "drive.pulse_voltage", v, "V", s.calm_max_deg, s.wind_min_deg,
                              f"{prefix}drive.pulse_voltage = {v:.3g} V starts the frame in the design wind"
                              + ("" if ok else "; then reduce drive.pulse_capacitance for the calm step")))
        wheel = math.ceil(drive.ratio * v_start / voltage_V * pinion_teeth * 1.02)
        if wheel <= max_wheel_teeth:
            d = replace(drive, ratio=wheel / pinion_teeth)
            s, ok = verified(d, capacitance_F, voltage_V)
            fixes.append(PulseFix("ratio", "drive.wheel_teeth", float(wheel), "teeth", s.calm_max_deg,
                                  s.wind_min_deg, f"{prefix}drive.wheel_teeth = {wheel} starts the frame in the "
                                  "design wind" + ("" if ok else "; then reduce drive.pulse_capacitance for the "
                                                                 "calm step")))
    return tuple(fixes)


def _teeth_ladder(start: int, stop: int):
    """Wheel tooth counts above ``start``, about 12 % apart, up to ``stop``."""
    n = start
    while n < stop:
        n = min(stop, max(n + 1, round(n * 1.12)))
        yield n


def continuous_drive(drive: Drive, wind: AxleLoad, voltage_V: float, worst_load_Nm: float,
                     travel_limit_deg: float) -> ContinuousDrive:
    """Steady supply at the rated voltage: the steady speed under the worst
    load (closed form of the motor line), and the time to cross the travel
    from one end to the other in the design wind, integrated (inertia and
    gravity's change over the travel included), the slower sense."""
    w = drive.steady_speed_rad_s(voltage_V, worst_load_Nm)
    span = 2.0 * travel_limit_deg
    t_steady = math.radians(span) / w if w > 0 else math.inf
    times = []
    for start, direction in ((-travel_limit_deg, 1), (travel_limit_deg, -1)):
        r = run_pulse(drive, wind, math.inf, voltage_V, start, direction, travel_deg=span, rtol=PULSE_RTOL,
                      max_time_s=max(60.0, 10.0 * t_steady if math.isfinite(t_steady) else 60.0))
        times.append(r.duration_s if r.ended == "travel" else math.inf)
    t = max(times)
    return ContinuousDrive(voltage_V, w * DEG_H_PER_RAD_S, t, t_steady, math.isfinite(t))


def drive_time(motor: Motor, ratio: float, efficiency: float, inertia_kgm2: float, calm: AxleLoad, wind: AxleLoad,
               capacitance_F: float, pulse_voltage_V: float, travel_limit_deg: float, max_step_deg: float,
               worst_load_Nm: float, pinion_teeth: int,
               balanced: tuple[float, AxleLoad, AxleLoad, str] | None = None) -> DriveTime:
    """Everything the balance check reports about the drive in time.

    ``balanced``: (inertia, calm load, wind load, phrase) with the
    counterweight fitted, for the fixes when balance is what is missing."""
    drive = Drive(motor, ratio, efficiency, inertia_kgm2)
    sweep = None
    fixes: tuple[PulseFix, ...] = ()
    if capacitance_F > 0:
        sweep = pulse_sweep(drive, calm, wind, capacitance_F, pulse_voltage_V, travel_limit_deg)
        bal = None
        if balanced is not None:
            bal = (replace(drive, frame_inertia_kgm2=balanced[0]), balanced[1], balanced[2], balanced[3])
        fixes = pulse_fixes(drive, calm, wind, capacitance_F, pulse_voltage_V, travel_limit_deg, max_step_deg,
                            sweep, pinion_teeth, balanced=bal)
    cont = continuous_drive(drive, wind, motor.voltage_V, worst_load_Nm, travel_limit_deg)
    return DriveTime(motor.k_Nm_A, motor.resistance_ohm, inertia_kgm2, max_step_deg, sweep, fixes, cont)
