"""Lunar eclipse rendering: the umbra's edge on the disk, penumbral dimming, Danjon levels.

The shading (domegen.render.eclipse_lunar) works per surface point in 3D from
the site; the check value comes from the independent geocentric shadow
geometry of the eclipse search (domegen.eclipse.lunar_shadow: Danjon radii, the
Moon's distance from the shadow axis), scaled to the site's view of the Moon.
"""

from __future__ import annotations

import math
from datetime import timedelta

import numpy as np
import pytest

from domegen.eclipse.lunar import lunar_eclipse_on
from domegen.eclipse.lunar_shadow import shadow_geometry
from domegen.render.eclipse_lunar import disk_mean_light, shade_points, umbral_colour, umbral_level
from domegen.sky.bodies import body_positions
from domegen.sky.site import Site
from domegen.sky.times import unix_seconds

HONOLULU = Site(21.3069, -157.8583, 5.0)   # the Moon high during the 2022-11-08 eclipse
_Y = np.array([0.2126, 0.7152, 0.0722])


def _profile(ecl, utc, n=2001):
    """Light along the disk diameter that points at the shadow axis, from the sunlit limb inward.

    Returns (t in Moon radii from the centre toward the axis, direct, luminance, predicted edge t).
    """
    u = float(unix_seconds(utc))
    b = body_positions(HONOLULU, np.array([u]))
    m = b.index("Moon")
    c = b.enu_refracted[m, :, 0]
    r = math.radians(float(b.angular_radius_deg[m, 0]))
    tt = timescale_tt(utc)
    geo = shadow_geometry(np.array([tt]))
    # direction on the sky toward the shadow axis where it passes the Moon: the axis point at the
    # Moon's geocentric distance, seen from the site (so the Moon's parallax is accounted for)
    from domegen.render.eclipse_lunar import _site_geocentre_enu
    from domegen.sky.bodies import gcrs_to_enu

    rot = gcrs_to_enu(HONOLULU, np.array([u]))[:, :, 0]
    axis_point = rot @ (geo["axis"][:, 0] * geo["dm_km"][0]) - _site_geocentre_enu(HONOLULU, u)
    a = axis_point / np.linalg.norm(axis_point)
    w = a - c * (a @ c)
    w /= np.linalg.norm(w)
    t = np.linspace(-0.999, 0.999, n)
    dirs = c[:, None] * np.cos(t * r) + w[:, None] * np.sin(t * r)
    direct, refr = shade_points(HONOLULU, u, b, dirs, 2.0)
    lum = direct + refr @ _Y
    # Check value, from the eclipse module's shadow (Danjon radii, apparent geocentric axis) in GCRS:
    # each sight line meets the Moon's sphere at Q; Q is in the umbra when its angle from the axis,
    # seen from the Earth's centre, is below the umbral radius at Q's distance.
    from domegen.eclipse.lunar_shadow import DANJON_FACTOR, EARTH_RADIUS_KM, SUN_SEMIDIAMETER_1AU_RAD, AU_KM
    from domegen.sky.times import to_time

    site_gcrs = HONOLULU.topos.at(to_time(np.array([u]))).position.km.reshape(3)
    moon_gcrs = geo["moon_km"][:, 0]
    r_km = float(b.distance_km[m, 0]) * math.sin(r)
    # pixels show refracted directions; the light left the Moon along the true ones
    from domegen.sky.refraction import unrefract

    alt_t = np.radians(unrefract(np.degrees(np.arcsin(dirs[2])), HONOLULU.temperature_C, HONOLULU.pressure_mbar))
    hor = np.cos(alt_t) / np.hypot(dirs[0], dirs[1])
    true = np.stack([dirs[0] * hor, dirs[1] * hor, np.sin(alt_t)])
    sight = rot.T @ true                              # ENU -> GCRS
    rel = moon_gcrs - site_gcrs
    bb = rel @ sight
    disc = bb * bb - (rel @ rel - r_km * r_km)
    q = site_gcrs[:, None] + sight * (bb - np.sqrt(np.maximum(disc, 0.0)))
    dq = np.linalg.norm(q, axis=0)
    ang = np.arccos(np.clip((geo["axis"][:, 0] @ q) / dq, -1.0, 1.0))
    ds = float(np.linalg.norm(geo["sun_km"][:, 0]))
    ru = (DANJON_FACTOR * np.arcsin(EARTH_RADIUS_KM / dq) - np.arcsin(np.sin(SUN_SEMIDIAMETER_1AU_RAD) * AU_KM / ds)
          + np.arcsin(EARTH_RADIUS_KM / ds))
    inside = ang < ru
    t_edge = float(t[int(np.argmax(inside))])
    return t, direct, lum, t_edge


