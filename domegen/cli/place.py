"""``domegen place NAME``: look a city up and show its position and time zone."""

from __future__ import annotations

import sys


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "place", help="look a city up by name (offline GeoNames list, cities of 15,000+)",
        description="Show the position, time zone and population of a city named like "
                    "'Nantes', 'Springfield, IL' or 'Springfield, US'. Ambiguous names pick the "
                    "most populous match and say so; unknown names list close spellings.")
    p.add_argument("name", help="city name, optionally followed by ', COUNTRY' or ', STATE'")
    p.add_argument("--all", action="store_true", help="list every city with that name")
    p.add_argument("--json", action="store_true", help="print JSON instead of text")
    p.set_defaults(func=run)


def run(args) -> int:
    from domegen.cli.common import print_json
    from domegen.places import find_place, place_matches

    best = find_place(args.name)  # raises NotFoundError with suggestions
    places = place_matches(args.name) if args.all else [best]
    if args.json:
        print_json([p.as_json() for p in places] if args.all else best.as_json())
        return 0
    for p in places:
        print(f"{p.label}: {p.lat_deg:.5f} {p.lon_deg:.5f}, {p.timezone}, "
              f"population {p.population:,} (GeoNames {p.geonameid})")
    if best.note and not args.all:
        print(f"note: {best.note}", file=sys.stderr)
    return 0
