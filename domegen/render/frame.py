"""Render one dome-master frame: linear light, composited layer by layer.

Order: the sky background (coarse grid, bilinear upsampling) fills the
buffer; stars, Sun and planet points are added; planet disks and the Moon
are composited over what lies behind them (the Moon hides the Sun in a
solar eclipse) with the sky light kept in front; eclipse paint hooks; the
opaque ground; overlays and labels; finally the image-circle coverage.
Optional eclipse hooks (modules domegen.render.eclipse_solar / eclipse_lunar,
consulted only near syzygy): see ``eclipse_modules``.
"""

from __future__ import annotations

import functools
import importlib
import math
import os
from dataclasses import dataclass, field

import numpy as np

from domegen.errors import OutOfRangeError
from domegen.render import camera as cam
from domegen.render.context import RenderContext
from domegen.render.sky_gradient import mag_arcsec2_to_cd_m2, sky_model_named
from domegen.render.sky_model import SkyLight
from domegen.render.spec import FrameSpec
from domegen.render.tonemap import auto_exposure_ev, exposure_scale

#: Bortle class -> zenith brightness mag/arcsec^2 (mid-points of the usual SQM ranges; classes 4-9 approximate).
BORTLE_MAG_ARCSEC2 = {1: 21.85, 2: 21.6, 3: 21.4, 4: 20.85, 5: 19.75, 6: 18.55, 7: 18.2, 8: 17.8, 9: 17.3}
#: The user's cap on a frame's working memory, GiB (default: 80 % of the memory available).
MEMORY_ENV = "DOMEGEN_MAX_MEMORY_GB"
#: Automatic exposure follows a Sun or Moon disk covering more than this share of the frame ...
CLOSE_UP_SHARE = 0.02
#: ... putting the disk's bright part (75th percentile of lit pixels) at this display-linear value.
DISK_DISPLAY = 0.55
_HOOK_MODULES = ("domegen.render.eclipse_solar", "domegen.render.eclipse_lunar")


@dataclass
class RenderedFrame:
    """A finished frame in linear light.

    ``rgb``: (3, H, W) float32 planes, linear sRGB in cd/m^2, premultiplied by
    the image-circle coverage (black outside); ``alpha``: (H, W) float32
    coverage (1 inside, 0 outside, anti-aliased rim); ``rgba``: the same as
    one (H, W, 4) float32 array (built on first use).  Overlays are stored
    scaled so that they display at their intended brightness at
    ``info["exposure_ev"]``.  ``info``: JSON-ready facts, among them
    ``"bodies"`` (name, alt_deg, az_deg, x_px, y_px for each Sun, Moon or
    planet inside the frame, apparent positions as drawn).
    """

    rgb: np.ndarray
    alpha: np.ndarray
    info: dict = field(default_factory=dict)

    @functools.cached_property
    def rgba(self) -> np.ndarray:
        _, h, w = self.rgb.shape
        out = np.empty((h, w, 4), dtype=np.float32)
        for k in range(3):
            out[..., k] = self.rgb[k]
        out[..., 3] = self.alpha
        return out


def _available_bytes() -> float:
    cap = os.environ.get(MEMORY_ENV)
    if cap:
        try:
            return float(cap) * 2 ** 30
        except ValueError:
            pass
    try:
        with open("/proc/meminfo") as f:
            for line in f:
                if line.startswith("MemAvailable:"):
                    return 0.8 * int(line.split()[1]) * 1024
    except OSError:
        pass
    return 8 * 2 ** 30


def check_memory(camera) -> None:
    """OutOfRangeError when the frame's buffers would not fit in memory."""
    need = cam.memory_estimate_bytes(camera)
    have = _available_bytes()
    if need > have:
        raise OutOfRangeError(f"a {camera.size_px} px frame needs about {need / 2 ** 30:.1f} GiB, "
                              f"more than the {have / 2 ** 30:.1f} GiB available", field="size_px",
                              value=camera.size_px, hint=f"use a smaller size or raise {MEMORY_ENV}")


#: Eclipse hook modules are consulted only near syzygy: Sun-Moon separation below this (solar)...
SOLAR_HOOK_SEPARATION_DEG = 2.5
#: ... or above this (lunar: the Moon near the anti-Sun, within the penumbra's reach).
LUNAR_HOOK_SEPARATION_DEG = 176.0


