"""The resume manifest: one JSON line per finished frame, in the output folder.

Each record holds the frame number, its file (relative to the output root),
the hash of everything that determines the frame (``params``), and the
SHA-256 and size of the bytes written.  Only the coordinating process
appends, one ``write()`` per line with O_APPEND, flushed and synced, so a
run killed at any instant leaves at most one torn last line (ignored on
reading).  The last record of a frame wins.
"""

from __future__ import annotations

import hashlib
import json
import os
import time
from dataclasses import asdict, dataclass, fields, is_dataclass
from datetime import datetime
from pathlib import Path

import domegen
from domegen.cache import atomic_write_bytes

MANIFEST_NAME = ".domegen-manifest.jsonl"


@dataclass(frozen=True)
class FrameRecord:
    frame: int
    file: str
    params: str
    sha256: str
    bytes: int


def _plain(obj):
    if is_dataclass(obj):
        return {f.name: _plain(getattr(obj, f.name)) for f in fields(obj)}
    if isinstance(obj, dict):
        return {str(k): _plain(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [_plain(v) for v in obj]
    if isinstance(obj, datetime):
        return obj.isoformat()
    if isinstance(obj, float):
        return repr(obj)  # exact, so equal specs hash equal and different ones differ
    return obj


def params_hash(spec, *, fmt: str, bit_depth: int, file: str, producer: str) -> str:
    """SHA-256 over everything that decides a frame's bytes: spec, encoding, file name, code version."""
    blob = json.dumps({"spec": _plain(spec), "format": fmt, "bit_depth": bit_depth, "file": file,
                       "producer": producer, "version": domegen.__version__},
                      sort_keys=True, separators=(",", ":"))
    return hashlib.sha256(blob.encode()).hexdigest()


def file_sha256(path: Path) -> str | None:
    h = hashlib.sha256()
    try:
        with open(path, "rb") as f:
            for block in iter(lambda: f.read(1 << 20), b""):
                h.update(block)
    except OSError:
        return None
    return h.hexdigest()


#: Longest a manifest line waits in the page cache before an fsync, seconds.
SYNC_EVERY_S = 10.0


class Manifest:
    """Records of finished frames for one output folder."""

    def __init__(self, root: Path):
        self.root = Path(root)
        self.path = self.root / MANIFEST_NAME
        self.records: dict[int, FrameRecord] = {}
        self.lines = 0
        self._fd = None
        self._synced_at = 0.0

    def load(self) -> "Manifest":
        try:
            text = self.path.read_text(encoding="utf-8", errors="replace")
        except FileNotFoundError:
            return self
        for line in text.splitlines():
            try:
                d = json.loads(line)
                rec = FrameRecord(int(d["frame"]), str(d["file"]), str(d["params"]), str(d["sha256"]),
                                  int(d["bytes"]))
            except (ValueError, KeyError, TypeError):
                continue  # a torn line from a killed run, or junk
            self.records[rec.frame] = rec
            self.lines += 1
        return self

    def is_complete(self, frame: int, params: str, file: str, *, verify: bool = True) -> bool:
        """True when the frame's record matches ``params`` and its file is there, intact."""
        rec = self.records.get(frame)
        if rec is None or rec.params != params or rec.file != file:
            return False
        p = self.root / file
        try:
            if p.stat().st_size != rec.bytes:
                return False
        except OSError:
            return False
        return not verify or file_sha256(p) == rec.sha256

    def append(self, rec: FrameRecord) -> None:
        """Record a finished frame: one unbuffered line, on disk at most SYNC_EVERY_S later.

        The line reaches the kernel at once (a killed process loses nothing);
        the fsync that guards against a power cut is batched, since a record
        lost that way only means its frame is rendered again.
        """
        if self._fd is None:
            self.root.mkdir(parents=True, exist_ok=True)
            self._fd = os.open(self.path, os.O_WRONLY | os.O_APPEND | os.O_CREAT, 0o644)
        line = json.dumps(asdict(rec), separators=(",", ":")) + "\n"
        os.write(self._fd, line.encode())
        now = time.monotonic()
        if now - self._synced_at >= SYNC_EVERY_S:
            os.fsync(self._fd)
            self._synced_at = now
        self.records[rec.frame] = rec
        self.lines += 1

    def close(self) -> None:
        if self._fd is not None:
            os.fsync(self._fd)
            os.close(self._fd)
            self._fd = None

    def compact(self) -> None:
        """Rewrite with one line per frame (atomically), when duplicates have piled up."""
        self.close()
        if self.lines <= len(self.records):
            return
        fresh = Manifest(self.root).load()  # keep what other jobs appended meanwhile
        self.records = {**self.records, **{k: v for k, v in fresh.records.items() if k not in self.records}}
        body = "".join(json.dumps(asdict(r), separators=(",", ":")) + "\n"
                       for _, r in sorted(self.records.items()))
        atomic_write_bytes(self.path, body.encode())
        self.lines = len(self.records)
