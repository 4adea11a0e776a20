"""Point sources: energy-conserving Gaussian splats integrated over each pixel.

A source at frame position (x, y) (pixel centres at half-integers) with
illuminance E (lux, per RGB channel) puts weight w_ij = Wx_j * Wy_i on each
pixel of its footprint, Wx_j = Phi((j+1-x)/s) - Phi((j-x)/s) (the Gaussian
integrated over pixel column j), renormalised so the weights sum to exactly
1: the summed signal is independent of sub-pixel position.  Radiance =
E * w / Omega(theta), Omega the pixel solid angle at the source (sr), so
sum(radiance * Omega) = E.  Bright sources add a wider halo Gaussian holding
a fraction of their light (no clipping to a single white pixel).
Accumulation is np.add.at over all sources of one footprint size at once.
"""

from __future__ import annotations

import functools
import math

import numpy as np

#: Illuminance of a V = 0 source, lux (Hollan 2001).
LUX_AT_V0 = 2.54e-6
#: Core width at 4096 px, pixels (sigma); scaled with the frame size above 4K, never below.
SIGMA_CORE_PX_4K = 0.7
#: Sources brighter than this illuminance (lux, V ~ 2) get a halo.
HALO_LUX = LUX_AT_V0 * 10 ** (-0.4 * 2.0)
HALO_FRACTION = 0.25
HALO_SIGMA_FACTOR = 3.0
#: Largest halo, in units of the core width.
HALO_SIGMA_MAX = 24.0
_TRUNC_SIGMAS = 3.5


#: Pixel solid angle of the reference frame (4096 px across 180 deg), sr.
REFERENCE_OMEGA_SR = (np.pi / 4096.0) ** 2


def point_gain(rad_per_px: float) -> float:
    """Visual gain of point sources on frames coarser than the reference (4096 px / 180 deg).

    A pixel wider than 2.6 arcmin dilutes a star against the sky it also
    covers; multiplying point sources by (pixel / reference pixel) solid angle
    keeps their contrast, so a 1024 px preview shows the sky a 4K dome shows.
    1 at 4K and finer.  Relative photometry (Pogson ratios) is unchanged.
    """
    return float(max(1.0, rad_per_px ** 2 / REFERENCE_OMEGA_SR))


def core_sigma_px(size_px: int) -> float:
    """Minimum splat width (sigma, pixels) for a frame: 0.7 px at <= 4K, the same angle above."""
    return SIGMA_CORE_PX_4K * max(1.0, size_px / 4096.0)


def halo_sigma_px(lux_v: np.ndarray, size_px: int) -> np.ndarray:
    """Halo width (sigma, px) growing as the 4th root of brightness above HALO_LUX."""
    s0 = core_sigma_px(size_px)
    return np.minimum(s0 * HALO_SIGMA_FACTOR * np.maximum(lux_v / HALO_LUX, 1.0) ** 0.25, s0 * HALO_SIGMA_MAX)


#: erf is tabulated on [-ERF_TABLE_REACH, ERF_TABLE_REACH] at this step and interpolated linearly:
#: error <= step^2 / 8 * max|erf''| = 2.9e-8, and monotone (so no weight is ever negative).
ERF_TABLE_STEP = 1.0 / 2048.0
ERF_TABLE_REACH = 6.0


@functools.lru_cache(maxsize=1)
def _erf_table() -> tuple[np.ndarray, np.ndarray]:
    """erf at the table's nodes and the slope to the next node (per node step)."""
    z = np.arange(-ERF_TABLE_REACH, ERF_TABLE_REACH + ERF_TABLE_STEP / 2, ERF_TABLE_STEP)
    value = np.array([math.erf(v) for v in z])
    return value, np.append(np.diff(value), 0.0)


def erf(x: np.ndarray) -> np.ndarray:
    """The error function of an array (within 3e-8), from a table built once with math.erf.

    Cheaper for a worker process than importing scipy.special (0.2 s of its start-up);
    the nodes are evenly spaced, so the node is found by arithmetic, not a search.
    Beyond the table's reach erf is +-1 to better than 1e-16.
    """
    value, slope = _erf_table()
    t = (np.clip(x, -ERF_TABLE_REACH, ERF_TABLE_REACH) + ERF_TABLE_REACH) * (1.0 / ERF_TABLE_STEP)
    i = np.minimum(t.astype(np.int64), value.size - 1)
    return value[i] + slope[i] * (t - i)


