"""Resume: kill -9 or Ctrl-C mid-run, rerun, and get exactly the bytes of an uninterrupted run."""

from __future__ import annotations

import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

from domegen.farm.manifest import MANIFEST_NAME, Manifest
from domegen.farm.runner import render_scene
from domegen.scene import load_scene

from tests.farm.conftest import hashes, write_scene

ROOT = Path(__file__).resolve().parents[2]
FAKE = "tests.farm.producers:pattern_frame"


def _wait_for_records(manifest: Path, n: int, proc, timeout_s: float = 240.0) -> int:
    t0 = time.monotonic()
    while time.monotonic() - t0 < timeout_s:
        if manifest.exists():
            lines = manifest.read_text().count("\n")
            if lines >= n:
                return lines
        assert proc.poll() is None, "the render finished or failed before it could be interrupted"
        time.sleep(0.02)
    raise AssertionError("no progress in time")


def _env():
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT) + os.pathsep + env.get("PYTHONPATH", "")
    return env


def test_kill_9_then_rerun_gives_the_uninterrupted_bytes(tmp_path):
    scene_path = write_scene(tmp_path, duration="5 s")  # 24 frames with the real renderer
    scene = load_scene(scene_path)
    reference = render_scene(scene, workers=1, out=tmp_path / "reference")
    assert reference.rendered == 24
    proc = subprocess.Popen([sys.executable, "-m", "domegen", "render", str(scene_path), "--workers", "1"],
                            cwd=tmp_path, env=_env(), start_new_session=True,
                            stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    try:
        _wait_for_records(tmp_path / "out" / MANIFEST_NAME, 2, proc)
        os.killpg(proc.pid, signal.SIGKILL)
    finally:
        proc.wait(timeout=60)
    assert proc.returncode == -signal.SIGKILL
    done = Manifest(tmp_path / "out").load()
    assert 2 <= len(done.records) < 24, "the kill did not land mid-render"
    # what a kill can leave behind: a torn manifest line and a stale temporary file
    with open(tmp_path / "out" / MANIFEST_NAME, "a") as f:
        f.write('{"frame": 5, "file": "f_0')
    (tmp_path / "out" / ".f_005.png.999.tmp").write_bytes(b"half a frame")
    again = render_scene(scene, workers=1)
    assert again.skipped == len(done.records) and again.rendered == 24 - len(done.records)
    assert hashes(tmp_path / "out") == hashes(tmp_path / "reference")


def test_ctrl_c_exits_130_and_the_next_run_resumes(tmp_path):
    scene_path = write_scene(tmp_path, duration="5 s")
    code = ("import sys; from domegen.farm.runner import render_scene; from domegen.scene import load_scene\n"
            "if __name__ == '__main__':\n"
            f"    r = render_scene(load_scene({str(scene_path)!r}), workers=2, "
            "producer='tests.farm.producers:slow_pattern_frame')\n"
            "    sys.exit(130 if r.interrupted else 0)\n")
    proc = subprocess.Popen([sys.executable, "-c", code], cwd=tmp_path, env=_env(),
                            stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    try:
        _wait_for_records(tmp_path / "out" / MANIFEST_NAME, 2, proc)
        proc.send_signal(signal.SIGINT)
        _, err = proc.communicate(timeout=60)
    finally:
        if proc.poll() is None:
            proc.kill()
    assert proc.returncode == 130, err
    assert "interrupted" in err and "Traceback" not in err
    first = Manifest(tmp_path / "out").load()
    assert 2 <= len(first.records) < 24
    scene = load_scene(scene_path)
    rest = render_scene(scene, workers=1, producer="tests.farm.producers:slow_pattern_frame")
    assert rest.skipped == len(first.records) and rest.rendered == 24 - len(first.records)
    ref = render_scene(scene, workers=1, producer="tests.farm.producers:slow_pattern_frame",
                       out=tmp_path / "ref")
    assert hashes(tmp_path / "out") == hashes(tmp_path / "ref")
    assert ref.rendered == 24


def test_missing_stale_and_corrupt_frames_are_redone(tmp_path):
    scene_path = write_scene(tmp_path)
    scene = load_scene(scene_path)
    render_scene(scene, workers=1, producer=FAKE)
    out = tmp_path / "out"
    good = hashes(out)
    (out / "f_001.png").unlink()                                   # missing
    data = bytearray((out / "f_002.png").read_bytes())
    data[100] ^= 0xFF
    (out / "f_002.png").write_bytes(bytes(data))                   # corrupt, same size
    r = render_scene(scene, workers=1, producer=FAKE)
    assert sorted(x.frame for x in r.results) == [1, 2]
    assert hashes(out) == good
    # stale: a changed setting changes the parameters of every frame
    scene_path.write_text(scene_path.read_text().replace("front_azimuth: 200", "front_azimuth: 190"))
    r = render_scene(load_scene(scene_path), workers=1, producer=FAKE)
    assert r.rendered == 8 and r.skipped == 0
    recs = [json.loads(x) for x in (out / MANIFEST_NAME).read_text().splitlines()]
    assert len(recs) == 8  # compacted after the run


def test_frame_ranges_as_separate_jobs_fill_one_manifest(tmp_path):
    scene = load_scene(write_scene(tmp_path))
    a = render_scene(scene, frames="0-3", workers=1, producer=FAKE)
    b = render_scene(scene, frames="4-7", workers=1, producer=FAKE)
    assert a.rendered == b.rendered == 4
    full = render_scene(scene, workers=1, producer=FAKE)
    assert full.rendered == 0 and full.skipped == 8


def test_what_a_power_cut_can_leave_is_redone(tmp_path):
    # Frames are not fsynced one by one and manifest lines are synced in
    # batches, so after a power cut a recorded frame may be empty (a renamed
    # file whose data never reached the disk) and the newest records may be
    # missing or torn. The next run must redo exactly those frames.
    scene = load_scene(write_scene(tmp_path))
    render_scene(scene, frames="0-7", workers=1, producer=FAKE)
    out = tmp_path / "out"
    good = hashes(out)
    (out / "f_003.png").write_bytes(b"")
    man = out / MANIFEST_NAME
    lines = man.read_text().splitlines(keepends=True)
    man.write_text("".join(lines[:-2]) + lines[-2][: len(lines[-2]) // 2])  # last record lost, one torn
    r = render_scene(scene, workers=1, producer=FAKE)
    assert sorted(x.frame for x in r.results) == [3, 6, 7]
    assert hashes(out) == good
    assert Manifest(out).load().records.keys() == set(range(8))
