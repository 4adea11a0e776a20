"""Guide lines, cardinal points and labels, in our own palette.

Each line is drawn from the exact angular distance of a pixel's direction
to the line (so widths are constant in degrees on the dome): great circles
visit only the pixels along them, the coordinate grids every pixel; distances are
converted to pixels and anti-aliased by a one-pixel ramp; widths never drop
below 2 px at 4096 px (1.5 px on small frames).  Colours are display
values: they are stored divided by the frame's exposure so they show at the
intended brightness whatever the sky.
"""

from __future__ import annotations

import functools
import math

import numpy as np

from domegen.render.text import draw_text, outline, text_mask, upright_angle
from domegen.render.tonemap import srgb_decode

#: Our palette (sRGB display values 0..1).
PALETTE = {
    "grid_altaz": (0.30, 0.78, 0.70),      # sea green
    "grid_equatorial": (0.62, 0.52, 0.92),  # lavender
    "ecliptic": (0.98, 0.72, 0.26),         # amber
    "equator": (0.42, 0.64, 0.98),          # cornflower
    "meridian": (0.93, 0.47, 0.58),         # coral rose
    "horizon_line": (0.62, 0.90, 0.42),     # spring green
    "cardinals": (0.99, 0.93, 0.80),        # warm ivory
    "labels": (0.96, 0.86, 0.62),           # sand
}
#: Line widths on the dome, degrees.
WIDTH_DEG = {"grid_altaz": 0.10, "grid_equatorial": 0.10, "ecliptic": 0.16, "equator": 0.14,
             "meridian": 0.14, "horizon_line": 0.16}
CARDINAL_SIZE_DEG = 3.0
LABEL_SIZE_DEG = 1.5
GRID_ALT_STEP_DEG = 10.0
GRID_AZ_STEP_DEG = 15.0
GRID_RA_STEP_H = 1.0
#: Mean obliquity of the ecliptic at J2000 (IAU 2006: 84381.406 arcsec); its drift is < 0.02 deg by 2050.
OBLIQUITY_DEG = 84381.406 / 3600.0
#: Proper names of the brightest stars by Hipparcos number (IAU WGSN names).
STAR_NAMES = {32349: "Sirius", 30438: "Canopus", 69673: "Arcturus", 91262: "Vega", 24608: "Capella",
              24436: "Rigel", 37279: "Procyon", 27989: "Betelgeuse", 7588: "Achernar", 68702: "Hadar",
              97649: "Altair", 60718: "Acrux", 21421: "Aldebaran", 80763: "Antares", 65474: "Spica",
              37826: "Pollux", 113368: "Fomalhaut", 102098: "Deneb", 62434: "Mimosa", 49669: "Regulus",
              11767: "Polaris", 36850: "Castor", 25336: "Bellatrix", 54061: "Dubhe", 62956: "Alioth"}
LABEL_MAG_LIMIT = 2.1
#: Star names only while the Sun is lower than this (bright stars appear in civil twilight).
STAR_LABEL_MAX_SUN_ALT_DEG = -3.0


def _width_px(ctx, name: str) -> float:
    n = ctx.size
    w = WIDTH_DEG[name] / ctx.deg_per_px
    return float(np.clip(w, max(1.5, 2.0 * n / 4096.0), max(4.0, 8.0 * n / 4096.0)))


def _colour(ctx, name: str, gain: float = 0.85) -> np.ndarray:
    return srgb_decode(np.array(PALETTE[name])) * ctx.display_to_linear(gain)


def _composite_line(ctx, dist_deg: np.ndarray, name: str, opacity: float) -> None:
    """Blend a line whose per-pixel angular distance is ``dist_deg`` (H, W), over the pixels it covers."""
    half = _width_px(ctx, name) / 2.0
    idx = np.flatnonzero(dist_deg < np.float32((half + 0.5) * ctx.deg_per_px))
    _composite_at(ctx, idx, dist_deg.reshape(-1)[idx], name, opacity)


