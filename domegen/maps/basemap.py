"""Base layers: land and sea, night side, graticule, terminator, site markers.

Every layer is vectorised over the pixels of the projection (``Equirectangular``
or ``Orthographic`` from domegen.maps.projection) and drawn on a
domegen.maps.raster.Canvas.  The subsolar point comes from the DE421 ephemeris
(apparent geocentric Sun, WGS84 sub-point, via skyfield).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass
from datetime import datetime

import numpy as np

from domegen.maps.landmask import land_fraction, land_fraction_equirect
from domegen.maps.style import DEFAULT, Palette


@dataclass(frozen=True)
class MapSite:
    """A labelled marker: geodetic lat/lon in degrees."""

    name: str
    lat_deg: float
    lon_deg: float


def subsolar_point(utc) -> tuple[float, float]:
    """Geodetic (lat, lon) in degrees of the apparent Sun at ``utc`` (datetime or POSIX s)."""
    from skyfield.api import wgs84

    from domegen.sky.ephemeris import ephemeris
    from domegen.sky.times import from_unix_seconds, to_time

    if not isinstance(utc, datetime):
        utc = from_unix_seconds(float(utc))
    t = to_time(utc)
    eph = ephemeris()
    pos = eph["earth"].at(t).observe(eph["sun"]).apparent()
    gp = wgs84.subpoint_of(pos)
    return float(gp.latitude.degrees), float(gp.longitude.degrees)


def sun_altitude_deg(lat_deg, lon_deg, subsolar) -> np.ndarray:
    """Geometric altitude of the Sun's centre (deg) from its sub-point, on a sphere."""
    la, lo = np.radians(lat_deg), np.radians(lon_deg)
    sla, slo = np.radians(subsolar[0]), np.radians(subsolar[1])
    c = np.sin(la) * np.sin(sla) + np.cos(la) * np.cos(sla) * np.cos(lo - slo)
    return np.degrees(np.arcsin(np.clip(c, -1.0, 1.0)))


def _sun_cos_zenith(proj, subsolar) -> np.ndarray:
    """(H, W) float32 cosine of the Sun's zenith distance (sphere), interpolated from a coarse grid."""
    from domegen.maps.projection import coarse_samples, upsample

    sla, slo = np.radians(subsolar[0]), np.radians(subsolar[1])
    if proj.kind == "equirectangular":  # rank-2 separable in latitude and longitude
        lat, lon = proj.grid()
        la = np.radians(lat[:, :1]).astype(np.float32)
        lo = np.radians(lon[:1, :]).astype(np.float32)
        out = np.cos(lo - np.float32(slo)) * (np.cos(la) * np.float32(np.cos(sla)))
        out += np.sin(la) * np.float32(np.sin(sla))
        return out
    xs, ys, lat, lon = coarse_samples(proj, 8)
    la, lo = np.radians(lat), np.radians(lon)
    c = np.sin(la) * np.sin(sla) + np.cos(la) * np.cos(sla) * np.cos(lo - slo)
    return upsample(c, xs, ys, proj.width_px, proj.height_px)


def land_fraction_for(proj) -> np.ndarray:
    """(H, W) float32 land fraction for every pixel of ``proj`` (0 off a globe's disc)."""
    if proj.kind == "equirectangular":
        return land_fraction_equirect(proj.width_px, proj.height_px, proj.lon0_deg)
    lat, lon = proj.grid()
    ok = np.isfinite(lat)
    return np.where(ok, land_fraction(np.where(ok, lat, 0.0), np.where(ok, lon, 0.0)), 0.0
                    ).astype(np.float32)


@functools.lru_cache(maxsize=2)
def surface_planes(proj, palette: Palette = DEFAULT) -> np.ndarray:
    """(3, H, W) float32 land/sea colour planes (read-only, cached per projection); polar land is icy."""
    land = land_fraction_for(proj)
    lat, _ = proj.grid()
    if proj.kind == "equirectangular":
        polar = np.clip((np.abs(lat[:, :1]) - 62.0) / 12.0, 0.0, 1.0).astype(np.float32)
    else:
        polar = np.clip((np.abs(np.nan_to_num(lat)) - 62.0) / 12.0, 0.0, 1.0).astype(np.float32)
    sea = np.asarray(palette.sea[:3], np.float32)
    land_lo = np.asarray(palette.land[:3], np.float32)
    land_hi = np.asarray(palette.land_high_lat[:3], np.float32)
    land = np.ascontiguousarray(land, dtype=np.float32)
    out = np.empty((3,) + land.shape, dtype=np.float32)
    for ch in range(3):
        lc = land_lo[ch] + (land_hi[ch] - land_lo[ch]) * polar
        np.multiply(land, (lc - sea[ch]).astype(np.float32), out=out[ch])
        out[ch] += sea[ch]
    out.setflags(write=False)
    return out


def surface_rgb(proj, palette: Palette = DEFAULT) -> np.ndarray:
    """(H, W, 3) float32 land/sea colours."""
    return np.moveaxis(surface_planes(proj, palette), 0, -1)


