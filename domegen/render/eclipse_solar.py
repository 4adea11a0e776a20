"""The eclipsed Sun in the frame: photosphere, rough lunar limb, chromosphere, corona.

Everything is computed from the topocentric geometry of the instant
(:mod:`domegen.render.eclipse_geometry`); nothing is placed by hand:

* pixels are un-refracted to true directions and projected onto the plane
  tangent to the sky at the Sun's true centre (x east, y celestial north,
  units of the solar radius), so the disks flatten together near the horizon;
* the photosphere is limb-darkened per channel (Neckel & Labs 1994) at the
  Sun's mean luminance (V = -26.74 over its solid angle, at the top of the
  atmosphere), hidden by the Moon whose edge follows the seeded rough limb
  (:mod:`domegen.render.eclipse_limb`) - light through the limb valleys makes
  Baily's beads and the diamond ring by itself;
* outside the photosphere: Baumbach corona with seeded streamers, the pink
  chromosphere and prominences (:mod:`domegen.render.eclipse_corona`), all
  hidden by the same lunar limb, so the pink rim shows only near C2 and C3.

Pixels whose footprint meets the solar limb (with the chromosphere and
prominences) or the lunar limb in front of the photosphere are supersampled
(up to 16 x 16, finer than ~4 arcsec where that allows, 10 arcsec on a 4K dome; the
edges are anti-aliased ramps, so a sliver thinner than a subsample keeps its flux) with an anti-aliased edge, so beads
far smaller than a pixel keep their flux.  Output: an additive patch of
linear RGB luminance (cd/m^2) to add to the sky, multiplied by the
atmosphere's transmittance toward the Sun when given.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from domegen.render import camera as cam
from domegen.render.eclipse_corona import (CORONA_RHO_MAX, PINK_RGB, chromosphere_and_prominences,
                                           corona)
from domegen.render.eclipse_geometry import MOON_RADIUS_KM, DiskGeometry, disk_geometry, neckel_labs_rgb
from domegen.render.eclipse_limb import CLIP_KM, limb_height_km
from domegen.sky.refraction import unrefract

#: Sun V = -26.74 at 1 au (Allen) -> illuminance via E = 2.54e-6 10^(-0.4 V) lx (REFERENCES 4.2).
SUN_ILLUMINANCE_1AU_LX = 2.54e-6 * 10.0 ** (0.4 * 26.74)
#: Mean luminance of the solar disk (top of the atmosphere), cd/m^2: illuminance / solid angle at 1 au.
SUN_MEAN_LUMINANCE = SUN_ILLUMINANCE_1AU_LX / (math.pi * math.tan(math.radians(959.63 / 3600.0)) ** 2)
#: Colour of sunlight above the atmosphere as displayed: white, i.e. white-balanced to sunlight like
#: the physical sky (PhysicalSky.white_balance) and the renderer's own Sun; the atmosphere's
#: transmittance reddens it toward the horizon.
SUN_RGB = np.ones(3)
PROMINENCE_REACH = 0.09          # solar radii above the limb that may hold emission
_SUBSAMPLE_TARGET_RAD = math.radians(4.0 / 3600.0)
_MAX_SUB = 16
_CHUNK = 1 << 21
#: Near-field glare of the last beads (the "diamond"): the disability-glare law L = K E / theta^2
#: (CIE 146:2002, K = 10 cd/m^2 per lx, theta in degrees) continued inside BLOOM_OUTER_DEG, where the
#: Sun-centred glare of layer_bodies is held flat, down to one pixel, around each photospheric pixel.
#: Only while the visible photosphere is below BLOOM_MAX_FRACTION: at larger fractions the flare lies
#: inside the bright crescent itself, and filtered close-ups would be fogged by an eye effect.
BLOOM_K = 10.0
BLOOM_OUTER_DEG = 0.1
BLOOM_MAX_FRACTION = 1e-3
#: Luminance (cd/m^2) above which a pixel holds photosphere (the inner corona is ~1e4, prominences ~1e5).
PHOTOSPHERE_MIN_CD_M2 = 1e6


def _disk_mean_ratio() -> np.ndarray:
    r = (np.arange(2000) + 0.5) / 2000
    return np.sum(neckel_labs_rgb(r) * (2 * r / 2000)[:, None], axis=0)


#: Disk-centre luminance per channel so that the disk mean has SUN_RGB colour and SUN_MEAN_LUMINANCE.
CENTRE_RGB = SUN_MEAN_LUMINANCE * SUN_RGB / _disk_mean_ratio()


@dataclass(frozen=True)
class Patch:
    """Additive linear-RGB luminance (cd/m^2) for frame rows y0.. and columns x0.."""

    y0: int
    x0: int
    rgb: np.ndarray

    def add_to(self, rgb_hw3: np.ndarray) -> None:
        h, w = self.rgb.shape[:2]
        rgb_hw3[self.y0:self.y0 + h, self.x0:self.x0 + w] += self.rgb


@dataclass(frozen=True)
class _Frame:
    """Tangent-plane frame at the Sun's true centre, and the Moon in it."""

    centre: np.ndarray
    east: np.ndarray
    north: np.ndarray
    tan_rs: float
    moon_xy: tuple
    q: float
    km_to_rsun: float


