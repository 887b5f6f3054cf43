"""Tracking range and sun geometry against outside references.

References:
- Duffie & Beckman, Solar Engineering of Thermal Processes: sunrise hour angle
  cos w_s = -tan(phi) tan(d), day length N = 2 w_s / 15, 15 deg/h.
- pvlib (the registry's reference library): pvlib.solarposition for the sun's
  position, hour angle and declination; pvlib.tracking.singleaxis for the
  ideal rotation of a single-axis tracker (backtrack=False).
"""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pvlib
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from sheetgen.errors import ParameterError
from sheetgen.mechanics import solar


def _day(date: str, lat: float, freq: str = "10min"):
    times = pd.date_range(f"{date} 00:00", periods=int(pd.Timedelta("1D") / pd.Timedelta(freq)), freq=freq,
                          tz="UTC")
    sp = pvlib.solarposition.get_solarposition(times, lat, 0.0)
    return times, sp


# ---------------------------------------------------------------------------
# Duffie & Beckman


def test_sunrise_hour_angle_lat45_solstice():
    # Duffie & Beckman: cos w_s = -tan(45) tan(23.44) -> w_s = 115.69 deg
    assert solar.sunrise_hour_angle_deg(45.0, 23.44) == pytest.approx(115.69, abs=0.005)


def test_sunrise_hour_angle_equator_is_six_hours():
    # Duffie & Beckman: at the equator tan(phi) = 0, so w_s = 90 deg, a 12 h day
    tr = solar.tracking_range(0.0, "polar", 90.0)
    assert tr.sunrise_hour_angle_deg == pytest.approx(90.0)
    assert tr.day_length_h == pytest.approx(12.0)


def test_day_length_lat45():
    # Duffie & Beckman: N = (2/15) arccos(-tan phi tan d) = 2 x 115.69 / 15 = 15.43 h
    tr = solar.tracking_range(45.0, "horizontal", 60.0)
    assert tr.day_length_h == pytest.approx(2 * 115.69 / 15, abs=0.002)


def test_sun_rate():
    # Duffie & Beckman: the hour angle changes 15 deg per hour
    assert solar.SUN_RATE_DEG_H == 15.0


def test_polar_range_is_sunrise_hour_angle():
    # polar axle: rotation = hour angle, so the day's swing is +-w_s (Duffie & Beckman)
    tr = solar.tracking_range(45.0, "polar", 90.0)
    assert tr.sunset_rotation_deg == pytest.approx(115.69, abs=0.005)
    assert tr.range_deg == (-90.0, 90.0) and tr.clipped
    assert tr.tracked_hours_h == pytest.approx(12.0)  # +-90 deg of hour angle at 15 deg/h
    assert tr.peak_rate_deg_h == pytest.approx(15.0)
    assert tr.axle_tilt_deg == 45.0


def test_southern_hemisphere_uses_december_solstice():
    # Duffie & Beckman: the longest day south of the equator is at d = -23.44 deg;
    # the swing mirrors the northern site at the same |latitude|
    south = solar.tracking_range(-33.0, "polar", 90.0)
    north = solar.tracking_range(33.0, "polar", 90.0)
    assert south.declination_deg == pytest.approx(-23.44)
    assert south.day_length_h == pytest.approx(north.day_length_h)
    assert south.axle_tilt_deg == 33.0


# ---------------------------------------------------------------------------
# pvlib, horizontal north-south axle


def test_horizontal_rotation_from_sun_vector_matches_pvlib():
    # pvlib.tracking.singleaxis (axis_tilt=0, axis_azimuth=180, backtrack=False,
    # max_angle=90): positive toward the west, the same convention as ours
    times, sp = _day("2024-06-20", 45.0)
    up = sp.apparent_elevation > 0.5
    ref = pvlib.tracking.singleaxis(sp.apparent_zenith, sp.azimuth, axis_tilt=0, axis_azimuth=180,
                                    max_angle=90, backtrack=False)["tracker_theta"]
    mine = solar.horizontal_rotation_from_sun_deg(sp.apparent_zenith.values, sp.azimuth.values)
    np.testing.assert_allclose(mine[up.values], ref[up].values, atol=1e-6)


@pytest.mark.parametrize("lat,date", [(45.0, "2024-06-20"), (47.2, "2024-06-20"), (-33.0, "2024-12-21"),
                                      (10.0, "2024-06-20")])
def test_horizontal_rotation_from_hour_angle_matches_pvlib(lat, date):
    # pvlib.solarposition.hour_angle and declination_spencer71 in our
    # hour-angle formula, against pvlib.tracking.singleaxis on the SPA sun
    # position; refraction and the declination model differ slightly, so
    # 0.25 deg while the sun is more than 5 deg up
    times, sp = _day(date, lat)
    ha = pvlib.solarposition.hour_angle(times, 0.0, sp.equation_of_time)
    decl = np.degrees(pvlib.solarposition.declination_spencer71(times.day_of_year))
    ref = pvlib.tracking.singleaxis(sp.apparent_zenith, sp.azimuth, axis_tilt=0, axis_azimuth=180,
                                    max_angle=90, backtrack=False)["tracker_theta"]
    mine = solar.horizontal_rotation_deg(lat, np.asarray(decl), np.asarray(ha))
    up = (sp.apparent_elevation > 5).values
    assert up.sum() > 40
    np.testing.assert_allclose(mine[up], ref.values[up], atol=0.25)


