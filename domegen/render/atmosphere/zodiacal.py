"""Zodiacal light: sunlight scattered by interplanetary dust, brightest along the ecliptic.

Leinert et al. 1998, "The 1997 reference of diffuse night sky brightness", A&AS 127, 1,
Table 17: brightness at 500 nm in 1e-8 W m^-2 sr^-1 um^-1 over helio-ecliptic longitude from
the Sun (rows) and ecliptic latitude (columns), seen from Earth above the atmosphere.
1 S10(V) = 1.28e-8 W m^-2 sr^-1 um^-1 at 500 nm (their conversion); one S10 (a tenth-magnitude
star per square degree) is 27.78 V mag/arcsec^2. Gaps next to the Sun (the table's blanks)
are filled with the nearest tabulated value of the same longitude (it is daytime there).
"""

from __future__ import annotations

import numpy as np

LON_DEG = np.array([0, 5, 10, 15, 20, 25, 30, 35, 40, 45, 60, 75, 90, 105, 120, 135, 150, 165, 180], float)
LAT_DEG = np.array([0, 5, 10, 15, 20, 25, 30, 45, 60, 75], float)
_ = np.nan
TABLE = np.array([
    [_, _, _, 3140, 1610, 985, 640, 275, 150, 100],
    [_, _, _, 2940, 1540, 945, 625, 271, 150, 100],
    [_, _, 4740, 2470, 1370, 865, 590, 264, 148, 100],
    [11500, 6780, 3440, 1860, 1110, 755, 525, 251, 146, 100],
    [6400, 4480, 2410, 1410, 910, 635, 454, 237, 141, 99],
    [3840, 2830, 1730, 1100, 749, 545, 410, 223, 136, 97],
    [2480, 1870, 1220, 845, 615, 467, 365, 207, 131, 95],
    [1650, 1270, 910, 680, 510, 397, 320, 193, 125, 93],
    [1180, 940, 700, 530, 416, 338, 282, 179, 120, 92],
    [910, 730, 555, 442, 356, 292, 250, 166, 116, 90],
    [505, 442, 352, 292, 243, 209, 183, 134, 104, 86],
    [338, 317, 269, 227, 196, 172, 151, 116, 93, 82],
    [259, 251, 225, 193, 166, 147, 132, 104, 86, 79],
    [212, 210, 197, 170, 150, 133, 119, 96, 82, 77],
    [188, 186, 177, 154, 138, 125, 113, 90, 77, 74],
    [179, 178, 166, 147, 134, 122, 110, 90, 77, 73],
    [179, 178, 165, 148, 137, 127, 116, 96, 79, 72],
    [196, 192, 179, 165, 151, 141, 131, 104, 82, 72],
    [230, 212, 195, 178, 163, 148, 134, 105, 83, 72],
])
S10_UNIT = 1.28
S10_MAG_ARCSEC2 = 27.78


def _filled_log_table() -> np.ndarray:
    t = TABLE.copy()
    for row in t:
        first = np.flatnonzero(np.isfinite(row))[0]
        row[:first] = row[first]
    return np.log(t)


_LOG_TABLE = _filled_log_table()


def zodiacal_mag_arcsec2(delta_lon_deg, lat_deg):
    """V mag/arcsec^2 above the atmosphere for |longitude from the Sun| and |ecliptic latitude| (deg)."""
    lon = np.clip(np.abs(np.asarray(delta_lon_deg, float)), 0.0, 180.0)
    lat = np.clip(np.abs(np.asarray(lat_deg, float)), 0.0, 75.0)
    i = np.interp(lon, LON_DEG, np.arange(LON_DEG.size))
    j = np.interp(lat, LAT_DEG, np.arange(LAT_DEG.size))
    i0 = np.minimum(i.astype(int), LON_DEG.size - 2)
    j0 = np.minimum(j.astype(int), LAT_DEG.size - 2)
    fi, fj = i - i0, j - j0
    t = _LOG_TABLE
    v = ((t[i0, j0] * (1 - fj) + t[i0, j0 + 1] * fj) * (1 - fi)
         + (t[i0 + 1, j0] * (1 - fj) + t[i0 + 1, j0 + 1] * fj) * fi)
    return S10_MAG_ARCSEC2 - 2.5 * np.log10(np.exp(v) / S10_UNIT)


def ecliptic_coordinates(dirs_enu: np.ndarray, sun_enu: np.ndarray, pole_enu: np.ndarray):
    """(|longitude from the Sun|, ecliptic latitude) in degrees for directions (3, M)."""
    d = np.asarray(dirs_enu, float)
    p = np.asarray(pole_enu, float).reshape(3)
    p = p / np.linalg.norm(p)
    s = np.asarray(sun_enu, float).reshape(3)
    s_pl = s - (s @ p) * p
    s_pl /= max(np.linalg.norm(s_pl), 1e-12)
    dp = p @ d
    lat = np.degrees(np.arcsin(np.clip(dp, -1.0, 1.0)))
    x = s_pl @ d
    y = np.cross(p, s_pl) @ d
    lon = np.degrees(np.abs(np.arctan2(y, x)))
    return lon, lat
