"""The Moon in a lunar eclipse: each point of the disk lit by the part of the Sun it sees past the Earth.

For every pixel on the lunar disk the view ray (un-refracted) is intersected
with the Moon's sphere; from that surface point the Sun and the Earth are two
disks, the Earth's radius enlarged by 1/85 for its atmosphere (Danjon 1951,
the convention of :mod:`domegen.eclipse.lunar_shadow`, applied here as
1.01 x the equatorial radius).  The share of the limb-darkened Sun left
uncovered scales the direct sunlight (smooth penumbral dimming, zero in the
umbra).  Inside the umbra the Moon is lit by sunlight refracted through the
Earth's atmosphere: a reddened light, darker toward the shadow axis, whose
overall level and colour follow the Danjon scale setting
(``LayerSpec.danjon_L``, 0..4), built from the scale's published
descriptions (Danjon 1921, as given by Espenak):

* L = 0: very dark, Moon almost invisible; L = 1: dark, grey or brownish;
  L = 2: deep red or rust, very dark centre, brighter outer umbra;
  L = 3: brick red, bright or yellow rim; L = 4: very bright copper-red or
  orange, bluish very bright rim.

Levels [from memory / derived]: a totally eclipsed Moon is roughly 9 (L = 4)
to 16 (L = 0) magnitudes fainter than the full Moon, so the umbral light is
set to 10^(-0.4 dm) of the direct sunlight with dm = 7.0 - 0.9 (L - 2) at the
umbra's edge and dm = 11.5 - 1.5 (L - 2) at its centre (log-linear in the
squared distance from the axis).  Colour: sunlight reddened by Rayleigh
extinction along the grazing path, deeper toward the axis, desaturated to
grey-brown for L < 1; for L > 3 a narrow bluish rim (ozone-filtered light).
"""

from __future__ import annotations

import functools
import math

import numpy as np

from domegen.eclipse.lunar_shadow import DANJON_FACTOR
from domegen.render.eclipse_geometry import EARTH_RADIUS_KM, SUN_RADIUS_KM, cached_table, covered_fraction_exact
from domegen.sky.refraction import unrefract

_U = np.linspace(0.0, 2.0, 801)
_QL = np.linspace(3.0, 4.6, 17)
RIM_RGB = np.array([0.55, 0.85, 1.0]) / (0.2126 * 0.55 + 0.7152 * 0.85 + 0.0722 * 1.0)


@functools.lru_cache(maxsize=1)
def _earth_table() -> np.ndarray:
    def build():
        s = (_QL[None, :] - 1.0) + _U[:, None]
        return covered_fraction_exact(s, np.broadcast_to(_QL[None, :], s.shape))

    return cached_table("eclipse-earth-cover", build)


def earth_covered_fraction(s, q) -> np.ndarray:
    """Share of the limb-darkened Sun hidden by the Earth (radius q, distance s; solar radii), q ~ 3-4.6."""
    s = np.asarray(s, dtype=float)
    q = np.clip(np.asarray(q, dtype=float), _QL[0], _QL[-1])
    u = np.clip(s - (q - 1.0), 0.0, _U[-1])
    fu = np.minimum(u / (_U[1] - _U[0]), _U.size - 1.000001)
    fq = np.minimum((q - _QL[0]) / (_QL[1] - _QL[0]), _QL.size - 1.000001)
    i, j = fu.astype(int), fq.astype(int)
    a, b = fu - i, fq - j
    t = _earth_table()
    out = ((1 - a) * (1 - b) * t[i, j] + a * (1 - b) * t[i + 1, j]
           + (1 - a) * b * t[i, j + 1] + a * b * t[i + 1, j + 1])
    return np.where(s - (q - 1.0) <= 0.0, 1.0, np.where(s >= q + 1.0, 0.0, out))


def umbral_level(x, danjon_L: float) -> np.ndarray:
    """Refracted light in the umbra relative to direct sunlight; x = distance from axis / umbra radius."""
    L = float(danjon_L)
    dm_edge = 7.0 - 0.9 * (L - 2.0)
    dm_centre = 11.5 - 1.5 * (L - 2.0)
    x2 = np.clip(np.asarray(x, dtype=float), 0.0, 1.0) ** 2
    return 10.0 ** (-0.4 * (dm_centre + (dm_edge - dm_centre) * x2))


#: Effective wavelengths of the linear sRGB channels, nm (common practice for a rough spectral tint).
_RGB_NM = np.array([610.0, 550.0, 465.0])


