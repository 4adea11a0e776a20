"""Tone mapping and writers: sRGB values, EV steps, PNG 8/16-bit read back, determinism, errors."""

from __future__ import annotations

import io
import struct
import zlib

import numpy as np
import pytest
from PIL import Image

from domegen.errors import InputError
from domegen.render import tonemap
from domegen.render.frame import RenderedFrame
from domegen.render.output import encode_exr, encode_frame, encode_png, write_frame


def _frame(n=64, seed=0):
    rng = np.random.default_rng(seed)
    rgb = (rng.random((3, n, n)) * 8000.0).astype(np.float32)
    alpha = np.ones((n, n), np.float32)
    alpha[0, 0] = 0.0
    rgb[:, 0, 0] = 0.0
    return RenderedFrame(rgb=rgb, alpha=alpha, info={"exposure_ev": 0.0})


def test_srgb_transfer_matches_iec_61966_2_1():
    # IEC 61966-2-1:1999: 12.92 C below 0.0031308, else 1.055 C^(1/2.4) - 0.055; 0.18 -> 0.4613 (derived).
    assert tonemap.srgb_encode(0.0031308) == pytest.approx(0.04045, abs=1e-5)
    assert tonemap.srgb_encode(0.18) == pytest.approx(1.055 * 0.18 ** (1 / 2.4) - 0.055)
    assert tonemap.srgb_decode(tonemap.srgb_encode(0.5)) == pytest.approx(0.5)


def test_ev_zero_shows_a_daytime_sky_as_mid_grey_and_plus_one_doubles():
    sky = np.full((8, 8), tonemap.DAY_SKY_CD_M2, np.float32)
    code = tonemap.tone_map_plane(sky, 0.0, 16)[0, 0] / 65535
    assert code == pytest.approx(tonemap.srgb_encode(0.18), abs=2e-4)
    half = np.full((8, 8), tonemap.DAY_SKY_CD_M2 / 2, np.float32)
    assert tonemap.tone_map_plane(half, 1.0, 16)[0, 0] == tonemap.tone_map_plane(sky, 0.0, 16)[0, 0]


def test_lut_agrees_with_the_formula_across_the_range():
    v = np.geomspace(1e-6, 30.0, 4000).astype(np.float32)[None, :]
    scale = tonemap.exposure_scale(0.0)
    lin = v / np.float32(scale)
    want = tonemap.srgb_encode(tonemap.shoulder(v.astype(float)))
    got16 = tonemap.tone_map_plane(np.ascontiguousarray(lin), 0.0, 16) / 65535.0
    got8 = tonemap.tone_map_plane(np.ascontiguousarray(lin), 0.0, 8) / 255.0
    assert np.max(np.abs(got16 - want)) < 3e-4
    assert np.max(np.abs(got8 - want)) < 1.0 / 255 + 1e-3


def test_png8_reads_back_with_pillow_and_is_deterministic(tmp_path):
    f = _frame()
    p = write_frame(f, tmp_path / "a.png")
    q = write_frame(f, tmp_path / "b.png")
    assert p.read_bytes() == q.read_bytes()
    with Image.open(p) as im:
        img = np.asarray(im)
    assert img.shape == (64, 64, 4) and img.dtype == np.uint8
    ref = tonemap.tone_map_plane(np.ascontiguousarray(f.rgb[1]), 0.0, 8)
    assert np.array_equal(img[..., 1], ref)
    assert img[0, 0, 3] == 0 and img[5, 5, 3] == 255


def _decode_png16(data: bytes) -> np.ndarray:
    """Minimal reader for our filter-0 16-bit PNGs, checked against the PNG spec's chunk layout."""
    assert data[:8] == b"\x89PNG\r\n\x1a\n"
    pos, idat, ihdr = 8, b"", None
    while pos < len(data):
        (length,) = struct.unpack(">I", data[pos:pos + 4])
        kind = data[pos + 4:pos + 8]
        body = data[pos + 8:pos + 8 + length]
        (crc,) = struct.unpack(">I", data[pos + 8 + length:pos + 12 + length])
        assert crc == zlib.crc32(kind + body) & 0xFFFFFFFF
        if kind == b"IHDR":
            ihdr = struct.unpack(">IIBBBBB", body)
        elif kind == b"IDAT":
            idat += body
        pos += 12 + length
    w, h, depth, ctype = ihdr[:4]
    raw = np.frombuffer(zlib.decompress(idat), np.uint8).reshape(h, -1)
    assert np.all(raw[:, 0] == 0)
    return raw[:, 1:].copy().view(">u2").reshape(h, w, 4 if ctype == 6 else 3)


