"""Land/sea coverage grid derived once from the global-land-mask package and cached.

global-land-mask holds a 30 arc-second boolean grid (21600 x 43200, about 0.9 GB
in memory and ~5.6 s to import).  We reduce it once to the land *fraction* of
3 arc-minute cells (3600 x 7200, uint8 0..255), store it compressed in
``domegen.cache.cache_dir()`` and afterwards never import global_land_mask:
loading the cached grid takes a fraction of a second.
"""

from __future__ import annotations

import functools
import io

import numpy as np

from domegen.cache import atomic_write_bytes, cache_dir

#: Cell size of the derived grid, degrees (3 arc-minutes).
CELL_DEG = 0.05
#: How many 30" source samples make one derived cell along each axis.
_BLOCK = 6
_FILE = "landmask-3arcmin-v1.npz"
_SHAPE = (3600, 7200)  # rows from 90 N southwards, columns from 180 W eastwards


def _derive() -> np.ndarray:
    """Land fraction (0..255) per 3' cell from global-land-mask (slow: import ~6 s, 0.9 GB)."""
    from global_land_mask import globe  # only here, once per cache folder

    ocean = globe._mask  # (21600, 43200) bool, True = ocean; row i at lat 90 - i/120
    rows, cols = ocean.shape
    out = np.empty(_SHAPE, dtype=np.uint8)
    step = 600  # source rows per chunk keeps the temporary small
    for r0 in range(0, rows, step):
        chunk = ~ocean[r0:r0 + step]
        blocks = chunk.reshape(step // _BLOCK, _BLOCK, cols // _BLOCK, _BLOCK)
        frac = blocks.sum(axis=(1, 3), dtype=np.uint16) / float(_BLOCK * _BLOCK)
        out[r0 // _BLOCK:(r0 + step) // _BLOCK] = np.round(frac * 255).astype(np.uint8)
    return out


def cache_path():
    return cache_dir() / _FILE


@functools.lru_cache(maxsize=2)
def _load(path_str: str) -> np.ndarray:
    from pathlib import Path

    path = Path(path_str)
    if path.exists():
        try:
            with np.load(path) as z:
                grid = z["land"]
            if grid.shape == _SHAPE and grid.dtype == np.uint8:
                return grid
        except (OSError, ValueError, KeyError):
            pass  # damaged cache file: rebuild below
    grid = _derive()
    buf = io.BytesIO()
    np.savez_compressed(buf, land=grid)
    atomic_write_bytes(path, buf.getvalue())
    return grid


def land_grid() -> np.ndarray:
    """The cached (3600, 7200) uint8 land-fraction grid (built on first use)."""
    return _load(str(cache_path()))


def land_fraction(lat_deg, lon_deg) -> np.ndarray:
    """Land fraction 0..1 (float32) at geodetic lat/lon (degrees, any shape), bilinear.

    Lakes count as land, as in global-land-mask.
    """
    grid = land_grid().reshape(-1)
    nr, nc = _SHAPE
    lat = np.nan_to_num(np.asarray(lat_deg, dtype=np.float32))
    lon = np.nan_to_num(np.asarray(lon_deg, dtype=np.float32))
    # Continuous cell coordinates with cell centres at integers.
    r = np.clip((np.float32(90.0) - lat) * np.float32(1 / CELL_DEG) - np.float32(0.5), 0.0, nr - 1.001)
    c = np.mod(lon + np.float32(180.0), np.float32(360.0)) * np.float32(1 / CELL_DEG) - np.float32(0.5)
    r0 = r.astype(np.int32)
    fr = r - r0
    c0f = np.floor(c)
    fc = c - c0f
    c0 = c0f.astype(np.int32)
    c0 = np.where(c0 < 0, c0 + nc, c0)
    c1 = np.where(c0 + 1 >= nc, c0 + 1 - nc, c0 + 1)
    base = r0 * nc
    g00 = grid[base + c0].astype(np.float32)
    g01 = grid[base + c1].astype(np.float32)
    top = g00 + (g01 - g00) * fc
    base += nc
    g10 = grid[base + c0].astype(np.float32)
    g11 = grid[base + c1].astype(np.float32)
    bot = g10 + (g11 - g10) * fc
    return (top + (bot - top) * fr) * np.float32(1 / 255.0)


def is_land(lat_deg, lon_deg) -> np.ndarray:
    """Boolean land test from the cached grid (land fraction >= 0.5)."""
    return land_fraction(lat_deg, lon_deg) >= 0.5


def _box_weights(n_out: int, n_in: int, start: float = 0.0):
    """Sparse (n_out, n_in) matrix averaging input cells over each output pixel.

    Output pixel j spans input coordinates [start + j s, start + (j+1) s) with
    s = n_in / n_out, wrapped modulo n_in (for longitude).
    """
    from scipy.sparse import csr_matrix

    s = n_in / n_out
    lo = start + np.arange(n_out) * s
    hi = lo + s
    k = int(np.ceil(s)) + 1
    cells = np.floor(lo)[:, None] + np.arange(k)[None, :]
    w = np.clip(np.minimum(hi[:, None], cells + 1) - np.maximum(lo[:, None], cells), 0.0, None) / s
    rows = np.repeat(np.arange(n_out), k)
    m = csr_matrix((w.ravel().astype(np.float32), (rows, cells.ravel().astype(np.int64) % n_in)),
                   shape=(n_out, n_in))
    m.sum_duplicates()
    return m


def land_fraction_equirect(width_px: int, height_px: int, lon0_deg: float = 0.0) -> np.ndarray:
    """(H, W) float32 land fraction averaged over each pixel of a plate carree map.

    Exact box filter over the 3' cells (pixel and cell edges are both lines of
    constant latitude/longitude), so small maps are anti-aliased and large ones
    keep every cell.
    """
    grid = land_grid()
    nr, nc = _SHAPE
    wr = _box_weights(height_px, nr)
    start = ((lon0_deg - 180.0 + 180.0) % 360.0) / CELL_DEG
    wc = _box_weights(width_px, nc, start)
    rows = (wr @ grid.astype(np.float32)).astype(np.float32)  # (H, nc)
    out = np.ascontiguousarray((wc @ rows.T).T, dtype=np.float32)  # (H, W), C order
    out *= np.float32(1 / 255.0)
    return np.clip(out, 0.0, 1.0, out=out)
