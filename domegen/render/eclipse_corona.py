"""Light around the eclipsed Sun: corona, chromosphere, prominences.

Units: luminance relative to the mean solar disk B_sun (multiply by the
Sun's mean luminance in cd/m^2).  rho = distance from the Sun's centre in
solar radii, pa = position angle from celestial north through east, radians.

* Corona: Baumbach (1937) mean radial profile
  B/B_sun = 1e-6 (0.0532 rho^-2.5 + 1.425 rho^-7 + 2.565 rho^-17)
  (from memory, flagged in REFERENCES 3.2; consistent with the sourced
  4-5e-6 of the disk near the limb); its K part (rho^-7, rho^-17) is modulated
  in position angle by seeded
  streamers: helmet streamers concentrated toward the solar equator, broad
  at the base and narrowing outward, and fine polar plumes.  The modulation
  has a mean close to 1 around each circle (measured in the tests), so the
  radial profile stays Baumbach's.
  Colour: white (K-corona is scattered photospheric light).
* Chromosphere: a ~2500 km (0.0036 R_sun) shell, pink from H-alpha with some
  H-beta and He D3 (REFERENCES 3.3), surface brightness 1e-4 B_sun (derived
  order of magnitude: the flash spectrum is far brighter than the inner
  corona and far fainter than the photosphere).
* Prominences: seeded arches/plumes 10 000-60 000 km high in the same colour
  at 0.3 of the chromospheric brightness, fading with height.
"""

from __future__ import annotations

import functools

import numpy as np

CHROMOSPHERE_THICKNESS = 2500.0 / 695_700.0
CHROMOSPHERE_B = 1.0e-4
PROMINENCE_B = 3.0e-5
#: Linear sRGB of the chromosphere, luminance 1: H-alpha red with H-beta/He D3 (derived mix).
PINK_RGB = np.array([1.0, 0.16, 0.34]) / (0.2126 * 1.0 + 0.7152 * 0.16 + 0.0722 * 0.34)
#: How far out the corona is drawn, solar radii.
CORONA_RHO_MAX = 8.0


def baumbach_terms(rho) -> tuple[np.ndarray, np.ndarray]:
    """Baumbach's (F, K) parts: the rho^-2.5 term and the rho^-7 + rho^-17 terms, B_sun units."""
    ir = 1.0 / np.maximum(np.asarray(rho, dtype=float), 1.0)
    ir2 = ir * ir
    ir7 = ir2 * ir2 * ir2 * ir
    return 1e-6 * 0.0532 * ir2 * np.sqrt(ir), 1e-6 * (1.425 * ir7 + 2.565 * ir7 * ir7 * ir2 * ir)


def baumbach(rho) -> np.ndarray:
    """Baumbach mean coronal brightness, units of the mean solar disk brightness."""
    f, k = baumbach_terms(rho)
    return f + k


@functools.lru_cache(maxsize=8)
def _streamers(seed: int):
    rng = np.random.default_rng([int(seed) & 0xFFFFFFFF, 0x434F524F])  # "CORO"
    n = int(rng.integers(5, 9))
    # position angles near the solar equator (pa 90 / 270 deg relative to the solar axis) +- 35 deg
    side = rng.choice([0.5 * np.pi, 1.5 * np.pi], n)
    pa = side + rng.normal(0.0, np.radians(20.0), n)
    amp = rng.uniform(0.8, 3.0, n)
    width = np.radians(rng.uniform(8.0, 22.0, n))
    # fine structure: rays in position angle, stronger near the poles (plumes)
    k = np.arange(10, 90)
    ray_amp = rng.rayleigh(1.0, k.size) / k ** 0.5
    ray_phase = rng.uniform(0, 2 * np.pi, k.size)
    prom_n = int(rng.integers(4, 9))
    prom = (rng.uniform(0, 2 * np.pi, prom_n),                        # position angle
            rng.uniform(10_000, 60_000, prom_n) / 695_700.0,           # height, R_sun
            np.radians(rng.uniform(1.0, 5.0, prom_n)),                 # half width
            rng.uniform(0.3, 1.0, prom_n))                             # brightness
    return pa, amp, width, k, ray_amp, ray_phase, prom


_NORM_RHO = np.geomspace(1.0, CORONA_RHO_MAX * 1.5, 48)


_TABLE_PA = 4096


@functools.lru_cache(maxsize=8)
def _table(seed: int) -> np.ndarray:
    """Normalised modulation on a (len(_NORM_RHO), _TABLE_PA + 1) polar grid (last column wraps)."""
    a = np.linspace(0.0, 2.0 * np.pi, _TABLE_PA, endpoint=False)
    m = _modulation(np.repeat(_NORM_RHO, a.size), np.tile(a, _NORM_RHO.size), seed)
    m = m.reshape(_NORM_RHO.size, a.size)
    m /= m.mean(axis=1, keepdims=True)
    m = np.concatenate([m, m[:, :1]], axis=1)
    m.flags.writeable = False
    return m


