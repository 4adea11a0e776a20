"""Sun, Moon and planets for a site and any number of instants, in one call.

Positions are skyfield's apparent topocentric positions (light time,
aberration, gravitational deflection) from DE421.  For long time arrays the
expensive part (light-time iteration through the ephemeris) is evaluated on
knots every 10 minutes and the resulting GCRS vectors interpolated with a
cubic spline; the error of that interpolation is below 1e-4 arcsec for the
Moon (whose diurnal parallax is the fastest term) and far less for the rest
(measured in tests/sky/test_bodies.py).  The rotation to the horizon is
evaluated exactly at every instant (domegen.sky.frames).

Magnitudes: Mallama & Hilton (2018) for the planets through skyfield's
magnitudelib; the Moon from the phase law V = -12.73 + 0.026|a| + 4e-9 a^4
(Allen, as used by Krisciunas & Schaefer 1991) at mean distance, corrected
for distance; the Sun V = -26.74 at 1 au (Allen's Astrophysical Quantities).
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass
from datetime import datetime

import numpy as np

from domegen.errors import NotFoundError
from domegen.sky import frames
from domegen.sky.ephemeris import BODY_NAMES, body
from domegen.sky.refraction import refract
from domegen.sky.site import Site
from domegen.sky.times import check_range, unix_seconds

#: Knot spacing of the interpolated positions, days.
KNOT_STEP_DAYS = 10.0 / 1440.0
#: The fixed knot grid of sequence positions (``grid=True``): TT seconds from J2000, multiples of this.
GRID_STEP_S = 600.0
_J2000_JD = 2451545.0

AU_KM = 149_597_870.700
#: Equatorial radii, km: IAU WGCCRE 2015 (Archinal et al. 2018); Sun: IAU 2015 nominal radius;
#: Moon: mean radius 1737.4 km.
RADIUS_KM = {
    "Sun": 695_700.0, "Moon": 1737.4, "Mercury": 2440.53, "Venus": 6051.8, "Mars": 3396.19,
    "Jupiter": 71_492.0, "Saturn": 60_268.0, "Uranus": 25_559.0, "Neptune": 24_764.0,
}
_FIELDS = ("alt_deg", "alt_refracted_deg", "az_deg", "ra_hours", "dec_deg", "distance_km",
           "angular_radius_deg", "phase_angle_deg", "illuminated_fraction", "bright_limb_pa_deg",
           "magnitude")
_VECTORS = ("enu", "enu_refracted", "gcrs_au")


@dataclass(frozen=True)
class _BodyArrays:
    """Fields shared by a table of bodies and one body's row (see :class:`BodyTable`)."""

    utc_s: np.ndarray
    alt_deg: np.ndarray
    alt_refracted_deg: np.ndarray
    az_deg: np.ndarray
    ra_hours: np.ndarray
    dec_deg: np.ndarray
    distance_km: np.ndarray
    angular_radius_deg: np.ndarray
    phase_angle_deg: np.ndarray
    illuminated_fraction: np.ndarray
    bright_limb_pa_deg: np.ndarray
    magnitude: np.ndarray
    enu: np.ndarray
    enu_refracted: np.ndarray
    gcrs_au: np.ndarray


@dataclass(frozen=True)
class BodyTable(_BodyArrays):
    """Positions of several bodies over N instants.

    Scalar fields are (B, N) arrays, vectors (B, 3, N); ``body(name)`` slices one.
    Altitudes and azimuths in degrees (azimuth from north through east),
    RA in hours and Dec in degrees of the true equator and equinox of date,
    distances in km, ``enu`` unit vectors in the site's horizon frame.
    """

    names: tuple = ()

    def index(self, name: str) -> int:
        try:
            return self.names.index(name)
        except ValueError:
            raise NotFoundError(f"body {name!r} is not in this table", field="body", value=name,
                                hint="table holds " + ", ".join(self.names)) from None

    def body(self, name: str) -> "BodyState":
        i = self.index(name)
        rows = {f: getattr(self, f)[i] for f in _FIELDS + _VECTORS}
        return BodyState(name=name, utc_s=self.utc_s, **rows)


@dataclass(frozen=True)
class BodyState(_BodyArrays):
    """One body's row of a :class:`BodyTable`: fields shaped (N,), vectors (3, N)."""

    name: str = ""


def _as_seconds(utc_s) -> np.ndarray:
    if isinstance(utc_s, datetime):
        return np.array([unix_seconds(utc_s)])
    if isinstance(utc_s, (list, tuple)) and utc_s and isinstance(utc_s[0], datetime):
        return np.asarray(unix_seconds(list(utc_s)))
    return np.atleast_1d(np.asarray(utc_s, dtype=float))


