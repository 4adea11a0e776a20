"""Render one dome-master frame: linear light, composited layer by layer."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from domegen.render.spec import FrameSpec


@dataclass
class RenderedFrame:
    """A finished frame in linear light.

    ``rgba``: (H, W, 4) float32; RGB linear sRGB in cd/m^2 (overlays are
    stored pre-scaled so that they display at their intended brightness at
    ``info["exposure_ev"]``); alpha 1 inside the image circle, 0 outside,
    anti-aliased at the rim.  ``info``: JSON-ready facts, among them
    ``"bodies"`` (list of dicts name, alt_deg, az_deg, x_px, y_px for every
    Sun, Moon or planet inside the frame) and ``"exposure_ev"``.
    """

    rgba: np.ndarray
    info: dict = field(default_factory=dict)


def render_frame(spec: FrameSpec, *, bodies=None, stars=None, sky_model=None) -> RenderedFrame:
    """Render ``spec``.

    Optional precomputed inputs for sequences: ``bodies`` (a BodyTable for
    this instant), ``stars`` (a StarField), ``sky_model`` (any SkyModel,
    overriding ``spec.layers.sky_model``).
    """
    raise NotImplementedError("renderer under construction")
