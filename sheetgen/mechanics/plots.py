"""SVG plots of the drive and of tracking through the year, for the report.

Drawn with matplotlib's SVG backend (imported here, inside the functions,
so nothing loads it until a plot is made). Deterministic: no date or
creator in the metadata, a fixed ``svg.hashsalt`` for the generated ids,
text kept as text, every data point kept (no path simplification). Every id is prefixed with the plot's name so several
plots can sit in one HTML page. Each data series is a group whose id is
``<plot>-series-<name>`` so readers (and tests) can find it.

Each function takes plain figures and returns the SVG as a string.
"""

from __future__ import annotations

import functools
import io
import math
import re

import numpy as np

SALT = "sheetgen-plots"
_COLOURS = {"jun": "#c0392b", "equ": "#2e7d32", "dec": "#1f5fa8", "gravity": "#8e44ad", "friction": "#7f6000",
            "wind": "#1f8a8a", "sum": "#111111", "sum2": "#555555", "motor": "#c0392b", "calm": "#1f5fa8",
            "windstep": "#c76a00", "limit": "#888888"}


def _styled(fn):
    """Run a plot function under the fixed SVG settings (paths are built while
    plotting, so the settings must hold from the first line)."""

    @functools.wraps(fn)
    def run(*args, **kwargs):
        import matplotlib

        with matplotlib.rc_context({"svg.hashsalt": SALT, "svg.fonttype": "none", "svg.image_inline": True,
                                    "path.simplify": False}):
            return fn(*args, **kwargs)

    return run


def _figure(width_in=6.4, height_in=3.6):
    from matplotlib.figure import Figure

    return Figure(figsize=(width_in, height_in), dpi=100)


def _to_svg(fig, name: str) -> str:
    from matplotlib.backends.backend_svg import FigureCanvasSVG

    FigureCanvasSVG(fig)
    buf = io.StringIO()
    fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": None, "Format": None, "Type": None},
                bbox_inches=None)
    svg = buf.getvalue()
    # ids unique within a page that holds several plots
    svg = re.sub(r'id="([^"]+)"', lambda m: f'id="{name}-{m.group(1)}"' if not m.group(1).startswith(name + "-")
                 else m.group(0), svg)
    svg = re.sub(r"url\(#([^)]+)\)", lambda m: f"url(#{name}-{m.group(1)})" if not m.group(1).startswith(name + "-")
                 else m.group(0), svg)
    svg = re.sub(r'xlink:href="#([^"]+)"', lambda m: f'xlink:href="#{name}-{m.group(1)}"'
                 if not m.group(1).startswith(name + "-") else m.group(0), svg)
    return svg


def _series(ax, name, plot, x, y, **kw):
    (line,) = ax.plot(x, y, **kw)
    line.set_gid(f"{plot}-series-{name}")
    return line


@_styled
def sun_rotation_svg(curves: list[tuple[str, np.ndarray, np.ndarray]], travel_limit_deg: float,
                     title: str) -> str:
    """The ideal rotation against the solar hour for each day, travel limits shaded.

    ``curves``: (day name, solar hours, rotation deg)."""
    plot = "sunrot"
    fig = _figure()
    ax = fig.add_subplot(1, 1, 1)
    keys = {"June solstice": "jun", "equinoxes": "equ", "December solstice": "dec"}
    ax.axhspan(travel_limit_deg, 95, color="#d9d9d9", zorder=0, label="beyond the travel limit").set_gid(
        f"{plot}-limit-upper")
    ax.axhspan(-95, -travel_limit_deg, color="#d9d9d9", zorder=0).set_gid(f"{plot}-limit-lower")
    for name, h, r in curves:
        key = keys.get(name, name.replace(" ", "-"))
        _series(ax, key, plot, h, r, color=_COLOURS.get(key, "#333333"), lw=1.8, label=name)
    ax.set_xlim(0, 24)
    ax.set_ylim(-95, 95)
    ax.set_xticks(range(0, 25, 3))
    ax.set_yticks(range(-90, 91, 30))
    ax.set_xlabel("solar time (h)")
    ax.set_ylabel("frame rotation the sun asks for (deg)")
    ax.set_title(title, fontsize=10)
    ax.grid(True, color="#e6e6e6", lw=0.6)
    ax.legend(loc="upper left", fontsize=8, frameon=True)
    fig.tight_layout()
    return _to_svg(fig, plot)


