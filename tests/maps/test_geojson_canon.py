"""GeoJSON path against the NASA Five Millennium Canon (Espenak & Meeus 2006, NASA/TP-2006-214141).

Values in data/canon_eclipses.json are copied from the canon's per-eclipse
pages.  The canon's point of greatest eclipse is recomputed from the canon's
own Besselian elements (Meeus 1989 formulas) to get it beyond the printed
0.1 deg; that value is first checked against the printed one.  Its longitude is
then moved by (our Delta T - canon's) x 15.04 arcsec/s, as the canon rests on
its own extrapolated Delta T.
"""

from __future__ import annotations

import datetime as dt

import numpy as np
import pytest

from tests.maps import _geo

CANON = {e["date"]: e for e in _geo.load("canon_eclipses.json")["eclipses"]}


@pytest.fixture(scope="module")
def geojson_of():
    from domegen.eclipse import solar_eclipse_on
    from domegen.eclipse.path import compute_path
    from domegen.maps.geojson import path_geojson

    cache = {}

    def get(date: str):
        if date not in cache:
            e = solar_eclipse_on(dt.date.fromisoformat(date))
            cache[date] = (e, path_geojson(compute_path(e, 60.0)))
        return cache[date]

    return get


def _shifted_canon_point(date, eclipse):
    canon = CANON[date]
    lat, lon = _geo.canon_central_point(canon)
    # the recomputed canon point must round to the printed one (0.1 deg)
    assert abs(lat - canon["lat_deg"]) <= 0.051 and abs(lon - canon["lon_deg"]) <= 0.051
    lon += (eclipse.delta_t_s - canon["delta_t_s"]) * 15.04 / 3600.0
    return lat, lon


def _nearest_on_line(fc, lat, lon):
    """Distance (km) to the central line, the nearest point and the unit track direction there."""
    best = (np.inf, None, None)
    for part in _geo.line_parts(_geo.feature(fc, "central_line")["geometry"]):
        xy = _geo.enu_km(lat, lon, part[:, 1], part[:, 0])
        d = _geo.point_segment_km(np.zeros(2), xy[:-1], xy[1:])
        i = int(np.argmin(d))
        if d[i] < best[0]:
            a, b = xy[i], xy[i + 1]
            t = b - a
            t /= np.linalg.norm(t)
            foot = a + np.clip(-a @ t / 1.0, 0, np.linalg.norm(b - a)) * t
            best = (float(d[i]), foot, t)
    return best


@pytest.mark.parametrize("date,kind", [("2017-08-21", "total"), ("2021-06-10", "annular"),
                                       ("2023-04-20", "hybrid")])
def test_central_line_passes_canon_greatest_point(geojson_of, date, kind):
    eclipse, fc = geojson_of(date)
    assert eclipse.type == kind
    lat, lon = _shifted_canon_point(date, eclipse)
    dist_km, _, _ = _nearest_on_line(fc, lat, lon)
    assert dist_km < 2.0, f"{date}: central line misses the canon's greatest point by {dist_km:.2f} km"


@pytest.mark.parametrize("date", ["2017-08-21", "2021-06-10", "2023-04-20"])
def test_path_width_on_polygon_matches_canon(geojson_of, date):
    eclipse, fc = geojson_of(date)
    lat, lon = _shifted_canon_point(date, eclipse)
    _, foot, track = _nearest_on_line(fc, lat, lon)
    normal = np.array([-track[1], track[0]])
    hits = []
    for ring in _geo.polygon_rings(_geo.feature(fc, "path")["geometry"]):
        xy = _geo.enu_km(lat, lon, ring[:, 1], ring[:, 0]) - foot
        a, b = xy[:-1], xy[1:]
        # solve a + u (b - a) = s * normal for u in [0, 1]
        dvec = b - a
        den = dvec[:, 0] * normal[1] - dvec[:, 1] * normal[0]
        ok = np.abs(den) > 1e-12
        u = np.where(ok, -(a[:, 0] * normal[1] - a[:, 1] * normal[0]) / np.where(ok, den, 1), -1)
        sel = ok & (u >= 0) & (u <= 1)
        pts = a[sel] + u[sel, None] * dvec[sel]
        hits.extend((pts @ normal).tolist())
    hits = np.array(hits)
    near = hits[np.abs(hits) < 2000.0]
    width = near[near > 0].min() - near[near < 0].max()
    published = CANON[date]["path_width_km"]
    assert abs(width - published) < 3.0, f"{date}: width {width:.1f} km vs canon {published} km"


def test_canon_point_recomputation_detects_a_wrong_delta_t():
    # The check itself can fail: 60 s of Delta T moves the point by 0.25 deg of longitude.
    canon = dict(CANON["2017-08-21"], delta_t_s=CANON["2017-08-21"]["delta_t_s"] + 60.0)
    _, lon = _geo.canon_central_point(canon)
    assert abs(lon - CANON["2017-08-21"]["lon_deg"]) > 0.2
