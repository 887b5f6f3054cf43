"""The end stops on the solids: they meet at the travel limit, and only there.

For each pair of sheetgen.kitmodel.contacts.STOPS in the model, the turning stop is turned
about the axle and measured against the fixed one (exact shapely formulas for plates
on parallel axes, OpenCascade otherwise, as the other checks):

* the angle where they first touch, each way, found by bisection between a sampled
  angle inside the travel where they are apart and one past the limit where they
  share volume, to MEET_TOL_DEG; it must be site.travel_limit within STOP_ANGLE_TOL_DEG;
* their least gap at the angles inside the travel, sampled every degree up to
  INSIDE_DEG short of the limit: must be more than the contact tolerance;
* turned PAST_DEG beyond the limit they share volume (the frame cannot go there).

The rest of the frame against the fixed parts is the sweep's job (sheetgen.model3d.sweep,
which leaves these pairs out).
"""

from __future__ import annotations

import numpy as np

from sheetgen.kitmodel.contacts import STOPS
from sheetgen.model3d.bodies import CONTACT_TOL_MM, SHARED_VOLUME_TOL_MM3
from sheetgen.model3d.measures import _Measures
from sheetgen.model3d.records import StopCheck
from sheetgen.model3d.solids import Model

PAST_DEG = 3.0
INSIDE_DEG = 0.5
MEET_TOL_DEG = 1e-3
STOP_ANGLE_TOL_DEG = 0.05


def _apart(meas: _Measures, a, b, angle: float) -> bool:
    if meas.shared_volume_mm3(a, b, angle, 0.0) > SHARED_VOLUME_TOL_MM3:
        return False
    return meas.distance_mm(a, b, angle, 0.0) > CONTACT_TOL_MM


def _meet(meas: _Measures, a, b, inside: float, past: float) -> float:
    """The angle between ``inside`` (apart) and ``past`` (not apart) where they first touch."""
    lo, hi = inside, past
    while abs(hi - lo) > MEET_TOL_DEG:
        mid = 0.5 * (lo + hi)
        if _apart(meas, a, b, mid):
            lo = mid
        else:
            hi = mid
    return 0.5 * (lo + hi)


def check_stops(model: Model, spec, meas: _Measures | None = None) -> list[StopCheck]:
    meas = meas or _Measures(model)
    limit = spec.site.travel_limit_deg
    out = []
    for a in model.bodies:
        if not a.rotating:
            continue
        for b in model.bodies:
            if b.rotating or (a.source, b.source) not in STOPS:
                continue
            n = max(2, int(np.ceil(2 * (limit - INSIDE_DEG))) + 1)
            inside = min(meas.distance_mm(a, b, float(ang), 0.0) if meas.shared_volume_mm3(a, b, float(ang), 0.0)
                         <= SHARED_VOLUME_TOL_MM3 else 0.0
                         for ang in np.linspace(-(limit - INSIDE_DEG), limit - INSIDE_DEG, n))
            past_p = meas.shared_volume_mm3(a, b, limit + PAST_DEG, 0.0)
            past_m = meas.shared_volume_mm3(a, b, -(limit + PAST_DEG), 0.0)
            meet_p = _meet(meas, a, b, limit - INSIDE_DEG, limit + PAST_DEG)
            meet_m = _meet(meas, a, b, -(limit - INSIDE_DEG), -(limit + PAST_DEG))
            ok = (inside > CONTACT_TOL_MM and past_p > SHARED_VOLUME_TOL_MM3 and past_m > SHARED_VOLUME_TOL_MM3
                  and abs(meet_p - limit) <= STOP_ANGLE_TOL_DEG and abs(meet_m + limit) <= STOP_ANGLE_TOL_DEG)
            out.append(StopCheck(a.name, b.name, limit, meet_p, meet_m, float(inside), INSIDE_DEG, PAST_DEG,
                                 past_p, past_m, ok))
    return out
