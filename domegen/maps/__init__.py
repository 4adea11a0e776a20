"""Shadow-track maps, globes, globe animations and GeoJSON of solar eclipses.

Front door::

    render_world_map(eclipse, width_px, overlay_only=False, sites=(), utc=None) -> Canvas
    render_globe(eclipse, size_px, centre=None | "sun" | (lat, lon), utc=None) -> Canvas
    GlobeTrack(...), render_track_frame(track, n) -> PIL RGBA image, write_track_frames(...)
    path_geojson(path) -> dict (RFC 7946 FeatureCollection)

Canvas.save_png(path) writes an RGBA PNG atomically.
"""

from __future__ import annotations

__all__ = ["GlobeTrack", "MapSite", "path_geojson", "render_globe", "render_track_frame",
           "render_world_map", "write_track_frames"]


def __getattr__(name):  # lazy: importing domegen.maps stays cheap
    if name in ("GlobeTrack", "render_globe", "render_track_frame", "render_world_map",
                "write_track_frames"):
        from domegen.maps import render

        return getattr(render, name)
    if name == "MapSite":
        from domegen.maps.basemap import MapSite

        return MapSite
    if name == "path_geojson":
        from domegen.maps.geojson import path_geojson

        return path_geojson
    raise AttributeError(name)