def umbral_colour(x, danjon_L: float) -> np.ndarray:
    """Linear sRGB (..., 3) of luminance 1 of the umbral light at x (0 axis .. 1 edge).

    Sunlight reddened by Rayleigh extinction along the grazing path through the
    Earth's atmosphere, t = exp(-tau (lambda / 550 nm)^-4), deeper (larger tau)
    toward the axis and for darker eclipses; grey-brown for L < 1; for L > 3 a
    narrow bluish rim at the umbra's edge.
    """
    from domegen.render.eclipse_solar import SUN_RGB

    L = float(danjon_L)
    x = np.clip(np.asarray(x, dtype=float), 0.0, 1.0)
    tau = (9.0 - 0.9 * L) - 3.5 * x ** 2
    rgb = SUN_RGB * np.exp(-tau[..., None] * (_RGB_NM / 550.0) ** -4)
    rgb = rgb / (rgb @ np.array([0.2126, 0.7152, 0.0722]))[..., None]
    grey = max(0.0, 1.0 - L)               # L < 1: grey or brownish
    rgb = rgb * (1.0 - 0.6 * grey) + 0.6 * grey * np.array([1.0, 0.85, 0.7]) / 0.88
    rim = max(0.0, L - 3.0) * np.exp(-((1.0 - x) / 0.06) ** 2)
    rgb = rgb * (1.0 - rim[..., None]) + rim[..., None] * RIM_RGB
    return rgb / (rgb @ np.array([0.2126, 0.7152, 0.0722]))[..., None]


def _site_geocentre_enu(site, utc_s: float) -> np.ndarray:
    """Vector from the Earth's centre to the site, km, in the site's ENU frame."""
    from domegen.sky.bodies import gcrs_to_enu
    from domegen.sky.times import to_time

    t = to_time(np.array([utc_s]))
    p = site.topos.at(t).position.km.reshape(3)
    return gcrs_to_enu(site, np.array([utc_s]))[:, :, 0] @ p


@functools.lru_cache(maxsize=64)
def _geometry(site, utc_s: float, sun_km: tuple, moon_km: tuple):
    g = _site_geocentre_enu(site, utc_s)
    return np.array(sun_km) + g, np.array(moon_km) + g, g


def surface_light(q_geo: np.ndarray, sun_geo: np.ndarray, danjon_L: float):
    """(direct, refracted_rgb) for lunar surface points q_geo (3, M) km from the Earth's centre.

    direct: (M,) uncovered share of the Sun; refracted_rgb: (M, 3) umbral light relative to
    direct sunlight (zero outside the umbra).
    """
    to_s = sun_geo[:, None] - q_geo
    ds = np.linalg.norm(to_s, axis=0)
    de = np.linalg.norm(q_geo, axis=0)
    r_s = np.arcsin(SUN_RADIUS_KM / ds)
    r_e = np.arcsin(DANJON_FACTOR * EARTH_RADIUS_KM / de)
    u1, u2 = to_s / ds, -q_geo / de
    sep = 2.0 * np.arctan2(np.linalg.norm(u1 - u2, axis=0), np.linalg.norm(u1 + u2, axis=0))
    direct = 1.0 - earth_covered_fraction(sep / r_s, r_e / r_s)
    direct = np.clip(direct, 0.0, 1.0)
    x = sep / (r_e - r_s)
    # the refracted light does not stop at the geometric umbra: outside it, it fades as the
    # direct sunlight takes over (no dark seam at the edge)
    refr = (umbral_level(x, danjon_L) * (1.0 - direct))[:, None] * umbral_colour(x, danjon_L)
    return direct, refr


def _bodies_vectors(bodies):
    s, m = bodies.index("Sun"), bodies.index("Moon")
    sun = bodies.enu[s, :, 0] * bodies.distance_km[s, 0]
    moon = bodies.enu[m, :, 0] * bodies.distance_km[m, 0]
    r_moon = float(bodies.distance_km[m, 0] * math.sin(math.radians(float(bodies.angular_radius_deg[m, 0]))))
    return sun, moon, r_moon


def _near_shadow(sun_geo, moon_geo, r_moon_km) -> bool:
    """True when the Moon may touch the (enlarged) penumbra."""
    dm = np.linalg.norm(moon_geo)
    ds = np.linalg.norm(sun_geo)
    axis = -sun_geo / ds
    d = math.acos(float(np.clip(axis @ (moon_geo / dm), -1.0, 1.0)))
    rp = DANJON_FACTOR * math.asin(EARTH_RADIUS_KM / dm) + math.asin(SUN_RADIUS_KM / ds) + math.asin(EARTH_RADIUS_KM / ds)
    return d < rp + math.asin(r_moon_km / dm) + 1e-3