def solar_axis_pa_rad(utc_s: float) -> float:
    """Position angle P of the Sun's rotation axis from celestial north (Meeus 1998, ch. 29), radians.

    Low-precision solar longitude (Meeus ch. 25, ~0.01 deg) is ample for a corona's orientation.
    """
    jd = utc_s / 86400.0 + 2440587.5
    t = (jd - 2451545.0) / 36525.0
    l0 = 280.46646 + 36000.76983 * t
    m = math.radians(357.52911 + 35999.05029 * t)
    c = (1.914602 - 0.004817 * t) * math.sin(m) + 0.019993 * math.sin(2 * m)
    lam = math.radians(l0 + c)
    eps = math.radians(23.439291 - 0.0130042 * t)
    k = math.radians(73.6667 + 1.3958333 * (jd - 2396758.0) / 36525.0)
    x = math.atan(-math.cos(lam) * math.tan(eps))
    y = math.atan(-math.cos(lam - k) * math.tan(math.radians(7.25)))
    return x + y


def _tangent_frame(site, geom: DiskGeometry, i: int) -> _Frame:
    c = geom.sun_enu[:, i] / np.linalg.norm(geom.sun_enu[:, i])
    lat = math.radians(site.lat_deg)
    pole = np.array([0.0, math.cos(lat), math.sin(lat)])
    east = np.cross(pole, c)
    east /= np.linalg.norm(east)
    north = np.cross(c, east)
    m = geom.moon_enu[:, i]
    tan_rs = math.tan(float(geom.r_sun_rad[i]))
    w = float(m @ c)
    mxy = (float(m @ east) / w / tan_rs, float(m @ north) / w / tan_rs)
    q = math.tan(float(geom.r_moon_rad[i])) / tan_rs
    return _Frame(c, east, north, tan_rs, mxy, q, q / MOON_RADIUS_KM)


def _true_dirs(site, dirs_app: np.ndarray) -> np.ndarray:
    """Apparent (refracted) unit directions (3, M) -> true directions (3, M)."""
    z = np.clip(dirs_app[2], -1.0, 1.0)
    alt = np.degrees(np.arcsin(z))
    alt_t = unrefract(alt, site.temperature_C, site.pressure_mbar)
    h = np.hypot(dirs_app[0], dirs_app[1])
    scale = np.where(h > 1e-12, np.cos(np.radians(alt_t)) / np.maximum(h, 1e-12), 0.0)
    return np.stack([dirs_app[0] * scale, dirs_app[1] * scale, np.sin(np.radians(alt_t))])


def _plane_xy(fr: _Frame, dirs: np.ndarray):
    w = fr.centre @ dirs
    w = np.where(w > 1e-6, w, np.nan)
    return (fr.east @ dirs) / w / fr.tan_rs, (fr.north @ dirs) / w / fr.tan_rs


