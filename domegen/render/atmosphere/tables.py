"""Precomputed tables: transmittance, multiple scattering, single scattering from the site.

Method: single scattering through a spherical atmosphere by ray marching (Nishita et al.
1993, "Display of the Earth taking into account atmospheric scattering", SIGGRAPH), with the
transmittance table parameterised as in Bruneton & Neyret 2008 / Bruneton 2017, and a
multiple-scattering term from the isotropic infinite-series approximation of Hillaire 2020
("A scalable and production ready sky and atmosphere rendering technique", EGSR).

All tables are per unit solar irradiance (spectral, 16 wavelengths). The single-scattering
table is tabulated at the site's height over (view altitude, Sun altitude, azimuth from the
Sun) without the phase functions, which are applied exactly at run time.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from .medium import EARTH_RADIUS_M, TOP_M, Atmosphere

R_G = EARTH_RADIUS_M
R_T = EARTH_RADIUS_M + TOP_M
_H = np.sqrt(R_T ** 2 - R_G ** 2)
#: Angular radius of the Sun, rad (mean; common practice).
SUN_RADIUS_RAD = np.radians(0.2666)

N_T_R, N_T_MU = 64, 256


# ---------------------------------------------------------------- geometry
def dist_to_top(r, mu):
    """Distance (m) from radius r along direction cosine mu to the top of the atmosphere."""
    disc = np.maximum(r * r * (mu * mu - 1.0) + R_T * R_T, 0.0)
    return np.maximum(-r * mu + np.sqrt(disc), 0.0)


def dist_to_ground(r, mu):
    """Distance to the ground, np.inf where the ray misses it."""
    disc = r * r * (mu * mu - 1.0) + R_G * R_G
    hit = (mu < 0.0) & (disc >= 0.0)
    d = -r * mu - np.sqrt(np.maximum(disc, 0.0))
    return np.where(hit, np.maximum(d, 0.0), np.inf)


def horizon_mu(r):
    """Cosine of the zenith angle of the geometric horizon seen from radius r."""
    return -np.sqrt(np.maximum(1.0 - (R_G / np.maximum(r, R_G)) ** 2, 0.0))


def disk_fraction_above_horizon(r, mu_s):
    """Fraction of the solar disk above the local geometric horizon (smooth terminator)."""
    elev = np.arcsin(np.clip(mu_s, -1.0, 1.0)) + np.arccos(np.clip(R_G / np.maximum(r, R_G), -1.0, 1.0))
    c = np.clip(elev / SUN_RADIUS_RAD, -1.0, 1.0)
    return 1.0 - (np.arccos(c) - c * np.sqrt(1.0 - c * c)) / np.pi


def march_samples(length, n):
    """Quadratically spaced sample distances and lengths along rays: (..., n) each."""
    e = (np.arange(n + 1) / n) ** 2
    edges = np.asarray(length)[..., None] * e
    return 0.5 * (edges[..., 1:] + edges[..., :-1]), np.diff(edges, axis=-1)


def interp_index(x, grid):
    """Fractional index of x on a monotone grid (clamped)."""
    return np.interp(x, grid, np.arange(grid.size, dtype=float))


def bilinear(table, i, j):
    """table (A, B, C) sampled at fractional indices i, j (same shape) -> shape + (C,)."""
    a, b = table.shape[:2]
    flat = table.reshape(a * b, -1)
    shape = np.shape(i) + (flat.shape[1],)
    i = np.clip(np.ravel(i), 0.0, a - 1.000001)
    j = np.clip(np.ravel(j), 0.0, b - 1.000001)
    i0 = i.astype(np.intp)
    j0 = j.astype(np.intp)
    fi = (i - i0).astype(table.dtype)
    fj = (j - j0).astype(table.dtype)
    gi = 1 - fi
    gj = 1 - fj
    k = i0 * b + j0
    out = np.take(flat, k, axis=0)
    out *= (gi * gj)[:, None]
    tmp = np.take(flat, k + 1, axis=0)
    tmp *= (gi * fj)[:, None]
    out += tmp
    np.take(flat, k + b, axis=0, out=tmp)
    tmp *= (fi * gj)[:, None]
    out += tmp
    np.take(flat, k + b + 1, axis=0, out=tmp)
    tmp *= (fi * fj)[:, None]
    out += tmp
    return out.reshape(shape)


# ---------------------------------------------------------------- tables
N_SUN_U = 512
SUN_ELEV_MAX_DEG = 100.0
SUN_ELEV_MIN_DEG = -0.5


def _sun_elev_u(elev_deg):
    """Table coordinate in [0, 1] for the Sun's elevation above the local geometric horizon."""
    return np.sqrt(np.clip((elev_deg - SUN_ELEV_MIN_DEG) / (SUN_ELEV_MAX_DEG - SUN_ELEV_MIN_DEG), 0.0, 1.0))


