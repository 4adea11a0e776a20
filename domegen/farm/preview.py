"""Low-resolution looks at a scene: labelled thumbnails and a preview MP4.

Thumbnails are real frames rendered small (the scene's camera with a
smaller ``size_px``), tone-mapped as the final frames are, then labelled
with the frame number, show time and local sky time.
"""

from __future__ import annotations

import io
import subprocess
from dataclasses import replace
from pathlib import Path

import numpy as np

from domegen.errors import InputError
from domegen.scene.summary import show_clock
from domegen.sky.times import iso_local


def thumbnail(scene, n: int, size_px: int) -> np.ndarray:
    """Frame ``n`` rendered at ``size_px``, as (size, size, 3) uint8 sRGB over black."""
    from PIL import Image

    from domegen.render.frame import render_frame
    from domegen.render.output import encode_frame

    spec = scene.frame_spec(n)
    spec = replace(spec, camera=replace(spec.camera, size_px=size_px))
    png = encode_frame(render_frame(spec), "png", 8, spec.layers.exposure_ev)
    rgba = np.asarray(Image.open(io.BytesIO(png)).convert("RGBA"), dtype=np.uint16)
    return (rgba[..., :3] * rgba[..., 3:4] // 255).astype(np.uint8)


def frame_label(scene, n: int) -> tuple[str, str]:
    """("#frame  show timecode", "local sky time") for a frame."""
    sky = iso_local(scene.sky_utc(n), scene.site.timezone).replace("T", " ")
    return f"#{n}  {show_clock(scene.show_time_s(n), scene.output.fps)}", sky


def burn_in(rgb: np.ndarray, lines: tuple, *, scale: float = 1.0) -> np.ndarray:
    """Write text lines on a dark band at the top-left of an (H, W, 3) uint8 image."""
    from PIL import Image, ImageDraw, ImageFont

    im = Image.fromarray(rgb)
    draw = ImageDraw.Draw(im)
    size = max(9, int(round(11 * scale)))
    font = ImageFont.load_default(size=size)
    y, placed = 2, []
    for line in lines:
        box = draw.textbbox((3, y), line, font=font)
        placed.append((y, line, box))
        y = box[3] + 3
    for _, _, box in placed:  # all bands first, so no band covers an earlier line's text
        draw.rectangle((box[0] - 2, box[1] - 1, box[2] + 2, box[3] + 1), fill=(0, 0, 0))
    for y, line, _ in placed:
        draw.text((3, y), line, fill=(255, 230, 150), font=font)
    return np.asarray(im)


def write_preview(scene, path: Path, *, size_px: int = 256, every: int = 1, progress=None) -> int:
    """An H.264 MP4 of every ``every``-th frame at ``size_px`` with timecode and sky time; frames written."""
    import imageio_ffmpeg

    if size_px % 16 or not 64 <= size_px <= 2048:
        raise InputError(f"preview size {size_px} must be a multiple of 16 within 64..2048", field="--size",
                         value=size_px)
    if every < 1:
        raise InputError("--every must be 1 or more", field="--every", value=every)
    frames = list(range(0, scene.frame_count, every))
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    tmp = path.with_name(f".{path.stem}.part{path.suffix}")
    cmd = [imageio_ffmpeg.get_ffmpeg_exe(), "-y", "-loglevel", "error", "-f", "rawvideo", "-pix_fmt", "rgb24",
           "-s", f"{size_px}x{size_px}", "-r", f"{scene.output.fps / every:g}", "-i", "-",
           "-c:v", "libx264", "-pix_fmt", "yuv420p", "-movflags", "+faststart", "-f", "mp4", str(tmp)]
    proc = subprocess.Popen(cmd, stdin=subprocess.PIPE, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    try:
        for n in frames:
            img = burn_in(thumbnail(scene, n, size_px), frame_label(scene, n), scale=size_px / 256)
            proc.stdin.write(np.ascontiguousarray(img).tobytes())
            if progress is not None:
                progress.advance()
        proc.stdin.close()
        err = proc.stderr.read().decode(errors="replace")
        if proc.wait() != 0:
            raise InputError(f"ffmpeg could not write {path}: {err.strip()[:200]}", field="--output",
                             value=str(path))
    finally:
        for f in (proc.stdin, proc.stderr):
            if not f.closed:
                f.close()
        if proc.poll() is None:
            proc.kill()
            proc.wait()
    tmp.replace(path)
    return len(frames)
