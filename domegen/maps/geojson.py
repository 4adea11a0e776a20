"""RFC 7946 GeoJSON of an eclipse path.

One FeatureCollection with the path of totality/annularity (Polygon or
MultiPolygon), the central line (LineString with a UTC time for every vertex),
the northern and southern limits, the partial-eclipse limits, the sunrise/sunset
curves, the curves of equal magnitude, and the outlines of the penumbra and umbra
at greatest eclipse.  Positions are [longitude, latitude] (RFC 7946 s. 3.1.1),
exterior rings counter-clockwise (s. 3.1.6), and every geometry that crosses the
antimeridian is cut there into a Multi* geometry (s. 3.1.9).
"""

from __future__ import annotations

import json
from datetime import datetime, timezone

import numpy as np

from domegen.maps import shadow
from domegen.maps.layers import _RISE_SET, path_ring

_DIGITS = 5  # ~1 m


def _iso(utc_s: float) -> str:
    return datetime.fromtimestamp(round(float(utc_s)), timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ")


def split_line(lat, lon, values=None):
    """Cut a polyline at the antimeridian: list of (lon, lat[, values]) parts, lon in -180..180.

    Crossing points are interpolated and repeated on both sides (at +180 and
    -180); ``values`` (e.g. times) are interpolated there too.
    """
    lat = np.asarray(lat, dtype=float)
    lon_u = np.degrees(np.unwrap(np.radians(np.asarray(lon, dtype=float))))
    val = None if values is None else np.asarray(values, dtype=float)
    k = np.floor((lon_u + 180.0) / 360.0)  # strip index of every vertex
    parts = []
    cur_lon, cur_lat, cur_val = [lon_u[0]], [lat[0]], ([] if val is None else [val[0]])
    for i in range(1, lat.size):
        if k[i] != k[i - 1]:
            step = 1 if k[i] > k[i - 1] else -1
            for kk in range(int(k[i - 1]), int(k[i]), step):
                edge = 360.0 * (kk + (1 if step > 0 else 0)) - 180.0
                f = (edge - lon_u[i - 1]) / (lon_u[i] - lon_u[i - 1])
                la = lat[i - 1] + f * (lat[i] - lat[i - 1])
                cur_lon.append(edge); cur_lat.append(la)
                if val is not None:
                    cur_val.append(val[i - 1] + f * (val[i] - val[i - 1]))
                parts.append((kk, cur_lon, cur_lat, cur_val))
                cur_lon, cur_lat = [edge], [la]
                cur_val = [] if val is None else [cur_val[-1]]
        cur_lon.append(lon_u[i]); cur_lat.append(lat[i])
        if val is not None:
            cur_val.append(val[i])
    parts.append((int(k[-1]), cur_lon, cur_lat, cur_val))
    out = []
    for kk, lo, la, va in parts:
        lo = np.asarray(lo) - 360.0 * kk
        if lo.size >= 2:
            out.append((lo, np.asarray(la), np.asarray(va) if val is not None else None))
    return out


def _clip(poly: np.ndarray, x: float, keep_greater: bool) -> np.ndarray:
    """Sutherland-Hodgman clip of an (N, 2) ring against the line lon = x."""
    if len(poly) == 0:
        return poly
    inside = poly[:, 0] >= x if keep_greater else poly[:, 0] <= x
    out = []
    n = len(poly)
    for i in range(n):
        a, b = poly[i - 1], poly[i]
        ia, ib = inside[i - 1], inside[i]
        if ib:
            if not ia:
                out.append(_cross(a, b, x))
            out.append(b)
        elif ia:
            out.append(_cross(a, b, x))
    return np.array(out).reshape(-1, 2)


def _cross(a, b, x):
    f = (x - a[0]) / (b[0] - a[0])
    return np.array([x, a[1] + f * (b[1] - a[1])])


def signed_area(ring) -> float:
    """Shoelace area of an (N, 2) lon/lat ring: > 0 counter-clockwise."""
    r = np.asarray(ring, dtype=float)
    x, y = r[:, 0], r[:, 1]
    return 0.5 * float(np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y))