def emission(fr: _Frame, x, y, aa, *, seed: int, axis_pa: float, fine: bool) -> np.ndarray:
    """Luminance (M, 3) cd/m^2 at tangent-plane points (x, y) in solar radii.

    ``aa``: anti-aliasing width of edges, solar radii.  ``fine``: also evaluate
    the thin chromosphere and prominences (only meaningful when supersampled).
    """
    rho = np.hypot(x, y)
    pa = np.arctan2(x, y)
    dx, dy = x - fr.moon_xy[0], y - fr.moon_xy[1]
    rho_m = np.hypot(dx, dy)
    pa_m = np.arctan2(dx, dy)
    limb = fr.q + limb_height_km(pa_m, seed) * fr.km_to_rsun
    d_m = rho_m - limb           # signed distance outside the Moon's rough limb
    d_s = 1.0 - rho              # signed distance inside the photosphere
    moon_cov = np.clip(0.5 - d_m / aa, 0.0, 1.0)
    sun_cov = np.clip(0.5 + d_s / aa, 0.0, 1.0)
    # Photosphere seen between the two edges.  Where the edges face the same way (the
    # sliver before second / after third contact) the visible part of a footprint of
    # width aa across them is the band between them, not the product of two ramps
    # (which would light a pixel straddling two touching edges).
    with np.errstate(invalid="ignore", divide="ignore"):
        same_way = (x * dx + y * dy) > 0.0
    band = np.clip((np.minimum(d_s, 0.5 * aa) - np.maximum(-d_m, -0.5 * aa)) / aa, 0.0, 1.0)
    vis = np.where(same_way, band, sun_cov * (1.0 - moon_cov))
    photo = neckel_labs_rgb(np.minimum(rho, 1.0)) * CENTRE_RGB * vis[:, None]
    outer = corona(rho, pa, seed, axis_pa)[:, None] * SUN_RGB
    if fine:
        outer = outer + chromosphere_and_prominences(rho, pa, seed)[:, None] * PINK_RGB
    return photo + SUN_MEAN_LUMINANCE * outer * ((1.0 - sun_cov) * (1.0 - moon_cov))[:, None]


def _needs_fine(fr: _Frame, x, y, reach):
    rho = np.hypot(x, y)
    rho_m = np.hypot(x - fr.moon_xy[0], y - fr.moon_xy[1])
    near_sun_limb = (rho > 1.0 - reach) & (rho < 1.0 + PROMINENCE_REACH + reach)
    limb_amp = CLIP_KM * fr.km_to_rsun
    near_moon_limb = (np.abs(rho_m - fr.q) < reach + limb_amp) & (rho < 1.0 + reach)
    return near_sun_limb | near_moon_limb


def sun_patch(camera, site, utc_s: float, *, seed: int = 0, geom: DiskGeometry | None = None,
              transmittance=None) -> Patch | None:
    """The eclipsed (or uneclipsed) Sun with its corona as an additive patch of the frame.

    ``transmittance``: RGB (3,) fraction of the light reaching the site from the
    Sun's direction (the sky model's), default 1 (no atmosphere).
    Returns None when the Sun and its corona lie outside the frame.
    """
    if geom is None:
        geom = disk_geometry(site, float(utc_s))
    fr = _tangent_frame(site, geom, 0)
    from domegen.sky.refraction import refract

    alt_true = math.degrees(math.asin(float(np.clip(fr.centre[2], -1, 1))))
    alt_app = float(refract(alt_true, site.temperature_C, site.pressure_mbar))
    az = math.atan2(fr.centre[0], fr.centre[1])
    c_app = np.array([math.cos(math.radians(alt_app)) * math.sin(az),
                      math.cos(math.radians(alt_app)) * math.cos(az), math.sin(math.radians(alt_app))])
    xs, ys, theta = cam.project(camera, c_app)
    r_sun = float(geom.r_sun_rad[0])
    extent = CORONA_RHO_MAX * r_sun
    if theta - extent > cam.half_field_rad(camera) * 1.02:
        return None
    stretch = max(1.0, float(theta) / max(math.sin(float(theta)), 1e-6)) if theta < math.pi * 0.95 else 3.0
    rpx = extent / cam.rad_per_px(camera) * stretch + 2
    n = camera.size_px
    x0, x1 = max(0, int(math.floor(xs - rpx))), min(n, int(math.ceil(xs + rpx)))
    y0, y1 = max(0, int(math.floor(ys - rpx))), min(n, int(math.ceil(ys + rpx)))
    if x1 <= x0 or y1 <= y0:
        return None
    px, py = np.meshgrid(np.arange(x0, x1) + 0.5, np.arange(y0, y1) + 0.5)
    grid = cam.unproject(camera, px, py).reshape(3, -1)   # the window only: no full-frame grid
    dirs = _true_dirs(site, grid)
    x, y = _plane_xy(fr, dirs)
    ok = np.isfinite(x)
    pix = cam.rad_per_px(camera) / r_sun       # pixel size in solar radii (radial)
    axis_pa = solar_axis_pa_rad(float(utc_s))
    out = np.zeros((x.size, 3))
    rho = np.where(ok, np.hypot(x, y), np.inf)
    near = ok & (rho < CORONA_RHO_MAX)
    idx = np.flatnonzero(near)
    out[idx] = emission(fr, x[idx], y[idx], pix, seed=seed, axis_pa=axis_pa, fine=False)
    fine = np.zeros_like(near)
    fine[idx] = _needs_fine(fr, x[idx], y[idx], 0.75 * pix * stretch)
    fidx = np.flatnonzero(fine)
    if fidx.size:
        nsub = int(np.clip(math.ceil(cam.rad_per_px(camera) / _SUBSAMPLE_TARGET_RAD), 1, _MAX_SUB))
        out[fidx] = _supersampled(camera, site, fr, fidx, x1 - x0, x0, y0, nsub, pix / nsub,
                                  seed=seed, axis_pa=axis_pa)
    if transmittance is not None:
        out *= np.asarray(transmittance, dtype=float).reshape(1, 3)
    return Patch(y0, x0, out.reshape(y1 - y0, x1 - x0, 3).astype(np.float32))


