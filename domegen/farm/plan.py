"""Before rendering: which frames, where they go, whether they are safe and fit on the disk."""

from __future__ import annotations

import re
import shutil
from dataclasses import replace
from pathlib import Path

from domegen.errors import InputError, OutOfRangeError, SceneError
from domegen.farm.manifest import Manifest, params_hash
from domegen.farm.worker import DEFAULT_PRODUCER, FrameJob

#: Typical size of an encoded frame relative to its raw samples (dark dome masters compress well).
_RATIO = {"png": 0.25, "jpeg": 0.08, "exr": 1.0}
#: Space left free on the disk after the estimate, bytes.
DISK_MARGIN_BYTES = 64 * 2**20


def parse_frames(text: str | None, count: int) -> list[int]:
    """Frame numbers from ``"A-B"`` (inclusive), ``"A"``, or comma lists of those; all if None."""
    if text is None:
        return list(range(count))
    out: set[int] = set()
    for part in str(text).split(","):
        m = re.fullmatch(r"\s*(\d+)\s*(?:-\s*(\d+)\s*)?", part)
        if not m:
            raise InputError(f"cannot read the frame range {part.strip()!r}", field="--frames", value=text,
                             hint="write e.g. 0-99, 120 or 0-9,20-29")
        a = int(m.group(1))
        b = int(m.group(2)) if m.group(2) is not None else a
        if b < a:
            raise InputError(f"the range {a}-{b} runs backwards", field="--frames", value=text)
        if b >= count:
            raise OutOfRangeError(f"frame {b} is past the last frame {count - 1}", field="--frames",
                                  value=text, hint=f"the scene has frames 0-{count - 1}")
        out.update(range(a, b + 1))
    return sorted(out)


def scaled_size(size_px: int, scale: float) -> int:
    if not 0 < scale <= 4:
        raise InputError(f"scale {scale} is outside (0, 4]", field="--scale", value=scale)
    return max(64, int(round(size_px * scale)))


def check_output_root(scene, *, trusted_root: bool, allow_outside: bool) -> None:
    """Refuse a scene whose output folder climbs out of the scene's own folder tree."""
    if trusted_root or allow_outside:
        return
    root = scene.output.root.resolve()
    if not root.is_relative_to(scene.base_dir.resolve()):
        raise SceneError(f"the output folder {root} lies outside the scene's folder {scene.base_dir}",
                         field="output.folder", value=str(root),
                         hint="use a folder below the scene file, pass --out DIR, or "
                              "--allow-outside-output if you really mean it")


def build_jobs(scene, frames: list[int], *, scale: float = 1.0, allow_outside: bool = False,
               producer: str = DEFAULT_PRODUCER) -> list[FrameJob]:
    """One self-contained job per frame (spec at the draft scale, path checked against the root)."""
    out = scene.output
    root = out.root.resolve()
    jobs = []
    size = None
    for n in frames:
        spec = scene.frame_spec(n)
        if scale != 1.0:
            size = size or scaled_size(spec.camera.size_px, scale)
            spec = replace(spec, camera=replace(spec.camera, size_px=size))
        path = out.frame_path(n, allow_outside=allow_outside)
        rel = str(path.relative_to(root)) if path.is_relative_to(root) else str(path)
        jobs.append(FrameJob(n, spec, str(path), rel, out.format, out.bit_depth,
                             params_hash(spec, fmt=out.format, bit_depth=out.bit_depth, file=rel,
                                         producer=producer), producer))
    return jobs


def split_done(jobs: list[FrameJob], manifest: Manifest, *, verify: bool = True):
    """(jobs still to do, number already complete and intact)."""
    todo = [j for j in jobs if not manifest.is_complete(j.frame, j.params, j.file, verify=verify)]
    return todo, len(jobs) - len(todo)


def estimate_bytes(jobs: list[FrameJob], manifest: Manifest) -> int:
    """Bytes the jobs will write: from finished frames' sizes when known, else from pixels."""
    if not jobs:
        return 0
    sizes = [r.bytes for r in manifest.records.values()]
    if sizes:
        per = 1.2 * sum(sizes) / len(sizes)
    else:
        j = jobs[0]
        px = j.spec.camera.size_px ** 2
        channels = 3 if j.fmt == "jpeg" else 4
        depth = 2 if j.fmt == "exr" else j.bit_depth // 8
        per = px * channels * depth * _RATIO[j.fmt]
    return int(per * len(jobs))


def _human(n: float) -> str:
    for unit in ("B", "KB", "MB", "GB", "TB", "PB"):
        if n < 1024 or unit == "PB":
            return f"{n:.1f} {unit}"
        n /= 1024.0
    return f"{n:.1f} PB"  # pragma: no cover


def check_disk(root: Path, need_bytes: int) -> None:
    """Refuse (InputError) when the estimate does not fit the free space under ``root``."""
    probe = Path(root)
    while not probe.exists():
        probe = probe.parent
    free = shutil.disk_usage(probe).free
    if need_bytes + DISK_MARGIN_BYTES > free:
        raise InputError(f"the frames need about {_human(need_bytes)} but only {_human(free)} is free "
                         f"under {probe}", field="output.folder", value=str(root),
                         hint="free some space, render fewer frames (--frames), a smaller --scale, "
                              "or pass --skip-space-check if the estimate is too pessimistic")


__all__ = ["parse_frames", "build_jobs", "split_done", "estimate_bytes", "check_disk", "check_output_root",
           "scaled_size", "_human"]
