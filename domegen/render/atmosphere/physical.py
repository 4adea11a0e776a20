"""PhysicalSky: the SkyModel the renderer uses for day, twilight, moonlight and night."""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import lru_cache

import numpy as np

from ..sky_model import SkyLight
from . import night, spectrum
from .extinction import transmittance_rgb, v_extinction
from .medium import Atmosphere
from .zodiacal import ecliptic_coordinates, zodiacal_mag_arcsec2
from .scatter import SUN_ALT_GRID, eclipse_xyz, scattered_xyz, site_table

#: Site heights are rounded to this step (m) to share one table per venue.
HEIGHT_STEP_M = 100.0


_SUN_RGB = spectrum.sun_rgb_lux()
#: Per-channel gains that make sunlight white at unchanged luminance.
_WHITE_BALANCE = (_SUN_RGB @ spectrum.RGB_LUMA) / _SUN_RGB


_XYZ_TO_RGB = spectrum.XYZ_TO_SRGB.T.astype(np.float32)
_XYZ_TO_RGB_WB = (spectrum.XYZ_TO_SRGB.T * _WHITE_BALANCE[None, :]).astype(np.float32)


@lru_cache(maxsize=32)
def _night_table(atm: Atmosphere, site_elev_m: float, natural_mag: float, lp_mag: float | None) -> np.ndarray:
    """Night glow (natural + artificial) linear sRGB over 1024 values of sin(altitude) in -1..1."""
    alt = np.degrees(np.arcsin(np.linspace(-1.0, 1.0, 1024)))
    lum = night.natural_luminance(alt, v_extinction(atm, site_elev_m), natural_mag)
    rgb = lum[:, None] * night.NATURAL_RGB
    if lp_mag is not None:
        rgb = rgb + night.artificial_luminance(alt, lp_mag)[:, None] * night.ARTIFICIAL_RGB
    return rgb.astype(np.float32)


def _gamut_clip(rgb: np.ndarray) -> np.ndarray:
    """Bring negative linear sRGB components to 0 at constant luminance (desaturate), in place."""
    need = np.flatnonzero(rgb.min(axis=1) < 0.0)
    if need.size:
        c = rgb[need]
        yy = np.maximum(c @ spectrum.RGB_LUMA.astype(rgb.dtype), 0.0)[:, None]
        s = yy / np.maximum(yy - c.min(axis=1, keepdims=True), 1e-30)
        rgb[need] = np.maximum(yy + (c - yy) * s, 0.0)
    return rgb


@dataclass(frozen=True)
class PhysicalSky:
    """Clear-sky radiance from single + multiple scattering, moonlight, night glow and light pollution.

    atmosphere: optical parameters (see Atmosphere); natural_zenith_mag_arcsec2: the natural
    moonless zenith V brightness; march_steps: samples per ray when an eclipse shadow is given.
    """

    atmosphere: Atmosphere = field(default_factory=Atmosphere)
    natural_zenith_mag_arcsec2: float = night.NATURAL_ZENITH_MAG_ARCSEC2
    march_steps: int = 16
    #: Show sunlight above the atmosphere as white (divide scattered light by the Sun's colour,
    #: luminance kept), as the "white balance" option of Bruneton's 2017 precomputed-scattering
    #: demo; the eye adapts to daylight. transmittance() is relative to that colour either way.
    white_balance: bool = True

    def _height(self, light: SkyLight) -> float:
        return float(np.round(max(light.site_elev_m, 0.0) / HEIGHT_STEP_M) * HEIGHT_STEP_M)

    def scattered_xyz(self, dirs_enu: np.ndarray, light: SkyLight) -> np.ndarray:
        """Scattered sunlight + moonlight, CIE XYZ (M, 3) cd/m^2."""
        dirs = np.asarray(dirs_enu, np.float32)
        h = self._height(light)
        xyz = np.zeros((dirs.shape[1], 3), np.float32)
        if light.sun_alt_deg > SUN_ALT_GRID[0] and light.sun_visible_fraction > 0.0:
            if light.shadow is None:
                xyz += scattered_xyz(site_table(self.atmosphere, h), dirs, light.sun_enu) * np.float32(
                    light.sun_visible_fraction)
            else:
                xyz += eclipse_xyz(site_table(self.atmosphere, h), dirs, light.sun_enu, light.shadow,
                                   self.march_steps)
        if light.moon_enu is not None and light.moon_alt_deg > SUN_ALT_GRID[0] and light.moon_illuminance_lux > 0:
            scale = np.float32(light.moon_illuminance_lux / spectrum.SOLAR_ILLUMINANCE_LUX)
            xyz += scattered_xyz(site_table(self.atmosphere, h), dirs, light.moon_enu) * scale
        return xyz

    def night_rgb(self, dirs_enu: np.ndarray, light: SkyLight) -> np.ndarray:
        """Natural night glow + artificial sky glow (+ zodiacal light), linear sRGB (M, 3) cd/m^2.

        With light.extra["ecliptic_pole_enu"] (unit vector (3,) of the north ecliptic pole in ENU)
        the zodiacal light is drawn from Leinert et al. 1998 and the uniform glow keeps only the
        airglow + starlight share of the natural zenith brightness (night.NON_ZODIACAL_SHARE).
        """
        pole = light.extra.get("ecliptic_pole_enu") if light.extra else None
        natural = float(self.natural_zenith_mag_arcsec2)
        if pole is not None:
            natural += -2.5 * np.log10(night.NON_ZODIACAL_SHARE)
        table = _night_table(self.atmosphere, float(light.site_elev_m), natural, light.light_pollution_mag_arcsec2)
        z = np.asarray(dirs_enu)[2].astype(np.float32)
        x = np.linspace(-1.0, 1.0, table.shape[0], dtype=np.float32)
        rgb = np.stack([np.interp(z, x, table[:, k]) for k in range(3)], axis=1).astype(np.float32)
        if pole is not None:
            lon, lat = ecliptic_coordinates(dirs_enu, light.sun_enu, pole)
            alt = np.degrees(np.arcsin(np.clip(z, -1.0, 1.0)))
            k_v = v_extinction(self.atmosphere, light.site_elev_m)
            ext = 10.0 ** (-0.4 * k_v * night.ks91_airmass(90.0 - np.maximum(alt, 0.0)))
            lum = night.mag_arcsec2_to_cd_m2(zodiacal_mag_arcsec2(lon, lat)) * ext
            rgb += (lum[:, None] * night.NATURAL_RGB).astype(np.float32)
        return rgb

    def radiance(self, dirs_enu: np.ndarray, light: SkyLight) -> np.ndarray:
        """Sky radiance for view directions (3, M) -> (M, 3) float32 linear sRGB, cd/m^2."""
        xyz = self.scattered_xyz(dirs_enu, light)
        rgb = xyz @ (_XYZ_TO_RGB_WB if self.white_balance else _XYZ_TO_RGB)
        rgb = _gamut_clip(rgb)
        rgb += self.night_rgb(dirs_enu, light)
        return rgb

    def transmittance(self, alt_deg: np.ndarray, light: SkyLight) -> np.ndarray:
        """Point-source transmittance per RGB channel (..., 3), Kasten & Young air mass."""
        return transmittance_rgb(self.atmosphere, alt_deg, light.site_elev_m)

    def zenith_luminance(self, light: SkyLight) -> float:
        """Luminance of the zenith sky, cd/m^2."""
        rgb = self.radiance(np.array([[0.0], [0.0], [1.0]], np.float32), light)
        return float(rgb[0] @ spectrum.RGB_LUMA)
