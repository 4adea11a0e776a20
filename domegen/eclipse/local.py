"""Local circumstances of a solar eclipse for many sites at once (Meeus 1989 procedure).

For each site (geodetic latitude, longitude, elevation) the fundamental-plane
coordinates (xi, eta, zeta) follow the shadow; with u = x - xi, v = y - eta
and their rates a, b the local maximum is where u a + v b = 0, contacts where
sqrt(u^2 + v^2) equals L1' (C1, C4) or |L2'| (C2, C3).  Every quantity is
refined by Newton steps on all sites together (numpy arrays over a sites
axis).  Sun altitude and azimuth are airless (geometric, of the shadow-axis
direction, which differs from the Sun's by under 9 arcsec); a contact is
"above the horizon" when the Sun's centre is apparently above it, i.e. its
airless altitude exceeds -0.5667 deg (34' of refraction at the horizon,
common practice).
Position angles are measured on the Sun's disk from celestial north through
east, at the point of contact.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import datetime, timedelta, timezone

import numpy as np

from domegen.eclipse import geometry as geo
from domegen.eclipse.solar import SolarEclipse, theta_deg
from domegen.errors import InputError

HORIZON_ALT_DEG = -0.5667
CONTACTS = ("c1", "c2", "max", "c3", "c4")
_UNIX = datetime(1970, 1, 1, tzinfo=timezone.utc)


@dataclass(frozen=True)
class LocalCircumstances:
    """Arrays over sites (S,).  Times are POSIX UTC seconds, NaN where a contact does not occur.

    ``type_here``: "total", "annular", "partial" or "none" (no eclipse, or the
    Sun below the horizon for all of it).  ``magnitude`` (fraction of the
    Sun's diameter covered; inside the umbra or antumbra the ratio of the
    apparent diameters Moon/Sun) and ``obscuration`` (fraction of its area) at
    maximum; ``duration_s`` of totality/annularity (0 if none);
    ``sun_alt_deg[c]``, ``sun_az_deg[c]``, ``above_horizon[c]`` and
    ``position_angle_deg[c]`` per contact name in CONTACTS.
    """

    eclipse: SolarEclipse
    lat_deg: np.ndarray
    lon_deg: np.ndarray
    elev_m: np.ndarray
    utc_s: dict
    magnitude: np.ndarray
    obscuration: np.ndarray
    duration_s: np.ndarray
    sun_alt_deg: dict
    sun_az_deg: dict
    above_horizon: dict
    position_angle_deg: dict
    type_here: np.ndarray
    delta_t_s: float

    def __len__(self) -> int:
        return int(self.lat_deg.size)

    def utc(self, contact: str, i: int = 0) -> datetime | None:
        """The contact of site ``i`` as an aware UTC datetime (None where absent)."""
        s = self.utc_s[contact][i]
        return None if not np.isfinite(s) else _UNIX + timedelta(seconds=float(s))

    def as_json(self, i: int = 0, timezone_name: str | None = None) -> dict:
        """The fields of ``domegen local --json`` for site ``i``."""
        from domegen.sky.times import iso_local, iso_utc

        tz = timezone_name or "UTC"
        none = self.type_here[i] == "none"
        out = {"kind": "solar", "eclipse": self.eclipse.date.isoformat(),
               "eclipse_type": self.eclipse.type, "type_here": str(self.type_here[i])}
        for c in CONTACTS:
            out[f"{c}_utc"] = None if none else iso_utc(self.utc(c, i))
        for c in CONTACTS:
            out[f"{c}_local"] = None if none else iso_local(self.utc(c, i), tz)
        out["timezone"] = tz
        out["magnitude"] = None if none else round(float(self.magnitude[i]), 4)
        out["obscuration"] = None if none else round(float(self.obscuration[i]), 4)
        out["duration_s"] = round(float(self.duration_s[i]), 1)
        alt = self.sun_alt_deg["max"][i]
        az = self.sun_az_deg["max"][i]
        out["sun_alt_deg_at_max"] = None if none or not np.isfinite(alt) else round(float(alt), 1)
        out["sun_az_deg_at_max"] = None if none or not np.isfinite(az) else round(float(az), 1)
        out["contacts"] = {
            c: None if none or not np.isfinite(self.utc_s[c][i]) else {
                "sun_alt_deg": round(float(self.sun_alt_deg[c][i]), 1),
                "sun_az_deg": round(float(self.sun_az_deg[c][i]), 1),
                "above_horizon": bool(self.above_horizon[c][i]),
                "position_angle_deg": (None if not np.isfinite(self.position_angle_deg[c][i])
                                       else round(float(self.position_angle_deg[c][i]), 1)),
            } for c in CONTACTS}
        return out


def _sites_arrays(sites):
    """(lat, lon, elev) arrays from a Site, a list of Sites, or a tuple of arrays."""
    from domegen.sky.site import Site

    if isinstance(sites, Site):
        sites = [sites]
    if isinstance(sites, (list, tuple)) and sites and isinstance(sites[0], Site):
        lat = np.array([s.lat_deg for s in sites], dtype=float)
        lon = np.array([s.lon_deg for s in sites], dtype=float)
        elev = np.array([s.elev_m for s in sites], dtype=float)
        return lat, lon, elev
    if isinstance(sites, tuple) and len(sites) in (2, 3):
        lat = np.atleast_1d(np.asarray(sites[0], dtype=float))
        lon = np.atleast_1d(np.asarray(sites[1], dtype=float))
        elev = np.atleast_1d(np.asarray(sites[2], dtype=float)) if len(sites) == 3 else np.zeros_like(lat)
        lat, lon, elev = np.broadcast_arrays(lat, lon, elev)
        if np.any(~np.isfinite(lat)) or np.any(np.abs(lat) > 90):
            raise InputError("latitudes must be finite and within -90..90 degrees", field="lat_deg")
        return lat.astype(float), lon.astype(float), elev.astype(float)
    raise InputError("sites must be a Site, a list of Sites or (lat_deg, lon_deg[, elev_m]) arrays",
                     field="sites", value=type(sites).__name__)


class _Shadow:
    """Evaluates u, v, a, b, L1', L2' and the Sun's direction for sites at times t (hours from t0)."""

    def __init__(self, eclipse: SolarEclipse, lat, lon, elev, delta_t_s):
        self.b = eclipse.besselian
        self.dt = delta_t_s
        self.rcos, self.rsin = geo.site_rho(lat, elev)
        self.lat, self.lon = lat, lon

    def __call__(self, t):
        b = self.b
        e = b.at(t)
        th = theta_deg(b, e, self.dt)
        xi, eta, zeta, dxi, deta = geo.site_to_plane(self.rcos, self.rsin, self.lon, e["d"], th,
                                                     e["dmu"], e["dd"])
        u, v = e["x"] - xi, e["y"] - eta
        a, bb = e["dx"] - dxi, e["dy"] - deta
        l1p = e["l1"] - zeta * b.tan_f1
        l2p = e["l2"] - zeta * b.tan_f2
        return u, v, a, bb, l1p, l2p, e, th

    def sun(self, t):
        e = self.b.at(t)
        return geo.sun_altaz(self.lat, self.lon, e["d"], theta_deg(self.b, e, self.dt))