def shade_points(site, utc_s: float, bodies, dirs_app: np.ndarray, danjon_L: float):
    """(direct (M,), refracted (M, 3)) for apparent pixel directions (3, M) on the lunar disk."""
    sun, moon, r_moon = _bodies_vectors(bodies)
    sun_geo, moon_geo, g = _geometry(site, float(utc_s), tuple(sun), tuple(moon))
    z = np.clip(dirs_app[2], -1.0, 1.0)
    alt_t = unrefract(np.degrees(np.arcsin(z)), site.temperature_C, site.pressure_mbar)
    h = np.hypot(dirs_app[0], dirs_app[1])
    k = np.cos(np.radians(alt_t)) / np.maximum(h, 1e-12)
    d = np.stack([dirs_app[0] * k, dirs_app[1] * k, np.sin(np.radians(alt_t))])
    b = moon @ d
    disc = b * b - (moon @ moon - r_moon * r_moon)
    t = b - np.sqrt(np.maximum(disc, 0.0))     # near side; the limb point for rays that just miss
    q_topo = d * t
    return surface_light(q_topo + g[:, None], sun_geo, danjon_L)


def moon_shade(ctx, dirs_enu, rgb):
    """Renderer hook: dim and redden the sunlit Moon (M, 3) at pixel directions (3, M)."""
    from domegen.sky.times import unix_seconds

    sun, moon, r_moon = _bodies_vectors(ctx.bodies)
    utc_s = float(unix_seconds(ctx.spec.utc))
    sun_geo, moon_geo, _ = _geometry(ctx.spec.site, utc_s, tuple(sun), tuple(moon))
    if not _near_shadow(sun_geo, moon_geo, r_moon):
        return rgb
    direct, refr = shade_points(ctx.spec.site, utc_s, ctx.bodies, np.asarray(dirs_enu, dtype=float),
                                ctx.layers.danjon_L)
    rgb = np.asarray(rgb, dtype=float)
    y = rgb @ np.array([0.2126, 0.7152, 0.0722])
    out = rgb * direct[:, None] + y[:, None] * refr
    ctx.info["lunar_eclipse"] = {"danjon_L": float(ctx.layers.danjon_L),
                                 "min_direct_fraction": round(float(direct.min()), 6)}
    return out


def disk_mean_light(site, utc_s: float, bodies, danjon_L: float, n: int = 24) -> float:
    """Mean (luminance) of direct + umbral light over the visible lunar hemisphere, 0..1."""
    sun, moon, r_moon = _bodies_vectors(bodies)
    dm = np.linalg.norm(moon)
    c = moon / dm
    ref = np.array([0.0, 0.0, 1.0]) if abs(c[2]) < 0.99 else np.array([0.0, 1.0, 0.0])
    e1 = np.cross(ref, c)
    e1 /= np.linalg.norm(e1)
    e2 = np.cross(c, e1)
    u = (np.arange(n) + 0.5) / n * 2.0 - 1.0
    X, Y = np.meshgrid(u, u)
    inside = X * X + Y * Y < 1.0
    X, Y = X[inside], Y[inside]
    Z = np.sqrt(1.0 - X * X - Y * Y)
    # surface points of the Earth-facing hemisphere, as seen from the site
    pts = moon[:, None] + r_moon * (X[None] * e1[:, None] + Y[None] * e2[:, None] - Z[None] * c[:, None])
    sun_geo, moon_geo, g = _geometry(site, float(utc_s), tuple(sun), tuple(moon))
    direct, refr = surface_light(pts + g[:, None], sun_geo, danjon_L)
    return float(np.mean(direct + refr @ np.array([0.2126, 0.7152, 0.0722])))


def eclipse_light(spec, light, bodies):
    """Renderer hook: the Moon's light on the sky follows the eclipse (disk-mean dimming)."""
    from dataclasses import replace

    from domegen.sky.times import unix_seconds

    if light.moon_illuminance_lux <= 0:
        return light
    sun, moon, r_moon = _bodies_vectors(bodies)
    utc_s = float(unix_seconds(spec.utc))
    sun_geo, moon_geo, _ = _geometry(spec.site, utc_s, tuple(sun), tuple(moon))
    if not _near_shadow(sun_geo, moon_geo, r_moon):
        return light
    f = disk_mean_light(spec.site, utc_s, bodies, spec.layers.danjon_L)
    extra = dict(light.extra)
    extra["lunar_eclipse"] = {"moon_light_fraction": f}
    return replace(light, moon_illuminance_lux=light.moon_illuminance_lux * f, extra=extra)
