"""Sun, Moon and planets.

Every disk is shaded per pixel in its own tangent frame and then scaled so
that its summed signal (radiance x pixel solid angle) equals the body's
illuminance E = 2.54e-6 * 10^(-0.4 V) lx (Hollan 2001) times the
atmospheric transmittance: photometry is exact whatever the resolution.

- Sun: limb darkening I(mu)/I(1) = sum A_k mu^k, Neckel & Labs (1994, Solar
  Physics 153, 91) at 611.0 / 541.8 / 477.4 nm for R / G / B, plus a glare halo.
- Moon: a sphere lit from the true Sun direction (Sun and Moon vectors of the
  sky engine); Lommel-Seeliger reflectance mu0 / (mu0 + mu) (a flat-looking
  full Moon); total brightness from the phase law V = -12.73 + 0.026|a| +
  4e-9 a^4 (Allen; Krisciunas & Schaefer 1991) as carried in the BodyTable;
  earthshine ~1e-4 of the sunlit surface brightness at new Moon (Earthlight,
  0.01 %), flat across the disk, scaled by the Earth's phase (1 - cos a)/2 and
  0.15 mag bluer (Thejll et al. 2014); a seeded procedural albedo.
- Planets: point splats, or lit disks once their radius exceeds 1.5 px.
"""

from __future__ import annotations

import math

import numpy as np

from domegen.render.camera import local_basis
from domegen.render.splat import point_gain, splat_sources

LUX_AT_V0 = 2.54e-6
PLANETS = ("Mercury", "Venus", "Mars", "Jupiter", "Saturn", "Uranus", "Neptune")
#: Our display tints (linear, normalised to luminance 1 below).
PLANET_TINT = {"Mercury": (1.0, 0.93, 0.85), "Venus": (1.0, 0.97, 0.88), "Mars": (1.0, 0.62, 0.42),
               "Jupiter": (1.0, 0.93, 0.80), "Saturn": (1.0, 0.89, 0.68), "Uranus": (0.75, 0.92, 1.0),
               "Neptune": (0.60, 0.74, 1.0)}
# Neckel & Labs 1994 coefficients A0..A5 (rows 610.975, 541.760, 477.427 nm).
_LIMB = np.array([[0.30854, 1.36620, -1.83572, 2.33221, -1.63082, 0.45959],
                  [0.26073, 1.27428, -1.30352, 1.47085, -0.96618, 0.26384],
                  [0.19571, 1.30551, -1.25845, 1.50626, -1.05472, 0.30570]])
_LUMA = np.array([0.2126, 0.7152, 0.0722])
EARTHSHINE_RATIO = 1e-4
EARTHSHINE_TINT = np.array([0.90, 1.0, 1.13])
MOON_FULL_V = -12.73
MEAN_MOON_KM = 384_400.0
#: Veiling glare around the Sun: CIE disability glare, young observer (CIE 146:2002, simplified
#: Stiles-Holladay): L = 10 E / theta^2 cd/m^2 (E lux, theta deg), held flat inside GLARE_MIN_DEG and
#: tapered by (1 - theta/GLARE_MAX_DEG)^2 to vanish at GLARE_MAX_DEG.
GLARE_K = 10.0
GLARE_MIN_DEG = 0.1
GLARE_MAX_DEG = 30.0
#: Drawn per pixel inside GLARE_FINE_DEG, on the coarse sky grid outside GLARE_BLEND_DEG (blended between).
GLARE_BLEND_DEG = 3.0
GLARE_FINE_DEG = 6.0


def glare_profile(theta_deg) -> np.ndarray:
    """Veiling-glare radiance per lux of source illuminance, cd/m^2 / lx, at theta_deg from the source."""
    t = np.asarray(theta_deg, dtype=float)
    core = GLARE_K / np.maximum(t, GLARE_MIN_DEG) ** 2
    return np.where(t < GLARE_MAX_DEG, core * (1.0 - t / GLARE_MAX_DEG) ** 2, 0.0)