def timescale_tt(utc):
    from domegen.sky.ephemeris import timescale

    return float(timescale().from_datetime(utc).tt)


@pytest.fixture(scope="module")
def eclipse():
    return lunar_eclipse_on("2022-11-08")


@pytest.mark.parametrize("minutes_after_u1", [20.0, 45.0])
def test_umbra_edge_where_geometry_puts_it(eclipse, minutes_after_u1):
    utc = eclipse.contacts_utc["U1"] + timedelta(minutes=minutes_after_u1)
    t, direct, lum, t_edge = _profile(eclipse, utc)
    assert -1.0 < t_edge < 1.0
    # the rendered geometric edge: the first point along the diameter without direct sunlight
    t_dark = t[int(np.argmax(direct <= 0.0))]
    # within 1 % of the lunar diameter (= 0.02 lunar radii)
    assert abs(t_dark - t_edge) < 0.02, (t_dark, t_edge)
    # The edge an eye would pick, the steepest fall of log-luminance, lies a little outside it,
    # where the last direct sunlight drops to the level of the refracted (umbral) light.
    g = np.gradient(np.log(lum), t)
    t_img = t[int(np.argmin(g))]
    assert t_edge - 0.04 < t_img <= t_edge + 0.002, (t_img, t_edge)


def test_penumbral_dimming_is_smooth_and_monotone(eclipse):
    utc = eclipse.contacts_utc["U1"] - timedelta(minutes=10)   # deep penumbra, no umbra yet
    t, direct, lum, _ = _profile(eclipse, utc)
    assert direct.min() > 0.0                                    # no umbra yet
    inside = direct < 1.0                                       # the penumbra covers part of the disk
    assert 0.2 < inside.mean() < 1.0
    assert np.all(np.diff(direct) <= 0)                         # darker toward the axis
    assert np.all(np.diff(direct[inside]) < 0)
    assert np.max(np.abs(np.diff(direct, 2))) < 1e-3             # no steps


def test_danjon_levels_and_colours():
    x = np.linspace(0.0, 1.0, 11)
    for L in (0.0, 1.0, 2.0, 3.0, 4.0):
        lev = umbral_level(x, L)
        assert np.all(np.diff(lev) > 0)                           # darker toward the centre
        rgb = umbral_colour(x, L)
        assert np.allclose(rgb @ _Y, 1.0, atol=1e-6)
    # brighter with L; a totally eclipsed Moon ~9 (L=4) to ~16 (L=0) mag below the full Moon (from memory)
    centre = [umbral_level(0.0, L) for L in range(5)]
    assert np.all(np.diff(centre) > 0)
    assert 10 ** (-0.4 * 17) < centre[0] < 10 ** (-0.4 * 14)
    assert 10 ** (-0.4 * 10) < umbral_level(1.0, 4.0) < 10 ** (-0.4 * 3)
    # red: R well above G above B, for L = 2 everywhere in the umbra ("deep red or rust")
    rgb = umbral_colour(x, 2.0)
    assert np.all(rgb[:, 0] > 3 * rgb[:, 1]) and np.all(rgb[:, 1] > rgb[:, 2])


def test_moonlight_on_the_sky_follows_the_eclipse(eclipse):
    def mean_light(utc):
        u = float(unix_seconds(utc))
        return disk_mean_light(HONOLULU, u, body_positions(HONOLULU, np.array([u])), 2.0)

    c = eclipse.contacts_utc
    before = mean_light(c["P1"] - timedelta(minutes=5))
    partial = mean_light(c["U1"] + timedelta(minutes=30))
    total = mean_light(c["greatest"])
    assert before == pytest.approx(1.0, abs=1e-9)
    assert 0.05 < partial < 0.9
    assert total < 1e-3
