"""Independent geodesy helpers for the map tests (not project code).

WGS84 constants and the local east-north tangent plane are common practice;
the central-line formulas are those of Meeus, *Elements of Solar Eclipses
1951-2200* (Willmann-Bell, 1989), as used by the NASA canon.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np

DATA = Path(__file__).parent / "data"
A_KM = 6378.137            # WGS84 equatorial radius (common practice)
E2 = 0.00669437999014      # WGS84 first eccentricity squared (common practice)


def load(name: str) -> dict:
    return json.loads((DATA / name).read_text(encoding="utf-8"))


def ecef_km(lat_deg, lon_deg):
    lat, lon = np.radians(lat_deg), np.radians(lon_deg)
    n = A_KM / np.sqrt(1 - E2 * np.sin(lat) ** 2)
    return np.stack([n * np.cos(lat) * np.cos(lon), n * np.cos(lat) * np.sin(lon),
                     n * (1 - E2) * np.sin(lat)], axis=-1)


def enu_km(lat0, lon0, lat_deg, lon_deg):
    """(N, 2) east/north km of points in the tangent plane at (lat0, lon0)."""
    la, lo = np.radians(lat0), np.radians(lon0)
    e = np.array([-np.sin(lo), np.cos(lo), 0.0])
    n = np.array([-np.sin(la) * np.cos(lo), -np.sin(la) * np.sin(lo), np.cos(la)])
    d = ecef_km(lat_deg, lon_deg) - ecef_km(lat0, lon0)
    return np.stack([d @ e, d @ n], axis=-1)


def point_segment_km(p, a, b):
    """Distance (km) from 2-D point p to segments a[i]-b[i] (tangent-plane coordinates)."""
    ab = b - a
    t = np.clip(np.sum((p - a) * ab, axis=1) / np.maximum(np.sum(ab * ab, axis=1), 1e-12), 0, 1)
    q = a + t[:, None] * ab
    return np.hypot(*(p - q).T)


def line_parts(geom) -> list[np.ndarray]:
    """(N, 2) lon/lat arrays of a LineString or MultiLineString."""
    if geom["type"] == "LineString":
        return [np.asarray(geom["coordinates"], dtype=float)]
    return [np.asarray(c, dtype=float) for c in geom["coordinates"]]


def polygon_rings(geom) -> list[np.ndarray]:
    """Exterior rings (N, 2) lon/lat of a Polygon or MultiPolygon."""
    if geom["type"] == "Polygon":
        return [np.asarray(geom["coordinates"][0], dtype=float)]
    return [np.asarray(p[0], dtype=float) for p in geom["coordinates"]]


def inside(rings, lat, lon) -> bool:
    """Even-odd point-in-polygon test in the lon/lat plane (fine for regional paths)."""
    hit = False
    for r in rings:
        x, y = r[:, 0], r[:, 1]
        x2, y2 = np.roll(x, -1), np.roll(y, -1)
        cross = ((y > lat) != (y2 > lat)) & (lon < x + (lat - y) * (x2 - x) / np.where(y2 != y, y2 - y, 1e-300))
        hit ^= bool(np.count_nonzero(cross) % 2)
    return hit


def feature(fc, name):
    for f in fc["features"]:
        if f["properties"]["name"] == name:
            return f
    raise KeyError(name)


def canon_central_point(canon: dict):
    """Canon point of greatest eclipse (lat, lon east, degrees) from the canon's own elements.

    Meeus (1989) central-line formulas at the canon's instant of greatest
    eclipse, with the canon's Delta T.
    """
    b = canon["besselian"]
    h, m, s = (float(v) for v in canon["greatest_td"].split(":"))
    t = h + m / 60 + s / 3600 - b["t0_td_hours"]
    ev = {k: sum(c * t ** i for i, c in enumerate(b[k])) for k in ("x", "y", "d", "mu")}
    d = np.radians(ev["d"])
    w = 1 / np.sqrt(1 - E2 * np.cos(d) ** 2)
    y1 = w * ev["y"]
    b1 = w * np.sin(d)
    b2 = 0.99664719 * w * np.cos(d)
    B = np.sqrt(1 - ev["x"] ** 2 - y1 ** 2)
    phi1 = np.arcsin(B * b1 + y1 * b2)
    H = np.degrees(np.arctan2(ev["x"] / np.cos(phi1), (B * b2 - y1 * b1) / np.cos(phi1)))
    phi = np.degrees(np.arctan(1.00336409 * np.tan(phi1)))
    lam_west = ev["mu"] - H - 0.00417807 * canon["delta_t_s"]
    lon = ((-lam_west + 180) % 360) - 180
    return float(phi), float(lon)