def _supersampled(camera, site, fr, fidx, width, x0, y0, nsub, aa, *, seed, axis_pa):
    """Mean emission over nsub x nsub subsamples of the listed patch pixels."""
    py, px = np.divmod(fidx, width)
    off = (np.arange(nsub) + 0.5) / nsub
    ox, oy = np.meshgrid(off, off)
    ox, oy = ox.ravel(), oy.ravel()
    per_chunk = max(1, _CHUNK // ox.size)
    res = np.empty((fidx.size, 3))
    for s in range(0, fidx.size, per_chunk):  # chunks of ~2M subsamples, not per pixel
        sx = (px[s:s + per_chunk, None] + x0 + ox[None, :]).ravel()
        sy = (py[s:s + per_chunk, None] + y0 + oy[None, :]).ravel()
        d = _true_dirs(site, cam.unproject(camera, sx, sy))
        x, y = _plane_xy(fr, d)
        x, y = np.nan_to_num(x, nan=1e6), np.nan_to_num(y, nan=1e6)
        e = emission(fr, x, y, aa, seed=seed, axis_pa=axis_pa, fine=True)
        res[s:s + per_chunk] = e.reshape(-1, ox.size, 3).mean(axis=1)
    return res


# --- renderer hooks (called by domegen.render.frame when present) --------------------------------

#: A frame counts as "in a solar eclipse" when the disks are closer than the sum of their radii
#: plus this many solar radii (so the corona layer also runs just before C1 / after C4).
_ECLIPSE_MARGIN = 0.02


def _frame_geometry(ctx_or_bodies):
    from domegen.render.eclipse_geometry import geometry_from_bodies

    bodies = getattr(ctx_or_bodies, "bodies", ctx_or_bodies)
    return geometry_from_bodies(bodies)


def in_solar_eclipse(geom: DiskGeometry, i: int = 0) -> bool:
    r_s = float(geom.r_sun_rad[i])
    return float(geom.sep_rad[i]) < float(geom.r_moon_rad[i]) + r_s * (1.0 + _ECLIPSE_MARGIN)


def rough_visible_fraction(site, geom: DiskGeometry, seed: int, i: int = 0) -> float:
    """Uncovered share of the solar flux behind the seeded rough lunar limb (0 in totality)."""
    from domegen.render.eclipse_geometry import visible_fraction_polar
    from domegen.render.eclipse_limb import N_SAMPLES

    fr = _tangent_frame(site, geom, i)
    pa = (np.arange(N_SAMPLES) + 0.5) * (2.0 * np.pi / N_SAMPLES)
    limb = fr.q + limb_height_km(pa, seed) * fr.km_to_rsun
    return float(np.clip(visible_fraction_polar(fr.moon_xy, limb), 0.0, 1.0))


def eclipse_light(spec, light, bodies):
    """SkyLight with the eclipse: visible fraction (rough limb) and the shadow volume for the sky."""
    from dataclasses import replace

    from domegen.render.eclipse_geometry import shadow_function

    geom = _frame_geometry(bodies)
    if not in_solar_eclipse(geom):
        return light
    vis = rough_visible_fraction(spec.site, geom, spec.layers.seed)
    extra = dict(light.extra)
    extra["solar_eclipse"] = {"visible_fraction": vis,
                              "smooth_visible_fraction": float(geom.visible_fraction[0])}
    # A sky model may skip sunlight entirely at a visible fraction of 0, which is totality, when
    # the air outside the umbra still lights the horizon; 1e-9 of the Sun is far below anything seen.
    return replace(light, sun_visible_fraction=max(vis, 1e-9), shadow=shadow_function(geom), extra=extra)


def draws_sun_disk(ctx) -> bool:
    """True when paint() draws the photosphere itself (the frame is in a solar eclipse)."""
    return ctx.layers.sun > 0 and in_solar_eclipse(_frame_geometry(ctx))


def paint(ctx) -> None:
    """Add the eclipsed Sun (photosphere behind the rough limb, chromosphere, corona) to ctx.rgb."""
    if ctx.layers.sun <= 0:
        return
    geom = _frame_geometry(ctx)
    if not in_solar_eclipse(geom):
        return
    alt_true = math.degrees(math.asin(float(np.clip(geom.sun_enu[2, 0], -1.0, 1.0))))
    if alt_true < -3.0:
        return
    trans = np.asarray(ctx.sky_model.transmittance(np.array(alt_true), ctx.light), dtype=float).reshape(3)
    patch = sun_patch(ctx.camera, ctx.spec.site, float(geom.utc_s[0]), seed=ctx.layers.seed, geom=geom,
                      transmittance=trans * ctx.layers.sun)
    if patch is None:
        return
    h, w = patch.rgb.shape[:2]
    for k in range(3):
        ctx.rgb[k, patch.y0:patch.y0 + h, patch.x0:patch.x0 + w] += patch.rgb[..., k]
    vis = float(ctx.light.sun_visible_fraction)
    if 0.0 < vis < BLOOM_MAX_FRACTION:
        _bead_bloom(ctx, patch, 1.0 - vis / BLOOM_MAX_FRACTION)
    ctx.info["solar_eclipse"] = {"visible_fraction": round(float(ctx.light.sun_visible_fraction), 8),
                                 "separation_deg": round(math.degrees(float(geom.sep_rad[0])), 6)}


def bead_bloom_kernel(deg_per_px: float) -> np.ndarray | None:
    """Near-field glare per lux of a source pixel, cd/m^2 / lx, on a (2R+1)^2 pixel grid (None if < 1 px)."""
    if deg_per_px >= BLOOM_OUTER_DEG:
        return None
    r = int(math.ceil(BLOOM_OUTER_DEG / deg_per_px))
    yy, xx = np.mgrid[-r:r + 1, -r:r + 1]
    theta = np.maximum(np.hypot(xx, yy) * deg_per_px, deg_per_px)
    return np.clip(BLOOM_K * (1.0 / theta**2 - 1.0 / BLOOM_OUTER_DEG**2), 0.0, None)


def _bead_bloom(ctx, patch: Patch, weight: float) -> None:
    """Spread each photospheric pixel's illuminance with the near-field glare kernel (in place)."""
    from scipy.signal import fftconvolve

    kernel = bead_bloom_kernel(math.degrees(ctx.rad_per_px))
    if kernel is None:
        return
    lum = patch.rgb @ np.array([0.2126, 0.7152, 0.0722], dtype=np.float32)
    photo = lum > PHOTOSPHERE_MIN_CD_M2
    if not photo.any():
        return
    h, w = lum.shape
    box = (patch.y0, patch.y0 + h, patch.x0, patch.x0 + w)
    omega = ctx.omega(ctx.window_theta(box))
    for k in range(3):
        e = np.where(photo, patch.rgb[..., k] * omega, 0.0)      # lux per pixel
        ctx.rgb[k, box[0]:box[1], box[2]:box[3]] += (weight * fftconvolve(e, kernel, mode="same")).astype(np.float32)
