"""The JSON Schema and the validator come from one definition: they agree on examples and broken files."""

from __future__ import annotations

import json
from datetime import date, datetime
from pathlib import Path

import pytest
import yaml
from jsonschema import Draft202012Validator

from domegen.cli.main import main
from domegen.scene.schema import json_schema

ROOT = Path(__file__).resolve().parents[2]
EXAMPLES = sorted((ROOT / "scenes").glob("*.yaml"))
BROKEN = Path(__file__).parent / "broken"

#: Broken files whose fault no schema can see: YAML that does not parse, facts about files, dates,
#: the ephemeris, events at the venue or the timeline (checked only by the validator).
NOT_EXPRESSIBLE = {
    "yaml-bad-indent", "yaml-unclosed-bracket", "yaml-tab-indent", "yaml-bad-colon", "duplicate-key",
    "python-object-tag", "alias-bomb", "not-utf8", "key-is-a-list",
    "include-loop-a", "include-loop-b", "include-self", "include-missing",
    "impossible-date", "outside-ephemeris", "contact-without-eclipse", "lunar-contact-in-solar-scene",
    "no-eclipse-on-date", "day-event-without-date", "continue-in-first-shot", "keyframe-after-end",
    "unknown-time-zone", "jpeg-16-bit", "venue-without-position", "zero-duration",
}


def _json_view(v):
    """YAML values as an editor's language server sees them (dates are text)."""
    if isinstance(v, dict):
        return {str(k): _json_view(x) for k, x in v.items()}
    if isinstance(v, list):
        return [_json_view(x) for x in v]
    if isinstance(v, (date, datetime)):
        return v.isoformat()
    return v


def _validator(partial: bool = False):
    schema = json_schema()
    if partial:  # a theatre base file holds shared settings only: nothing is required in it
        schema.pop("required", None)
    Draft202012Validator.check_schema(schema)
    return Draft202012Validator(schema)


def test_schema_is_valid_2020_12_with_description_and_example_everywhere():
    schema = json_schema()
    assert schema["$schema"] == "https://json-schema.org/draft/2020-12/schema"
    missing = []

    def walk(node, path):
        if isinstance(node, dict):
            if "description" in node and "examples" not in node:
                missing.append(path)
            for k, v in node.get("properties", {}).items():
                if "description" not in v:
                    missing.append(f"{path}.{k}")
                walk(v, f"{path}.{k}")
            for key in ("items",):
                if key in node:
                    walk(node[key], f"{path}[]")
            for key in ("oneOf", "anyOf"):
                for i, sub in enumerate(node.get(key, [])):
                    walk(sub, f"{path}<{i}>")

    walk(schema, "scene")
    assert not missing, missing


def test_committed_schema_file_is_up_to_date():
    generated = json.loads(json.dumps(json_schema()))
    assert json.loads((ROOT / "scenes" / "scene.schema.json").read_text()) == generated, \
        "run: domegen schema -o scenes/scene.schema.json"


def test_domegen_schema_prints_it(capsys):
    assert main(["schema"]) == 0
    assert json.loads(capsys.readouterr().out) == json.loads(json.dumps(json_schema()))


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.stem)
def test_every_example_scene_validates(path):
    validator = _validator(partial=path.name.endswith(".theatre.yaml"))
    errors = list(validator.iter_errors(_json_view(yaml.safe_load(path.read_text()))))
    assert not errors, [e.message for e in errors]


@pytest.mark.parametrize("path", sorted(BROKEN.glob("*.yaml")), ids=lambda p: p.stem)
def test_broken_scenes_are_rejected_by_the_schema_too(path):
    if path.stem in NOT_EXPRESSIBLE:
        return  # the validator's corpus test covers it; a schema cannot express this rule
    data = _json_view(yaml.safe_load(path.read_text()))
    assert list(_validator().iter_errors(data)), f"the schema accepts {path.name}"