def local_circumstances(eclipse: SolarEclipse, sites, *, delta_t_s: float | None = None) -> LocalCircumstances:
    """C1, C2, maximum, C3, C4, magnitude, obscuration, duration and Sun position for every site.

    ``sites``: a Site, a list of Sites, or a tuple (lat_deg, lon_deg[, elev_m])
    of arrays.  ``delta_t_s`` replaces the eclipse's Delta T (skyfield's) for
    Earth rotation and for the output times, which then are TT - delta_t_s:
    the convention of published tables computed with their own Delta T.
    """
    lat, lon, elev = _sites_arrays(sites)
    b = eclipse.besselian
    dt = b.delta_t_s if delta_t_s is None else float(delta_t_s)
    sh = _Shadow(eclipse, lat, lon, elev, dt)
    # Maximum: Newton steps from greatest eclipse.
    t = np.full(lat.shape, eclipse.greatest_t_h)
    for _ in range(5):
        u, v, a, bb, l1p, l2p, _, _ = sh(t)
        t = np.clip(t - (u * a + v * bb) / (a * a + bb * bb), -5.0, 5.0)
    u, v, a, bb, l1p, l2p, _, _ = sh(t)
    t_max = t
    m = np.hypot(u, v)
    eclipsed = m < l1p
    central = eclipsed & (m < np.abs(l2p))
    # Inside the umbra/antumbra the magnitude is the Moon/Sun diameter ratio (NASA bulletin convention).
    magnitude = np.where(central, (l1p - l2p) / (l1p + l2p), np.where(eclipsed, (l1p - m) / (l1p + l2p), 0.0))
    obscuration = np.where(eclipsed, _obscuration(m, l1p, l2p), 0.0)

    def contact(radius_fn, sign, mask):
        tc = t_max.copy()
        for _ in range(4):
            u, v, a, bb, l1p, l2p, _, _ = sh(tc)
            r = radius_fn(l1p, l2p)
            n2 = a * a + bb * bb
            w = u * a + v * bb
            disc = w * w - n2 * (u * u + v * v - r * r)
            tau = (-w + sign * np.sqrt(np.maximum(disc, 0.0))) / n2
            tc = np.clip(tc + tau, -6.0, 6.0)
        return np.where(mask, tc, np.nan)

    t_c1 = contact(lambda l1, l2: l1, -1.0, eclipsed)
    t_c4 = contact(lambda l1, l2: l1, +1.0, eclipsed)
    t_c2 = contact(lambda l1, l2: np.abs(l2), -1.0, central)
    t_c3 = contact(lambda l1, l2: np.abs(l2), +1.0, central)
    times_h = {"c1": t_c1, "c2": t_c2, "max": np.where(eclipsed, t_max, np.nan), "c3": t_c3, "c4": t_c4}
    total = l2p < 0
    alt, az, above, pa = {}, {}, {}, {}
    for c, tc in times_h.items():
        tz = np.where(np.isfinite(tc), tc, t_max)
        al, zz = sh.sun(tz)
        u, v, *_ = sh(tz)
        ang = np.degrees(np.arctan2(u, v)) % 360.0
        if c in ("c2", "c3"):
            ang = np.where(total, (ang + 180.0) % 360.0, ang)
        ok = np.isfinite(tc)
        alt[c] = np.where(ok, al, np.nan)
        az[c] = np.where(ok, zz, np.nan)
        above[c] = ok & (al > HORIZON_ALT_DEG)
        pa[c] = np.where(ok & (c != "max"), ang, np.nan)
    # Seen at all: the Sun is up at some moment between C1 and C4 (checked at 5 instants).
    frac = np.linspace(0.0, 1.0, 5)[:, None]
    ts_probe = np.where(eclipsed, t_c1, t_max)[None, :] * (1 - frac) + np.where(eclipsed, t_c4, t_max)[None, :] * frac
    seen = np.zeros(lat.shape, dtype=bool)
    for row in ts_probe:
        seen |= sh.sun(row)[0] > HORIZON_ALT_DEG
    seen &= eclipsed
    kind = np.where(total, "total", "annular")
    central_seen = central & (above["c2"] | above["c3"] | above["max"])
    type_here = np.where(~seen, "none", np.where(central_seen, kind, "partial"))
    duration = np.where(central, (t_c3 - t_c2) * 3600.0, 0.0)
    duration = np.where(np.isfinite(duration), duration, 0.0)
    utc = {c: np.where(np.isfinite(tc), b.utc_s(np.nan_to_num(tc), None if delta_t_s is None else dt), np.nan)
           for c, tc in times_h.items()}
    return LocalCircumstances(
        eclipse=eclipse, lat_deg=lat, lon_deg=lon, elev_m=elev, utc_s=utc, magnitude=magnitude,
        obscuration=obscuration, duration_s=duration, sun_alt_deg=alt, sun_az_deg=az, above_horizon=above,
        position_angle_deg=pa, type_here=type_here, delta_t_s=dt)


def _obscuration(m, l1p, l2p):
    """Fraction of the Sun's disk area covered: circle overlap with radii (L1'+L2')/2, (L1'-L2')/2."""
    rs = (l1p + l2p) / 2.0
    rm = (l1p - l2p) / 2.0
    d = np.maximum(m, 1e-15)
    full = d <= np.abs(rm - rs)
    c1 = np.clip((d * d + rs * rs - rm * rm) / (2 * d * rs), -1.0, 1.0)
    c2 = np.clip((d * d + rm * rm - rs * rs) / (2 * d * rm), -1.0, 1.0)
    area = (rs * rs * np.arccos(c1) + rm * rm * np.arccos(c2)
            - 0.5 * np.sqrt(np.maximum((-d + rs + rm) * (d + rs - rm) * (d - rs + rm) * (d + rs + rm), 0.0)))
    inside = np.where(rm >= rs, 1.0, (rm / rs) ** 2)
    frac = np.where(full, inside, area / (np.pi * rs * rs))
    return np.clip(np.where(d >= rs + rm, 0.0, frac), 0.0, 1.0)


__all__ = ["LocalCircumstances", "local_circumstances", "CONTACTS"]
