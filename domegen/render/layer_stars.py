"""The star layer: catalogue stars as energy-conserving splats (see splat.py)."""

from __future__ import annotations

import numpy as np

from domegen.render.splat import LUX_AT_V0, point_gain, splat_sources

__all__ = ["draw_stars", "LUX_AT_V0"]


def draw_stars(ctx, opacity: float) -> None:
    """Splat every star of ``ctx.stars`` inside the image circle, dimmed by extinction."""
    sf = ctx.stars
    if sf is None or opacity <= 0 or len(sf) == 0:
        return
    keep = (sf.vmag <= ctx.layers.star_mag_limit) & (sf.alt_deg > -1.0)
    enu = sf.enu[:, keep]
    x, y, theta = ctx.project(enu)
    vis = ctx.in_circle(theta, 4 * ctx.rad_per_px)
    if not vis.any():
        ctx.info["stars_drawn"] = 0
        return
    alt = sf.alt_deg[keep][vis]
    trans = np.asarray(ctx.sky_model.transmittance(alt, ctx.light)).reshape(-1, 3)
    gain = point_gain(ctx.rad_per_px)
    ctx.info["point_gain"] = round(gain, 4)
    lux = (LUX_AT_V0 * 10.0 ** (-0.4 * sf.vmag[keep][vis]) * opacity * gain)[:, None] * sf.rgb[keep][vis] * trans
    splat_sources(ctx.rgb, ctx.size, x[vis], y[vis], lux, ctx.omega(theta[vis]))
    ctx.info["stars_drawn"] = int(vis.sum())
