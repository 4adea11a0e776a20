"""The angular (equidistant) fisheye: pixels <-> horizon-frame directions.

Camera frame: right (r), down (d) and axis (a) unit vectors in ENU, a
right-handed triple (r x d = a).  A direction v at angle theta from the axis
lands at distance theta / (field/2) * (size/2) pixels from the centre, in the
direction (v.r, v.d) on the frame (x right, y down).  For the default dome
(zenith at the centre, front azimuth 180) r = west, d = south: north at the
top and east on the left, as seen from below looking up.
"""

from __future__ import annotations

import functools
import math

import numpy as np

from domegen.render.spec import CameraSpec

_CHUNK_ROWS = 512


def _horizontal(az_deg: float) -> np.ndarray:
    a = math.radians(az_deg)
    return np.array([math.sin(a), math.cos(a), 0.0])


@functools.lru_cache(maxsize=64)
def camera_basis(camera: CameraSpec) -> np.ndarray:
    """Rows (right, down, axis) of the camera in ENU, shape (3, 3) float64."""
    up = np.array([0.0, 0.0, 1.0])
    if camera.free_view:
        az = camera.front_az_deg if camera.view_az_deg is None else camera.view_az_deg
        alt = math.radians(camera.view_alt_deg)
        f = _horizontal(az)
        axis = math.cos(alt) * f + math.sin(alt) * up
        # zenith side up in the picture; looking straight up, the front is down
        down = math.sin(alt) * f - math.cos(alt) * up
        if abs(camera.view_alt_deg) > 89.999999:
            down = _horizontal(camera.front_az_deg) * math.copysign(1.0, camera.view_alt_deg)
    else:
        t = math.radians(camera.tilt_deg)
        f = _horizontal(camera.front_az_deg)
        axis = math.cos(t) * up + math.sin(t) * f
        down = math.cos(t) * f - math.sin(t) * up
    down = down - axis * float(down @ axis)
    down /= np.linalg.norm(down)
    right = np.cross(down, axis)
    rho = math.radians(camera.roll_deg)
    if rho:
        right, down = (math.cos(rho) * right + math.sin(rho) * down,
                       -math.sin(rho) * right + math.cos(rho) * down)
    m = np.stack([right, down, axis])
    m.flags.writeable = False
    return m


def half_field_rad(camera: CameraSpec) -> float:
    return math.radians(camera.field_deg) / 2.0


def rad_per_px(camera: CameraSpec) -> float:
    """Angle per pixel along a radius, radians."""
    return math.radians(camera.field_deg) / camera.size_px


def project(camera: CameraSpec, enu) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """ENU vectors (3, ...) -> (x_px, y_px, theta_rad), float64.

    theta is the angle from the camera axis; a point is in the image circle
    when theta <= field/2.  Vectors need not be normalised.
    """
    v = np.asarray(enu, dtype=float)
    m = camera_basis(camera)
    c = np.tensordot(m, v, axes=(1, 0))
    h = np.hypot(c[0], c[1])
    theta = np.arctan2(h, c[2])
    scale = (camera.size_px / 2.0) / half_field_rad(camera)
    with np.errstate(invalid="ignore", divide="ignore"):
        k = np.where(h > 0, theta * scale / np.where(h > 0, h, 1.0), 0.0)
    half = camera.size_px / 2.0
    return half + k * c[0], half + k * c[1], theta


def unproject(camera: CameraSpec, x_px, y_px, dtype=np.float64) -> np.ndarray:
    """Frame coordinates -> unit ENU vectors (3, ...) (any radius); float64 unless ``dtype`` says otherwise."""
    half = camera.size_px / 2.0
    x = (np.asarray(x_px, dtype=dtype) - dtype(half)) / dtype(half)
    y = (np.asarray(y_px, dtype=dtype) - dtype(half)) / dtype(half)
    r = np.hypot(x, y)
    hf = dtype(half_field_rad(camera))
    theta = r * hf
    with np.errstate(invalid="ignore", divide="ignore"):
        s = np.where(r > 0, np.sin(theta) / r, hf)   # sin(theta) / r, -> hf at the centre
    cz = np.cos(theta)
    cx, cy = s * x, s * y
    m = camera_basis(camera).astype(dtype)
    out = np.empty((3,) + np.shape(cx), dtype=dtype)
    for k in range(3):
        out[k] = m[0, k] * cx + m[1, k] * cy + m[2, k] * cz
    return out


