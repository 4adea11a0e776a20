"""`domegen preview`: an MP4 of the right size and length, labels burnt in."""

from __future__ import annotations

import re
import subprocess

import numpy as np
import pytest

from domegen.cli.main import main
from domegen.farm.preview import burn_in

from tests.farm.conftest import write_scene


def test_preview_writes_a_readable_mp4(tmp_path, capsys):
    import imageio_ffmpeg

    scene = write_scene(tmp_path)  # 8 frames at 4 fps
    out = tmp_path / "p.mp4"
    assert main(["preview", str(scene), "-o", str(out), "--size", "64", "--every", "2"]) == 0
    decoded = subprocess.run([imageio_ffmpeg.get_ffmpeg_exe(), "-loglevel", "error", "-i", str(out),
                              "-f", "rawvideo", "-pix_fmt", "rgb24", "-"], capture_output=True, check=True).stdout
    assert len(decoded) == 4 * 64 * 64 * 3          # 8 frames, every 2nd: 4 pictures of 64 x 64
    # ffmpeg's own report of the container duration (subprocess.run closes its pipes; imageio-ffmpeg's
    # count_frames_and_secs left them to the garbage collector, a ResourceWarning under -W error).
    probe = subprocess.run([imageio_ffmpeg.get_ffmpeg_exe(), "-hide_banner", "-i", str(out)],
                           capture_output=True, text=True).stderr
    match = re.search(r"Duration: (\d+):(\d+):([\d.]+)", probe)
    assert match, probe
    seconds = int(match[1]) * 3600 + int(match[2]) * 60 + float(match[3])
    assert seconds == pytest.approx(2.0, abs=0.05)  # 4 pictures over the show's 2 s
    assert main(["preview", str(scene), "--size", "50"]) == 2
    assert "multiple of 16" in capsys.readouterr().err


def test_burn_in_draws_text_on_a_band():
    img = np.zeros((64, 64, 3), np.uint8)
    out = burn_in(img, ("#12  0:00:03:00", "2026-03-20 20:00:00+01:00"))
    assert out[:24].max() > 100 and out[40:].max() == 0
