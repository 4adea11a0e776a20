"""The searches behind :mod:`domegen.sky.events`, vectorised over time and body pairs.

Each search samples the whole period at once with an explicit step, then
refines every bracket together (:func:`_zoom_minima`), as skyfield's
searchlib does; skyfield's almanac functions find oppositions and phases.
Instants are POSIX UTC seconds (floats).
"""

from __future__ import annotations

import itertools

import numpy as np

from domegen.sky.ephemeris import body, earth, ephemeris
from domegen.sky.frames import civil_seconds
from domegen.sky.site import Site
from domegen.sky.times import to_time

#: Bodies whose pairings are searched (naked-eye objects).
PAIR_BODIES = ("Moon", "Mercury", "Venus", "Mars", "Jupiter", "Saturn")
OPPOSITION_BODIES = ("Mars", "Jupiter", "Saturn", "Uranus", "Neptune")
ELONGATION_BODIES = ("Mercury", "Venus")
#: Coarse sampling step of the separation and elongation searches, s.
COARSE_STEP_S = 6 * 3600.0


# ----------------------------------------------------------------------------- positions
def geocentric_unit(names, utc_s) -> np.ndarray:
    """Apparent geocentric unit vectors (GCRS axes), shape (B, 3) + utc_s.shape."""
    s = np.asarray(utc_s, dtype=float)
    t = to_time(s.ravel())
    e = earth().at(t)
    out = np.empty((len(names), 3, s.size))
    for k, name in enumerate(names):
        v = e.observe(body(name)).apparent().position.au
        out[k] = v / np.linalg.norm(v, axis=0)
    return out.reshape((len(names), 3) + s.shape)


def _angle(u, v, axis) -> np.ndarray:
    """Angle (deg) between unit vectors stored along ``axis``; atan2 form, exact near 0."""
    c = np.linalg.norm(np.cross(u, v, axis=axis), axis=axis)
    d = np.sum(u * v, axis=axis)
    return np.degrees(np.arctan2(c, d))


def altitudes_deg(site: Site, name: str, utc_s) -> np.ndarray:
    """Refracted apparent altitude (deg) of one body at the site, shape of utc_s."""
    s = np.asarray(utc_s, dtype=float)
    if s.size == 0:
        return np.zeros(s.shape)
    t = to_time(s.ravel())
    alt, _, _ = site.observer().at(t).observe(body(name)).apparent().altaz(
        temperature_C=site.temperature_C, pressure_mbar=site.pressure_mbar)
    return np.asarray(alt.degrees, dtype=float).reshape(s.shape)


# ----------------------------------------------------------------------------- searches
def _zoom_minima(f, lo_s: np.ndarray, hi_s: np.ndarray, *, iterations: int = 9,
                 points: int = 9) -> tuple[np.ndarray, np.ndarray]:
    """Refine minima of ``f`` in all brackets [lo, hi] at once.

    ``f(times (M, K)) -> values (M, K)`` is evaluated on ``points`` equally spaced
    instants per bracket; each pass keeps the two cells around the lowest sample,
    shrinking the bracket by (points - 1) / 2; a parabola through the last three
    samples gives the final instant.  Returns (utc_s (M,), value (M,)).
    """
    lo = np.asarray(lo_s, dtype=float).copy()
    hi = np.asarray(hi_s, dtype=float).copy()
    m = lo.size
    rows = np.arange(m)
    frac = np.linspace(0.0, 1.0, points)
    for _ in range(iterations):
        t = lo[:, None] + (hi - lo)[:, None] * frac[None, :]
        y = f(t)
        j = np.clip(np.argmin(y, axis=1), 1, points - 2)
        lo, hi = t[rows, j - 1], t[rows, j + 1]
    t = np.stack([lo, 0.5 * (lo + hi), hi], axis=1)
    y = f(t)
    denom = y[:, 0] - 2 * y[:, 1] + y[:, 2]
    with np.errstate(divide="ignore", invalid="ignore"):
        off = np.where(denom > 0, 0.5 * (y[:, 0] - y[:, 2]) / denom, 0.0)
    off = np.clip(off, -1.0, 1.0)
    best = t[:, 1] + off * 0.5 * (hi - lo)
    return best, f(best[:, None])[:, 0]


def _coarse_grid(start_s: float, end_s: float, step_s: float) -> np.ndarray:
    n = max(3, int(np.ceil((end_s - start_s) / step_s)) + 1)
    # one step of margin on each side so minima at the period's edges are bracketed
    return np.linspace(start_s - step_s, end_s + step_s, n + 2)


def _local_minima(y: np.ndarray) -> np.ndarray:
    """Boolean mask of interior samples lower than (or equal to the left of) their neighbours."""
    mask = np.zeros(y.shape, dtype=bool)
    mask[..., 1:-1] = (y[..., 1:-1] <= y[..., :-2]) & (y[..., 1:-1] < y[..., 2:])
    return mask


