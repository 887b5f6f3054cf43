"""The drive in time: a DC gear-motor fed from a capacitor (or a steady
supply) turning the frame against gravity, bearing friction and wind.

Motor (linear permanent-magnet DC motor, described at the gear-motor's
output shaft; common practice for small gear-motors):

* torque T_m = k i and back-EMF e = k w_m with one constant k (N·m/A =
  V·s/rad in SI units, the same number for an ideal machine);
* at rated voltage V the speed falls on a straight line from the no-load
  speed w_0 (torque 0) to stall (speed 0, torque T_s). With the no-load
  current neglected, w_0 = V / k and T_s = k V / R, so
  k = V / w_0 and R = k V / T_s = V^2 / (w_0 T_s);
* the gear-motor's own gearbox is folded into that line (its losses are in
  the quoted stall torque and no-load speed), winding inductance is
  neglected (its time constant L/R is far below the pulse length of a small
  motor; from memory), and the inertia of the rotor seen through the
  gear-motor's reduction is not known from the parameters: it is an input
  (``rotor_inertia_kgm2``, at the gear-motor's output shaft) that the
  balance check leaves at 0.

Gear pair: ratio N = wheel / pinion teeth, mesh efficiency eta. When the
motor drives, the axle receives eta N T_m; when the frame drives the motor
(braking), the axle gives N T_m / eta. The pair's loss is kept in the books.

Axle (coordinates: x is the angle travelled in the pulse's direction s = +-1
from the start angle theta_0, so the frame's angle is theta_0 + s x):

* gravity: T_g = U g cos(tilt) sin(psi_0 + theta) about +x
  (sheetgen.mechanics.loads), so s T_g along the motion;
* bearing friction: Coulomb, one coefficient at rest and in motion
  (common practice for a plain journal estimate), magnitude T_f, against the
  motion; at rest it holds anything up to T_f;
* wind: a torque of magnitude T_w against the drive direction, the worst
  case of the balance check.

The frame never turns against the drive direction inside a pulse: when it
comes to rest and the load would turn it back by more than the bearing can
hold, the gear-motor's gearbox holds it (our assumption for small
high-reduction gear-motors) and the result says so (``held_by_gearbox``).

Capacitor: C dv/dt = -i, i = (v - k N w) / R (w the axle speed). With
``capacitance_F = inf`` the supply is a steady voltage (continuous drive).

The equations are integrated by :func:`integrate`, an adaptive
Dormand-Prince 5(4) Runge-Kutta written for this (Dormand & Prince, J. Comp.
Appl. Math. 6, 1980; the tableau as in Hairer, Norsett & Wanner, Solving
ODEs I, table 5.2), with terminal events located by bisection on the step.

Pure: numbers in, numbers out; radians and SI inside, degrees at the edges.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from collections.abc import Callable, Sequence

import numpy as np

from sheetgen.mechanics.loads import G_M_S2

RPM_TO_RAD_S = 2.0 * math.pi / 60.0

# ---------------------------------------------------------------------------
# Dormand-Prince 5(4) tableau (Hairer, Norsett & Wanner, Solving ODEs I, table 5.2)

_C = (0.0, 1 / 5, 3 / 10, 4 / 5, 8 / 9, 1.0, 1.0)
_A = (
    (),
    (1 / 5,),
    (3 / 40, 9 / 40),
    (44 / 45, -56 / 15, 32 / 9),
    (19372 / 6561, -25360 / 2187, 64448 / 6561, -212 / 729),
    (9017 / 3168, -355 / 33, 46732 / 5247, 49 / 176, -5103 / 18656),
    (35 / 384, 0.0, 500 / 1113, 125 / 192, -2187 / 6784, 11 / 84),
)
_B5 = (35 / 384, 0.0, 500 / 1113, 125 / 192, -2187 / 6784, 11 / 84, 0.0)
_B4 = (5179 / 57600, 0.0, 7571 / 16695, 393 / 640, -92097 / 339200, 187 / 2100, 1 / 40)
_E = tuple(b5 - b4 for b5, b4 in zip(_B5, _B4))


@dataclass(frozen=True)
class Solution:
    """What :func:`integrate` returns."""

    t: float  # time reached
    y: np.ndarray  # state there
    event: str  # name of the event that ended it, or "time"
    steps: int  # accepted steps
    rejected: int
    ts: np.ndarray | None = None  # accepted step ends (with record=True)
    ys: np.ndarray | None = None


(_A21,), (_A31, _A32), (_A41, _A42, _A43), (_A51, _A52, _A53, _A54), (_A61, _A62, _A63, _A64, _A65), \
    (_A71, _A72, _A73, _A74, _A75, _A76) = _A[1:]
_E1, _E2, _E3, _E4, _E5, _E6, _E7 = _E


def _rk_step(f, t: float, y: tuple, h: float, k1) -> tuple[tuple, tuple, tuple]:
    """One Dormand-Prince step of size h from (t, y), k1 = f(t, y): (y5, the error estimate,
    f(t + h, y5)). The state is a handful of floats, so the stages are written out on plain
    floats: numpy's cost per call would be most of the work."""
    k2 = f(t + _C[1] * h, tuple(a + h * (_A21 * b) for a, b in zip(y, k1)))
    k3 = f(t + _C[2] * h, tuple(a + h * (_A31 * b + _A32 * c) for a, b, c in zip(y, k1, k2)))
    k4 = f(t + _C[3] * h, tuple(a + h * (_A41 * b + _A42 * c + _A43 * d) for a, b, c, d in zip(y, k1, k2, k3)))
    k5 = f(t + _C[4] * h, tuple(a + h * (_A51 * b + _A52 * c + _A53 * d + _A54 * e)
                                for a, b, c, d, e in zip(y, k1, k2, k3, k4)))
    k6 = f(t + _C[5] * h, tuple(a + h * (_A61 * b + _A62 * c + _A63 * d + _A64 * e + _A65 * g)
                                for a, b, c, d, e, g in zip(y, k1, k2, k3, k4, k5)))
    # the last stage's state is y5 itself (its row of the tableau is _B5, whose second weight is 0)
    y5 = tuple(a + h * (_A71 * b + _A73 * d + _A74 * e + _A75 * g + _A76 * q)
               for a, b, d, e, g, q in zip(y, k1, k3, k4, k5, k6))
    k7 = f(t + h, y5)
    err = tuple(h * (_E1 * b + _E3 * d + _E4 * e + _E5 * g + _E6 * q + _E7 * r)
                for b, d, e, g, q, r in zip(k1, k3, k4, k5, k6, k7))
    return y5, err, k7


