"""Tracking through the year against pvlib and Duffie & Beckman.

References:
- pvlib (the registry's reference library): pvlib.solarposition
  (get_solarposition, hour_angle, declination_spencer71) and
  pvlib.tracking.singleaxis (axis_tilt=0, axis_azimuth=180, backtrack=False,
  max_angle=90: the ideal rotation of a horizontal north-south axle).
  pvlib's geometric zenith (no refraction) is used, as our model has none.
- Duffie & Beckman, Solar Engineering of Thermal Processes: sunrise hour
  angle cos w_s = -tan(phi) tan(d), day length 2 w_s / 15, Cooper's
  declination d = 23.45 sin(360 (284 + n) / 365).
"""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pvlib
import pytest

from sheetgen.mechanics import tracking

LIMIT = 60.0


def _pvlib_day(date: str, lat: float, freq: str = "1min"):
    """pvlib ideal horizontal-axle rotation over one UTC day at longitude 0."""
    times = pd.date_range(f"{date} 00:00", periods=int(pd.Timedelta("1D") / pd.Timedelta(freq)), freq=freq, tz="UTC")
    sp = pvlib.solarposition.get_solarposition(times, lat, 0.0)
    theta = pvlib.tracking.singleaxis(sp.zenith, sp.azimuth, axis_tilt=0, axis_azimuth=180, max_angle=90,
                                      backtrack=False)["tracker_theta"]
    up = (sp.zenith < 90).values
    return times, sp, theta.values, up


def _decl_noon(date: str) -> float:
    doy = pd.Timestamp(date).day_of_year
    return float(np.degrees(pvlib.solarposition.declination_spencer71(doy)))


CASES = [(47.2, "2026-12-21"), (47.2, "2026-06-21"), (47.2, "2026-03-20"), (60.0, "2026-12-21"),
         (-33.0, "2026-06-21"), (-33.0, "2026-12-21"), (10.0, "2026-12-21"), (-55.0, "2026-06-21")]


@pytest.mark.parametrize("lat,date", CASES)
def test_peak_rate_and_tracked_hours_match_pvlib(lat, date):
    # rates from pvlib's angles a minute apart; tracked = sun up and |theta| <= 60
    _, _, theta, up = _pvlib_day(date, lat)
    inside = up & (np.abs(np.nan_to_num(theta, nan=99.0)) <= LIMIT)
    rate = np.abs(np.diff(theta)) * 60.0
    both = inside[1:] & inside[:-1]
    ref_peak = float(np.nanmax(rate[both]))
    ref_tracked = inside.sum() / 60.0
    day = tracking.day_track("d", "horizontal", lat, _decl_noon(date), LIMIT)
    assert day.peak_rate_deg_h == pytest.approx(ref_peak, rel=0.015)
    assert day.tracked_h == pytest.approx(ref_tracked, abs=0.06)


@pytest.mark.parametrize("lat,date", [(47.2, "2026-12-21"), (-33.0, "2026-06-21"), (35.0, "2026-03-20")])
def test_hourly_rotation_matches_pvlib(lat, date):
    # our rotation at each whole solar hour against pvlib's, interpolated at the
    # instants where pvlib's hour angle is 15 (h - 12)
    times, sp, theta, up = _pvlib_day(date, lat)
    ha = np.asarray(pvlib.solarposition.hour_angle(times, 0.0, sp.equation_of_time))
    day = tracking.day_track("d", "horizontal", lat, _decl_noon(date), LIMIT)
    sel = up & np.isfinite(theta)
    order = np.argsort(ha[sel])
    for h, rot in zip(day.hours, day.rotation_deg):
        w = 15.0 * (h - 12.0)
        if abs(rot) > 85:  # at the horizon the rotation runs out to 90 within minutes
            continue
        ref = np.interp(w, ha[sel][order], theta[sel][order])
        assert rot == pytest.approx(ref, abs=0.3), h


def test_december_peak_at_47_and_60_against_pvlib():
    # the year's peak for a horizontal axle north of the tropics falls on the
    # December solstice; pvlib's peak that day at both latitudes
    for lat in (47.2, 60.0):
        y = tracking.year_tracking(lat, "horizontal", LIMIT)
        _, _, theta, up = _pvlib_day("2026-12-21", lat)
        inside = up & (np.abs(np.nan_to_num(theta, nan=99.0)) <= LIMIT)
        rate = np.abs(np.diff(theta)) * 60.0
        ref = float(np.nanmax(rate[inside[1:] & inside[:-1]]))
        assert y.peak_rate_deg_h == pytest.approx(ref, rel=0.02)
        assert y.peak_declination_deg < -23.4
        assert y.shortest_day.name == "December solstice"
        assert y.shortest_day.tracked_h == pytest.approx(inside.sum() / 60.0, abs=0.06)


