"""Map projections: equirectangular world map and orthographic globe.

Both map geodetic latitude/longitude (degrees, east positive, WGS84) to pixel
x, y (x right, y down; pixel centres at integer + 0.5).  The globe is drawn as
a sphere seen from far away along a chosen direction; a point is placed by its
geocentric direction, so shapes computed on the ellipsoid keep their place.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass

import numpy as np

from domegen.errors import InputError, OutOfRangeError

#: WGS84 flattening and first eccentricity squared.
WGS84_F = 1.0 / 298.257223563
WGS84_E2 = WGS84_F * (2.0 - WGS84_F)
#: WGS84 equatorial radius, km.
WGS84_A_KM = 6378.137


def geodetic_to_ecef(lat_deg, lon_deg, h_km=0.0):
    """(..., 3) ECEF position in Earth equatorial radii for geodetic lat/lon/height."""
    lat = np.radians(lat_deg)
    lon = np.radians(lon_deg)
    s = np.sin(lat)
    n = 1.0 / np.sqrt(1.0 - WGS84_E2 * s * s)
    h = np.asarray(h_km) / WGS84_A_KM
    return np.stack([(n + h) * np.cos(lat) * np.cos(lon), (n + h) * np.cos(lat) * np.sin(lon),
                     (n * (1.0 - WGS84_E2) + h) * s], axis=-1)


def direction_to_geodetic(v):
    """Geodetic lat/lon (degrees) of the ellipsoid point in direction v (..., 3) from the centre."""
    v = np.asarray(v, dtype=np.float64)
    rho = np.hypot(v[..., 0], v[..., 1])
    lat = np.degrees(np.arctan2(v[..., 2], (1.0 - WGS84_E2) * rho))
    lon = np.degrees(np.arctan2(v[..., 1], v[..., 0]))
    return lat, lon


def _check_latlon(lat_deg, lon_deg, field="centre"):
    if not (np.isfinite(lat_deg) and -90.0 <= lat_deg <= 90.0):
        raise OutOfRangeError("latitude must be within -90..90 degrees", field=field, value=lat_deg)
    if not np.isfinite(lon_deg):
        raise InputError("longitude must be a finite number of degrees", field=field, value=lon_deg)


@dataclass(frozen=True)
class Equirectangular:
    """Plate carree world map ``width_px`` wide, half as tall, centred on ``lon0_deg``."""

    width_px: int
    lon0_deg: float = 0.0

    kind = "equirectangular"

    @property
    def height_px(self) -> int:
        return max(1, self.width_px // 2)

    def forward(self, lat_deg, lon_deg):
        """Pixel x, y (float arrays) and a visibility mask (always True)."""
        lat = np.asarray(lat_deg, dtype=np.float64)
        dlon = (np.asarray(lon_deg, dtype=np.float64) - self.lon0_deg + 180.0) % 360.0 - 180.0
        x = (dlon + 180.0) / 360.0 * self.width_px
        y = (90.0 - lat) / 180.0 * self.height_px
        return x, y, np.ones(np.shape(x), dtype=bool)

    def grid(self):
        """(H, W) geodetic latitude and longitude of every pixel centre, degrees."""
        return _equirect_grid(self.width_px, self.height_px, float(self.lon0_deg))

    def polyline(self, lat_deg, lon_deg) -> np.ndarray:
        """(N', 2) pixel polyline with NaN rows where the line wraps across the map edge."""
        x, y, _ = self.forward(lat_deg, lon_deg)
        return _break_jumps(np.c_[x, y], 0.5 * self.width_px)

    def polygon_rings(self, lat_deg, lon_deg) -> list[np.ndarray]:
        """Rings to fill for a closed lat/lon ring, unwrapped and repeated across the seam."""
        lat = np.asarray(lat_deg, dtype=np.float64)
        lon = np.degrees(np.unwrap(np.radians(np.asarray(lon_deg, dtype=np.float64) - self.lon0_deg)))
        close = ((lon[0] - lon[-1]) + 180.0) % 360.0 - 180.0
        if abs(lon[-1] + close - lon[0]) > 180.0:  # the ring goes round a pole: close it over the pole
            pole = 90.0 if np.nanmean(lat) > 0 else -90.0
            end = lon[-1] + close
            lon = np.r_[lon, end, end, lon[0]]
            lat = np.r_[lat, lat[0], pole, pole]
        x = (lon + 180.0) / 360.0 * self.width_px
        x = x - np.floor(np.nanmin(x) / self.width_px) * self.width_px
        y = (90.0 - lat) / 180.0 * self.height_px
        return [np.c_[x + k * self.width_px, y] for k in (-1, 0, 1)]


@functools.lru_cache(maxsize=4)
def _equirect_grid(w: int, h: int, lon0: float):
    lon = lon0 - 180.0 + (np.arange(w) + 0.5) * 360.0 / w
    lon = (lon + 180.0) % 360.0 - 180.0
    lat = 90.0 - (np.arange(h) + 0.5) * 180.0 / h
    lat2, lon2 = np.broadcast_arrays(lat[:, None], lon[None, :])
    return lat2, lon2


def _break_jumps(p: np.ndarray, limit: float) -> np.ndarray:
    if len(p) < 2:
        return p
    jump = np.abs(np.diff(p[:, 0])) > limit
    if not jump.any():
        return p
    idx = np.flatnonzero(jump) + 1
    return np.insert(p, idx, np.nan, axis=0)


@dataclass(frozen=True)
class Orthographic:
    """Globe of diameter ``disc_frac`` x size seen from above (lat0, lon0), north up."""

    size_px: int
    lat0_deg: float = 0.0
    lon0_deg: float = 0.0
    disc_frac: float = 0.94

    kind = "orthographic"

    def __post_init__(self):
        _check_latlon(self.lat0_deg, self.lon0_deg)

    @property
    def width_px(self) -> int:
        return self.size_px

    @property
    def height_px(self) -> int:
        return self.size_px

    @property
    def radius_px(self) -> float:
        return 0.5 * self.disc_frac * self.size_px

    def basis(self) -> np.ndarray:
        """(3, 3) rows: screen-right, screen-up, toward-viewer unit vectors in ECEF."""
        return _ortho_basis(float(self.lat0_deg), float(self.lon0_deg))

    def forward_vec(self, v):
        """Pixel x, y and visibility for ECEF directions v (..., 3)."""
        v = np.asarray(v, dtype=np.float64)
        v = v / np.linalg.norm(v, axis=-1, keepdims=True)
        e, n, u = np.moveaxis(v @ self.basis().T, -1, 0)
        c = 0.5 * self.size_px
        return c + self.radius_px * e, c - self.radius_px * n, u >= 0.0

    def forward(self, lat_deg, lon_deg):
        return self.forward_vec(geodetic_to_ecef(lat_deg, lon_deg))

    def grid_vectors(self):
        """(H, W, 3) ECEF unit direction of each pixel centre (NaN off the disc)."""
        return _ortho_grid(self.size_px, float(self.lat0_deg), float(self.lon0_deg),
                           float(self.disc_frac))

    def grid(self):
        """(H, W) geodetic latitude and longitude of each pixel, NaN off the disc."""
        return _ortho_latlon(self.size_px, float(self.lat0_deg), float(self.lon0_deg),
                             float(self.disc_frac))

    def polyline(self, lat_deg, lon_deg) -> np.ndarray:
        x, y, vis = self.forward(lat_deg, lon_deg)
        p = np.c_[x, y]
        p[~vis] = np.nan
        return p

    def polygon_rings(self, lat_deg, lon_deg) -> list[np.ndarray]:
        """One ring; points on the far side are pushed to the limb (a fair clip for bands)."""
        v = geodetic_to_ecef(lat_deg, lon_deg)
        v = v / np.linalg.norm(v, axis=-1, keepdims=True)
        e, n, u = np.moveaxis(v @ self.basis().T, -1, 0)
        if (u < 0).all():
            return []
        back = u < 0
        r = np.hypot(e, n)
        e = np.where(back, e / np.maximum(r, 1e-12), e)
        n = np.where(back, n / np.maximum(r, 1e-12), n)
        c = 0.5 * self.size_px
        return [np.c_[c + self.radius_px * e, c - self.radius_px * n]]

    def disc_coverage(self) -> np.ndarray:
        """(H, W) float32 anti-aliased coverage of the globe disc (read-only, cached)."""
        return _disc(self.size_px, float(self.radius_px))


@functools.lru_cache(maxsize=8)
def _ortho_basis(lat0, lon0):
    la, lo = np.radians(lat0), np.radians(lon0)
    u = np.array([np.cos(la) * np.cos(lo), np.cos(la) * np.sin(lo), np.sin(la)])
    e = np.array([-np.sin(lo), np.cos(lo), 0.0])
    n = np.cross(u, e)
    return np.stack([e, n, u])


@functools.lru_cache(maxsize=4)
def _ortho_grid(size, lat0, lon0, frac):
    c = 0.5 * size
    r = 0.5 * frac * size
    s = (np.arange(size) + 0.5 - c) / r
    e = s[None, :]
    n = -s[:, None]
    rr = e * e + n * n
    u = np.sqrt(np.where(rr <= 1.0, 1.0 - rr, np.nan))
    e, n = np.broadcast_arrays(e, n)
    b = _ortho_basis(lat0, lon0)
    v = np.stack([e, n, u], axis=-1) @ b
    v.setflags(write=False)
    return v


@functools.lru_cache(maxsize=4)
def _ortho_latlon(size, lat0, lon0, frac):
    """float32 (H, W) geodetic lat/lon of the globe pixels (NaN off the disc), component-wise."""
    c = 0.5 * size
    r = 0.5 * frac * size
    s = ((np.arange(size) + 0.5 - c) / r).astype(np.float32)
    e = s[None, :]
    n = -s[:, None]
    u = np.sqrt(np.where(e * e + n * n <= 1.0, 1.0 - e * e - n * n, np.nan)).astype(np.float32)
    b = _ortho_basis(lat0, lon0).astype(np.float32)
    vx = e * b[0, 0] + n * b[1, 0] + u * b[2, 0]
    vy = e * b[0, 1] + n * b[1, 1] + u * b[2, 1]
    vz = e * b[0, 2] + n * b[1, 2] + u * b[2, 2]
    lat = np.degrees(np.arctan2(vz, np.float32(1.0 - WGS84_E2) * np.hypot(vx, vy)))
    lon = np.degrees(np.arctan2(vy, vx))
    lat.setflags(write=False)
    lon.setflags(write=False)
    return lat, lon


def coarse_samples(proj, step: int = 4):
    """Coarse sample positions covering the image and their geodetic lat/lon.

    Returns xs (Wc,), ys (Hc,) pixel coordinates (first and last pixel centres
    included) and lat, lon (Hc, Wc).  On a globe, samples beyond the limb take
    the limb point below them, so smooth fields stay continuous there.
    """
    w, h = proj.width_px, proj.height_px
    xs = np.linspace(0.5, w - 0.5, max(2, int(np.ceil(w / step)) + 1))
    ys = np.linspace(0.5, h - 0.5, max(2, int(np.ceil(h / step)) + 1))
    if proj.kind == "equirectangular":
        lon = proj.lon0_deg - 180.0 + xs / w * 360.0
        lat = 90.0 - ys / h * 180.0
        lat2, lon2 = np.meshgrid(lat, lon, indexing="ij")
        return xs, ys, lat2, ((lon2 + 180.0) % 360.0) - 180.0
    c = 0.5 * proj.size_px
    e = (xs[None, :] - c) / proj.radius_px
    n = -(ys[:, None] - c) / proj.radius_px
    e, n = np.broadcast_arrays(e, n)
    r = np.hypot(e, n)
    scale = np.where(r > 1.0, 1.0 / np.maximum(r, 1e-12), 1.0)
    e, n = e * scale, n * scale
    u = np.sqrt(np.clip(1.0 - e * e - n * n, 0.0, 1.0))
    v = np.stack([e, n, u], axis=-1) @ proj.basis()
    lat, lon = direction_to_geodetic(v)
    return xs, ys, lat, lon


def upsample(field: np.ndarray, xs: np.ndarray, ys: np.ndarray, width: int, height: int) -> np.ndarray:
    """Bilinear (H, W) float32 image of a coarse field sampled at (ys, xs) pixel coordinates."""
    f = np.asarray(field, dtype=np.float32)

    def weights(coords, n_out):
        x = np.arange(n_out) + 0.5
        u = np.interp(x, coords, np.arange(coords.size))
        i0 = np.minimum(np.floor(u).astype(np.int64), coords.size - 2)
        return i0, (u - i0).astype(np.float32)

    r0, fr = weights(ys, height)
    c0, fc = weights(xs, width)
    rows = f[r0] * (1 - fr)[:, None] + f[r0 + 1] * fr[:, None]  # (H, Wc)
    out = np.take(rows, c0, axis=1)  # C order (mixing C and F order operands is slow)
    out *= (1 - fc)[None, :]
    nxt = np.take(rows, c0 + 1, axis=1)
    nxt *= fc[None, :]
    out += nxt
    return np.ascontiguousarray(out)


@functools.lru_cache(maxsize=4)
def _disc(size, radius):
    s = np.arange(size, dtype=np.float32) + np.float32(0.5 - 0.5 * size)
    d = np.sqrt(s[:, None] ** 2 + s[None, :] ** 2)
    out = np.clip(np.float32(radius + 0.5) - d, 0.0, 1.0).astype(np.float32)
    out.setflags(write=False)
    return out
