"""The eclipse path as pure data: central line, limits, rise/set and magnitude curves.

Every curve is traced against time.  At each instant t a curve point is the
ground point (sea level, WGS84) whose local maximum happens at t and whose
distance from the shadow axis is the radius that defines the curve (Meeus,
*Elements of Solar Eclipses*, 1989):

- ``central``: the axis itself;
- ``umbra_north`` / ``umbra_south``: |L2'| (limits of totality or annularity);
- ``penumbra_north`` / ``penumbra_south``: L1' (limits of the partial eclipse);
- ``magnitude_north`` / ``magnitude_south`` with ``magnitude`` G: L1' - G (L1' + L2');
- ``begins_at_sunrise``, ``ends_at_sunrise``, ``begins_at_sunset``, ``ends_at_sunset``:
  points on the Earth's limb (Sun on the horizon) crossed by the penumbral edge at t;
- ``max_at_sunrise``, ``max_at_sunset``: limb points inside the penumbra whose local maximum is at t.

Times are sampled every ``step_s`` seconds; the ends of every run are found
by bisection and intervals where a curve turns by more than
``BEND_LIMIT_DEG`` are subdivided (up to three times).  A curve that breaks
(leaves the Earth) comes as several pieces with the same name.  Longitudes
are east positive in -180..180 and may wrap across the antimeridian.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from domegen.eclipse import geometry as geo
from domegen.eclipse.solar import SolarEclipse, central_point, limit_points, theta_deg

BEND_LIMIT_DEG = 5.0
MAGNITUDES = (0.2, 0.4, 0.6, 0.8)
_SPAN_H = 4.0


@dataclass(frozen=True)
class PathCurve:
    """One continuous piece of a curve: arrays (N,) of utc_s (POSIX UTC), lat_deg, lon_deg."""

    name: str
    utc_s: np.ndarray
    lat_deg: np.ndarray
    lon_deg: np.ndarray
    magnitude: float | None = None

    def as_json(self) -> dict:
        from domegen.sky.times import from_unix_seconds, iso_utc

        return {
            "name": self.name,
            "magnitude": self.magnitude,
            "points": [[round(float(a), 4), round(float(o), 4), iso_utc(from_unix_seconds(t))]
                       for t, a, o in zip(self.utc_s, self.lat_deg, self.lon_deg)],
        }


@dataclass(frozen=True)
class EclipsePath:
    """All curves of one eclipse; ``curves`` is a tuple of :class:`PathCurve` pieces."""

    eclipse: SolarEclipse
    step_s: float
    curves: tuple

    def pieces(self, name: str, magnitude: float | None = None) -> list[PathCurve]:
        """All pieces of the curve ``name`` (and magnitude, for magnitude curves)."""
        return [c for c in self.curves if c.name == name
                and (magnitude is None or (c.magnitude is not None and abs(c.magnitude - magnitude) < 1e-9))]

    @property
    def names(self) -> list[str]:
        return sorted({c.name for c in self.curves})

    def as_json(self) -> dict:
        """{"eclipse": ..., "step_s": ..., "curves": [{"name", "magnitude", "points": [[lat, lon, utc]]}]}."""
        return {"eclipse": self.eclipse.as_json(), "step_s": self.step_s,
                "curves": [c.as_json() for c in self.curves]}


def compute_path(eclipse: SolarEclipse, step_s: float = 60.0, magnitudes=MAGNITUDES) -> EclipsePath:
    """Trace every curve of ``eclipse`` at ``step_s`` seconds (refined at ends and bends)."""
    if not step_s > 0:
        from domegen.errors import InputError

        raise InputError("the path step must be positive seconds", field="step_s", value=step_s)
    b = eclipse.besselian
    tg = eclipse.greatest_t_h
    step_h = float(step_s) / 3600.0
    t = np.arange(tg - _SPAN_H, tg + _SPAN_H + step_h / 2, step_h)

    def to_utc(th):
        return b.utc_s(th)

    curves: list[PathCurve] = []

    def add(name, func, magnitude=None):
        for th, lat, lon in _trace(func, t):
            curves.append(PathCurve(name, to_utc(th), lat, lon, magnitude))

    if eclipse.central:
        add("central", lambda th: _latlon(central_point(b, th)))
    if eclipse.type != "partial":
        add("umbra_north", lambda th: _latlon(limit_points(b, th, +1, "umbra")))
        add("umbra_south", lambda th: _latlon(limit_points(b, th, -1, "umbra")))
    add("penumbra_north", lambda th: _latlon(limit_points(b, th, +1, "penumbra")))
    add("penumbra_south", lambda th: _latlon(limit_points(b, th, -1, "penumbra")))
    for g in magnitudes:
        for side, label in ((+1, "magnitude_north"), (-1, "magnitude_south")):
            add(label, lambda th, s=side, g=g: _latlon(limit_points(b, th, s, magnitude=g)), magnitude=float(g))
    for name, piece in _rise_set(eclipse, t):
        curves.append(PathCurve(name, to_utc(piece[0]), piece[1], piece[2]))
    return EclipsePath(eclipse=eclipse, step_s=float(step_s), curves=tuple(curves))


def _latlon(res):
    lat, lon, _, valid = res
    return lat, lon, valid


def _trace(func, t: np.ndarray):
    """Sample ``func(t) -> (lat, lon, valid)``, refine run ends and bends; yield (t, lat, lon) runs."""
    lat, lon, ok = func(t)
    ok = np.asarray(ok, dtype=bool) & np.isfinite(lat)
    if not ok.any():
        return
    extra = []
    edges = np.flatnonzero(ok[1:] != ok[:-1])
    if edges.size:
        inside = np.where(ok[edges], t[edges], t[edges + 1])
        outside = np.where(ok[edges], t[edges + 1], t[edges])
        for _ in range(13):
            mid = 0.5 * (inside + outside)
            la, _, v = func(mid)
            v = np.asarray(v, dtype=bool) & np.isfinite(la)
            inside = np.where(v, mid, inside)
            outside = np.where(v, outside, mid)
        extra.append(inside)
    tt = np.unique(np.concatenate([t[ok]] + extra))
    lat, lon, ok = func(tt)
    for _ in range(3):
        keep = np.asarray(ok, dtype=bool) & np.isfinite(lat)
        tt, lat, lon = tt[keep], lat[keep], lon[keep]
        if tt.size < 3:
            break
        bend = _bend_deg(lat, lon)
        gaps = np.diff(tt) > 1e-6
        idx = np.flatnonzero((bend > BEND_LIMIT_DEG) & gaps[:-1] & gaps[1:])
        if idx.size == 0:
            break
        new_t = np.concatenate([0.5 * (tt[idx] + tt[idx + 1]), 0.5 * (tt[idx + 1] + tt[idx + 2])])
        tt = np.unique(np.concatenate([tt, new_t]))
        lat, lon, ok = func(tt)
    keep = np.asarray(ok, dtype=bool) & np.isfinite(lat)
    tt, lat, lon = tt[keep], lat[keep], lon[keep]
    # Split where the time series has a hole (the curve left the Earth in between).
    full_step = np.median(np.diff(t)) if t.size > 1 else 1.0
    breaks = np.flatnonzero(np.diff(tt) > 1.5 * full_step) + 1
    for part in np.split(np.arange(tt.size), breaks):
        if part.size >= 2:
            yield tt[part], lat[part], lon[part]


def _bend_deg(lat, lon) -> np.ndarray:
    """Turning angle at each interior point of a polyline (local flat approximation), degrees."""
    x = np.radians(((lon - lon[0] + 180.0) % 360.0) - 180.0) * np.cos(np.radians(lat))
    y = np.radians(lat)
    hx, hy = np.diff(x), np.diff(y)
    h = np.arctan2(hy, hx)
    turn = np.degrees(np.abs((np.diff(h) + np.pi) % (2 * np.pi) - np.pi))
    return turn


def _limb_roots(b, t: np.ndarray, func, samples: int = 720):
    """Points of the Earth's limb (Sun on the horizon) where ``func`` changes sign, at every time.

    ``func(e, xi, eta)`` is evaluated on (T, samples) grids of limb points.  Returns the root
    times and plane coordinates, the elements there, and the ground points.
    """
    e = b.at(t)
    rho = geo.limb_rho(e["d"])
    th = np.linspace(0.0, 2.0 * np.pi, samples, endpoint=False)
    ex = np.broadcast_to(np.cos(th)[None, :], (t.size, samples))
    ey = rho[:, None] * np.sin(th)[None, :]
    grid = {k: v[:, None] for k, v in e.items()}
    f = func(grid, ex, ey)
    f_next = np.roll(f, -1, axis=1)
    ti, ai = np.nonzero((f < 0) != (f_next < 0))
    frac = f[ti, ai] / (f[ti, ai] - f_next[ti, ai])
    ang = th[ai] + frac * (2.0 * np.pi / samples)
    tt = t[ti]
    ee = b.at(tt)
    xi, eta = np.cos(ang), geo.limb_rho(ee["d"]) * np.sin(ang)
    lat, lon, _, ok = geo.surface_point(xi, eta, ee["d"], theta_deg(b, ee), on_limb=True)
    return tt, ang, xi, eta, ee, lat, lon, ok


def _closing_rate(e, xi, eta):
    """u a + v b for limb points (zeta = 0): negative while the axis approaches the point."""
    from domegen.eclipse.solar import _point_rates

    dxi, deta = _point_rates(e, xi, eta, np.zeros_like(xi))
    return (e["x"] - xi) * (e["dx"] - dxi) + (e["y"] - eta) * (e["dy"] - deta)


def _split_pieces(name, tt, lat, lon, step):
    """Time-ordered pieces; where several roots share an instant keep the one nearest the previous point."""
    order = np.lexsort((lon, tt))
    ts, la, lo = tt[order], lat[order], lon[order]
    keep = np.ones(ts.size, dtype=bool)
    dup = np.flatnonzero(np.diff(ts) == 0) + 1
    if dup.size:
        last = 0
        for i in range(1, ts.size):  # a few hundred points at most
            if ts[i] == ts[last] and keep[last]:
                prev = last - 1 if last > 0 else None
                if prev is not None and (abs(la[i] - la[prev]) + abs(lo[i] - lo[prev])
                                         < abs(la[last] - la[prev]) + abs(lo[last] - lo[prev])):
                    keep[last] = False
                    last = i
                else:
                    keep[i] = False
            else:
                last = i
    ts, la, lo = ts[keep], la[keep], lo[keep]
    breaks = np.flatnonzero(np.diff(ts) > 1.5 * step) + 1
    return [(name, (ts[p], la[p], lo[p])) for p in np.split(np.arange(ts.size), breaks) if p.size >= 2]


def _rise_set(eclipse: SolarEclipse, t: np.ndarray):
    """Pieces of the rise/set curves.

    begins/ends_at_sunrise/sunset: the penumbral edge crosses the limb; max_at_sunrise/sunset:
    the local maximum (u a + v b = 0) happens on the limb inside the penumbra.
    """
    b = eclipse.besselian
    step = float(np.median(np.diff(t))) if t.size > 1 else 1.0
    out = []

    def edge(e, xi, eta):
        return (xi - e["x"]) ** 2 + (eta - e["y"]) ** 2 - e["l1"] ** 2

    tt, ang, xi, eta, ee, lat, lon, ok = _limb_roots(b, t, edge)
    if tt.size:
        closing = _closing_rate(ee, xi, eta) < 0
        rising = xi < 0  # zeta' = -mu' xi cos d > 0: the Sun is rising there
        # Branch: counter-clockwise or clockwise of the axis direction seen from the Earth's centre.
        ccw = ((ang - np.arctan2(ee["y"], ee["x"])) % (2.0 * np.pi)) < np.pi
        for branch in (True, False):
            for begins in (True, False):
                for rise in (True, False):
                    sel = (ccw == branch) & (closing == begins) & (rising == rise) & ok
                    name = ("begins" if begins else "ends") + ("_at_sunrise" if rise else "_at_sunset")
                    out += _split_pieces(name, tt[sel], lat[sel], lon[sel], step)
    tt, ang, xi, eta, ee, lat, lon, ok = _limb_roots(b, t, _closing_rate)
    if tt.size:
        inside = np.hypot(ee["x"] - xi, ee["y"] - eta) < ee["l1"]
        rising = xi < 0
        ccw = ((ang - np.arctan2(ee["y"], ee["x"])) % (2.0 * np.pi)) < np.pi
        for branch in (True, False):
            for rise in (True, False):
                sel = inside & ok & (rising == rise) & (ccw == branch)
                out += _split_pieces("max_at_sunrise" if rise else "max_at_sunset", tt[sel], lat[sel], lon[sel],
                                     step)
    return out


__all__ = ["EclipsePath", "PathCurve", "compute_path", "MAGNITUDES"]
