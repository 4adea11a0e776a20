"""Rise, set, transit and twilight times against skyfield's documented examples and astropy."""

from __future__ import annotations

import os
import warnings
from datetime import datetime, timedelta, timezone

import numpy as np
import pytest

from domegen.errors import InputError, NotFoundError, OutOfRangeError
from domegen.sky import almanac
from domegen.sky.ephemeris import _data_dir, timescale
from domegen.sky.site import Site

UTC = timezone.utc
# Bluffton, Ohio: the site of skyfield's almanac documentation (rhodesmill.org/skyfield/almanac.html).
BLUFFTON = Site(40.8939, -83.8917, 0.0)
NANTES = Site(47.2184, -1.5536, 20.0, timezone="Europe/Paris")
LONGYEARBYEN = Site(78.2232, 15.6267, 10.0)


def _utc(text: str) -> datetime:
    return datetime.fromisoformat(text.replace("Z", "+00:00"))


def _assert_close(got: datetime, want: datetime, tol_s: float) -> None:
    assert abs((got - want).total_seconds()) <= tol_s, (got, want)


def test_twilights_match_skyfield_documentation():
    # Published example output, skyfield "Almanac Computation" page, Twilight section,
    # Bluffton 2019-11-08 (its dark_twilight_day routine); the issue asks for 1-2 minutes.
    published = {
        "astronomical_dawn": "2019-11-08T10:40:19Z", "nautical_dawn": "2019-11-08T11:12:31Z",
        "civil_dawn": "2019-11-08T11:45:18Z", "sunrise": "2019-11-08T12:14:15Z",
        "sunset": "2019-11-08T22:23:52Z", "civil_dusk": "2019-11-08T22:52:48Z",
        "nautical_dusk": "2019-11-08T23:25:34Z", "astronomical_dusk": "2019-11-08T23:57:44Z",
    }
    ev = almanac.events(BLUFFTON, _utc("2019-11-08T05:00:00Z"), _utc("2019-11-09T05:00:00Z"),
                        kinds=list(published))
    assert [e.kind for e in ev] == list(published)
    for e in ev:
        _assert_close(e.utc, _utc(published[e.kind]), 60.0)
        assert e.utc.tzinfo is not None and e.body == "Sun"


def test_sunrise_sunset_match_skyfield_documentation():
    # skyfield "Almanac Computation", Sunrise and Sunset: Bluffton 2018-09-12, sunrise 11:13:13Z and
    # sunset 23:49:38Z (the page notes these agree with the USNO definition and tables).
    ev = almanac.events(BLUFFTON, _utc("2018-09-12T04:00:00Z"), _utc("2018-09-13T04:00:00Z"),
                        kinds=["sunrise", "sunset"])
    assert [e.kind for e in ev] == ["sunrise", "sunset"]
    _assert_close(ev[0].utc, _utc("2018-09-12T11:13:13Z"), 60.0)
    _assert_close(ev[1].utc, _utc("2018-09-12T23:49:38Z"), 60.0)


def _astropy_alt_az(site: Site, times: list[datetime], body: str):
    """Airless topocentric alt/az (deg) of the Sun or Moon from astropy with DE421, offline."""
    import astropy.units as u
    from astropy.coordinates import AltAz, EarthLocation, get_body, solar_system_ephemeris
    from astropy.time import Time
    from astropy.utils import iers

    iers.conf.auto_download = False
    iers.conf.auto_max_age = None
    loc = EarthLocation.from_geodetic(site.lon_deg * u.deg, site.lat_deg * u.deg, site.elev_m * u.m)
    ts = timescale()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # astropy's own notes about its IERS tables
        t = Time(times, scale="utc", location=loc)
        t.delta_ut1_utc = np.array([float(ts.from_datetime(d).dut1) for d in times])
        with solar_system_ephemeris.set(os.path.join(_data_dir(), "de421.bsp")):
            c = get_body(body.lower(), t, loc)
            aa = c.transform_to(AltAz(obstime=t, location=loc, pressure=0 * u.hPa))
            dist_km = c.distance.to(u.km).value
    return aa.alt.deg, aa.az.deg, dist_km


def test_event_altitudes_match_definitions_in_astropy():
    # Independent check with astropy (same DE421): at each of our event times the body stands at the
    # defining altitude: Sun centre -50' (USNO: 34' refraction + 16' semidiameter), twilights at
    # -6/-12/-18 deg, Moon centre at -34' minus its apparent radius (USNO definitions).  0.01 deg
    # of altitude is 2-4 s of time at Nantes.
    ev = almanac.events(NANTES, _utc("2026-03-18T00:00:00Z"), _utc("2026-03-21T00:00:00Z"))
    sun = [e for e in ev if e.body == "Sun" and not e.kind.startswith("transit")]
    moon = [e for e in ev if e.body == "Moon" and not e.kind.startswith("transit")]
    assert len(sun) == 3 * 8 and len(moon) >= 4
    want = {"sunrise": -50 / 60, "sunset": -50 / 60, "civil_dawn": -6, "civil_dusk": -6,
            "nautical_dawn": -12, "nautical_dusk": -12, "astronomical_dawn": -18,
            "astronomical_dusk": -18}
    alt, _, _ = _astropy_alt_az(NANTES, [e.utc for e in sun], "Sun")
    assert np.allclose(alt, [want[e.kind] for e in sun], atol=0.01)
    alt, _, dist_km = _astropy_alt_az(NANTES, [e.utc for e in moon], "Moon")
    # Moon radius 1737.4 km (IAU WG on cartographic coordinates, mean radius).
    moon_h = -34 / 60 - np.degrees(np.arcsin(1737.4 / dist_km))
    assert np.allclose(alt, moon_h, atol=0.01)
    # Upper transits: the body is due south of Nantes (azimuth 180 deg) at the moment.
    transits = [e for e in ev if e.kind.startswith("transit")]
    for name in ("Sun", "Moon"):
        times = [e.utc for e in transits if e.body == name]
        assert len(times) >= 2
        _, az, _ = _astropy_alt_az(NANTES, times, name)
        assert np.allclose(az, 180.0, atol=0.05)