def night_alpha(proj, utc) -> np.ndarray:
    """(H, W) float32 darkening 0..1: 0 in daylight, 1 below -12 deg, smooth twilight ramp."""
    cz = _sun_cos_zenith(proj, subsolar_point(utc))
    # sin(alt) ~ alt for the ramp; 12 deg = 0.2079 in sine
    r = cz * np.float32(-1.0 / 0.2079)
    r += np.float32(0.08)
    np.clip(r, 0.0, 1.0, out=r)
    s = np.float32(3.0) - np.float32(2.0) * r
    s *= r
    s *= r
    return s


def draw_base(canvas, proj, utc=None, palette: Palette = DEFAULT) -> None:
    """Land and sea, darkened on the night side when ``utc`` is given (one pass per channel)."""
    planes = surface_planes(proj, palette)
    disc = proj.disc_coverage() if proj.kind == "orthographic" else None
    keep = mix = None
    if utc is not None:
        mix = night_alpha(proj, utc)
        mix *= np.float32(palette.night[3])
        keep = np.float32(1.0) - mix
    col = np.asarray(palette.night[:3], np.float32)
    tmp = np.empty(planes.shape[1:], dtype=np.float32)
    for ch in range(3):
        dst = canvas.rgba[..., ch]
        if keep is not None:
            np.multiply(planes[ch], keep, out=dst)
            np.multiply(mix, col[ch], out=tmp)
            dst += tmp
        else:
            dst[...] = planes[ch]
        if disc is not None:
            dst *= disc  # premultiplied by the limb coverage
    canvas.rgba[..., 3] = 1.0 if disc is None else disc
    canvas._blank = False


def draw_graticule(canvas, proj, step_deg: float = 15.0, palette: Palette = DEFAULT) -> None:
    lines = []
    # straight lines on a plate carree map need only their ends
    n = 2 if proj.kind == "equirectangular" else None
    fine = np.linspace(-90.0, 90.0, n or 361)
    for lon in np.arange(-180.0, 180.0, step_deg):
        lines.append(proj.polyline(fine, np.full_like(fine, lon)))
    lon_f = np.linspace(-180.0, 180.0, 721)
    lon_p = proj.lon0_deg + np.array([-180.0, 0.0, 180.0 - 1e-9]) if n else lon_f
    for lat in np.arange(-90.0 + step_deg, 90.0, step_deg):
        if abs(lat) > 1e-9:
            lines.append(proj.polyline(np.full_like(lon_p, lat), lon_p))
    st = palette.graticule
    canvas.stroke(lines, st.colour, st.width_px, st.dash_px)
    eq = palette.equator
    canvas.stroke([proj.polyline(np.zeros_like(lon_p), lon_p)], eq.colour, eq.width_px, eq.dash_px)


def terminator_latlon(utc, n: int = 721):
    """Lat/lon (degrees) of the great circle where the Sun's centre is on the horizon."""
    slat, slon = np.radians(subsolar_point(utc))
    s = np.array([np.cos(slat) * np.cos(slon), np.cos(slat) * np.sin(slon), np.sin(slat)])
    a = np.cross(s, [0.0, 0.0, 1.0])
    if np.linalg.norm(a) < 1e-9:
        a = np.array([1.0, 0.0, 0.0])
    a /= np.linalg.norm(a)
    b = np.cross(s, a)
    th = np.linspace(0.0, 2 * np.pi, n)
    v = np.cos(th)[:, None] * a + np.sin(th)[:, None] * b
    return np.degrees(np.arcsin(v[:, 2])), np.degrees(np.arctan2(v[:, 1], v[:, 0]))


def draw_terminator(canvas, proj, utc, palette: Palette = DEFAULT) -> None:
    lat, lon = terminator_latlon(utc)
    st = palette.terminator
    canvas.stroke([proj.polyline(lat, lon)], st.colour, st.width_px, st.dash_px)


def draw_sites(canvas, proj, sites, palette: Palette = DEFAULT, label_px: int | None = None) -> None:
    """Dots with name labels to their right, for visible sites."""
    if not sites:
        return
    size = label_px or max(10, canvas.width // 90)
    lat = np.array([s.lat_deg for s in sites])
    lon = np.array([s.lon_deg for s in sites])
    x, y, vis = proj.forward(lat, lon)
    r = max(2.0, size / 4.0)
    canvas.dots(np.c_[x, y][vis], palette.halo, r + 1.2)
    canvas.dots(np.c_[x, y][vis], palette.site, r)
    for s, xi, yi, v in zip(sites, x, y, vis):
        if v:
            canvas.label(xi + 1.8 * r, yi, s.name, palette.text, size, "lm", palette.halo)


def draw_limb(canvas, proj, palette: Palette = DEFAULT) -> None:
    c = 0.5 * proj.size_px
    th = np.linspace(0, 2 * np.pi, 721)
    st = palette.limb
    canvas.stroke([np.c_[c + proj.radius_px * np.cos(th), c + proj.radius_px * np.sin(th)]],
                  st.colour, st.width_px)
