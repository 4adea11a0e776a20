"""Wavelength sampling, colour matching, the Sun's spectrum and the air's optical constants.

Everything spectral in the atmosphere is sampled at ``WAVELENGTHS_NM`` (16 samples,
400-700 nm every 20 nm) and turned into linear sRGB (cd/m^2) with ``SPECTRAL_TO_RGB``.
"""

from __future__ import annotations

import numpy as np

WAVELENGTHS_NM = np.arange(400.0, 701.0, 20.0)
STEP_NM = 20.0

#: Maximum luminous efficacy of photopic vision, lm/W (CIE; common practice).
KM_LM_PER_W = 683.0

#: Solar illuminance above the atmosphere at 1 au, lux. Darula, Kittler & Gueymard 2005,
#: Solar Energy 79, 559 ("reference luminous solar constant" 133.8 klx; from memory).
SOLAR_ILLUMINANCE_LUX = 133_800.0

#: The Sun's photosphere as a black body at its effective temperature, K (common practice).
SUN_TEMPERATURE_K = 5778.0

#: XYZ -> linear sRGB (IEC 61966-2-1:1999, D65 white).
XYZ_TO_SRGB = np.array([[3.2406, -1.5372, -0.4986],
                        [-0.9689, 1.8758, 0.0415],
                        [0.0557, -0.2040, 1.0570]])

#: Luminance weights of linear sRGB (BT.709 / IEC 61966-2-1).
RGB_LUMA = np.array([0.2126, 0.7152, 0.0722])


def _lobe(x, mu, s1, s2):
    s = np.where(x < mu, s1, s2)
    return np.exp(-0.5 * ((x - mu) / s) ** 2)


def cie1931_cmf(lam_nm: np.ndarray) -> np.ndarray:
    """CIE 1931 2-degree colour matching functions (N,) nm -> (N, 3).

    Multi-lobe fit of Wyman, Sloan & Shirley 2013, "Simple analytic approximations to
    the CIE XYZ color matching functions", JCGT 2(2).
    """
    x = lam_nm
    xb = (1.056 * _lobe(x, 599.8, 37.9, 31.0) + 0.362 * _lobe(x, 442.0, 16.0, 26.7)
          - 0.065 * _lobe(x, 501.1, 20.4, 26.2))
    yb = 0.821 * _lobe(x, 568.8, 46.9, 40.5) + 0.286 * _lobe(x, 530.9, 16.3, 31.1)
    zb = 1.217 * _lobe(x, 437.0, 11.8, 36.0) + 0.681 * _lobe(x, 459.0, 26.0, 13.8)
    return np.stack([xb, yb, zb], axis=-1)


def planck_shape(lam_nm: np.ndarray, temperature_k: float) -> np.ndarray:
    """Black-body spectral radiance up to a constant factor (N,)."""
    lam_m = lam_nm * 1e-9
    c2 = 1.438777e-2  # second radiation constant, m K (CODATA)
    return lam_m ** -5 / np.expm1(c2 / (lam_m * temperature_k))


#: (16, 3): spectral radiance W m^-2 sr^-1 nm^-1 at WAVELENGTHS_NM -> linear sRGB with Y in cd/m^2.
SPECTRAL_TO_RGB = (KM_LM_PER_W * STEP_NM) * (cie1931_cmf(WAVELENGTHS_NM) @ XYZ_TO_SRGB.T)
_LUMINANCE_WEIGHTS = KM_LM_PER_W * STEP_NM * cie1931_cmf(WAVELENGTHS_NM)[:, 1]


def luminance_of_spectrum(spec: np.ndarray) -> np.ndarray:
    """Photometric quantity of a spectrum (..., 16) in SI radiometric units per nm."""
    return spec @ _LUMINANCE_WEIGHTS


def solar_irradiance() -> np.ndarray:
    """Spectral irradiance of the Sun above the atmosphere, W m^-2 nm^-1, (16,).

    A 5778 K black-body shape scaled so that its illuminance is SOLAR_ILLUMINANCE_LUX.
    """
    shape = planck_shape(WAVELENGTHS_NM, SUN_TEMPERATURE_K)
    return shape * (SOLAR_ILLUMINANCE_LUX / luminance_of_spectrum(shape))


def rayleigh_scattering_per_m(lam_nm: np.ndarray) -> np.ndarray:
    """Rayleigh scattering coefficient of sea-level air, 1/m.

    33.1e-6 /m at 440 nm scaled as lambda^-4 (the values 5.8, 13.6, 33.1 e-6/m at 680, 550,
    440 nm of Bruneton & Neyret 2008 / Bruneton 2017); zenith optical depth 0.108 at 550 nm
    with an 8 km scale height, near the 0.097 of Bucholtz 1995 (Appl. Opt. 34, 2765).
    """
    return 33.1e-6 * (440.0 / lam_nm) ** 4


# Ozone absorption cross-section, m^2 per molecule, 360-830 nm every 10 nm (Chappuis band),
# laboratory spectra of Serdyuchenko et al. 2014 (Atmos. Meas. Tech. 7, 625) at 293 K as
# tabulated in Bruneton's 2017 precomputed-scattering demo (from memory).
_O3_LAM = np.arange(360.0, 831.0, 10.0)
_O3_XSEC = np.array([
    1.18e-27, 2.182e-28, 2.818e-28, 6.636e-28, 1.527e-27, 2.763e-27, 5.52e-27, 8.451e-27,
    1.582e-26, 2.316e-26, 3.669e-26, 4.924e-26, 7.752e-26, 9.016e-26, 1.48e-25, 1.602e-25,
    2.139e-25, 2.755e-25, 3.091e-25, 3.5e-25, 4.266e-25, 4.672e-25, 4.398e-25, 4.701e-25,
    5.019e-25, 4.305e-25, 3.74e-25, 3.215e-25, 2.662e-25, 2.238e-25, 1.852e-25, 1.473e-25,
    1.209e-25, 9.423e-26, 7.455e-26, 6.566e-26, 5.105e-26, 4.15e-26, 4.228e-26, 3.237e-26,
    2.451e-26, 2.801e-26, 2.534e-26, 1.624e-26, 1.465e-26, 2.078e-26, 1.383e-26, 7.105e-27])

#: One Dobson unit, molecules per m^2 (common practice).
DOBSON_UNIT_PER_M2 = 2.687e20


def ozone_cross_section_m2(lam_nm: np.ndarray) -> np.ndarray:
    """Ozone absorption cross-section (Chappuis band), m^2 per molecule."""
    return np.interp(lam_nm, _O3_LAM, _O3_XSEC)


def spectrum_to_rgb(spec: np.ndarray) -> np.ndarray:
    """Spectral radiance (..., 16) W m^-2 sr^-1 nm^-1 -> linear sRGB (..., 3), Y in cd/m^2."""
    return spec @ SPECTRAL_TO_RGB


def sun_rgb_lux() -> np.ndarray:
    """Linear sRGB of sunlight above the atmosphere, Y = SOLAR_ILLUMINANCE_LUX, (3,)."""
    return spectrum_to_rgb(solar_irradiance())