def eclipse_modules(bodies) -> list:
    """The optional eclipse hook modules relevant at this instant (cheap geometric pre-check)."""
    s, m = bodies.index("Sun"), bodies.index("Moon")
    c = float(np.clip(bodies.enu[s, :, 0] @ bodies.enu[m, :, 0], -1.0, 1.0))
    sep = math.degrees(math.acos(c))
    wanted = []
    if sep < SOLAR_HOOK_SEPARATION_DEG:
        wanted.append(_HOOK_MODULES[0])
    if sep > LUNAR_HOOK_SEPARATION_DEG:
        wanted.append(_HOOK_MODULES[1])
    mods = []
    for name in wanted:
        try:
            mods.append(importlib.import_module(name))
        except ImportError:
            continue
    return mods


def _hooks(mods, name: str):
    return [getattr(m, name) for m in mods if getattr(m, name, None) is not None]


def light_pollution_mag(layers) -> float | None:
    """The ARTIFICIAL zenith brightness (mag/arcsec^2) for SkyLight, from a Bortle class or a measured total."""
    try:
        from domegen.render.atmosphere import light_pollution_mag_arcsec2
    except ImportError:
        light_pollution_mag_arcsec2 = None
    if light_pollution_mag_arcsec2 is not None:
        return light_pollution_mag_arcsec2(bortle=layers.light_pollution_bortle,
                                           measured_mag_arcsec2=layers.light_pollution_mag_arcsec2)
    total = layers.light_pollution_mag_arcsec2
    if total is None and layers.light_pollution_bortle is not None:
        total = BORTLE_MAG_ARCSEC2[layers.light_pollution_bortle]
    if total is None:
        return None
    art = float(mag_arcsec2_to_cd_m2(total) - mag_arcsec2_to_cd_m2(22.0))
    return None if art <= 0 else float(-2.5 * np.log10(art / 10.8e4))


class NoAtmosphere:
    """The sky model of ``atmosphere = 0``: no sky light, no extinction (daytime stars)."""

    name = "none"

    def radiance(self, dirs_enu, light):
        return np.zeros((np.asarray(dirs_enu).shape[1], 3), dtype=np.float32)

    def transmittance(self, alt_deg, light):
        return np.ones(np.shape(alt_deg) + (3,))


def _auto_exposure(model, light, layers, sky, sky_dirs) -> float:
    dimming = layers.atmosphere * layers.sky_dimming
    if type(model).__name__ == "PhysicalSky":
        try:
            from domegen.render.atmosphere import auto_exposure_ev as physical_auto
        except ImportError:
            physical_auto = None
        if physical_auto is not None:
            return float(physical_auto(light, sky=model, dimming=max(dimming, 1e-6)))
    lum = 0.2126 * sky[0] + 0.7152 * sky[1] + 0.0722 * sky[2]
    up = sky_dirs[2] > 0.05
    ref = float(np.median(lum[up])) if up.any() else float(lum.mean())
    if dimming <= 0 or ref <= 0:
        ref = float(mag_arcsec2_to_cd_m2(22.0))
    return auto_exposure_ev(ref)


def sky_light(spec: FrameSpec, bodies) -> SkyLight:
    """The SkyLight of the frame's instant from a BodyTable (N = 1)."""
    from domegen.render.layer_bodies import lux_from_v

    s, m = bodies.index("Sun"), bodies.index("Moon")
    from domegen.render.layer_overlays import ecliptic_pole_enu

    return SkyLight(
        sun_enu=np.asarray(bodies.enu[s, :, 0], dtype=float), sun_alt_deg=float(bodies.alt_deg[s, 0]),
        moon_enu=np.asarray(bodies.enu[m, :, 0], dtype=float), moon_alt_deg=float(bodies.alt_deg[m, 0]),
        moon_illuminance_lux=float(lux_from_v(bodies.magnitude[m, 0])), site_elev_m=spec.site.elev_m,
        light_pollution_mag_arcsec2=light_pollution_mag(spec.layers),
        extra={"ecliptic_pole_enu": ecliptic_pole_enu(spec.site, float(bodies.utc_s[0]))})


