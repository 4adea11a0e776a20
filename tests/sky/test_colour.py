"""B-V -> temperature -> linear sRGB, against published values."""

from __future__ import annotations

import numpy as np
import pytest

from domegen.sky import colour


def test_sun_colour_index_gives_solar_temperature():
    # Ballesteros (2012), EPL 97, 34008: the Sun's B-V = 0.65 gives ~5,778 K, close to the
    # Sun's effective temperature 5,772 K (IAU 2015 Resolution B3 nominal value).
    assert colour.bv_to_temperature_K(0.65) == pytest.approx(5778.0, abs=15.0)
    assert colour.bv_to_temperature_K(0.65) == pytest.approx(5800.0, rel=0.01)


def test_temperature_falls_with_colour_index():
    bv = np.linspace(-0.4, 2.5, 200)
    t = colour.bv_to_temperature_K(bv)
    assert np.all(np.diff(t) < 0)
    # Vega-like B-V = 0 is near 10,000 K (common practice: A0 stars ~9,500-10,000 K).
    assert 9_000 < colour.bv_to_temperature_K(0.0) < 11_000


def test_planckian_locus_matches_illuminant_a():
    # CIE illuminant A is a black body at 2856 K with x = 0.44757, y = 0.40745 (CIE 15:2004).
    x, y = colour.planckian_xy(2856.0)
    assert x == pytest.approx(0.44757, abs=1e-3)
    assert y == pytest.approx(0.40745, abs=1e-3)


def test_d65_white_is_rgb_one():
    # IEC 61966-2-1: the D65 white point (x = 0.3127, y = 0.3290) maps to R = G = B at Y = 1.
    rgb = colour.xy_to_linear_srgb(0.3127, 0.3290)
    assert np.allclose(rgb, 1.0, atol=1e-3)


def test_blue_white_and_orange_stars():
    rgb = colour.bv_to_rgb(np.array([0.0, 1.5]))
    r, g, b = rgb[0]
    assert b > g and b > r  # B-V 0: bluish white (common practice: Vega looks blue-white)
    assert r > 0.7 and g > 0.9  # ... still close to white
    r, g, b = rgb[1]
    assert r > g > b and b < 0.6 * r  # B-V 1.5: orange (common practice: K5-M0 stars)


def test_redness_is_monotone_and_luminance_is_one():
    bv = np.linspace(-0.4, 2.5, 300)
    rgb = colour.bv_to_rgb(bv)
    assert rgb.shape == (300, 3)
    redness = rgb[:, 0] / rgb[:, 2]
    assert np.all(np.diff(redness) > 0)
    assert np.allclose(colour.luminance(rgb), 1.0, atol=1e-12)
    assert np.all(rgb >= 0.0)


def test_clip_rule_keeps_luminance_and_removes_negatives():
    # At the locus's cool end the black body lies outside the sRGB gamut (blue < 0 unclipped).
    x, y = colour.planckian_xy(1667.0)
    raw = colour.XYZ_TO_SRGB @ np.array([x / y, 1.0, (1.0 - x - y) / y])
    assert raw.min() < 0.0
    rgb = colour.temperature_to_rgb(1667.0)
    assert rgb.min() == pytest.approx(0.0, abs=1e-12)
    assert colour.luminance(rgb) == pytest.approx(1.0, abs=1e-12)
    # Hue kept: the clipped colour lies on the line from white through the raw colour.
    raw_n = raw / colour.luminance(raw)
    d1, d2 = raw_n - 1.0, rgb - 1.0
    assert np.allclose(np.cross(d1, d2), 0.0, atol=1e-9)


def test_near_6500_k_is_nearly_white():
    # A 6,500 K black body is close to D65 (common practice): every channel within 6 % of 1.
    assert np.allclose(colour.temperature_to_rgb(6500.0), 1.0, atol=0.06)
