"""Daylight and twilight levels against the USNO illuminance model.

Janiczek & DeYoung 1987, "Computer programs for Sun and Moon illuminance with contingent
tables and diagrams", USNO Circular 171: log10 E(lux) = L0 + L1 x + L2 x^2 + L3 x^3, x = h/90,
horizontal illuminance (Sun + sky) under a clear sky; coefficients per Sun-altitude segment.
"""

from __future__ import annotations

import numpy as np
import pytest

from domegen.render.atmosphere import PhysicalSky, spectrum
from domegen.render.atmosphere.exposure import _hemisphere_dirs

from .test_atmosphere_helpers import enu, luminance, sun_light, zenith

# (low, high, L0, L1, L2, L3), USNO Circular 171 (Janiczek & DeYoung 1987)
USNO_SEGMENTS = [
    (20.0, 90.0, 3.74, 3.97, -4.07, 1.47),
    (5.0, 20.0, 3.05, 13.28, -45.98, 64.33),
    (-0.8, 5.0, 2.88, 22.26, -207.64, 1034.30),
    (-5.0, -0.8, 2.88, 21.81, -258.11, -858.36),
    (-12.0, -5.0, 2.70, 12.17, -431.69, -1899.83),
    (-18.0, -12.0, 13.84, 262.72, 1447.42, 2797.93),
]


def usno_illuminance_lux(h):
    for lo, hi, *c in USNO_SEGMENTS:
        if lo < h <= hi:
            x = h / 90.0
            return 10.0 ** (c[0] + c[1] * x + c[2] * x * x + c[3] * x ** 3)
    raise ValueError(h)


def test_usno_transcription():
    # Values of the Circular's polynomial: 1.29e5 lx at 90 deg, 759 lx at 0 deg, 3.4 lx at -6 deg
    # (evaluated by hand from the published coefficients).
    assert usno_illuminance_lux(90.0) == pytest.approx(1.29e5, rel=0.01)
    assert usno_illuminance_lux(0.0) == pytest.approx(759.0, rel=0.01)
    assert usno_illuminance_lux(-6.0) == pytest.approx(3.4, rel=0.02)


SKY = PhysicalSky()
DIRS = _hemisphere_dirs(4096)


def horizontal_illuminance_lux(h):
    light = sun_light(h)
    y = luminance(SKY.radiance(DIRS, light))
    e_sky = 2.0 * np.pi * float(np.mean(y * DIRS[2]))
    t = SKY.transmittance(np.array(h), light)
    e_sun = float(luminance(t * spectrum.sun_rgb_lux())) * max(np.sin(np.radians(h)), 0.0)
    return e_sky + e_sun


@pytest.mark.parametrize("h, tol", [(60.0, 1.5), (30.0, 1.5), (10.0, 1.7), (0.0, 2.0), (-3.0, 2.0),
                                    (-6.0, 2.0), (-9.0, 2.5), (-12.0, 2.5)])
def test_horizontal_illuminance_follows_usno(h, tol):
    ratio = horizontal_illuminance_lux(h) / usno_illuminance_lux(h)
    assert 1.0 / tol < ratio < tol, ratio


def test_twilight_zenith_falls_monotonically_by_orders_of_magnitude():
    # Zenith brightness falls steadily through civil, nautical and astronomical twilight, from
    # about 10^2 cd/m^2 at sunset to the night sky at -18 deg: the zenith V brightness goes from
    # ~7 to ~21.5 mag/arcsec^2 at ESO-Paranal (Patat, Ugolnikov & Postylyakov 2006, A&A 455, 385,
    # Sun zenith distance 94-112 deg; from memory of their figures).
    h = np.arange(0.0, -18.5, -1.0)
    z = np.array([luminance(SKY.radiance(zenith(), sun_light(a)))[0] for a in h])
    assert np.all(np.diff(z) < 0.0), z
    assert z[0] / z[-1] > 1e5
    mag = -2.5 * np.log10(z / 10.8e4)
    assert 6.0 < mag[0] < 8.5 and 21.0 < mag[-1] < 22.2
    # nautical twilight end (-12 deg): USNO mean sky luminance E/pi = 2.6e-3 cd/m^2
    assert 0.3 < z[12] / (usno_illuminance_lux(-12.0) / np.pi) < 3.0


def test_twilight_zenith_is_blue_and_ozone_makes_it_so():
    # Blue zenith in twilight comes from ozone Chappuis absorption (Hulburt 1953, JOSA 43, 113).
    from domegen.render.atmosphere import Atmosphere

    light = sun_light(-6.0)
    with_o3 = SKY.radiance(zenith(), light)[0]
    no_o3 = PhysicalSky(atmosphere=Atmosphere(ozone_du=0.0)).radiance(zenith(), light)[0]
    assert with_o3[2] > 1.5 * with_o3[0]
    assert with_o3[2] / with_o3[0] > 1.3 * (no_o3[2] / no_o3[0])


def test_earth_shadow_and_sunset_glow():
    # Sun 2 deg below the western horizon: the sky just above the eastern horizon lies in Earth's
    # shadow and is darker than the band a few degrees higher (the anti-twilight arch);
    # the western horizon glows warmer (redder) than the zenith.
    light = sun_light(-2.0, az_deg=270.0)
    east = luminance(SKY.radiance(enu([1.0, 8.0], [90.0, 90.0]).astype(np.float32), light))
    assert east[0] < east[1]
    west = SKY.radiance(enu([2.0], [270.0]).astype(np.float32), light)[0]
    top = SKY.radiance(zenith(), light)[0]
    assert west[0] / west[2] > 1.5 * top[0] / top[2]
