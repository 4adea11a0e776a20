"""Separate passes for compositing: stars, bodies (Sun, Moon, planets) and overlays.

Each pass is a RenderedFrame at the SAME exposure as the full frame.  The
light passes (stars, bodies) hold only that light, dimmed by extinction
exactly as in the full frame but without sky or ground: add them.  The
overlay pass holds the guide lines and text with their coverage as alpha:
composite it "over".  Write them with output.write_frame as usual.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from domegen.render.frame import RenderedFrame, render_frame
from domegen.render.sky_gradient import sky_model_named
from domegen.render.spec import FrameSpec

PASSES = ("stars", "bodies", "overlays")
_OVERLAYS = ("labels", "grid_altaz", "grid_equatorial", "ecliptic", "equator", "meridian", "horizon_line",
             "cardinals")


class _ExtinctionOnly:
    """A sky model with the real transmittance but no sky light (for light passes)."""

    def __init__(self, model):
        self._model = model
        self.name = getattr(model, "name", type(model).__name__) + "+no-sky"

    def radiance(self, dirs_enu, light):
        return np.zeros((np.asarray(dirs_enu).shape[1], 3), dtype=np.float32)

    def transmittance(self, alt_deg, light):
        return self._model.transmittance(alt_deg, light)


def render_passes(spec: FrameSpec, *, bodies=None, stars=None, sky_model=None,
                  passes=PASSES) -> dict[str, RenderedFrame]:
    """{"full": the frame, and each asked pass}: all at the full frame's exposure."""
    unknown = set(passes) - set(PASSES)
    if unknown:
        from domegen.errors import InputError

        raise InputError(f"unknown pass {sorted(unknown)[0]!r}", field="passes", value=sorted(unknown),
                         hint="choose from " + ", ".join(PASSES))
    full = render_frame(spec, bodies=bodies, stars=stars, sky_model=sky_model)
    layers = replace(spec.layers, exposure_ev=full.info["exposure_ev"])
    model = sky_model if sky_model is not None else sky_model_named(layers.sky_model)
    light_only = _ExtinctionOnly(model)
    out = {"full": full}
    keep = {"stars": ("stars", "atmosphere"), "bodies": ("sun", "moon", "planets", "atmosphere"),
            "overlays": _OVERLAYS}
    for name in passes:
        s = replace(spec, layers=layers.with_only(*keep[name]))
        out[name] = render_frame(s, bodies=bodies, stars=stars, sky_model=light_only,
                                 overlay_alpha=(name == "overlays"))
    return out
