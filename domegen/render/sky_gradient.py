"""A placeholder sky: a smooth gradient by Sun altitude (implements SkyModel).

Not a physical atmosphere.  Level: the mean sky luminance follows the USNO
horizontal-illuminance model (Janiczek & DeYoung 1987, USNO Circular 171)
as L = f_diffuse * E / pi, floored at the night sky (Falchi et al. 2016:
22.0 mag/arcsec^2 ~ 1.7e-4 cd/m^2; L = 10.8e4 * 10^(-0.4 m) cd/m^2).
Shape: the CIE standard clear sky (ISO 15469 type 12) gradation and
indicatrix, also used with the Sun below the horizon for a twilight glow.
Colour: an artistic ramp (blue by day, orange near a low Sun, grey-blue at night).
Point-source extinction: Kasten & Young (1989) air mass with per-channel
coefficients (R, G, B) = (0.10, 0.15, 0.26) mag/air mass (V typical 0.15-0.25, from memory for R, B).
"""

from __future__ import annotations

import math

import numpy as np

from domegen.render.sky_model import SkyLight

# USNO Circular 171 coefficients (log10 E = L0 + L1 x + L2 x^2 + L3 x^3, x = h/90), by lower bound of h.
_USNO = ((20.0, (3.74, 3.97, -4.07, 1.47)), (5.0, (3.05, 13.28, -45.98, 64.33)),
         (-0.8, (2.88, 22.26, -207.64, 1034.30)), (-5.0, (2.88, 21.81, -258.11, -858.36)),
         (-12.0, (2.70, 12.17, -431.69, -1899.83)), (-18.0, (13.84, 262.72, 1447.42, 2797.93)))
NIGHT_MAG_ARCSEC2 = 22.0
EXTINCTION_RGB = np.array([0.10, 0.15, 0.26])
_LUMA = np.array([0.2126, 0.7152, 0.0722])


def mag_arcsec2_to_cd_m2(m) -> np.ndarray:
    """Surface brightness (V mag/arcsec^2) -> luminance cd/m^2 (10.8e4 * 10^(-0.4 m))."""
    return 10.8e4 * 10.0 ** (-0.4 * np.asarray(m, dtype=float))


def usno_illuminance_lux(sun_alt_deg: float) -> float:
    """Clear-sky horizontal illuminance (Sun + sky), lux; night floor 0.002 lx."""
    h = float(sun_alt_deg)
    for lower, (a, b, c, d) in _USNO:
        if h > lower:
            x = h / 90.0
            return max(10.0 ** (a + b * x + c * x * x + d * x ** 3), 0.002)
    return 0.002


def airmass(alt_deg) -> np.ndarray:
    """Kasten & Young (1989) relative air mass for apparent altitude (deg), finite down to -1 deg."""
    h = np.maximum(np.asarray(alt_deg, dtype=float), -0.9)
    return 1.0 / (np.sin(np.radians(h)) + 0.50572 * (h + 6.07995) ** -1.6364)


def _smoothstep(a, b, x):
    t = np.clip((np.asarray(x, dtype=float) - a) / (b - a), 0.0, 1.0)
    return t * t * (3 - 2 * t)


def _normalise_luma(rgb):
    rgb = np.asarray(rgb, dtype=float)
    return rgb / (rgb @ _LUMA)


