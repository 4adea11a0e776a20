"""Shared helpers for the atmosphere tests (directions, Sun positions, luminance)."""

from __future__ import annotations

import numpy as np

from domegen.render.atmosphere import spectrum
from domegen.render.sky_model import SkyLight


def enu(alt_deg, az_deg):
    """Unit vector(s) (3, ...) for altitude / azimuth (from north through east), degrees."""
    a = np.radians(np.asarray(alt_deg, float))
    z = np.radians(np.asarray(az_deg, float))
    return np.stack([np.cos(a) * np.sin(z), np.cos(a) * np.cos(z), np.sin(a)])


def sun_light(alt_deg, az_deg=270.0, **kw) -> SkyLight:
    return SkyLight(sun_enu=enu(alt_deg, az_deg), sun_alt_deg=float(alt_deg), **kw)


def luminance(rgb):
    return np.asarray(rgb, np.float64) @ spectrum.RGB_LUMA


def zenith():
    return np.array([[0.0], [0.0], [1.0]], np.float32)
