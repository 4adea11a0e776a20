"""The interface between the renderer and a model of the sky's light.

Units: linear-light sRGB (BT.709 primaries, D65) with the luminance Y of each
colour in cd/m^2 for extended sources (sky, ground, disks); point sources
carry their illuminance in lux, converted to cd/m^2 per pixel by the
renderer through each pixel's solid angle.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable, Protocol

import numpy as np


@dataclass(frozen=True)
class SkyLight:
    """The light sources that illuminate the atmosphere at one instant.

    Directions are unit vectors in the site's horizon frame (x east, y north,
    z up), apparent (unrefracted geometry is fine for scattering).
    """

    sun_enu: np.ndarray
    sun_alt_deg: float
    #: Fraction of the Sun's flux that reaches the site (1, or less in a solar eclipse).
    sun_visible_fraction: float = 1.0
    moon_enu: np.ndarray | None = None
    moon_alt_deg: float = -90.0
    #: Moon's illuminance above the atmosphere, lux (phase law and any lunar-eclipse dimming applied).
    moon_illuminance_lux: float = 0.0
    site_elev_m: float = 0.0
    #: Artificial night-sky brightness at the zenith, mag/arcsec^2 (V); None = no light pollution.
    light_pollution_mag_arcsec2: float | None = None
    #: Optional eclipse shadow: maps points (3, M) in metres, site-centred ENU, to the fraction
    #: of the solar disk visible from there (0 inside the umbra). None = no eclipse.
    shadow: Callable[[np.ndarray], np.ndarray] | None = None
    extra: dict = field(default_factory=dict)


class SkyModel(Protocol):
    """Anything that gives sky radiance and point-source extinction."""

    def radiance(self, dirs_enu: np.ndarray, light: SkyLight) -> np.ndarray:
        """Sky radiance for view directions (3, M) float32 -> (M, 3) float32, linear RGB, cd/m^2."""

    def transmittance(self, alt_deg: np.ndarray, light: SkyLight) -> np.ndarray:
        """Fraction of a point source's light per RGB channel reaching the site, (..., 3)."""
