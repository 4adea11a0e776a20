"""Sky radiance seen from the site: a tabulated path for ordinary skies, a ray march for eclipses.

The table holds, for one site height, the in-scattering integrals along view rays without
the phase functions (Rayleigh, Mie) plus the multiple-scattering term, as CIE XYZ per unit
source (the Sun above the atmosphere at SOLAR_ILLUMINANCE_LUX), stored as logarithms so
that interpolation across twilight's orders of magnitude stays smooth.
"""

from __future__ import annotations

import hashlib
import io
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from . import spectrum
from .medium import Atmosphere, cornette_shanks_phase, rayleigh_phase
from .tables import (R_G, Tables, bilinear, dist_to_ground, dist_to_top, interp_index,
                     march_samples, tables_for)

VIEW_ALT_GRID = np.concatenate([-90.0 * np.linspace(1.0, 0.0, 25) ** 2,
                                90.0 * np.linspace(0.0, 1.0, 49)[1:] ** 2])
SUN_ALT_GRID = np.concatenate([np.linspace(-24.0, 0.0, 33), 90.0 * np.linspace(0.0, 1.0, 33)[1:] ** 2])
AZ_GRID = np.linspace(0.0, 180.0, 19)
N_STEPS = 32
_LOG_FLOOR = 1e-30
_CMF = spectrum.KM_LM_PER_W * spectrum.STEP_NM * spectrum.cie1931_cmf(spectrum.WAVELENGTHS_NM)  # (16, 3)


def _xyz(spec):
    return spec @ _CMF


@dataclass(frozen=True)
class SiteTable:
    """log XYZ (cd/m^2 for the full Sun) over (view alt, Sun alt, azimuth from Sun), 3 terms x 3."""

    atmosphere: Atmosphere
    site_elev_m: float
    log_xyz: np.ndarray  # (V, S, A, 9): rayleigh XYZ, mie XYZ, multiple XYZ


def _view_rays(r0, alt_deg):
    mu = np.sin(np.radians(alt_deg))
    d_g = dist_to_ground(r0, mu)
    return mu, np.where(np.isfinite(d_g), d_g, dist_to_top(r0, mu))


def build_site_table(atm: Atmosphere, site_elev_m: float) -> SiteTable:
    """Integrate single and multiple scattering for the site's height (a few seconds)."""
    tab = tables_for(atm)
    r0 = R_G + max(site_elev_m, 0.0)
    mu_v, length = _view_rays(r0, VIEW_ALT_GRID)                     # (V,)
    ts, dts = march_samples(length, N_STEPS)                          # (V, K)
    ry = np.sqrt(r0 * r0 + ts * ts + 2 * r0 * mu_v[:, None] * ts)     # (V, K)
    ext = atm.extinction(ry - R_G)                                    # (V, K, 16)
    sr, sm = atm.scattering(ry - R_G)
    tau = np.cumsum(ext * dts[..., None], axis=1) - 0.5 * ext * dts[..., None]
    tv = np.exp(-tau)
    w_r = (tv * sr * dts[..., None]).astype(np.float32)               # (V, K, 16)
    w_m = (tv * sm * dts[..., None]).astype(np.float32)
    mu_s = np.sin(np.radians(SUN_ALT_GRID))[None, :, None]            # (1, S, 1)
    cos_az = np.cos(np.radians(AZ_GRID))[None, None, :]
    sin_v = np.sqrt(1.0 - mu_v ** 2)[:, None, None]
    nu = mu_v[:, None, None] * mu_s + sin_v * np.sqrt(1.0 - mu_s ** 2) * cos_az  # (V, S, A)
    shape = nu.shape
    acc_r = np.zeros(shape + (16,), np.float32)
    acc_m = np.zeros(shape + (16,), np.float32)
    acc_ms = np.zeros(shape + (16,), np.float32)
    for k in range(N_STEPS):
        t = ts[:, k][:, None, None]
        r = ry[:, k][:, None, None]
        mu_sy = np.broadcast_to((r0 * mu_s + t * nu) / r, shape)
        rr = np.broadcast_to(r, shape)
        st = tab.sun_transmittance(rr, mu_sy)
        acc_r += w_r[:, k][:, None, None, :] * st
        acc_m += w_m[:, k][:, None, None, :] * st
        acc_ms += (w_r[:, k] + w_m[:, k])[:, None, None, :] * tab.ms_source(rr, mu_sy)
    e_sun = spectrum.solar_irradiance().astype(np.float32)
    parts = [_xyz(acc * e_sun) for acc in (acc_r, acc_m, acc_ms)]
    log_xyz = np.log(np.maximum(np.concatenate(parts, axis=-1), _LOG_FLOOR)).astype(np.float32)
    return SiteTable(atm, float(site_elev_m), log_xyz)


