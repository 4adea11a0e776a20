"""Scene scripts: YAML with positions, one schema, event anchors, the timeline."""

from __future__ import annotations

from domegen.scene.load import load_scene
from domegen.scene.model import OutputSettings, Scene

__all__ = ["load_scene", "Scene", "OutputSettings"]