def _apparent_and_magnitude(site: Site, t, names) -> tuple[np.ndarray, np.ndarray]:
    """Exact skyfield apparent GCRS vectors (B, 3, K) au and magnitudes (B, K) of planets."""
    from skyfield.magnitudelib import planetary_magnitude

    at = site.observer().at(t)
    vecs, mags = [], []
    for name in names:
        astrometric = at.observe(body(name))
        vecs.append(astrometric.apparent().position.au)
        if name in ("Sun", "Moon"):
            mags.append(np.full(np.shape(t.tt), np.nan))
        else:
            with np.errstate(invalid="ignore", divide="ignore"):
                mags.append(np.asarray(planetary_magnitude(astrometric), dtype=float))
    return np.array(vecs), np.array(mags)


def _interpolated(site: Site, t, names) -> tuple[np.ndarray, np.ndarray]:
    """Apparent vectors and magnitudes at ``t`` via spline knots, or directly if that is no cheaper."""
    tt = np.atleast_1d(t.tt)
    lo, hi = float(tt.min()), float(tt.max())
    k = max(4, int(np.ceil((hi - lo) / KNOT_STEP_DAYS)) + 3)
    if tt.size <= 16 or 2 * k >= tt.size:
        return _apparent_and_magnitude(site, t, names)
    from scipy.interpolate import CubicSpline  # here: a one-frame worker never pays its import

    from domegen.sky.ephemeris import timescale

    knots = np.linspace(lo - KNOT_STEP_DAYS, hi + KNOT_STEP_DAYS, k)
    tk = timescale().tt_jd(knots)
    if knots.size > 64:
        frames._install_interpolated_nutation(tk)
    vk, mk = _apparent_and_magnitude(site, tk, names)
    vec = CubicSpline(knots, vk, axis=2)(tt)
    mag = np.full((len(names), tt.size), np.nan)
    finite = np.isfinite(mk)
    for i in range(len(names)):  # per body (at most 10), not per instant
        if finite[i].all():
            mag[i] = CubicSpline(knots, mk[i])(tt)
    return vec, mag


@functools.lru_cache(maxsize=64)
def _grid_knot(site: Site, names: tuple, k: int) -> tuple[np.ndarray, np.ndarray]:
    """Exact apparent vectors (B, 3) au and magnitudes (B,) at knot ``k`` of the fixed grid.

    One knot per call, so a knot's values never depend on which other knots were wanted.
    """
    from domegen.sky.ephemeris import timescale

    t = timescale().tt_jd(_J2000_JD, k * GRID_STEP_S / 86400.0)
    vec, mag = _apparent_and_magnitude(site, t, names)
    return vec.reshape(len(names), 3), mag.reshape(len(names))


def _grid_interpolated(site: Site, t, names) -> tuple[np.ndarray, np.ndarray]:
    """Apparent vectors (B, 3, N) and magnitudes (B, N) by 4-point Lagrange interpolation on the
    fixed GRID_STEP_S grid of TT: each instant's value depends on that instant alone, whatever
    else is asked with it or before it, and consecutive frames share the knots (cached)."""
    tt_s = (np.atleast_1d(t.whole) - _J2000_JD) * 86400.0 + np.atleast_1d(t.tt_fraction) * 86400.0
    k1 = np.floor(tt_s / GRID_STEP_S).astype(np.int64)
    u = tt_s / GRID_STEP_S - k1                       # in [0, 1): between knots k1 and k1 + 1
    w = np.stack([-u * (u - 1) * (u - 2) / 6.0, (u + 1) * (u - 1) * (u - 2) / 2.0,
                  -(u + 1) * u * (u - 2) / 2.0, (u + 1) * u * (u - 1) / 6.0])     # nodes -1, 0, 1, 2
    vec = np.zeros((len(names), 3, tt_s.size))
    mag = np.zeros((len(names), tt_s.size))
    for j in range(tt_s.size):       # per instant (a frame asks for one); knots come from the cache
        for m in range(4):
            kv, km = _grid_knot(site, tuple(names), int(k1[j]) + m - 1)
            vec[:, :, j] += w[m, j] * kv
            mag[:, j] += w[m, j] * km
    return vec, mag


def _moon_sun_magnitudes(names, phase_deg, dist_km, sun_dist_au, mag):
    for i, name in enumerate(names):
        if name == "Moon":
            a = np.abs(phase_deg[i])
            mag[i] = (-12.73 + 0.026 * a + 4e-9 * a**4
                      + 5.0 * np.log10(dist_km[i] / 384_400.0) + 5.0 * np.log10(sun_dist_au[i]))
        elif name == "Sun":
            mag[i] = -26.74 + 5.0 * np.log10(dist_km[i] / AU_KM)
        elif name == "Neptune":
            # Mallama & Hilton give no phase term before 2000; their base value at 1980 and earlier.
            bad = ~np.isfinite(mag[i])
            mag[i, bad] = -6.89 + 5.0 * np.log10(dist_km[i, bad] / AU_KM * sun_dist_au[i, bad])
    return mag