def integrate(f: Callable[[float, tuple], Sequence[float]], y0, t_end: float, *, h0: float = 1e-4,
              rtol: float = 1e-7, atol: float | Sequence[float] = 1e-10, h_max: float = math.inf,
              events: tuple[tuple[str, Callable[[float, tuple], float]], ...] = (),
              event_tol: float = 1e-12, record: bool = False, max_steps: int = 10 ** 7) -> Solution:
    """Integrate y' = f(t, y) from t = 0 to ``t_end`` with error control.

    ``f`` and the event functions get the state as a tuple of floats; ``f``
    returns the derivative as a sequence of floats. ``events`` are (name, g)
    pairs; the run ends at the first step over which
    some g(t, y) goes from positive to zero or below, located by bisection on
    the step size to ``event_tol`` seconds (the state is then the Runge-Kutta
    solution at that step, not an interpolation). After ``max_steps``
    accepted steps it gives up with the event "steps"."""
    y = tuple(float(v) for v in np.asarray(y0, dtype=float).ravel())
    n = len(y)
    t = 0.0
    h = min(h0, h_max, t_end)
    k1 = f(t, y)
    steps = rejected = 0
    # the lists grow only with record=True; otherwise they keep the start and are dropped
    ts: list[float] = [0.0]
    ys: list[tuple] = [y]
    tol = tuple(float(v) for v in np.broadcast_to(np.asarray(atol, dtype=float), (n,)))

    def done(t_end_s: float, y_end: tuple, event: str) -> Solution:
        return Solution(t_end_s, np.array(y_end), event, steps, rejected,
                        np.asarray(ts) if record else None, np.asarray(ys) if record else None)

    while t < t_end:
        if steps >= max_steps:
            return done(t, y, "steps")
        h = min(h, t_end - t, h_max)
        y_new, err, k_new = _rk_step(f, t, y, h, k1)
        e = math.sqrt(sum((d / (a + rtol * max(abs(u), abs(v)))) ** 2
                          for d, a, u, v in zip(err, tol, y, y_new)) / n)
        if e > 1.0:
            rejected += 1
            h *= max(0.2, 0.9 * e ** -0.2)
            continue
        fired = None
        for name, g in events:
            if g(t, y) > 0.0 and g(t + h, y_new) <= 0.0:
                fired = (name, g)
                break
        if fired is not None:
            name, g = fired
            lo, hi = 0.0, h
            y_hi = y_new
            while hi - lo > event_tol:
                mid = 0.5 * (lo + hi)
                y_mid, _, _ = _rk_step(f, t, y, mid, k1)
                if g(t + mid, y_mid) > 0.0:
                    lo = mid
                else:
                    hi, y_hi = mid, y_mid
            t += hi
            steps += 1
            if record:
                ts.append(t)
                ys.append(y_hi)
            return done(t, y_hi, name)
        t += h
        y, k1 = y_new, k_new
        steps += 1
        if record:
            ts.append(t)
            ys.append(y)
        h *= min(5.0, max(0.2, 0.9 * (e if e > 0 else 1e-10) ** -0.2))
    return done(t, y, "time")


