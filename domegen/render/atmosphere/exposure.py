"""Automatic exposure ("eye adaptation") as a pure function of the sky at one instant.

Convention (Lagarde & de Rousiers 2014, "Moving Frostbite to physically based rendering",
SIGGRAPH course): a linear pixel value is luminance_cd_m2 * exposure_scale(ev) with
exposure_scale(ev) = 1 / (1.2 * 2^ev), ev being EV at ISO 100.
"""

from __future__ import annotations

import numpy as np

from ..sky_model import SkyLight, SkyModel
from . import spectrum

#: Lowest luminance the automatic exposure adapts to, cd/m^2: the lower end of the mesopic
#: range, 0.005 cd/m^2 (CIE 191:2010). Darker skies are shown darker, as the eye sees them.
ADAPTATION_FLOOR_CD_M2 = 0.005


def _hemisphere_dirs(n: int = 1024) -> np.ndarray:
    """Equal-area (Fibonacci) directions over the upper hemisphere, (3, n) float32."""
    i = np.arange(n) + 0.5
    z = 1.0 - i / n
    phi = np.pi * (1.0 + 5 ** 0.5) * i
    s = np.sqrt(1.0 - z * z)
    return np.stack([s * np.cos(phi), s * np.sin(phi), z]).astype(np.float32)


_DIRS = _hemisphere_dirs()


def exposure_scale(ev: float) -> float:
    """Multiplier from cd/m^2 to linear display value for an EV100."""
    return 1.0 / (1.2 * 2.0 ** ev)


def adaptation_luminance(light: SkyLight, sky: SkyModel | None = None) -> float:
    """Log-average luminance of the sky hemisphere (cd/m^2), the Sun's disk excluded."""
    if sky is None:
        from .physical import PhysicalSky

        sky = PhysicalSky()
    rgb = sky.radiance(_DIRS, light)
    y = np.maximum(rgb.astype(np.float64) @ spectrum.RGB_LUMA, 1e-9)
    return float(np.exp(np.mean(np.log(y))))


def key_value(l_avg: float) -> float:
    """Brightness the average is mapped to: Krawczyk, Myszkowski & Seidel 2005 (Proc. SPIE 5666)."""
    return 1.03 - 2.0 / (2.0 + np.log10(l_avg + 1.0))


def auto_exposure_ev(light: SkyLight, sky: SkyModel | None = None, dimming: float = 1.0) -> float:
    """EV100 that maps the sky's log-average luminance to the adaptation key (pure function).

    dimming: the sky-dimming factor applied by the renderer (the eye adapts to what is shown).
    """
    l_avg = max(adaptation_luminance(light, sky) * dimming, ADAPTATION_FLOOR_CD_M2)
    return float(np.log2(l_avg / (1.2 * key_value(l_avg))))