def body_positions(site: Site, utc_s, names=BODY_NAMES, *, grid: bool = False) -> BodyTable:
    """Apparent topocentric positions of ``names`` at POSIX UTC seconds ``utc_s``.

    ``utc_s`` may be a float, an array of any length, or aware datetimes.
    ``grid``: the light-time positions come from a fixed 10-minute grid of TT
    shared by all calls of this process (frame after frame of a sequence:
    ~0.1 ms instead of ~10 ms an instant), interpolated to within 0.001 arcsec;
    the result for an instant does not depend on what was asked before.
    Raises OutOfRangeError outside 1900-2050 and NotFoundError for an unknown body.
    """
    names = tuple(names)
    for n in names:
        body(n)
    s = _as_seconds(utc_s)
    check_range(s)
    t = frames.fast_time(s)
    want = names if "Sun" in names else names + ("Sun",)
    vec, mag = _grid_interpolated(site, t, want) if grid else _interpolated(site, t, want)

    dist_au = np.linalg.norm(vec, axis=1)                      # (B, N)
    unit = vec / dist_au[:, None, :]
    r_enu = frames.enu_rotation(site, t)                       # (3, 3, N)
    enu = np.einsum("ijn,bjn->bin", r_enu, unit)
    alt, az = frames.enu_to_altaz_deg(enu.transpose(1, 0, 2))
    alt_r = refract(alt, site.temperature_C, site.pressure_mbar)
    enu_r = frames.altaz_to_enu(alt_r, az).transpose(1, 0, 2)

    eq = np.einsum("ijn,bjn->bin", t.M, unit)
    ra = np.degrees(np.arctan2(eq[:, 1], eq[:, 0])) % 360.0
    dec = np.degrees(np.arcsin(np.clip(eq[:, 2], -1.0, 1.0)))

    isun = want.index("Sun")
    sun_vec = vec[isun]
    to_sun = sun_vec[None] - vec                               # body -> Sun, au
    sun_dist = np.linalg.norm(to_sun, axis=1)
    with np.errstate(invalid="ignore", divide="ignore"):
        cos_phase = np.einsum("bin,bin->bn", -vec, to_sun) / (dist_au * sun_dist)
    phase = np.degrees(np.arccos(np.clip(np.nan_to_num(cos_phase, nan=1.0), -1.0, 1.0)))
    phase[isun] = 0.0
    illum = 0.5 * (1.0 + np.cos(np.radians(phase)))

    ra0, dec0 = np.radians(ra[isun]), np.radians(dec[isun])
    rab, decb = np.radians(ra), np.radians(dec)
    # Meeus, Astronomical Algorithms (1998) eq. 48.5: position angle of the bright limb.
    chi = np.degrees(np.arctan2(np.cos(dec0) * np.sin(ra0 - rab),
                                np.sin(dec0) * np.cos(decb) - np.cos(dec0) * np.sin(decb) * np.cos(ra0 - rab))) % 360.0

    dist_km = dist_au * AU_KM
    radii = np.array([RADIUS_KM[n] for n in want])[:, None]
    ang_rad = np.degrees(np.arcsin(np.clip(radii / dist_km, 0.0, 1.0)))
    mag = _moon_sun_magnitudes(want, phase, dist_km, sun_dist, mag)

    sel = [want.index(n) for n in names]
    return BodyTable(
        names=names, utc_s=s,
        alt_deg=alt[sel], alt_refracted_deg=alt_r[sel], az_deg=az[sel],
        ra_hours=ra[sel] / 15.0, dec_deg=dec[sel], distance_km=dist_km[sel],
        angular_radius_deg=ang_rad[sel], phase_angle_deg=phase[sel],
        illuminated_fraction=illum[sel], bright_limb_pa_deg=chi[sel], magnitude=mag[sel],
        enu=enu[sel], enu_refracted=enu_r[sel], gcrs_au=vec[sel],
    )


def equatorial_to_enu(site: Site, utc_s) -> np.ndarray:
    """Rotations (3, 3, N) from the true equator and equinox of date to the site's ENU frame."""
    s = _as_seconds(utc_s)
    check_range(s)
    t = frames.fast_time(s)
    r = frames.enu_rotation(site, t)
    return np.einsum("ijn,kjn->ikn", r, t.M)


def gcrs_to_enu(site: Site, utc_s) -> np.ndarray:
    """Rotations (3, 3, N) from GCRS (ICRS axes) to the site's ENU frame."""
    s = _as_seconds(utc_s)
    check_range(s)
    return frames.enu_rotation(site, frames.fast_time(s))
