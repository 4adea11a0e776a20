"""Pixel probes on rendered maps and globes, the land-mask cache, the shadow at an instant."""

from __future__ import annotations

import datetime as dt
import subprocess
import sys

import numpy as np
import pytest

from domegen.maps import landmask


@pytest.fixture(scope="module")
def eclipse_2026():
    from domegen.eclipse import solar_eclipse_on

    return solar_eclipse_on(dt.date(2026, 8, 12))


def _pixel(img, lat, lon, width, lon0=0.0):
    h = img.shape[0]
    x = int(((lon - lon0 + 180.0) % 360.0) / 360.0 * width)
    y = int((90.0 - lat) / 180.0 * h)
    return img[y, x]


def test_map_pixel_shows_the_path_band_where_the_path_is(eclipse_2026):
    from domegen.maps.layers import path_ring
    from domegen.maps.render import eclipse_path, render_world_map

    path = eclipse_path(eclipse_2026)
    img = render_world_map(eclipse_2026, 1440, overlay_only=True, path=path).to_array()
    # a point midway between the two limits at the same instant is inside the band
    c = path.pieces("central")[0]
    n, s = path.pieces("umbra_north")[0], path.pieces("umbra_south")[0]
    k = len(c.utc_s) * 3 // 4
    t = c.utc_s[k]
    lat = 0.5 * (np.interp(t, n.utc_s, n.lat_deg) + np.interp(t, s.utc_s, s.lat_deg))
    lon = 0.5 * (np.interp(t, n.utc_s, n.lon_deg) + np.interp(t, s.utc_s, s.lon_deg))
    lat += 0.08  # off the central line's own stroke, still well inside (path ~290 km wide)
    band = _pixel(img, lat, lon, 1440)
    assert band[3] > 100, "overlay must be opaque-ish on the path"
    assert band[0] > band[2] + 60, "the band is amber (red well above blue)"
    # far from every curve the overlay is fully transparent
    assert _pixel(img, -45.0, 100.0, 1440)[3] == 0
    ring = path_ring(path)
    assert ring is not None and len(ring[0]) > 100


def test_map_pixel_shows_land_where_the_land_mask_says_land(eclipse_2026):
    from global_land_mask import globe  # the package itself is the reference

    from domegen.maps.render import render_world_map
    from domegen.maps.style import DEFAULT

    width = 1440
    img = render_world_map(eclipse_2026, width, night=False, graticule_deg=90.0).to_array()
    overlay = render_world_map(eclipse_2026, width, overlay_only=True).to_array()
    rng = np.random.default_rng(7)
    lat = rng.uniform(-60, 70, 400)
    lon = rng.uniform(-180, 180, 400)
    # keep probes whose neighbourhood (+-0.5 deg) is all land or all sea in the reference
    d = np.linspace(-0.5, 0.5, 5)
    la = np.clip(lat[:, None, None] + d[None, :, None], -89.9, 89.9)
    lo = ((lon[:, None, None] + d[None, None, :] + 180) % 360) - 180
    ref = globe.is_land(la.ravel(), lo.ravel()).reshape(la.shape[0], -1)
    clear = ref.all(axis=1) | (~ref).all(axis=1)
    land_rgb = np.array(DEFAULT.land[:3]) * 255
    sea_rgb = np.array(DEFAULT.sea[:3]) * 255
    n_land = 0
    for a, o, is_land in zip(lat[clear], lon[clear], ref[clear, 0]):
        if _pixel(overlay, a, o, width)[3] > 0:
            continue  # under a path curve: the land colour is covered there
        px = _pixel(img, a, o, width)[:3].astype(float)
        near_land = np.linalg.norm(px - land_rgb) < np.linalg.norm(px - sea_rgb)
        if abs(a) < 60:  # below the polar ice tint
            assert near_land == bool(is_land), (a, o, px)
            n_land += bool(is_land)
    assert n_land >= 20 and clear.sum() >= 200


def test_cached_mask_is_used_without_importing_global_land_mask(tmp_path):
    landmask.land_grid()  # builds the cache in this test session's folder
    code = ("import sys; from domegen.maps import landmask as m; "
            "v = m.is_land([48.85, 0.0], [2.35, -30.0]); "
            "print(list(map(bool, v)), 'global_land_mask' in sys.modules)")
    import os

    env = dict(os.environ)
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=env,
                         check=True, timeout=60).stdout.strip()
    assert out == "[True, False] False"  # Paris land, mid-Atlantic sea (common knowledge)


def test_damaged_cache_is_rebuilt(monkeypatch, tmp_path):
    monkeypatch.setenv("DOMEGEN_CACHE_DIR", str(tmp_path))
    (tmp_path / landmask._FILE).write_bytes(b"not a numpy file")
    calls = []

    def fake():
        calls.append(1)
        return np.full(landmask._SHAPE, 255, dtype=np.uint8)

    monkeypatch.setattr(landmask, "_derive", fake)
    landmask._load.cache_clear()
    try:
        assert landmask.land_fraction(10.0, 10.0) == pytest.approx(1.0)
        assert calls == [1]
        with np.load(tmp_path / landmask._FILE) as z:
            assert z["land"].shape == landmask._SHAPE
    finally:
        landmask._load.cache_clear()