def _composite_great_circle(ctx, pole_enu, name: str, opacity: float) -> None:
    """Blend the great circle with pole ``pole_enu`` (3,) over the pixels it covers (found along the line)."""
    from domegen.render.camera import near_great_circle

    half = _width_px(ctx, name) / 2.0
    idx, sin_dist = near_great_circle(ctx.camera, pole_enu, math.radians(min((half + 0.5) * ctx.deg_per_px, 90.0)))
    dist = np.degrees(np.arcsin(np.minimum(sin_dist, 1.0)))
    _composite_at(ctx, idx, dist, name, opacity)


def _composite_at(ctx, idx: np.ndarray, dist_deg: np.ndarray, name: str, opacity: float) -> None:
    """Anti-aliased coverage from distances at flat pixel indices ``idx``; other pixels are untouched."""
    if idx.size == 0:
        return
    half = _width_px(ctx, name) / 2.0
    cov = (np.clip(half + 0.5 - dist_deg / np.float32(ctx.deg_per_px), 0.0, 1.0) * np.float32(opacity)
           ).astype(np.float32)
    col = _colour(ctx, name)
    for k in range(3):
        p = ctx.rgb[k].reshape(-1)
        p[idx] = p[idx] * (1.0 - cov) + cov * np.float32(col[k])
    if ctx.overlay_alpha is not None:
        a = ctx.overlay_alpha.reshape(-1)
        a[idx] += cov * (1.0 - a[idx])


def _dot(g: np.ndarray, v: np.ndarray) -> np.ndarray:
    """(H, W, 3) . (3,) -> (H, W) float32 without BLAS (its threads only add contention for 3 terms)."""
    v = np.asarray(v, dtype=np.float32)
    return g[..., 0] * v[0] + g[..., 1] * v[1] + g[..., 2] * v[2]


def _nearest(v: np.ndarray, step: float) -> np.ndarray:
    return np.abs(v - step * np.round(v / step))


def _eq_rotation(ctx) -> np.ndarray:
    from domegen.sky.times import unix_seconds

    return _equatorial_to_enu(ctx.spec.site, float(unix_seconds(ctx.spec.utc)))


@functools.lru_cache(maxsize=8)
def _equatorial_to_enu(site, utc_s: float) -> np.ndarray:
    from domegen.sky.bodies import equatorial_to_enu

    r = equatorial_to_enu(site, np.array([utc_s]))[:, :, 0]
    r.flags.writeable = False
    return r


def ecliptic_pole_enu(site, utc_s: float) -> np.ndarray:
    """Unit vector (3,) of the north ecliptic pole in the site's ENU frame (mean obliquity of J2000)."""
    eps = math.radians(OBLIQUITY_DEG)
    return _equatorial_to_enu(site, utc_s) @ np.array([0.0, -math.sin(eps), math.cos(eps)])


