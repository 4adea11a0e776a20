"""The opaque ground: a seeded procedural skyline or the user's equirectangular panorama.

Lighting: the ground is a diffuse reflector under the sky's horizontal
illuminance E = integral of L cos z over the sky (sampled from the sky model)
plus the direct Sun and Moon (times their transmittance): L = rho E / pi.

Panorama convention: a 360 x 180 degree equirectangular PNG, width = 2 x
height; column 0 at azimuth 0 (north), azimuth increasing to the right
(through east); top row at altitude +90; alpha 0 = sky shows through.
"""

from __future__ import annotations

import functools
import math
import os
from dataclasses import dataclass

import numpy as np

from domegen.errors import InputError
from domegen.render.tonemap import srgb_decode

GROUND_ALBEDO = np.array([0.16, 0.14, 0.11])
SKYLINE_ALBEDO = np.array([0.07, 0.09, 0.06])
SKYLINE_MAX_DEG = 4.0
_TABLE = 8192


@functools.lru_cache(maxsize=16)
def skyline_table(seed: int) -> np.ndarray:
    """Skyline altitude (deg) at _TABLE azimuths 0..360 (periodic): rolling hills and clumps of tree crowns."""
    rng = np.random.default_rng([seed, 2718])
    az = np.arange(_TABLE) * (360.0 / _TABLE)
    rad = np.radians(az)
    f = np.arange(1, 25)
    amp = rng.normal(size=f.size) / f ** 1.2
    ph = rng.uniform(0, 2 * np.pi, f.size)
    hills = (amp[:, None] * np.cos(f[:, None] * rad[None] + ph[:, None])).sum(axis=0)
    h = (hills - hills.min()) / max(np.ptp(hills), 1e-9) * 1.2 + 0.2
    # woods: clumps of semi-elliptic crowns 0.3-1.2 deg wide, 0.4-1.6 deg tall above the hills
    centres = rng.uniform(0, 360, 9)
    crowns_az = (centres[rng.integers(0, 9, 260)] + rng.normal(0, 7.0, 260)) % 360.0
    width = rng.uniform(0.15, 0.6, 260)
    height = rng.uniform(0.4, 1.6, 260)
    top = np.zeros_like(az)
    for k in range(0, crowns_az.size, 32):   # 32 crowns at a time: 2 MB temporaries, not 17 MB of fresh pages
        c = slice(k, k + 32)
        d = (az[None, :] - crowns_az[c, None] + 180.0) % 360.0 - 180.0
        crowns = height[c, None] * np.sqrt(np.clip(1.0 - (d / width[c, None]) ** 2, 0.0, None))
        np.maximum(top, crowns.max(axis=0), out=top)
    h = h + top
    return np.clip(h, 0.1, SKYLINE_MAX_DEG - 0.2)


@functools.lru_cache(maxsize=4)
def _load_panorama(path: str, mtime: float) -> tuple[np.ndarray, float]:
    from PIL import Image, UnidentifiedImageError

    try:
        img = Image.open(path)
        img.load()
    except FileNotFoundError:
        raise InputError(f"panorama file {path!r} not found", field="panorama", value=path) from None
    except (UnidentifiedImageError, OSError) as err:
        raise InputError(f"cannot read panorama {path!r}: {err}", field="panorama", value=path) from None
    w, h = img.size
    if w != 2 * h:
        raise InputError(f"panorama {path!r} is {w}x{h}, not equirectangular (width = 2 x height)",
                         field="panorama", value=path, hint="export a 360x180 degree panorama, e.g. 4096x2048")
    a = np.asarray(img.convert("RGBA"), dtype=np.float32) / 255.0
    rgb = srgb_decode(a[..., :3]).astype(np.float32)
    data = np.concatenate([rgb, a[..., 3:]], axis=-1)
    rows = np.flatnonzero(a[..., 3].max(axis=1) > 0)
    top_alt = 90.0 - 180.0 * rows.min() / h if rows.size else -90.0
    data.flags.writeable = False
    return data, float(top_alt)


