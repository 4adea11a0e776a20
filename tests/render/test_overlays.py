"""Labels: placed clear of each other (an eclipse puts the Sun and the Moon on the same spot)."""

from __future__ import annotations

import functools
import itertools
from datetime import datetime, timezone

import numpy as np

from domegen.render.frame import render_frame
from domegen.render.spec import CameraSpec, FrameSpec, LayerSpec
from domegen.render.text import text_mask
from domegen.sky.site import Site


def _pixels(label) -> set:
    """The frame pixels a label's text covers."""
    m = text_mask(label["text"], label["size_px"], label["angle_deg"]) > 0.02
    ys, xs = np.nonzero(m)
    return set(zip((ys + label["y0_px"]).tolist(), (xs + label["x0_px"]).tolist()))


@functools.lru_cache(maxsize=4)
def _frame_info(lat, lon, utc, size=1024):   # at 512 px the Sun (8 deg up) is too near the rim for a label
    site = Site(lat_deg=lat, lon_deg=lon, elev_m=0.0, timezone="UTC")
    spec = FrameSpec(site=site, utc=utc, camera=CameraSpec(size_px=size), layers=LayerSpec(labels=1.0))
    return render_frame(spec).info


def _assert_no_shared_pixel(info):
    for a, b in itertools.combinations(info["labels"], 2):
        assert not _pixels(a) & _pixels(b), (a["text"], b["text"])


def test_sun_and_moon_labels_do_not_overlap_in_a_total_eclipse():
    # 2026-08-12: total solar eclipse over northern Spain in the early evening (from memory; our
    # engine finds totality at Burgos, 42.34 N 3.70 W, in tests/eclipse/test_solar_local.py) and
    # puts the two centres within a pixel of each other at 18:29 UTC - the premise, checked first.
    info = _frame_info(42.34, -3.70, datetime(2026, 8, 12, 18, 29, tzinfo=timezone.utc))
    pos = {b["name"]: (b["x_px"], b["y_px"]) for b in info["bodies"]}
    assert abs(pos["Sun"][0] - pos["Moon"][0]) < 1.0 and abs(pos["Sun"][1] - pos["Moon"][1]) < 1.0
    assert {"Sun", "Moon"} <= {lab["text"] for lab in info["labels"]}
    _assert_no_shared_pixel(info)


def test_a_crowded_night_keeps_every_label_apart_and_the_moon_named():
    # Nantes, 2029-12-20 23:00 UTC (the night of a total lunar eclipse, from memory): the full Moon
    # stands between Gemini and Taurus with Orion below, a patch where many names compete for room
    info = _frame_info(47.22, -1.55, datetime(2029, 12, 20, 23, 0, tzinfo=timezone.utc))
    texts = [lab["text"] for lab in info["labels"]]
    assert "Moon" in texts and len(texts) >= 8
    _assert_no_shared_pixel(info)


def test_a_lone_label_keeps_its_usual_place_below_its_body():
    # Venus alone, far from other labels: its label sits rim-ward of it (the first choice)
    info = _frame_info(42.34, -3.70, datetime(2026, 8, 12, 18, 29, tzinfo=timezone.utc))
    vx, vy = next((b["x_px"], b["y_px"]) for b in info["bodies"] if b["name"] == "Venus")
    lab = next(lab for lab in info["labels"] if lab["text"] == "Venus")
    h, w = text_mask("Venus", lab["size_px"], lab["angle_deg"]).shape
    cx, cy, c = lab["x0_px"] + w / 2, lab["y0_px"] + h / 2, 512.0
    assert (cx - c) ** 2 + (cy - c) ** 2 > (vx - c) ** 2 + (vy - c) ** 2
