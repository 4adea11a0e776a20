"""``domegen check SCENE``: validate a scene and summarise its timeline and events."""

from __future__ import annotations


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "check", help="validate a scene file and print its frame count, timing and events",
        description="Load a scene file (with its includes), validate every field and resolve every "
                    "event anchor at the venue. Prints the frame count, show duration, sky-time span "
                    "and each resolved event in local time and UTC. Errors name file:line:column and "
                    "exit with status 2.")
    p.add_argument("scene", help="the scene file (YAML)")
    p.add_argument("--json", action="store_true", help="print the summary as JSON")
    p.set_defaults(func=run)


def run(args) -> int:
    from domegen.cli.common import print_json
    from domegen.scene import load_scene
    from domegen.scene.summary import summary, summary_text

    scene = load_scene(args.scene)
    if args.json:
        print_json(summary(scene))
    else:
        print(summary_text(scene))
    return 0
