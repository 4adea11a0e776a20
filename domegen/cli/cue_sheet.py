"""``domegen cue-sheet``: a narration cue sheet for one eclipse at one venue."""

from __future__ import annotations

import sys
from pathlib import Path

from domegen.cli.common import add_site_arguments, site_from_args


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "cue-sheet", help="narration cue sheet for an eclipse at a venue (local times, sky, safety)",
        description="Print (or write) a cue sheet for the solar or lunar eclipse of a date as seen "
                    "from a venue: each contact in local time with the Sun's (or Moon's) altitude "
                    "and azimuth, duration and obscuration, the planets and bright stars up at "
                    "maximum and whether they can be seen then, and the eye-safety caution.")
    p.add_argument("--eclipse", required=True, metavar="DATE",
                   help="UTC date of greatest eclipse, YYYY-MM-DD")
    add_site_arguments(p)
    p.add_argument("--md", metavar="FILE", help="write Markdown to FILE")
    p.add_argument("--csv", metavar="FILE", help="write CSV to FILE")
    p.add_argument("--star-mag", type=float, default=2.5, metavar="MAG",
                   help="list stars brighter than this V magnitude (default 2.5)")
    p.set_defaults(func=run)


def run(args) -> int:
    from domegen.cache import atomic_write_bytes
    from domegen.cli.events import place_note
    from domegen.educator.cuesheet import cue_sheet_csv, cue_sheet_markdown, sky_at_maximum
    from domegen.educator.eclipses import seen_eclipse_at_site

    site = site_from_args(args)
    ecl = seen_eclipse_at_site(args.eclipse, site)
    sky = sky_at_maximum(ecl, star_mag_limit=args.star_mag)
    md = cue_sheet_markdown(ecl, sky)
    if args.md:
        atomic_write_bytes(Path(args.md), md.encode("utf-8"))
    if args.csv:
        atomic_write_bytes(Path(args.csv), cue_sheet_csv(ecl, sky).encode("utf-8"))
    if not args.md and not args.csv:
        sys.stdout.write(md)
    note = place_note(args)
    if note:
        print(f"note: {note}", file=sys.stderr)
    return 0