def test_equirect_box_filter_matches_point_sampling_on_average():
    full = landmask.land_fraction_equirect(720, 360)
    lat = 90 - (np.arange(360) + 0.5) / 2
    lon = -180 + (np.arange(720) + 0.5) / 2
    pts = landmask.land_fraction(*np.meshgrid(lat, lon, indexing="ij"))
    assert abs(full.mean() - pts.mean()) < 0.005
    # Earth's land fraction incl. Antarctica and lakes on a plate carree grid is ~1/3 here
    assert 0.28 < full.mean() < 0.38


def test_shadow_at_greatest_point_has_the_greatest_magnitude(eclipse_2026):
    from domegen.maps import shadow

    p = shadow.ecef_points(np.array([eclipse_2026.lat_deg]), np.array([eclipse_2026.lon_deg]))
    s = shadow.shadow_at(eclipse_2026, eclipse_2026.greatest_utc.timestamp(), p)
    assert s["central"][0] and s["m"][0] < 1e-4
    # engine's greatest magnitude (its own formula) and ours agree
    assert s["magnitude"][0] == pytest.approx(eclipse_2026.magnitude, abs=2e-4)


def test_shadow_magnitude_agrees_with_local_circumstances(eclipse_2026):
    from domegen.eclipse.local import local_circumstances
    from domegen.maps import shadow
    from domegen.sky.site import Site

    sites = [Site(47.2184, -1.5536, 0.0, 10.0, 1010.0, "Europe/Paris"),
             Site(42.34, -3.70, 0.0, 10.0, 1010.0, "Europe/Madrid")]
    lc = local_circumstances(eclipse_2026, sites)
    for i, s in enumerate(sites):
        t = float(lc.utc_s["max"][i])
        sh = shadow.shadow_at(eclipse_2026, t, shadow.ecef_points(np.array([s.lat_deg]),
                                                                  np.array([s.lon_deg])))
        assert sh["magnitude"][0] == pytest.approx(float(lc.magnitude[i]), abs=2e-3)


def test_globe_frame_is_pure_and_shows_the_umbra(eclipse_2026):
    from domegen.maps.render import GlobeTrack, render_track_frame

    track = GlobeTrack("2026-08-12", frame_count=3, size_px=160, stamp=False, show_path=False)
    a = np.asarray(render_track_frame(track, 1))
    b = np.asarray(render_track_frame(track, 1))
    assert np.array_equal(a, b)
    assert a.shape == (160, 160, 4) and a[0, 0, 3] == 0  # transparent outside the disc
    with pytest.raises(Exception):
        render_track_frame(track, 3)


def test_globe_pixel_under_the_umbra_is_dark(eclipse_2026):
    from domegen.maps.render import render_globe

    img = render_globe(eclipse_2026, 400, draw_path=False).to_array()
    lit = render_globe(eclipse_2026, 400, draw_path=False, shadow_at_utc=False).to_array()
    # the globe is centred on the greatest point, where the umbra is at greatest eclipse;
    # sample just beside the centre (the umbra edge line is drawn around it)
    c = img[200, 200, :3].astype(int)
    assert c.sum() < 0.5 * lit[200, 200, :3].astype(int).sum() + 5
    # far outside the penumbra (the antipode side is off the disc; take the limb near the south)
    assert np.array_equal(img[385, 200], lit[385, 200])


def test_path_round_the_pole_fills_a_polar_band_not_the_map():
    # 2021-06-10 annular: the central line reaches 88.3 N, so the path covers the North Pole
    # (canon: greatest eclipse at 80.8 N, path 527 km wide).
    from domegen.eclipse import solar_eclipse_on
    from domegen.maps.render import render_world_map

    e = solar_eclipse_on(dt.date(2021, 6, 10))
    img = render_world_map(e, 720, overlay_only=True, lon0_deg=0.0).to_array()
    assert img[0, :, 3].min() > 60          # top row (89.9 N) inside the band at every longitude
    assert img[300, :, 3].max() == 0         # 60 S: nothing drawn for this northern eclipse
    row_60n = img[int(30 / 180 * 360), :, 3]
    assert (row_60n > 100).mean() < 0.2      # at 60 N only a short stretch is in the band


def test_globe_seen_from_the_sun_is_all_day(eclipse_2026):
    # Centred on the subsolar point, the whole visible hemisphere is lit: no night darkening
    # anywhere well inside the limb (the terminator is the limb itself; geometry, common practice).
    from domegen.maps import basemap
    from domegen.maps.projection import Orthographic

    lat, lon = basemap.subsolar_point(eclipse_2026.greatest_utc)
    proj = Orthographic(200, lat, lon)
    night = basemap.night_alpha(proj, eclipse_2026.greatest_utc)
    yy, xx = np.mgrid[0:200, 0:200]
    inner = np.hypot(xx + 0.5 - 100, yy + 0.5 - 100) < 0.8 * proj.radius_px
    assert night[inner].max() == 0.0
    # and seen from the opposite side it is all night
    anti = Orthographic(200, -lat, lon + 180.0)
    assert basemap.night_alpha(anti, eclipse_2026.greatest_utc)[inner].min() > 0.99


def test_bad_globe_centre_is_refused(eclipse_2026):
    from domegen.errors import InputError, OutOfRangeError
    from domegen.maps.render import render_globe

    with pytest.raises(InputError):
        render_globe(eclipse_2026, 64, centre="moon")
    with pytest.raises(OutOfRangeError):
        render_globe(eclipse_2026, 64, centre=(95.0, 0.0))
    with pytest.raises(OutOfRangeError):
        render_globe(eclipse_2026, 9000)
