"""``domegen schema``: the scene format as JSON Schema, for editors' completion and inline errors."""

from __future__ import annotations


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "schema", help="print the JSON Schema (draft 2020-12) of scene files",
        description="Print the scene format as JSON Schema draft 2020-12, generated from the same field "
                    "definitions the validator uses; every field has a description and an example. Save it "
                    "and point your editor at it, e.g. with a first line "
                    "'# yaml-language-server: $schema=scene.schema.json' in each scene.")
    p.add_argument("-o", "--output", metavar="FILE", help="write to FILE instead of standard output")
    p.set_defaults(func=run)


def run(args) -> int:
    import json
    from pathlib import Path

    from domegen.cache import atomic_write_bytes
    from domegen.cli.common import print_json
    from domegen.scene.schema import json_schema

    schema = json_schema()
    if args.output:
        atomic_write_bytes(Path(args.output), (json.dumps(schema, indent=2, ensure_ascii=False) + "\n").encode())
    else:
        print_json(schema)
    return 0
