"""Besselian elements of solar eclipses from the DE421 ephemeris.

Standard method (Explanatory Supplement to the Astronomical Almanac, ch. 11;
Meeus, *Elements of Solar Eclipses 1951-2200*, 1989): from the geocentric
apparent positions of Sun and Moon (true equator and equinox of date) the
shadow axis direction (d, a) is the unit vector Moon -> Sun; the Moon's
coordinates in the fundamental plane (through the Earth's centre,
perpendicular to that axis; X east, Y north, Z toward the Moon) are x, y, z
in Earth equatorial radii.  mu is the Greenwich hour angle of the axis on the
*ephemeris* meridian (Greenwich apparent sidereal time + 1.002738 * 15"/s *
Delta T - a), as the canons tabulate it.  Cone half-angles and radii:

    sin f1 = (R_sun + k1 R_e) / |Sun - Moon|,  l1 = z tan f1 + k1 / cos f1
    sin f2 = (R_sun - k2 R_e) / |Sun - Moon|,  l2 = z tan f2 - k2 / cos f2

with the lunar radius constants k1 = 0.2725076 (penumbra, IAU 1982 mean
radius) and k2 = 0.272281 (umbra, mean minimum radius), as NASA eclipse
bulletins state them.  Every element is fitted with a cubic polynomial in
t = (TT - t0) hours over t0 +- 3 h, t0 being the integer TT hour nearest
greatest eclipse.  l2 < 0 means the umbral cone reaches the plane (total).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import datetime, timedelta, timezone

import numpy as np

from domegen.sky.ephemeris import ephemeris, timescale

#: Lunar radius in Earth equatorial radii for penumbral (exterior) contacts.
K_PENUMBRA = 0.2725076
#: Lunar radius for umbral/antumbral (interior) contacts.
K_UMBRA = 0.272281
#: WGS84 equatorial radius (km) and first eccentricity squared.
EARTH_RADIUS_KM = 6378.137
EARTH_E2 = 0.00669438
#: Solar radius: 959.63 arcsec at 1 au (Auwers), km.
SUN_RADIUS_KM = 959.63 / 206264.806247 * 149597870.7
AU_KM = 149597870.7
#: Earth rotation in degrees per second of time (1.002738 * 15 / 3600).
EARTH_ROT_DEG_PER_S = 0.00417807
#: Fitted elements, in table order.
ELEMENT_NAMES = ("x", "y", "d", "mu", "l1", "l2")
FIT_HALF_SPAN_H = 3.0
FIT_STEP_H = 0.25
_J2000_TT = datetime(2000, 1, 1, 12, tzinfo=timezone.utc)


def _nutation_per_group(t, group_size: int) -> None:
    """Evaluate nutation once per group of consecutive samples (it changes < 0.05" in 6 h)."""
    from skyfield.nutationlib import iau2000a_radians

    tt = t.tt
    centres = tt.reshape(-1, group_size).mean(axis=1)
    dpsi, deps = iau2000a_radians(timescale().tt_jd(centres))
    t._nutation_angles_radians = (np.repeat(dpsi, group_size), np.repeat(deps, group_size))


def raw_elements(tt_jd, *, group_size: int | None = None, rough: bool = False) -> dict[str, np.ndarray]:
    """Unfitted Besselian elements at TT Julian dates ``tt_jd`` (any shape).

    Returns arrays of the same shape: x, y, z (Earth radii), d (deg), mu (deg,
    ephemeris meridian, 0..360), a (deg, right ascension of the axis), l1, l2,
    tan_f1, tan_f2, delta_t_s.  ``group_size`` > 1 shares one nutation
    evaluation between that many consecutive samples (fast for searches).
    ``rough`` skips nutation, aberration and light deflection (errors of a few
    1e-5 Earth radii in x, y): enough to locate conjunctions.
    """
    tt = np.asarray(tt_jd, dtype=float)
    shape = tt.shape
    flat = tt.ravel()
    ts = timescale()
    t = ts.tt_jd(flat)
    if rough:
        zero = np.zeros(flat.shape)
        t._nutation_angles_radians = (zero, zero)
    elif group_size and group_size > 1 and flat.size % group_size == 0:
        _nutation_per_group(t, group_size)
    eph = ephemeris()
    earth = eph["earth"].at(t)
    if rough:
        sun = earth.observe(eph["sun"]).position.au
        moon = earth.observe(eph["moon"]).position.au
    else:
        sun = earth.observe(eph["sun"]).apparent().position.au
        moon = earth.observe(eph["moon"]).apparent().position.au
    rot = t.M  # GCRS -> true equator and equinox of date
    if rot.ndim == 2:
        rot = rot[:, :, None]
        sun = sun.reshape(3, -1)
        moon = moon.reshape(3, -1)
    k = AU_KM / EARTH_RADIUS_KM
    s = np.einsum("ijn,jn->in", rot, sun.reshape(3, -1)) * k
    m = np.einsum("ijn,jn->in", rot, moon.reshape(3, -1)) * k
    g = s - m
    g_len = np.linalg.norm(g, axis=0)
    gu = g / g_len
    d = np.arcsin(gu[2])
    a = np.arctan2(gu[1], gu[0])
    sa, ca, sd, cd = np.sin(a), np.cos(a), np.sin(d), np.cos(d)
    x = -m[0] * sa + m[1] * ca
    y = -m[0] * sd * ca - m[1] * sd * sa + m[2] * cd
    z = m[0] * cd * ca + m[1] * cd * sa + m[2] * sd
    g_km = g_len * EARTH_RADIUS_KM
    f1 = np.arcsin((SUN_RADIUS_KM + K_PENUMBRA * EARTH_RADIUS_KM) / g_km)
    f2 = np.arcsin((SUN_RADIUS_KM - K_UMBRA * EARTH_RADIUS_KM) / g_km)
    l1 = z * np.tan(f1) + K_PENUMBRA / np.cos(f1)
    l2 = z * np.tan(f2) - K_UMBRA / np.cos(f2)
    delta_t = np.atleast_1d(t.delta_t).astype(float)
    mu = (np.atleast_1d(t.gast) * 15.0 - np.degrees(a) + EARTH_ROT_DEG_PER_S * delta_t) % 360.0
    out = {"x": x, "y": y, "z": z, "d": np.degrees(d), "a": np.degrees(a) % 360.0, "mu": mu,
           "l1": l1, "l2": l2, "tan_f1": np.tan(f1), "tan_f2": np.tan(f2), "delta_t_s": delta_t}
    return {key: v.reshape(shape) for key, v in out.items()}


@dataclass(frozen=True)
class BesselianElements:
    """Cubic polynomial Besselian elements around ``t0`` (TT).

    ``coefficients[name]`` holds (a0, a1, a2, a3) for t in hours from t0;
    x, y, l1, l2 in Earth equatorial radii, d and mu in degrees.  ``tan_f1``
    and ``tan_f2`` are constants (the mean over the fit span).
    ``delta_t_s`` is TT - UT1 at t0 from skyfield's builtin table.
    """

    t0_tt_jd: float
    coefficients: dict = field(hash=False, compare=False)
    tan_f1: float
    tan_f2: float
    delta_t_s: float
    tt_minus_utc_s: float
    k_penumbra: float = K_PENUMBRA
    k_umbra: float = K_UMBRA

    @property
    def t0_tt(self) -> datetime:
        """t0 as an aware datetime on the TT scale."""
        return _J2000_TT + timedelta(days=self.t0_tt_jd - 2451545.0)

    def at(self, t_h) -> dict[str, np.ndarray]:
        """Elements and their hourly rates at ``t_h`` hours from t0 (any shape).

        Keys x, y, d, mu, l1, l2 and dx, dy, dd, dmu, dl1, dl2 (per hour).
        """
        t = np.asarray(t_h, dtype=float)
        out = {}
        for name in ELEMENT_NAMES:
            c = self.coefficients[name]
            out[name] = c[0] + t * (c[1] + t * (c[2] + t * c[3]))
            out["d" + name] = c[1] + t * (2.0 * c[2] + t * 3.0 * c[3])
        return out

    def tt_jd(self, t_h) -> np.ndarray:
        return self.t0_tt_jd + np.asarray(t_h, dtype=float) / 24.0

    def utc_s(self, t_h, delta_t_s: float | None = None) -> np.ndarray:
        """POSIX UTC seconds at ``t_h`` hours from t0.

        With ``delta_t_s`` given, the time is TT - delta_t_s instead (the
        convention of published tables, whose UT rests on their own Delta T).
        """
        offset = self.tt_minus_utc_s if delta_t_s is None else float(delta_t_s)
        return (self.t0_tt_jd - 2440587.5) * 86400.0 + np.asarray(t_h, dtype=float) * 3600.0 - offset

    def as_json(self) -> dict:
        """Stable JSON: t0 (TT), polynomial coefficients, tan f1/f2, constants."""
        return {
            "t0_tt": self.t0_tt.strftime("%Y-%m-%dT%H:%M:%S"),
            "t0_tt_jd": round(self.t0_tt_jd, 6),
            "delta_t_s": round(self.delta_t_s, 1),
            **{name: [float(f"{c:.8g}") for c in self.coefficients[name]] for name in ELEMENT_NAMES},
            "tan_f1": round(self.tan_f1, 7),
            "tan_f2": round(self.tan_f2, 7),
            "k_penumbra": self.k_penumbra,
            "k_umbra": self.k_umbra,
            "ephemeris": "JPL DE421",
            "units": "x, y, l1, l2 in Earth equatorial radii; d, mu in degrees; t in TT hours from t0",
        }


def fit_elements(t0_tt_jd) -> list[BesselianElements]:
    """Fit cubic elements around each t0 (TT Julian dates, one per eclipse), vectorised."""
    t0 = np.atleast_1d(np.asarray(t0_tt_jd, dtype=float))
    t_h = np.arange(-FIT_HALF_SPAN_H, FIT_HALF_SPAN_H + 1e-9, FIT_STEP_H)
    n = t_h.size
    raw = raw_elements(t0[:, None] + t_h[None, :] / 24.0, group_size=n)
    design = np.vander(t_h, 4, increasing=True)  # (n, 4)
    pinv = np.linalg.pinv(design)  # (4, n)
    mu = np.degrees(np.unwrap(np.radians(raw["mu"]), axis=1))
    series = {"x": raw["x"], "y": raw["y"], "d": raw["d"], "mu": mu, "l1": raw["l1"], "l2": raw["l2"]}
    coefs = {name: np.einsum("kn,en->ek", pinv, v) for name, v in series.items()}
    ts = timescale()
    tt_minus_utc = _tt_minus_utc_s(ts.tt_jd(t0))
    out = []
    mid = n // 2
    for e in range(t0.size):
        c = {name: coefs[name][e].copy() for name in ELEMENT_NAMES}
        c["mu"][0] %= 360.0
        out.append(BesselianElements(
            t0_tt_jd=float(t0[e]), coefficients=c,
            tan_f1=float(np.mean(raw["tan_f1"][e])), tan_f2=float(np.mean(raw["tan_f2"][e])),
            delta_t_s=float(raw["delta_t_s"][e, mid]), tt_minus_utc_s=float(tt_minus_utc[e])))
    return out


def _tt_minus_utc_s(t) -> np.ndarray:
    """TT minus domegen's civil time, s (32.184 + leap seconds from 1972; Delta T, i.e. UT1, before)."""
    from domegen.sky.times import tt_minus_civil_s

    return tt_minus_civil_s(t)
