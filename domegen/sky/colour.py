"""Star colour: B-V -> temperature -> black-body chromaticity -> linear sRGB.

* Temperature: Ballesteros (2012), EPL 97, 34008 (arXiv:1201.1809),
  T = 4600 K [1/(0.92 (B-V) + 1.7) + 1/(0.92 (B-V) + 0.62)].
* Chromaticity of a black body at T: the cubic-spline fit to the Planckian
  locus in CIE 1931 xy by Kim et al. (US patent 7,024,034; "Design of
  advanced color temperature control system for HDTV applications", J.
  Korean Phys. Soc. 41, 865, 2002), valid 1667-25000 K; temperatures are
  clamped to that range.
* xyY with Y = 1 -> XYZ -> linear sRGB with the IEC 61966-2-1:1999 matrix
  (D65 white).
* Clip rule (one, used everywhere): a hot star's red or a cool star's blue
  may come out slightly negative (outside the sRGB gamut).  The colour is
  desaturated toward the equal-luminance white (1, 1, 1) just enough that
  no channel is negative; that keeps luminance Y = 1 and hue.  Channels
  above 1 are allowed (linear light, the renderer scales by flux).
"""

from __future__ import annotations

import numpy as np

#: sRGB (IEC 61966-2-1) XYZ -> linear RGB, D65.
XYZ_TO_SRGB = np.array([[3.2406, -1.5372, -0.4986],
                        [-0.9689, 1.8758, 0.0415],
                        [0.0557, -0.2040, 1.0570]])
#: Luminance weights of linear sRGB (second row of the inverse matrix, IEC 61966-2-1).
SRGB_LUMINANCE = np.array([0.2126, 0.7152, 0.0722])

T_MIN_K = 1667.0
T_MAX_K = 25000.0


def bv_to_temperature_K(bv) -> np.ndarray:
    """Effective temperature (K) for Johnson B-V (Ballesteros 2012); same shape.

    The formula diverges near B-V = -0.67 (and -1.85); B-V is clamped to
    [-0.4, 2.5] first, past the range of real stars.
    """
    b = np.clip(np.asarray(bv, dtype=float), -0.4, 2.5)
    return 4600.0 * (1.0 / (0.92 * b + 1.7) + 1.0 / (0.92 * b + 0.62))


def planckian_xy(temperature_K) -> tuple[np.ndarray, np.ndarray]:
    """CIE 1931 (x, y) of a black body (Kim et al. cubic spline), T clamped to 1667-25000 K."""
    T = np.clip(np.asarray(temperature_K, dtype=float), T_MIN_K, T_MAX_K)
    t = 1000.0 / T
    x = np.where(T <= 4000.0,
                 -0.2661239 * t**3 - 0.2343589 * t**2 + 0.8776956 * t + 0.179910,
                 -3.0258469 * t**3 + 2.1070379 * t**2 + 0.2226347 * t + 0.240390)
    y = np.where(T <= 2222.0,
                 -1.1063814 * x**3 - 1.34811020 * x**2 + 2.18555832 * x - 0.20219683,
                 np.where(T <= 4000.0,
                          -0.9549476 * x**3 - 1.37418593 * x**2 + 2.09137015 * x - 0.16748867,
                          3.0817580 * x**3 - 5.87338670 * x**2 + 3.75112997 * x - 0.37001483))
    return x, y


def xy_to_linear_srgb(x, y) -> np.ndarray:
    """Linear sRGB (..., 3) of chromaticity (x, y) at luminance Y = 1, clip rule applied."""
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    xyz = np.stack([x / y, np.ones_like(x), (1.0 - x - y) / y], axis=-1)
    rgb = xyz @ XYZ_TO_SRGB.T
    # Renormalise to Y = 1 exactly with the matrix's own luminance row (the
    # 4-decimal matrices are not exact inverses of each other).
    rgb = rgb / (rgb @ SRGB_LUMINANCE)[..., None]
    # Desaturate toward white (1,1,1) (Y = 1 too) until no channel is negative.
    low = rgb.min(axis=-1)
    s = np.where(low < 0.0, 1.0 / (1.0 - low), 1.0)  # mix = white + s (rgb - white)
    return 1.0 + s[..., None] * (rgb - 1.0)


def temperature_to_rgb(temperature_K) -> np.ndarray:
    """Linear sRGB (..., 3), luminance 1, of a black body at ``temperature_K``."""
    return xy_to_linear_srgb(*planckian_xy(temperature_K))


def bv_to_rgb(bv) -> np.ndarray:
    """Linear sRGB (M, 3) with luminance Y = 1 for Johnson B-V values (M,)."""
    return temperature_to_rgb(bv_to_temperature_K(bv))


def luminance(rgb) -> np.ndarray:
    """Y of linear sRGB colours (..., 3)."""
    return np.asarray(rgb, dtype=float) @ SRGB_LUMINANCE
