"""PhysicalSky as a SkyModel: shapes, absolute level, LUT vs ray march, eclipses, exposure."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest

from domegen.render.atmosphere import PhysicalSky, auto_exposure_ev, exposure_scale
from domegen.render.sky_model import SkyLight, SkyModel

from .test_atmosphere_helpers import enu, luminance, sun_light, zenith

SKY = PhysicalSky()


def random_dirs(n, seed=1):
    rng = np.random.default_rng(seed)
    d = rng.normal(size=(3, n))
    d /= np.linalg.norm(d, axis=0)
    return d.astype(np.float32)


def test_protocol_shapes_and_values():
    sky: SkyModel = SKY
    d = random_dirs(5000)
    for h in (60.0, 0.5, -8.0, -40.0):
        rgb = sky.radiance(d, sun_light(h))
        assert rgb.shape == (5000, 3) and rgb.dtype == np.float32
        assert np.all(np.isfinite(rgb)) and np.all(rgb >= 0.0)


def test_clear_noon_zenith_is_a_few_thousand_cd_m2_and_blue():
    # Clear-sky zenith luminance of order 10^3-10^4 cd/m^2 with the Sun high (from memory;
    # REFERENCES for totality comparisons quote "a few thousand cd/m^2").
    rgb = SKY.radiance(zenith(), sun_light(60.0))[0]
    assert 2000.0 < luminance(rgb) < 10000.0
    assert rgb[2] > rgb[1] > rgb[0]


def test_lut_path_agrees_with_ray_march():
    # The tabulated path and a direct ray march are independent integrations of the same model
    # (the march converged with 48 samples per ray).
    from domegen.render.atmosphere.scatter import marched_xyz, scattered_xyz, site_table

    d = enu(np.array([5.0, 20.0, 45.0, 80.0, 30.0]), np.array([0.0, 90.0, 180.0, 270.0, 300.0])).astype(np.float32)
    table = site_table(SKY.atmosphere, 0.0)
    for h in (40.0, 5.0, -4.0):
        s = sun_light(h).sun_enu
        lut = scattered_xyz(table, d, s)[:, 1]
        march = marched_xyz(SKY.atmosphere, 0.0, d, s, lambda p: np.ones(p.shape[1]), 48)[:, 1]
        np.testing.assert_allclose(march, lut, rtol=0.10)


def test_eclipse_shadow_modulates_in_scattered_sunlight():
    light = sun_light(40.0)
    d = random_dirs(2000)
    d[2] = np.abs(d[2])
    full = luminance(SKY.radiance(d, light))
    half = luminance(SKY.radiance(d, replace(light, shadow=lambda p: np.full(p.shape[1], 0.5))))
    dark = luminance(SKY.radiance(d, replace(light, shadow=lambda p: np.zeros(p.shape[1]))))
    np.testing.assert_allclose(half, 0.5 * full, rtol=0.1)
    assert np.all(dark < 1e-3 * full)
    # a shadow spot 50 km wide around the site's vertical darkens the zenith more than the horizon
    spot = replace(light, shadow=lambda p: (np.hypot(p[0], p[1]) > 50e3).astype(float))
    rel = luminance(SKY.radiance(enu([90.0, 2.0], [0.0, 0.0]).astype(np.float32), spot))
    ref = luminance(SKY.radiance(enu([90.0, 2.0], [0.0, 0.0]).astype(np.float32), light))
    assert rel[0] / ref[0] < 0.5 * rel[1] / ref[1]
    # sun_visible_fraction scales the tabulated path
    part = luminance(SKY.radiance(d, replace(light, sun_visible_fraction=0.25)))
    np.testing.assert_allclose(part, 0.25 * full, rtol=0.02)


def test_auto_exposure_follows_the_sky_and_is_pure():
    hs = (60.0, 0.0, -6.0, -12.0, -40.0)
    evs = [auto_exposure_ev(sun_light(h)) for h in hs]
    assert all(a < b for a, b in zip(evs, evs[1:]))  # darker sky, more exposure
    assert auto_exposure_ev(sun_light(-6.0)) == evs[2]  # pure: same instant, same EV

    def shown(h, ev):
        return luminance(SKY.radiance(zenith(), sun_light(h)))[0] * exposure_scale(ev)

    # what is shown still falls from day to night (partial adaptation), and a dark sky stays dark
    shown_all = [shown(h, ev) for h, ev in zip(hs, evs)]
    assert all(a > b for a, b in zip(shown_all, shown_all[1:]))
    assert 0.05 < shown_all[0] < 0.5 and shown_all[-1] < 0.01
    # a full-Moon sky is shown clearly brighter than a moonless one
    lit = SkyLight(sun_enu=sun_light(-40.0).sun_enu, sun_alt_deg=-40.0, moon_enu=enu(50.0, 180.0),
                   moon_alt_deg=50.0, moon_illuminance_lux=0.3)
    assert luminance(SKY.radiance(zenith(), lit))[0] * exposure_scale(auto_exposure_ev(lit)) > 3 * shown_all[-1]


def test_moon_below_horizon_adds_nothing():
    base = sun_light(-40.0)
    lit = SkyLight(sun_enu=base.sun_enu, sun_alt_deg=-40.0, moon_enu=enu(-30.0, 0.0), moon_alt_deg=-30.0,
                   moon_illuminance_lux=0.3)
    np.testing.assert_allclose(SKY.radiance(zenith(), lit), SKY.radiance(zenith(), base), rtol=1e-6)


@pytest.mark.parametrize("elev", [0.0, 2500.0])
def test_higher_sites_have_darker_blue_skies(elev):
    light = replace(sun_light(45.0), site_elev_m=elev)
    y = luminance(SKY.radiance(zenith(), light))[0]
    low = luminance(SKY.radiance(zenith(), sun_light(45.0)))[0]
    assert y <= low * (1.0 + 1e-6)


def test_totality_sky_with_a_synthetic_umbra():
    # Sun at 46 deg altitude, an umbra 100 km in radius along the Sun's direction, visible fraction
    # rising linearly across a 3500 km penumbra (a stand-in for the eclipse helper's function).
    # Measured during the 2017-08-21 totality (Sun ~46 deg): 12.7-13.3 mag/arcsec^2 overhead
    # (nightwise.org sky-quality-meter readings); the horizon glows all around ("360-degree sunset").
    from domegen.render.atmosphere import cd_m2_to_mag_arcsec2

    light = sun_light(46.0, az_deg=150.0)
    s = light.sun_enu

    def umbra(p):
        along = s @ p
        perp = np.linalg.norm(p - np.outer(s, along), axis=0)
        return np.clip((perp - 100e3) / 3.5e6, 0.0, 1.0)

    d = enu(np.array([90.0, 3.0, 3.0, 3.0]), np.array([0.0, 0.0, 150.0, 330.0])).astype(np.float32)
    ecl = luminance(SKY.radiance(d, replace(light, shadow=umbra)))
    mag = cd_m2_to_mag_arcsec2(ecl)
    assert 11.7 < mag[0] < 14.0, mag
    assert np.all(ecl[1:] > 2.0 * ecl[0])


def test_dimmed_sky_raises_the_automatic_exposure():
    # Daytime-stars show technique: a sky dimmed by 1e-4 is exposed like a twilight sky, not like day.
    day = sun_light(50.0)
    full = auto_exposure_ev(day)
    dimmed = auto_exposure_ev(day, dimming=1e-4)
    assert dimmed > full + 8.0
    assert dimmed == auto_exposure_ev(day, dimming=1e-4)
