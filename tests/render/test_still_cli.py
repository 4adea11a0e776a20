"""`domegen still`, bad input (exit 2), ground and panorama, spec objects."""

from __future__ import annotations

import json
import pickle
from datetime import datetime, timezone

import numpy as np
import pytest
from PIL import Image

from domegen.cli.main import main
from domegen.errors import DomegenError, OutOfRangeError
from domegen.render.frame import check_memory, render_frame
from domegen.render.spec import CameraSpec, FrameSpec, LayerSpec
from domegen.sky.site import Site

NANTES_ARGS = ["--lat", "47.2184", "--lon", "-1.5536", "--elev", "20", "--tz", "Europe/Paris"]


def test_still_json_lists_bodies_with_pixel_positions(tmp_path, capsys):
    out = tmp_path / "dusk.png"
    rc = main(["still", *NANTES_ARGS, "--at", "2026-08-16T19:50:00Z", "--size", "256", "--json", "-o", str(out)])
    assert rc == 0
    data = json.loads(capsys.readouterr().out)
    names = {b["name"] for b in data["bodies"]}
    assert {"Moon", "Venus"} <= names
    for b in data["bodies"]:
        assert set(b) >= {"name", "alt_deg", "az_deg", "x_px", "y_px"}
        assert 0 <= b["x_px"] <= 256 and 0 <= b["y_px"] <= 256
        assert b["alt_deg"] > -1
    moon = next(b for b in data["bodies"] if b["name"] == "Moon")
    # west-south-west Moon: right of centre (front south at the bottom, west on the right seen from below)
    assert moon["x_px"] > 128 and moon["y_px"] > 128
    with Image.open(out) as im:
        assert im.size == (256, 256) and im.mode == "RGBA"


def test_still_is_deterministic(tmp_path):
    args = ["still", *NANTES_ARGS, "--at", "2026-08-12T22:30:00Z", "--size", "128", "--show", "all"]
    assert main(args + ["-o", str(tmp_path / "a.png")]) == 0
    assert main(args + ["-o", str(tmp_path / "b.png")]) == 0
    assert (tmp_path / "a.png").read_bytes() == (tmp_path / "b.png").read_bytes()


@pytest.mark.parametrize("extra", [
    ["--size", "63"], ["--size", "16385"], ["--field", "0.5"], ["--field", "250"], ["--format", "gif"],
    ["--tilt", "120"],
])
def test_bad_input_exits_2_with_one_line(tmp_path, capsys, extra):
    rc = main(["still", *NANTES_ARGS, "--at", "2026-08-12T22:30:00Z", "--size", "128", "-o",
               str(tmp_path / "x.png"), *extra])
    err = capsys.readouterr().err
    assert rc == 2
    assert err.count("\n") == 1 and "Traceback" not in err


def test_wrong_panorama_aspect_exits_2(tmp_path, capsys):
    pano = tmp_path / "pano.png"
    Image.new("RGBA", (300, 200), (20, 30, 20, 255)).save(pano)
    rc = main(["still", *NANTES_ARGS, "--at", "2026-08-12T22:30:00Z", "--size", "128", "--panorama", str(pano),
               "-o", str(tmp_path / "x.png")])
    assert rc == 2
    assert "equirectangular" in capsys.readouterr().err


def test_memory_estimate_refuses_frames_that_do_not_fit(monkeypatch):
    monkeypatch.setenv("DOMEGEN_MAX_MEMORY_GB", "2")
    with pytest.raises(OutOfRangeError):
        check_memory(CameraSpec(size_px=16384))
    check_memory(CameraSpec(size_px=1024))


def _spec(**layer_kw):
    return FrameSpec(Site(47.2184, -1.5536, 20.0), datetime(2026, 8, 12, 22, 30, tzinfo=timezone.utc),
                     CameraSpec(size_px=128, field_deg=220.0), LayerSpec(stars=0.0, **layer_kw))


def test_ground_is_opaque_below_the_horizon_and_panorama_replaces_it(tmp_path):
    r = render_frame(_spec())
    from domegen.render.camera import direction_grid

    g = direction_grid(CameraSpec(size_px=128, field_deg=220.0))
    below = (g[..., 2] < -0.05) & (r.alpha > 0.99)
    above = (g[..., 2] > 0.3) & (r.alpha > 0.99)
    lum = r.rgb[1]
    assert below.any() and lum[below].max() < lum[above].min()    # dark ground under a night sky
    # a red panorama, opaque below +2 deg: the ground takes its colour
    h = 90
    img = np.zeros((h, 2 * h, 4), np.uint8)
    img[h // 2 - 1:, :, :] = (200, 10, 10, 255)
    pano = tmp_path / "venue.png"
    Image.fromarray(img, "RGBA").save(pano)
    r2 = render_frame(_spec(panorama=str(pano)))
    assert np.all(r2.rgb[0][below] > 5 * r2.rgb[2][below])


def test_specs_are_hashable_picklable_and_validated():
    s = _spec()
    assert pickle.loads(pickle.dumps(s)) == s and hash(s) == hash(pickle.loads(pickle.dumps(s)))
    for bad in ({"stars": 1.5}, {"sky_model": "cloudy"}, {"light_pollution_bortle": 10}, {"exposure_ev": float("nan")}):
        with pytest.raises(DomegenError):
            LayerSpec(**bad)
    with pytest.raises(DomegenError):
        FrameSpec(Site(0, 0), datetime(2026, 1, 1), CameraSpec())   # naive datetime


def test_passes_share_the_exposure_and_overlays_carry_their_coverage():
    from domegen.render.passes import render_passes

    spec = FrameSpec(Site(47.2184, -1.5536, 20.0), datetime(2026, 8, 12, 22, 30, tzinfo=timezone.utc),
                     CameraSpec(size_px=128), LayerSpec(horizon_line=1.0, grid_altaz=1.0))
    got = render_passes(spec)
    ev = got["full"].info["exposure_ev"]
    assert all(p.info["exposure_ev"] == ev for p in got.values())
    a = got["overlays"].alpha
    assert a.max() > 0.9 and (a > 0).mean() < 0.5      # lines only
    assert got["stars"].rgb.max() > 0 and np.all(got["stars"].rgb >= 0)
    # no sky light in the light passes: a star-free corner of the circle stays black
    assert got["bodies"].rgb[:, 64, 64].max() == 0.0
    with pytest.raises(DomegenError):
        render_passes(spec, passes=("clouds",))
