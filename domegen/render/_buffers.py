"""Reusable scratch arrays: first-touch page faults on fresh 100+ MB arrays
cost more than the arithmetic, so big temporaries are kept per shape."""

from __future__ import annotations

import threading

import numpy as np

_LOCAL = threading.local()
_MAX_KEEP = 6


def scratch(name: str, shape: tuple, dtype) -> np.ndarray:
    """An uninitialised array for ``name``, reused while shape and dtype match (per thread)."""
    pool = getattr(_LOCAL, "pool", None)
    if pool is None:
        pool = _LOCAL.pool = {}
    key = (name, tuple(shape), np.dtype(dtype).str)
    arr = pool.get(key)
    if arr is None:
        for k in [k for k in pool if k[0] == name]:
            del pool[k]
        if len(pool) >= _MAX_KEEP:
            pool.pop(next(iter(pool)))
        arr = pool[key] = np.empty(shape, dtype=dtype)
    return arr


def release_all() -> None:
    """Drop every kept scratch array of this thread."""
    _LOCAL.pool = {}