# ---------------------------------------------------------------------------
# motor, gear pair, axle


@dataclass(frozen=True)
class Motor:
    """A linear DC gear-motor described at its output shaft (see the module notes)."""

    stall_torque_Nm: float
    no_load_speed_rad_s: float
    voltage_V: float

    @classmethod
    def from_ratings(cls, stall_torque_Nm: float, no_load_speed_rpm: float, voltage_V: float) -> "Motor":
        return cls(stall_torque_Nm, no_load_speed_rpm * RPM_TO_RAD_S, voltage_V)

    @property
    def k_Nm_A(self) -> float:
        """Torque constant = back-EMF constant (V·s/rad): k = V / w_0."""
        return self.voltage_V / self.no_load_speed_rad_s

    @property
    def resistance_ohm(self) -> float:
        """Winding resistance: R = k V / T_s."""
        return self.k_Nm_A * self.voltage_V / self.stall_torque_Nm


@dataclass(frozen=True)
class Drive:
    """Motor, gear pair and the inertia turned, seen from the axle."""

    motor: Motor
    ratio: float  # wheel teeth / pinion teeth
    efficiency: float  # mesh efficiency of the pair
    frame_inertia_kgm2: float  # turning frame about the axle
    rotor_inertia_kgm2: float = 0.0  # gear-motor output shaft's own inertia (unknown: 0 by default)

    @property
    def inertia_kgm2(self) -> float:
        """Inertia at the axle: the frame plus the motor's, times N^2."""
        return self.frame_inertia_kgm2 + self.rotor_inertia_kgm2 * self.ratio ** 2

    def axle_torque_Nm(self, motor_torque_Nm: float) -> float:
        """Torque the pair delivers at the axle (mesh loss on the driven side)."""
        if motor_torque_Nm >= 0.0:
            return self.efficiency * self.ratio * motor_torque_Nm
        return self.ratio * motor_torque_Nm / self.efficiency

    def stall_torque_at_axle_Nm(self, voltage_V: float) -> float:
        """Torque at the axle with the frame at rest and ``voltage_V`` on the motor."""
        m = self.motor
        return self.axle_torque_Nm(m.k_Nm_A * voltage_V / m.resistance_ohm)

    def steady_speed_rad_s(self, voltage_V: float, load_Nm: float) -> float:
        """Axle speed on a steady supply against a constant load (0 if it stalls).

        Motor torque T_m = load / (eta N); speed w_m = (V - R T_m / k) / k."""
        m = self.motor
        tm = load_Nm / (self.efficiency * self.ratio)
        wm = (voltage_V - m.resistance_ohm * tm / m.k_Nm_A) / m.k_Nm_A
        return max(0.0, wm / self.ratio)


