"""Contact sheets and the watch loop: a save gives a new sheet; a broken save gives a located error."""

from __future__ import annotations

import io
import os
import subprocess
import sys
import threading
import time
from pathlib import Path

import numpy as np
from PIL import Image

from domegen.cli.main import main
from domegen.farm.sheet import ThumbnailCache, contact_sheet, sheet_frames, watch
from domegen.scene import load_scene

from tests.farm.conftest import write_scene

ROOT = Path(__file__).resolve().parents[2]


def test_sheet_has_each_shot_and_every_nth_frame(tmp_path, capsys):
    scene_path = write_scene(tmp_path)  # shots start at frames 0 and 4; 8 frames
    scene = load_scene(scene_path)
    assert sheet_frames(scene, None) == [0, 4]
    assert sheet_frames(scene, 3) == [0, 3, 4, 6]
    out = tmp_path / "sheet.png"
    assert main(["sheet", str(scene_path), "-o", str(out), "--every", "3", "--size", "64"]) == 0
    with Image.open(out) as im:
        # 4 thumbnails of 64 px (+ margins and labels) in a grid
        assert im.width >= 2 * 64 and im.height >= 2 * 64
        a = np.asarray(im.convert("RGB")).astype(int)
    assert a.std() > 5


def test_only_changed_thumbnails_are_rendered_again(tmp_path):
    scene_path = write_scene(tmp_path)
    cache = ThumbnailCache()
    contact_sheet(load_scene(scene_path), every=2, size_px=64, cache=cache)
    assert cache.rendered == 4                                   # frames 0, 2, 4, 6
    contact_sheet(load_scene(scene_path), every=2, size_px=64, cache=cache)
    assert cache.rendered == 4                                   # nothing changed
    # a new end time for the second shot moves frame 6 only: frame 4 starts where shot 1 ended
    scene_path.write_text(scene_path.read_text().replace("2026-03-20T23:00:00Z", "2026-03-20T23:30:00Z"))
    contact_sheet(load_scene(scene_path), every=2, size_px=64, cache=cache)
    assert cache.rendered == 5


def _wait(predicate, timeout_s=120.0):
    t0 = time.monotonic()
    while time.monotonic() - t0 < timeout_s:
        if predicate():
            return True
        time.sleep(0.05)
    return False


def test_watch_refreshes_the_sheet_and_survives_a_broken_save(tmp_path):
    scene_path = write_scene(tmp_path)
    sheet = tmp_path / "sheet.png"
    log = io.StringIO()
    t = threading.Thread(target=watch, args=(scene_path,),
                         kwargs=dict(out=sheet, size_px=64, poll_s=0.05, stream=log, max_cycles=3), daemon=True)
    t.start()
    assert _wait(lambda: "sheet updated" in log.getvalue()), log.getvalue()
    first = sheet.stat().st_mtime_ns
    text = scene_path.read_text()
    time.sleep(0.02)
    scene_path.write_text(text.replace("duration: 1 s\n    sky: {start: continue",
                                       "duraton: 1 s\n    sky: {start: continue"))
    assert _wait(lambda: "watch: error:" in log.getvalue()), log.getvalue()
    err_line = [x for x in log.getvalue().splitlines() if "error" in x][0]
    assert f"{scene_path}:" in err_line and "did you mean 'duration'?" in err_line
    assert t.is_alive()
    scene_path.write_text(text.replace("front_azimuth: 200", "front_azimuth: 10"))
    assert _wait(lambda: log.getvalue().count("sheet updated") == 2), log.getvalue()
    t.join(timeout=30)
    assert sheet.stat().st_mtime_ns != first


def test_watch_command_runs_as_a_process_and_stops_on_ctrl_c(tmp_path):
    import signal

    scene_path = write_scene(tmp_path)
    sheet = tmp_path / "sheet.png"
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    proc = subprocess.Popen([sys.executable, "-m", "domegen", "watch", str(scene_path), "-o", str(sheet),
                             "--size", "64", "--poll", "0.1"], env=env, stderr=subprocess.PIPE, text=True)
    try:
        assert _wait(sheet.exists, 180)
        proc.send_signal(signal.SIGINT)
        _, err = proc.communicate(timeout=30)
    finally:
        if proc.poll() is None:
            proc.kill()
    assert proc.returncode == 130 and "sheet updated" in err and "Traceback" not in err
