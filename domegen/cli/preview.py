"""``domegen preview SCENE``: a low-resolution MP4 with burnt-in timecode and sky time."""

from __future__ import annotations


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "preview", help="render a small MP4 of a scene with timecode and sky time burnt in",
        description="Render the scene small (default 256 px) and encode an H.264 MP4 (imageio-ffmpeg's own "
                    "ffmpeg), each picture labelled with its frame number, show timecode and local sky "
                    "time. For judging timing and moves before an overnight render.")
    p.add_argument("scene", help="the scene file (YAML)")
    p.add_argument("-o", "--output", metavar="FILE",
                   help="the MP4 to write (default: preview.mp4 in the scene's output folder)")
    p.add_argument("--size", type=int, default=256, help="picture size in pixels, a multiple of 16 (default 256)")
    p.add_argument("--every", type=int, default=1, metavar="N",
                   help="use every Nth frame (the video keeps the show's duration)")
    p.set_defaults(func=run)


def run(args) -> int:
    import sys
    from pathlib import Path

    from domegen.farm.preview import write_preview
    from domegen.farm.progress import Progress
    from domegen.scene import load_scene

    scene = load_scene(args.scene)
    out = Path(args.output) if args.output else scene.output.root / "preview.mp4"
    total = len(range(0, scene.frame_count, max(1, args.every)))
    progress = Progress(total, label="preview")
    progress.start()
    n = write_preview(scene, out, size_px=args.size, every=args.every, progress=progress)
    progress.finish(f"{n} frames written to {out}")
    print(out, file=sys.stdout)
    return 0