def load_panorama(path: str) -> tuple[np.ndarray, float]:
    """(H, 2H, 4) float32 linear RGB + alpha and the highest altitude with any opaque pixel."""
    try:
        mtime = os.path.getmtime(path)
    except OSError:
        raise InputError(f"panorama file {path!r} not found", field="panorama", value=path) from None
    return _load_panorama(path, mtime)


@functools.lru_cache(maxsize=4)
def ground_geometry(camera, limit_deg: float, solid_below_deg: float | None = None, seed: int | None = None):
    """The pixels inside the image circle below ``limit_deg`` (or, given a skyline ``seed``, below
    that skyline and half a pixel), in two parts.

    Blocks of 16 x 16 pixels are screened first from their centre's altitude
    (a pixel is less than one pixel-angle from its neighbour).  Blocks that lie
    wholly inside the circle and wholly below ``solid_below_deg`` (when given)
    are returned as runs, (R, 4) int64 rows (r0, r1, c0, c1) of pixel slices;
    every other block that can hold ground is evaluated per pixel: flat
    indices (K,) and ENU directions (3, K) float32 of its pixels below the limit.
    """
    from domegen.render.camera import SCREEN_BLOCK_PX, block_centres, block_pixels, screen_reach_rad, unproject

    n, bs = camera.size_px, SCREEN_BLOCK_PX
    zmax = math.sin(math.radians(limit_deg))
    dc, rb = block_centres(camera)
    reach = screen_reach_rad(camera)
    cand = (dc[2] < zmax + reach) & (rb <= 1.0 + 1.5 * bs / n)
    # z is the sine of the altitude: a pixel within `reach` of the centre is at most `reach` higher
    alt_c = np.arcsin(np.clip(dc[2], -1.0, 1.0))
    if seed is not None:
        cand &= alt_c - reach < np.radians(_skyline_near(dc, alt_c, reach, seed) + 0.5 * camera.field_deg / n)
    runs = np.zeros((0, 4), dtype=np.int64)
    if solid_below_deg is not None:
        corner = rb + bs / math.sqrt(2.0) / (n / 2.0)       # farthest pixel of the block, circle radii
        solid = cand & (alt_c + reach < math.radians(solid_below_deg)) & (corner < 1.0)
        cand &= ~solid
        runs = _block_runs(solid, bs, n)
    rows, cols = block_pixels(camera, cand)
    d = unproject(camera, cols + 0.5, rows + 0.5, dtype=np.float32)   # 1e-7 rad: far below a pixel
    low = d[2] < zmax
    sel = rows[low] * n + cols[low]
    d = np.ascontiguousarray(d[:, low])
    for arr in (sel, d, runs):
        arr.flags.writeable = False
    return sel, d, runs


def _skyline_near(dc: np.ndarray, alt_c: np.ndarray, reach: float, seed: int) -> np.ndarray:
    """Highest skyline altitude (deg) within the azimuths a block can span, per block (nb, nb).

    A block's pixels lie within ``reach`` of its centre, so within reach / cos(alt) in azimuth;
    where that is wide (high blocks, which the altitude screen drops anyway) the skyline's maximum.
    """
    table = skyline_table(seed)
    bin_rad = 2.0 * math.pi / _TABLE
    half_az = reach / np.maximum(np.cos(np.minimum(np.abs(alt_c) + reach, math.pi / 2)), 1e-9)
    w = int(math.ceil(reach / math.cos(math.radians(20.0)) / bin_rad)) + 1
    if w >= _TABLE // 4:
        return np.full(alt_c.shape, float(table.max()))
    near = np.max(np.stack([np.roll(table, k) for k in range(-w, w + 1)]), axis=0)   # sliding max, wraps
    az = np.arctan2(dc[0], dc[1]) % (2.0 * math.pi)
    i = np.clip(np.round(az / bin_rad).astype(np.int64), 0, _TABLE) % _TABLE
    return np.where(half_az <= (w - 1) * bin_rad, near[i], float(table.max()))