@dataclass(frozen=True)
class AxleLoad:
    """What resists (or helps) the frame at the axle."""

    unbalance_Nm: float  # U g cos(tilt): the gravity torque's amplitude
    cg_angle_deg: float  # psi_0, the CG's angle from the upward vertical at rotation 0
    friction_Nm: float  # Coulomb bearing friction magnitude
    wind_Nm: float = 0.0  # against the drive direction

    @classmethod
    def from_unbalance(cls, unbalance_gmm: float, cg_angle_deg: float, tilt_deg: float, friction_Nm: float,
                       wind_Nm: float = 0.0) -> "AxleLoad":
        amp = unbalance_gmm * 1e-6 * G_M_S2 * math.cos(math.radians(tilt_deg))
        return cls(amp, cg_angle_deg, friction_Nm, wind_Nm)

    def gravity_Nm(self, theta_rad: float) -> float:
        """T_g about +x at frame angle theta (radians)."""
        return self.unbalance_Nm * math.sin(math.radians(self.cg_angle_deg) + theta_rad)

    def potential_J(self, theta_rad: float) -> float:
        """Gravity's potential energy (up to a constant): dP/dtheta = -T_g."""
        return self.unbalance_Nm * math.cos(math.radians(self.cg_angle_deg) + theta_rad)


@dataclass(frozen=True)
class PulseResult:
    start_deg: float
    direction: int
    step_deg: float  # angle turned in the drive direction (>= 0)
    duration_s: float  # from switch-on until the frame stops (or the time limit)
    voltage_end_V: float  # capacitor voltage when the frame stops
    moved: bool
    held_by_gearbox: bool  # the load would turn it back: the gearbox holds it
    ended: str  # "stopped", "did not start", "travel" (reached the given travel), "time", "steps"
    energy_in_J: float  # drawn from the capacitor (or the supply) until the stop
    copper_J: float
    mesh_J: float
    friction_J: float
    gravity_J: float  # work done against gravity (potential energy gained)
    wind_J: float
    kinetic_J: float  # left in the frame when the run ended
    steps: int
    trajectory: dict | None = field(default=None, compare=False)  # t_s, v_V, theta_deg, omega_rad_s, i_A


