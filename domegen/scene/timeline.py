"""Shots, easing curves and keyframe tracks: show time -> sky time, camera, layers.

Everything here is plain data fixed when the scene is loaded, so the state
at any frame is a pure function of the scene and the frame number.
"""

from __future__ import annotations

import bisect
import math
from dataclasses import dataclass, field

import numpy as np


def ease(name: str, u: float) -> float:
    """Map a fraction ``u`` in 0..1 through the easing curve ``name``."""
    u = min(max(u, 0.0), 1.0)
    if name == "linear":
        return u
    if name == "ease_in":
        return u * u
    if name == "ease_out":
        return 1.0 - (1.0 - u) ** 2
    if name == "ease_in_out":
        return 3.0 * u * u - 2.0 * u ** 3  # smoothstep
    if name == "smooth":
        return u ** 3 * (u * (6.0 * u - 15.0) + 10.0)  # smootherstep: zero 2nd derivative at the ends
    if name == "hold":
        return 0.0 if u < 1.0 else 1.0
    raise ValueError(f"unknown easing {name!r}")


@dataclass(frozen=True)
class Key:
    """One keyframe of a single channel: show time in the shot (s), value, easing to the next key."""

    t_s: float
    value: object
    easing: str = "linear"


@dataclass(frozen=True)
class Track:
    """Keys of one channel, sorted by time; ``value_at`` interpolates between neighbours."""

    keys: tuple

    def bracket(self, t_s: float):
        """(key_before, key_after, eased fraction) around ``t_s``."""
        times = [k.t_s for k in self.keys]
        i = bisect.bisect_right(times, t_s)
        if i == 0:
            return self.keys[0], self.keys[0], 0.0
        if i >= len(self.keys):
            return self.keys[-1], self.keys[-1], 0.0
        a, b = self.keys[i - 1], self.keys[i]
        span = b.t_s - a.t_s
        u = (t_s - a.t_s) / span if span > 0 else 1.0
        return a, b, ease(a.easing, u)

    def value_at(self, t_s: float):
        a, b, w = self.bracket(t_s)
        va, vb = a.value, b.value
        if _is_number(va) and _is_number(vb):
            return float(va) + (float(vb) - float(va)) * w
        return vb if w >= 1.0 else va


def _is_number(v) -> bool:
    return isinstance(v, (int, float)) and not isinstance(v, bool)


@dataclass(frozen=True)
class Shot:
    """A shot fixed at load time. Sky instants are POSIX UTC seconds."""

    index: int
    name: str
    duration_s: float
    first_frame: int
    frame_count: int
    sky_start_s: float
    sky_end_s: float
    sky_easing: str
    camera: dict = field(default_factory=dict)   # channel -> Track
    layers: dict = field(default_factory=dict)   # scene layer key -> Track

    def sky_utc_s(self, t_s: float) -> float:
        """Sky instant (POSIX UTC seconds) at show time ``t_s`` inside the shot."""
        u = ease(self.sky_easing, t_s / self.duration_s) if self.duration_s > 0 else 0.0
        return self.sky_start_s + (self.sky_end_s - self.sky_start_s) * u


def slerp_deg(a: tuple, b: tuple, w: float) -> tuple:
    """Move from direction ``a`` to ``b`` (each (az_deg, alt_deg)) along a great circle; fraction ``w``."""
    va, vb = _unit(*a), _unit(*b)
    dot = float(np.clip(np.dot(va, vb), -1.0, 1.0))
    omega = math.acos(dot)
    if omega < 1e-9:
        v = va
    else:
        s = math.sin(omega)
        v = (math.sin((1 - w) * omega) / s) * va + (math.sin(w * omega) / s) * vb
    v = v / np.linalg.norm(v)
    alt = math.degrees(math.asin(float(np.clip(v[2], -1.0, 1.0))))
    az = math.degrees(math.atan2(float(v[0]), float(v[1]))) % 360.0
    if abs(alt) > 89.9999:
        az = a[0] if w < 0.5 else b[0]
    return az, alt


def _unit(az_deg: float, alt_deg: float) -> np.ndarray:
    az, alt = math.radians(az_deg), math.radians(alt_deg)
    return np.array([math.cos(alt) * math.sin(az), math.cos(alt) * math.cos(az), math.sin(alt)])
