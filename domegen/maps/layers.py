"""Eclipse layers drawn on any projection: path band, central line with time ticks,
limits, partial limits, sunrise/sunset curves, magnitude curves, and the shadow
(penumbra and umbra with their true outlines) at one instant.

Inputs are an :class:`domegen.eclipse.path.EclipsePath` (pure data) and a
projection from :mod:`domegen.maps.projection`.
"""

from __future__ import annotations

from datetime import datetime, timezone

import numpy as np

from domegen.maps import shadow
from domegen.maps.style import DEFAULT, Palette

_RISE_SET = ("begins_at_sunrise", "ends_at_sunrise", "begins_at_sunset", "ends_at_sunset")


def path_ring(path):
    """Closed ring (lat, lon) bounding the umbral/antumbral path, or None.

    The northern limit in time order, then the southern limit backwards; the
    short ends (where the shadow meets the Earth at sunrise and sunset) are
    closed with straight joins.  Longitudes are unwrapped (continuous, may pass
    +-180).
    """
    north = sorted(path.pieces("umbra_north"), key=lambda c: c.utc_s[0])
    south = sorted(path.pieces("umbra_south"), key=lambda c: c.utc_s[0])
    if not north or not south:
        return None
    lat = np.concatenate([c.lat_deg for c in north] + [c.lat_deg[::-1] for c in south[::-1]])
    lon = np.concatenate([c.lon_deg for c in north] + [c.lon_deg[::-1] for c in south[::-1]])
    lon = np.degrees(np.unwrap(np.radians(lon)))
    return lat, lon


def _band_colour(path, palette):
    return palette.band_annular if path.eclipse.type == "annular" else palette.band_total


def _limit_style(path, palette):
    return palette.limit_annular if path.eclipse.type == "annular" else palette.limit_total


def draw_path_band(canvas, proj, path, palette: Palette = DEFAULT) -> None:
    ring = path_ring(path)
    if ring is not None:
        canvas.fill_polygon(proj.polygon_rings(*ring), _band_colour(path, palette))


def _stroke_curves(canvas, proj, curves, style):
    lines = [proj.polyline(c.lat_deg, c.lon_deg) for c in curves]
    if lines:
        canvas.stroke(lines, style.colour, style.width_px, style.dash_px)


def draw_limits(canvas, proj, path, palette: Palette = DEFAULT) -> None:
    st = _limit_style(path, palette)
    _stroke_curves(canvas, proj, path.pieces("umbra_north") + path.pieces("umbra_south"), st)


def draw_partial_limits(canvas, proj, path, palette: Palette = DEFAULT) -> None:
    _stroke_curves(canvas, proj, path.pieces("penumbra_north") + path.pieces("penumbra_south"),
                   palette.partial_limit)


def draw_rise_set(canvas, proj, path, palette: Palette = DEFAULT) -> None:
    curves = [c for n in _RISE_SET for c in path.pieces(n)]
    _stroke_curves(canvas, proj, curves, palette.rise_set)


def draw_magnitude_curves(canvas, proj, path, palette: Palette = DEFAULT, label_px: int = 11) -> None:
    curves = path.pieces("magnitude_north") + path.pieces("magnitude_south")
    _stroke_curves(canvas, proj, curves, palette.magnitude)
    for c in curves:
        k = len(c.lat_deg) // 2
        x, y, vis = proj.forward(c.lat_deg[k:k + 1], c.lon_deg[k:k + 1])
        if vis[0]:
            canvas.label(x[0], y[0], f"{c.magnitude:.1f}", palette.magnitude.colour, label_px, "mm",
                         palette.halo)


def draw_central_line(canvas, proj, path, palette: Palette = DEFAULT, tick_s: float | None = None,
                      label_every: int = 2, label_px: int = 11) -> None:
    """Central line with a tick every ``tick_s`` seconds (auto) and HH:MM UTC labels."""
    pieces = path.pieces("central")
    if not pieces:
        return
    st = palette.central
    _stroke_curves(canvas, proj, pieces, st)
    for c in pieces:
        span = c.utc_s[-1] - c.utc_s[0]
        step = tick_s or (600.0 if span > 5400 else 300.0 if span > 1800 else 60.0)
        ticks = np.arange(np.ceil(c.utc_s[0] / step) * step, c.utc_s[-1], step)
        if ticks.size == 0:
            continue
        lon_u = np.degrees(np.unwrap(np.radians(c.lon_deg)))
        lat = np.interp(ticks, c.utc_s, c.lat_deg)
        lon = np.interp(ticks, c.utc_s, lon_u)
        x, y, vis = proj.forward(lat, lon)
        x2, y2, _ = proj.forward(np.interp(ticks + 20, c.utc_s, c.lat_deg),
                                 np.interp(ticks + 20, c.utc_s, lon_u))
        dx, dy = x2 - x, y2 - y
        norm = np.hypot(dx, dy)
        norm[norm == 0] = 1.0
        nx, ny = -dy / norm, dx / norm
        half = max(3.0, canvas.width / 300.0)
        segs = [np.array([[xi - half * a, yi - half * b], [xi + half * a, yi + half * b]])
                for xi, yi, a, b, v in zip(x, y, nx, ny, vis) if v]
        canvas.stroke(segs, palette.tick.colour, palette.tick.width_px)
        kept: list[tuple[float, float]] = []
        for n, (tk, xi, yi, a, b, v) in enumerate(zip(ticks, x, y, nx, ny, vis)):
            if v and label_every > 0 and n % label_every == 0:
                off = 2.2 * half + label_px
                lx, ly = xi + off * a, yi + off * b
                if any(abs(lx - kx) < 3.2 * label_px and abs(ly - ky) < 1.3 * label_px
                       for kx, ky in kept):
                    continue  # would overlap a label already placed
                kept.append((lx, ly))
                hhmm = datetime.fromtimestamp(float(tk), timezone.utc).strftime("%H:%M")
                canvas.label(lx, ly, hhmm, palette.text, label_px, "mm", palette.halo)


