"""Text as anti-aliased coverage masks (Pillow's built-in scalable font), composited into the frame."""

from __future__ import annotations

import functools
import math

import numpy as np


@functools.lru_cache(maxsize=16)
def _font(size_px: int):
    from PIL import ImageFont

    return ImageFont.load_default(size=size_px)


@functools.lru_cache(maxsize=512)
def text_mask(text: str, size_px: int, angle_deg: float) -> np.ndarray:
    """(h, w) float32 coverage of ``text`` with cap height ~``size_px``, turned counter-clockwise by angle_deg."""
    from PIL import Image, ImageDraw

    font = _font(max(6, int(round(size_px * 1.35))))
    left, top, right, bottom = font.getbbox(text)
    pad = 2
    img = Image.new("L", (right - left + 2 * pad, bottom - top + 2 * pad), 0)
    ImageDraw.Draw(img).text((pad - left, pad - top), text, fill=255, font=font)
    if abs(angle_deg) > 0.01:
        img = img.rotate(angle_deg, resample=Image.BICUBIC, expand=True)
    return np.asarray(img, dtype=np.float32) / 255.0


def draw_text(planes: np.ndarray, text: str, x_px: float, y_px: float, size_px: int, angle_deg: float,
              rgb_linear, opacity: float, alpha: np.ndarray | None = None) -> None:
    """Composite ``text`` centred at (x_px, y_px) over ``planes`` (3, H, W) in colour ``rgb_linear``.

    ``alpha`` (H, W), if given, accumulates the text's coverage (for an overlay pass).
    """
    mask = text_mask(text, int(size_px), round(float(angle_deg), 1))
    h, w = mask.shape
    _, H, W = planes.shape
    x0, y0 = int(round(x_px - w / 2)), int(round(y_px - h / 2))
    xs0, ys0 = max(0, x0), max(0, y0)
    xs1, ys1 = min(W, x0 + w), min(H, y0 + h)
    if xs0 >= xs1 or ys0 >= ys1:
        return
    m = mask[ys0 - y0:ys1 - y0, xs0 - x0:xs1 - x0] * np.float32(opacity)
    halo = outline(mask)[ys0 - y0:ys1 - y0, xs0 - x0:xs1 - x0] * np.float32(opacity * OUTLINE_OPACITY)
    for k in range(3):   # a dark rim first, so light text reads on a bright sky too
        win = planes[k, ys0:ys1, xs0:xs1]
        win *= 1.0 - halo
    for k in range(3):
        win = planes[k, ys0:ys1, xs0:xs1]
        win *= 1.0 - m
        win += m * np.float32(rgb_linear[k])
    if alpha is not None:
        a = alpha[ys0:ys1, xs0:xs1]
        a += np.maximum(m, halo) * (1.0 - a)


#: Opacity of the dark rim drawn under text (legibility on bright skies).
OUTLINE_OPACITY = 0.55


def outline(mask: np.ndarray) -> np.ndarray:
    """The mask dilated by one pixel (max of the 8 neighbours)."""
    p = np.pad(mask, 1)
    h, w = mask.shape
    out = mask.copy()
    for dy in (0, 1, 2):
        for dx in (0, 1, 2):
            np.maximum(out, p[dy:dy + h, dx:dx + w], out=out)
    return out


def upright_angle(x_px: float, y_px: float, size_px: int) -> float:
    """Rotation (deg, counter-clockwise) that makes text at (x, y) read with its top toward the frame centre."""
    c = size_px / 2.0
    ux, uy = c - x_px, c - y_px
    if math.hypot(ux, uy) < 1e-6:
        return 0.0
    return math.degrees(math.atan2(-ux, -uy))
