"""Shared timing helper for the benchmark scripts."""

from __future__ import annotations

import time


def timed(fn):
    """Run ``fn()``; return (result, CPU seconds, wall seconds)."""
    c0, w0 = time.process_time(), time.perf_counter()
    out = fn()
    return out, time.process_time() - c0, time.perf_counter() - w0