def _glare_fraction() -> float:
    """Share of the source's light the glare carries: integral of the profile over solid angle (sr)."""
    t = np.linspace(0.0, GLARE_MAX_DEG, 200_001)
    f = glare_profile(t) * np.sin(np.radians(t)) * 2 * np.pi
    return float(np.sum(0.5 * (f[1:] + f[:-1]) * np.diff(np.radians(t))))


#: 0.118 for the constants above: the disk keeps the rest, so the total stays E.
GLARE_TOTAL_FRACTION = _glare_fraction()


def glare_fine_weight(theta_deg) -> np.ndarray:
    """Share of the glare drawn per pixel (1 near the Sun, 0 beyond GLARE_FINE_DEG)."""
    return np.clip((GLARE_FINE_DEG - np.asarray(theta_deg, dtype=float)) / (GLARE_FINE_DEG - GLARE_BLEND_DEG),
                   0.0, 1.0)


def sun_lux_rgb(bodies, sky_model, light, opacity: float) -> np.ndarray | None:
    """Sun's illuminance per channel at the site (extinction, eclipse fraction, opacity), or None if set."""
    i = bodies.index("Sun")
    alt = float(bodies.alt_refracted_deg[i, 0])
    if opacity <= 0 or alt < -2.0:
        return None
    trans = np.asarray(sky_model.transmittance(np.array(alt), light)).reshape(3)
    return lux_from_v(bodies.magnitude[i, 0]) * trans * opacity * light.sun_visible_fraction


def glare_visible(bodies) -> float:
    """Share of the solar disk above the apparent horizon (0..1): the glare fades as the Sun sets."""
    i = bodies.index("Sun")
    r = float(bodies.angular_radius_deg[i, 0])
    return float(np.clip((float(bodies.alt_refracted_deg[i, 0]) + r) / (2 * r), 0.0, 1.0))


def add_coarse_glare(sky: np.ndarray, dirs: np.ndarray, bodies, sky_model, light, opacity: float) -> None:
    """Add the wide part of the Sun's glare to the coarse sky (3, m, m) at directions (3, m, m)."""
    e = sun_lux_rgb(bodies, sky_model, light, opacity)
    vis = glare_visible(bodies)
    if e is None or vis <= 0:
        return
    e = e * vis
    c = bodies.enu_refracted[bodies.index("Sun"), :, 0]
    theta = np.degrees(np.arccos(np.clip(np.tensordot(c, dirs, axes=(0, 0)), -1.0, 1.0)))
    g = glare_profile(theta) * (1.0 - glare_fine_weight(theta))
    sky += (e[:, None, None] * g[None]).astype(np.float32)


def lux_from_v(v) -> np.ndarray:
    return LUX_AT_V0 * 10.0 ** (-0.4 * np.asarray(v, dtype=float))


def limb_darkening(mu: np.ndarray) -> np.ndarray:
    """(..., ) mu = cos(angle from disk normal) -> (..., 3) I(mu)/I(1) for R, G, B."""
    mu = np.clip(mu, 0.0, 1.0)[..., None]
    powers = mu ** np.arange(6)
    return (powers[..., None, :] * _LIMB).sum(axis=-1) / _LIMB.sum(axis=1)


def tint(rgb) -> np.ndarray:
    rgb = np.asarray(rgb, dtype=float)
    return rgb / (rgb @ _LUMA)


def _disk_coords(dirs, center, radius_rad, north=None):
    """Orthographic disk coordinates (X, Y), |.| = 1 at the limb, plus the tangent basis."""
    e1, e2 = local_basis(center)
    if north is not None:
        n = np.asarray(north, dtype=float)
        n = n - center * (n @ center)
        if np.linalg.norm(n) > 1e-9:
            e2 = n / np.linalg.norm(n)
            e1 = np.cross(e2, center)
    s = math.sin(radius_rad)
    return (dirs @ e1) / s, (dirs @ e2) / s, e1, e2