@functools.lru_cache(maxsize=2)
def direction_grid(camera: CameraSpec) -> np.ndarray:
    """Unit ENU direction of every pixel centre, (H, W, 3) float32, read-only, cached per camera.

    Pixels outside the image circle carry the continued mapping (angles past
    field/2), so smooth fields can be sampled up to the rim without seams.
    """
    n = camera.size_px
    half = n / 2.0
    u = ((np.arange(n, dtype=np.float64) + 0.5 - half) / half).astype(np.float32)
    m = camera_basis(camera).astype(np.float32)
    hf = np.float32(half_field_rad(camera))
    out = np.empty((n, n, 3), dtype=np.float32)
    for r0 in range(0, n, _CHUNK_ROWS):
        y = u[r0:r0 + _CHUNK_ROWS, None]
        r = np.sqrt(u[None, :] ** 2 + y ** 2)  # never 0: pixel centres are off the exact centre
        theta = r * hf
        s = np.sin(theta)
        s /= r
        cx, cy, cz = s * u[None, :], s * y, np.cos(theta)
        blk = out[r0:r0 + _CHUNK_ROWS]
        for k in range(3):
            blk[..., k] = m[0, k] * cx + m[1, k] * cy + m[2, k] * cz
    out.flags.writeable = False
    return out


#: Side of the pixel blocks screened before per-pixel work (see block_pixels).
SCREEN_BLOCK_PX = 16


