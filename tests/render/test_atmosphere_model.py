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
    # The tabulated path and a direct ray march (eclipse path with no shadow) are independent
    # integrations of the same model (the march converged with 48 samples per ray).
    fine = PhysicalSky(march_steps=48)
    d = enu(np.array([5.0, 20.0, 45.0, 80.0, 30.0]), np.array([0.0, 90.0, 180.0, 270.0, 300.0])).astype(np.float32)
    for h in (40.0, 5.0, -4.0):
        light = sun_light(h)
        lut = luminance(SKY.radiance(d, light))
        march = luminance(fine.radiance(d, replace(light, shadow=lambda p: np.ones(p.shape[1]))))
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
    evs = [auto_exposure_ev(sun_light(h)) for h in (60.0, 0.0, -6.0, -12.0, -40.0)]
    assert all(a > b for a, b in zip(evs, evs[1:4]))
    assert evs[4] == evs[3]  # below the mesopic floor the eye stops adapting
    assert auto_exposure_ev(sun_light(-6.0)) == evs[2]
    assert 11.0 < evs[0] < 15.0  # clear daylight EV100 (sunny-16 rule: ~15 for sunlit scenes)
    # the sky's average is shown darker at night than by day
    def shown(h, ev):
        return luminance(SKY.radiance(zenith(), sun_light(h)))[0] * exposure_scale(ev)
    assert shown(-40.0, evs[4]) < 0.1 * shown(60.0, evs[0])


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