def local_sun_elev_deg(r, mu_s):
    """Elevation (deg) of the Sun above the geometric horizon of a point at radius r."""
    return np.degrees(np.arcsin(np.clip(mu_s, -1.0, 1.0))
                      + np.arccos(np.clip(R_G / np.maximum(r, R_G), -1.0, 1.0)))


@dataclass(frozen=True)
class Tables:
    """Per-atmosphere tables (float32): sunlight transmittance and multiple-scattering source."""

    atmosphere: Atmosphere
    sun_t: np.ndarray            # (N_T_R, N_SUN_U, 16) transmittance of sunlight x disk fraction
    ms_alt_grid: np.ndarray      # (A,) m
    ms_sun_grid: np.ndarray      # (S,) deg, Sun altitude (local zenith frame)
    ms: np.ndarray               # (A, S, 16) multiple-scattering source per unit irradiance, 1/sr

    def sun_transmittance(self, r, mu_s):
        """Spectral transmittance of sunlight to points (r, mu_s), shape + (16,), Earth's shadow included."""
        x_r = np.sqrt(np.clip((r - R_G) / TOP_M, 0.0, 1.0))
        u = _sun_elev_u(local_sun_elev_deg(r, mu_s))
        return bilinear(self.sun_t, x_r * (N_T_R - 1), u * (N_SUN_U - 1))

    def ms_source(self, r, mu_s):
        """Multiple-scattering source Psi_ms (radiance per unit irradiance), shape + (16,)."""
        i = interp_index(np.clip(r - R_G, 0.0, TOP_M), self.ms_alt_grid)
        j = interp_index(np.degrees(np.arcsin(np.clip(mu_s, -1.0, 1.0))), self.ms_sun_grid)
        return bilinear(self.ms, i, j)


def _sun_transmittance_table(atm: Atmosphere) -> np.ndarray:
    """Integrate optical depth to space for a grid of (height, local Sun elevation)."""
    h = TOP_M * np.linspace(0.0, 1.0, N_T_R) ** 2
    u = np.linspace(0.0, 1.0, N_SUN_U)
    elev = SUN_ELEV_MIN_DEG + (SUN_ELEV_MAX_DEG - SUN_ELEV_MIN_DEG) * u ** 2
    r = (R_G + h)[:, None]
    dip = np.arccos(R_G / r)
    alt = np.radians(elev)[None, :] - dip           # Sun altitude in the local zenith frame
    mu = np.sin(alt)
    mu_ray = np.maximum(mu, horizon_mu(r) + 1e-9)   # rays below the limb: use the grazing ray
    d = dist_to_top(r, mu_ray)
    n = 300
    t = (np.arange(n) + 0.5) / n
    ts = d[..., None] * t
    dt = d[..., None] / n
    ry = np.sqrt(r[..., None] ** 2 + ts ** 2 + 2 * r[..., None] * mu_ray[..., None] * ts)
    rho_r, rho_m, rho_o = atm.densities(ry - R_G)
    ol = np.stack([(rho_r * dt).sum(-1), (rho_m * dt).sum(-1), (rho_o * dt).sum(-1)], axis=-1)
    coef = np.stack([atm.rayleigh_scattering(), atm.mie_extinction(), atm.ozone_absorption_peak()])
    trans = np.exp(-(ol @ coef)) * disk_fraction_above_horizon(r, mu)[..., None]
    return trans.astype(np.float32)