def corona(rho, pa, seed: int = 0, solar_axis_pa: float = 0.0) -> np.ndarray:
    """Coronal brightness (B_sun units) at rho (>= 1), pa (radians); broadcast shapes.

    The streamer pattern is tabulated on a polar grid (4096 position angles x
    48 radii) and normalised to unit mean around every circle, so the mean
    radial profile is exactly Baumbach's.
    """
    rho, a = np.broadcast_arrays(np.maximum(np.asarray(rho, dtype=float), 1.0),
                                 np.asarray(pa, dtype=float) - solar_axis_pa)
    t = _table(seed)
    # _NORM_RHO is geometric: the fractional index is linear in log(rho)
    fr = np.clip(np.log(rho) * ((_NORM_RHO.size - 1) / np.log(_NORM_RHO[-1])), 0.0, _NORM_RHO.size - 1.0)
    fa = (a % (2.0 * np.pi)) * (_TABLE_PA / (2.0 * np.pi))
    i = np.minimum(fr.astype(np.int64), _NORM_RHO.size - 2)
    j = np.minimum(fa.astype(np.int64), _TABLE_PA - 1)
    u, v = fr - i, fa - j
    m = ((1 - u) * (1 - v) * t[i, j] + u * (1 - v) * t[i + 1, j]
         + (1 - u) * v * t[i, j + 1] + u * v * t[i + 1, j + 1])
    # streamers structure the K-corona (Thomson-scattered, rho^-7 and rho^-17 terms); the dust
    # F-corona (rho^-2.5) stays smooth, slightly flattened toward the solar equator (unit mean)
    f, kc = baumbach_terms(rho)
    return kc * m + f * (1.0 + 0.25 * (np.sin(a) ** 2 - 0.5))


def _modulation(rho, a, seed: int) -> np.ndarray:
    """Streamer and plume modulation (flat arrays in, flat array out)."""
    rho = np.asarray(rho, dtype=float).reshape(-1)
    a = np.asarray(a, dtype=float).reshape(-1)
    spa, amp, width, k, ray_amp, ray_phase, _ = _streamers(seed)
    # helmet streamers: broad at the base, narrowing to rays with height
    w = width[:, None] * (0.35 + 0.65 / rho.reshape(1, -1))
    d = (a.reshape(1, -1) - spa[:, None] + np.pi) % (2.0 * np.pi) - np.pi
    helmets = np.sum(amp[:, None] * np.exp(-0.5 * (d / w) ** 2) * np.sqrt(1.0 - 1.0 / rho.reshape(1, -1) + 0.15),
                     axis=0)
    # mean of the helmet term around a circle, to keep the Baumbach mean
    mean_h = np.sum(amp[:, None] * w * np.sqrt(2 * np.pi) / (2 * np.pi)
                    * np.sqrt(1.0 - 1.0 / rho.reshape(1, -1) + 0.15), axis=0)
    polar = np.abs(np.cos(a.reshape(-1)))  # 1 at the poles
    rays = np.tanh(np.sum(ray_amp[:, None] * np.cos(k[:, None] * a.reshape(1, -1) + ray_phase[:, None]), axis=0))
    fine = 1.0 + (0.08 + 0.22 * polar ** 4) * rays
    # equatorial flattening of the base (solar-minimum shape), unit mean
    shape = 0.55 + 0.9 * (1.0 - polar ** 2)
    return (0.35 + helmets) / (0.35 + mean_h) * fine * shape


def chromosphere_and_prominences(rho, pa, seed: int = 0) -> np.ndarray:
    """Pink emission (B_sun units, luminance) of the chromosphere and prominences at rho, pa."""
    rho = np.asarray(rho, dtype=float)
    a = np.asarray(pa, dtype=float)
    h = rho - 1.0
    chrom = np.where((h >= 0) & (h < CHROMOSPHERE_THICKNESS), CHROMOSPHERE_B, 0.0)
    # soft outer edge (exponential tail of the emission)
    tail = np.maximum(h - CHROMOSPHERE_THICKNESS, 0.0) / (0.3 * CHROMOSPHERE_THICKNESS)
    chrom = chrom + np.where(h >= CHROMOSPHERE_THICKNESS, CHROMOSPHERE_B * np.exp(-np.minimum(tail, 50.0)), 0.0)
    *_, (ppa, ph, pw, pb) = _streamers(seed)
    out = chrom
    near = np.flatnonzero((h >= 0) & (h < ph.max()))
    if near.size:
        hn, an = h.reshape(-1)[near], a.reshape(-1)[near]
        prom = np.zeros(near.size)
        for j in range(ppa.size):  # a handful of prominences, vectorised over pixels
            d = (an - ppa[j] + np.pi) % (2.0 * np.pi) - np.pi
            top = ph[j] * np.exp(-0.5 * (d / pw[j]) ** 2 * (1.0 + 0.5 * np.sin(9.0 * d / pw[j]) ** 2))
            fade = np.exp(-np.clip(hn / (0.6 * ph[j]), 0.0, 50.0))
            prom += np.where(hn < top, PROMINENCE_B * pb[j] * fade, 0.0)
        out = np.array(out, dtype=float).reshape(-1)
        out[near] += prom
        out = out.reshape(h.shape)
    return out
