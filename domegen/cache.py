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


def atomic_write_bytes(path: Path, data: bytes, *, durable: bool = True) -> None:
    """Write ``data`` under a temporary name in the same folder, then rename.

    The rename alone already means no reader (and no killed process) ever
    leaves a half file.  ``durable`` also waits for the disk (fsync) before
    the rename, so the bytes survive a power cut too; callers that verify
    what they find later (frame files, checked against the manifest's hash
    on every resume) can skip that wait.
    """
    path = Path(path)
    tmp = path.with_name(f".{path.name}.{os.getpid()}.tmp")
    with open(tmp, "wb") as f:
        f.write(data)
        if durable:
            f.flush()
            os.fsync(f.fileno())
    os.replace(tmp, path)


def drop_cached(path: Path) -> None:
    """Start writing ``path`` back to disk and drop its clean pages from the page cache.

    For write-once output (frame files): dirty pages get their writeback
    started, pages already on disk are freed, so a long render streams
    through a small, reused set of cache pages instead of filling memory
    with frames nobody reads.  Does nothing where the kernel has no
    ``posix_fadvise`` or the file is gone.
    """
    if not hasattr(os, "posix_fadvise"):
        return
    try:
        fd = os.open(path, os.O_RDONLY)
    except OSError:
        return
    try:
        os.posix_fadvise(fd, 0, 0, os.POSIX_FADV_DONTNEED)
    except OSError:
        pass
    finally:
        os.close(fd)