def draw_path(canvas, proj, path, palette: Palette = DEFAULT, label_px: int = 11) -> None:
    """Every path layer in drawing order."""
    draw_magnitude_curves(canvas, proj, path, palette, label_px)
    draw_partial_limits(canvas, proj, path, palette)
    draw_rise_set(canvas, proj, path, palette)
    draw_path_band(canvas, proj, path, palette)
    draw_limits(canvas, proj, path, palette)
    draw_central_line(canvas, proj, path, palette, label_px=label_px)


# -- the shadow at one instant ------------------------------------------------------
def shadow_coverage(proj, eclipse, utc_s: float, step: int = 4) -> dict:
    """Anti-aliased coverage of the penumbra and umbra on the day side, in image windows.

    The smooth fields L1' - m, |L2'| - m and zeta (see
    :func:`domegen.maps.shadow.shadow_at`) are evaluated at the ellipsoid
    point of every ``step``-th pixel; each is turned into a signed distance in
    pixels (f / |grad f|), interpolated bilinearly and mapped to coverage
    0.5 + distance, so outlines keep their true shape to a small fraction of a
    pixel.  Returns {"penumbra": (cov, y0, x0) or None, "umbra": ..., } with
    the penumbra coverage already weighted by 0.25 + 0.75 obscuration^0.7.
    """
    from domegen.maps.projection import coarse_samples, upsample

    xs, ys, lat, lon = coarse_samples(proj, step)
    s = shadow.shadow_at(eclipse, utc_s, shadow.ecef_points(lat, lon))

    def dist(f):
        gy, gx = np.gradient(f, ys, xs)
        return f / np.maximum(np.hypot(gx, gy), 1e-12)

    d_day = dist(s["zeta"])
    out = {}
    for name, f in (("penumbra", s["L1"] - s["m"]), ("umbra", np.abs(s["L2"]) - s["m"])):
        d = dist(f)
        near = (d > -2.0 * step) & (d_day > -2.0 * step)
        if not near.any():
            out[name] = None
            continue
        rr, cc = np.nonzero(near)
        r0, r1 = max(rr.min() - 1, 0), min(rr.max() + 2, ys.size)
        c0, c1 = max(cc.min() - 1, 0), min(cc.max() + 2, xs.size)
        wx, wy = xs[c0:c1], ys[r0:r1]
        x0, x1 = int(np.floor(wx[0])), int(np.ceil(wx[-1]))
        y0, y1 = int(np.floor(wy[0])), int(np.ceil(wy[-1]))

        def up(field):
            return upsample(field[r0:r1, c0:c1], wx - x0, wy - y0, x1 - x0, y1 - y0)

        cov = np.clip(0.5 + up(d), 0.0, 1.0) * np.clip(0.5 + up(d_day), 0.0, 1.0)
        if name == "penumbra":
            obsc = np.clip(up(s["obscuration"]), 0.0, 1.0)
            cov *= np.float32(0.25) + np.float32(0.75) * obsc ** np.float32(0.7)
        if proj.kind == "orthographic":
            cov *= proj.disc_coverage()[y0:y1, x0:x1]
        out[name] = (cov.astype(np.float32), y0, x0)
    return out


def draw_shadow(canvas, proj, eclipse, utc_s: float, palette: Palette = DEFAULT) -> dict:
    """Penumbra darkened by obscuration and the umbra filled, both anti-aliased, with outlines."""
    cov = shadow_coverage(proj, eclipse, utc_s)
    if cov["penumbra"] is not None:
        canvas.composite(cov["penumbra"][0], palette.penumbra_shade, *cov["penumbra"][1:])
    if cov["umbra"] is not None:
        canvas.composite(cov["umbra"][0], palette.umbra, *cov["umbra"][1:])
    for which, st in (("penumbra", palette.penumbra_edge), ("umbra", palette.umbra_edge)):
        o = shadow.outline(eclipse, utc_s, which, 720)
        if o is None:
            continue
        lat, lon, on = o
        onc = np.r_[on, on[:1]]
        # Only the shadow's own edge, not the stretch moved onto the limb.
        p = proj.polyline(np.where(onc, np.r_[lat, lat[:1]], np.nan), np.r_[lon, lon[:1]])
        canvas.stroke([p], st.colour, st.width_px, st.dash_px)
    return cov