def test_png16_exact_and_consistent_with_pillow(tmp_path):
    f = _frame(seed=3)
    p = write_frame(f, tmp_path / "deep.png", bit_depth=16)
    data = p.read_bytes()
    got = _decode_png16(data)
    ref = tonemap.tone_map_plane(np.ascontiguousarray(f.rgb[0]), 0.0, 16)
    assert np.array_equal(got[..., 0], ref)
    with Image.open(p) as img:
        assert img.size == (64, 64)
        img.load()   # Pillow decodes it (it reduces 16-bit RGBA to 8 bits)


def test_jpeg_and_exr(tmp_path):
    f = _frame()
    p = write_frame(f, tmp_path / "a.jpg")
    with Image.open(p) as im:
        assert im.format == "JPEG"
    assert p.read_bytes() == write_frame(f, tmp_path / "b.jpeg").read_bytes()
    exr = encode_exr(f.rgb, f.alpha)
    assert struct.unpack("<i", exr[:4])[0] == 20000630   # OpenEXR magic number (file layout spec)
    assert len(exr) > 64 * 64 * 4 * 2


def test_unknown_format_and_bad_depth():
    f = _frame()
    with pytest.raises(InputError):
        write_frame(f, "/tmp/x.tiff")
    with pytest.raises(InputError):
        encode_frame(f, "jpeg", 16)
    with pytest.raises(InputError):
        encode_frame(f, "png", 12)
    with pytest.raises(ValueError):
        encode_png(np.zeros((2, 4, 4), np.uint8))


@pytest.mark.parametrize("compiled", [False, True])
@pytest.mark.parametrize("bit_depth", [8, 16])
def test_a_rendered_frame_encodes_to_the_full_tone_map_of_every_pixel(bit_depth, compiled, monkeypatch):
    # The compiled PNG pass skips the tone map where the image circle's coverage
    # is 0 (the frame's RGB is premultiplied by it); decoded, the file must equal
    # the tone map and alpha codes of every pixel, corners included, in both forms.
    monkeypatch.setattr("domegen.render.compiled.COMPILED_MIN_PIXELS", 0 if compiled else 1 << 62)
    from datetime import datetime, timezone

    from domegen.render.frame import render_frame
    from domegen.render.spec import CameraSpec, FrameSpec, LayerSpec
    from domegen.sky.site import Site

    site = Site(lat_deg=47.2184, lon_deg=-1.5536, elev_m=20.0, name="Loire Valley Science Dome",
                timezone="Europe/Paris")
    spec = FrameSpec(site=site, utc=datetime(2026, 8, 12, 19, 30, tzinfo=timezone.utc),
                     camera=CameraSpec(size_px=200), layers=LayerSpec(stars=0.0))
    fr = render_frame(spec)
    assert np.all(fr.rgb[:, 0, 0] == 0.0) and np.all(fr.rgb[:, 100, 100] > 0.0)
    ev = fr.info["exposure_ev"]
    want = np.concatenate([tonemap.tone_map(fr.rgb, ev, bit_depth),
                           tonemap.alpha_codes(fr.alpha, bit_depth)[None]])
    data = encode_frame(fr, "png", bit_depth)
    if bit_depth == 16:
        got = np.moveaxis(_decode_png16(data).astype(np.uint16), -1, 0)
    else:
        with Image.open(io.BytesIO(data)) as im:
            got = np.moveaxis(np.asarray(im), -1, 0)
    assert got.shape == (4, 200, 200)
    np.testing.assert_array_equal(got, want)
