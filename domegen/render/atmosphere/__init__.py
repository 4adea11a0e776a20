"""Physically based sky light: scattering of sunlight and moonlight, night glow, extinction.

``PhysicalSky`` implements :class:`domegen.render.sky_model.SkyModel`.
"""

from __future__ import annotations

from .exposure import adaptation_luminance, auto_exposure_ev, exposure_scale
from .extinction import air_mass_kasten_young, transmittance_rgb, v_extinction
from .medium import Atmosphere
from .night import (BORTLE_ZENITH_MAG_ARCSEC2, NATURAL_ZENITH_MAG_ARCSEC2, bortle_zenith_mag_arcsec2,
                    cd_m2_to_mag_arcsec2, light_pollution_mag_arcsec2, mag_arcsec2_to_cd_m2)
from .physical import PhysicalSky

__all__ = [
    "PhysicalSky", "Atmosphere", "auto_exposure_ev", "adaptation_luminance", "exposure_scale",
    "air_mass_kasten_young", "transmittance_rgb", "v_extinction", "light_pollution_mag_arcsec2",
    "bortle_zenith_mag_arcsec2", "BORTLE_ZENITH_MAG_ARCSEC2", "NATURAL_ZENITH_MAG_ARCSEC2",
    "mag_arcsec2_to_cd_m2", "cd_m2_to_mag_arcsec2",
]
