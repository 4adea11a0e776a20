"""A stand-in producer for farm mechanics tests: deterministic bytes from the spec alone.

The real renderer is exercised by test_render_real.py; these tests check the
farm (manifest, resume, workers, Dask) fast, independent of rendering cost.
"""

from __future__ import annotations

import hashlib

import numpy as np

from domegen.render.output import encode_png


def pattern_frame(spec, fmt: str, bit_depth: int) -> bytes:
    """A small PNG whose pixels are seeded by the spec's text."""
    seed = int.from_bytes(hashlib.sha256(repr(spec).encode()).digest()[:8], "little")
    rng = np.random.default_rng(seed)
    n = spec.camera.size_px
    planes = rng.integers(0, 256, size=(4, n, n), dtype=np.uint8)
    return encode_png(planes)


def slow_pattern_frame(spec, fmt: str, bit_depth: int) -> bytes:
    """``pattern_frame`` taking 0.25 s, so a test can interrupt a run midway."""
    import time

    time.sleep(0.25)
    return pattern_frame(spec, fmt, bit_depth)
