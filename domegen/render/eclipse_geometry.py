"""Sun and Moon disks for eclipse rendering: topocentric geometry and covered flux.

* Positions: apparent topocentric (domegen.sky.bodies), airless; refraction is
  applied by the caller to pixel directions, not to the bodies, so the two
  disks flatten together near the horizon.
* Radii: the Sun 959.63 arcsec at 1 au (Auwers, as in the NASA canons); the
  Moon k = 0.2725076 Earth equatorial radii (IAU 1982 mean radius), around
  which the rough limb of :mod:`domegen.render.eclipse_limb` varies.
* Limb darkening: Allen's Astrophysical Quantities (Cox 2000) at 550 nm,
  I(mu)/I(1) = 0.30 + 0.93 mu - 0.23 mu^2, for the flux that lights the sky;
  the RGB rendering uses Neckel & Labs (1994) per channel.

Covered flux: a Moon of radius q (in solar radii) centred s solar radii from
the Sun's centre hides, of the annulus at radius r, the arc fraction
phi(r)/pi with cos phi = (r^2 + s^2 - q^2) / (2 r s).  Integrating I(r) phi/pi
2 pi r dr over the disk is exact for any s and q (no small-angle disk
overlap formula), and is tabulated once for fast lookups.
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass

import numpy as np

EARTH_RADIUS_KM = 6378.137
AU_KM = 149_597_870.7
SUN_RADIUS_KM = float(np.tan(np.radians(959.63 / 3600.0)) * AU_KM)
MOON_K = 0.2725076
MOON_RADIUS_KM = MOON_K * EARTH_RADIUS_KM

#: Allen (Cox 2000) 550 nm limb-darkening coefficients, I(mu)/I(1) = a0 + a1 mu + a2 mu^2.
ALLEN_550 = (0.30, 0.93, -0.23)
#: Neckel & Labs (1994) fifth-order coefficients A0..A5 at 610.975, 541.760, 443.885 nm (R, G, B).
NECKEL_LABS_RGB = np.array([
    [0.30854, 1.36620, -1.83572, 2.33221, -1.63082, 0.45959],
    [0.26073, 1.27428, -1.30352, 1.47085, -0.96618, 0.26384],
    [0.16220, 1.24893, -0.92165, 0.89978, -0.50148, 0.11220],
])


def allen_intensity(r):
    """Relative intensity I/I(centre) at radius r (solar radii, 0..1) of the 550 nm disk."""
    mu = np.sqrt(np.clip(1.0 - np.asarray(r, dtype=float) ** 2, 0.0, 1.0))
    a0, a1, a2 = ALLEN_550
    return a0 + a1 * mu + a2 * mu * mu


def neckel_labs_rgb(r) -> np.ndarray:
    """Relative intensity per channel (..., 3) at radius r (solar radii), each 1 at disk centre."""
    mu = np.sqrt(np.clip(1.0 - np.asarray(r, dtype=float) ** 2, 0.0, 1.0))[..., None]
    c = NECKEL_LABS_RGB / NECKEL_LABS_RGB.sum(axis=1, keepdims=True)
    powers = mu ** np.arange(6)
    return np.einsum("...k,ck->...c", powers, c)


_NR = 600
# midpoint rule: uniform in r on [0, 0.9], and in t with r = 1 - t^2 on [0.9, 1], where the nodes
# crowd toward the limb (spacing ~1e-6 solar radii there) for the last sliver before second contact
_RU = (np.arange(_NR) + 0.5) / _NR * 0.9
_T = (np.arange(_NR) + 0.5) / _NR * math.sqrt(0.1)
_R_NODES = np.concatenate([_RU, 1.0 - _T * _T])
_R_WEIGHTS = allen_intensity(_R_NODES) * 2.0 * _R_NODES * np.concatenate(
    [np.full(_NR, 0.9 / _NR), 2.0 * _T * math.sqrt(0.1) / _NR])
_TOTAL = float(_R_WEIGHTS.sum())


def covered_fraction_exact(s, q) -> np.ndarray:
    """Fraction of the limb-darkened solar flux hidden by a disk of radius q at distance s.

    ``s``, ``q`` in solar radii, any broadcastable shapes; exact up to the
    1200-node radial quadrature, crowded toward the limb (relative error < 1e-5
    of the flux; slivers down to ~1e-7 of the flux resolved).
    """
    s = np.asarray(s, dtype=float)[..., None]
    q = np.asarray(q, dtype=float)[..., None]
    r = _R_NODES
    with np.errstate(invalid="ignore", divide="ignore"):
        c = (r * r + s * s - q * q) / (2.0 * r * np.maximum(s, 1e-12))
    phi = np.arccos(np.clip(c, -1.0, 1.0))
    # concentric case (s = 0): the annulus is hidden entirely or not at all
    phi = np.where(s < 1e-12, np.where(r < q, np.pi, 0.0), phi)
    return np.sum(phi / np.pi * _R_WEIGHTS, axis=-1) / _TOTAL


_S_MAX = 2.25
_S_GRID = np.linspace(0.0, _S_MAX, 901)
_Q_GRID = np.linspace(0.85, 1.15, 31)


_TABLE_VERSION = 2


def cached_table(name: str, build) -> np.ndarray:
    """A float64 table from the user cache (domegen.cache), built by ``build()`` and stored on first use."""
    import io

    from domegen.cache import atomic_write_bytes, cache_dir

    path = cache_dir() / f"{name}-v{_TABLE_VERSION}.npy"
    try:
        t = np.load(path, allow_pickle=False)
    except (OSError, ValueError):
        t = np.asarray(build(), dtype=float)
        buf = io.BytesIO()
        np.save(buf, t, allow_pickle=False)
        try:
            atomic_write_bytes(path, buf.getvalue())
        except OSError:
            pass  # a read-only cache only costs the rebuild next time
    t.flags.writeable = False
    return t


@functools.lru_cache(maxsize=1)
def _table() -> np.ndarray:
    return cached_table("eclipse-solar-cover", lambda: covered_fraction_exact(_S_GRID[:, None], _Q_GRID[None, :]))


_KINK_BAND = 0.02
_NS = 64
_TS = (np.arange(_NS) + 0.5) / _NS


def sliver_uncovered_fraction(s, q) -> np.ndarray:
    """Uncovered share of the flux when a larger Moon (q >= 1) almost hides the Sun (s >= q - 1).

    Only annuli with r > q - s are partly visible, so the integral runs over that
    thin outer band alone (64 nodes, r = 1 - t^2 crowding them toward the limb):
    cheap and accurate down to slivers of 1e-9 of the flux.
    """
    s = np.asarray(s, dtype=float)[..., None]
    q = np.asarray(q, dtype=float)[..., None]
    w = np.clip(1.0 - (q - s), 0.0, 1.0)                  # band width in r
    t = _TS * np.sqrt(w)
    r = 1.0 - t * t
    with np.errstate(invalid="ignore", divide="ignore"):
        c = (r * r + s * s - q * q) / (2.0 * r * np.maximum(s, 1e-12))
    phi = np.arccos(np.clip(c, -1.0, 1.0))
    dens = (1.0 - phi / np.pi) * allen_intensity(r) * 2.0 * r * 2.0 * t * np.sqrt(w) / _NS
    return np.sum(dens, axis=-1) / _TOTAL


def covered_fraction(s, q) -> np.ndarray:
    """:func:`covered_fraction_exact` from a table (bilinear), q in 0.85..1.15.

    Near second/third contact of a total eclipse (q >= 1, s within 0.02 solar
    radii above q - 1) the uncovered sliver matters down to 1e-6 of the flux
    (the sky's brightness in the last seconds before totality): there it is
    integrated over the visible band only (:func:`sliver_uncovered_fraction`);
    elsewhere the table is good to 1e-3 of the flux (worst near first contact and
    annular internal contact, measured).
    """
    s = np.clip(np.asarray(s, dtype=float), 0.0, _S_MAX)
    q = np.clip(np.asarray(q, dtype=float), _Q_GRID[0], _Q_GRID[-1])
    s, q = np.broadcast_arrays(s, q)
    out = np.array(_bilinear(s, q), dtype=float)
    u = s - (q - 1.0)
    total = q >= 1.0
    out[total & (u <= 0.0)] = 1.0
    band = total & (u > 0.0) & (u < _KINK_BAND)
    if np.any(band):
        out[band] = 1.0 - sliver_uncovered_fraction(s[band], q[band])
    return out


def _bilinear(s, q):
    ds = _S_GRID[1] - _S_GRID[0]
    dq = _Q_GRID[1] - _Q_GRID[0]
    fs = np.minimum(s / ds, _S_GRID.size - 1.000001)
    fq = np.minimum((q - _Q_GRID[0]) / dq, _Q_GRID.size - 1.000001)
    i, j = fs.astype(int), fq.astype(int)
    a, b = fs - i, fq - j
    t = _table()
    return ((1 - a) * (1 - b) * t[i, j] + a * (1 - b) * t[i + 1, j]
            + (1 - a) * b * t[i, j + 1] + a * b * t[i + 1, j + 1])


@dataclass(frozen=True)
class DiskGeometry:
    """Sun and Moon as seen from the site at N instants (airless, topocentric).

    ``sun_enu``, ``moon_enu``: (3, N) unit vectors; ``sun_km``, ``moon_km``: (3, N)
    ENU vectors from the site, km; ``r_sun_rad``, ``r_moon_rad``, ``sep_rad``: (N,).
    ``visible_fraction``: (N,) share of the limb-darkened solar flux not hidden by a smooth Moon.
    """

    utc_s: np.ndarray
    sun_enu: np.ndarray
    moon_enu: np.ndarray
    sun_km: np.ndarray
    moon_km: np.ndarray
    r_sun_rad: np.ndarray
    r_moon_rad: np.ndarray
    sep_rad: np.ndarray
    visible_fraction: np.ndarray


def _angle(a, b):
    """Angle between unit vectors (3, ...) without the acos precision loss at small angles."""
    return 2.0 * np.arctan2(np.linalg.norm(a - b, axis=0), np.linalg.norm(a + b, axis=0))


def disk_geometry(site, utc_s) -> DiskGeometry:
    """Topocentric Sun/Moon geometry for POSIX UTC seconds (scalar, array or datetimes)."""
    from domegen.sky.bodies import body_positions

    tab = body_positions(site, utc_s, names=("Sun", "Moon"))
    sun, moon = tab.body("Sun"), tab.body("Moon")
    d_s, d_m = sun.distance_km, moon.distance_km
    sun_km = sun.enu * d_s
    moon_km = moon.enu * d_m
    r_s = np.arcsin(SUN_RADIUS_KM / d_s)
    r_m = np.arcsin(MOON_RADIUS_KM / d_m)
    sep = _angle(sun.enu, moon.enu)
    vis = 1.0 - covered_fraction(sep / r_s, r_m / r_s)
    return DiskGeometry(utc_s=tab.utc_s, sun_enu=sun.enu, moon_enu=moon.enu, sun_km=sun_km,
                        moon_km=moon_km, r_sun_rad=r_s, r_moon_rad=r_m, sep_rad=sep,
                        visible_fraction=np.clip(vis, 0.0, 1.0))


def shadow_function(geom: DiskGeometry, index: int = 0):
    """The eclipse shadow for SkyLight.shadow at instant ``index`` of ``geom``.

    Returns f(points_enu_m (3, M)) -> (M,) fraction of the limb-darkened solar
    flux visible from each point (site-centred ENU, metres): 0 in the umbra,
    1 outside the penumbra.  Uses the same tabulated overlap as the site's
    own visible fraction, so f(0) equals ``geom.visible_fraction[index]``.
    """
    sun = np.array(geom.sun_km[:, index], dtype=float)
    moon = np.array(geom.moon_km[:, index], dtype=float)

    def shadow(points_enu_m):
        p = np.asarray(points_enu_m, dtype=float).reshape(3, -1) / 1000.0
        to_s = sun[:, None] - p
        to_m = moon[:, None] - p
        ds = np.linalg.norm(to_s, axis=0)
        dm = np.linalg.norm(to_m, axis=0)
        r_s = np.arcsin(SUN_RADIUS_KM / ds)
        r_m = np.arcsin(np.minimum(MOON_RADIUS_KM / dm, 1.0))
        sep = _angle(to_s / ds, to_m / dm)
        return np.clip(1.0 - covered_fraction(sep / r_s, r_m / r_s), 0.0, 1.0)

    return shadow


def geometry_from_bodies(bodies) -> DiskGeometry:
    """DiskGeometry for every instant of a BodyTable that holds the Sun and the Moon."""
    s, m = bodies.index("Sun"), bodies.index("Moon")
    sun_enu, moon_enu = bodies.enu[s], bodies.enu[m]
    d_s, d_m = bodies.distance_km[s], bodies.distance_km[m]
    r_s = np.arcsin(SUN_RADIUS_KM / d_s)
    r_m = np.arcsin(MOON_RADIUS_KM / d_m)
    sep = _angle(sun_enu, moon_enu)
    vis = 1.0 - covered_fraction(sep / r_s, r_m / r_s)
    return DiskGeometry(utc_s=bodies.utc_s, sun_enu=sun_enu, moon_enu=moon_enu, sun_km=sun_enu * d_s,
                        moon_km=moon_enu * d_m, r_sun_rad=r_s, r_moon_rad=r_m, sep_rad=sep,
                        visible_fraction=np.clip(vis, 0.0, 1.0))


#: Gauss-Legendre nodes on [0, 1] for the chord integrals of the rough-limb flux.
_GL_X, _GL_W = np.polynomial.legendre.leggauss(16)
_GL_X = 0.5 * (_GL_X + 1.0)
_GL_W = 0.5 * _GL_W


def visible_fraction_polar(moon_xy, limb_radius) -> float:
    """Uncovered share of the Allen-limb-darkened flux for a Moon of any outline.

    ``moon_xy``: Moon centre in the Sun's tangent plane (solar radii); ``limb_radius``:
    (K,) the Moon's edge radius (solar radii) at K equally spaced position angles
    (from north through east) about the Moon's centre.  Every point of the plane
    lies on one ray from the Moon's centre, so integrating the photosphere beyond the
    edge along each ray (16-point Gauss-Legendre per chord) is exact for rough limbs.
    """
    mx, my = float(moon_xy[0]), float(moon_xy[1])
    lim = np.asarray(limb_radius, dtype=float)
    k = lim.size
    pa = (np.arange(k) + 0.5) * (2.0 * np.pi / k)
    ux, uy = np.sin(pa), np.cos(pa)
    b = mx * ux + my * uy
    c = mx * mx + my * my - 1.0
    disc = b * b - c
    root = np.sqrt(np.maximum(disc, 0.0))
    t1, t2 = -b - root, -b + root
    lo = np.maximum(np.maximum(t1, lim), 0.0)
    ok = (disc > 0) & (t2 > lo)
    lo, hi = lo[ok], t2[ok]
    t = lo[:, None] + (hi - lo)[:, None] * _GL_X[None, :]
    px = mx + t * ux[ok, None]
    py = my + t * uy[ok, None]
    r = np.sqrt(np.minimum(px * px + py * py, 1.0))
    flux = np.sum(allen_intensity(r) * t * _GL_W[None, :], axis=1) * (hi - lo)
    return float(np.sum(flux) * (2.0 * np.pi / k) / (np.pi * _TOTAL))
