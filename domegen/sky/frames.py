"""Earth orientation for many instants at once, and the site's horizon frame.

The IAU 2000A nutation series dominates the cost of skyfield's rotations.
Nutation varies slowly (shortest significant period 5.6 days, amplitudes
below 0.01 arcsec), so for long time arrays it is evaluated on knots every
2 hours and interpolated with a cubic spline; the error is below 1e-6 arcsec.
Everything else (precession, Earth rotation angle, Delta T) is evaluated
exactly at every instant by skyfield.

Horizon frame convention used throughout domegen ("ENU"): x east, y north,
z up.  Azimuth is measured from north through east.
"""

from __future__ import annotations

import numpy as np

from domegen.sky.ephemeris import timescale

#: Spacing of nutation knots, days.
NUTATION_STEP_DAYS = 2.0 / 24.0
_DIRECT_LIMIT = 64


def fast_time(utc_s) -> "object":
    """A skyfield ``Time`` for POSIX UTC seconds with interpolated nutation."""
    ts = timescale()
    s = np.atleast_1d(np.asarray(utc_s, dtype=float))
    t = utc_time(s)
    if s.size > _DIRECT_LIMIT:
        _install_interpolated_nutation(t)
    return t


#: 1972-01-01T00:00:00Z in POSIX seconds: where UTC with leap seconds begins.
UTC_1972_S = 63_072_000.0
_UNIX_JD = 2440587.5


def utc_time(utc_s):
    """skyfield ``Time`` for POSIX seconds of domegen's civil time scale (scalar or array).

    From 1972 the scale is UTC with leap seconds; before 1972 it is UT1, the
    Universal Time of eclipse canons and almanacs (skyfield would extend the
    1972 offset backwards, putting "UTC" 45 s away from UT in 1900).  The
    seconds are split into whole days and seconds of day so that skyfield looks
    up TAI-UTC for each instant's own date.
    """
    s = np.asarray(utc_s, dtype=float)
    flat = np.atleast_1d(s)
    ts = timescale()
    days = np.floor(flat / 86400.0)
    sod = flat - days * 86400.0
    t = ts.utc(1970, 1, 1 + days.astype(np.int64), 0, 0, sod)
    early = flat < UTC_1972_S
    if np.any(early):
        whole = np.array(np.broadcast_to(t.whole, flat.shape), dtype=float)
        frac = np.array(np.broadcast_to(t.tt_fraction, flat.shape), dtype=float)
        tu = ts.ut1(1970, 1, 1 + days[early].astype(np.int64), 0, 0, sod[early])
        whole[early] = tu.whole
        frac[early] = tu.tt_fraction
        t = ts.tt_jd(whole, frac)
    if s.ndim == 0:
        t = ts.tt_jd(float(np.atleast_1d(t.whole)[0]), float(np.atleast_1d(t.tt_fraction)[0]))
    return t


def civil_seconds(t) -> np.ndarray:
    """POSIX seconds of domegen's civil time (UTC from 1972, UT1 before) for a skyfield Time."""
    ut1 = np.atleast_1d(np.asarray(t.ut1, dtype=float))
    out = (ut1 - _UNIX_JD) * 86400.0
    late = out >= UTC_1972_S
    if np.any(late):
        # TT - UTC = 32.184 s + leap seconds; skyfield's leap-second table gives TAI - UTC.
        y, mo, d, h, mi, sec = (np.atleast_1d(np.asarray(v, dtype=float))[late] for v in t.utc)
        days = _days_from_civil(y.astype(np.int64), mo.astype(np.int64), d.astype(np.int64))
        utc = days * 86400.0 + h * 3600.0 + mi * 60.0 + sec
        out[late] = utc
    return out


def _days_from_civil(y, m, d):
    """Days since 1970-01-01 of proleptic Gregorian dates (H. Hinnant's algorithm), vectorised."""
    y = y - (m <= 2)
    era = np.floor_divide(y, 400)
    yoe = y - era * 400
    mp = (m + 9) % 12
    doy = (153 * mp + 2) // 5 + d - 1
    doe = yoe * 365 + yoe // 4 - yoe // 100 + doy
    return (era * 146097 + doe - 719468).astype(float)


def _install_interpolated_nutation(t) -> None:
    from scipy.interpolate import CubicSpline
    from skyfield.nutationlib import iau2000a_radians

    tt = t.tt
    lo, hi = float(np.min(tt)), float(np.max(tt))
    n = max(4, int(np.ceil((hi - lo) / NUTATION_STEP_DAYS)) + 3)
    if n >= tt.size:
        return  # no saving: leave skyfield's exact series in place
    knots = np.linspace(lo - NUTATION_STEP_DAYS, hi + NUTATION_STEP_DAYS, n)
    dpsi, deps = iau2000a_radians(timescale().tt_jd(knots))
    t._nutation_angles_radians = (CubicSpline(knots, dpsi)(tt), CubicSpline(knots, deps)(tt))


#: skyfield's altaz frame (x north, y east, z up; azimuth = atan2(y, x)) to ENU.
_NEU_TO_ENU = np.array([[0.0, 1.0, 0.0], [1.0, 0.0, 0.0], [0.0, 0.0, 1.0]])


def enu_rotation(site, t) -> np.ndarray:
    """Rotation matrices GCRS -> site horizon (ENU), shape (3, 3, N) or (3, 3).

    ``t`` is a skyfield Time (build it with :func:`fast_time` for long arrays).
    No polar motion (below 0.5 arcsec); no refraction.
    """
    r = site.topos.rotation_at(t)
    return np.einsum("ij,jk...->ik...", _NEU_TO_ENU, r)


def equatorial_of_date_rotation(t) -> np.ndarray:
    """Rotation GCRS -> true equator and equinox of date, shape (3, 3[, N])."""
    return t.M


def enu_to_altaz_deg(v) -> tuple[np.ndarray, np.ndarray]:
    """(alt_deg, az_deg) of ENU vectors shaped (3, ...); az in [0, 360)."""
    x, y, z = v[0], v[1], v[2]
    alt = np.degrees(np.arctan2(z, np.hypot(x, y)))
    az = np.degrees(np.arctan2(x, y)) % 360.0
    return alt, az


def altaz_to_enu(alt_deg, az_deg) -> np.ndarray:
    """Unit ENU vectors (3, ...) for altitudes and azimuths in degrees."""
    alt = np.radians(alt_deg)
    az = np.radians(az_deg)
    c = np.cos(alt)
    return np.stack([c * np.sin(az), c * np.cos(az), np.sin(alt)])
