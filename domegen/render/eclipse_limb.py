"""A rough lunar limb: the Moon's edge radius as a function of position angle.

The real limb profile (mountains and valleys of +-2 km about the mean radius,
the reason the NASA canon uses k = 0.272281 for umbral contacts against the
mean 0.2725076, a 1.45 km difference) is replaced by a seeded random profile
with the same character: a sum of Fourier modes with random phases and an
amplitude spectrum falling as k^-1/2 from k = 30 (features of ~0.2-10 deg
along the limb, i.e. 5-300 km), normalised to an
RMS height of 0.8 km and clipped to -2.6..+2.6 km.  Deterministic for a seed.
Light of the photosphere passing through the valleys makes Baily's beads.
"""

from __future__ import annotations

import functools

import numpy as np

#: Samples around the limb (0.044 deg, ~1.3 km of lunar limb each).
N_SAMPLES = 8192
RMS_KM = 0.8
CLIP_KM = 2.6
_K_MIN, _K_MAX = 30, 2048


@functools.lru_cache(maxsize=8)
def limb_profile_km(seed: int) -> np.ndarray:
    """Limb height above the mean radius, km, at N_SAMPLES position angles 0..2pi (read-only)."""
    rng = np.random.default_rng([int(seed) & 0xFFFFFFFF, 0x4C494D42])  # "LIMB"
    k = np.arange(_K_MIN, _K_MAX + 1)
    amp = 1.0 / np.sqrt(k)
    phase = rng.uniform(0.0, 2.0 * np.pi, k.size)
    spec = np.zeros(N_SAMPLES // 2 + 1, dtype=complex)
    spec[k] = amp * np.exp(1j * phase) * rng.rayleigh(1.0, k.size)
    h = np.fft.irfft(spec, n=N_SAMPLES)
    h *= RMS_KM / np.sqrt(np.mean(h * h))
    h = np.clip(h, -CLIP_KM, CLIP_KM)
    h.flags.writeable = False
    return h


def limb_height_km(pa_rad, seed: int) -> np.ndarray:
    """Height (km) of the limb above the mean radius at position angles (radians, any shape)."""
    h = limb_profile_km(seed)
    x = (np.asarray(pa_rad, dtype=float) % (2.0 * np.pi)) * (N_SAMPLES / (2.0 * np.pi))
    i = np.floor(x).astype(np.int64)
    f = x - i
    i %= N_SAMPLES
    return h[i] * (1.0 - f) + h[(i + 1) % N_SAMPLES] * f