def test_year_peak_against_pvlib_over_the_whole_year():
    # pvlib over every day of a year at 4-minute steps: the fastest tracked turn
    lat = 40.0
    times = pd.date_range("2026-01-01", "2026-12-31 23:56", freq="4min", tz="UTC")
    sp = pvlib.solarposition.get_solarposition(times, lat, 0.0)
    theta = pvlib.tracking.singleaxis(sp.zenith, sp.azimuth, axis_tilt=0, axis_azimuth=180, max_angle=90,
                                      backtrack=False)["tracker_theta"].values
    inside = (sp.zenith < 90).values & (np.abs(np.nan_to_num(theta, nan=99.0)) <= LIMIT)
    rate = np.abs(np.diff(theta)) * 15.0
    ref = float(np.nanmax(rate[inside[1:] & inside[:-1]]))
    y = tracking.year_tracking(lat, "horizontal", LIMIT)
    assert y.peak_rate_deg_h == pytest.approx(ref, rel=0.02)


def test_southern_site_shortest_day_is_june():
    # south of the equator the winter solstice is in June (Duffie & Beckman's sign of d)
    y = tracking.year_tracking(-33.0, "horizontal", LIMIT)
    assert y.shortest_day.name == "June solstice"
    _, _, theta, up = _pvlib_day("2026-06-21", -33.0)
    inside = up & (np.abs(np.nan_to_num(theta, nan=99.0)) <= LIMIT)
    assert y.shortest_day.tracked_h == pytest.approx(inside.sum() / 60.0, abs=0.06)


@pytest.mark.parametrize("lat", [-50.0, -20.0, 0.0, 33.0, 47.2, 60.0])
def test_day_lengths_are_duffie_beckman(lat):
    # N = (2 / 15) arccos(-tan phi tan d) on each design day
    y = tracking.year_tracking(lat, "horizontal", LIMIT)
    for d in y.days:
        c = -math.tan(math.radians(lat)) * math.tan(math.radians(d.declination_deg))
        assert d.day_length_h == pytest.approx(2.0 / 15.0 * math.degrees(math.acos(c)), abs=1e-9)


def test_cooper_declination():
    # Duffie & Beckman (Cooper): n = 172 (21 June) gives 23.45 sin(360 x 456 / 365) = 23.45 deg
    assert float(tracking.cooper_declination_deg(172)) == pytest.approx(
        23.45 * math.sin(math.radians(360 * 456 / 365)), abs=1e-12)
    assert float(tracking.cooper_declination_deg(172)) == pytest.approx(23.45, abs=0.01)
    assert float(tracking.cooper_declination_deg(81)) == pytest.approx(0.0, abs=0.5)  # 22 March


def test_polar_axle_turns_at_the_hour_angle_rate():
    # a polar axle follows the hour angle: 15 deg/h on every day (Duffie & Beckman)
    y = tracking.year_tracking(47.2, "polar", LIMIT)
    assert y.peak_rate_deg_h == pytest.approx(15.0)
    assert all(r == pytest.approx(15.0) for d in y.days for r in d.rate_deg_h)
    assert not any("horizontal axle" in w for w in y.warnings)


def test_warnings_for_high_latitude_and_a_slow_drive():
    hi = tracking.year_tracking(60.0, "horizontal", LIMIT)
    assert any("horizontal axle" in w and "polar" in w for w in hi.warnings)
    low = tracking.year_tracking(10.0, "horizontal", LIMIT)
    assert not low.warnings
    slow = tracking.year_tracking(10.0, "horizontal", LIMIT, drive_speed_deg_h=5.0)
    assert any("slower" in w for w in slow.warnings)


def test_plot_curve_runs_sunrise_to_sunset():
    d = tracking.day_track("d", "horizontal", 47.2, -23.44, LIMIT)
    h, r = d.curve("horizontal", 47.2)
    assert h[0] == pytest.approx(12 - d.day_length_h / 2) and h[-1] == pytest.approx(12 + d.day_length_h / 2)
    assert r[0] == pytest.approx(-90.0, abs=1e-6) and r[-1] == pytest.approx(90.0, abs=1e-6)
