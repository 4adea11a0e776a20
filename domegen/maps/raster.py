"""Anti-aliased numpy rasteriser: filled polygons, stroked polylines, text labels.

Coordinates are pixel units with (0, 0) at the top-left corner of the top-left
pixel; pixel (row r, column c) covers x in [c, c+1), y in [r, r+1).
Colours are sRGB tuples (r, g, b, a) in 0..1 and are composited "over" in
premultiplied form.  Polygons get their coverage by 4 sub-scanlines per pixel
with exact horizontal coverage; lines get it from the analytic distance to each
segment (box filter), so both are anti-aliased without per-pixel Python loops.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from domegen.errors import OutOfRangeError

#: Largest image width or height accepted, pixels.
MAX_SIZE_PX = 8192
_SUBROWS = 4


@dataclass(frozen=True)
class Label:
    """A text label anchored at pixel (x, y); anchor is Pillow's two-letter code."""

    x: float
    y: float
    text: str
    colour: tuple
    size_px: int = 12
    anchor: str = "lm"
    halo: tuple | None = (0.0, 0.0, 0.0, 0.6)


class Canvas:
    """An RGBA float32 premultiplied image being drawn; ``to_image()`` gives Pillow RGBA."""

    def __init__(self, width_px: int, height_px: int, background=None):
        for name, v in (("width", width_px), ("height", height_px)):
            if not 1 <= int(v) <= MAX_SIZE_PX:
                raise OutOfRangeError(f"image {name} must be 1..{MAX_SIZE_PX} px", field=name,
                                      value=v, hint=f"try a size up to {MAX_SIZE_PX}")
        self.width = int(width_px)
        self.height = int(height_px)
        self.rgba = np.zeros((self.height, self.width, 4), dtype=np.float32)
        self.labels: list[Label] = []
        self._blank = background is None
        if background is not None:
            self.rgba[...] = _premul(background)

    # -- compositing -------------------------------------------------------------
    @property
    def flat(self) -> np.ndarray:
        return self.rgba.reshape(-1, 4)

    def composite_sparse(self, idx: np.ndarray, coverage: np.ndarray, colour) -> None:
        """Paint ``colour`` over flat pixel indices ``idx`` (unique) with ``coverage``."""
        if idx.size == 0:
            return
        self._blank = False
        src = _premul(colour)
        a = coverage.astype(np.float32, copy=False)[:, None] * src[3]
        px = self.flat[idx]
        px *= 1.0 - a
        px += a * (src / max(float(src[3]), 1e-12))
        self.flat[idx] = px

    def composite(self, coverage: np.ndarray, colour, y0: int = 0, x0: int = 0) -> None:
        """Paint ``colour`` over the window at (y0, x0) with per-pixel ``coverage`` 0..1."""
        h, w = coverage.shape
        if h == 0 or w == 0:
            return
        rr, cc = np.nonzero(coverage > 0)
        if rr.size > 0.5 * coverage.size:  # dense: whole-window arithmetic
            self._blank = False
            src = _premul(colour)
            a = (coverage.astype(np.float32, copy=False) * src[3])[..., None]
            win = self.rgba[y0:y0 + h, x0:x0 + w]
            win *= 1.0 - a
            win += a * (src / max(float(src[3]), 1e-12))
            return
        self.composite_sparse((rr + y0) * self.width + (cc + x0), coverage[rr, cc], colour)

    def composite_image(self, rgb: np.ndarray, alpha: np.ndarray | float = 1.0) -> None:
        """Paint a full-size (H, W, 3) sRGB image with (H, W) or scalar alpha."""
        a = np.asarray(alpha, dtype=np.float32)
        if a.ndim == 0 and float(a) >= 1.0:
            self.rgba[..., :3] = rgb
            self.rgba[..., 3] = 1.0
            self._blank = False
            return
        if self._blank:  # nothing below: premultiplied colour is rgb * alpha
            np.multiply(rgb, a[..., None] if a.ndim == 2 else a, out=self.rgba[..., :3])
            self.rgba[..., 3] = a
            self._blank = False
            return
        if a.ndim == 2:
            a = a[..., None]
        self.rgba[..., :3] *= 1.0 - a
        self.rgba[..., :3] += a * rgb
        self.rgba[..., 3:] *= 1.0 - a
        self.rgba[..., 3:] += a

    # -- primitives --------------------------------------------------------------
    def fill_polygon(self, rings, colour) -> None:
        """Fill rings (list of (N, 2) x, y arrays; holes wound opposite) anti-aliased."""
        cov, y0, x0 = polygon_coverage(rings, self.width, self.height)
        if cov is not None:
            self.composite(cov, colour, y0, x0)

    def stroke(self, polylines, colour, width_px: float = 1.0, dash_px=None) -> None:
        """Stroke polylines ((N, 2) x, y arrays; NaN rows break a line) anti-aliased."""
        a, b = segments(polylines)
        if dash_px:
            a, b = dash_segments(a, b, dash_px)
        idx, cov = segment_coverage(a, b, self.width, self.height, width_px)
        self.composite_sparse(idx, cov, colour)

    def dots(self, xy: np.ndarray, colour, radius_px: float) -> None:
        """Filled anti-aliased discs at (M, 2) pixel positions."""
        xy = np.asarray(xy, dtype=np.float64).reshape(-1, 2)
        if len(xy):
            idx, cov = segment_coverage(xy, xy, self.width, self.height, 2 * radius_px)
            self.composite_sparse(idx, cov, colour)

    def label(self, x, y, text, colour=(1, 1, 1, 1), size_px=12, anchor="lm", halo=(0, 0, 0, 0.6)):
        self.labels.append(Label(float(x), float(y), str(text), tuple(colour), int(size_px),
                                 anchor, halo))

    # -- output ------------------------------------------------------------------
    def to_array(self) -> np.ndarray:
        """(H, W, 4) uint8 straight-alpha sRGB, labels not included."""
        out = np.empty((self.height, self.width, 4), dtype=np.uint8)
        a = self.rgba[..., 3]
        scale = np.float32(255.0) / np.maximum(a, np.float32(1e-6))
        if float(a.min()) >= 1.0 - 1e-6:
            scale = np.float32(255.0)
        tmp = np.empty((self.height, self.width), dtype=np.float32)
        for ch in range(3):
            np.multiply(self.rgba[..., ch], scale, out=tmp)
            tmp += 0.5
            np.clip(tmp, 0, 255, out=tmp)
            out[..., ch] = tmp
        np.multiply(a, 255.0, out=tmp)
        tmp += 0.5
        np.clip(tmp, 0, 255, out=tmp)
        out[..., 3] = tmp
        return out

    def to_image(self):
        """Pillow RGBA image with the text labels drawn on top."""
        from PIL import Image

        img = Image.fromarray(self.to_array(), "RGBA")
        if self.labels:
            img = Image.alpha_composite(img, _label_layer(self.labels, img.size))
        return img

    def save_png(self, path) -> None:
        """Write an RGBA PNG atomically."""
        import io

        from domegen.cache import atomic_write_bytes

        buf = io.BytesIO()
        self.to_image().save(buf, format="PNG", optimize=False, compress_level=2)
        atomic_write_bytes(path, buf.getvalue())