def _coverage(rho, radius_px):
    """Anti-aliased coverage of a pixel at normalised radius rho of a disk of radius_px."""
    return np.clip((1.0 - rho) * max(radius_px, 0.5) + 0.5, 0.0, 1.0)


def _over(ctx, box, radiance, cov):
    """Composite a disk over what lies behind it, keeping the sky light in front of it."""
    y0, y1, x0, x1 = box
    sky = ctx.sky_window(box)
    for k in range(3):
        win = ctx.rgb[k, y0:y1, x0:x1]
        win -= sky[..., k]
        win *= (1.0 - cov).astype(np.float32)
        win += (radiance[..., k] + sky[..., k]).astype(np.float32)


def _body_info(ctx, name, alt, az, x, y):
    ctx.info.setdefault("bodies", []).append(
        {"name": name, "alt_deg": round(float(alt), 4), "az_deg": round(float(az), 4),
         "x_px": round(float(x), 3), "y_px": round(float(y), 3)})


def sphere_shading(nx, ny, mu, e1, e2, center, sun_dir):
    """mu0 and Lommel-Seeliger reflectance for disk points; normal n = X e1 + Y e2 - mu c."""
    normal_dot_sun = nx * float(e1 @ sun_dir) + ny * float(e2 @ sun_dir) - mu * float(center @ sun_dir)
    mu0 = np.maximum(normal_dot_sun, 0.0)
    return mu0, np.where(mu0 > 0, mu0 / (mu0 + mu + 1e-9), 0.0)


def moon_albedo(nx, ny, mu, seed: int) -> np.ndarray:
    """Subtle procedural albedo (0.78..1.12) on the Earth-facing hemisphere; seeded, no image data."""
    rng = np.random.default_rng([seed, 7341])
    k = 10
    freq = rng.normal(size=(k, 3)) * np.linspace(1.5, 7.0, k)[:, None]
    phase = rng.uniform(0, 2 * np.pi, k)
    amp = 1.0 / np.linspace(1.0, 3.5, k)
    p = np.stack([nx, ny, mu], axis=-1)
    field = np.zeros(nx.shape)
    for i in range(k):  # k octaves, each vectorised over all pixels
        field += amp[i] * np.cos(p @ freq[i] + phase[i])
    field /= amp.sum() * 0.5
    maria = np.clip((field + 0.15) * 2.0, 0.0, 1.0)
    return 1.12 - 0.34 * maria * maria * (3 - 2 * maria)


def draw_sun(ctx, opacity: float) -> None:
    b = ctx.bodies
    i = b.index("Sun")
    c = b.enu_refracted[i, :, 0]
    alt = float(b.alt_refracted_deg[i, 0])
    x, y, theta = ctx.project(c)
    if ctx.in_circle(theta, math.radians(b.angular_radius_deg[i, 0])):
        _body_info(ctx, "Sun", alt, b.az_deg[i, 0], x, y)
    e_rgb = sun_lux_rgb(b, ctx.sky_model, ctx.light, opacity)
    if e_rgb is None:
        return
    vis = glare_visible(b)
    glare = vis > 0
    r = math.radians(float(b.angular_radius_deg[i, 0]))
    box = ctx.box(c, math.degrees(r))
    if any(getattr(m, "draws_sun_disk", lambda _ctx: False)(ctx) for m in ctx.eclipse_modules):
        box = None   # an eclipse layer paints the photosphere itself
    if box is not None:
        dirs = ctx.window_dirs(box)
        X, Y, _, _ = _disk_coords(dirs, c, r)
        rho = np.hypot(X, Y)
        cov = _coverage(rho, r / ctx.rad_per_px)
        mu = np.sqrt(np.clip(1.0 - rho * rho, 0.0, 1.0))
        shade = limb_darkening(mu) * cov[..., None]
        omega = ctx.omega(ctx.window_theta(box))
        total = (shade * omega[..., None]).sum(axis=(0, 1))
        if np.all(total > 0):
            y0, y1, x0, x1 = box
            disk_share = 1.0 - GLARE_TOTAL_FRACTION * vis
            rad = shade * (e_rgb * disk_share / total)[None, None, :]
            for k in range(3):
                ctx.rgb[k, y0:y1, x0:x1] += rad[..., k].astype(np.float32)
            _note_disk(ctx, rad, cov)
    if glare:
        _draw_glare(ctx, c, e_rgb * vis)


