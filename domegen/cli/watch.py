"""``domegen watch SCENE``: re-check on every save and keep a contact sheet up to date."""

from __future__ import annotations


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "watch", help="re-check a scene on every save and refresh its contact sheet",
        description="Watch a scene file and the files it includes. On each save: print any error with "
                    "file:line and keep watching; on success write the contact sheet (first frame of each "
                    "shot plus every Nth frame), re-rendering only thumbnails whose inputs changed. "
                    "Stop with Ctrl-C.")
    p.add_argument("scene", help="the scene file (YAML)")
    p.add_argument("--every", type=int, metavar="N", help="also every Nth frame on the sheet")
    p.add_argument("-o", "--output", metavar="FILE",
                   help="the sheet to write (default: contact-sheet.png in the output folder)")
    p.add_argument("--size", type=int, default=256, help="thumbnail size in pixels (default 256)")
    p.add_argument("--poll", type=float, default=0.5, metavar="S", help="seconds between checks (default 0.5)")
    p.set_defaults(func=run)


def run(args) -> int:
    from domegen.errors import InputError
    from domegen.farm.sheet import watch

    if args.size < 64:
        raise InputError("--size must be 64 or more", field="--size", value=args.size)
    try:
        watch(args.scene, out=args.output, every=args.every, size_px=args.size, poll_s=max(0.05, args.poll))
    except KeyboardInterrupt:
        return 130
    return 0
