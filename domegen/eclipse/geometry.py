"""Fundamental-plane geometry: sites to (xi, eta, zeta) and plane points back to the ground.

Earth-fixed frame: X toward (0 N, 0 E), Z toward the north pole, lengths in
Earth equatorial radii, WGS84 ellipsoid.  ``theta_deg`` is the true Greenwich
hour angle of the shadow axis (mu - 1.002738 * 15"/s * Delta T).  The
fundamental-plane axes i (east), j (north), k (toward the Moon) follow
Meeus, *Elements of Solar Eclipses* (1989); every function broadcasts.
"""

from __future__ import annotations

import numpy as np

from domegen.eclipse.besselian import EARTH_E2, EARTH_RADIUS_KM

_SQ = np.sqrt(1.0 - EARTH_E2)  # 0.99664719: polar / equatorial radius


def axes(d_deg, theta_deg):
    """Unit vectors i, j, k of the fundamental plane in the Earth-fixed frame, each (3, ...)."""
    d = np.radians(d_deg)
    lam = -np.radians(theta_deg)  # east longitude of the axis' meridian
    sd, cd, sl, cl = np.sin(d), np.cos(d), np.sin(lam), np.cos(lam)
    zero = np.zeros_like(sd * sl)
    i = np.stack([-sl + zero, cl + zero, zero])
    j = np.stack([-sd * cl, -sd * sl, cd + zero])
    k = np.stack([cd * cl, cd * sl, sd + zero])
    return i, j, k


def site_vector(lat_deg, lon_deg, elev_m=0.0) -> np.ndarray:
    """Geocentric Earth-fixed position of sites, (3, ...) in Earth radii (rho cos phi', rho sin phi')."""
    phi = np.radians(lat_deg)
    lam = np.radians(lon_deg)
    u = np.arctan(_SQ * np.tan(phi))
    h = np.asarray(elev_m, dtype=float) / (EARTH_RADIUS_KM * 1000.0)
    rs = _SQ * np.sin(u) + h * np.sin(phi)
    rc = np.cos(u) + h * np.cos(phi)
    return np.stack([rc * np.cos(lam), rc * np.sin(lam), rs + 0.0 * lam])


def site_rho(lat_deg, elev_m=0.0):
    """(rho cos phi', rho sin phi') of sites in Earth equatorial radii (Meeus 1989)."""
    phi = np.radians(lat_deg)
    u = np.arctan(_SQ * np.tan(phi))
    h = np.asarray(elev_m, dtype=float) / (EARTH_RADIUS_KM * 1000.0)
    return np.cos(u) + h * np.cos(phi), _SQ * np.sin(u) + h * np.sin(phi)


def site_to_plane(rcos, rsin, lon_deg, d_deg, theta_deg, dmu_deg_h, dd_deg_h):
    """(xi, eta, zeta, dxi, deta) of sites given by rho cos/sin phi' and east longitude; rates per hour."""
    h = np.radians(np.asarray(theta_deg) + lon_deg)
    d = np.radians(d_deg)
    sh, ch, sd, cd = np.sin(h), np.cos(h), np.sin(d), np.cos(d)
    xi = rcos * sh
    rch = rcos * ch
    eta = rsin * cd - rch * sd
    zeta = rsin * sd + rch * cd
    mu1 = np.radians(dmu_deg_h)
    dxi = mu1 * rch
    deta = mu1 * xi * sd - zeta * np.radians(dd_deg_h)
    return xi, eta, zeta, dxi, deta


def plane_zeta(xi, eta, sd, cd, *, on_limb: bool = False):
    """zeta of the sunward ground point under plane point (xi, eta); (zeta, valid).

    ``sd``, ``cd``: sine and cosine of d.  ``on_limb`` accepts points a hair
    outside the outline (they are put on it, zeta = 0).
    """
    ea = EARTH_E2 / (1.0 - EARTH_E2)
    qa = 1.0 + ea * sd * sd
    qb = 2.0 * ea * eta * cd * sd
    qc = xi * xi + eta * eta + ea * (eta * cd) ** 2 - 1.0
    disc = qb * qb - 4.0 * qa * qc
    if on_limb:
        disc = np.where(disc > -1e-4, np.maximum(disc, 0.0), disc)
    valid = disc >= 0.0
    return (-qb + np.sqrt(np.where(valid, disc, 0.0))) / (2.0 * qa), valid


