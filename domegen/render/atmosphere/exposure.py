"""Automatic exposure ("eye adaptation") as a pure function of the sky at one instant.

EV follows the renderer's convention (domegen.render.tonemap): display-linear value =
luminance_cd_m2 * exposure_scale(ev). The adaptation luminance is the log-average luminance
of the sky hemisphere (the Sun's disk excluded). The display value it is shown at follows
our own two-slope curve (a choice, not a published model):

- L_a >= ADAPTATION_FLOOR_CD_M2: D = 0.18 (L_a / 4000)^0.16 (near-complete adaptation:
  a 4000 cd/m^2 day sky as mid-grey, a full-Moon sky ~0.02);
- below the floor the eye stops adapting (lower end of the mesopic range, 0.005 cd/m^2,
  CIE 191:2010): D falls as L_a^0.7, so a dark-site sky shows near 0.003 and stars stand out.
"""

from __future__ import annotations

import numpy as np

from ..sky_model import SkyLight, SkyModel
from . import spectrum

ADAPTATION_FLOOR_CD_M2 = 0.005
DAY_CD_M2 = 4000.0
DAY_DISPLAY = 0.18
DAY_SLOPE = 0.16
NIGHT_SLOPE = 0.7


def _hemisphere_dirs(n: int = 1024) -> np.ndarray:
    """Equal-area (Fibonacci) directions over the upper hemisphere, (3, n) float32."""
    i = np.arange(n) + 0.5
    z = 1.0 - i / n
    phi = np.pi * (1.0 + 5 ** 0.5) * i
    s = np.sqrt(1.0 - z * z)
    return np.stack([s * np.cos(phi), s * np.sin(phi), z]).astype(np.float32)


_DIRS = _hemisphere_dirs()


def exposure_scale(ev: float) -> float:
    """Multiplier from cd/m^2 to display-linear for an EV (the renderer's own function)."""
    try:
        from ..tonemap import exposure_scale as renderer_scale
    except ImportError:  # renderer not installed: its documented convention
        return 0.18 / 4000.0 * 2.0 ** float(ev)
    return float(renderer_scale(ev))


def adaptation_luminance(light: SkyLight, sky: SkyModel | None = None) -> float:
    """Log-average luminance of the sky hemisphere (cd/m^2), the Sun's disk excluded."""
    if sky is None:
        from .physical import PhysicalSky

        sky = PhysicalSky()
    rgb = sky.radiance(_DIRS, light)
    y = np.maximum(rgb.astype(np.float64) @ spectrum.RGB_LUMA, 1e-9)
    return float(np.exp(np.mean(np.log(y))))


def display_value(l_avg: float) -> float:
    """Display-linear value the adaptation luminance is shown at (see module docstring)."""
    floor = ADAPTATION_FLOOR_CD_M2
    d_floor = DAY_DISPLAY * (floor / DAY_CD_M2) ** DAY_SLOPE
    if l_avg >= floor:
        return DAY_DISPLAY * (l_avg / DAY_CD_M2) ** DAY_SLOPE
    return d_floor * (max(l_avg, 1e-12) / floor) ** NIGHT_SLOPE


def auto_exposure_ev(light: SkyLight, sky: SkyModel | None = None, dimming: float = 1.0) -> float:
    """EV that shows the sky's log-average luminance at display_value() (a pure function).

    dimming: the renderer's sky-dimming factor (the eye adapts to what is shown).
    """
    l_avg = max(adaptation_luminance(light, sky) * dimming, 1e-12)
    return float(np.log2(display_value(l_avg) / (l_avg * exposure_scale(0.0))))