class GradientSky:
    """Placeholder SkyModel: smooth, cheap, plausible; see the module docstring."""

    name = "gradient"

    def mean_luminance(self, light: SkyLight) -> float:
        """Mean sky luminance over the hemisphere, cd/m^2."""
        h = light.sun_alt_deg
        f_diffuse = 0.15 + 0.85 * math.exp(-max(h, 0.0) / 8.0)
        day = f_diffuse * usno_illuminance_lux(h) * light.sun_visible_fraction / math.pi
        if h <= -18.0:
            day = 0.0
        night = self._night(light)
        moon = 0.02 * light.moon_illuminance_lux / math.pi * (light.moon_alt_deg > 0)
        return day + night + moon

    def _shape(self, z, cos_chi, sun_alt_deg):
        """CIE type 12 relative luminance (gradation x indicatrix)."""
        cz = np.maximum(z, 0.004)
        grad = 1.0 - np.exp(-0.32 / cz)
        chi = np.arccos(np.clip(cos_chi, -1.0, 1.0))
        ind = 1.0 + 10.0 * (np.exp(-3.0 * chi) - math.exp(-3.0 * math.pi / 2)) + 0.45 * cos_chi ** 2
        if sun_alt_deg < 0:
            ind = 1.0 + (ind - 1.0) * math.exp(sun_alt_deg / 6.0)
        return grad * ind

    def radiance(self, dirs_enu: np.ndarray, light: SkyLight) -> np.ndarray:
        """(3, M) directions -> (M, 3) float32 linear RGB cd/m^2 (directions below the horizon are clamped to it)."""
        d = np.asarray(dirs_enu, dtype=float)
        z = np.clip(d[2], 0.0, 1.0)
        sun = np.asarray(light.sun_enu, dtype=float).reshape(3)
        cos_chi = np.clip(sun @ d, -1.0, 1.0)
        h = light.sun_alt_deg
        shape = self._shape(z, cos_chi, h)
        ref = self._reference_mean(sun, h)
        lum = self.mean_luminance(light) * shape / ref
        day_w = float(_smoothstep(-8.0, 4.0, h))
        low = float(np.exp(-max(h, 0.0) / 10.0))
        horizon = (1.0 - z) ** 3
        near_sun = np.clip(0.5 * (1.0 + cos_chi), 0.0, 1.0) ** 2
        day_col = (_normalise_luma([0.42, 0.60, 1.0])[None] * (1 - horizon[:, None])
                   + _normalise_luma([0.85, 0.90, 1.0])[None] * horizon[:, None])
        warm = _normalise_luma([1.0, 0.55, 0.25])[None] * (low * horizon * near_sun)[:, None]
        day_col = day_col * (1 - (low * horizon * near_sun)[:, None]) + warm
        night_col = _normalise_luma([0.72, 0.80, 1.0])[None]
        night_lum = self._night(light)
        w = day_w * (1.0 - night_lum / max(self.mean_luminance(light), 1e-12))
        col = day_col * w + night_col * (1.0 - w)
        return (lum[:, None] * col).astype(np.float32)

    @staticmethod
    def _night(light: SkyLight) -> float:
        """Natural night sky plus the artificial part (SkyLight.light_pollution_mag_arcsec2), cd/m^2."""
        art = light.light_pollution_mag_arcsec2
        return float(mag_arcsec2_to_cd_m2(NIGHT_MAG_ARCSEC2) + (mag_arcsec2_to_cd_m2(art) if art else 0.0))

    _ref_cache: dict = {}

    def _reference_mean(self, sun, h) -> float:
        key = (round(float(h), 3),)
        got = self._ref_cache.get(key)
        if got is None:
            # mean of the shape over the hemisphere (uniform in solid angle, 600 fixed points)
            i = np.arange(600) + 0.5
            zz = i / 600.0
            phi = i * math.pi * (3.0 - math.sqrt(5.0))
            rr = np.sqrt(1 - zz ** 2)
            dirs = np.stack([rr * np.cos(phi), rr * np.sin(phi), zz])
            hs = math.radians(h)
            s = np.array([0.0, math.cos(hs), math.sin(hs)])
            got = float(np.mean(self._shape(zz, s @ dirs, h)))
            if len(self._ref_cache) > 4096:
                self._ref_cache.clear()
            self._ref_cache[key] = got
        return got

    def transmittance(self, alt_deg: np.ndarray, light: SkyLight) -> np.ndarray:
        """(...,) apparent altitudes -> (..., 3) fraction of a point source's light reaching the site."""
        x = airmass(alt_deg)
        k = EXTINCTION_RGB * math.exp(-light.site_elev_m / 8000.0)
        t = 10.0 ** (-0.4 * x[..., None] * k)
        return np.where(np.asarray(alt_deg)[..., None] < -1.0, 0.0, t)


def sky_model_named(name: str):
    """The SkyModel for a LayerSpec.sky_model value ("auto" = physical when installed)."""
    if name in ("auto", "physical"):
        try:
            from domegen.render.atmosphere import PhysicalSky  # noqa: PLC0415 - optional plug-in
        except ImportError:
            if name == "physical":
                from domegen.errors import InputError

                raise InputError("the physical sky model is not installed", field="sky_model",
                                 value=name, hint="use sky_model 'gradient' or 'auto'") from None
            return GradientSky()
        return PhysicalSky()
    return GradientSky()
