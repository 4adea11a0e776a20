"""``domegen sheet SCENE -o FILE``: one contact sheet of labelled dome thumbnails."""

from __future__ import annotations


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "sheet", help="write a contact sheet: small dome thumbnails of each shot's first frame (+ every Nth)",
        description="Render small thumbnails of the first frame of every shot, plus every Nth frame with "
                    "--every, each labelled with its frame number, show time and local sky time, and write "
                    "them as one PNG for review by email or in a pull request.")
    p.add_argument("scene", help="the scene file (YAML)")
    p.add_argument("-o", "--output", metavar="FILE", required=True, help="the PNG to write")
    p.add_argument("--every", type=int, metavar="N", help="also every Nth frame")
    p.add_argument("--size", type=int, default=256, help="thumbnail size in pixels (default 256, at least 64)")
    p.set_defaults(func=run)


def run(args) -> int:
    from domegen.errors import InputError
    from domegen.farm.sheet import write_sheet
    from domegen.scene import load_scene

    if args.size < 64:
        raise InputError("--size must be 64 or more", field="--size", value=args.size)
    path = write_sheet(load_scene(args.scene), args.output, every=args.every, size_px=args.size)
    print(path)
    return 0
