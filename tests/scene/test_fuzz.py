"""Property: whatever a producer's typo does to a scene, the loader answers with a Scene or a SceneError."""

from __future__ import annotations

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from domegen.errors import SceneError
from domegen.scene import load_scene

BASE = """\
title: fuzz
date: 2026-03-20
venue: {latitude: 47.2184, longitude: -1.5536, elevation: 20, time_zone: Europe/Paris}
dome: {size: 128, field: 180, front_azimuth: 180, tilt: 5}
output: {folder: out, file_pattern: "f_{frame:04d}.png", format: png, bit_depth: 8, frame_rate: 10}
layers: {stars: 1, labels: 0.5, exposure: auto}
shots:
  - name: one
    duration: 2 s
    sky: {start: "2026-03-20 19:00", rate: 1 s = 10 min, easing: linear}
    camera:
      - {at: start, field: 180, front_azimuth: 200}
      - {at: end - 0.5 s, field: 90, look_altitude: 30, easing: ease_in_out}
    layers:
      - {at: 0 s, labels: 0}
      - {at: 50%, labels: 1}
  - duration: 1.5 s
    sky: {start: continue, end: "2026-03-20T22:00:00Z"}
"""

_PIECES = ["-", ":", " ", "\n", "  ", "{", "}", "[", "]", ",", "'", '"', "#", "&a", "*a", "!!", "?", "|",
           "0", "-1", "1e309", "99999999", "2026-02-30", "nan", ".inf", "yes", "null", "~", "%", "s", "min",
           "before", "sunset", "U2", "C2", "continue", "end", "start", "include: x.yaml", "\t", "..",
           "{frame}", "\x00", "é"]


@st.composite
def mutated(draw):
    text = BASE
    for _ in range(draw(st.integers(1, 4))):
        kind = draw(st.sampled_from(["delete", "insert", "replace", "dup_line", "drop_line", "swap"]))
        i = draw(st.integers(0, len(text) - 1))
        if kind == "delete":
            j = min(len(text), i + draw(st.integers(1, 8)))
            text = text[:i] + text[j:]
        elif kind == "insert":
            text = text[:i] + draw(st.sampled_from(_PIECES)) + text[i:]
        elif kind == "replace":
            j = min(len(text), i + draw(st.integers(1, 6)))
            text = text[:i] + draw(st.sampled_from(_PIECES)) + text[j:]
        else:
            lines = text.split("\n")
            k = draw(st.integers(0, len(lines) - 1))
            if kind == "dup_line":
                lines.insert(k, lines[k])
            elif kind == "drop_line":
                del lines[k]
            else:
                m = draw(st.integers(0, len(lines) - 1))
                lines[k], lines[m] = lines[m], lines[k]
            text = "\n".join(lines)
    return text


def test_base_scene_is_valid(tmp_path):
    s = load_scene(tmp_path / "fuzz.yaml", text=BASE)
    assert s.frame_count == 35


@settings(max_examples=250, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow])
@given(text=mutated())
def test_mutated_scenes_never_raise_anything_but_scene_error(tmp_path, text):
    try:
        scene = load_scene(tmp_path / "fuzz.yaml", text=text)
    except SceneError as err:
        assert err.file and err.line is not None, str(err)
        assert "\n" not in str(err)
    else:
        assert scene.frame_count >= 1
        scene.frame_spec(scene.frame_count - 1)