def draw_overlays(ctx) -> None:
    """Every overlay layer with a non-zero opacity."""
    op = ctx.layers.opacities()
    if op["grid_altaz"] > 0:
        g = ctx.grid
        z = g[..., 2]
        alt = np.degrees(np.arcsin(np.clip(z, -1.0, 1.0)))
        az = np.degrees(np.arctan2(g[..., 0], g[..., 1]))
        d_alt = _nearest(alt, GRID_ALT_STEP_DEG)
        d_az = _nearest(az, GRID_AZ_STEP_DEG) * np.cos(np.radians(alt))
        d_az = np.where(np.abs(alt) > 80.0, np.where(_nearest(az, 90.0) < GRID_AZ_STEP_DEG / 2,
                                                     d_az, 90.0), d_az)
        _composite_line(ctx, np.minimum(d_alt, d_az), "grid_altaz", op["grid_altaz"])
    if op["grid_equatorial"] > 0 or op["equator"] > 0 or op["ecliptic"] > 0:
        r = _eq_rotation(ctx).astype(np.float32)   # equatorial -> ENU
        if op["grid_equatorial"] > 0:
            g = ctx.grid
            dec = np.degrees(np.arcsin(np.clip(_dot(g, r[:, 2]), -1.0, 1.0)))
            ra = np.degrees(np.arctan2(_dot(g, r[:, 1]), _dot(g, r[:, 0])))
            d_dec = _nearest(dec, GRID_ALT_STEP_DEG)
            d_ra = _nearest(ra, 15.0 * GRID_RA_STEP_H) * np.cos(np.radians(dec))
            d_ra = np.where(np.abs(dec) > 80.0, 90.0, d_ra)
            _composite_line(ctx, np.minimum(d_dec, d_ra), "grid_equatorial", op["grid_equatorial"])
        if op["equator"] > 0:
            _composite_great_circle(ctx, r[:, 2], "equator", op["equator"])
        if op["ecliptic"] > 0:
            eps = math.radians(OBLIQUITY_DEG)
            pole = r @ np.array([0.0, -math.sin(eps), math.cos(eps)], dtype=np.float32)
            _composite_great_circle(ctx, pole, "ecliptic", op["ecliptic"])
    if op["horizon_line"] > 0:
        _composite_great_circle(ctx, (0.0, 0.0, 1.0), "horizon_line", op["horizon_line"])
    if op["meridian"] > 0:
        _composite_great_circle(ctx, (1.0, 0.0, 0.0), "meridian", op["meridian"])
    if op["cardinals"] > 0:
        _cardinals(ctx, op["cardinals"])
    if op["labels"] > 0:
        _labels(ctx, op["labels"])


def _text_px(ctx, size_deg: float, frac_max: float = 0.012) -> int:
    """Text height in px: size_deg on the dome, at most frac_max of the frame (close-ups), at least 10 px."""
    return int(max(10, min(size_deg / ctx.deg_per_px, frac_max * ctx.size)))


#: Gap (px) kept between the dark rims of two labels.
LABEL_GAP_PX = 2


@functools.lru_cache(maxsize=512)
def _ink(text: str, size_px: int, angle_deg: float) -> np.ndarray:
    """(h, w) bool: the pixels of a label and its dark rim, grown by LABEL_GAP_PX (draw_text's mask grid)."""
    m = outline(text_mask(text, size_px, angle_deg))
    for _ in range(LABEL_GAP_PX):
        m = outline(m)
    return m > 0.02


def _clash(a, b) -> bool:
    """True if placed labels a and b, each (x0, y0, ink), share a pixel."""
    (ax, ay, am), (bx, by, bm) = a, b
    x0, y0 = max(ax, bx), max(ay, by)
    x1, y1 = min(ax + am.shape[1], bx + bm.shape[1]), min(ay + am.shape[0], by + bm.shape[0])
    if x0 >= x1 or y0 >= y1:
        return False
    return bool(np.any(am[y0 - ay:y1 - ay, x0 - ax:x1 - ax] & bm[y0 - by:y1 - by, x0 - bx:x1 - bx]))


def _place(ctx, enu, text, size_px, colour, opacity, offset_px=0.0, keep_inside: bool = True,
           taken: list | None = None, radius_px: float = 0.0) -> bool:
    """Draw ``text`` offset_px below (rim-ward of) the direction ``enu``; True if drawn.

    With ``taken`` (the labels drawn so far, as (text, x0, y0, ink, angle_deg,
    size_px); extended by this one), the label goes to the first of: below,
    above, right, left (clear of a disk of ``radius_px``), further below,
    further above, whose pixels miss every taken label's; if none does, it is
    left out rather than drawn over another.
    """
    x, y, theta = ctx.project(np.asarray(enu, dtype=float))
    margin = -(offset_px + 2.5 * size_px) * ctx.rad_per_px if keep_inside else 0.0
    if not ctx.in_circle(theta, margin):
        return False
    x, y = float(x), float(y)
    if ctx.camera.free_view:
        ang, ux, uy = 0.0, 0.0, -1.0
    else:
        ang = upright_angle(x, y, ctx.size)
        ux, uy = -math.sin(math.radians(ang)), -math.cos(math.radians(ang))
    spots = [(x - ux * offset_px, y - uy * offset_px)]
    if taken is not None:
        side = radius_px + text_mask(text, int(size_px), 0.0).shape[1] / 2 + 4
        far = offset_px + 1.6 * size_px
        spots += [(x + ux * offset_px, y + uy * offset_px), (x - uy * side, y + ux * side),
                  (x + uy * side, y - ux * side), (x - ux * far, y - uy * far), (x + ux * far, y + uy * far)]
        ink = _ink(text, int(size_px), round(float(ang), 1))
    for cx, cy in spots:
        if taken is not None:
            h, w = ink.shape
            here = (int(round(cx - w / 2)), int(round(cy - h / 2)), ink)   # where draw_text puts it
            if any(_clash(here, t[1:4]) for t in taken):
                continue
            taken.append((text, *here, round(float(ang), 1), int(size_px)))
        draw_text(ctx.rgb, text, cx, cy, size_px, ang, colour, opacity, alpha=ctx.overlay_alpha)
        return True
    return False


