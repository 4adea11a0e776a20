"""Contact sheets: one PNG of labelled dome thumbnails, and a watch loop that keeps it fresh.

A sheet holds the first frame of every shot plus every Nth frame.  Each
thumbnail is keyed by the parameters hash of its (downsized) frame spec, so
a :class:`ThumbnailCache` re-renders only thumbnails whose inputs changed.
"""

from __future__ import annotations

import io
import math
import sys
import time
from dataclasses import replace
from pathlib import Path

import numpy as np

from domegen.cache import atomic_write_bytes
from domegen.errors import DomegenError, InputError
from domegen.farm.manifest import params_hash
from domegen.farm.preview import frame_label, thumbnail

LABEL_H = 30


def sheet_frames(scene, every: int | None) -> list[int]:
    """First frame of each shot, plus 0, N, 2N... when ``every`` is given."""
    picks = {s.first_frame for s in scene.shots}
    if every:
        if every < 1:
            raise InputError("--every must be 1 or more", field="--every", value=every)
        picks.update(range(0, scene.frame_count, every))
    return sorted(picks)


class ThumbnailCache:
    """Thumbnails by the hash of everything that decides them; counts what it had to render."""

    def __init__(self):
        self.images: dict = {}
        self.rendered = 0

    def get(self, scene, n: int, size_px: int) -> np.ndarray:
        spec = scene.frame_spec(n)
        key = params_hash(replace(spec, camera=replace(spec.camera, size_px=size_px)), fmt="thumb",
                          bit_depth=8, file="", producer="sheet")
        img = self.images.get(key)
        if img is None:
            img = thumbnail(scene, n, size_px)
            self.images[key] = img
            self.rendered += 1
        return img


def contact_sheet(scene, *, every: int | None = None, size_px: int = 256, cache: ThumbnailCache | None = None,
                  columns: int | None = None) -> bytes:
    """The sheet as PNG bytes: a grid of thumbnails, each labelled frame, show time, local sky time."""
    from PIL import Image, ImageDraw, ImageFont

    cache = cache or ThumbnailCache()
    frames = sheet_frames(scene, every)
    cols = columns or min(len(frames), max(1, math.ceil(math.sqrt(len(frames) * 1.5))))
    rows = math.ceil(len(frames) / cols)
    cell_w, cell_h = size_px + 8, size_px + LABEL_H + 8
    sheet = Image.new("RGB", (cols * cell_w, rows * cell_h + 24), (24, 24, 28))
    draw = ImageDraw.Draw(sheet)
    font = ImageFont.load_default(size=11)
    title = f"{scene.title or scene.path.name}  -  {scene.frame_count} frames, {scene.output.fps:g} fps"
    draw.text((6, 5), title, fill=(235, 235, 235), font=font)
    shot_starts = {s.first_frame: s.name for s in scene.shots}
    for i, n in enumerate(frames):
        x, y = (i % cols) * cell_w + 4, (i // cols) * cell_h + 24 + 4
        sheet.paste(Image.fromarray(cache.get(scene, n, size_px)), (x, y))
        line1, line2 = frame_label(scene, n)
        if n in shot_starts:
            line1 += f"  [{shot_starts[n]}]"
        draw.text((x, y + size_px + 2), line1, fill=(255, 230, 150), font=font)
        draw.text((x, y + size_px + 15), line2, fill=(200, 200, 210), font=font)
    buf = io.BytesIO()
    sheet.save(buf, format="PNG")
    return buf.getvalue()


def write_sheet(scene, path: Path, **kw) -> Path:
    atomic_write_bytes(Path(path), contact_sheet(scene, **kw))
    return Path(path)


def _stamp(files) -> tuple:
    out = []
    for f in files:
        try:
            st = Path(f).stat()
            out.append((str(f), st.st_mtime_ns, st.st_size))
        except OSError:
            out.append((str(f), None, None))
    return tuple(out)


def watch(path, *, out=None, every: int | None = None, size_px: int = 256, poll_s: float = 0.5,
          stream=None, max_cycles: int | None = None) -> None:
    """Re-check ``path`` whenever it or a file it includes changes; write a fresh sheet after each good save.

    Errors are printed (one located line) and the loop goes on.  Runs until
    interrupted, or for ``max_cycles`` reloads.
    """
    from domegen.scene import load_scene

    stream = stream or sys.stderr
    cache = ThumbnailCache()
    files = [Path(path)]
    last = None
    cycles = 0
    while max_cycles is None or cycles < max_cycles:
        stamp = _stamp(files)
        if stamp != last:
            last = stamp
            cycles += 1
            t0 = time.perf_counter()
            try:
                scene = load_scene(path)
                files = sorted({Path(path), *scene.files})
                last = _stamp(files)
                target = Path(out) if out else scene.output.root / "contact-sheet.png"
                before = cache.rendered
                write_sheet(scene, target, every=every, size_px=size_px, cache=cache)
                n = len(sheet_frames(scene, every))
                print(f"watch: sheet updated {target} ({cache.rendered - before} of {n} thumbnails rendered, "
                      f"{time.perf_counter() - t0:.1f} s)", file=stream, flush=True)
            except DomegenError as err:
                print(f"watch: error: {err}", file=stream, flush=True)
        time.sleep(poll_s)
