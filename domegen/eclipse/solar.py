"""Global circumstances of a solar eclipse from its Besselian elements.

Greatest eclipse is the instant the shadow axis passes closest to the
Earth's centre (minimum of x^2 + y^2), as the NASA canons define it; gamma is
that least distance (Earth radii, sign of y).  For a central eclipse the
point of greatest eclipse is where the axis meets the ellipsoid; otherwise
it is the point of the Earth's limb nearest the axis (Sun on the horizon).
Magnitude there: (L1' - m) / (L1' + L2') with L1' = l1 - zeta tan f1,
L2' = l2 - zeta tan f2 and m the point's distance from the axis (Meeus
1989).  Path width is measured on the ground between the two umbral limit
points of the instant of greatest eclipse, perpendicular to the central
line; the central duration is 7200 |L2'| / n seconds (Meeus 1989).
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import datetime, timedelta, timezone

import numpy as np

from domegen.eclipse import geometry as geo
from domegen.eclipse.besselian import EARTH_ROT_DEG_PER_S, BesselianElements
from domegen.eclipse.saros import solar_saros

_UNIX = datetime(1970, 1, 1, tzinfo=timezone.utc)
_J2000_TT = datetime(2000, 1, 1, 12, tzinfo=timezone.utc)
TYPES = ("total", "annular", "hybrid", "partial")


@dataclass(frozen=True)
class SolarEclipse:
    """One solar eclipse: elements and global circumstances.

    Times: ``greatest_tt`` is on the TT scale (labelled +00:00),
    ``greatest_utc`` is UTC; ``delta_t_s`` = TT - UT1 used (skyfield's
    builtin table).  Longitudes east positive.  ``path_width_km`` and
    ``central_duration_s`` are None unless the axis meets the Earth.
    """

    besselian: BesselianElements
    type: str
    greatest_t_h: float
    greatest_utc: datetime
    greatest_tt: datetime
    delta_t_s: float
    gamma: float
    magnitude: float
    lat_deg: float
    lon_deg: float
    sun_alt_deg: float
    sun_az_deg: float
    path_width_km: float | None
    central_duration_s: float | None
    saros: int
    central: bool

    @property
    def date(self):
        """UTC calendar date of greatest eclipse."""
        return self.greatest_utc.date()

    def as_json(self) -> dict:
        """The stable fields of ``domegen eclipses --json`` for one solar eclipse."""
        def r(v, n):
            return None if v is None else round(float(v), n)

        return {
            "kind": "solar",
            "type": self.type,
            "greatest_utc": _iso(self.greatest_utc),
            "greatest_tt": _iso(self.greatest_tt)[:-1],  # TT scale: no UTC "Z"
            "delta_t_s": r(self.delta_t_s, 1),
            "gamma": r(self.gamma, 4),
            "magnitude": r(self.magnitude, 4),
            "lat_deg": r(self.lat_deg, 2),
            "lon_deg": r(self.lon_deg, 2),
            "sun_alt_deg": r(self.sun_alt_deg, 1),
            "path_width_km": r(self.path_width_km, 1),
            "central_duration_s": r(self.central_duration_s, 1),
            "saros": self.saros,
        }


def _iso(dt: datetime) -> str:
    dt = (dt + timedelta(microseconds=500_000)).replace(microsecond=0)
    return dt.strftime("%Y-%m-%dT%H:%M:%SZ")


def theta_deg(b: BesselianElements, e: dict, delta_t_s: float | None = None) -> np.ndarray:
    """True Greenwich hour angle of the axis from the ephemeris-meridian mu."""
    dt = b.delta_t_s if delta_t_s is None else delta_t_s
    return e["mu"] - EARTH_ROT_DEG_PER_S * dt


def greatest_t_h(b: BesselianElements, t_h: float = 0.0) -> float:
    """Hours from t0 of the minimum of x^2 + y^2 (Newton iteration)."""
    t = float(t_h)
    for _ in range(20):
        e = b.at(t)
        c = b.coefficients
        ddx = 2.0 * c["x"][2] + 6.0 * c["x"][3] * t
        ddy = 2.0 * c["y"][2] + 6.0 * c["y"][3] * t
        f = e["x"] * e["dx"] + e["y"] * e["dy"]
        fp = e["dx"] ** 2 + e["dy"] ** 2 + e["x"] * ddx + e["y"] * ddy
        step = float(f / fp)
        t -= step
        if abs(step) < 1e-9:
            break
    return t


def central_point(b: BesselianElements, t_h, delta_t_s: float | None = None):
    """Where the shadow axis meets the ground at ``t_h``: (lat, lon, zeta, valid) arrays."""
    e = b.at(t_h)
    return geo.surface_point(e["x"], e["y"], e["d"], theta_deg(b, e, delta_t_s))


def limit_points(b: BesselianElements, t_h, side: int, radius: str = "umbra",
                 magnitude: float | None = None, delta_t_s: float | None = None, iterations: int = 8,
                 secant: bool = True):
    """Ground points whose local maximum is at ``t_h`` and whose axis distance is the shadow radius.

    ``side`` +1 is left of the shadow's motion (north for the usual eastward
    track), -1 right.  ``radius`` "umbra" uses |L2'|, "penumbra" L1', and
    with ``magnitude`` G the distance L1' - G (L1' + L2').  The point lies at
    that distance from the axis in the direction psi perpendicular to its own
    motion relative to the shadow (u a + v b = 0).  psi is a fixed point of
    "perpendicular to the motion of the point at psi", solved by secant
    steps on the residual (plain fixed-point steps with ``secant=False``).
    Returns (lat, lon, zeta, valid) arrays.
    """
    t = np.asarray(t_h, dtype=float)
    e = b.at(t)
    th = theta_deg(b, e, delta_t_s)
    d = np.radians(e["d"])
    sd, cd = np.sin(d), np.cos(d)
    mu1, d1 = np.radians(e["dmu"]), np.radians(e["dd"])

    def point(psi, zeta):
        l1p = e["l1"] - zeta * b.tan_f1
        l2p = e["l2"] - zeta * b.tan_f2
        if magnitude is not None:
            dist = l1p - magnitude * (l1p + l2p)
        elif radius == "umbra":
            dist = np.abs(l2p)
        else:
            dist = l1p
        xi = e["x"] + dist * np.cos(psi)
        eta = e["y"] + dist * np.sin(psi)
        z, valid = geo.plane_zeta(xi, eta, sd, cd)
        return xi, eta, np.where(valid, z, 0.0)

    def perpendicular(xi, eta, zeta):
        # Velocity of the ground point in the plane (as _point_rates), then the normal on ``side``.
        dxi = mu1 * (zeta * cd - eta * sd)
        deta = mu1 * xi * sd - zeta * d1
        return np.arctan2(side * (e["dx"] - dxi), -side * (e["dy"] - deta))

    def wrap(a):
        return (a + np.pi) % (2.0 * np.pi) - np.pi

    zeta = np.sqrt(np.clip(1.0 - e["x"] ** 2 - e["y"] ** 2, 0.0, 1.0))
    psi0 = perpendicular(e["x"], e["y"], zeta)
    xi, eta, zeta = point(psi0, zeta)
    r0 = wrap(perpendicular(xi, eta, zeta) - psi0)
    psi1 = psi0 + r0
    for _ in range(iterations):
        xi, eta, zeta = point(psi1, zeta)
        r1 = wrap(perpendicular(xi, eta, zeta) - psi1)
        denom = r1 - r0
        use = secant & (np.abs(denom) > 1e-14)
        step = np.where(use, -r1 * (psi1 - psi0) / np.where(use, denom, 1.0), r1)
        psi0, r0 = psi1, r1
        psi1 = psi1 + np.clip(step, -0.3, 0.3)
    xi, eta, zeta = point(psi1, zeta)
    lat, lon, zeta, valid = geo.surface_point(xi, eta, e["d"], th)
    return lat, lon, zeta, valid


def _point_rates(e: dict, xi, eta, zeta):
    """Velocity (per hour) in the fundamental plane of the ground point at (xi, eta, zeta)."""
    d = np.radians(e["d"])
    mu1 = np.radians(e["dmu"])
    d1 = np.radians(e["dd"])
    # rho cos(phi') cos(H) = zeta cos d - eta sin d for a point of the plane frame.
    rcos_h = zeta * np.cos(d) - eta * np.sin(d)
    dxi = mu1 * rcos_h
    deta = mu1 * xi * np.sin(d) - zeta * d1
    return dxi, deta


def circumstances(b: BesselianElements) -> SolarEclipse | None:
    """Global circumstances for fitted elements; None if the penumbra misses the Earth."""
    tg = greatest_t_h(b)
    e = b.at(tg)
    x, y = float(e["x"]), float(e["y"])
    gamma = float(np.copysign(np.hypot(x, y), y))
    th = float(theta_deg(b, e))
    d = float(e["d"])
    lat, lon, zeta, valid = geo.surface_point(x, y, d, th)
    central = bool(valid)
    width = duration = None
    if central:
        zeta = float(zeta)
        l1p = float(e["l1"]) - zeta * b.tan_f1
        l2p = float(e["l2"]) - zeta * b.tan_f2
        magnitude = (l1p - l2p) / (l1p + l2p)
        lat, lon = float(lat), float(lon)
        dxi, deta = _point_rates(e, x, y, zeta)
        n = float(np.hypot(e["dx"] - dxi, e["dy"] - deta))
        duration = 7200.0 * abs(l2p) / n
        width = path_width_km(b, tg)
        width = width if np.isfinite(width) else None  # a limit misses the Earth (grazing path)
        kind = _central_type(b, tg)
    else:
        m, xi, eta = geo.nearest_limb(x, y, d)
        l1, l2 = float(e["l1"]), float(e["l2"])
        if m >= l1:
            return None
        magnitude = (l1 - m) / (l1 + l2)
        lat, lon, _, _ = geo.surface_point(xi, eta, d, th, on_limb=True)
        lat, lon = float(lat), float(lon)
        kind = ("total" if l2 < 0 else "annular") if m < abs(l2) else "partial"
    alt, az = geo.sun_altaz(lat, lon, d, th)
    if not central:
        alt = 0.0
    tt_jd = float(b.tt_jd(tg))
    greatest_tt = _J2000_TT + timedelta(days=tt_jd - 2451545.0)
    greatest_utc = _UNIX + timedelta(seconds=float(b.utc_s(tg)))
    return SolarEclipse(
        besselian=b, type=kind, greatest_t_h=tg, greatest_utc=greatest_utc, greatest_tt=greatest_tt,
        delta_t_s=b.delta_t_s, gamma=gamma, magnitude=float(magnitude), lat_deg=lat,
        lon_deg=((lon + 180.0) % 360.0) - 180.0, sun_alt_deg=float(alt), sun_az_deg=float(az),
        path_width_km=width, central_duration_s=duration, saros=solar_saros(tt_jd), central=central)


def central_span_h(b: BesselianElements, tg: float, step_h: float = 0.005):
    """(start, end) hours from t0 during which the axis meets the Earth (None if never)."""
    t = np.arange(-4.0, 4.0 + step_h / 2, step_h) + np.round(tg, 2)
    e = b.at(t)
    rho = geo.limb_rho(e["d"])
    inside = e["x"] ** 2 + (e["y"] / rho) ** 2 < 1.0
    if not inside.any():
        return None
    idx = np.flatnonzero(inside)
    lo, hi = idx[0], idx[-1]

    def root(i_out, i_in):
        # Secant steps on g(t) = x^2 + (y / rho)^2 - 1 from the bracketing samples.
        a, c = float(t[i_out]), float(t[i_in])

        def g(tt):
            em = b.at(tt)
            return float(em["x"] ** 2 + (em["y"] / geo.limb_rho(em["d"])) ** 2 - 1.0)

        ga, gc = g(a), g(c)
        for _ in range(6):
            if gc == ga:
                break
            a, ga, c = c, gc, c - gc * (c - a) / (gc - ga)
            gc = g(c)
            if abs(c - a) < 1e-9:
                break
        return c

    start = root(lo - 1, lo) if lo > 0 else float(t[0])
    end = root(hi + 1, hi) if hi + 1 < t.size else float(t[-1])
    return start, end


def _central_type(b: BesselianElements, tg: float) -> str:
    """total, annular or hybrid from the sign of L2' all along the central line."""
    span = central_span_h(b, tg)
    t = np.linspace(span[0], span[1], 401)
    _, _, zeta, valid = central_point(b, t)
    e = b.at(t)
    l2p = e["l2"] - np.where(valid, zeta, 0.0) * b.tan_f2
    if np.all(l2p < 0):
        return "total"
    if np.all(l2p > 0):
        return "annular"
    return "hybrid"


