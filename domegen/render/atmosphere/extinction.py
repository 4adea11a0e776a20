"""Extinction of point sources: Kasten & Young (1989) air mass and per-channel transmittance."""

from __future__ import annotations

import numpy as np

from . import spectrum
from .medium import Atmosphere


def air_mass_kasten_young(alt_deg):
    """Relative optical air mass, Kasten & Young 1989 (Appl. Opt. 28, 4735), apparent altitude deg.

    X = 1 / (sin h + 0.50572 (h + 6.07995)^-1.6364); altitudes are clamped to >= -1 deg.
    """
    h = np.maximum(np.asarray(alt_deg, dtype=np.float64), -1.0)
    return 1.0 / (np.sin(np.radians(h)) + 0.50572 * (h + 6.07995) ** -1.6364)


def extinction_mag_per_airmass(atm: Atmosphere, site_elev_m: float = 0.0) -> np.ndarray:
    """Zenith extinction coefficient k per wavelength, mag per air mass (16,)."""
    return 2.5 / np.log(10.0) * atm.zenith_optical_depth(site_elev_m)


def v_extinction(atm: Atmosphere, site_elev_m: float = 0.0) -> float:
    """Effective visual (luminance-weighted) zenith extinction, mag per air mass."""
    e = spectrum.solar_irradiance()
    t = np.exp(-atm.zenith_optical_depth(site_elev_m))
    return float(-2.5 * np.log10(spectrum.luminance_of_spectrum(e * t) / spectrum.luminance_of_spectrum(e)))


def transmittance_rgb(atm: Atmosphere, alt_deg, site_elev_m: float = 0.0) -> np.ndarray:
    """Fraction of a point source's light per linear sRGB channel, shape alt.shape + (3,).

    The spectrum exp(-tau X) weighted by sunlight is turned into RGB and divided by the RGB of
    sunlight above the atmosphere (the Sun's spectrum stands in for stars and planets).
    Below -2 deg apparent altitude the source is set to 0.
    """
    alt = np.asarray(alt_deg, dtype=np.float64)
    x = air_mass_kasten_young(alt)
    tau = atm.zenith_optical_depth(site_elev_m)
    e = spectrum.solar_irradiance()
    spec = np.exp(-x[..., None] * tau) * e
    rgb = spectrum.spectrum_to_rgb(spec) / spectrum.sun_rgb_lux()
    rgb = np.clip(rgb, 0.0, 1.0)
    fade = np.clip((alt + 2.0), 0.0, 1.0)  # set below -2 deg, smoothly over a degree
    return (rgb * fade[..., None]).astype(np.float32)