def coarse_size(size_px: int) -> int:
    return int(min(512, max(32, size_px // 16)))


def coarse_sky(camera, sky_model, light) -> tuple[np.ndarray, np.ndarray]:
    """Sky radiance on a coarse grid: (3, m, m) float32 and the coarse directions (3, m, m)."""
    n = camera.size_px
    m = coarse_size(n)
    pos = (np.arange(m) + 0.5) * (n / m)
    xx, yy = np.meshgrid(pos, pos)
    d = cam.unproject(camera, xx, yy)
    lift = math.sin(math.radians(0.5))
    dz = np.maximum(d[2], lift)
    horiz = np.sqrt(np.maximum(1.0 - dz * dz, 0.0)) / np.maximum(np.hypot(d[0], d[1]), 1e-12)
    dc = np.stack([d[0] * horiz, d[1] * horiz, dz])
    rad = np.asarray(sky_model.radiance(dc.reshape(3, -1).astype(np.float32), light), dtype=np.float32)
    return np.ascontiguousarray(rad.T.reshape(3, m, m)), d


def _lerp_index(n: int, m: int):
    t = (np.arange(n) + 0.5) / (n / m) - 0.5
    i0 = np.clip(np.floor(t).astype(np.int64), 0, m - 2)
    w = np.clip(t - i0, 0.0, 1.0).astype(np.float32)
    return i0, w


@functools.lru_cache(maxsize=4)
def upsample_plan(n: int, m: int) -> tuple:
    """(ix, wx, starts, ends, wy) for upsampling m x m to n x n, shared by a sequence's frames.

    ix (n,) int64 and wx (n,) float32: each column's left coarse sample and
    weight; wy (n,) float32 the rows' weights; the rows [starts[i], ends[i])
    lie between coarse rows i and i + 1.
    """
    ix, wx = _lerp_index(n, m)
    iy, wy = _lerp_index(n, m)
    starts = np.searchsorted(iy, np.arange(m - 1), side="left")
    ends = np.searchsorted(iy, np.arange(m - 1), side="right")
    plan = (ix, wx, starts, ends, wy)
    for a in plan:
        a.flags.writeable = False
    return plan


def upsample_plane_numpy(plane, coarse, ix, wx, starts, ends, wy) -> None:
    """kernels.upsample_plane in numpy: a column gather, then two sweeps per block of rows."""
    # a column gather comes back column-major; its rows would be read with a 1 kB stride below
    tmp = np.ascontiguousarray(coarse[:, ix] * (1 - wx) + coarse[:, ix + 1] * wx)   # (m, n)
    diff = tmp[1:] - tmp[:-1]
    for i in range(starts.size):   # coarse rows, not pixels
        r0, r1 = int(starts[i]), int(ends[i])
        block = plane[r0:r1]
        np.multiply(wy[r0:r1, None], diff[i][None, :], out=block)
        block += tmp[i][None, :]


def upsample_into(planes: np.ndarray, coarse: np.ndarray) -> None:
    """planes (3, n, n) float32 = bilinear upsampling of coarse (3, m, m) (sample centres aligned).

    The coarse rows are interpolated to full width, and the rows between two
    coarse rows are filled from that pair; large frames run the compiled
    pass (kernels.upsample_plane, each pixel written once), small ones the
    same arithmetic in numpy (see render/compiled.py).
    """
    from domegen.render.compiled import use_compiled

    _, n, _ = planes.shape
    plan = upsample_plan(n, coarse.shape[1])
    coarse = np.ascontiguousarray(coarse, dtype=np.float32)
    if use_compiled(n * n):
        from domegen.render.kernels import upsample_plane
    else:
        upsample_plane = upsample_plane_numpy
    for k in range(3):
        upsample_plane(planes[k], coarse[k], *plan)


def sky_window(coarse: np.ndarray, n: int, box) -> np.ndarray:
    """(h, w, 3) upsampled sky radiance of one pixel window (the same values as upsample_into)."""
    y0, y1, x0, x1 = box
    m = coarse.shape[1]
    ix, wx = _lerp_index(n, m)
    iy, wy = _lerp_index(n, m)
    ix, wx, iy, wy = ix[x0:x1], wx[x0:x1], iy[y0:y1, None], wy[y0:y1, None]
    out = np.empty((y1 - y0, x1 - x0, 3), dtype=np.float32)
    for k in range(3):
        c = coarse[k]
        top = c[iy, ix] * (1 - wx) + c[iy, ix + 1] * wx
        bot = c[iy + 1, ix] * (1 - wx) + c[iy + 1, ix + 1] * wx
        out[..., k] = top + (bot - top) * wy
    return out


def render_frame(spec: FrameSpec, *, bodies=None, stars=None, sky_model=None, out=None,
                 overlay_alpha: bool = False) -> RenderedFrame:
    """Render ``spec`` into linear light.

    Optional precomputed inputs for sequences: ``bodies`` (a BodyTable for
    this instant, N = 1), ``stars`` (a StarField), ``sky_model`` (any SkyModel,
    overriding ``spec.layers.sky_model``), ``out`` (a (3, H, W) float32 array
    to render into, e.g. the ``rgb`` of a frame already written: saves the
    page faults of a fresh 200 MB buffer at 4K).  ``overlay_alpha``: return
    the overlays' own coverage as the frame's alpha (see passes.render_passes).
    """
    from domegen.render import layer_bodies, layer_ground, layer_overlays, layer_stars
    from domegen.sky.times import unix_seconds

    camera, layers = spec.camera, spec.layers
    check_memory(camera)
    if bodies is None:
        from domegen.sky.bodies import body_positions

        bodies = body_positions(spec.site, np.array([unix_seconds(spec.utc)]))
    if stars is None and layers.stars > 0:
        from domegen.sky.stars import star_field

        stars = star_field(spec.site, spec.utc, mag_limit=layers.star_mag_limit)
    model = sky_model if sky_model is not None else sky_model_named(layers.sky_model)
    if layers.atmosphere <= 0:
        model = NoAtmosphere()
    light = sky_light(spec, bodies)
    mods = eclipse_modules(bodies)
    for hook in _hooks(mods, "eclipse_light"):
        light = hook(spec, light, bodies)

    sky, sky_dirs = coarse_sky(camera, model, light)
    sky *= np.float32(layers.atmosphere * layers.sky_dimming)
    ev = layers.exposure_ev
    if ev is None:
        ev = _auto_exposure(model, light, layers, sky, sky_dirs)
    n = camera.size_px
    # the wide part of the Sun's veiling glare rides on the coarse sky (after the exposure is chosen)
    from domegen.render.layer_bodies import add_coarse_glare

    add_coarse_glare(sky, sky_dirs, bodies, model, light, layers.sun)
    if out is None or out.shape != (3, n, n) or out.dtype != np.float32:
        out = np.empty((3, n, n), dtype=np.float32)
    if np.any(sky):
        upsample_into(out, sky)
    else:
        out[...] = 0.0
    ctx = RenderContext(spec=spec, rgb=out, bodies=bodies, stars=stars, sky_coarse=sky,
                        sky_model=model, light=light, exposure_ev=float(ev), eclipse_modules=mods,
                        info={"exposure_ev": round(float(ev), 4), "bodies": [],
                              "sky_model": getattr(model, "name", type(model).__name__)})
    layer_stars.draw_stars(ctx, layers.stars)
    layer_bodies.draw_sun(ctx, layers.sun)
    layer_bodies.draw_planets(ctx, layers.planets)
    layer_bodies.draw_moon(ctx, layers.moon)
    for hook in _hooks(mods, "paint"):
        hook(ctx)
    disk = ctx.info.pop("disk_exposure", None)
    if layers.exposure_ev is None and disk and disk["share"] > CLOSE_UP_SHARE:
        # a close-up: expose the resolved disk (its bright part near DISK_DISPLAY), not the sky
        ev = math.log2(DISK_DISPLAY / (disk["luminance_cd_m2"] * exposure_scale(0.0)))
        ctx.exposure_ev = float(ev)
        ctx.info["exposure_ev"] = round(float(ev), 4)
        ctx.info["exposure_from"] = "disk"
    layer_ground.draw_ground(ctx, layers.ground)
    if overlay_alpha:
        ctx.overlay_alpha = np.zeros((n, n), dtype=np.float32)
    layer_overlays.draw_overlays(ctx)
    alpha = cam.circle_alpha(n)
    if overlay_alpha:
        alpha = ctx.overlay_alpha * alpha
        for k in range(3):
            ctx.rgb[k] *= alpha
    else:
        cam.premultiply_circle(ctx.rgb)
    return RenderedFrame(rgb=ctx.rgb, alpha=alpha, info=ctx.info)