def split_polygon(lat, lon):
    """Cut a lat/lon ring at the antimeridian: list of closed CCW (N, 2) lon/lat rings.

    A ring that goes once around a pole (unwrapped longitudes drift by 360) is
    closed over that pole first.
    """
    lat = np.asarray(lat, dtype=float)
    lon_u = np.degrees(np.unwrap(np.radians(np.asarray(lon, dtype=float))))
    drift = lon_u[-1] - lon_u[0] + (((lon_u[0] - lon_u[-1]) + 180.0) % 360.0 - 180.0)
    ring = np.c_[lon_u, lat]
    if abs(drift) > 180.0:  # encircles a pole
        pole = 90.0 if np.mean(lat) > 0 else -90.0
        end = lon_u[-1] + (((lon_u[0] - lon_u[-1]) + 180.0) % 360.0 - 180.0)
        # along the pole in 10 deg steps, so no edge spans more than 180 deg of longitude
        cap = np.linspace(end, lon_u[0], int(np.ceil(abs(end - lon_u[0]) / 10.0)) + 1)
        ring = np.vstack([ring, [[end, lat[0]]], np.c_[cap, np.full(cap.size, pole)]])
    lo, hi = ring[:, 0].min(), ring[:, 0].max()
    out = []
    for kk in range(int(np.floor((lo + 180.0) / 360.0)), int(np.floor((hi + 180.0) / 360.0)) + 1):
        a, b = 360.0 * kk - 180.0, 360.0 * kk + 180.0
        piece = _clip(_clip(ring, a, True), b, False)
        if len(piece) < 3:
            continue
        piece = piece - [360.0 * kk, 0.0]
        if abs(signed_area(piece)) < 1e-10:
            continue
        if signed_area(piece) < 0:
            piece = piece[::-1]
        piece = np.vstack([piece, piece[:1]])
        out.append(piece)
    return out


def _r(a):
    return [[round(float(x), _DIGITS), round(float(y), _DIGITS)] for x, y in a]


def _line_feature(name: str, curves, props=None):
    coords, times = [], []
    for c in curves:
        for lo, la, ts in split_line(c.lat_deg, c.lon_deg, c.utc_s):
            coords.append(_r(np.c_[lo, la]))
            times.append([_iso(t) for t in ts])
    if not coords:
        return None
    p = {"name": name, **(props or {})}
    if len(coords) == 1:
        geom = {"type": "LineString", "coordinates": coords[0]}
        p["times_utc"] = times[0]
    else:
        geom = {"type": "MultiLineString", "coordinates": coords}
        p["times_utc"] = times
    return {"type": "Feature", "properties": p, "geometry": geom}


def _polygon_feature(name: str, lat, lon, props=None):
    rings = split_polygon(lat, lon)
    if not rings:
        return None
    if len(rings) == 1:
        geom = {"type": "Polygon", "coordinates": [_r(rings[0])]}
    else:
        geom = {"type": "MultiPolygon", "coordinates": [[_r(r)] for r in rings]}
    return {"type": "Feature", "properties": {"name": name, **(props or {})}, "geometry": geom}


def path_geojson(path, caution: str | None = None) -> dict:
    """FeatureCollection (dict) for an :class:`~domegen.eclipse.path.EclipsePath`."""
    from domegen.eclipse.safety import CAUTION

    e = path.eclipse
    feats = []
    ring = path_ring(path)
    kind = "annularity" if e.type == "annular" else "totality"
    if ring is not None:
        feats.append(_polygon_feature("path", *ring, {"shows": f"path of {kind}"}))
    feats.append(_line_feature("central_line", path.pieces("central")))
    for name, label in (("umbra_north", "northern_limit"), ("umbra_south", "southern_limit"),
                        ("penumbra_north", "northern_partial_limit"),
                        ("penumbra_south", "southern_partial_limit")):
        feats.append(_line_feature(label, path.pieces(name)))
    for name in _RISE_SET:
        feats.append(_line_feature(name, path.pieces(name)))
    mags = sorted({c.magnitude for c in path.curves if c.magnitude is not None})
    for g in mags:
        curves = path.pieces("magnitude_north", g) + path.pieces("magnitude_south", g)
        feats.append(_line_feature(f"magnitude_{g:.2f}", curves, {"magnitude": g}))
    tg = e.greatest_utc.timestamp()
    for which in ("penumbra", "umbra"):
        o = shadow.outline(e, tg, which, 720)
        if o is not None:
            feats.append(_polygon_feature(f"{which}_outline_at_greatest", o[0], o[1],
                                          {"utc": _iso(tg)}))
    return {
        "type": "FeatureCollection",
        "properties": {
            "eclipse_date": e.greatest_utc.strftime("%Y-%m-%d"), "type": e.type,
            "greatest_utc": _iso(tg), "greatest_lat_deg": round(e.lat_deg, 4),
            "greatest_lon_deg": round(e.lon_deg, 4), "delta_t_s": round(e.delta_t_s, 1),
            "ephemeris": "JPL DE421", "caution": caution or CAUTION,
        },
        "features": [f for f in feats if f is not None],
    }


def write_geojson(path, out_file) -> None:
    """Write :func:`path_geojson` atomically as UTF-8 JSON."""
    from domegen.cache import atomic_write_bytes

    text = json.dumps(path_geojson(path), ensure_ascii=False, allow_nan=False, separators=(",", ":"))
    atomic_write_bytes(out_file, text.encode("utf-8"))