TABLE_VERSION = 1


def _cache_path(atm: Atmosphere, site_elev_m: float):
    from ...cache import cache_dir

    key = repr((TABLE_VERSION, atm, float(site_elev_m), VIEW_ALT_GRID.size, SUN_ALT_GRID.size,
                AZ_GRID.size, N_STEPS))
    digest = hashlib.sha256(key.encode()).hexdigest()[:16]
    return cache_dir() / f"sky-table-{digest}.npz"


@lru_cache(maxsize=8)
def site_table(atm: Atmosphere, site_elev_m: float) -> SiteTable:
    """SiteTable cached in the process and in the user cache folder; callers round the height."""
    from ...cache import atomic_write_bytes

    path = _cache_path(atm, site_elev_m)
    if path.exists():
        try:
            with np.load(path) as z:
                return SiteTable(atm, float(site_elev_m), z["log_xyz"])
        except (OSError, KeyError, ValueError):
            pass  # unreadable cache file: rebuild it
    table = build_site_table(atm, site_elev_m)
    buf = io.BytesIO()
    np.savez(buf, log_xyz=table.log_xyz)
    atomic_write_bytes(path, buf.getvalue())
    return table


def _geometry(dirs_enu: np.ndarray, src_enu: np.ndarray):
    """View altitude (deg), azimuth from the source (deg, 0..180) and cos scattering angle."""
    d = np.asarray(dirs_enu, np.float32)
    s = np.asarray(src_enu, np.float64).reshape(3)
    s = s / np.linalg.norm(s)
    alt = np.degrees(np.arcsin(np.clip(d[2], -1.0, 1.0)))
    hx, hy = float(s[0]), float(s[1])
    hn = np.hypot(hx, hy)
    dn = np.hypot(d[0], d[1])
    if hn < 1e-9:
        cos_az = np.ones_like(dn)
    else:
        cos_az = (d[0] * hx + d[1] * hy) / np.maximum(dn * hn, 1e-12)
    az = np.degrees(np.arccos(np.clip(cos_az, -1.0, 1.0)))
    nu = np.clip(d[0] * s[0] + d[1] * s[1] + d[2] * s[2], -1.0, 1.0)
    return alt, az, nu, float(np.degrees(np.arcsin(np.clip(s[2], -1.0, 1.0))))


def scattered_xyz(table: SiteTable, dirs_enu: np.ndarray, src_enu: np.ndarray) -> np.ndarray:
    """CIE XYZ (M, 3) cd/m^2 of sky light scattered from a source at SOLAR_ILLUMINANCE_LUX."""
    alt, az, nu, src_alt = _geometry(dirs_enu, src_enu)
    if src_alt < SUN_ALT_GRID[0]:
        return np.zeros((alt.size, 3), np.float32)
    j = float(interp_index(src_alt, SUN_ALT_GRID))
    j0 = min(int(j), SUN_ALT_GRID.size - 2)
    fj = j - j0
    slab = (1.0 - fj) * table.log_xyz[:, j0] + fj * table.log_xyz[:, j0 + 1]   # (V, A, 9)
    vals = np.exp(bilinear(slab, interp_index(alt, VIEW_ALT_GRID), interp_index(az, AZ_GRID)))
    g = table.atmosphere.mie_g
    pr = rayleigh_phase(nu).astype(np.float32)[:, None]
    pm = cornette_shanks_phase(nu, g).astype(np.float32)[:, None]
    return pr * vals[:, 0:3] + pm * vals[:, 3:6] + vals[:, 6:9]


#: Distance scale (m) over which multiply scattered light spreads sideways into a shadow, and the
#: ring radii (m) it is sampled on; our own choice (a few Rayleigh/aerosol free paths near the
#: ground), giving a totality zenith ~1e-3 of daylight like the measurements summarised in
#: Applied Optics 10, 1207 (1971).
DIFFUSE_LENGTH_M = 40e3
_RING_RADII_M = np.array([12.5e3, 25e3, 50e3, 100e3, 200e3, 400e3])


def diffuse_shadow_fraction(shadow, height_m: float = 5e3) -> float:
    """Sunlit fraction around the site, weighted by rho exp(-rho / DIFFUSE_LENGTH_M) over rings."""
    az = np.radians(np.arange(0.0, 360.0, 45.0))
    rho = _RING_RADII_M[:, None]
    pts = np.stack(np.broadcast_arrays(rho * np.sin(az), rho * np.cos(az),
                                       height_m - rho ** 2 / (2.0 * R_G))).reshape(3, -1)
    frac = np.asarray(shadow(pts), np.float64).reshape(rho.size, az.size).mean(axis=1)
    w = _RING_RADII_M * np.exp(-_RING_RADII_M / DIFFUSE_LENGTH_M)
    return float(np.sum(w * frac) / np.sum(w))


