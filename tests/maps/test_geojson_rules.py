"""RFC 7946 rules and published city tables for the GeoJSON path."""

from __future__ import annotations

import datetime as dt
import json

import numpy as np
import pytest

from tests.maps import _geo


@pytest.fixture(scope="module")
def fc_2024():
    from domegen.eclipse import solar_eclipse_on
    from domegen.eclipse.path import compute_path
    from domegen.maps.geojson import path_geojson

    return path_geojson(compute_path(solar_eclipse_on(dt.date(2024, 4, 8)), 60.0))


@pytest.fixture(scope="module")
def antimeridian_fc():
    """The first central eclipse from 2012 on whose path of totality crosses 180 deg (found by the engine)."""
    from domegen.eclipse import find_solar_eclipses
    from domegen.eclipse.path import compute_path
    from domegen.maps.geojson import path_geojson

    start = dt.datetime(2012, 1, 1, tzinfo=dt.timezone.utc)
    for e in find_solar_eclipses(start, start + dt.timedelta(days=3 * 365)):
        if not e.central:
            continue
        path = compute_path(e, 60.0)
        north = path.pieces("umbra_north")
        if any(np.any(np.abs(np.diff(c.lon_deg)) > 180) for c in north):
            return e, path_geojson(path)
    pytest.fail("no antimeridian-crossing path found 2012-2014")


CITIES = _geo.load("cities_2024.json")


@pytest.mark.parametrize("name,lat,lon,src", CITIES["inside"])
def test_published_totality_cities_are_inside(fc_2024, name, lat, lon, src):
    rings = _geo.polygon_rings(_geo.feature(fc_2024, "path")["geometry"])
    assert _geo.inside(rings, lat, lon), f"{name} ({src}) should be inside the path"


@pytest.mark.parametrize("name,lat,lon,src", CITIES["outside"])
def test_published_partial_cities_are_outside(fc_2024, name, lat, lon, src):
    rings = _geo.polygon_rings(_geo.feature(fc_2024, "path")["geometry"])
    assert not _geo.inside(rings, lat, lon), f"{name} ({src}) should be outside the path"


def test_enough_cities_on_each_side():
    assert len(CITIES["inside"]) >= 4 and len(CITIES["outside"]) >= 4


def _positions(geom):
    t = geom["type"]
    c = geom["coordinates"]
    if t == "LineString":
        return [c]
    if t == "MultiLineString":
        return c
    if t == "Polygon":
        return c
    if t == "MultiPolygon":
        return [r for p in c for r in p]
    raise AssertionError(t)


def _check_rfc7946(fc):
    assert fc["type"] == "FeatureCollection"
    json.dumps(fc, allow_nan=False)  # no NaN / Infinity anywhere
    for f in fc["features"]:
        assert f["type"] == "Feature" and isinstance(f["properties"], dict)
        g = f["geometry"]
        for seq in _positions(g):
            a = np.asarray(seq, dtype=float)
            assert a.ndim == 2 and a.shape[1] == 2
            # s. 3.1.1: [longitude, latitude] within the WGS84 ranges
            assert np.all(np.abs(a[:, 0]) <= 180.0) and np.all(np.abs(a[:, 1]) <= 90.0)
            # s. 3.1.9: no segment jumps across the antimeridian
            assert np.all(np.abs(np.diff(a[:, 0])) <= 180.0), f["properties"]["name"]
        if g["type"] in ("Polygon", "MultiPolygon"):
            polys = [g["coordinates"]] if g["type"] == "Polygon" else g["coordinates"]
            for p in polys:
                ext = np.asarray(p[0], dtype=float)
                assert len(ext) >= 4 and np.allclose(ext[0], ext[-1])  # s. 3.1.6: closed ring
                from domegen.maps.geojson import signed_area

                assert signed_area(ext[:-1]) > 0, "exterior ring must be counter-clockwise"
        if g["type"] == "LineString" and "times_utc" in f["properties"]:
            assert len(f["properties"]["times_utc"]) == len(g["coordinates"])


