"""Safety before rendering: no writes outside the output root, no render that cannot fit the disk."""

from __future__ import annotations

import io

import pytest

from domegen.cli.main import main
from domegen.errors import InputError, SceneError
from domegen.farm.plan import estimate_bytes, parse_frames
from domegen.farm.progress import Progress
from domegen.farm.runner import render_scene
from domegen.scene import load_scene

from tests.farm.conftest import write_scene

FAKE = "tests.farm.producers:pattern_frame"


def _pattern(path, pattern):
    path.write_text(path.read_text().replace('"f_{frame:03d}.png"', f'"{pattern}"'))


def test_dot_dot_in_the_pattern_is_refused(tmp_path, capsys):
    scene_path = write_scene(tmp_path)
    _pattern(scene_path, "../../escaped_{frame:03d}.png")
    with pytest.raises(SceneError, match="outside the output folder"):
        render_scene(load_scene(scene_path), workers=1, producer=FAKE)
    assert main(["render", str(scene_path)]) == 2
    assert "outside the output folder" in capsys.readouterr().err
    assert not list(tmp_path.parent.parent.glob("escaped_*"))


def test_absolute_pattern_and_folder_outside_the_scene_are_refused(tmp_path):
    (tmp_path / "a").mkdir()
    scene_path = write_scene(tmp_path / "a")
    _pattern(scene_path, str(tmp_path / "abs_{frame:03d}.png"))
    with pytest.raises(SceneError, match="outside the output folder"):
        render_scene(load_scene(scene_path), workers=1, producer=FAKE)
    scene_path = write_scene(tmp_path / "a", out="../elsewhere", name="b.yaml")
    with pytest.raises(SceneError, match="outside the scene's folder"):
        render_scene(load_scene(scene_path), workers=1, producer=FAKE)
    assert not (tmp_path / "elsewhere").exists()


def test_the_command_line_may_allow_it(tmp_path):
    (tmp_path / "a").mkdir()
    scene_path = write_scene(tmp_path / "a", out="../elsewhere")
    r = render_scene(load_scene(scene_path), workers=1, producer=FAKE, allow_outside=True, frames="0")
    assert r.rendered == 1 and (tmp_path / "elsewhere" / "f_000.png").exists()
    r = render_scene(load_scene(scene_path), workers=1, producer=FAKE, out=tmp_path / "chosen", frames="0")
    assert (tmp_path / "chosen" / "f_000.png").exists()


def test_frames_that_cannot_fit_the_disk_are_refused_with_the_estimate(tmp_path, capsys):
    scene_path = write_scene(tmp_path, size=16384, duration="2 h")  # 28,804 frames of 16k x 16k
    with pytest.raises(InputError, match=r"need about [\d.]+ (TB|PB) but only"):
        render_scene(load_scene(scene_path), workers=1, producer=FAKE)
    assert main(["render", str(scene_path)]) == 2
    assert "need about" in capsys.readouterr().err
    assert not list((tmp_path / "out").glob("f_*"))


def test_estimate_uses_pixels_then_measured_sizes(tmp_path):
    from domegen.farm.manifest import FrameRecord, Manifest
    from domegen.farm.plan import build_jobs

    scene = load_scene(write_scene(tmp_path, size=1024))
    jobs = build_jobs(scene, list(range(8)))
    m = Manifest(tmp_path)
    # RGBA 8-bit PNG at 1024 px: 4 MiB raw, a quarter of it assumed after compression
    assert estimate_bytes(jobs, m) == 8 * 1024 * 1024 * 4 // 4
    m.records[0] = FrameRecord(0, "f_000.png", "p", "h", 1000)
    assert estimate_bytes(jobs, m) == int(8 * 1200)


def test_frame_ranges():
    assert parse_frames("0-3,7", 10) == [0, 1, 2, 3, 7]
    assert parse_frames(None, 3) == [0, 1, 2]
    for bad in ("3-1", "a-b", "0-10"):
        with pytest.raises(InputError):
            parse_frames(bad, 10)


def test_progress_lines_and_bar():
    log = io.StringIO()
    p = Progress(3, stream=log, tty=False, every_s=0.0)
    p.start()
    for _ in range(3):
        p.advance()
    p.finish("3 frames rendered")
    lines = log.getvalue().splitlines()
    assert lines[0] == "render: 3 frames to do" and "3/3 frames" in lines[-2] and "frames/min" in lines[-2]
    tty = io.StringIO()
    p = Progress(4, stream=tty, tty=True)
    p.advance()
    assert "\r[#######" in tty.getvalue() and "ETA" in tty.getvalue()


def test_disk_estimate_is_redone_from_real_sizes(tmp_path, monkeypatch):
    """Noise frames do not compress: after 4 frames the measured sizes show the rest cannot fit."""
    import collections

    from domegen.farm import plan

    scene = load_scene(write_scene(tmp_path))
    usage = collections.namedtuple("usage", "total used free")
    # room for the pixel-count guess (8 x 4 KiB) but not for 4 more frames of 16 KiB each
    monkeypatch.setattr(plan.shutil, "disk_usage",
                        lambda p: usage(0, 0, plan.DISK_MARGIN_BYTES + 40_000))
    with pytest.raises(InputError, match="need about"):
        render_scene(scene, workers=1, producer=FAKE)
    assert len(list((tmp_path / "out").glob("f_*.png"))) == 4