def run_pulse(drive: Drive, load: AxleLoad, capacitance_F: float, voltage_V: float, start_deg: float,
              direction: int = 1, *, travel_deg: float = math.inf, max_time_s: float = 30.0,
              rtol: float = 1e-8, h_max: float = math.inf, record: bool = False,
              max_steps: int = 20000) -> PulseResult:
    """Switch the charged capacitor (or, with ``capacitance_F = inf``, a steady
    supply of ``voltage_V``) onto the motor with the frame at rest at
    ``start_deg``, turning it in ``direction`` (+1 or -1 about +x); run until
    the frame stops and stays stopped, or it has turned ``travel_deg`` (the
    travel end: an end stop or limit switch), or ``max_time_s`` has passed
    (ended "time"), or the integration took ``max_steps`` steps (ended
    "steps": a stiff drive creeping under gravity; the figures are then a
    lower bound)."""
    if direction not in (1, -1):
        raise ValueError("direction must be +1 or -1")
    m = drive.motor
    k, R, N = m.k_Nm_A, m.resistance_ohm, drive.ratio
    J = drive.inertia_kgm2
    s = float(direction)
    th0 = math.radians(start_deg)
    steady = math.isinf(capacitance_F)
    C = capacitance_F
    tf, tw = load.friction_Nm, load.wind_Nm

    def net_at_rest(v: float, x: float) -> float:
        """Drive plus gravity minus wind along the drive direction, at rest."""
        return drive.stall_torque_at_axle_Nm(v) + s * load.gravity_Nm(th0 + s * x) - tw

    def rhs(_t, y):
        v, x, w = y[0], y[1], y[2]
        i = (v - k * N * w) / R
        tm = k * i
        ta = drive.axle_torque_Nm(tm)
        acc = (ta + s * load.gravity_Nm(th0 + s * x) - tw - tf) / J
        mesh = tm * N * w - ta * w
        return (0.0 if steady else -i / C, w, acc, i * i * R, mesh)

    if travel_deg <= 0.0:
        # already at the travel end it would run into
        return PulseResult(start_deg, direction, 0.0, 0.0, voltage_V, False, False, "travel",
                           0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0, None)
    if net_at_rest(voltage_V, 0.0) <= tf:
        # the drive cannot overcome the static load: the frame does not move
        return PulseResult(start_deg, direction, 0.0, 0.0, voltage_V, False,
                           net_at_rest(voltage_V, 0.0) < -tf, "did not start",
                           0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0, None)

    x_end = math.radians(travel_deg)
    # the stop event (w falling to 0) is armed after the start, where w = 0 and w' > 0
    events: tuple[tuple[str, Callable[[float, tuple], float]], ...] = (
        ("stopped", lambda _t, y: y[2] if _t > 0.0 else 1.0),)
    if math.isfinite(x_end):
        events += (("travel", lambda _t, y: x_end - y[1]),)
    # time scales for the first step: electrical-mechanical tau = J R / (k N)^2
    tau = J * R / (k * N) ** 2 if k * N > 0 else 1e-3
    y0 = (voltage_V, 0.0, 0.0, 0.0, 0.0)
    atol = (1e-9 * max(voltage_V, 1.0), 1e-10, 1e-9, 1e-12, 1e-12)
    sol = integrate(rhs, y0, max_time_s, h0=min(tau, 1e-3) * 1e-2, rtol=rtol, atol=atol, h_max=h_max,
                    events=events, record=record, max_steps=max_steps)
    v, x, w, cu, mesh = (float(a) for a in sol.y)
    held = False
    if sol.event == "stopped":
        w = 0.0
        held = net_at_rest(v, x) < -tf
    theta_end = th0 + s * x
    gravity_J = load.potential_J(theta_end) - load.potential_J(th0)
    if steady:
        e_in = voltage_V * _charge_through(sol, k, N, R)
    else:
        e_in = 0.5 * C * (voltage_V ** 2 - v ** 2)
    traj = None
    if record:
        ys = sol.ys
        assert ys is not None and sol.ts is not None  # integrate(record=True) keeps both
        i = (ys[:, 0] - k * N * ys[:, 2]) / R
        traj = {"t_s": sol.ts, "v_V": ys[:, 0], "theta_deg": np.degrees(th0 + s * ys[:, 1]),
                "omega_rad_s": ys[:, 2], "i_A": i}
    return PulseResult(
        start_deg=start_deg, direction=direction, step_deg=math.degrees(x), duration_s=sol.t,
        voltage_end_V=v, moved=x > 0.0, held_by_gearbox=held, ended=sol.event,
        energy_in_J=e_in, copper_J=cu, mesh_J=mesh, friction_J=tf * x, gravity_J=gravity_J, wind_J=tw * x,
        kinetic_J=0.5 * J * w * w, steps=sol.steps, trajectory=traj)


def _charge_through(sol: Solution, k: float, N: float, R: float) -> float:
    """Charge drawn from a steady supply: i = (V - k N w) / R integrates to
    (V t - k N x) / R, x being the angle turned."""
    v, x = float(sol.y[0]), float(sol.y[1])
    return (v * sol.t - k * N * x) / R