def path_width_km(b: BesselianElements, t_h: float) -> float:
    """Width of the umbral/antumbral path (km) at ``t_h``, perpendicular to the central line."""
    lat_n, lon_n, _, ok_n = limit_points(b, t_h, +1)
    lat_s, lon_s, _, ok_s = limit_points(b, t_h, -1)
    if not (ok_n and ok_s):
        return float("nan")
    lat_c, lon_c, _, _ = central_point(b, np.array([t_h - 1 / 60, t_h + 1 / 60]))
    # Local east/north metres on a sphere around the greatest point.
    lat0 = np.radians(0.5 * (lat_n + lat_s))

    def en(lat, lon):
        return np.array([np.radians(((lon - lon_c.mean() + 180) % 360) - 180) * np.cos(lat0),
                         np.radians(lat - lat_c.mean())]) * 6371.0

    track = en(lat_c[1], lon_c[1]) - en(lat_c[0], lon_c[0])
    track /= np.linalg.norm(track)
    chord = en(lat_n, lon_n) - en(lat_s, lon_s)
    dist = float(geo.geodesic_km(lat_n, lon_n, lat_s, lon_s))
    cos_a = abs(float(np.dot(chord, track))) / max(float(np.linalg.norm(chord)), 1e-12)
    return dist * np.sqrt(max(0.0, 1.0 - cos_a ** 2))
