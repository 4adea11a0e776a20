"""The Moon's shadow on the ellipsoid at one instant, from Besselian elements.

For an Earth-fixed point P (WGS84, Earth radii) the fundamental-plane
coordinates (xi, eta, zeta) are its projections on the plane's axes
(domegen.eclipse.geometry.axes).  The point is in the penumbra when
m = |(x - xi, y - eta)| < L1' = l1 - zeta tan f1, in the umbra/antumbra when
m < |L2'| with L2' = l2 - zeta tan f2, and the magnitude is
(L1' - m) / (L1' + L2') (Meeus, *Elements of Solar Eclipses 1951-2200*, 1989).
Everything is vectorised over points (globe pixels, outline samples).
"""

from __future__ import annotations

import numpy as np

from domegen.eclipse import geometry as geo
try:  # public name once the solar engine exports it
    from domegen.eclipse.local import obscuration as _obscuration
except ImportError:  # pragma: no cover - depends on the engine version
    from domegen.eclipse.local import _obscuration
from domegen.eclipse.solar import SolarEclipse, theta_deg


def t_hours(eclipse: SolarEclipse, utc_s) -> np.ndarray:
    """TT hours from the elements' t0 for POSIX UTC seconds."""
    b = eclipse.besselian
    return (np.asarray(utc_s, dtype=float) + b.tt_minus_utc_s) / 3600.0 - (b.t0_tt_jd - 2440587.5) * 24.0


def _state(eclipse: SolarEclipse, utc_s: float):
    b = eclipse.besselian
    e = b.at(float(t_hours(eclipse, utc_s)))
    e = {k: float(v) for k, v in e.items()}
    th = float(theta_deg(b, e))
    return e, th


def shadow_at(eclipse: SolarEclipse, utc_s: float, ecef) -> dict[str, np.ndarray]:
    """Shadow quantities at one instant for Earth-fixed points ``ecef`` (..., 3), Earth radii.

    Returns m, L1, L2 (plane units), zeta, magnitude (0 outside the penumbra
    or where the Sun is below the fundamental plane; the diameter ratio inside
    the umbra/antumbra), obscuration (fraction
    of the Sun's area covered) and booleans ``partial`` and ``central``.
    """
    b = eclipse.besselian
    e, th = _state(eclipse, utc_s)
    i, j, k = (np.asarray(a, dtype=np.float64) for a in geo.axes(e["d"], th))
    p = np.asarray(ecef, dtype=np.float64)
    xi, eta, zeta = p @ i, p @ j, p @ k
    m = np.hypot(e["x"] - xi, e["y"] - eta)
    L1 = e["l1"] - zeta * b.tan_f1
    L2 = e["l2"] - zeta * b.tan_f2
    day = zeta > 0.0
    partial = day & (m < L1)
    central = day & (m < np.abs(L2))
    # Inside the umbra/antumbra: Moon/Sun diameter ratio (NASA bulletin convention, as the engine).
    mag = np.where(central, (L1 - L2) / (L1 + L2), np.where(partial, (L1 - m) / (L1 + L2), 0.0))
    obsc = np.zeros_like(m)
    if partial.any():
        obsc[partial] = _obscuration(m[partial], L1[partial], L2[partial])
    return {"m": m, "L1": L1, "L2": L2, "zeta": zeta, "magnitude": mag, "obscuration": obsc,
            "partial": partial, "central": central}


def ecef_points(lat_deg, lon_deg) -> np.ndarray:
    """(..., 3) sea-level Earth-fixed points (Earth radii) for geodetic lat/lon."""
    return np.moveaxis(geo.site_vector(lat_deg, lon_deg), 0, -1)


def outline(eclipse: SolarEclipse, utc_s: float, which: str = "penumbra", n: int = 360):
    """Shadow outline on the ground at ``utc_s``: (lat, lon, on_disc) arrays (n,), or None.

    ``which`` is "penumbra" (m = L1') or "umbra" (m = |L2'|).  Where the shadow
    circle lies beyond the Earth's limb its points are moved radially onto the
    limb (the sunrise/sunset edge), so the ring bounds the shadowed ground.
    None when the shadow misses the Earth.
    """
    b = eclipse.besselian
    e, th = _state(eclipse, utc_s)
    rho = float(geo.limb_rho(e["d"]))
    l0 = e["l1"] if which == "penumbra" else e["l2"]
    tanf = b.tan_f1 if which == "penumbra" else b.tan_f2
    if np.hypot(e["x"], e["y"] / rho) > 1.0 + abs(l0):
        return None
    ang = np.linspace(0.0, 2 * np.pi, n, endpoint=False)
    zeta = np.zeros(n)
    for _ in range(4):  # L' depends on the point's own zeta: fixed-point passes
        r = np.abs(l0 - zeta * tanf)
        xi = e["x"] + r * np.cos(ang)
        eta = e["y"] + r * np.sin(ang)
        s = np.hypot(xi, eta / rho)
        off = s > 1.0
        xi = np.where(off, xi / s, xi)
        eta = np.where(off, eta / s, eta)
        lat, lon, z, ok = geo.surface_point(xi, eta, np.full(n, e["d"]), np.full(n, th), on_limb=True)
        zeta = np.where(ok, z, 0.0)
    if which != "penumbra" and off.all():
        return None
    return lat, lon, ~off


def contact_span_utc_s(eclipse: SolarEclipse, kind: str = "penumbra", step_h: float = 0.005):
    """(start, end) POSIX UTC seconds while the shadow touches the Earth (P1-P4 or U1-U4).

    Touching is tested on the Earth's outline in the fundamental plane
    (ellipse of semi-axes 1 and rho) grown by the shadow radius.
    """
    b = eclipse.besselian
    tg = eclipse.greatest_t_h
    t = np.arange(tg - 4.0, tg + 4.0 + step_h / 2, step_h)
    e = b.at(t)
    rho = geo.limb_rho(e["d"])
    r = e["l1"] if kind == "penumbra" else np.abs(e["l2"])
    # Distance of the axis point from the ellipse, to first order: (s - 1) * local radius.
    s = np.hypot(e["x"], e["y"] / rho)
    f = (s - 1.0) * np.hypot(e["x"], e["y"]) / np.maximum(s, 1e-12) - r
    inside = np.flatnonzero(f < 0)
    if inside.size == 0:
        return None
    i0, i1 = inside[0], inside[-1]

    def root(i, j):
        return t[i] - f[i] * (t[j] - t[i]) / (f[j] - f[i])

    a = root(i0 - 1, i0) if i0 > 0 else t[0]
    c = root(i1, i1 + 1) if i1 + 1 < t.size else t[-1]
    return float(b.utc_s(a)), float(b.utc_s(c))
