"""``domegen track``: shadow-track maps, globes, frame sequences and GeoJSON of a solar eclipse."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "track", help="maps, globes, globe frames and GeoJSON of a solar eclipse's shadow track",
        description="Draw where the Moon's shadow goes during a solar eclipse: an equirectangular "
                    "world map, an orthographic globe, a sequence of globe frames with the "
                    "penumbra and umbra sweeping across, and RFC 7946 GeoJSON of the path.")
    p.add_argument("--eclipse", required=True, metavar="DATE",
                   help="date of the solar eclipse (UTC), e.g. 2026-08-12")
    p.add_argument("--geojson", metavar="FILE", help="write the path as GeoJSON")
    p.add_argument("--map", metavar="FILE", help="write an equirectangular world map (PNG)")
    p.add_argument("--globe", metavar="FILE", help="write an orthographic globe (PNG)")
    p.add_argument("--frames", metavar="DIR", help="write globe animation frames globe-NNNNN.png")
    p.add_argument("--sites", metavar="FILE",
                   help="sites to mark: CSV lines name,lat,lon or a JSON list of {name, lat, lon}")
    p.add_argument("--width", type=int, default=2048, help="map width in pixels (16..8192, default 2048)")
    p.add_argument("--size", type=int, default=1024, help="globe and frame size in pixels (default 1024)")
    p.add_argument("--frame-count", type=int, default=60, help="number of globe frames (default 60)")
    p.add_argument("--centre", default="greatest",
                   help='globe centre: "greatest" (default), "sun" (as seen from the Sun) or LAT,LON')
    p.add_argument("--overlay", action="store_true",
                   help="transparent overlays only: no land, sea or night side")
    p.add_argument("--step", type=float, default=60.0, help="path sampling step in seconds (default 60)")
    p.set_defaults(func=run)


def _centre(text: str):
    from domegen.errors import InputError

    if text in ("greatest", "sun"):
        return text
    try:
        lat, lon = (float(v) for v in text.split(","))
    except ValueError:
        raise InputError('use "greatest", "sun" or LAT,LON', field="--centre", value=text) from None
    return (lat, lon)


def run(args: argparse.Namespace) -> int:
    from domegen.eclipse import solar_eclipse_on
    from domegen.eclipse.safety import CAUTION
    from domegen.errors import InputError, OutOfRangeError
    from domegen.maps import render
    from domegen.maps.geojson import write_geojson
    from domegen.maps.sites import read_sites
    from domegen.sky.times import parse_date

    if not (args.geojson or args.map or args.globe or args.frames):
        raise InputError("nothing to write", field="track",
                         hint="give at least one of --geojson, --map, --globe, --frames")
    if not 1 <= args.frame_count <= 100000:
        raise OutOfRangeError("frame count must be 1..100000", field="--frame-count",
                              value=args.frame_count)
    if not 1.0 <= args.step <= 600.0:
        raise OutOfRangeError("path step must be 1..600 s", field="--step", value=args.step)
    day = parse_date(args.eclipse, field="--eclipse")
    centre = _centre(args.centre)
    for name in ("width", "size"):
        v = getattr(args, name)
        if not 16 <= v <= 8192:
            raise OutOfRangeError("size must be 16..8192 pixels", field=f"--{name}", value=v)
    sites = read_sites(args.sites) if args.sites else []
    eclipse = solar_eclipse_on(day)
    path = render.eclipse_path(eclipse, float(args.step))
    written = []
    if args.geojson:
        write_geojson(path, Path(args.geojson))
        written.append(args.geojson)
    if args.map:
        render.render_world_map(eclipse, args.width, overlay_only=args.overlay, sites=sites,
                                path=path).save_png(Path(args.map))
        written.append(args.map)
    if args.globe:
        render.render_globe(eclipse, args.size, centre=centre, overlay_only=args.overlay,
                            sites=sites, path=path).save_png(Path(args.globe))
        written.append(args.globe)
    if args.frames:
        track = render.GlobeTrack(day.isoformat(), args.frame_count, args.size, centre=centre,
                                  overlay_only=args.overlay,
                                  sites=tuple((s.name, s.lat_deg, s.lon_deg) for s in sites))
        files = render.write_track_frames(track, Path(args.frames))
        written.append(f"{args.frames} ({len(files)} frames)")
    out = sys.stdout
    out.write(f"{eclipse.type} solar eclipse of {day.isoformat()}, greatest at "
              f"{eclipse.greatest_utc.strftime('%H:%M:%S')} UTC, "
              f"{eclipse.lat_deg:.2f}, {eclipse.lon_deg:.2f}\n")
    for w in written:
        out.write(f"wrote {w}\n")
    out.write(CAUTION.rstrip() + "\n")
    return 0
