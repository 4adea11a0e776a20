"""Local circumstances: NASA bulletin city table, skyfield's own topocentric positions, edge cases."""

from __future__ import annotations

from datetime import datetime, timedelta, timezone

import numpy as np
import pytest

from domegen.eclipse import local_circumstances, solar_eclipse_on
from domegen.errors import InputError
from domegen.sky.site import Site
from tests.eclipse._solar_data import canon, dms

BULLETIN = canon()["bulletin_1999"]


def _ut(hms: str) -> datetime:
    return datetime(1999, 8, 11, tzinfo=timezone.utc) + timedelta(
        hours=int(hms[:2]), minutes=int(hms[3:5]), seconds=float(hms[6:]))


@pytest.fixture(scope="module")
def bulletin_sites():
    """Local circumstances of the NASA RP-1398 Table 21 cities, with the bulletin's own Delta T."""
    sites = BULLETIN["sites"]
    lat = np.array([dms(s["lat"]) for s in sites])
    lon = np.array([dms(s["lon"]) for s in sites])
    elev = np.array([s["elev_m"] for s in sites], dtype=float)
    return sites, local_circumstances(solar_eclipse_on("1999-08-11"), (lat, lon, elev),
                                      delta_t_s=BULLETIN["delta_t_s"])


def test_contact_times_match_the_1999_bulletin_table(bulletin_sites):
    sites, lc = bulletin_sites
    assert len(sites) >= 4
    for i, s in enumerate(sites):
        assert lc.type_here[i] == "partial"
        for key in ("c1", "max", "c4"):
            assert abs((lc.utc(key, i) - _ut(s[key])).total_seconds()) <= 5.0, (s["name"], key)
        assert abs(lc.magnitude[i] - s["magnitude"]) <= 0.002
        assert abs(lc.obscuration[i] - s["obscuration"]) <= 0.003
        assert abs(lc.position_angle_deg["c1"][i] - s["p1_deg"]) <= 1.5
        assert abs(lc.position_angle_deg["c4"][i] - s["p4_deg"]) <= 1.5
        assert lc.utc("c2", i) is None and lc.utc("c3", i) is None


def _skyfield_separation(lat, lon, elev, utc):
    """Topocentric apparent Sun-Moon separation and radii (deg) from skyfield's own routines."""
    from skyfield.api import wgs84

    from domegen.eclipse.besselian import EARTH_RADIUS_KM, K_PENUMBRA, SUN_RADIUS_KM
    from domegen.sky.ephemeris import ephemeris, timescale

    eph = ephemeris()
    t = timescale().from_datetime(utc)
    obs = (eph["earth"] + wgs84.latlon(lat, lon, elevation_m=elev)).at(t)
    sun = obs.observe(eph["sun"]).apparent()
    moon = obs.observe(eph["moon"]).apparent()
    sep = sun.separation_from(moon).degrees
    rs = np.degrees(np.arcsin(SUN_RADIUS_KM / sun.distance().km))
    rm = np.degrees(np.arcsin(K_PENUMBRA * EARTH_RADIUS_KM / moon.distance().km))
    return sep, rs, rm


@pytest.mark.parametrize("lat, lon, elev", [(32.7767, -96.797, 150.0), (40.7128, -74.006, 10.0),
                                            (19.43, -99.13, 2240.0)])
def test_maximum_and_magnitude_agree_with_skyfield(lat, lon, elev):
    e = solar_eclipse_on("2024-04-08")
    lc = local_circumstances(e, Site(lat, lon, elev))
    t_max = lc.utc("max")
    sep, rs, rm = _skyfield_separation(lat, lon, elev, t_max)
    before, _, _ = _skyfield_separation(lat, lon, elev, t_max - timedelta(seconds=20))
    after, _, _ = _skyfield_separation(lat, lon, elev, t_max + timedelta(seconds=20))
    assert sep <= before and sep <= after  # a minimum of the separation
    expected = rm / rs if sep < abs(rm - rs) else (rs + rm - sep) / (2 * rs)
    assert abs(expected - lc.magnitude[0]) <= 0.002
    c1 = lc.utc("c1")
    sep1, rs1, rm1 = _skyfield_separation(lat, lon, elev, c1)
    assert abs(sep1 - (rs1 + rm1)) * 3600 < 1.0  # arcsec: the limbs touch at C1