def _weights_1d(pos: np.ndarray, sigma: np.ndarray, half: int) -> tuple[np.ndarray, np.ndarray]:
    """First pixel index (M,) and normalised weights (M, 2*half+1) along one axis."""
    first = np.floor(pos).astype(np.int64) - half
    edges = first[:, None] + np.arange(2 * half + 2)[None, :]
    cdf = erf((edges - pos[:, None]) / (np.sqrt(2.0) * sigma[:, None]))
    w = np.maximum(np.diff(cdf, axis=1), 0.0)   # a rounding step of the table must not go negative
    w /= w.sum(axis=1, keepdims=True)
    return first, w


def splat(planes: np.ndarray, x_px, y_px, radiance_rgb, sigma_px) -> None:
    """Add Gaussian splats into ``planes`` (3, H, W) float32, in place.

    ``radiance_rgb`` (M, 3): each source's total (E / Omega) per channel, so
    that the pixel values of one source sum to it.  ``sigma_px`` (M,) or scalar.
    Footprints are grouped by size; no Python loop over sources.
    """
    x = np.asarray(x_px, dtype=float).ravel()
    y = np.asarray(y_px, dtype=float).ravel()
    if x.size == 0:
        return
    val = np.asarray(radiance_rgb, dtype=np.float64).reshape(-1, 3)
    sig = np.broadcast_to(np.asarray(sigma_px, dtype=float), x.shape)
    _, h, w = planes.shape
    halves = np.ceil(_TRUNC_SIGMAS * sig).astype(np.int64) + 1
    flat = [planes[k].reshape(-1) for k in range(3)]
    for half in np.unique(halves):
        sel = np.flatnonzero(halves == half)
        fx, wx = _weights_1d(x[sel], sig[sel], int(half))
        fy, wy = _weights_1d(y[sel], sig[sel], int(half))
        k = 2 * int(half) + 1
        cols = fx[:, None] + np.arange(k)[None, :]
        rows = fy[:, None] + np.arange(k)[None, :]
        wgt = wy[:, :, None] * wx[:, None, :]                      # (m, k, k)
        ok = ((rows >= 0) & (rows < h))[:, :, None] & ((cols >= 0) & (cols < w))[:, None, :]
        idx = (rows[:, :, None] * w + cols[:, None, :])[ok]
        src = np.broadcast_to(np.arange(sel.size)[:, None, None], ok.shape)[ok]
        wv = wgt[ok]
        for c in range(3):
            np.add.at(flat[c], idx, (wv * val[sel, c][src]).astype(np.float32))


def splat_sources(planes: np.ndarray, size_px: int, x_px, y_px, lux_rgb, omega_sr, *,
                  halo: bool = True, min_sigma_px: float | None = None) -> None:
    """Splat point sources given their illuminance ``lux_rgb`` (M, 3) and pixel solid angle (M,).

    Luminance-weighted brightness decides the halo; the halo carries
    HALO_FRACTION of the light, the core the rest.
    """
    lux = np.asarray(lux_rgb, dtype=float).reshape(-1, 3)
    if lux.shape[0] == 0:
        return
    rad = lux / np.asarray(omega_sr, dtype=float).reshape(-1, 1)
    sigma0 = core_sigma_px(size_px) if min_sigma_px is None else max(min_sigma_px, core_sigma_px(size_px))
    lum = lux @ np.array([0.2126, 0.7152, 0.0722])
    bright = (lum > HALO_LUX) if halo else np.zeros(lum.shape, bool)
    core = np.where(bright[:, None], 1.0 - HALO_FRACTION, 1.0) * rad
    splat(planes, x_px, y_px, core, sigma0)
    if bright.any():
        xb = np.asarray(x_px, dtype=float).ravel()[bright]
        yb = np.asarray(y_px, dtype=float).ravel()[bright]
        splat(planes, xb, yb, HALO_FRACTION * rad[bright], halo_sigma_px(lum[bright], size_px))
