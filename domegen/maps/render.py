"""Complete pictures: world maps and globes of an eclipse, and the animated globe track.

``render_world_map`` and ``render_globe`` return a :class:`Canvas`; with
``overlay_only`` the land, sea and night are left out and the background stays
transparent (for compositing on a producer's own Earth imagery).
``GlobeTrack`` + ``render_track_frame(track, n)`` make frame n of the shadow
sweeping across the globe, a pure function of (track, n).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass
from datetime import datetime, timezone
from pathlib import Path

import numpy as np

from domegen.errors import InputError, OutOfRangeError
from domegen.maps import basemap, layers, shadow
from domegen.maps.projection import Equirectangular, Orthographic
from domegen.maps.raster import MAX_SIZE_PX, Canvas
from domegen.maps.style import DEFAULT, Palette


def _check_size(size_px, field="size"):
    if not isinstance(size_px, (int, np.integer)) or not 16 <= int(size_px) <= MAX_SIZE_PX:
        raise OutOfRangeError(f"size must be a whole number of pixels in 16..{MAX_SIZE_PX}",
                              field=field, value=size_px, hint="for example 2048")


@functools.lru_cache(maxsize=8)
def eclipse_path(eclipse, step_s: float = 60.0):
    """The eclipse's path (computed once per eclipse and step)."""
    from domegen.eclipse.path import compute_path

    return compute_path(eclipse, step_s)


def _lon0_for(path) -> float:
    """Map centre longitude: 0, or the greatest-eclipse meridian when the path crosses 180."""
    for c in path.curves:
        if c.name in ("central", "umbra_north", "umbra_south", "penumbra_north", "penumbra_south"):
            if np.any(np.abs(np.diff(c.lon_deg)) > 180.0):
                return float(np.round(path.eclipse.lon_deg / 15.0) * 15.0)
    return 0.0


def _utc_s(utc) -> float:
    if isinstance(utc, datetime):
        return utc.timestamp()
    return float(utc)


