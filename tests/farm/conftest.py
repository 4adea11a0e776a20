"""Tiny scenes for farm tests: a few 64-px frames so the real renderer stays fast."""

from __future__ import annotations

import hashlib
from pathlib import Path

import pytest

SCENE = """\
title: farm test
venue: {{latitude: 47.2184, longitude: -1.5536, elevation: 20, time_zone: Europe/Paris}}
dome: {{size: {size}, front_azimuth: 200}}
output: {{folder: {folder}, file_pattern: "f_{{frame:03d}}.png", frame_rate: 4}}
layers: {{labels: 1, cardinal_points: 1, exposure: 0}}
shots:
  - name: dusk
    duration: {duration}
    sky: {{start: "2026-03-20T17:30:00Z", rate: 1 s = 20 min}}
    layers:
      - {{at: start, altaz_grid: 0}}
      - {{at: end, altaz_grid: 1}}
  - name: night
    duration: 1 s
    sky: {{start: continue, end: "2026-03-20T23:00:00Z"}}
"""


def write_scene(folder: Path, *, size: int = 64, duration: str = "1 s", out: str = "out",
                name: str = "scene.yaml") -> Path:
    p = Path(folder) / name
    p.write_text(SCENE.format(size=size, duration=duration, folder=out))
    return p


def hashes(folder: Path) -> dict:
    return {p.name: hashlib.sha256(p.read_bytes()).hexdigest() for p in sorted(Path(folder).glob("f_*.png"))}


@pytest.fixture
def scene_file(tmp_path):
    return write_scene(tmp_path)
