"""Compiled (numba) kernels for the two full-frame passes that numpy does in several sweeps.

- ``png_rows8`` / ``png_rows16``: tone map three linear planes (exposure
  product, the float32 bit-pattern table of domegen.render.tonemap) and
  interleave them with alpha straight into PNG rows: one read of each float
  and one write of each byte, where numpy needs five sweeps per plane.
- ``upsample_plane``: the bilinear sky upsampling, each output value
  written once (numpy needed a column gather and two sweeps).

Each kernel computes exactly what its numpy form (frame.upsample_plane_numpy,
output.png_rows_numpy) computes: IEEE float32 products and sums in the same
order, and numba's default math contracts no multiply-add; tests compare the
two bit for bit, so a frame's bytes do not depend on which ran (see
render/compiled.py for when each runs).  Indices are unsigned so numba adds
no negative-index wrap.  Compiled on first use and cached beside this module
(numba ``cache=True``), so later processes load them in milliseconds.
"""

from __future__ import annotations

import numba
import numpy as np

_JIT = dict(cache=True, nogil=True, boundscheck=False)


@numba.njit(**_JIT)
def _exposed(rgb, r, a, b, scale, buf):
    """buf[k, a:b] = rgb[k, r, a:b] * scale for the three planes (float32 products)."""
    for k in range(3):
        src, dst = rgb[k, r], buf[k]
        for x in range(a, b):
            dst[x] = src[x] * scale


@numba.njit(**_JIT)
def png_rows8(rgb, r0, r1, lo, hi, scale, table, alpha, rows):
    """Rows r0..r1 of 8-bit RGBA PNG scanlines (filter byte 0) from premultiplied linear RGB.

    rgb (3, H, W) float32 cd/m^2; lo, hi (H,) int64: each row's columns
    [lo, hi) are tone mapped, the rest are 0; scale: float32 cd/m^2 ->
    display-linear; table: uint8 codes indexed by the product's bits >> 15
    (every index present); alpha (H, W) uint8; rows (r1-r0, 1 + 4 W) uint8.
    """
    w = rgb.shape[2]
    buf = np.empty((3, w), np.float32)
    bits = buf.view(np.uint32)
    sh = np.uint32(15)
    for r in range(r0, r1):
        row = rows[r - r0]
        a, b = np.uint64(lo[r]), np.uint64(hi[r])
        row[:1 + 4 * a] = 0
        row[1 + 4 * b:] = 0
        _exposed(rgb, r, a, b, scale, buf)
        al = alpha[r]
        for x in range(a, b):
            q = np.uint64(1) + x * np.uint64(4)
            row[q] = table[bits[0, x] >> sh]
            row[q + np.uint64(1)] = table[bits[1, x] >> sh]
            row[q + np.uint64(2)] = table[bits[2, x] >> sh]
            row[q + np.uint64(3)] = al[x]


@numba.njit(**_JIT)
def png_rows16(rgb, r0, r1, lo, hi, scale, table, base, lo_val, hi_val, alpha, rows):
    """As png_rows8 for 16-bit big-endian samples: the product is clamped to [lo_val, hi_val]
    (float32) and table (uint16) is indexed by (bits >> 8) - base; alpha (H, W) uint16;
    rows (r1-r0, 1 + 8 W) uint8."""
    w = rgb.shape[2]
    buf = np.empty((3, w), np.float32)
    bits = buf.view(np.uint32)
    top = np.uint32(table.size - 1)
    ubase = np.uint32(base)
    for r in range(r0, r1):
        row = rows[r - r0]
        a, b = np.uint64(lo[r]), np.uint64(hi[r])
        row[:1 + 8 * a] = 0
        row[1 + 8 * b:] = 0
        _exposed(rgb, r, a, b, scale, buf)
        for k in range(3):
            dst = buf[k]
            for x in range(a, b):
                v = dst[x]
                if not v >= lo_val:   # also NaN
                    dst[x] = lo_val
                elif v > hi_val:
                    dst[x] = hi_val
        al = alpha[r]
        for x in range(a, b):
            q = np.uint64(1) + x * np.uint64(8)
            for k in range(3):
                c = table[min((bits[k, x] >> np.uint32(8)) - ubase, top)]
                row[q + np.uint64(2 * k)] = c >> 8
                row[q + np.uint64(2 * k + 1)] = c & 255
            row[q + np.uint64(6)] = al[x] >> 8
            row[q + np.uint64(7)] = al[x] & 255


@numba.njit(**_JIT)
def upsample_plane(plane, coarse, ix, wx, starts, ends, wy):
    """Bilinear upsampling of one coarse plane (m, m) into plane (n, n), both float32.

    Along x: tmp[i] = coarse[i, ix] * (1 - wx) + coarse[i, ix + 1] * wx for
    every coarse row i; along y: plane[y] = wy[y] * (tmp[i + 1] - tmp[i]) +
    tmp[i] for the rows y in [starts[i], ends[i]).  ix (n,) int64, wx and wy
    (n,) float32.
    """
    n = plane.shape[1]
    m = coarse.shape[0]
    tmp = np.empty((m, n), np.float32)
    one = np.float32(1.0)
    for i in range(np.uint64(m)):
        c, t = coarse[i], tmp[i]
        for x in range(np.uint64(n)):
            j = np.uint64(ix[x])
            t[x] = c[j] * (one - wx[x]) + c[j + np.uint64(1)] * wx[x]
    d = np.empty(n, np.float32)
    for i in range(starts.size):
        t0, t1 = tmp[i], tmp[i + 1]
        for x in range(np.uint64(n)):
            d[x] = t1[x] - t0[x]
        for y in range(np.uint64(starts[i]), np.uint64(ends[i])):
            out, f = plane[y], wy[y]
            for x in range(np.uint64(n)):
                out[x] = f * d[x] + t0[x]

