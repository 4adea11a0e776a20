"""Relative luminance of the physical sky against the CIE standard general sky.

Reference: ISO 15469:2004 / CIE S 011/E:2003, "Spatial distribution of daylight - CIE standard
general sky", sky type 12 "CIE standard clear sky, low luminance turbidity":
gradation group V (a = -1, b = -0.32), indicatrix group 4 (c = 10, d = -3, e = 0.45).
L(Z, az) / Lz = f(chi) phi(Z) / (f(Zs) phi(0)),
phi(Z) = 1 + a exp(b / cos Z), f(chi) = 1 + c (exp(d chi) - exp(d pi / 2)) + e cos^2 chi.
"""

from __future__ import annotations

import numpy as np
import pytest

from domegen.render.atmosphere import PhysicalSky

from .test_atmosphere_helpers import enu, luminance, sun_light, zenith

TYPE_12 = dict(a=-1.0, b=-0.32, c=10.0, d=-3.0, e=0.45)


def cie_relative_luminance(z_rad, chi_rad, zs_rad, a, b, c, d, e):
    """CIE general sky, luminance relative to the zenith."""
    def phi(z):
        return 1.0 + a * np.exp(b / np.maximum(np.cos(z), 0.004))

    def f(x):
        return 1.0 + c * (np.exp(d * x) - np.exp(d * np.pi / 2)) + e * np.cos(x) ** 2

    return f(chi_rad) * phi(z_rad) / (f(zs_rad) * phi(0.0))


def test_reference_formula_is_the_classic_clear_sky():
    # Type 12 reduces to the classic CIE (1973) clear sky: f = 0.91 + 10 exp(-3 chi) + 0.45 cos^2 chi,
    # phi = 1 - exp(-0.32 / cos Z) (Kittler; from memory). Check the transcription at a few points.
    z, chi, zs = np.radians([30.0, 70.0]), np.radians([40.0, 100.0]), np.radians(50.0)
    classic_f = lambda x: 0.91 + 10 * np.exp(-3 * x) + 0.45 * np.cos(x) ** 2  # noqa: E731
    classic_phi = lambda x: 1 - np.exp(-0.32 / np.cos(x))  # noqa: E731
    expect = classic_f(chi) * classic_phi(z) / (classic_f(zs) * classic_phi(0.0))
    np.testing.assert_allclose(cie_relative_luminance(z, chi, zs, **TYPE_12), expect, rtol=2e-3)


@pytest.mark.parametrize("sun_alt_deg", [30.0, 60.0])
def test_clear_sky_matches_cie_type_12_within_20_percent(sun_alt_deg):
    sky = PhysicalSky()
    light = sun_light(sun_alt_deg, az_deg=135.0)
    alt, az = np.meshgrid(np.arange(10.0, 90.0, 10.0), np.arange(0.0, 360.0, 30.0))
    dirs = enu(alt.ravel(), az.ravel()).astype(np.float32)
    chi = np.arccos(np.clip(light.sun_enu @ dirs, -1.0, 1.0))
    keep = chi > np.radians(15.0)  # the aureole next to the Sun is left out
    model = luminance(sky.radiance(dirs, light)) / luminance(sky.radiance(zenith(), light))[0]
    ref = cie_relative_luminance(np.radians(90.0 - alt.ravel()), chi, np.radians(90.0 - sun_alt_deg),
                                 **TYPE_12)
    ratio = model[keep] / ref[keep]
    assert keep.sum() > 80
    assert np.all(np.abs(ratio - 1.0) < 0.20), (ratio.min(), ratio.max())


def test_cie_comparison_can_fail_for_an_overcast_distribution():
    # The same physical sky is far from the CIE overcast type 1 (a=4, b=-0.7, c=0, d=-1, e=0):
    # the check above discriminates between sky types.
    sky = PhysicalSky()
    light = sun_light(30.0)
    dirs = enu(np.full(12, 20.0), np.arange(0.0, 360.0, 30.0)).astype(np.float32)
    chi = np.arccos(np.clip(light.sun_enu @ dirs, -1.0, 1.0))
    model = luminance(sky.radiance(dirs, light)) / luminance(sky.radiance(zenith(), light))[0]
    ref = cie_relative_luminance(np.radians(70.0), chi, np.radians(60.0), a=4.0, b=-0.7, c=0.0, d=-1.0, e=0.0)
    assert np.max(np.abs(model / ref - 1.0)) > 0.5
