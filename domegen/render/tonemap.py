"""Linear light -> display codes: exposure in EV, a soft shoulder, the sRGB curve.

Exposure: display = L * 2^EV * 0.18 / DAY_SKY_CD_M2, so EV 0 shows a clear
daytime sky (luminance DAY_SKY_CD_M2) as an 18 % mid-tone and each +1 EV
doubles.  The curve is applied through a lookup table indexed by the float32
bit pattern (sign, exponent and the top mantissa bits), which is exact to the
table's resolution over 30 octaves and costs one shift and one gather per value.
sRGB transfer: IEC 61966-2-1:1999 (C' = 12.92 C below 0.0031308, else
1.055 C^(1/2.4) - 0.055).
"""

from __future__ import annotations

import functools
import math

import numpy as np

from domegen.render._buffers import scratch

#: Luminance of a clear daytime sky, cd/m^2 ("a few thousand", from memory), exposed as a mid-tone at EV 0.
DAY_SKY_CD_M2 = 4000.0
MID_GREY = 0.18
#: Display-linear value where the highlight shoulder starts.
SHOULDER = 0.8
#: Display-linear range of the 16-bit table (values are clamped to it; the 8-bit table covers every float).
LUT_MIN = 2.0 ** -24
LUT_MAX = 2.0 ** 6
_SHIFT = {8: 15, 16: 8}


def exposure_scale(ev: float) -> float:
    """Multiplier from luminance (cd/m^2) to display-linear for exposure ``ev``."""
    return MID_GREY / DAY_SKY_CD_M2 * 2.0 ** float(ev)


def auto_exposure_ev(sky_luminance_cd_m2: float) -> float:
    """Automatic exposure for a sky of typical luminance L (cd/m^2).

    Partial adaptation: 0.76 of the full log2(DAY_SKY/L) correction, so a
    natural night sky (1.7e-4 cd/m^2) lands near display 0.003 (dark, with
    mag-6 stars well above it) and twilight stays dusky rather than grey.
    """
    lum = max(float(sky_luminance_cd_m2), 1e-7)
    return float(np.clip(0.76 * math.log2(DAY_SKY_CD_M2 / lum), -8.0, 40.0))


def srgb_encode(c):
    """sRGB transfer of display-linear values 0..1 (float64 arrays)."""
    c = np.clip(np.asarray(c, dtype=float), 0.0, 1.0)
    return np.where(c <= 0.0031308, 12.92 * c, 1.055 * np.power(c, 1 / 2.4) - 0.055)


def srgb_decode(v):
    """Inverse sRGB transfer, 0..1 -> linear."""
    v = np.asarray(v, dtype=float)
    return np.where(v <= 0.04045, v / 12.92, np.power((v + 0.055) / 1.055, 2.4))


def shoulder(d):
    """Soft roll-off of highlights above SHOULDER toward 1 (C1 continuous)."""
    d = np.asarray(d, dtype=float)
    w = 1.0 - SHOULDER
    return np.where(d <= SHOULDER, d, SHOULDER + w * (1.0 - np.exp(-(d - SHOULDER) / w)))


@functools.lru_cache(maxsize=4)
def lut(bit_depth: int) -> tuple[np.ndarray, int]:
    """(codes, base): the code of display-linear v is codes[(bits(v) >> shift) - base], v in [LUT_MIN, LUT_MAX]."""
    shift = _SHIFT[bit_depth]
    lo = int(np.float32(LUT_MIN).view(np.uint32)) >> shift
    hi = int(np.float32(LUT_MAX).view(np.uint32)) >> shift
    codes = np.arange(lo, hi + 1, dtype=np.uint64)
    # value at the middle of each bucket of bit patterns
    mid = ((codes << np.uint64(shift)) + np.uint64(1 << (shift - 1))).astype(np.uint32).view(np.float32)
    v = srgb_encode(shoulder(mid.astype(np.float64)))
    top = (1 << bit_depth) - 1
    dtype = np.uint8 if bit_depth == 8 else np.uint16
    table = np.rint(v * top).astype(dtype)
    table[0] = 0
    table.flags.writeable = False
    return table, lo


@functools.lru_cache(maxsize=1)
def full_lut8() -> np.ndarray:
    """8-bit table over every float32 bit pattern >> 15 (2^17 entries): no clipping pass needed.

    Negative values (sign bit set) map to 0, values above the table's top to 255.
    """
    table, base = lut(8)
    full = np.zeros(1 << 17, dtype=np.uint8)
    full[base:base + table.size] = table
    full[base + table.size:1 << 16] = 255
    full.flags.writeable = False
    return full


def tone_map_plane(plane: np.ndarray, ev: float, bit_depth: int = 8, out: np.ndarray | None = None) -> np.ndarray:
    """One (H, W) linear plane (cd/m^2, contiguous float32) -> (H, W) uint8/uint16 sRGB codes.

    ``out``: an (H, W) array of the code type to fill (it may be strided, e.g.
    one channel of interleaved PNG rows), saving a copy.
    """
    if bit_depth not in _SHIFT:
        raise ValueError("bit_depth must be 8 or 16")
    buf = scratch("tonemap", plane.shape, np.float32)
    np.multiply(plane, np.float32(exposure_scale(ev)), out=buf)
    bits = buf.view(np.uint32)
    if bit_depth == 8:
        np.right_shift(bits, np.uint32(15), out=bits)
        table = full_lut8()   # every 17-bit index has an entry: "wrap" never wraps, and skips the bounds pass
    else:
        table, base = lut(bit_depth)
        np.fmax(buf, np.float32(LUT_MIN), out=buf)   # fmax: NaN -> LUT_MIN, as in kernels.png_rows16
        np.fmin(buf, np.float32(LUT_MAX), out=buf)
        np.right_shift(bits, np.uint32(_SHIFT[bit_depth]), out=bits)
        np.subtract(bits, np.uint32(base), out=bits)
    if out is None:
        return table[bits]
    if out.flags.c_contiguous:
        return np.take(table, bits, out=out, mode="wrap")
    # a gather into a strided target is slower than a contiguous gather and a copy
    codes = np.take(table, bits, out=scratch("tonemap-codes", plane.shape, table.dtype), mode="wrap")
    out[...] = codes
    return out


def tone_map(rgb_planar: np.ndarray, ev: float, bit_depth: int = 8) -> np.ndarray:
    """(3, H, W) linear cd/m^2 -> (3, H, W) uint8/uint16 sRGB codes."""
    return np.stack([tone_map_plane(np.ascontiguousarray(p), ev, bit_depth) for p in rgb_planar])


def alpha_codes(alpha: np.ndarray, bit_depth: int = 8, out: np.ndarray | None = None) -> np.ndarray:
    """Coverage 0..1 (H, W) -> integer alpha codes, in bands of rows (no full-size float temporaries)."""
    top = (1 << bit_depth) - 1
    if out is None:
        out = np.empty(alpha.shape, dtype=np.uint8 if bit_depth == 8 else np.uint16)
    for r0 in range(0, alpha.shape[0], 256):
        band = np.clip(alpha[r0:r0 + 256], 0.0, 1.0).astype(np.float32, copy=False)
        band *= np.float32(top)
        band += np.float32(0.5)
        out[r0:r0 + 256] = band
    return out
