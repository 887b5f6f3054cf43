"""Tracking through the year: the rotation the sun asks of the frame hour by
hour on the solstices and equinoxes, the fastest it must turn on any day,
and how long it follows the sun on the shortest day.

Sun geometry and the ideal rotation come from :mod:`sheetgen.mechanics.solar`
(Duffie & Beckman); times are solar time (hour 12 is solar noon). The
declination over the year follows Cooper's formula as given by Duffie &
Beckman: d = 23.45 sin(360 (284 + n) / 365), n the day of the year; the
solstices are taken at +-23.44 deg as in ``solar``.

"Tracked" means the sun is up and the ideal rotation lies within the travel
limit; outside it the frame waits at its stop.

Warnings (our rules, stated in the text they produce):

* a horizontal axle follows less than half of the shortest day's daylight,
  or must turn faster than twice the sun's 15 deg/h: a polar axle (or a
  tilted one) suits the site better;
* the drive's speed under the worst load is below the year's peak rate.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from sheetgen.mechanics import solar

DAYS = (("June solstice", solar.SOLSTICE_DECLINATION_DEG), ("equinoxes", 0.0),
        ("December solstice", -solar.SOLSTICE_DECLINATION_DEG))
CURVE_STEP_H = 1.0 / 12.0  # five-minute samples for the plots
POOR_FRACTION = 0.5  # horizontal axle following less than this share of the shortest day
POOR_RATE_FACTOR = 2.0  # ... or needing more than this many times the sun's 15 deg/h


def cooper_declination_deg(day_of_year):
    """Duffie & Beckman, after Cooper (1969): d = 23.45 sin(360 (284 + n) / 365)."""
    n = np.asarray(day_of_year, dtype=float)
    return 23.45 * np.sin(np.radians(360.0 * (284.0 + n) / 365.0))


@dataclass(frozen=True)
class DayTrack:
    name: str
    declination_deg: float
    day_length_h: float
    tracked_h: float
    peak_rate_deg_h: float  # fastest ideal rotation while tracked
    hours: tuple[float, ...]  # whole solar hours while the sun is up
    rotation_deg: tuple[float, ...]  # ideal rotation at those hours (unclipped)
    rate_deg_h: tuple[float, ...]  # rotation rate at those hours

    def curve(self, axle: str, latitude_deg: float, step_h: float = CURVE_STEP_H) -> tuple[np.ndarray, np.ndarray]:
        """(solar hour, ideal rotation) from sunrise to sunset for plotting."""
        w_s = solar.sunrise_hour_angle_deg(latitude_deg, self.declination_deg)
        if w_s <= 0.0:
            return np.zeros(0), np.zeros(0)
        half = w_s / solar.SUN_RATE_DEG_H
        n = max(2, int(math.ceil(2 * half / step_h)) + 1)
        h = np.linspace(12.0 - half, 12.0 + half, n)
        return h, np.asarray(solar.rotation_deg(axle, latitude_deg, self.declination_deg,
                                                (h - 12.0) * solar.SUN_RATE_DEG_H), dtype=float)


@dataclass(frozen=True)
class YearTracking:
    axle: str
    latitude_deg: float
    travel_limit_deg: float
    days: tuple[DayTrack, ...]  # June solstice, equinoxes, December solstice
    peak_rate_deg_h: float  # over the year, while tracked
    peak_declination_deg: float
    shortest_day: DayTrack
    warnings: tuple[str, ...]


def rate_deg_h(axle: str, latitude_deg: float, declination_deg: float, hour_angle_deg):
    """Ideal rotation rate (deg/h) at an hour angle."""
    if axle == "polar":
        return np.full_like(np.asarray(hour_angle_deg, dtype=float), solar.SUN_RATE_DEG_H)
    return solar.SUN_RATE_DEG_H * solar.horizontal_rate_factor(latitude_deg, declination_deg, hour_angle_deg)


def tracked_hour_angle_deg(axle: str, latitude_deg: float, declination_deg: float, travel_limit_deg: float) -> float:
    """Hour angle (0 .. sunset) up to which the ideal rotation stays within the limit.

    The rotation grows steadily from noon to sunset (solar.tracking_range)."""
    tr = solar.tracking_range(latitude_deg, axle, travel_limit_deg, declination_deg)
    return tr.tracked_hours_h * solar.SUN_RATE_DEG_H / 2.0


def day_track(name: str, axle: str, latitude_deg: float, declination_deg: float, travel_limit_deg: float,
              samples: int = 2001) -> DayTrack:
    tr = solar.tracking_range(latitude_deg, axle, travel_limit_deg, declination_deg)
    w_t = tr.tracked_hours_h * solar.SUN_RATE_DEG_H / 2.0
    if w_t > 0:
        w = np.linspace(-w_t, w_t, samples)  # odd count: noon included
        peak = float(np.max(rate_deg_h(axle, latitude_deg, declination_deg, w)))
    else:
        peak = 0.0
    half = tr.sunrise_hour_angle_deg / solar.SUN_RATE_DEG_H
    hours = [h for h in range(0, 25) if abs(h - 12) <= half]
    w_h = (np.asarray(hours, dtype=float) - 12.0) * solar.SUN_RATE_DEG_H
    rot = solar.rotation_deg(axle, latitude_deg, declination_deg, w_h)
    rate = rate_deg_h(axle, latitude_deg, declination_deg, w_h)
    return DayTrack(name, declination_deg, tr.day_length_h, tr.tracked_hours_h, peak,
                    tuple(float(h) for h in hours), tuple(float(r) for r in np.atleast_1d(rot)),
                    tuple(float(r) for r in np.atleast_1d(rate)))


def year_tracking(latitude_deg: float, axle: str, travel_limit_deg: float,
                  drive_speed_deg_h: float | None = None) -> YearTracking:
    """The three design days, the peak rate over the year and the warnings.

    The peak rate is searched over the declinations of every day of the year
    (Cooper) plus the solstices; for each, over the tracked hours."""
    days = tuple(day_track(n, axle, latitude_deg, d, travel_limit_deg) for n, d in DAYS)
    decls = np.unique(np.concatenate([cooper_declination_deg(np.arange(1, 366)),
                                      [-solar.SOLSTICE_DECLINATION_DEG, 0.0, solar.SOLSTICE_DECLINATION_DEG]]))
    peak, peak_d = 0.0, 0.0
    for d in decls:
        w_t = tracked_hour_angle_deg(axle, latitude_deg, float(d), travel_limit_deg)
        if w_t <= 0:
            continue
        r = float(np.max(rate_deg_h(axle, latitude_deg, float(d), np.linspace(-w_t, w_t, 401))))
        if r > peak:
            peak, peak_d = r, float(d)
    # the shortest day: the winter solstice of the site's hemisphere
    shortest = days[2] if latitude_deg >= 0 else days[0]
    warnings = []
    if axle == "horizontal":
        share = shortest.tracked_h / shortest.day_length_h if shortest.day_length_h > 0 else 0.0
        if share < POOR_FRACTION or peak > POOR_RATE_FACTOR * solar.SUN_RATE_DEG_H:
            warnings.append(
                f"a horizontal axle at latitude {latitude_deg:g} deg follows the sun for {shortest.tracked_h:.1f} of "
                f"{shortest.day_length_h:.1f} h on the {shortest.name} and must turn at up to {peak:.0f} deg/h "
                f"(the sun's hour angle moves {solar.SUN_RATE_DEG_H:g} deg/h): a polar axle (site.axle = \"polar\") "
                "turns at a steady 15 deg/h and follows more of the winter day")
    if drive_speed_deg_h is not None and drive_speed_deg_h < peak:
        warnings.append(f"the drive turns the axle at {drive_speed_deg_h:.3g} deg/h under the worst load, slower "
                        f"than the {peak:.3g} deg/h the sun asks for at declination {peak_d:.1f} deg")
    return YearTracking(axle, latitude_deg, travel_limit_deg, days, peak, peak_d, shortest, tuple(warnings))