def _draw_glare(ctx, c, e_rgb) -> None:
    """The near part of the glare, per pixel (the far part is on the coarse sky grid)."""
    box = ctx.box(c, GLARE_FINE_DEG, pad_px=0)
    if box is None:
        return
    dirs = ctx.window_dirs(box)
    chi = np.degrees(np.arccos(np.clip(dirs @ c, -1.0, 1.0)))
    prof = glare_profile(chi) * glare_fine_weight(chi)
    y0, y1, x0, x1 = box
    for k in range(3):
        ctx.rgb[k, y0:y1, x0:x1] += (prof * e_rgb[k]).astype(np.float32)


def draw_moon(ctx, opacity: float) -> None:
    b = ctx.bodies
    i, isun = b.index("Moon"), b.index("Sun")
    c = b.enu_refracted[i, :, 0]
    alt = float(b.alt_refracted_deg[i, 0])
    x, y, theta = ctx.project(c)
    r = math.radians(float(b.angular_radius_deg[i, 0]))
    if ctx.in_circle(theta, r):
        _body_info(ctx, "Moon", alt, b.az_deg[i, 0], x, y)
    if opacity <= 0 or alt < -2.0:
        return
    box = ctx.box(c, math.degrees(r))
    if box is None:
        return
    dm, ds = float(b.distance_km[i, 0]), float(b.distance_km[isun, 0])
    sun_dir = b.enu[isun, :, 0] * ds - b.enu[i, :, 0] * dm
    sun_dir /= np.linalg.norm(sun_dir)
    site = ctx.spec.site
    pole = np.array([0.0, math.cos(math.radians(site.lat_deg)), math.sin(math.radians(site.lat_deg))])
    dirs = ctx.window_dirs(box)
    X, Y, e1, e2 = _disk_coords(dirs, c, r, north=pole)
    rho = np.hypot(X, Y)
    cov = _coverage(rho, r / ctx.rad_per_px) * opacity
    inside = rho < 1.0 + 2.0 * ctx.rad_per_px / r
    mu = np.sqrt(np.clip(1.0 - rho * rho, 0.0, 1.0))
    Xc, Yc = np.clip(X, -1, 1), np.clip(Y, -1, 1)
    _, refl = sphere_shading(Xc, Yc, mu, e1, e2, c, sun_dir)
    albedo = moon_albedo(Xc, Yc, mu, ctx.layers.seed)
    omega = ctx.omega(ctx.window_theta(box))
    trans = np.asarray(ctx.sky_model.transmittance(np.array(alt), ctx.light)).reshape(3)
    e_lit = lux_from_v(b.magnitude[i, 0])
    lit = refl * albedo * cov
    total = float((lit * omega).sum())
    rad = np.zeros(X.shape + (3,))
    if total > 0:
        rad = (lit * (e_lit / total))[..., None] * trans[None, None, :]
        for m in ctx.eclipse_modules:
            shade = getattr(m, "moon_shade", None)
            if shade is None:
                continue
            flat = rad[inside]
            rad[inside] = shade(ctx, dirs[inside].T, flat)
    # earthshine: flat, the full Moon's mean surface brightness x 1e-4 x Earth's phase
    alpha = math.radians(float(b.phase_angle_deg[i, 0]))
    full = lux_from_v(MOON_FULL_V + 5 * math.log10(dm / MEAN_MOON_KM)) / (math.pi * r * r)
    es = EARTHSHINE_RATIO * full * 0.5 * (1.0 - math.cos(alpha))
    rad += (es * albedo * cov)[..., None] * (tint(EARTHSHINE_TINT) * trans)[None, None, :]
    _over(ctx, box, rad, cov)
    ctx.info["moon"] = {"illuminated_fraction": round(float(b.illuminated_fraction[i, 0]), 5),
                        "phase_angle_deg": round(float(b.phase_angle_deg[i, 0]), 3),
                        "radius_px": round(r / ctx.rad_per_px, 3)}
    _note_disk(ctx, rad, cov)