@_styled
def load_torque_svg(angles_deg: np.ndarray, gravity_Nm: np.ndarray, friction_Nm: float, wind_Nm: float,
                    available_Nm: float, title: str) -> str:
    """Load torque at the axle against the frame angle for a turn in the +
    sense: gravity (positive where it resists), bearing friction and wind
    (design wind), their sum in each sense, and the motor's available
    torque at the axle."""
    plot = "loads"
    fig = _figure()
    ax = fig.add_subplot(1, 1, 1)
    a = np.asarray(angles_deg, dtype=float)
    g = np.asarray(gravity_Nm, dtype=float)  # about +x: resists a + turn when negative
    resist = -g
    n = len(a)
    _series(ax, "gravity", plot, a, resist, color=_COLOURS["gravity"], lw=1.5, label="gravity (turning +)")
    _series(ax, "friction", plot, a, np.full(n, friction_Nm), color=_COLOURS["friction"], lw=1.5,
            label="bearing friction")
    _series(ax, "wind", plot, a, np.full(n, wind_Nm), color=_COLOURS["wind"], lw=1.5, label="wind")
    _series(ax, "sum-plus", plot, a, resist + friction_Nm + wind_Nm, color=_COLOURS["sum"], lw=2.2,
            label="sum, turning +")
    _series(ax, "sum-minus", plot, a, g + friction_Nm + wind_Nm, color=_COLOURS["sum2"], lw=2.2, ls="--",
            label="sum, turning −")
    _series(ax, "motor", plot, a, np.full(n, available_Nm), color=_COLOURS["motor"], lw=1.8, ls=":",
            label="motor available at the axle")
    ax.axhline(0.0, color="#999999", lw=0.6)
    ax.set_xlabel("frame angle (deg)")
    ax.set_ylabel("torque at the axle (N·m)")
    ax.set_title(title, fontsize=10)
    ax.grid(True, color="#e6e6e6", lw=0.6)
    ax.legend(loc="best", fontsize=7, frameon=True)
    fig.tight_layout()
    return _to_svg(fig, plot)


@_styled
def pulse_step_svg(angles_deg, calm_plus, calm_minus, wind_plus, wind_minus, max_step_deg: float,
                   title: str) -> str:
    """Angle turned by one pulse against the frame angle it starts from, in
    calm air and in the design wind, each sense, with drive.max_step."""
    plot = "pulse"
    fig = _figure()
    ax = fig.add_subplot(1, 1, 1)
    a = np.asarray(angles_deg, dtype=float)
    for name, vals, colour, ls, label in (
            ("calm-plus", calm_plus, _COLOURS["calm"], "-", "calm, turning +"),
            ("calm-minus", calm_minus, _COLOURS["calm"], "--", "calm, turning −"),
            ("wind-plus", wind_plus, _COLOURS["windstep"], "-", "design wind, turning +"),
            ("wind-minus", wind_minus, _COLOURS["windstep"], "--", "design wind, turning −")):
        v = np.asarray(vals, dtype=float)
        ok = ~np.isnan(v)
        _series(ax, name, plot, a[ok], v[ok], color=colour, ls=ls, lw=1.6, marker="o", ms=3.5, label=label)
    ax.axhline(max_step_deg, color=_COLOURS["limit"], lw=1.2, ls=":").set_gid(f"{plot}-max-step")
    ax.text(a.min(), max_step_deg, f" drive.max_step {max_step_deg:g} deg", fontsize=7, va="bottom",
            color="#555555")
    finite = [x for x in np.concatenate([np.asarray(v, float) for v in (calm_plus, calm_minus, wind_plus,
                                                                        wind_minus)]) if not math.isnan(x)]
    top = max(finite + [max_step_deg])
    ax.set_ylim(0, top * 1.08 if top > 0 else 1.0)
    ax.set_xlabel("frame angle at the start of the pulse (deg)")
    ax.set_ylabel("angle turned by one pulse (deg)")
    ax.set_title(title, fontsize=10)
    ax.grid(True, color="#e6e6e6", lw=0.6)
    ax.legend(loc="best", fontsize=7, frameon=True)
    fig.tight_layout()
    return _to_svg(fig, plot)


def drive_plots(report) -> list[tuple[str, str, str]]:
    """The report's plots from a balance report (sheetgen.mechanics.check.BalanceReport):
    (key, caption, svg)."""
    y = report.year
    out = []
    curves = []
    for d in y.days:
        h, r = d.curve(y.axle, y.latitude_deg)
        curves.append((d.name, h, r))
    out.append(("sun", f"The rotation the sun asks of a {y.axle} axle at latitude {y.latitude_deg:g} deg, hour "
                       f"by hour (solar time); the frame stops at ±{y.travel_limit_deg:g} deg (grey).",
                sun_rotation_svg(curves, y.travel_limit_deg,
                                 f"Sun's rotation, latitude {y.latitude_deg:g} deg, {y.axle} axle")))
    lim = y.travel_limit_deg
    angles = np.linspace(-lim, lim, 121)
    wl = report.wind_load
    grav = np.array([wl.gravity_Nm(math.radians(a)) for a in angles])
    d = report.drive
    available = d.motor_torque_available_Nm * d.gear_ratio * d.mesh_efficiency
    out.append(("loads", "Torque at the axle in the design wind against the frame angle: gravity from the "
                         "frame's unbalance, bearing friction, wind (the check's worst case) and their sum, "
                         "with the motor's usable torque brought to the axle.",
                load_torque_svg(angles, grav, wl.friction_Nm, wl.wind_Nm, available, "Load torque at the axle")))
    sw = report.drive_time.sweep
    if sw is not None:
        out.append(("pulse", "Angle one capacitor pulse turns the frame, from each starting angle, in calm air and "
                             "in the design wind; a pulse that reaches the travel end stops there.",
                    pulse_step_svg(sw.angles_deg, sw.calm_plus_deg, sw.calm_minus_deg, sw.wind_plus_deg,
                                   sw.wind_minus_deg, report.drive_time.max_step_deg, "Angle per pulse")))
    return out