def _block_runs(blocks: np.ndarray, bs: int, n: int) -> np.ndarray:
    """Horizontal runs of selected blocks ((nb, nb) bool) as pixel slices (R, 4): r0, r1, c0, c1."""
    padded = np.zeros((blocks.shape[0], blocks.shape[1] + 2), dtype=np.int8)
    padded[:, 1:-1] = blocks
    step = np.diff(padded, axis=1)
    by, c_start = np.nonzero(step == 1)
    _, c_end = np.nonzero(step == -1)       # same row order, one end per start
    r0 = by * bs
    return np.stack([r0, np.minimum(r0 + bs, n), c_start * bs, np.minimum(c_end * bs, n)], axis=1).astype(np.int64)


def _alt_az_deg(d: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Altitude and azimuth (deg, float64) of ENU directions (3, K) float32."""
    alt = np.degrees(np.arcsin(np.clip(d[2], -1.0, 1.0))).astype(np.float64)
    az = np.degrees(np.arctan2(d[0], d[1])).astype(np.float64) % 360.0
    return alt, az


def horizontal_illuminance(ctx) -> float:
    """Horizontal illuminance at the site from sky, Sun and Moon, lux (luminance)."""
    i = np.arange(256) + 0.5
    z = i / 256.0
    phi = i * math.pi * (3.0 - math.sqrt(5.0))
    r = np.sqrt(1 - z * z)
    dirs = np.stack([r * np.cos(phi), r * np.sin(phi), z]).astype(np.float32)
    lum = np.asarray(ctx.sky_model.radiance(dirs, ctx.light), dtype=float) @ np.array([0.2126, 0.7152, 0.0722])
    layers = ctx.layers
    e = 2 * math.pi * float(np.mean(lum * z)) * layers.atmosphere * layers.sky_dimming
    from domegen.render.layer_bodies import lux_from_v

    b = ctx.bodies
    for name in ("Sun", "Moon"):
        k = b.index(name)
        alt = float(b.alt_refracted_deg[k, 0])
        if alt > 0:
            t = np.asarray(ctx.sky_model.transmittance(np.array(alt), ctx.light)).reshape(3)
            vis = ctx.light.sun_visible_fraction if name == "Sun" else 1.0
            e += float(lux_from_v(b.magnitude[k, 0])) * math.sin(math.radians(alt)) * float(t[1]) * vis
    return e


@dataclass(frozen=True)
class GroundLayout:
    """Per-camera ground: ``runs`` (R, 4) pixel slices (r0, r1, c0, c1) of whole, flat ground with
    albedo ``solid_albedo`` (3,); and edge pixels: flat indices ``idx`` (K,), coverage ``cov`` (K,)
    and albedo (K, 3), float32."""

    idx: np.ndarray
    cov: np.ndarray
    albedo: np.ndarray
    runs: np.ndarray
    solid_albedo: np.ndarray


@functools.lru_cache(maxsize=4)
def ground_layout(camera, seed: int, panorama: str | None, mtime: float | None) -> GroundLayout:
    """The ground of one camera: a pure function of the camera and the skyline seed (or the panorama
    file), cached, so a sequence with a fixed camera pays it once; a moving camera pays it per frame,
    so whole blocks of flat ground are kept as slices and only the skyline's edge is evaluated per pixel.
    """
    deg_px = camera.field_deg / camera.size_px
    if panorama:
        pano, top = load_panorama(panorama)
        limit_deg, solid_below = top + deg_px, None
    else:
        # below half a pixel (and a margin) under the horizon the procedural ground is whole and flat
        pano, limit_deg, solid_below = None, SKYLINE_MAX_DEG, -0.51 * deg_px
    sel, d, runs = ground_geometry(camera, round(min(limit_deg, 90.0), 3), solid_below, None if panorama else seed)
    solid_albedo = (SKYLINE_ALBEDO + (GROUND_ALBEDO - SKYLINE_ALBEDO) * 1.0).astype(np.float32)
    if pano is None:
        part = d[2] >= np.float32(math.sin(math.radians(solid_below)))
        alt, az = _alt_az_deg(d[:, part])
        table = skyline_table(seed)
        t = az / 360.0 * _TABLE
        i0 = np.floor(t).astype(np.int64) % _TABLE
        w = t - np.floor(t)
        sky_h = table[i0] * (1 - w) + table[(i0 + 1) % _TABLE] * w
        cov = np.ones(sel.size, dtype=np.float32)
        cov[part] = np.clip((sky_h - alt) / deg_px + 0.5, 0.0, 1.0)
        flat = np.ones(sel.size)
        flat[part] = np.clip(-alt / deg_px + 0.5, 0.0, 1.0)
        albedo = SKYLINE_ALBEDO[None] + (GROUND_ALBEDO - SKYLINE_ALBEDO)[None] * flat[:, None]
    else:
        alt, az = _alt_az_deg(d)
        rgba = _sample(pano, az, alt)
        cov, albedo = rgba[:, 3], rgba[:, :3]
    keep = cov > 0
    out = GroundLayout(sel[keep], cov[keep].astype(np.float32), np.ascontiguousarray(albedo[keep], dtype=np.float32),
                       runs, solid_albedo)
    for arr in (out.idx, out.cov, out.albedo, out.solid_albedo):
        arr.flags.writeable = False
    return out


def draw_ground(ctx, opacity: float) -> None:
    """Composite the opaque ground over the frame (see ground_layout), lit by horizontal_illuminance."""
    if opacity <= 0:
        return
    pano = ctx.layers.panorama
    mtime = None
    if pano:
        load_panorama(pano)   # errors first, with the user's path
        mtime = os.path.getmtime(pano)
    g = ground_layout(ctx.camera, ctx.layers.seed, pano, mtime)
    if g.idx.size == 0 and len(g.runs) == 0:
        return
    e = horizontal_illuminance(ctx)
    lum = np.float32(e / math.pi)
    c = g.cov * np.float32(opacity)
    keep = 1.0 - c
    for k in range(3):
        plane = ctx.rgb[k].reshape(-1)
        v = plane[g.idx]
        v *= keep
        v += g.albedo[:, k] * lum * c
        plane[g.idx] = v
    solid = g.solid_albedo * lum * np.float32(opacity)
    for r0, r1, c0, c1 in g.runs.tolist():
        block = ctx.rgb[:, r0:r1, c0:c1]
        if opacity >= 1.0:
            block[...] = solid[:, None, None]
        else:
            block *= np.float32(1.0) - np.float32(opacity)
            block += solid[:, None, None]
    ctx.info["ground_lux"] = round(e, 6)


def _sample(pano: np.ndarray, az: np.ndarray, alt: np.ndarray) -> np.ndarray:
    """Bilinear samples (M, 4) of the panorama at azimuths/altitudes (deg), wrapping in azimuth."""
    h, w, _ = pano.shape
    u = az / 360.0 * w - 0.5
    v = np.clip((90.0 - alt) / 180.0 * h - 0.5, 0.0, h - 1.0)
    u0 = np.floor(u).astype(np.int64)
    v0 = np.minimum(np.floor(v).astype(np.int64), h - 2) if h > 1 else np.zeros(v.shape, np.int64)
    fu, fv = (u - u0)[:, None], (v - v0)[:, None]
    u0 %= w
    u1 = (u0 + 1) % w
    v1 = np.minimum(v0 + 1, h - 1)
    top = pano[v0, u0] * (1 - fu) + pano[v0, u1] * fu
    bot = pano[v1, u0] * (1 - fu) + pano[v1, u1] * fu
    return top * (1 - fv) + bot * fv
