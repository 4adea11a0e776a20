"""Argument helpers shared by the command modules."""

from __future__ import annotations

import json
import sys

from domegen.errors import InputError
from domegen.sky.site import Site


def add_site_arguments(parser, *, required: bool = True) -> None:
    """--lat/--lon/--elev or --place, plus --tz, --temperature, --pressure."""
    g = parser.add_argument_group("site")
    g.add_argument("--lat", type=float, help="geodetic latitude in degrees, north positive")
    g.add_argument("--lon", type=float, help="longitude in degrees, east positive")
    g.add_argument("--elev", type=float, default=None, help="elevation in metres (default 0, or the place's)")
    g.add_argument("--place", help='a city by name, e.g. "Lyon" or "Springfield, US"')
    g.add_argument("--tz", help="IANA time zone for local times (default: looked up from the position)")
    g.add_argument("--temperature", type=float, default=10.0, help="air temperature in deg C (refraction)")
    g.add_argument("--pressure", type=float, default=1010.0, help="air pressure in mbar (refraction)")
    parser.set_defaults(_site_required=required)


def site_from_args(args) -> Site | None:
    """Build the :class:`Site` from parsed arguments (place name or coordinates)."""
    if getattr(args, "place", None):
        from domegen.places import find_place

        p = find_place(args.place)
        return Site(p.lat_deg, p.lon_deg, args.elev if args.elev is not None else p.elev_m,
                    args.temperature, args.pressure, args.tz or p.timezone, name=p.name)
    if args.lat is None or args.lon is None:
        if getattr(args, "_site_required", True):
            raise InputError("give a site: --lat and --lon, or --place NAME", field="site")
        return None
    site = Site(args.lat, args.lon, args.elev or 0.0, args.temperature, args.pressure, args.tz or "UTC")
    if args.tz is None:
        from dataclasses import replace

        from domegen.places import timezone_at

        site = replace(site, timezone=timezone_at(args.lat, args.lon))
    return site


def print_json(obj) -> None:
    json.dump(obj, sys.stdout, indent=2, ensure_ascii=False, allow_nan=False)
    sys.stdout.write("\n")
