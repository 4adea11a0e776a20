"""Point-source extinction: Kasten & Young 1989 air mass, per-channel transmittance."""

from __future__ import annotations

import numpy as np
import pytest

from domegen.render.atmosphere import PhysicalSky, air_mass_kasten_young, spectrum, v_extinction

from .test_atmosphere_helpers import sun_light

SKY = PhysicalSky()
LIGHT = sun_light(-30.0)


def test_kasten_young_values():
    # Kasten & Young 1989 (Appl. Opt. 28, 4735): X(90) = 1, X(0) = 38.0868 from their integration
    # (from memory), which their fitted formula meets within 0.5 %; close to sec z (plane
    # parallel) at 60 deg altitude (common practice).
    assert air_mass_kasten_young(90.0) == pytest.approx(1.0, abs=1e-3)
    assert air_mass_kasten_young(0.0) == pytest.approx(38.0868, rel=5e-3)
    assert air_mass_kasten_young(60.0) == pytest.approx(1.0 / np.sin(np.radians(60.0)), rel=2e-3)


def test_star_at_30_degrees_is_dimmed_by_twice_the_zenith_extinction():
    # Air mass 2 at 30 deg altitude (common practice): delta m(30) = 2 k.
    t = SKY.transmittance(np.array([90.0, 30.0]), LIGHT).astype(np.float64)
    dm = -2.5 * np.log10(t)
    ratio = dm[1] / dm[0]
    assert np.all(np.abs(ratio - 2.0) < 0.06), ratio


def test_visual_extinction_coefficient_is_plausible():
    # k_V 0.15-0.2 mag/air mass at mountain sites (KS91), ~0.2-0.4 at sea level under
    # moderate aerosol loads (from memory); the site height lowers it.
    k = v_extinction(SKY.atmosphere)
    assert 0.2 < k < 0.45
    assert v_extinction(SKY.atmosphere, 2500.0) < 0.7 * k


def test_sun_turns_red_at_sunset_and_stays_white_at_noon():
    t_noon = SKY.transmittance(np.array(60.0), LIGHT)
    t_set = SKY.transmittance(np.array(1.0), LIGHT)
    assert t_noon.shape == (3,)
    assert t_noon[2] / t_noon[0] > 0.7
    assert t_set[0] > t_set[1] > t_set[2] and t_set[2] / t_set[0] < 0.2


def test_noon_sun_illuminance_near_1e5_lux():
    # direct normal illuminance of a clear noon Sun ~ 1e5 lx (USNO Circular 171 total at 60 deg:
    # 1.03e5 lx including the sky)
    t = SKY.transmittance(np.array(60.0), LIGHT)
    e = float(t @ (spectrum.sun_rgb_lux() * spectrum.RGB_LUMA))
    assert 7e4 < e < 1.2e5


def test_below_horizon_sources_vanish_and_shapes_follow_input():
    t = SKY.transmittance(np.array([[-5.0, 10.0], [45.0, 89.0]]), LIGHT)
    assert t.shape == (2, 2, 3) and t.dtype == np.float32
    assert np.all(t[0, 0] == 0.0) and np.all(t[1] > 0.4)