def _note_disk(ctx, rad, cov) -> None:
    """Record the brightest resolved disk's share of the frame and its lit luminance (for auto exposure)."""
    lum = rad @ _LUMA
    lit = lum > 0.02 * float(lum.max()) if lum.size else lum
    if not np.any(lit):
        return
    share = float(cov.sum()) / ctx.size ** 2
    typical = float(np.percentile(lum[lit], 75)) / max(float(np.mean(cov[lit])), 1e-6)
    best = ctx.info.get("disk_exposure")
    if best is None or typical > best["luminance_cd_m2"]:
        ctx.info["disk_exposure"] = {"share": round(share, 5), "luminance_cd_m2": typical}


def draw_planets(ctx, opacity: float) -> None:
    b = ctx.bodies
    isun = b.index("Sun")
    pts_x, pts_y, pts_lux, pts_omega = [], [], [], []
    for name in PLANETS:  # seven bodies, not a per-pixel loop
        if name not in b.names:
            continue
        i = b.index(name)
        c = b.enu_refracted[i, :, 0]
        alt = float(b.alt_refracted_deg[i, 0])
        x, y, theta = ctx.project(c)
        if not ctx.in_circle(theta):
            continue
        _body_info(ctx, name, alt, b.az_deg[i, 0], x, y)
        if opacity <= 0 or alt < -2.0:
            continue
        trans = np.asarray(ctx.sky_model.transmittance(np.array(alt), ctx.light)).reshape(3)
        e = lux_from_v(b.magnitude[i, 0]) * opacity * tint(PLANET_TINT[name]) * trans
        r = math.radians(float(b.angular_radius_deg[i, 0]))
        if r / ctx.rad_per_px >= 1.5:
            _planet_disk(ctx, b, i, isun, c, r, e)
        else:
            pts_x.append(float(x))
            pts_y.append(float(y))
            pts_lux.append(e * point_gain(ctx.rad_per_px))
            pts_omega.append(float(ctx.omega(theta)))
    if pts_x:
        splat_sources(ctx.rgb, ctx.size, np.array(pts_x), np.array(pts_y), np.array(pts_lux), np.array(pts_omega))


def _planet_disk(ctx, b, i, isun, c, r, e_rgb) -> None:
    box = ctx.box(c, math.degrees(r))
    if box is None:
        return
    sun_dir = b.enu[isun, :, 0] * b.distance_km[isun, 0] - b.enu[i, :, 0] * b.distance_km[i, 0]
    sun_dir = sun_dir / np.linalg.norm(sun_dir)
    dirs = ctx.window_dirs(box)
    X, Y, e1, e2 = _disk_coords(dirs, c, r)
    rho = np.hypot(X, Y)
    cov = _coverage(rho, r / ctx.rad_per_px)
    mu = np.sqrt(np.clip(1.0 - rho * rho, 0.0, 1.0))
    mu0, _ = sphere_shading(np.clip(X, -1, 1), np.clip(Y, -1, 1), mu, e1, e2, c, sun_dir)
    lit = mu0 * cov  # Lambert for the cloud-covered giants and Venus
    omega = ctx.omega(ctx.window_theta(box))
    total = float((lit * omega).sum())
    if total > 0:
        _over(ctx, box, (lit / total)[..., None] * e_rgb[None, None, :], cov)