def marched_xyz(atm: Atmosphere, site_elev_m: float, dirs_enu: np.ndarray, src_enu: np.ndarray,
                shadow, n_steps: int = 16) -> np.ndarray:
    """XYZ like scattered_xyz, by direct ray marching with the eclipse shadow along each ray.

    shadow(points (3, P) m, site-centred ENU) -> visible fraction of the Sun (P,). It scales
    single scattering at each sample; the multiple-scattering source there is scaled by the
    larger of that fraction and diffuse_shadow_fraction() (light scattered in from the sunlit
    air around an umbra).
    """
    tab: Tables = tables_for(atm)
    d = np.asarray(dirs_enu, np.float64)
    s = np.asarray(src_enu, np.float64).reshape(3)
    s = s / np.linalg.norm(s)
    r0 = R_G + max(site_elev_m, 0.0)
    mu_v = np.clip(d[2], -1.0, 1.0)
    nu = np.clip(s @ d, -1.0, 1.0)
    mu_s = float(s[2])
    d_g = dist_to_ground(r0, mu_v)
    length = np.where(np.isfinite(d_g), d_g, dist_to_top(r0, mu_v))
    ts, dts = march_samples(length, n_steps)                           # (M, K)
    pts = d[:, :, None] * ts[None]                                     # (3, M, K) m, ENU at the site
    frac = np.asarray(shadow(pts.reshape(3, -1)), np.float64).reshape(ts.shape)
    ry = np.sqrt(r0 * r0 + ts * ts + 2 * r0 * mu_v[:, None] * ts)
    mu_sy = (r0 * mu_s + ts * nu[:, None]) / ry
    ext = atm.extinction(ry - R_G)
    sr, sm = atm.scattering(ry - R_G)
    tau = np.cumsum(ext * dts[..., None], axis=1) - 0.5 * ext * dts[..., None]
    w = np.exp(-tau) * dts[..., None]
    ms_frac = np.maximum(frac, diffuse_shadow_fraction(shadow))[..., None]
    frac = frac[..., None]
    st = tab.sun_transmittance(ry, mu_sy)
    ms = tab.ms_source(ry, mu_sy)
    pr = rayleigh_phase(nu)[:, None]
    pm = cornette_shanks_phase(nu, atm.mie_g)[:, None]
    spec = (w * (frac * st * (sr * pr[:, None] + sm * pm[:, None]) + ms_frac * (sr + sm) * ms)).sum(axis=1)
    return _xyz(spec * spectrum.solar_irradiance()).astype(np.float32)


#: Directions of the eclipse correction grid: altitudes (deg, dense near the horizon) x azimuths.
ECLIPSE_ALT_GRID = np.concatenate([[-2.0, 0.0], 90.0 * np.linspace(0.0, 1.0, 31)[1:] ** 1.6])
ECLIPSE_AZ_GRID = np.arange(0.0, 361.0, 7.5)


def eclipse_xyz(table: SiteTable, dirs_enu: np.ndarray, src_enu: np.ndarray, shadow,
                n_steps: int = 16) -> np.ndarray:
    """XYZ (M, 3) with an eclipse shadow: the table path times a correction factor.

    The factor marched / tabulated is computed by ray marching on a fixed (altitude x azimuth)
    grid (32 x 49 directions) and interpolated to the requested directions, so the cost does
    not grow with the frame size; shadow edges are resolved to a few degrees.
    """
    alt_g, az_g = np.meshgrid(ECLIPSE_ALT_GRID, ECLIPSE_AZ_GRID, indexing="ij")
    a, z = np.radians(alt_g.ravel()), np.radians(az_g.ravel())
    grid = np.stack([np.cos(a) * np.sin(z), np.cos(a) * np.cos(z), np.sin(a)]).astype(np.float32)
    marched = marched_xyz(table.atmosphere, table.site_elev_m, grid, src_enu, shadow, n_steps)
    plain = scattered_xyz(table, grid, src_enu)
    eps = 1e-6 * float(np.max(plain[:, 1])) + 1e-30
    ratio = ((marched + eps) / (plain + eps)).astype(np.float32).reshape(alt_g.shape + (3,))
    d = np.asarray(dirs_enu, np.float32)
    alt = np.degrees(np.arcsin(np.clip(d[2], -1.0, 1.0)))
    az = np.degrees(np.arctan2(d[0], d[1])) % 360.0
    factor = bilinear(ratio, interp_index(alt, ECLIPSE_ALT_GRID), az / 7.5)
    return scattered_xyz(table, d, src_enu) * factor