def _cardinals(ctx, opacity: float) -> None:
    col = _colour(ctx, "cardinals", 0.9)
    for name, enu, size in _cardinal_dirs(ctx):
        _place(ctx, enu, name, size, col, opacity, keep_inside=False)


def _cardinal_dirs(ctx):
    """(name, ENU direction, text size px) of the four cardinal letters, just above the horizon."""
    size = _text_px(ctx, CARDINAL_SIZE_DEG, 0.022)
    alt = math.radians(1.5 + 0.6 * size * ctx.deg_per_px)
    return [(name, np.array([math.cos(alt) * math.sin(math.radians(az)), math.cos(alt) * math.cos(math.radians(az)),
                             math.sin(alt)]), size)
            for name, az in (("N", 0.0), ("E", 90.0), ("S", 180.0), ("W", 270.0))]


def _labels(ctx, opacity: float) -> None:
    size = _text_px(ctx, LABEL_SIZE_DEG)
    col = _colour(ctx, "labels", 0.8)
    if ctx.layers.cardinals > 0:
        keep_off = []
        for _, enu, s in _cardinal_dirs(ctx):
            x, y, theta = ctx.project(enu)
            if ctx.in_circle(theta):
                keep_off.append((float(x), float(y), 2.5 * s + 3 * size))
    else:
        keep_off = []

    def clear(enu) -> bool:
        x, y, _ = ctx.project(np.asarray(enu, dtype=float))
        return all(math.hypot(float(x) - cx, float(y) - cy) > r for cx, cy, r in keep_off)

    b = ctx.bodies
    taken: list = []
    # the Sun and the Moon pick their spots first, then the planets, then the stars by brightness
    order = sorted(ctx.info.get("bodies", []), key=lambda e: e["name"] not in ("Sun", "Moon"))
    for entry in order:
        i = b.index(entry["name"])
        r_px = math.radians(float(b.angular_radius_deg[i, 0])) / ctx.rad_per_px
        if clear(b.enu_refracted[i, :, 0]):
            _place(ctx, b.enu_refracted[i, :, 0], entry["name"], size, col, opacity,
                   offset_px=r_px + 0.9 * size + 3, taken=taken, radius_px=r_px)
    sf = ctx.stars
    if sf is not None and ctx.light.sun_alt_deg <= STAR_LABEL_MAX_SUN_ALT_DEG:   # no star names by day
        bright = np.flatnonzero((sf.vmag < LABEL_MAG_LIMIT) & (sf.alt_deg > 0))
        for j in bright:  # a few dozen names at most
            name = STAR_NAMES.get(int(sf.hip[j]))
            if name and clear(sf.enu[:, j]):
                _place(ctx, sf.enu[:, j], name, size, col, opacity, offset_px=0.9 * size + 4, taken=taken,
                       radius_px=2.0)
    # each label drawn: text, top-left pixel, angle (deg) and size (px)
    ctx.info["labels"] = [{"text": t, "x0_px": x0, "y0_px": y0, "angle_deg": a, "size_px": s}
                          for t, x0, y0, _, a, s in taken]