def test_events_are_sorted_within_range_and_filtered():
    start, end = _utc("2026-08-10T00:00:00Z"), _utc("2026-08-14T00:00:00Z")
    ev = almanac.events(NANTES, start, end)
    times = [e.utc for e in ev]
    assert times == sorted(times) and all(start <= t < end for t in times)
    assert {e.kind for e in ev} == set(almanac.EVENT_KINDS)
    only = almanac.events(NANTES, start, end, kinds="sunset")
    assert [e.kind for e in only] == ["sunset"] * 4
    assert [e.utc for e in only] == [e.utc for e in ev if e.kind == "sunset"]
    assert only[0].as_json("Europe/Paris")["time_local"].endswith("+02:00")


def test_next_event_matches_events():
    after = _utc("2026-08-12T12:00:00Z")
    nxt = almanac.next_event(NANTES, "sunset", after)
    first = almanac.events(NANTES, after, after + timedelta(days=2), kinds=["sunset"])[0]
    assert nxt == first.utc and nxt > after
    # POSIX seconds and ISO text are accepted too.
    assert almanac.next_event(NANTES, "sunset", after.timestamp()) == nxt
    assert almanac.next_event(NANTES, "sunset", "2026-08-12T14:00+02:00") == nxt


def test_polar_night_and_midnight_sun():
    # Longyearbyen: no sunrise in December (polar night), the Sun returns in mid-February and the
    # midnight Sun ends late in August (common practice for Svalbard, 78 N).
    dec = almanac.events(LONGYEARBYEN, _utc("2025-12-01T00:00:00Z"), _utc("2026-01-01T00:00:00Z"),
                         kinds=["sunrise", "sunset"])
    assert dec == []
    back = almanac.next_event(LONGYEARBYEN, "sunrise", _utc("2025-12-01T00:00:00Z"))
    assert _utc("2026-02-08T00:00:00Z") < back < _utc("2026-02-22T00:00:00Z")
    last = almanac.next_event(LONGYEARBYEN, "sunset", _utc("2026-05-01T00:00:00Z"))
    assert _utc("2026-08-18T00:00:00Z") < last < _utc("2026-08-30T00:00:00Z")


def test_south_pole_sunrise_once_a_year():
    # At the South Pole the Sun rises once a year, just before the September equinox (common
    # practice).  After 2050-10-01 the next one falls beyond the ephemeris (ends 2050-12-31).
    pole = Site(-90.0, 0.0, 2835.0)
    rise = almanac.next_event(pole, "sunrise", _utc("2026-04-01T00:00:00Z"))
    assert _utc("2026-09-10T00:00:00Z") < rise < _utc("2026-09-30T00:00:00Z")
    with pytest.raises(NotFoundError):
        almanac.next_event(pole, "sunrise", _utc("2050-10-01T00:00:00Z"))


def test_bad_input():
    start, end = _utc("2026-08-10T00:00:00Z"), _utc("2026-08-11T00:00:00Z")
    with pytest.raises(InputError):
        almanac.events(NANTES, start, end, kinds=["sunrise", "moonbow"])
    with pytest.raises(InputError):
        almanac.events(NANTES, end, start)
    with pytest.raises(InputError):
        almanac.next_event(NANTES, "sunrise", datetime(2026, 8, 10))
    with pytest.raises(OutOfRangeError):
        almanac.next_event(NANTES, "sunrise", datetime(1890, 1, 1, tzinfo=UTC))
    with pytest.raises(InputError):
        almanac.next_event(NANTES, "sunrise", "yesterday-ish")


def test_polar_sampling_agrees_with_hour_angle_search(monkeypatch):
    # Two different skyfield search methods on the same definitions: the altitude sampling used
    # poleward of 70 deg must give the hour-angle search's times (find_risings) where both work.
    site = Site(66.0, 25.7, 100.0)  # Rovaniemi, near the Arctic Circle
    start, end = _utc("2026-03-01T00:00:00Z"), _utc("2026-03-05T00:00:00Z")
    kinds = ["sunrise", "sunset", "moonrise", "moonset", "civil_dawn", "nautical_dusk"]
    fast = almanac.events(site, start, end, kinds)
    monkeypatch.setattr(almanac, "POLAR_LAT_DEG", 60.0)
    sampled = almanac.events(site, start, end, kinds)
    assert [e.kind for e in fast] == [e.kind for e in sampled] and len(fast) >= 20
    for a, b in zip(fast, sampled):
        _assert_close(a.utc, b.utc, 2.0)