def _premul(colour) -> np.ndarray:
    c = np.asarray(tuple(colour) + (1.0,) * (4 - len(colour)), dtype=np.float32)
    return np.array([c[0] * c[3], c[1] * c[3], c[2] * c[3], c[3]], dtype=np.float32)


def _font(size_px: int):
    from PIL import ImageFont

    try:
        return ImageFont.load_default(size=size_px)
    except (TypeError, OSError):  # Pillow without FreeType: bitmap font
        return ImageFont.load_default()


def _label_layer(labels, size):
    from PIL import Image, ImageDraw

    layer = Image.new("RGBA", size, (0, 0, 0, 0))
    draw = ImageDraw.Draw(layer)
    to8 = lambda c: tuple(int(round(255 * v)) for v in (tuple(c) + (1.0,) * (4 - len(c))))
    for lab in labels:
        kw = {}
        if lab.halo is not None:
            kw = dict(stroke_width=max(1, lab.size_px // 8), stroke_fill=to8(lab.halo))
        draw.text((lab.x, lab.y), lab.text, fill=to8(lab.colour), font=_font(lab.size_px),
                  anchor=lab.anchor, **kw)
    return layer


# -- polylines -------------------------------------------------------------------
def split_nan(p: np.ndarray) -> list[np.ndarray]:
    """Split an (N, 2) polyline at rows holding NaN; pieces of >= 1 point."""
    bad = ~np.isfinite(p).all(axis=1)
    if not bad.any():
        return [p] if len(p) else []
    idx = np.flatnonzero(bad)
    pieces = np.split(p, idx)
    return [q[1:] if i else q for i, q in enumerate(pieces) if len(q[1:] if i else q)]


def segments(polylines):
    """All drawable segments (a, b), each (S, 2), of polylines whose NaN rows break them.

    A polyline's piece of a single point becomes a zero-length segment (a dot).
    """
    arrs = [np.asarray(q, dtype=np.float64).reshape(-1, 2) for q in polylines]
    arrs = [q for q in arrs if len(q)]
    if not arrs:
        return np.zeros((0, 2)), np.zeros((0, 2))
    gap = np.full((1, 2), np.nan)
    p = np.concatenate([x for q in arrs for x in (q, gap)])
    fin = np.isfinite(p).all(axis=1)
    ok = fin[:-1] & fin[1:]
    a, b = p[:-1][ok], p[1:][ok]
    # isolated finite points (no finite neighbour) are dots
    prev = np.r_[False, fin[:-1]]
    nxt = np.r_[fin[1:], False]
    lone = fin & ~prev & ~nxt
    if lone.any():
        a = np.concatenate([a, p[lone]])
        b = np.concatenate([b, p[lone]])
    return a, b


def dash_segments(a, b, pattern_px):
    """Keep the parts of consecutive segments that fall on the dashes of (on, off) pixels.

    Arc length runs on across connected segments and restarts where a line breaks.
    """
    on, off = float(pattern_px[0]), float(pattern_px[1])
    if len(a) == 0:
        return a, b
    a, b = _subdivide_segments(a, b, max(0.5, min(on, off) / 4.0))
    length = np.hypot(*(b - a).T)
    start_piece = np.r_[True, np.any(np.abs(a[1:] - b[:-1]) > 1e-9, axis=1)]
    cum = np.cumsum(length)
    base = np.maximum.accumulate(np.where(start_piece, cum - length, 0.0))
    mid = cum - base - 0.5 * length
    keep = (mid % (on + off)) < on
    return a[keep], b[keep]


def _subdivide_segments(a, b, max_len: float):
    """Split segments so none is longer than max_len: (S', 2), (S', 2)."""
    n = np.maximum(1, np.ceil(np.hypot(*(b - a).T) / max_len)).astype(np.int64)
    if (n == 1).all():
        return a, b
    seg = np.repeat(np.arange(len(a)), n)
    k = np.arange(n.sum()) - np.repeat(np.cumsum(n) - n, n)
    t0 = (k / n[seg])[:, None]
    t1 = ((k + 1) / n[seg])[:, None]
    d = b[seg] - a[seg]
    return a[seg] + d * t0, a[seg] + d * t1


def stroke_coverage(lines, width: int, height: int, width_px: float):
    """Sparse coverage for stroking polylines: see :func:`segment_coverage`."""
    a, b = segments(lines)
    return segment_coverage(a, b, width, height, width_px)


def segment_coverage(a, b, width: int, height: int, width_px: float):
    """Sparse coverage for stroking segments a-b: unique flat pixel indices and coverage 0..1.

    Each segment (at most 16 px long) is visited over a thin window aligned with
    its major axis; the distance of every pixel centre to the segment gives a
    box-filtered coverage, and overlaps keep the maximum.
    """
    w_eff = max(float(width_px), 1.0)
    fade = min(float(width_px), 1.0)
    half = 0.5 * w_eff
    reach = half + 0.5
    a, b = _subdivide_segments(np.asarray(a, dtype=np.float64), np.asarray(b, dtype=np.float64), 16.0)
    if len(a) == 0:
        return _EMPTY
    lo = np.minimum(a, b) - reach
    hi = np.maximum(a, b) + reach
    keep = (hi[:, 0] >= 0) & (hi[:, 1] >= 0) & (lo[:, 0] < width) & (lo[:, 1] < height)
    a, b = a[keep], b[keep]
    if len(a) == 0:
        return _EMPTY
    d = b - a
    steep = np.abs(d[:, 1]) > np.abs(d[:, 0])
    # Major (u) and minor (v) axis coordinates of the segment ends.
    ua = np.where(steep, a[:, 1], a[:, 0]); va = np.where(steep, a[:, 0], a[:, 1])
    ub = np.where(steep, b[:, 1], b[:, 0]); vb = np.where(steep, b[:, 0], b[:, 1])
    du = ub - ua
    slope = np.where(np.abs(du) > 1e-12, (vb - va) / np.where(np.abs(du) > 1e-12, du, 1.0), 0.0)
    umin, umax = np.minimum(ua, ub), np.maximum(ua, ub)
    seg_max = float(np.max(np.abs(d))) if len(d) else 0.0  # longest major-axis extent
    k_major = int(np.ceil(seg_max + 2 * reach + 2))
    k_minor = int(np.ceil(2.83 * reach + 3))
    om = np.arange(k_major)
    on = np.arange(k_minor)
    u0 = np.floor(umin - reach).astype(np.int64)
    idx_all, cov_all = [], []
    chunk = max(1, 3_000_000 // (k_major * k_minor))
    for s0 in range(0, len(a), chunk):  # bounded memory; a handful of iterations
        sl = slice(s0, s0 + chunk)
        u = u0[sl, None] + om[None, :]                      # (S, Km)
        uc = np.clip(u + 0.5, umin[sl, None], umax[sl, None])
        vc = va[sl, None] + (uc - ua[sl, None]) * slope[sl, None]
        v = np.floor(vc - reach - 0.5).astype(np.int64)[:, :, None] + on[None, None, :]
        u = np.broadcast_to(u[:, :, None], v.shape)
        st = steep[sl, None, None]
        px = np.where(st, v, u)
        py = np.where(st, u, v)
        ax, ay = a[sl, 0, None, None], a[sl, 1, None, None]
        dx, dy = d[sl, 0, None, None], d[sl, 1, None, None]
        qx, qy = px + 0.5 - ax, py + 0.5 - ay
        ll = dx * dx + dy * dy
        t = np.clip((qx * dx + qy * dy) / np.where(ll > 0, ll, 1.0), 0.0, 1.0)
        dist = np.hypot(qx - t * dx, qy - t * dy)
        cov = np.clip(half + 0.5 - dist, 0.0, 1.0) * fade
        ok = (cov > 0) & (px >= 0) & (px < width) & (py >= 0) & (py < height)
        idx_all.append((py * width + px)[ok])
        cov_all.append(cov[ok].astype(np.float32))
    return _max_unique(np.concatenate(idx_all), np.concatenate(cov_all))


_EMPTY = (np.zeros(0, dtype=np.int64), np.zeros(0, dtype=np.float32))


def _max_unique(idx: np.ndarray, cov: np.ndarray):
    """Unique indices with the largest coverage of each."""
    if idx.size == 0:
        return _EMPTY
    order = np.argsort(idx, kind="stable")
    idx, cov = idx[order], cov[order]
    start = np.flatnonzero(np.r_[True, idx[1:] != idx[:-1]])
    return idx[start], np.maximum.reduceat(cov, start)


# -- polygons --------------------------------------------------------------------
def polygon_coverage(rings, width: int, height: int):
    """Nonzero-rule coverage window (h, w) float32 and (y0, x0) for ``rings``; None if empty."""
    xs0, ys0, xs1, ys1 = [], [], [], []
    for r in rings:
        for p in split_nan(np.asarray(r, dtype=np.float64)):
            if len(p) < 3:
                continue
            q = np.roll(p, -1, axis=0)
            xs0.append(p[:, 0]); ys0.append(p[:, 1]); xs1.append(q[:, 0]); ys1.append(q[:, 1])
    if not xs0:
        return None, 0, 0
    X0, Y0, X1, Y1 = map(np.concatenate, (xs0, ys0, xs1, ys1))
    S = _SUBROWS
    ymin = max(0, int(np.floor(min(Y0.min(), Y1.min()))))
    ymax = min(height, int(np.ceil(max(Y0.max(), Y1.max()))))
    xmin = max(0, int(np.floor(min(X0.min(), X1.min()))))
    if ymax <= ymin or xmin >= width:
        return None, 0, 0
    direction = np.where(Y1 > Y0, 1.0, -1.0)
    ya, yb = np.minimum(Y0, Y1), np.maximum(Y0, Y1)
    # Sub-row j has its centre at y = (j + 0.5) / S; an edge covers centres in [ya, yb).
    jlo = np.clip(np.ceil(ya * S - 0.5), ymin * S, ymax * S).astype(np.int64)
    jhi = np.clip(np.ceil(yb * S - 0.5), ymin * S, ymax * S).astype(np.int64)
    n = jhi - jlo
    ok = n > 0
    if not ok.any():
        return None, 0, 0
    e = np.repeat(np.flatnonzero(ok), n[ok])
    j = jlo[e] + (np.arange(len(e)) - np.repeat(np.cumsum(n[ok]) - n[ok], n[ok]))
    yc = (j + 0.5) / S
    x = X0[e] + (yc - Y0[e]) * (X1[e] - X0[e]) / (Y1[e] - Y0[e])
    x = np.clip(x - xmin, 0.0, width - xmin + 1.0)
    k = np.floor(x).astype(np.int64)
    f = x - k
    wwin = width - xmin + 2
    row = j // S - ymin
    diff = np.zeros((ymax - ymin) * wwin, dtype=np.float64)
    dirn = direction[e] / S
    np.add.at(diff, row * wwin + k, dirn * (1.0 - f))
    np.add.at(diff, row * wwin + np.minimum(k + 1, wwin - 1), dirn * f)
    cov = np.cumsum(diff.reshape(ymax - ymin, wwin), axis=1)[:, : width - xmin]
    cov = np.clip(np.abs(cov), 0.0, 1.0).astype(np.float32)
    return cov, ymin, xmin