def test_vectorised_equals_one_site_at_a_time():
    e = solar_eclipse_on("2023-10-14")
    rng = np.random.default_rng(5)
    lat = rng.uniform(-40, 60, 50)
    lon = rng.uniform(-140, -20, 50)
    many = local_circumstances(e, (lat, lon))
    for i in (0, 7, 33):
        one = local_circumstances(e, (lat[i:i + 1], lon[i:i + 1]))
        assert one.type_here[0] == many.type_here[i]
        for c in ("c1", "max", "c4"):
            a, b = one.utc_s[c][0], many.utc_s[c][i]
            assert (np.isnan(a) and np.isnan(b)) or abs(a - b) < 1e-6


def test_site_in_the_night_sees_nothing():
    lc = local_circumstances(solar_eclipse_on("2024-04-08"), Site(-33.87, 151.21, timezone="Australia/Sydney"))
    assert lc.type_here[0] == "none"
    data = lc.as_json(0, "Australia/Sydney")
    assert data["type_here"] == "none" and data["c1_utc"] is None and data["magnitude"] is None


def test_eclipse_in_progress_at_sunset_is_flagged():
    # Near Burgos, 2026-08-12: totality low in the west, the Sun sets before the partial phase ends.
    lc = local_circumstances(solar_eclipse_on("2026-08-12"), Site(42.34, -3.70, 860.0))
    assert lc.type_here[0] == "total"
    assert lc.above_horizon["c1"][0] and lc.above_horizon["c2"][0] and not lc.above_horizon["c4"][0]
    assert lc.sun_alt_deg["c4"][0] < 0 < lc.sun_alt_deg["c3"][0]
    # Nantes (our demo venue) sees a deep partial eclipse.
    lc = local_circumstances(solar_eclipse_on("2026-08-12"), Site(47.2184, -1.5536, 20.0))
    assert lc.type_here[0] == "partial" and 0.9 < lc.magnitude[0] < 1.0


def test_total_and_annular_durations():
    # Stuttgart, 1999: "a total eclipse of 2 minutes 17 seconds" (F. Espenak, Sky & Telescope, Aug 1996).
    lc = local_circumstances(solar_eclipse_on("1999-08-11"), Site(48.7758, 9.1829, 245.0),
                             delta_t_s=BULLETIN["delta_t_s"])
    assert lc.type_here[0] == "total" and abs(lc.duration_s[0] - 137) <= 5
    # Annular: the point of greatest eclipse of 2023-10-14 sees the canon's central duration (317 s).
    e = solar_eclipse_on("2023-10-14")
    lc = local_circumstances(e, (np.array([e.lat_deg]), np.array([e.lon_deg])))
    assert lc.type_here[0] == "annular" and abs(lc.duration_s[0] - 317) <= 3
    assert abs(lc.magnitude[0] - e.magnitude) < 1e-3


def test_elevation_is_used():
    e = solar_eclipse_on("2024-04-08")
    low = local_circumstances(e, (np.array([25.3]), np.array([-104.1]), np.array([0.0])))
    high = local_circumstances(e, (np.array([25.3]), np.array([-104.1]), np.array([3000.0])))
    assert low.utc_s["c2"][0] != high.utc_s["c2"][0]


def test_bad_sites_are_input_errors():
    e = solar_eclipse_on("2024-04-08")
    with pytest.raises(InputError):
        local_circumstances(e, (np.array([95.0]), np.array([0.0])))
    with pytest.raises(InputError):
        local_circumstances(e, "Paris")


def test_second_and_third_contacts_agree_with_skyfield():
    """At C2 and C3 (Dallas, 2024) skyfield's topocentric limbs touch internally (Moon radius k2)."""
    from skyfield.api import wgs84

    from domegen.eclipse.besselian import EARTH_RADIUS_KM, K_UMBRA, SUN_RADIUS_KM
    from domegen.sky.ephemeris import ephemeris, timescale

    lat, lon, elev = 32.7767, -96.797, 150.0
    lc = local_circumstances(solar_eclipse_on("2024-04-08"), Site(lat, lon, elev))
    eph = ephemeris()
    for c in ("c2", "c3"):
        t = timescale().from_datetime(lc.utc(c))
        obs = (eph["earth"] + wgs84.latlon(lat, lon, elevation_m=elev)).at(t)
        sun = obs.observe(eph["sun"]).apparent()
        moon = obs.observe(eph["moon"]).apparent()
        rs = np.degrees(np.arcsin(SUN_RADIUS_KM / sun.distance().km))
        rm = np.degrees(np.arcsin(K_UMBRA * EARTH_RADIUS_KM / moon.distance().km))
        assert abs(sun.separation_from(moon).degrees - (rm - rs)) * 3600 < 1.0, c
