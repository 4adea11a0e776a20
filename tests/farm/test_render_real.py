"""End to end with the real renderer: frames, manifest, determinism across workers and Dask."""

from __future__ import annotations

import json

import numpy as np
from PIL import Image

from domegen.cli.main import main
from domegen.farm.manifest import MANIFEST_NAME
from domegen.farm.runner import render_scene
from domegen.scene import load_scene

from tests.farm.conftest import hashes, write_scene


def _mean_rgb(path) -> float:
    with Image.open(path) as im:
        return float(np.asarray(im)[..., :3].mean())


def test_cli_renders_every_frame_and_records_it(tmp_path, capsys):
    scene = write_scene(tmp_path)
    assert main(["render", str(scene), "--workers", "1"]) == 0
    out = tmp_path / "out"
    files = sorted(out.glob("f_*.png"))
    assert [p.name for p in files] == [f"f_{n:03d}.png" for n in range(8)]
    for p in files:
        with Image.open(p) as im:
            assert im.size == (64, 64) and im.mode == "RGBA"
            a = np.asarray(im)
        assert a[32, 32, 3] == 255 and a[0, 0, 3] == 0  # inside / outside the image circle
    recs = [json.loads(line) for line in (out / MANIFEST_NAME).read_text().splitlines()]
    assert sorted(r["frame"] for r in recs) == list(range(8))
    h = hashes(out)
    assert all(h[r["file"]] == r["sha256"] for r in recs)
    # at a fixed exposure, daylight (frame 0, 17:30 UTC) is brighter than night (frame 7, ~22:30 UTC)
    first, last = (_mean_rgb(files[0]), _mean_rgb(files[-1]))
    assert first > last
    capsys.readouterr()
    assert main(["render", str(scene), "--workers", "1"]) == 0
    assert "0 frames rendered, 8 already complete" in capsys.readouterr().err


def test_one_and_two_workers_and_dask_give_identical_bytes(tmp_path):
    from distributed import LocalCluster

    scene = load_scene(write_scene(tmp_path))
    r1 = render_scene(scene, workers=1, out=tmp_path / "w1")
    r2 = render_scene(scene, workers=2, out=tmp_path / "w2")
    assert r1.rendered == r2.rendered == 8 and r2.workers == 2
    h1, h2 = hashes(tmp_path / "w1"), hashes(tmp_path / "w2")
    assert len(h1) == 8 and h1 == h2
    # a real TCP scheduler on the loopback interface, reached by address as `--scheduler` does
    with LocalCluster(n_workers=1, threads_per_worker=2, processes=False, protocol="tcp", host="127.0.0.1",
                      scheduler_port=0, dashboard_address=None) as cluster:
        assert cluster.scheduler_address.startswith("tcp://127.0.0.1:")
        rd = render_scene(scene, scheduler=cluster.scheduler_address, out=tmp_path / "dask")
    assert rd.rendered == 8
    assert hashes(tmp_path / "dask") == h1


def test_scale_makes_drafts(tmp_path):
    scene = load_scene(write_scene(tmp_path, size=256))
    render_scene(scene, workers=1, frames="0-1", scale=0.25, out=tmp_path / "draft")
    with Image.open(tmp_path / "draft" / "f_000.png") as im:
        assert im.size == (64, 64)
    assert not (tmp_path / "draft" / "f_002.png").exists()


def test_the_demo_example_scene_renders_small(tmp_path, capsys):
    """The README's main job, at 1/8 size and the first and last frames only."""
    from pathlib import Path

    demo = Path(__file__).resolve().parents[2] / "scenes" / "demo.yaml"
    out = tmp_path / "demo"
    assert main(["render", str(demo), "--scale", "0.125", "--frames", "0-1,29", "--out", str(out),
                 "--workers", "1"]) == 0
    assert sorted(p.name for p in out.glob("demo_*.png")) == ["demo_0000.png", "demo_0001.png", "demo_0029.png"]
    with Image.open(out / "demo_0000.png") as im:
        assert im.size == (64, 64)
    # sunset (frame 0) under automatic exposure still shows a sky: not a black frame
    assert _mean_rgb(out / "demo_0000.png") > 10
    assert "3 frames rendered" in capsys.readouterr().err