@functools.lru_cache(maxsize=4)
def block_centres(camera: CameraSpec) -> tuple[np.ndarray, np.ndarray]:
    """ENU directions (3, nb, nb) float64 of the centres of SCREEN_BLOCK_PX blocks, and each
    block's distance from the frame centre in circle radii (nb, nb)."""
    n, bs = camera.size_px, SCREEN_BLOCK_PX
    centres = (np.arange(-(-n // bs)) + 0.5) * bs
    bx, by = np.meshgrid(centres, centres)
    half = n / 2.0
    return unproject(camera, bx, by), np.hypot(bx - half, by - half) / half


def screen_reach_rad(camera: CameraSpec) -> float:
    """An upper bound on the angle from a block's centre to any of its pixels, radians.

    Neighbouring pixels are at most one pixel-angle apart (radially exactly,
    across sin(theta)/theta of it), so half a block diagonal is covered by one block side.
    """
    return SCREEN_BLOCK_PX * rad_per_px(camera)


def block_pixels(camera: CameraSpec, blocks: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Rows and columns (int64) of the pixels of the selected blocks ((nb, nb) bool) that lie in
    the image circle or its anti-aliased rim."""
    n, bs = camera.size_px, SCREEN_BLOCK_PX
    iy, ix = np.nonzero(blocks)
    off = np.arange(bs)
    rows = np.broadcast_to(iy[:, None, None] * bs + off[None, :, None], (iy.size, bs, bs)).reshape(-1)
    cols = np.broadcast_to(ix[:, None, None] * bs + off[None, None, :], (ix.size, bs, bs)).reshape(-1)
    ok = (rows < n) & (cols < n)
    rows, cols = rows[ok], cols[ok]
    half = n / 2.0
    inside = np.hypot(cols + 0.5 - half, rows + 0.5 - half) <= half * (1.0 + 2.0 / n)
    return rows[inside], cols[inside]


def near_great_circle(camera: CameraSpec, pole_enu, reach_rad: float) -> tuple[np.ndarray, np.ndarray]:
    """Pixels less than ``reach_rad`` from the great circle with pole ``pole_enu`` (3,).

    Returns flat pixel indices (int64, in the image circle and its rim) and
    |sin| of each pixel's angular distance from the circle (float32): the
    work scales with the line's length, not with the frame's area.
    """
    p = np.asarray(pole_enu, dtype=float).reshape(3)
    p = p / np.linalg.norm(p)
    dirs, rb = block_centres(camera)
    n = camera.size_px
    reach = min(reach_rad + screen_reach_rad(camera), math.pi / 2)
    blocks = (np.abs(np.tensordot(p, dirs, axes=1)) < math.sin(reach)) & (rb <= 1.0 + 1.5 * SCREEN_BLOCK_PX / n)
    rows, cols = block_pixels(camera, blocks)
    d = unproject(camera, cols + 0.5, rows + 0.5, dtype=np.float32)
    p32 = p.astype(np.float32)
    s = np.abs(d[0] * p32[0] + d[1] * p32[1] + d[2] * p32[2])
    keep = s < np.float32(math.sin(min(reach_rad, math.pi / 2)))
    return rows[keep] * n + cols[keep], s[keep]


def up_component_rows(camera: CameraSpec, r0: int, r1: int) -> np.ndarray:
    """ENU z (sine of altitude) of the pixel centres of rows r0..r1, (r1-r0, W) float32 (cheap: one component)."""
    n = camera.size_px
    half = n / 2.0
    u = ((np.arange(n, dtype=np.float64) + 0.5 - half) / half).astype(np.float32)
    m = camera_basis(camera).astype(np.float32)
    hf = np.float32(half_field_rad(camera))
    y = u[r0:r1, None]
    r = np.sqrt(u[None, :] ** 2 + y ** 2)
    theta = r * hf
    s = np.sin(theta)
    s /= r
    return (m[0, 2] * u[None, :]) * s + (m[1, 2] * y) * s + m[2, 2] * np.cos(theta)


def radius_rows(size_px: int, r0: int, r1: int) -> np.ndarray:
    """Distance of pixel centres of rows r0..r1 from the frame centre, in circle radii, (r1-r0, W) float32."""
    half = size_px / 2.0
    u = ((np.arange(size_px, dtype=np.float64) + 0.5 - half) / half).astype(np.float32)
    return np.sqrt(u[None, :] ** 2 + u[r0:r1, None] ** 2)


@functools.lru_cache(maxsize=2)
def circle_alpha(size_px: int) -> np.ndarray:
    """Coverage of each pixel by the image circle, (H, W) float32: 1 inside, 0 outside, AA rim."""
    half = np.float32(size_px / 2.0)
    a = np.empty((size_px, size_px), dtype=np.float32)
    for r0 in range(0, size_px, _CHUNK_ROWS):
        r1 = min(size_px, r0 + _CHUNK_ROWS)
        blk = a[r0:r1]
        np.subtract(np.float32(1.0), radius_rows(size_px, r0, r1), out=blk)
        blk *= half
        blk += np.float32(0.5)
        np.clip(blk, 0.0, 1.0, out=blk)
    a.flags.writeable = False
    return a


@functools.lru_cache(maxsize=2)
def circle_row_extent(size_px: int) -> tuple[np.ndarray, np.ndarray]:
    """Per row, the columns [lo, hi) outside which the image-circle coverage is 0 (int64 arrays)."""
    alpha = circle_alpha(size_px)
    some = alpha > 0.0
    any_ = some.any(axis=1)
    lo = np.where(any_, np.argmax(some, axis=1), size_px // 2).astype(np.int64)
    hi = np.where(any_, size_px - np.argmax(some[:, ::-1], axis=1), size_px // 2).astype(np.int64)
    lo.flags.writeable = hi.flags.writeable = False
    return lo, hi


@functools.lru_cache(maxsize=2)
def rim_spans(size_px: int, band_rows: int = 64) -> tuple:
    """Where the image-circle coverage is not 1, per band of rows: (r0, r1, z0, a, b, z1) with
    every row of the band fully inside the circle over columns a..b and fully outside it
    (coverage 0) before z0 and from z1 on."""
    alpha = circle_alpha(size_px)
    lo, hi = circle_row_extent(size_px)
    spans = []
    for r0 in range(0, size_px, band_rows):
        r1 = min(size_px, r0 + band_rows)
        full = np.flatnonzero(np.all(alpha[r0:r1] == 1.0, axis=0))
        mid = size_px // 2
        a, b = (int(full[0]), int(full[-1]) + 1) if full.size else (mid, mid)
        if full.size and full.size != b - a:   # a circle's rows are convex: never taken
            a = b = mid
        z0, z1 = int(lo[r0:r1].min()), int(hi[r0:r1].max())
        spans.append((r0, r1, min(z0, a), a, b, max(z1, b)))
    return tuple(spans)


def premultiply_circle(rgb: np.ndarray) -> None:
    """rgb (3, n, n) *= circle_alpha(n), in place: zeros outside the circle, a product on its rim,
    nothing where the coverage is 1."""
    n = rgb.shape[-1]
    alpha = circle_alpha(n)
    for r0, r1, z0, a, b, z1 in rim_spans(n):
        rgb[:, r0:r1, :z0] = 0.0
        rgb[:, r0:r1, z1:] = 0.0
        for lo, hi in ((z0, a), (b, z1)):
            if hi > lo:
                rgb[:, r0:r1, lo:hi] *= alpha[None, r0:r1, lo:hi]


def pixel_solid_angle(camera: CameraSpec, theta_rad) -> np.ndarray:
    """Solid angle of one pixel at angle theta from the axis, sr: dtheta^2 sin(theta)/theta."""
    d = rad_per_px(camera)
    return d * d * np.sinc(np.asarray(theta_rad, dtype=float) / np.pi)


def local_basis(center_enu) -> tuple[np.ndarray, np.ndarray]:
    """Two unit vectors (east-like, north-like) perpendicular to ``center_enu`` (3,)."""
    c = np.asarray(center_enu, dtype=float)
    c = c / np.linalg.norm(c)
    ref = np.array([0.0, 0.0, 1.0]) if abs(c[2]) < 0.999 else np.array([0.0, 1.0, 0.0])
    e1 = np.cross(ref, c)
    e1 /= np.linalg.norm(e1)
    e2 = np.cross(c, e1)
    return e1, e2


def memory_estimate_bytes(camera: CameraSpec) -> int:
    """Rough peak memory of rendering and writing one frame with this camera."""
    n2 = camera.size_px ** 2
    # direction grid 12, RGBA float32 16, display copy 12, 8/16-bit output 8, temporaries ~12
    return n2 * 60
