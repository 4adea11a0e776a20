"""What every layer of one frame shares: buffers, geometry, light, positions."""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass, field

import numpy as np

from domegen.render import camera as cam
from domegen.render.sky_model import SkyLight
from domegen.render.spec import FrameSpec


@dataclass
class RenderContext:
    """Layers read geometry from here and add or composite into ``rgb`` (3, H, W) float32 cd/m^2."""

    spec: FrameSpec
    rgb: np.ndarray
    bodies: object
    stars: object
    sky_model: object
    light: SkyLight
    sky_coarse: np.ndarray | None = None
    #: Eclipse hook modules active for this frame (see frame.eclipse_modules).
    eclipse_modules: list = field(default_factory=list)
    #: (H, W) float32 coverage of overlays and labels, accumulated only when a caller asks (overlay pass).
    overlay_alpha: np.ndarray | None = None
    exposure_ev: float = 0.0
    info: dict = field(default_factory=dict)

    @property
    def camera(self):
        return self.spec.camera

    @property
    def layers(self):
        return self.spec.layers

    @property
    def size(self) -> int:
        return self.spec.camera.size_px

    @functools.cached_property
    def grid(self) -> np.ndarray:
        """(H, W, 3) float32 ENU direction of every pixel (cached per camera)."""
        return cam.direction_grid(self.spec.camera)

    @property
    def rad_per_px(self) -> float:
        return cam.rad_per_px(self.spec.camera)

    @property
    def deg_per_px(self) -> float:
        return math.degrees(cam.rad_per_px(self.spec.camera))

    def project(self, enu):
        """ENU (3, ...) -> (x_px, y_px, theta_rad)."""
        return cam.project(self.spec.camera, enu)

    def omega(self, theta_rad):
        """Pixel solid angle (sr) at angle theta from the axis."""
        return cam.pixel_solid_angle(self.spec.camera, theta_rad)

    def in_circle(self, theta_rad, margin_rad: float = 0.0):
        return np.asarray(theta_rad) <= cam.half_field_rad(self.spec.camera) + margin_rad

    def display_to_linear(self, value) -> float:
        """Linear radiance that displays as display-linear ``value`` at this frame's exposure."""
        from domegen.render.tonemap import exposure_scale

        return float(value) / exposure_scale(self.exposure_ev)

    def box(self, center_enu, radius_deg: float, pad_px: int = 2):
        """Pixel window (y0, y1, x0, x1) holding a disk of angular radius ``radius_deg``, or None."""
        c = np.asarray(center_enu, dtype=float).reshape(3)
        x, y, theta = cam.project(self.spec.camera, c)
        x, y, theta = float(x), float(y), float(theta)
        r = math.radians(radius_deg)
        hf = cam.half_field_rad(self.spec.camera)
        if theta - r > hf * math.sqrt(2.0) + 1e-9:
            return None
        stretch = theta / math.sin(theta) if 1e-6 < theta < math.pi * 0.98 else (1.0 if theta <= 1e-6 else 50.0)
        half = r / self.rad_per_px * max(1.0, stretch) + pad_px
        n = self.size
        x0, x1 = max(0, int(math.floor(x - half))), min(n, int(math.ceil(x + half)) + 1)
        y0, y1 = max(0, int(math.floor(y - half))), min(n, int(math.ceil(y + half)) + 1)
        if x0 >= x1 or y0 >= y1:
            return None
        return y0, y1, x0, x1

    def sky_window(self, box) -> np.ndarray:
        """(h, w, 3) sky radiance already in the buffer over a pixel window (zeros without sky)."""
        from domegen.render.frame import sky_window

        y0, y1, x0, x1 = box
        if self.sky_coarse is None:
            return np.zeros((y1 - y0, x1 - x0, 3), dtype=np.float32)
        return sky_window(self.sky_coarse, self.size, box)

    def window_dirs(self, box) -> np.ndarray:
        """(h, w, 3) float64 directions of a pixel window (computed exactly, no full grid needed)."""
        y0, y1, x0, x1 = box
        xx, yy = np.meshgrid(np.arange(x0, x1) + 0.5, np.arange(y0, y1) + 0.5)
        return np.moveaxis(cam.unproject(self.spec.camera, xx, yy), 0, -1)

    def window_theta(self, box) -> np.ndarray:
        """(h, w) angle from the camera axis of the window's pixels, radians."""
        axis = cam.camera_basis(self.spec.camera)[2]
        d = self.window_dirs(box)
        return np.arccos(np.clip(d @ axis, -1.0, 1.0))