def test_rfc7946_rules_on_an_antimeridian_path(antimeridian_fc):
    eclipse, fc = antimeridian_fc
    _check_rfc7946(fc)
    path = _geo.feature(fc, "path")["geometry"]
    assert path["type"] == "MultiPolygon"  # cut at 180 deg
    lons = np.concatenate([r[:, 0] for r in _geo.polygon_rings(path)])
    assert np.isclose(lons.max(), 180.0) and np.isclose(lons.min(), -180.0)
    central = _geo.feature(fc, "central_line")
    assert central["geometry"]["type"] == "MultiLineString"
    ends = [p[-1][0] for p in central["geometry"]["coordinates"]] + \
           [p[0][0] for p in central["geometry"]["coordinates"]]
    assert any(abs(abs(x) - 180.0) < 1e-9 for x in ends)
    # times follow every vertex of every part, and increase along the line
    for coords, times in zip(central["geometry"]["coordinates"], central["properties"]["times_utc"]):
        assert len(coords) == len(times) and times == sorted(times)


def test_coordinate_order_is_lon_lat(fc_2024):
    # The canon's greatest point 2024 is 25.3 N, 104.1 W: the nearest central-line
    # vertex must be near [-104.1, 25.3], not [25.3, -104.1].
    line = _geo.line_parts(_geo.feature(fc_2024, "central_line")["geometry"])[0]
    d = np.hypot(line[:, 0] + 104.1, line[:, 1] - 25.3)
    assert d.min() < 0.5


def test_rules_checker_catches_clockwise_and_jumps():
    bad = {"type": "FeatureCollection", "features": [{"type": "Feature", "properties": {"name": "x"},
           "geometry": {"type": "Polygon", "coordinates": [[[0, 0], [0, 1], [1, 1], [1, 0], [0, 0]]]}}]}
    with pytest.raises(AssertionError):
        _check_rfc7946(bad)
    bad["features"][0]["geometry"] = {"type": "LineString", "coordinates": [[179, 0], [-179, 1]]}
    with pytest.raises(AssertionError):
        _check_rfc7946(bad)


def test_split_line_interpolates_the_crossing():
    from domegen.maps.geojson import split_line

    parts = split_line([0.0, 2.0], [179.0, -179.0], [0.0, 10.0])
    assert len(parts) == 2
    (lo1, la1, t1), (lo2, la2, t2) = parts
    assert lo1[-1] == 180.0 and lo2[0] == -180.0
    assert la1[-1] == pytest.approx(1.0) and t2[0] == pytest.approx(5.0)


def test_polar_cap_ring_is_closed_over_the_pole():
    from domegen.maps.geojson import signed_area, split_polygon

    lon = np.linspace(-180, 180, 73)[:-1]
    rings = split_polygon(np.full(lon.size, 70.0), lon)
    assert rings and all(signed_area(r[:-1]) > 0 for r in rings)
    assert max(r[:, 1].max() for r in rings) == 90.0


def test_polar_path_polygon_contains_the_pole():
    from domegen.eclipse import solar_eclipse_on
    from domegen.eclipse.path import compute_path
    from domegen.maps.geojson import path_geojson

    e = solar_eclipse_on(dt.date(2021, 6, 10))
    fc = path_geojson(compute_path(e, 60.0))
    _check_rfc7946(fc)
    rings = _geo.polygon_rings(_geo.feature(fc, "path")["geometry"])
    # canon greatest point 80.8 N 66.8 W (NASA Five Millennium Canon) and the pole are inside
    assert _geo.inside(rings, 80.8, -66.8) and _geo.inside(rings, 89.9, 10.0)
    assert not _geo.inside(rings, 45.4, -75.7)  # Ottawa: partial only (common knowledge)
