"""Rise, set, transit and twilight times for a site (skyfield's almanac routines).

Definitions (those of the US Naval Observatory, as skyfield implements them):

* sunrise / sunset: the Sun's centre at true altitude -0.8333 deg (34'
  standard horizon refraction plus a 16' mean semidiameter);
* moonrise / moonset: the Moon's centre at -34' minus its topocentric
  apparent radius at that moment (topocentric positions, so parallax is in);
* civil / nautical / astronomical dawn and dusk: the Sun's centre at
  -6 / -12 / -18 deg, rising (dawn) or setting (dusk);
* transit_sun / transit_moon: upper meridian transit.

The horizon is the ideal one for the site's elevation (no dip for an
elevated observer, no terrain); refraction is the standard 34', not the
site's temperature and pressure.  Poleward of 70 deg, where skyfield's
hour-angle search (``find_risings``) can miss moonrises and fails at the
pole itself, the altitude is sampled every hour and each crossing
refined (``find_discrete``) with the same definitions.  Near the poles a body that does not cross
the horizon gives no event (skyfield marks those and they are dropped).
Times are aware UTC datetimes; events are found to about a second.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import datetime, timedelta, timezone

import numpy as np

from domegen.errors import InputError, NotFoundError

#: kind -> (body, what, horizon in degrees or None for the USNO standard).
KINDS: dict[str, tuple[str, str, float | None]] = {
    "sunrise": ("Sun", "rise", None),
    "sunset": ("Sun", "set", None),
    "moonrise": ("Moon", "rise", None),
    "moonset": ("Moon", "set", None),
    "transit_sun": ("Sun", "transit", None),
    "transit_moon": ("Moon", "transit", None),
    "civil_dawn": ("Sun", "rise", -6.0),
    "nautical_dawn": ("Sun", "rise", -12.0),
    "astronomical_dawn": ("Sun", "rise", -18.0),
    "civil_dusk": ("Sun", "set", -6.0),
    "nautical_dusk": ("Sun", "set", -12.0),
    "astronomical_dusk": ("Sun", "set", -18.0),
}
EVENT_KINDS = tuple(KINDS)

#: Longest search of :func:`next_event` (days): a polar night at the pole lasts ~6 months.
MAX_SEARCH_DAYS = 370.0


@dataclass(frozen=True)
class Event:
    """One almanac event: ``kind`` (see :data:`EVENT_KINDS`), ``utc`` aware datetime, ``body``."""

    kind: str
    utc: datetime
    body: str

    def as_json(self, tz: str | None = None) -> dict:
        from domegen.sky.times import iso_local, iso_utc

        d = {"kind": self.kind, "body": self.body, "time_utc": iso_utc(self.utc)}
        if tz:
            d["time_local"] = iso_local(self.utc, tz)
        return d


def _instant(value, field: str) -> datetime:
    from domegen.sky.times import check_range, from_unix_seconds, parse_instant

    if isinstance(value, (str, datetime)):
        if isinstance(value, datetime) and value.tzinfo is None:
            raise InputError(f"{field} must be timezone-aware", field=field, value=str(value),
                             hint="give a datetime with tzinfo, e.g. timezone.utc")
        return parse_instant(value, field=field)
    try:
        s = float(value)
    except (TypeError, ValueError):
        raise InputError(f"cannot use {value!r} as an instant", field=field, value=value,
                         hint="give an aware datetime, ISO 8601 text or POSIX UTC seconds") from None
    if not np.isfinite(s):
        raise InputError(f"cannot use {value!r} as an instant", field=field, value=value)
    check_range(np.array([s]), field=field)
    return from_unix_seconds(s)


def _check_kinds(kinds) -> tuple[str, ...]:
    if kinds is None:
        return EVENT_KINDS
    if isinstance(kinds, str):
        kinds = [kinds]
    out = []
    for k in kinds:
        if k not in KINDS:
            raise InputError(f"unknown event kind {k!r}", field="kind", value=k,
                             hint="choose from " + ", ".join(EVENT_KINDS))
        out.append(k)
    return tuple(dict.fromkeys(out))


#: Beyond this |latitude| skyfield's hour-angle search can miss moonrises (measured: 3 of 42 in
#: 2026 at 85 deg, 8 of 14 at 88 deg) and fails at the pole; the altitude is sampled instead.
POLAR_LAT_DEG = 70.0
#: Altitude sampling step (days) of the polar search; dips shorter than this can be missed.
POLAR_STEP_DAYS = 1.0 / 24.0
_STANDARD_REFRACTION_DEG = 34.0 / 60.0
_SUN_RADIUS_DEG = 16.0 / 60.0
#: Moon mean radius, m (IAU working group on cartographic coordinates).
_MOON_RADIUS_M = 1737.4e3


def _above_horizon_function(site, name: str, horizon_deg: float | None):
    """``f(t) -> bool array``: is the body above its rising altitude, for find_discrete."""
    from skyfield.nutationlib import iau2000b_radians

    from domegen.sky.ephemeris import body

    observer = site.observer()
    target = body(name)

    def f(t):
        # IAU 2000B nutation (1 mas) instead of 2000A: 30 times cheaper, as skyfield's own
        # rising search does (also without light deflection); irrelevant at the 0.1 s level.
        t._nutation_angles_radians = iau2000b_radians(t)
        alt, _, dist = observer.at(t).observe(target).apparent(deflectors=()).altaz()
        if horizon_deg is not None:
            h = horizon_deg
        elif name == "Sun":
            h = -_STANDARD_REFRACTION_DEG - _SUN_RADIUS_DEG
        else:
            h = -_STANDARD_REFRACTION_DEG - np.degrees(_MOON_RADIUS_M / dist.m)
        return alt.degrees > h

    f.step_days = POLAR_STEP_DAYS
    return f


def _find(site, kind: str, t0, t1, memo: dict | None = None) -> list[datetime]:
    """All times of one kind between skyfield Times ``t0`` and ``t1``.

    ``memo`` (a dict, one per search range) lets a rising and a setting of
    the same body and horizon share one polar altitude search.
    """
    from skyfield import almanac

    from domegen.sky.ephemeris import body

    name, what, horizon = KINDS[kind]
    if what == "transit":
        t = almanac.find_transits(site.observer(), body(name), t0, t1)
        real = np.ones(len(t.tt), dtype=bool)
    elif abs(site.lat_deg) < POLAR_LAT_DEG:
        finder = almanac.find_risings if what == "rise" else almanac.find_settings
        t, real = finder(site.observer(), body(name), t0, t1, horizon_degrees=horizon)
    else:
        memo = {} if memo is None else memo
        key = (name, horizon)
        if key not in memo:
            memo[key] = almanac.find_discrete(t0, t1, _above_horizon_function(site, name, horizon),
                                              epsilon=0.5 / 86400.0)
        t, up = memo[key]
        real = (up == 1) if what == "rise" else (up == 0)
    if len(t.tt) == 0:
        return []
    from domegen.sky.times import from_time

    return [d for d, ok in zip(np.atleast_1d(from_time(t)), np.atleast_1d(real)) if ok]


def events(site, start_utc, end_utc, kinds=None) -> list[Event]:
    """Events of the given kinds (all if None) with ``start_utc <= t < end_utc``, sorted by time.

    ``site`` is a :class:`domegen.sky.site.Site`; the instants are aware
    datetimes, ISO 8601 text or POSIX UTC seconds.
    """
    from domegen.sky.times import to_time

    start = _instant(start_utc, "start")
    end = _instant(end_utc, "end")
    if end <= start:
        raise InputError("the end of the range must come after its start", field="end",
                         value=end.isoformat(), hint=f"start is {start.isoformat()}")
    wanted = _check_kinds(kinds)
    t0, t1 = to_time(start), to_time(end)
    out, memo = [], {}
    for kind in wanted:
        for when in _find(site, kind, t0, t1, memo):
            if start <= when < end:
                out.append(Event(kind, when.astimezone(timezone.utc), KINDS[kind][0]))
    out.sort(key=lambda e: (e.utc, EVENT_KINDS.index(e.kind)))
    return out


def next_event(site, kind: str, after_utc) -> datetime:
    """The first event of ``kind`` strictly after ``after_utc`` (aware UTC datetime).

    Searches windows of growing length up to :data:`MAX_SEARCH_DAYS`
    (polar day or night can hide a sunrise for months); raises
    :class:`NotFoundError` if there is none before then or before the end
    of the ephemeris.
    """
    from domegen.sky.ephemeris import EPHEMERIS_END_UTC
    from domegen.sky.times import to_time

    (kind,) = _check_kinds([kind])
    after = _instant(after_utc, "after")
    t0 = to_time(after)
    for span_days in (1.5, 8.0, 40.0, 200.0, MAX_SEARCH_DAYS):
        end = min(after + timedelta(days=span_days), EPHEMERIS_END_UTC)
        found = [w for w in _find(site, kind, t0, to_time(end)) if w > after]
        if found:
            return min(found).astimezone(timezone.utc)
        if end >= EPHEMERIS_END_UTC:
            break
    raise NotFoundError(f"no {kind.replace('_', ' ')} within {MAX_SEARCH_DAYS:.0f} days after "
                        f"{after.isoformat()} at this site", field="kind", value=kind,
                        hint="near the poles the Sun or Moon may stay up or down for months")
