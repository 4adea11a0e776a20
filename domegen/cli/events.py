"""``domegen events``: what a venue's sky does over a period, in local time and UTC."""

from __future__ import annotations

import sys
from datetime import timedelta
from pathlib import Path

from domegen.cli.common import add_site_arguments, print_json, site_from_args


def place_note(args) -> str | None:
    """The "ambiguous name" note of --place, to print on standard error."""
    if not getattr(args, "place", None):
        return None
    from domegen.places import find_place

    return find_place(args.place).note


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "events", help="eclipses, close pairings, oppositions, elongations and Moon phases at a site",
        description="List what can be seen from a site over a period: solar and lunar eclipses "
                    "visible there, close pairings of the Moon and planets, planets at opposition "
                    "and greatest elongation, and the Moon's phases, with local times, UTC and "
                    "altitudes. Bare dates are read in the site's time zone; --to is inclusive.")
    add_site_arguments(p)
    p.add_argument("--from", dest="start", required=True, help="first day (YYYY-MM-DD) or instant")
    p.add_argument("--to", dest="end", required=True, help="last day (inclusive) or instant")
    p.add_argument("--kinds", default=None,
                   help="comma-separated subset of: solar_eclipse, lunar_eclipse, pairing, "
                        "opposition, elongation, moon_phase (default: all)")
    p.add_argument("--max-separation", type=float, default=3.0, metavar="DEG",
                   help="pairings closer than this, degrees (default 3)")
    p.add_argument("--visible-only", action="store_true",
                   help="drop events that cannot be seen from the site")
    out = p.add_mutually_exclusive_group()
    out.add_argument("--json", action="store_true", help="print JSON")
    out.add_argument("--csv", nargs="?", const="-", metavar="FILE",
                     help="write CSV to FILE (or standard output)")
    p.add_argument("--ics", metavar="FILE", help="also write an iCalendar (.ics) file")
    p.set_defaults(func=run)


def _period(args, tz: str):
    import re

    from domegen.sky.times import parse_instant

    start = parse_instant(args.start, tz, field="from")
    end = parse_instant(args.end, tz, field="to")
    if re.fullmatch(r"\s*\d{4}-\d{2}-\d{2}\s*", str(args.end)):
        end = end + timedelta(days=1)  # the whole last day
    return start, end


def run(args) -> int:
    from domegen.cache import atomic_write_bytes
    from domegen.educator.calendar import events_at_site
    from domegen.educator.export import events_csv, events_ics, events_text
    from domegen.sky.events import KINDS

    site = site_from_args(args)
    note = place_note(args)
    start, end = _period(args, site.timezone)
    kinds = KINDS if not args.kinds else tuple(k.strip() for k in args.kinds.split(",") if k.strip())
    events = events_at_site(site, start, end, kinds=kinds, max_separation_deg=args.max_separation,
                            visible_only=args.visible_only)
    if args.ics:
        atomic_write_bytes(Path(args.ics), events_ics(events, site))
    if args.json:
        print_json({"site": site.as_json(), "from_utc": start.isoformat().replace("+00:00", "Z"),
                    "to_utc": end.isoformat().replace("+00:00", "Z"),
                    "events": [ev.as_json(site.timezone) for ev in events]})
    elif args.csv:
        text = events_csv(events, site)
        if args.csv == "-":
            sys.stdout.write(text)
        else:
            atomic_write_bytes(Path(args.csv), text.encode("utf-8"))
    else:
        sys.stdout.write(events_text(events, site))
    if note:
        print(f"note: {note}", file=sys.stderr)
    return 0
