"""The anti-aliased rasteriser: coverage against exact areas and lengths (geometry, common practice)."""

from __future__ import annotations

import numpy as np
import pytest

from domegen.errors import OutOfRangeError
from domegen.maps.raster import Canvas, polygon_coverage, stroke_coverage


def _circle(cx, cy, r, n=720):
    th = np.linspace(0, 2 * np.pi, n, endpoint=False)
    return np.c_[cx + r * np.cos(th), cy + r * np.sin(th)]


def test_polygon_coverage_sums_to_the_exact_area():
    ring = _circle(100.3, 80.7, 50.0)
    cov, y0, x0 = polygon_coverage([ring], 256, 200)
    x, y = ring[:, 0], ring[:, 1]
    area = 0.5 * abs(np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y))
    assert cov.sum() == pytest.approx(area, rel=1e-3)
    # anti-aliased: edge pixels hold fractional coverage, inside is 1, outside 0
    assert ((cov > 0.05) & (cov < 0.95)).sum() > 200
    assert cov[80 - y0, 100 - x0] == pytest.approx(1.0)


def test_hole_wound_opposite_is_left_empty():
    outer = _circle(100, 100, 60)
    hole = _circle(100, 100, 20)[::-1]
    cov, y0, x0 = polygon_coverage([outer, hole], 200, 200)
    assert cov[100 - y0, 100 - x0] == 0.0
    assert cov.sum() == pytest.approx(np.pi * (60 ** 2 - 20 ** 2), rel=2e-3)


def test_polygon_partly_outside_the_image_is_clipped():
    cov, y0, x0 = polygon_coverage([np.array([[-50.0, -50.0], [50.0, -50.0], [50.0, 50.0], [-50.0, 50.0]])],
                                   100, 100)
    assert (y0, x0) == (0, 0) and cov.sum() == pytest.approx(2500.0, rel=1e-6)


@pytest.mark.parametrize("width_px", [1.0, 2.5, 4.0])
def test_stroke_coverage_is_length_times_width(width_px):
    line = np.array([[20.2, 30.1], [180.7, 140.9]])
    idx, cov = stroke_coverage([line], 220, 200, width_px)
    length = np.hypot(*(line[1] - line[0]))
    # box-filtered band length x width, plus the round caps (pi w^2/4)
    expect = length * width_px + np.pi * width_px ** 2 / 4
    assert cov.sum() == pytest.approx(expect, rel=0.03)
    assert len(np.unique(idx)) == len(idx)


def test_canvas_overlay_stays_transparent_where_nothing_is_drawn(tmp_path):
    c = Canvas(64, 32)
    c.stroke([np.array([[2.0, 16.0], [60.0, 16.0]])], (1.0, 0.5, 0.0, 1.0), 3.0)
    a = c.to_array()
    assert a[0, 0, 3] == 0 and a[16, 30, 3] == 255 and tuple(a[16, 30, :3]) == (255, 128, 0)
    path = tmp_path / "o.png"
    c.save_png(path)
    from PIL import Image

    with Image.open(path) as im:
        assert im.mode == "RGBA" and im.size == (64, 32)


def test_sizes_beyond_8192_are_refused():
    with pytest.raises(OutOfRangeError):
        Canvas(8193, 10)
    Canvas(8192, 1)  # the largest width is accepted
