"""``domegen preview-page``: one offline HTML page showing how an eclipse will look from a venue."""

from __future__ import annotations

import sys
from datetime import datetime, timezone
from pathlib import Path

from domegen.cli.common import add_site_arguments, site_from_args


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "preview-page", help="self-contained HTML preview of an eclipse at a venue (dome frames, cues, map)",
        description="Render the dome at the key moments of an eclipse (C1, C2, maximum, C3, C4 for "
                    "a solar eclipse; U1, U2, maximum, U3, U4 for a lunar one), and write one HTML "
                    "page with the frames, the cue table, the bright objects and a track map, all "
                    "embedded so it opens offline. With --evening, the dome at sunset, the ends "
                    "of the three twilights and later that night instead.")
    what = p.add_mutually_exclusive_group(required=True)
    what.add_argument("--eclipse", metavar="DATE", help="UTC date of greatest eclipse, YYYY-MM-DD")
    what.add_argument("--evening", metavar="DATE",
                      help="a local date: the dome from sunset through twilight into the night")
    add_site_arguments(p)
    p.add_argument("-o", "--output", required=True, metavar="DIR",
                   help="folder to write index.html into (created if missing)")
    p.add_argument("--size", type=int, default=480, metavar="PX",
                   help="dome frame size in pixels (default 480)")
    p.add_argument("--map-width", type=int, default=960, metavar="PX",
                   help="track map width in pixels (default 960)")
    p.set_defaults(func=run)


def run(args) -> int:
    from domegen.cache import atomic_write_bytes
    from domegen.cli.events import place_note
    from domegen.educator.eclipses import seen_eclipse_at_site
    from domegen.educator.preview import PAGE_NAME, build_preview
    from domegen.errors import InputError

    if not 64 <= args.size <= 2048:
        raise InputError(f"frame size {args.size} px is outside 64..2048", field="size",
                         value=args.size, hint="the page is a preview: 480 is plenty")
    if not 240 <= args.map_width <= 4096:
        raise InputError(f"map width {args.map_width} px is outside 240..4096", field="map_width",
                         value=args.map_width)
    site = site_from_args(args)
    ecl = None if args.evening else seen_eclipse_at_site(args.eclipse, site)
    day = None
    if args.evening:
        from domegen.sky.times import parse_date

        day = parse_date(args.evening, field="evening")
    out = Path(args.output)
    try:
        out.mkdir(parents=True, exist_ok=True)
    except OSError as err:
        raise InputError(f"cannot create the folder: {err.strerror}", field="output",
                         value=str(out)) from None
    now = datetime.now(timezone.utc)
    if ecl is None:
        from domegen.educator.evening import build_evening_preview

        page = build_evening_preview(site, day, size_px=args.size, generated_utc=now)
    else:
        page = build_preview(ecl, size_px=args.size, map_width_px=args.map_width, generated_utc=now)
    path = out / PAGE_NAME
    atomic_write_bytes(path, page.encode("utf-8"))
    print(str(path))
    note = place_note(args)
    if note:
        print(f"note: {note}", file=sys.stderr)
    return 0