def test_horizontal_extremes_match_pvlib():
    # pvlib.tracking.singleaxis with max_angle=90: the rotation runs out toward
    # +-90 deg at sunrise and sunset; ours is exactly 90 deg at the horizon
    times, sp = _day("2024-06-20", 45.0, "1min")
    ref = pvlib.tracking.singleaxis(sp.apparent_zenith, sp.azimuth, axis_tilt=0, axis_azimuth=180,
                                    max_angle=90, backtrack=False)["tracker_theta"].dropna()
    assert ref.min() < -89.0 and ref.max() > 89.0
    tr = solar.tracking_range(45.0, "horizontal", 90.0)
    assert tr.sunset_rotation_deg == pytest.approx(90.0)
    assert tr.range_deg == (-90.0, 90.0)


def test_horizontal_travel_limit_matches_pvlib_max_angle():
    # pvlib.tracking.singleaxis with max_angle=60 clips at +-60 deg; the hours
    # it spends inside the limit (unclipped) match our tracked hours
    times, sp = _day("2024-06-20", 45.0, "1min")
    ref = pvlib.tracking.singleaxis(sp.apparent_zenith, sp.azimuth, axis_tilt=0, axis_azimuth=180,
                                    max_angle=60, backtrack=False)["tracker_theta"].dropna()
    tr = solar.tracking_range(45.0, "horizontal", 60.0)
    assert ref.min() == pytest.approx(tr.range_deg[0]) and ref.max() == pytest.approx(tr.range_deg[1])
    inside_h = (ref.abs() < 59.999).sum() / 60.0
    assert tr.tracked_hours_h == pytest.approx(inside_h, abs=0.05)


def test_horizontal_peak_rate_matches_pvlib():
    # the fastest turn of the ideal horizontal tracker, from pvlib's angles a
    # minute apart, against our derivative (it peaks near noon at lat 45)
    times, sp = _day("2024-06-20", 45.0, "1min")
    ref = pvlib.tracking.singleaxis(sp.apparent_zenith, sp.azimuth, axis_tilt=0, axis_azimuth=180,
                                    max_angle=60, backtrack=False)["tracker_theta"]
    rate = (ref.diff().abs() * 60.0).dropna()
    tr = solar.tracking_range(45.0, "horizontal", 60.0)
    assert tr.peak_rate_deg_h == pytest.approx(rate.max(), rel=0.01)


# ---------------------------------------------------------------------------
# pvlib, polar axle


def test_polar_rotation_is_hour_angle_per_pvlib():
    # pvlib.tracking.singleaxis with the axis tilted at the latitude
    # (axis_tilt=45, axis_azimuth=180) turns with the hour angle
    times, sp = _day("2024-06-20", 45.0)
    ha = pvlib.solarposition.hour_angle(times, 0.0, sp.equation_of_time)
    ref = pvlib.tracking.singleaxis(sp.apparent_zenith, sp.azimuth, axis_tilt=45, axis_azimuth=180,
                                    max_angle=90, backtrack=False)["tracker_theta"]
    mine = solar.rotation_deg("polar", 45.0, 23.44, np.asarray(ha))
    sel = ((sp.apparent_elevation > 5) & (np.abs(ha) < 85)).values
    np.testing.assert_allclose(mine[sel], ref.values[sel], atol=0.1)


# ---------------------------------------------------------------------------
# invariants


@settings(max_examples=40, deadline=None)
@given(lat=st.floats(-66, 66), w=st.floats(0, 1))
def test_horizontal_rotation_is_symmetric_and_bounded(lat, w):
    # the sun's path is symmetric about solar noon (Duffie & Beckman), so the
    # rotation is odd in the hour angle and within +-90 deg while the sun is up
    decl = math.copysign(23.44, lat) if lat else 23.44
    ws = solar.sunrise_hour_angle_deg(lat, decl)
    h = w * ws
    r = float(solar.horizontal_rotation_deg(lat, decl, h))
    assert float(solar.horizontal_rotation_deg(lat, decl, -h)) == pytest.approx(-r, abs=1e-9)
    assert -1e-9 <= r <= 90.0 + 1e-9


@settings(max_examples=40, deadline=None)
@given(lat=st.floats(-66, 66), h=st.floats(-100, 100))
def test_rate_factor_is_the_derivative(lat, h):
    # our closed-form dR/dw against a central finite difference of R(w)
    decl = math.copysign(23.44, lat) if lat else 23.44
    ws = solar.sunrise_hour_angle_deg(lat, decl)
    h = max(-ws + 1, min(ws - 1, h))
    e = 1e-4
    fd = (float(solar.horizontal_rotation_deg(lat, decl, h + e))
          - float(solar.horizontal_rotation_deg(lat, decl, h - e))) / (2 * e)
    assert float(solar.horizontal_rate_factor(lat, decl, h)) == pytest.approx(fd, rel=1e-5, abs=1e-7)


@settings(max_examples=30, deadline=None)
@given(lat=st.floats(-66, 66), limit=st.floats(5, 90), axle=st.sampled_from(solar.AXLES))
def test_range_is_clipped_to_travel_limit(lat, limit, axle):
    tr = solar.tracking_range(lat, axle, limit)
    assert tr.range_deg[1] == -tr.range_deg[0]
    assert tr.range_deg[1] <= limit + 1e-12
    assert tr.clipped == (tr.sunset_rotation_deg > limit + 1e-12)
    assert 0 < tr.tracked_hours_h <= tr.day_length_h + 1e-9


def test_bad_axle_names_key():
    with pytest.raises(ParameterError, match="site.axle"):
        solar.tracking_range(45.0, "diagonal", 60.0)