def render_world_map(eclipse, width_px: int = 2048, *, overlay_only: bool = False, sites=(),
                     utc=None, lon0_deg: float | None = None, graticule_deg: float = 15.0,
                     shadow_at_utc: bool = False, night: bool = True, palette: Palette = DEFAULT,
                     path=None) -> Canvas:
    """Equirectangular world map of ``eclipse``; night side at ``utc`` (default greatest)."""
    _check_size(width_px, "width")
    path = eclipse_path(eclipse) if path is None else path
    lon0 = _lon0_for(path) if lon0_deg is None else float(lon0_deg)
    proj = Equirectangular(int(width_px), lon0)
    utc = eclipse.greatest_utc if utc is None else utc
    canvas = Canvas(proj.width_px, proj.height_px)
    label_px = max(9, int(width_px) // 110)
    if not overlay_only:
        basemap.draw_base(canvas, proj, utc if night else None, palette)
        basemap.draw_graticule(canvas, proj, graticule_deg, palette)
    if shadow_at_utc:
        layers.draw_shadow(canvas, proj, eclipse, _utc_s(utc), palette)
    layers.draw_path(canvas, proj, path, palette, label_px)
    if not overlay_only and night:
        basemap.draw_terminator(canvas, proj, utc, palette)
    basemap.draw_sites(canvas, proj, list(sites), palette, label_px + 2)
    return canvas


def _centre(eclipse, centre, utc):
    if centre is None or centre == "greatest":
        return float(eclipse.lat_deg), float(eclipse.lon_deg)
    if centre == "sun":
        return basemap.subsolar_point(utc)
    try:
        lat, lon = (float(v) for v in centre)
    except (TypeError, ValueError):
        raise InputError("globe centre must be 'greatest', 'sun' or (lat, lon)", field="centre",
                         value=centre) from None
    return lat, lon


def render_globe(eclipse, size_px: int = 1024, *, centre=None, utc=None, overlay_only: bool = False,
                 sites=(), shadow_at_utc: bool = True, draw_path: bool = True,
                 palette: Palette = DEFAULT, path=None) -> Canvas:
    """Orthographic globe centred on the greatest point, the subsolar point ("sun") or (lat, lon).

    Shows the path and, with ``shadow_at_utc``, the penumbra and umbra at ``utc``
    (default: greatest eclipse).
    """
    _check_size(size_px)
    utc = eclipse.greatest_utc if utc is None else utc
    lat0, lon0 = _centre(eclipse, centre, utc)
    proj = Orthographic(int(size_px), lat0, lon0)
    path = (eclipse_path(eclipse) if path is None else path) if draw_path else None
    return _globe_canvas(eclipse, proj, _utc_s(utc), overlay_only, sites, shadow_at_utc, path, palette)


def _globe_canvas(eclipse, proj, utc_s, overlay_only, sites, with_shadow, path, palette,
                  stamp: str | None = None) -> Canvas:
    canvas = Canvas(proj.width_px, proj.height_px)
    label_px = max(9, proj.size_px // 60)
    if not overlay_only:
        basemap.draw_base(canvas, proj, utc_s, palette)
        basemap.draw_graticule(canvas, proj, 15.0, palette)
    if path is not None:
        layers.draw_path_band(canvas, proj, path, palette)
        layers.draw_limits(canvas, proj, path, palette)
        layers.draw_central_line(canvas, proj, path, palette, label_every=0)
    if with_shadow:
        layers.draw_shadow(canvas, proj, eclipse, utc_s, palette)
    if not overlay_only:
        basemap.draw_terminator(canvas, proj, utc_s, palette)
        basemap.draw_limb(canvas, proj, palette)
    basemap.draw_sites(canvas, proj, list(sites), palette, label_px)
    if stamp:
        canvas.label(0.03 * proj.size_px, 0.97 * proj.size_px, stamp, palette.text, label_px, "lb",
                     palette.halo)
    return canvas


@dataclass(frozen=True)
class GlobeTrack:
    """An animation of the shadow crossing the globe: ``frame_count`` frames from start to end.

    Times are POSIX UTC seconds; None means first/last penumbral contact with
    the Earth (P1/P4).  ``centre`` as in :func:`render_globe` (a fixed point;
    "greatest" by default).  Frame n shows the instant
    start + n (end - start) / (frame_count - 1).
    """

    eclipse_date: str
    frame_count: int = 120
    size_px: int = 1024
    start_utc_s: float | None = None
    end_utc_s: float | None = None
    centre: tuple | str | None = None
    overlay_only: bool = False
    sites: tuple = ()
    show_path: bool = True
    stamp: bool = True

    def eclipse(self):
        return _eclipse_on(self.eclipse_date)

    def span_utc_s(self) -> tuple[float, float]:
        p = _penumbra_span(self.eclipse_date)
        a = self.start_utc_s if self.start_utc_s is not None else p[0]
        b = self.end_utc_s if self.end_utc_s is not None else p[1]
        return float(a), float(b)

    def frame_utc_s(self, n: int) -> float:
        if not 0 <= int(n) < self.frame_count:
            raise OutOfRangeError(f"frame number must be 0..{self.frame_count - 1}", field="frame",
                                  value=n)
        a, b = self.span_utc_s()
        return a if self.frame_count == 1 else a + (b - a) * int(n) / (self.frame_count - 1)


@functools.lru_cache(maxsize=16)
def _eclipse_on(date_text: str):
    from domegen.eclipse import solar_eclipse_on
    from domegen.sky.times import parse_date

    return solar_eclipse_on(parse_date(date_text, field="eclipse"))


@functools.lru_cache(maxsize=16)
def _penumbra_span(date_text: str):
    return shadow.contact_span_utc_s(_eclipse_on(date_text), "penumbra")


def render_track_frame(track: GlobeTrack, n: int, palette: Palette = DEFAULT):
    """Frame ``n`` of ``track`` as a Pillow RGBA image (straight alpha, sRGB, labels drawn)."""
    return _track_canvas(track, n, palette).to_image()


def _track_canvas(track: GlobeTrack, n: int, palette: Palette = DEFAULT) -> Canvas:
    _check_size(track.size_px)
    eclipse = track.eclipse()
    utc_s = track.frame_utc_s(n)
    lat0, lon0 = _centre(eclipse, track.centre, utc_s)
    proj = Orthographic(int(track.size_px), lat0, lon0)
    path = eclipse_path(eclipse) if track.show_path else None
    stamp = None
    if track.stamp:
        stamp = datetime.fromtimestamp(utc_s, timezone.utc).strftime("%Y-%m-%d %H:%M:%S UTC")
    sites = [basemap.MapSite(*s) if not isinstance(s, basemap.MapSite) else s for s in track.sites]
    return _globe_canvas(eclipse, proj, utc_s, track.overlay_only, sites, True, path, palette, stamp)


def write_track_frames(track: GlobeTrack, folder, frames=None, palette: Palette = DEFAULT) -> list[Path]:
    """Write frames (default all) as folder/globe-NNNNN.png; returns the paths."""
    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    out = []
    for n in (range(track.frame_count) if frames is None else frames):
        p = folder / f"globe-{int(n):05d}.png"
        _track_canvas(track, int(n), palette).save_png(p)
        out.append(p)
    return out
