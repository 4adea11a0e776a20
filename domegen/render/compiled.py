"""Which form of the full-frame passes runs: compiled (numba, render/kernels.py) or numpy.

Both give the same bits (tests compare them over every float class), so the
choice never changes a frame.  The compiled passes are 2-3x faster
(benchmarks/bench_render.py) but a process pays ~0.6-0.8 s once to start
numba, more than a small frame's whole saving: previews, drafts, thumbnails
and stills below COMPILED_MIN_PIXELS stay in numpy and never import numba.
"""

from __future__ import annotations

#: Frames of at least this many pixels use the compiled passes (2K and up: a sequence's frames save
#: 15 ms each at 2K, 60-80 ms at 4K, against the one-off start).
COMPILED_MIN_PIXELS = 2048 * 2048


def use_compiled(n_pixels: int) -> bool:
    """True if a frame of ``n_pixels`` should run the compiled passes."""
    return n_pixels >= COMPILED_MIN_PIXELS
