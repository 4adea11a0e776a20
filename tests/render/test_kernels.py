"""The compiled kernels give the same bits as their numpy forms (frames keep their bytes whichever runs)."""

from __future__ import annotations

import numpy as np
import pytest

from domegen.render import kernels, tonemap
from domegen.render.frame import coarse_size, sky_window, upsample_into, upsample_plan, upsample_plane_numpy
from domegen.render.output import png_rows_numpy


@pytest.fixture
def compiled_always(monkeypatch):
    """Every frame size takes the compiled passes."""
    monkeypatch.setattr("domegen.render.compiled.COMPILED_MIN_PIXELS", 0)


@pytest.mark.parametrize("n", [7, 100, 1000, 1030])
def test_upsampling_kernel_equals_the_numpy_form_bit_for_bit(n, compiled_always):
    m = coarse_size(n)
    rng = np.random.default_rng(n)
    # radiances over many octaves, as a twilight or eclipse sky has (cd/m^2)
    coarse = (10.0 ** rng.uniform(-5, 4, (3, m, m))).astype(np.float32)
    got = np.full((3, n, n), np.nan, np.float32)
    upsample_into(got, coarse)
    want = np.full((3, n, n), np.nan, np.float32)
    for k in range(3):
        upsample_plane_numpy(want[k], coarse[k], *upsample_plan(n, m))
    assert not np.isnan(got).any()
    assert np.array_equal(got.view(np.uint32), want.view(np.uint32))
    # and the window form the layers read the sky with
    box = (n // 3, min(n, n // 3 + 5), n // 2, min(n, n // 2 + 6))
    assert np.array_equal(sky_window(coarse, n, box), np.moveaxis(got[:, box[0]:box[1], box[2]:box[3]], 0, -1))


def _awkward_floats(shape, seed):
    """Float32 planes drawn from every class: random bit patterns (denormals, inf, NaN, negatives) and
    values spread over the display range."""
    rng = np.random.default_rng(seed)
    bits = rng.integers(0, 2 ** 32, shape, dtype=np.uint64).astype(np.uint32)
    out = bits.view(np.float32).copy()
    spread = (10.0 ** rng.uniform(-9, 7, shape)).astype(np.float32)
    out[..., ::2] = spread[..., ::2]
    out[..., 1, :8] = [0.0, -0.0, np.inf, -np.inf, np.nan, 1e-45, -1e-45, 3.4e38]
    return out


@pytest.mark.parametrize("bit_depth", [8, 16])
@pytest.mark.parametrize("ev", [0.0, 7.3, -2.5])
def test_png_row_kernel_equals_the_tone_map_of_every_pixel(bit_depth, ev):
    h, w = 9, 37
    rgb = _awkward_floats((3, h, w), seed=bit_depth)
    alpha_dtype = np.uint8 if bit_depth == 8 else np.uint16
    alpha = np.random.default_rng(1).integers(0, 1 << bit_depth, (h, w)).astype(alpha_dtype)
    lo = np.array([0, 3, 5, 0, 10, 0, 36, 37, 0], np.int64)
    hi = np.array([37, 30, 5, 1, 37, 37, 37, 37, 12], np.int64)
    nbytes = bit_depth // 8
    got = np.full((h, 1 + 4 * w * nbytes), 0xAB, np.uint8)
    scale = np.float32(tonemap.exposure_scale(ev))
    if bit_depth == 8:
        kernels.png_rows8(rgb, 0, h, lo, hi, scale, tonemap.full_lut8(), alpha, got)
    else:
        table, base = tonemap.lut(16)
        kernels.png_rows16(rgb, 0, h, lo, hi, scale, table, base, np.float32(tonemap.LUT_MIN),
                           np.float32(tonemap.LUT_MAX), alpha, got)
    want = np.empty_like(got)
    with np.errstate(invalid="ignore", over="ignore"):   # NaN and 3.4e38 x 2^7.3 on purpose
        png_rows_numpy(rgb, 0, h, ev, bit_depth, alpha, want)
    pix = want[:, 1:].reshape(h, w, 4 * nbytes)
    for r in range(h):   # outside [lo, hi) the kernel writes 0 (there the frame's coverage is 0)
        pix[r, :lo[r]] = 0
        pix[r, hi[r]:] = 0
    assert np.array_equal(got, want)
    assert want[:, 1:].any()   # the comparison is not between two blank rows


def test_tone_map_clamps_nan_to_black_at_16_bits():
    plane = np.array([[np.nan, -np.nan, 1.0]], np.float32)
    assert list(tonemap.tone_map_plane(plane, 0.0, 16)[0, :2]) == [0, 0]


def test_small_frames_never_start_numba():
    # numba's start costs a process ~0.6 s, more than a small frame saves: previews and drafts skip it
    import subprocess
    import sys

    code = ("import sys\n"
            "from datetime import datetime, timezone\n"
            "from domegen.render.frame import render_frame\n"
            "from domegen.render.output import encode_frame\n"
            "from domegen.render.spec import CameraSpec, FrameSpec, LayerSpec\n"
            "from domegen.sky.site import Site\n"
            "site = Site(lat_deg=47.2184, lon_deg=-1.5536, elev_m=20.0, timezone='Europe/Paris')\n"
            "spec = FrameSpec(site=site, utc=datetime(2026, 8, 12, 21, 30, tzinfo=timezone.utc),\n"
            "                 camera=CameraSpec(size_px=256), layers=LayerSpec())\n"
            "assert len(encode_frame(render_frame(spec), 'png', 8)) > 1000\n"
            "print('numba' in sys.modules)\n")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert out.returncode == 0, out.stderr
    assert out.stdout.strip() == "False"