def find_pairings(start_s: float, end_s: float, *, max_separation_deg: float = 3.0,
                  names=PAIR_BODIES) -> list[tuple[str, str, float, float]]:
    """Minima of geocentric separation below ``max_separation_deg``.

    Returns (body_a, body_b, utc_s, separation_deg) sorted by time.
    """
    grid = _coarse_grid(start_s, end_s, COARSE_STEP_S)
    u = geocentric_unit(names, grid)                       # (B, 3, N)
    pairs = list(itertools.combinations(range(len(names)), 2))
    ia = np.array([a for a, _ in pairs])
    ib = np.array([b for _, b in pairs])
    sep = _angle(u[ia], u[ib], axis=1)                      # (P, N)
    # the Moon moves up to ~16 deg/day against a planet: a sampled minimum can sit
    # above the true one by up to half a step of motion (hyperbola) - keep a margin
    margin = 2.5
    cand = _local_minima(sep) & (sep < max_separation_deg + margin)
    p_idx, n_idx = np.nonzero(cand)
    if p_idx.size == 0:
        return []
    lo, hi = grid[n_idx - 1], grid[n_idx + 1]
    used = sorted(set(ia[p_idx]) | set(ib[p_idx]))
    sub = [names[i] for i in used]
    pos = {k: j for j, k in enumerate(used)}
    ja = np.array([pos[i] for i in ia[p_idx]])
    jb = np.array([pos[i] for i in ib[p_idx]])

    def f(t):
        v = geocentric_unit(sub, t)                         # (S, 3, M, K)
        rows = np.arange(t.shape[0])
        va = v[ja, :, rows, :]                              # (M, 3, K)
        vb = v[jb, :, rows, :]
        return _angle(va, vb, axis=1)

    t_best, s_best = _zoom_minima(f, lo, hi)
    out = []
    for k in range(p_idx.size):
        if s_best[k] < max_separation_deg and start_s <= t_best[k] <= end_s:
            out.append((names[ia[p_idx[k]]], names[ib[p_idx[k]]], float(t_best[k]), float(s_best[k])))
    out.sort(key=lambda r: r[2])
    return out


def find_greatest_elongations(start_s: float, end_s: float, names=ELONGATION_BODIES):
    """(body, utc_s, elongation_deg, "east"|"west") at each local maximum of the Sun angle."""
    grid = _coarse_grid(start_s, end_s, 2 * COARSE_STEP_S)
    out = []
    for name in names:
        def neg_elong(t, name=name):
            v = geocentric_unit(("Sun", name), t)
            return -_angle(v[0], v[1], axis=0)

        y = neg_elong(grid)
        idx = np.nonzero(_local_minima(y))[0]
        if idx.size == 0:
            continue
        t_best, v_best = _zoom_minima(neg_elong, grid[idx - 1], grid[idx + 1])
        side = _east_or_west(name, t_best)
        for t, v, s in zip(t_best, v_best, side):
            if start_s <= t <= end_s:
                out.append((name, float(t), float(-v), s))
    out.sort(key=lambda r: r[1])
    return out


def _east_or_west(name: str, utc_s) -> list[str]:
    from skyfield.framelib import ecliptic_frame

    e = earth().at(to_time(np.asarray(utc_s, dtype=float)))
    _, slon, _ = e.observe(body("Sun")).apparent().frame_latlon(ecliptic_frame)
    _, plon, _ = e.observe(body(name)).apparent().frame_latlon(ecliptic_frame)
    d = (np.asarray(plon.degrees) - np.asarray(slon.degrees) + 540.0) % 360.0 - 180.0
    return ["east" if x > 0 else "west" for x in np.atleast_1d(d)]


def find_oppositions(start_s: float, end_s: float, names=OPPOSITION_BODIES):
    """(body, utc_s) when the planet is 180 deg from the Sun in ecliptic longitude."""
    from skyfield import almanac
    from skyfield.searchlib import find_discrete

    t0, t1 = to_time(start_s), to_time(end_s)
    out = []
    for name in names:
        f = almanac.oppositions_conjunctions(ephemeris(), body(name))
        t, y = find_discrete(t0, t1, f)
        for ti, yi in zip(t, y):
            if yi == 1:
                out.append((name, float(civil_seconds(ti)[0])))
    out.sort(key=lambda r: r[1])
    return out


def find_moon_phases(start_s: float, end_s: float):
    """(phase index 0..3, utc_s) for each principal phase in the period."""
    from skyfield import almanac
    from skyfield.searchlib import find_discrete

    t, y = find_discrete(to_time(start_s), to_time(end_s), almanac.moon_phases(ephemeris()))
    secs = civil_seconds(t) if len(t) else np.zeros(0)
    return [(int(p), float(s)) for p, s in zip(y, secs)]