def surface_point(xi, eta, d_deg, theta_deg, *, on_limb: bool = False):
    """Ground point (sea level) under plane point (xi, eta) on the sunward side.

    Returns (lat_deg, lon_deg, zeta, valid); lat/lon are NaN where the point
    misses the Earth.  ``on_limb`` as in :func:`plane_zeta`.
    """
    xi = np.asarray(xi, dtype=float)
    eta = np.asarray(eta, dtype=float)
    d = np.radians(d_deg)
    sd, cd = np.sin(d), np.cos(d)
    zeta, valid = plane_zeta(xi, eta, sd, cd, on_limb=on_limb)
    lam = -np.radians(theta_deg)
    sl, cl = np.sin(lam), np.cos(lam)
    # p = xi i + eta j + zeta k with the axes of :func:`axes`, written out (no temporaries).
    w = zeta * cd - eta * sd
    px = -xi * sl + w * cl
    py = xi * cl + w * sl
    pz = eta * cd + zeta * sd
    lat = np.degrees(np.arctan2(pz, (1.0 - EARTH_E2) * np.hypot(px, py)))
    lon = np.degrees(np.arctan2(py, px))
    lat = np.where(valid, lat, np.nan)
    lon = np.where(valid, lon, np.nan)
    return lat, lon, np.where(valid, zeta, np.nan), valid


def sun_altaz(lat_deg, lon_deg, d_deg, theta_deg):
    """Airless altitude and azimuth (deg, from north through east) of the shadow-axis direction."""
    phi = np.radians(lat_deg)
    d = np.radians(d_deg)
    h = np.radians(np.asarray(theta_deg) + np.asarray(lon_deg))  # local hour angle
    sin_alt = np.sin(d) * np.sin(phi) + np.cos(d) * np.cos(phi) * np.cos(h)
    alt = np.degrees(np.arcsin(np.clip(sin_alt, -1.0, 1.0)))
    az = np.degrees(np.arctan2(-np.cos(d) * np.sin(h),
                               np.sin(d) * np.cos(phi) - np.cos(d) * np.sin(phi) * np.cos(h))) % 360.0
    return alt, az


def limb_rho(d_deg):
    """Semi-axis (north-south) of the Earth's outline in the fundamental plane."""
    return np.sqrt(1.0 - EARTH_E2 * np.cos(np.radians(d_deg)) ** 2)


def nearest_limb(x, y, d_deg, samples: int = 2880):
    """Closest point of the Earth's outline to the axis point (x, y) (scalars).

    Returns (distance, xi, eta) in Earth radii; distance < 0 if (x, y) is inside.
    """
    rho = float(limb_rho(d_deg))
    th = np.linspace(0.0, 2.0 * np.pi, samples, endpoint=False)
    ex, ey = np.cos(th), rho * np.sin(th)
    dist = np.hypot(ex - x, ey - y)
    i = int(np.argmin(dist))
    # Refine on a fine grid around the best sample.
    th2 = th[i] + np.linspace(-2.0, 2.0, 401) * (2.0 * np.pi / samples)
    ex, ey = np.cos(th2), rho * np.sin(th2)
    dist = np.hypot(ex - x, ey - y)
    j = int(np.argmin(dist))
    inside = x * x + (y / rho) ** 2 < 1.0
    return (-dist[j] if inside else dist[j]), float(ex[j]), float(ey[j])


def geodesic_km(lat1, lon1, lat2, lon2):
    """Great-circle distance (km) on a sphere of the mean Earth radius 6371.0 km."""
    p1, p2 = np.radians(lat1), np.radians(lat2)
    dl = np.radians(np.asarray(lon2) - np.asarray(lon1))
    a = np.sin((p2 - p1) / 2) ** 2 + np.cos(p1) * np.cos(p2) * np.sin(dl / 2) ** 2
    return 2.0 * 6371.0 * np.arcsin(np.sqrt(np.clip(a, 0.0, 1.0)))
