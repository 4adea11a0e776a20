"""The user cache folder for derived data (star catalogue columns, land mask)."""

from __future__ import annotations

import os
from pathlib import Path


def cache_dir() -> Path:
    """``$DOMEGEN_CACHE_DIR``, else ``$XDG_CACHE_HOME/domegen``, else ``~/.cache/domegen``."""
    env = os.environ.get("DOMEGEN_CACHE_DIR")
    if env:
        p = Path(env)
    else:
        base = os.environ.get("XDG_CACHE_HOME") or os.path.join(os.path.expanduser("~"), ".cache")
        p = Path(base) / "domegen"
    p.mkdir(parents=True, exist_ok=True)
    return p


def atomic_write_bytes(path: Path, data: bytes) -> None:
    """Write ``data`` under a temporary name in the same folder, then rename."""
    path = Path(path)
    tmp = path.with_name(f".{path.name}.{os.getpid()}.tmp")
    with open(tmp, "wb") as f:
        f.write(data)
        f.flush()
        os.fsync(f.fileno())
    os.replace(tmp, path)