def _fibonacci_sphere(n: int) -> np.ndarray:
    i = np.arange(n) + 0.5
    z = 1.0 - 2.0 * i / n
    phi = np.pi * (1.0 + 5 ** 0.5) * i
    s = np.sqrt(1.0 - z * z)
    return np.stack([s * np.cos(phi), s * np.sin(phi), z], axis=-1)


def _ms_table(tab: Tables, atm: Atmosphere, n_dirs=48, n_steps=20):
    """Hillaire 2020 Psi_ms = L_2nd / (1 - f_ms) over (height, Sun altitude), isotropic phase."""
    alt = tab.ms_alt_grid
    sun = tab.ms_sun_grid
    w = _fibonacci_sphere(n_dirs)
    shape = (alt.size, sun.size, n_dirs)
    r = np.broadcast_to((R_G + alt)[:, None, None], shape)
    mu_s1 = np.sin(np.radians(sun))[None, :, None]
    mu = np.broadcast_to(w[:, 2][None, None, :], shape)
    nu = np.broadcast_to(w[:, 0][None, None, :] * np.sqrt(1 - mu_s1 ** 2) + w[:, 2][None, None, :] * mu_s1, shape)
    mu_s = np.broadcast_to(mu_s1, shape)
    d_g = dist_to_ground(r, mu)
    hit = np.isfinite(d_g)
    length = np.where(hit, d_g, dist_to_top(r, mu))
    ts, dts = march_samples(length, n_steps)
    tau = np.zeros(shape + (16,), np.float32)
    l1 = np.zeros(shape + (16,), np.float32)
    f = np.zeros(shape + (16,), np.float32)
    for k in range(n_steps):
        t = ts[..., k]
        dt = dts[..., k][..., None]
        ry = np.sqrt(r * r + t * t + 2 * r * mu * t)
        mu_sy = (r * mu_s + t * nu) / ry
        ext = atm.extinction(ry - R_G)
        sr, sm = atm.scattering(ry - R_G)
        tv = np.exp(-(tau + 0.5 * ext * dt))
        ss = (sr + sm) * tv * dt
        l1 += ss * tab.sun_transmittance(ry, mu_sy) / (4 * np.pi)
        f += ss
        tau += ext * dt
    # Lambertian ground bounce where the ray ends on the ground
    mu_sg = np.where(hit, (r * mu_s + np.where(hit, d_g, 0.0) * nu) / R_G, 0.0)
    ground = (np.exp(-tau) * tab.sun_transmittance(np.full(shape, R_G), mu_sg)
              * (np.maximum(mu_sg, 0.0) * atm.ground_albedo / np.pi)[..., None])
    l1 += np.where(hit[..., None], ground, 0.0)
    l2 = l1.mean(axis=2)                 # integral of L1 p_u over the sphere
    fms = f.mean(axis=2)                 # integral of p_u L_f over the sphere
    return (l2 / np.maximum(1.0 - fms, 1e-3)).astype(np.float32)


@lru_cache(maxsize=4)
def tables_for(atm: Atmosphere) -> Tables:
    """Transmittance and multiple-scattering tables for an atmosphere (cached per process)."""
    sun_t = _sun_transmittance_table(atm)
    ms_alt = TOP_M * np.linspace(0.0, 1.0, 20) ** 2
    ms_sun = np.concatenate([np.linspace(-30.0, 0.0, 21), 90.0 * np.linspace(0.0, 1.0, 13)[1:] ** 2])
    tab = Tables(atm, sun_t, ms_alt, ms_sun, np.zeros((ms_alt.size, ms_sun.size, 16), np.float32))
    return Tables(atm, sun_t, ms_alt, ms_sun, _ms_table(tab, atm))
