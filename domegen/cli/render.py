"""``domegen render SCENE``: render a scene's frames, resumably, locally or on a Dask cluster."""

from __future__ import annotations

import sys


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "render", help="render a scene's frame sequence (resumable; local processes or a Dask cluster)",
        description="Render every frame of a scene file into its output folder. A manifest in that folder "
                    "records each finished frame, so a rerun skips what is complete and redoes what is "
                    "missing, stale or corrupt. Frames are identical whatever the worker count or order. "
                    "Ctrl-C stops cleanly (exit 130); run the same command again to resume.")
    p.add_argument("scene", help="the scene file (YAML)")
    p.add_argument("--frames", metavar="A-B", help="only these frames, e.g. 0-99 or 0-9,20-29 (inclusive)")
    p.add_argument("--workers", type=int, metavar="N", help="local worker processes (default: all cores)")
    p.add_argument("--scale", type=float, default=1.0, metavar="F",
                   help="frame size factor for drafts, e.g. 0.25 (default 1)")
    p.add_argument("--out", metavar="DIR", help="write into DIR instead of the scene's output folder")
    p.add_argument("--scheduler", metavar="ADDRESS",
                   help="a Dask scheduler, e.g. tcp://10.0.0.5:8786: spread frame chunks over its workers "
                        "(they must see the output folder)")
    p.add_argument("--allow-outside-output", action="store_true",
                   help="let the scene's folder and file pattern write outside the scene's folder")
    p.add_argument("--skip-space-check", action="store_true",
                   help="render even if the size estimate exceeds the free disk space")
    p.add_argument("--no-verify", action="store_true",
                   help="trust finished frames by size instead of re-hashing them on resume")
    p.set_defaults(func=run)


def run(args) -> int:
    from domegen.errors import InputError
    from domegen.farm.runner import render_scene
    from domegen.scene import load_scene

    if args.workers is not None and args.workers < 1:
        raise InputError("--workers must be 1 or more", field="--workers", value=args.workers)
    scene = load_scene(args.scene)
    report = render_scene(scene, frames=args.frames, workers=args.workers, scale=args.scale, out=args.out,
                          scheduler=args.scheduler, allow_outside=args.allow_outside_output,
                          skip_space_check=args.skip_space_check, verify=not args.no_verify)
    if report.interrupted:
        print("domegen: interrupted; run the same command again to resume", file=sys.stderr)
        return 130
    return 0
