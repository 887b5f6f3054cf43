"""How far and how fast the frame must turn to follow the sun for a day.

Sun geometry from Duffie & Beckman, Solar Engineering of Thermal Processes:

* the sun moves 15 degrees of hour angle per hour;
* the sunrise hour angle: cos w_s = -tan(latitude) tan(declination);
* the design day is the summer solstice, declination 23.44 degrees (the
  June solstice north of the equator, the December one south of it): the
  longest day and the widest swing.

Axle arrangements (``site.axle``):

* ``horizontal``: a horizontal north-south axle. The ideal rotation puts the
  panel normal in the plane of the axle and the sun, so with the sun vector
  (east, north, up) = (s_e, s_n, s_u) the rotation from level is
  tan R = -s_e / s_u, positive toward the west (afternoon). With the hour
  angle w (positive after noon) and declination d at latitude phi,
  s_w = cos d sin w and s_u = sin phi sin d + cos phi cos d cos w.
* ``polar``: the axle parallel to the earth's axis (tilted at the latitude);
  the rotation equals the hour angle.

The rotation angle here is the kit's rotation angle (0: panel square to the
axle's plane, as in the kit frame). Positive is toward the west; the range
is symmetric about solar noon, so which way the kit's +x points along the
meridian does not change the range.

Radians appear only inside the helpers; inputs and results are degrees.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from sheetgen.errors import ParameterError

SUN_RATE_DEG_H = 15.0  # Duffie & Beckman: 360 degrees in 24 hours
SOLSTICE_DECLINATION_DEG = 23.44  # Duffie & Beckman (23.45 in their Cooper formula)
AXLES = ("horizontal", "polar")
_RATE_SAMPLES = 2001


def sunrise_hour_angle_deg(latitude_deg: float, declination_deg: float) -> float:
    """Sunrise hour angle w_s, from cos w_s = -tan(phi) tan(d) (Duffie & Beckman).

    Returns 180 under the midnight sun and 0 in the polar night."""
    c = -math.tan(math.radians(latitude_deg)) * math.tan(math.radians(declination_deg))
    return math.degrees(math.acos(min(1.0, max(-1.0, c))))


def horizontal_rotation_from_sun_deg(zenith_deg, azimuth_deg):
    """Ideal rotation of a horizontal north-south axle from the sun's position.

    ``azimuth_deg`` is measured east of north. tan R = -s_e / s_u with
    s_e = sin(z) sin(az), s_u = cos(z); positive toward the west. Works on
    scalars or numpy arrays; meaningful while the sun is up."""
    z = np.radians(zenith_deg)
    az = np.radians(azimuth_deg)
    s_e = np.sin(z) * np.sin(az)
    s_u = np.cos(z)
    return np.degrees(np.arctan2(-s_e, s_u))


def horizontal_rotation_deg(latitude_deg: float, declination_deg: float, hour_angle_deg):
    """Ideal rotation of a horizontal north-south axle from the hour angle.

    tan R = cos d sin w / (sin phi sin d + cos phi cos d cos w); positive
    toward the west (afternoon)."""
    phi = np.radians(latitude_deg)
    d = np.radians(declination_deg)
    w = np.radians(hour_angle_deg)
    s_w = np.cos(d) * np.sin(w)
    s_u = np.sin(phi) * np.sin(d) + np.cos(phi) * np.cos(d) * np.cos(w)
    return np.degrees(np.arctan2(s_w, s_u))


def horizontal_rate_factor(latitude_deg: float, declination_deg: float, hour_angle_deg):
    """dR/dw for the horizontal axle (dimensionless): the frame turns at
    15 deg/h times this. Derivative of the arctangent above."""
    phi = np.radians(latitude_deg)
    d = np.radians(declination_deg)
    w = np.radians(hour_angle_deg)
    a = np.cos(d) * np.sin(w)
    b = np.sin(phi) * np.sin(d) + np.cos(phi) * np.cos(d) * np.cos(w)
    num = np.cos(d) * (np.sin(phi) * np.sin(d) * np.cos(w) + np.cos(phi) * np.cos(d))
    return num / (a * a + b * b)


def rotation_deg(axle: str, latitude_deg: float, declination_deg: float, hour_angle_deg):
    """Ideal frame rotation for either axle arrangement."""
    if axle == "horizontal":
        return horizontal_rotation_deg(latitude_deg, declination_deg, hour_angle_deg)
    if axle == "polar":
        return np.asarray(hour_angle_deg, dtype=float) * 1.0
    raise ParameterError(f"site.axle = {axle!r}: must be one of " + ", ".join(repr(a) for a in AXLES))


def axle_tilt_deg(axle: str, latitude_deg: float) -> float:
    """Tilt of the axle from horizontal: 0 for a horizontal axle, the latitude
    (its magnitude) for a polar axle."""
    if axle == "horizontal":
        return 0.0
    if axle == "polar":
        return abs(latitude_deg)
    raise ParameterError(f"site.axle = {axle!r}: must be one of " + ", ".join(repr(a) for a in AXLES))


@dataclass(frozen=True)
class TrackingRange:
    axle: str
    latitude_deg: float
    declination_deg: float
    axle_tilt_deg: float
    sunrise_hour_angle_deg: float
    day_length_h: float
    sunset_rotation_deg: float  # ideal rotation at sunset, unclipped (at sunrise it is the negative)
    travel_limit_deg: float
    range_deg: tuple[float, float]  # the extremes the frame reaches, clipped to the travel limit
    clipped: bool
    tracked_hours_h: float  # hours of the day the frame can follow within the travel limit
    peak_rate_deg_h: float  # fastest the frame must turn while tracking
    sun_rate_deg_h: float = SUN_RATE_DEG_H


def _hour_angle_at_rotation(axle: str, lat: float, decl: float, rot: float, w_s: float) -> float:
    """Hour angle (0..w_s) at which the ideal rotation reaches ``rot`` (>= 0).

    The rotation grows monotonically from noon to sunset for both axles
    (for the horizontal one while |phi| + d < 90, which the latitude limit keeps)."""
    if axle == "polar":
        return min(rot, w_s)
    lo, hi = 0.0, w_s
    if float(horizontal_rotation_deg(lat, decl, hi)) <= rot:
        return w_s
    for _ in range(80):
        mid = 0.5 * (lo + hi)
        if float(horizontal_rotation_deg(lat, decl, mid)) < rot:
            lo = mid
        else:
            hi = mid
    return 0.5 * (lo + hi)


def tracking_range(latitude_deg: float, axle: str, travel_limit_deg: float,
                   declination_deg: float | None = None) -> TrackingRange:
    """The frame's swing from sunrise to sunset on the design day.

    ``declination_deg`` defaults to the summer solstice of the site's
    hemisphere (23.44 deg, same sign as the latitude). Extremes are clipped to
    +-``travel_limit_deg``; outside the limit the frame waits at its stop."""
    if not -90.0 < latitude_deg < 90.0:
        raise ParameterError(f"site.latitude = {latitude_deg:g}: must be between -90 and 90 deg")
    if not travel_limit_deg > 0:
        raise ParameterError(f"site.travel_limit = {travel_limit_deg:g}: must be more than 0 deg")
    tilt = axle_tilt_deg(axle, latitude_deg)
    if declination_deg is None:
        declination_deg = math.copysign(SOLSTICE_DECLINATION_DEG, latitude_deg) if latitude_deg else \
            SOLSTICE_DECLINATION_DEG
    lat, decl = latitude_deg, declination_deg
    w_s = sunrise_hour_angle_deg(lat, decl)
    if axle == "polar":
        end = w_s
    else:
        end = float(horizontal_rotation_deg(lat, decl, w_s)) if w_s < 180.0 else 180.0
    limit = float(travel_limit_deg)
    reach = min(end, limit)
    w_track = _hour_angle_at_rotation(axle, lat, decl, reach, w_s)
    if axle == "polar":
        peak_factor = 1.0
    else:
        w = np.linspace(-w_track, w_track, _RATE_SAMPLES)
        peak_factor = float(np.max(horizontal_rate_factor(lat, decl, w)))
    return TrackingRange(
        axle=axle,
        latitude_deg=lat,
        declination_deg=decl,
        axle_tilt_deg=tilt,
        sunrise_hour_angle_deg=w_s,
        day_length_h=2.0 * w_s / SUN_RATE_DEG_H,
        sunset_rotation_deg=end,
        travel_limit_deg=limit,
        range_deg=(-reach, reach),
        clipped=end > limit + 1e-12,
        tracked_hours_h=2.0 * w_track / SUN_RATE_DEG_H,
        peak_rate_deg_h=SUN_RATE_DEG_H * peak_factor,
    )
