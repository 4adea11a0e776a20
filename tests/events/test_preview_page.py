"""``domegen preview-page``: a self-contained page, checked in headless Chromium."""

from __future__ import annotations

import base64
import io
import re
from html.parser import HTMLParser

import numpy as np
import pytest
from PIL import Image

from domegen.cli.main import main
from domegen.eclipse.safety import CAUTION

from .browser import chromium_or_reason, run_page

SIZE = 200


class _Collect(HTMLParser):
    def __init__(self):
        super().__init__()
        self.imgs, self.refs, self.scripts, self.ids = [], [], 0, []

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if "id" in a:
            self.ids.append(a["id"])
        if tag == "img":
            self.imgs.append(a)
        if tag == "script":
            self.scripts += 1
        for k in ("src", "href"):
            if k in a:
                self.refs.append(a[k])


@pytest.fixture(scope="module")
def page(tmp_path_factory):
    out = tmp_path_factory.mktemp("preview")
    assert main(["preview-page", "--eclipse", "2026-08-12", "--place", "Burgos, ES", "-o", str(out),
                 "--size", str(SIZE), "--map-width", "480"]) == 0
    return out / "index.html"


def _decode(uri: str) -> Image.Image:
    head, data = uri.split(",", 1)
    assert head.startswith("data:image/") and head.endswith(";base64")
    return Image.open(io.BytesIO(base64.b64decode(data)))


def test_page_is_self_contained(page):
    text = page.read_text(encoding="utf-8")
    p = _Collect()
    p.feed(text)
    assert p.scripts == 0
    assert all(r.startswith("data:") for r in p.refs)
    assert not re.search(r"(?i)\b(src|href)\s*=\s*[\"']?(https?:|//)", text)
    # C1, C2, max, C3, C4 are all seen from Burgos (totality ~1 min 44 s with the Sun ~8 deg up)
    figs = [i for i in p.ids if i.startswith("fig-")]
    assert figs == ["fig-C1", "fig-C2", "fig-max", "fig-C3", "fig-C4",
                    # close-ups: C4 is skipped, the Sun is 1.1 deg below the horizon then
                    "fig-close-C1", "fig-close-C2", "fig-close-max", "fig-close-C3", "fig-map"]
    for img in p.imgs[:5]:
        im = _decode(img["src"])
        assert im.size == (SIZE, SIZE)
        arr = np.asarray(im.convert("RGB"), dtype=float)
        assert arr.std() > 3.0  # a picture, not a flat fill
    # at mid-totality the close-up shows a dark lunar disc in a bright corona: the centre is
    # much darker than a ring around it
    mid = np.asarray(_decode(p.imgs[7]["src"]).convert("L"), dtype=float)
    n = mid.shape[0]
    yy, xx = np.mgrid[:n, :n] - (n - 1) / 2
    r = np.hypot(yy, xx) / n  # the Moon is ~0.27 of the 2 deg field across: radius ~0.13
    assert mid[r < 0.08].mean() + 20 < mid[(r > 0.16) & (r < 0.22)].mean()
    assert _decode(p.imgs[-1]["src"]).size[0] == 480
    assert CAUTION in text.replace("&#x27;", "'")
    assert "CEST" in text and "Second contact (totality begins)" in text


@pytest.fixture(scope="module")
def chromium():
    exe, why = chromium_or_reason()
    if exe is None:
        pytest.skip(why)
    return exe


def test_console_capture_catches_errors(chromium, tmp_path):
    # the harness must see a console error and a failed load, or the next test proves nothing
    bad = tmp_path / "bad.html"
    bad.write_text('<!DOCTYPE html><html><body><img src="missing.png">'
                   '<script>console.error("deliberate")</script></body></html>')
    lines = run_page(chromium, bad, tmp_path / "bad.png", width=400, height=300)
    assert any("deliberate" in line for line in lines)


def test_page_loads_without_console_errors_and_shows_images(chromium, page, tmp_path):
    shot = tmp_path / "page.png"
    lines = run_page(chromium, page, shot, width=1200, height=1400)
    assert lines == []
    # the same page with every image replaced by a transparent pixel, as a control
    blank = "data:image/gif;base64,R0lGODlhAQABAIAAAAAAAP///yH5BAEAAAAALAAAAAABAAEAAAIBRAA7"
    text = re.sub(r'src="data:image/[^"]+"', f'src="{blank}"', page.read_text(encoding="utf-8"))
    ctrl_page = tmp_path / "control.html"
    ctrl_page.write_text(text, encoding="utf-8")
    ctrl = tmp_path / "control.png"
    assert run_page(chromium, ctrl_page, ctrl, width=1200, height=1400) == []
    a = np.asarray(Image.open(shot).convert("RGB"), dtype=float)
    b = np.asarray(Image.open(ctrl).convert("RGB"), dtype=float)
    assert a.shape == b.shape == (1400, 1200, 3)
    # the dome row sits under the title; where the images are, the pixels must differ a lot
    diff = np.abs(a - b).sum(axis=2)
    changed = diff > 40
    assert changed[150:700].mean() > 0.15
    # and the image area is not a flat colour
    assert a[150:700].std() > 15
