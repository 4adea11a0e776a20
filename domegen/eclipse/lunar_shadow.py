"""The Earth's shadow at the Moon's distance, seen from the Earth's centre.

Convention (stated once, used everywhere in domegen): the Earth's radius is
enlarged by 1/85 for its atmosphere, the rule of Danjon (1951) adopted by the
Connaissance des Temps and by the NASA Five Millennium Canon of Lunar Eclipses
(Espenak & Meeus 2009, section "Enlargement of Earth's Shadows"):

    Rp = 1.01 * Pm + Ss + Ps        penumbral radius
    Ru = 1.01 * Pm - Ss + Ps        umbral radius

Pm = the Moon's equatorial horizontal parallax, Ss = the Sun's geocentric
semi-diameter, Ps = the Sun's equatorial horizontal parallax; 1.01 is
0.998340 (mean Earth radius at latitude 45 deg, flattening 1/300) times
(1 + 1/85) = 1.01008, rounded as in the canon.  The traditional Chauvenet
(1891) rule instead multiplies both radii by 1.02; it gives umbral magnitudes
about 0.005 and penumbral magnitudes about 0.026 larger.  Both rules assume
circular shadow cross-sections.

Positions are apparent geocentric (DE421, light time, aberration, deflection)
in the GCRS; times are TT Julian dates.
"""

from __future__ import annotations

import numpy as np

from domegen.sky.ephemeris import body, earth, timescale

#: Earth's equatorial radius, km (WGS84 / IERS 2010, common practice).
EARTH_RADIUS_KM = 6378.137
#: Solar radius from the Sun's semi-diameter 959.63 arcsec at 1 au (Auwers, as used by the NASA canons).
SUN_SEMIDIAMETER_1AU_RAD = np.radians(959.63 / 3600.0)
AU_KM = 149597870.7
#: Moon radius / Earth equatorial radius for lunar eclipses (mean radius over the limb profile,
#: 0.2724880; NASA canon elements, Espenak; see REFERENCES 4.5 for the family of k values).
MOON_K = 0.2724880
#: Danjon (1951) enlargement factor applied to the Moon's parallax (see module docstring).
DANJON_FACTOR = 1.01


def _unit(v):
    return v / np.linalg.norm(v, axis=0)


def apparent_sun_moon_km(tt_jd):
    """Apparent geocentric GCRS vectors (km) of the Sun and the Moon, each (3, N)."""
    t = timescale().tt_jd(np.atleast_1d(np.asarray(tt_jd, dtype=float)))
    e = earth().at(t)
    sun = e.observe(body("Sun")).apparent().position.km
    moon = e.observe(body("Moon")).apparent().position.km
    return sun, moon


def shadow_geometry(tt_jd) -> dict:
    """Shadow radii and the Moon's place relative to the shadow axis, for TT Julian dates (N,).

    Returns arrays (N,) in radians: ``D`` (angular distance of the Moon's centre from the
    shadow axis), ``x``, ``y`` (tangent-plane offsets of the Moon from the axis, east and
    north), ``pi_m``, ``pi_s``, ``s_s``, ``s_m`` (Moon semi-diameter), ``Rp``, ``Ru``; and
    ``moon_km`` (3, N), ``axis`` (3, N) unit vector of the anti-solar shadow axis, ``sun_km``.
    """
    sun, moon = apparent_sun_moon_km(tt_jd)
    ds = np.linalg.norm(sun, axis=0)
    dm = np.linalg.norm(moon, axis=0)
    axis = -sun / ds
    m = moon / dm
    cosd = np.clip(np.sum(axis * m, axis=0), -1.0, 1.0)
    D = np.arccos(cosd)
    # tangent-plane basis at the axis: east and north on the celestial sphere (GCRS)
    pole = np.array([0.0, 0.0, 1.0])[:, None]
    east = _unit(np.cross(pole.T, axis.T).T)
    north = np.cross(axis.T, east.T).T
    proj = m / cosd - axis
    x = np.arctan(np.sum(proj * east, axis=0))
    y = np.arctan(np.sum(proj * north, axis=0))
    pi_m = np.arcsin(EARTH_RADIUS_KM / dm)
    pi_s = np.arcsin(EARTH_RADIUS_KM / ds)
    s_s = np.arcsin(np.sin(SUN_SEMIDIAMETER_1AU_RAD) * AU_KM / ds)
    s_m = np.arcsin(MOON_K * EARTH_RADIUS_KM / dm)
    Rp = DANJON_FACTOR * pi_m + s_s + pi_s
    Ru = DANJON_FACTOR * pi_m - s_s + pi_s
    return {"D": D, "x": x, "y": y, "pi_m": pi_m, "pi_s": pi_s, "s_s": s_s, "s_m": s_m,
            "Rp": Rp, "Ru": Ru, "moon_km": moon, "sun_km": sun, "axis": axis, "dm_km": dm}
