"""The night sky without the Sun and Moon: natural glow and artificial light.

Brightness is in V mag/arcsec^2; luminance L = 10.8e4 * 10^(-0.4 m) cd/m^2 (the usual
sky-quality-meter conversion, consistent with Falchi et al. 2016, Sci. Adv. 2, e1600377:
22.0 mag/arcsec^2 = 1.7e-4 cd/m^2).
"""

from __future__ import annotations

import numpy as np

from ...errors import InputError
from . import spectrum

#: Natural moonless zenith sky, V mag/arcsec^2: between the 22.0 natural background of
#: Falchi et al. 2016 and the ESO-Paranal dark-time V zenith average of 21.6 at solar
#: maximum (Patat 2003, A&A 400, 1183).
NATURAL_ZENITH_MAG_ARCSEC2 = 21.8

#: Share of the natural zenith glow that is not zodiacal light (airglow ~65 % + starlight ~7 %;
#: the split quoted on ayton.id.au "sky brightness", a weak source) when zodiacal light is
#: drawn on its own.
NON_ZODIACAL_SHARE = 0.73

#: Total zenith sky brightness, mag/arcsec^2, that each Bortle (2001, Sky & Telescope, Feb.)
#: class maps to. Classes 1-3: middle of the 21.7-22.0 / 21.5-21.7 / 21.3-21.5 ranges given
#: for the scale in its Wikipedia table; 4-7: inside both that table's ranges (4: 20.4-21.3,
#: 5: 19.1-20.4, 6 and 7: 18.0-19.1, from memory) and rogerivester.com's SQM equivalents
#: (20.49-21.69, 19.50-20.49, 18.94-19.50, 18.38-18.94); 8: inside 17.5-18.0
#: (nightskyspots.com), 9: a city-centre value below 18 (from memory).
BORTLE_ZENITH_MAG_ARCSEC2 = {1: 21.85, 2: 21.6, 3: 21.4, 4: 21.0, 5: 20.0, 6: 19.1, 7: 18.6,
                             8: 17.8, 9: 17.0}

def _blackbody_rgb(temperature_k: float) -> np.ndarray:
    rgb = spectrum.spectrum_to_rgb(spectrum.planck_shape(spectrum.WAVELENGTHS_NM, temperature_k))
    return rgb / (rgb @ spectrum.RGB_LUMA)


def _xy_rgb(x: float, y: float) -> np.ndarray:
    xyz = np.array([x / y, 1.0, (1.0 - x - y) / y])
    rgb = spectrum.XYZ_TO_SRGB @ xyz
    return rgb / (rgb @ spectrum.RGB_LUMA)


#: Colour (linear sRGB, luminance 1) of the natural night sky as the dark-adapted eye sees it:
#: the scotopic "blue shift" chromaticity x = y = 0.25 of Jensen et al. 2001 ("A physically-based
#: night sky model", SIGGRAPH; from memory). Measured, the glow is redder (B-V = 1.03 at Paranal,
#: Patat 2008, A&A 481, 575) but it is far below colour vision.
NATURAL_RGB = _xy_rgb(0.25, 0.25)
#: Artificial sky glow: a 3000 K black body (warm street lighting; from memory).
ARTIFICIAL_RGB = _blackbody_rgb(3000.0)


def mag_arcsec2_to_cd_m2(mag):
    """Sky brightness V mag/arcsec^2 -> luminance cd/m^2."""
    return 10.8e4 * 10.0 ** (-0.4 * np.asarray(mag, float))


def cd_m2_to_mag_arcsec2(lum):
    """Luminance cd/m^2 -> V mag/arcsec^2."""
    return -2.5 * np.log10(np.maximum(np.asarray(lum, float), 1e-30) / 10.8e4)


def bortle_zenith_mag_arcsec2(bortle: int) -> float:
    """Total zenith brightness of a Bortle class (1-9), mag/arcsec^2."""
    if bortle not in BORTLE_ZENITH_MAG_ARCSEC2:
        raise InputError("Bortle class must be an integer 1 to 9", field="light_pollution_bortle",
                         value=bortle, hint="1 = excellent dark site, 9 = inner city")
    return BORTLE_ZENITH_MAG_ARCSEC2[bortle]


def light_pollution_mag_arcsec2(bortle: int | None = None,
                                measured_mag_arcsec2: float | None = None) -> float | None:
    """Artificial zenith brightness for SkyLight.light_pollution_mag_arcsec2, or None.

    Either a Bortle class or a measured total zenith brightness (e.g. a sky-quality meter
    reading); the natural sky (NATURAL_ZENITH_MAG_ARCSEC2) is removed from the total.
    """
    if measured_mag_arcsec2 is not None:
        total = float(measured_mag_arcsec2)
        if not 10.0 <= total <= 23.0:
            raise InputError("measured sky brightness must be between 10 and 23 mag/arcsec^2",
                             field="light_pollution_mag_arcsec2", value=measured_mag_arcsec2)
    elif bortle is not None:
        total = bortle_zenith_mag_arcsec2(bortle)
    else:
        return None
    art = mag_arcsec2_to_cd_m2(total) - mag_arcsec2_to_cd_m2(NATURAL_ZENITH_MAG_ARCSEC2)
    if art <= 0.0:
        return None
    return float(cd_m2_to_mag_arcsec2(art))


def ks91_airmass(zenith_deg):
    """Air mass of Krisciunas & Schaefer 1991 (PASP 103, 1033): (1 - 0.96 sin^2 Z)^-1/2."""
    s = np.sin(np.radians(np.minimum(zenith_deg, 90.0)))
    return 1.0 / np.sqrt(1.0 - 0.96 * s * s)


def natural_luminance(alt_deg, k_v: float, zenith_mag: float = NATURAL_ZENITH_MAG_ARCSEC2):
    """Natural night-sky luminance cd/m^2 vs altitude: KS91 eq. 2, B = B_zen X 10^(-0.4 k (X-1))."""
    x = ks91_airmass(90.0 - np.maximum(alt_deg, 0.0))
    return mag_arcsec2_to_cd_m2(zenith_mag) * x * 10.0 ** (-0.4 * k_v * (x - 1.0))


def artificial_luminance(alt_deg, zenith_mag: float):
    """Artificial sky glow cd/m^2 vs altitude: zenith value x X_KY^0.6 (our own shape).

    Gives about 1.1 mag brighter at 10 deg altitude and 2.4 mag at the horizon, like the
    horizon brightening of all-sky light-pollution surveys (Duriscoe et al. 2007, PASP 119,
    192; from memory).
    """
    from .extinction import air_mass_kasten_young

    return mag_arcsec2_to_cd_m2(zenith_mag) * air_mass_kasten_young(np.maximum(alt_deg, 0.0)) ** 0.6
