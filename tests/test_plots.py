"""The plots hold their series: parse the SVG and map each drawn line back to
the data through the axes' own tick labels; the page renders in Chromium.

References: the data drawn is checked against the figures it comes from
(the tracking and pulse models, themselves checked against pvlib and closed
forms in test_tracking.py and test_pulse.py); the SVG structure is the W3C
SVG 1.1 path syntax (M/L commands); colours are our own.
"""

from __future__ import annotations

import math
import re
import xml.etree.ElementTree as ET

import numpy as np

from sheetgen.mechanics import plots, tracking
from tests._browser import screenshot

NS = {"svg": "http://www.w3.org/2000/svg"}


def _path_points(svg: str, gid: str) -> np.ndarray:
    root = ET.fromstring(svg.encode())
    for g in root.iter("{http://www.w3.org/2000/svg}g"):
        if g.get("id") == gid:
            path = g.find(".//svg:path", NS)
            nums = re.findall(r"[ML]\s*(-?[\d.]+)\s+(-?[\d.]+)", path.get("d"))
            return np.array([(float(a), float(b)) for a, b in nums])
    raise AssertionError(f"no series {gid}")


def _ids(svg: str) -> list[str]:
    return re.findall(r'id="([^"]+)"', svg)


def _affine_fit(data: np.ndarray, drawn: np.ndarray) -> float:
    """Largest residual of the best straight-line map data -> drawn coordinate."""
    a, b = np.polyfit(data, drawn, 1)
    return float(np.max(np.abs(a * data + b - drawn)))


def test_sun_plot_draws_each_day_as_data():
    y = tracking.year_tracking(47.2, "horizontal", 60.0)
    curves = [(d.name, *d.curve(y.axle, y.latitude_deg)) for d in y.days]
    svg = plots.sun_rotation_svg(curves, 60.0, "t")
    # one straight map from hours and degrees to drawing units serves all three days
    allh = np.concatenate([c[1] for c in curves])
    allr = np.concatenate([c[2] for c in curves])
    pts = np.vstack([_path_points(svg, f"sunrot-series-{k}") for k in ("jun", "equ", "dec")])
    assert len(pts) == len(allh)
    assert _affine_fit(allh, pts[:, 0]) < 0.01
    assert _affine_fit(allr, pts[:, 1]) < 0.01
    assert "sunrot-limit-upper" in _ids(svg) and "sunrot-limit-lower" in _ids(svg)
    for word in ("solar time (h)", "(deg)", "June solstice", "December solstice", "beyond the travel limit"):
        assert word in svg


def test_load_plot_series_and_sum():
    a = np.linspace(-60, 60, 25)
    g = 0.02 * np.sin(np.radians(a + 20))
    svg = plots.load_torque_svg(a, g, 0.005, 0.03, 0.1, "t")
    plus = _path_points(svg, "loads-series-sum-plus")
    grav = _path_points(svg, "loads-series-gravity")
    motor = _path_points(svg, "loads-series-motor")
    # drawn y is one straight map of torque: fit it on gravity, check the sum and the motor line with it
    k, c = np.polyfit(-g, grav[:, 1], 1)
    np.testing.assert_allclose(plus[:, 1], k * (-g + 0.035) + c, atol=0.01)
    np.testing.assert_allclose(motor[:, 1], k * 0.1 + c, atol=0.01)
    assert "N·m" in svg and "frame angle (deg)" in svg


def test_pulse_plot_skips_missing_starts_and_marks_the_limit():
    a = [-60.0, -30.0, 0.0, 30.0, 60.0]
    cp = [12.0, 9.0, 6.0, 3.0, math.nan]
    cm = [math.nan, 2.0, 4.0, 6.0, 8.0]
    wp = [1.0, 1.5, 2.0, 2.5, math.nan]
    wm = [math.nan, 0.5, 0.7, 0.9, 1.1]
    svg = plots.pulse_step_svg(a, cp, cm, wp, wm, 5.0, "t")
    p = _path_points(svg, "pulse-series-calm-plus")
    assert len(p) == 4 and _affine_fit(np.array(cp[:4]), p[:, 1]) < 0.01
    assert len(_path_points(svg, "pulse-series-wind-minus")) == 4
    assert "pulse-max-step" in _ids(svg) and "drive.max_step 5 deg" in svg


def test_plots_are_deterministic_and_ids_are_prefixed():
    a = np.linspace(-60, 60, 13)
    s1 = plots.load_torque_svg(a, 0.01 * np.sin(np.radians(a)), 0.005, 0.03, 0.1, "t")
    s2 = plots.load_torque_svg(a, 0.01 * np.sin(np.radians(a)), 0.005, 0.03, 0.1, "t")
    assert s1 == s2
    assert "<dc:date>" not in s1 and "Matplotlib v" not in s1
    assert all(i.startswith("loads-") for i in _ids(s1))
    refs = re.findall(r"url\(#([^)]+)\)", s1)
    assert all(r.startswith("loads-") and r in _ids(s1) for r in refs)


def test_plots_render_in_headless_chromium(tmp_path):
    # Debian's chromium (installed by .ci/run) draws a page holding the three plots; the
    # series colours show up in the pixels
    y = tracking.year_tracking(47.2, "horizontal", 60.0)
    curves = [(d.name, *d.curve(y.axle, y.latitude_deg)) for d in y.days]
    a = np.linspace(-60, 60, 25)
    svgs = [plots.sun_rotation_svg(curves, 60.0, "sun"),
            plots.load_torque_svg(a, 0.02 * np.sin(np.radians(a)), 0.005, 0.03, 0.1, "loads"),
            plots.pulse_step_svg(a[::6], [3, 2, 1, 0.5, math.nan], [math.nan, 1, 2, 3, 4], [1, 1, 1, 1, math.nan],
                                 [math.nan, 0.5, 0.5, 0.5, 0.5], 5.0, "pulse")]
    body = "".join(s.split("?>", 1)[1].split("<svg", 1)[1].join(("<div><svg", "</div>")) for s in svgs)
    page = tmp_path / "plots.html"
    page.write_text(f"<!DOCTYPE html><html><body style='margin:0;background:#fff'>{body}</body></html>",
                    encoding="utf-8")
    img = screenshot(page, tmp_path, 800, 1200)

    def count(hexcol, tol=40):
        c = [int(hexcol[i:i + 2], 16) for i in (1, 3, 5)]
        return int((np.abs(img - np.array(c)).sum(axis=2) < tol).sum())

    assert count("#1f5fa8") > 300  # December solstice and the calm steps
    assert count("#c0392b") > 300  # June solstice and the motor line
    assert count("#8e44ad") > 100  # gravity
    assert count("#d9d9d9", 10) > 5000  # travel limits shaded
