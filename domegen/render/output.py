"""Writing frames: tone mapping plus PNG (8/16-bit, own writer on a zlib stream), JPEG, EXR.

Every writer is deterministic (same array -> same bytes: no timestamps, fixed
zlib settings) and writes under a temporary name, then renames.  PNG carries
an sRGB chunk; RGB is premultiplied by the rim coverage (black outside the
image circle) and alpha holds the coverage.
"""

from __future__ import annotations

import io
import struct
import zlib
from pathlib import Path

import numpy as np

try:   # ISA-L's deflate: a zlib stream ~4x faster than zlib's own at level 1, no larger
    from isal import isal_zlib as _deflate
except ImportError:  # pragma: no cover - isal is a dependency; zlib gives valid (other) bytes
    _deflate = zlib

from domegen.cache import atomic_write_bytes
from domegen.errors import InputError
from domegen.render import tonemap
from domegen.render.camera import circle_alpha, circle_row_extent
from domegen.render.compiled import use_compiled

FORMATS = {"png": "png", "jpg": "jpeg", "jpeg": "jpeg", "exr": "exr"}
#: Deflate level of PNG output (ISA-L levels 0-3): 1 is as small as zlib's level 1 at a quarter of its time.
PNG_LEVEL = 1
JPEG_QUALITY = 92


def format_for(path, fmt: str | None = None) -> str:
    """Canonical format name from ``fmt`` or the file suffix; InputError if unknown."""
    name = (fmt or Path(path).suffix.lstrip(".")).lower()
    if name not in FORMATS:
        raise InputError(f"unknown image format {name!r}", field="format", value=name,
                         hint="use png, jpeg or exr (by --format or the file suffix)")
    return FORMATS[name]


def _chunk(kind: bytes, data: bytes) -> bytes:
    return struct.pack(">I", len(data)) + kind + data + struct.pack(">I", zlib.crc32(kind + data) & 0xFFFFFFFF)


#: Rows per band of the streaming PNG writer (bounds the writer's memory to a few bands).
PNG_BAND_ROWS = 64


def _png_stream(h: int, w: int, c: int, depth: int, fill, level: int) -> bytes:
    """PNG bytes; ``fill(rows, r0, r1)`` writes image rows r0..r1 as scanlines into
    rows (r1-r0, 1 + w*c*depth/8) uint8: a filter byte (0, None) then the samples."""
    nbytes = depth // 8
    comp = _deflate.compressobj(level)
    parts = []
    for r0 in range(0, h, PNG_BAND_ROWS):
        r1 = min(h, r0 + PNG_BAND_ROWS)
        rows = np.empty((r1 - r0, 1 + w * c * nbytes), dtype=np.uint8)
        fill(rows, r0, r1)
        parts.append(comp.compress(rows))
    parts.append(comp.flush())
    color_type = 6 if c == 4 else 2
    ihdr = struct.pack(">IIBBBBB", w, h, depth, color_type, 0, 0, 0)
    return b"".join([b"\x89PNG\r\n\x1a\n", _chunk(b"IHDR", ihdr), _chunk(b"sRGB", b"\x00"),
                     _chunk(b"IDAT", b"".join(parts)), _chunk(b"IEND", b"")])


def encode_png(planes, level: int = PNG_LEVEL) -> bytes:
    """(C, H, W) uint8 or uint16 codes (an array or a list of C planes), C = 3 (RGB) or 4 (RGBA) -> PNG bytes.

    Filter type 0 (None) on every row: with deflate level 1 it is the fastest
    setting and night frames (mostly dark, smooth) compress well without prediction.
    """
    c = len(planes)
    h, w = planes[0].shape
    dtype = planes[0].dtype
    if c not in (3, 4) or dtype not in (np.uint8, np.uint16) or any(p.shape != (h, w) for p in planes):
        raise ValueError("planes must be (3|4, H, W) uint8/uint16")

    def fill(rows, r0, r1):
        rows[:, 0] = 0
        pix = rows[:, 1:].view(">u2" if dtype == np.uint16 else np.uint8).reshape(r1 - r0, w, c)
        for k in range(c):
            pix[:, :, k] = planes[k][r0:r1]

    return _png_stream(h, w, c, 8 if dtype == np.uint8 else 16, fill, level)


def encode_jpeg(planes: np.ndarray, quality: int = JPEG_QUALITY) -> bytes:
    """(3|4, H, W) uint8 -> JPEG bytes (alpha dropped; RGB is already black outside the circle)."""
    from PIL import Image

    rgb = np.ascontiguousarray(np.moveaxis(planes[:3], 0, -1))
    buf = io.BytesIO()
    Image.fromarray(rgb, "RGB").save(buf, format="JPEG", quality=quality, optimize=False)
    return buf.getvalue()


def encode_exr(rgb: np.ndarray, alpha: np.ndarray) -> bytes:
    """Linear (3, H, W) float32 and (H, W) alpha -> uncompressed half-float scanline OpenEXR bytes."""
    _, h, w = rgb.shape
    chans = {"A": alpha, "B": rgb[2], "G": rgb[1], "R": rgb[0]}  # channel order is alphabetical

    def attr(name: str, kind: str, data: bytes) -> bytes:
        return name.encode() + b"\0" + kind.encode() + b"\0" + struct.pack("<i", len(data)) + data

    chlist = b"".join(n.encode() + b"\0" + struct.pack("<iB3xii", 1, 0, 1, 1) for n in chans) + b"\0"
    box = struct.pack("<iiii", 0, 0, w - 1, h - 1)
    header = b"".join([
        struct.pack("<ii", 20000630, 2),
        attr("channels", "chlist", chlist),
        attr("compression", "compression", b"\0"),
        attr("dataWindow", "box2i", box),
        attr("displayWindow", "box2i", box),
        attr("lineOrder", "lineOrder", b"\0"),
        attr("pixelAspectRatio", "float", struct.pack("<f", 1.0)),
        attr("screenWindowCenter", "v2f", struct.pack("<ff", 0.0, 0.0)),
        attr("screenWindowWidth", "float", struct.pack("<f", 1.0)),
        b"\0",
    ])
    line_bytes = w * 2 * len(chans)
    block = np.empty((h, 8 + line_bytes), dtype=np.uint8)
    block[:, 0:4] = np.arange(h, dtype="<i4").view(np.uint8).reshape(h, 4)
    block[:, 4:8] = np.frombuffer(struct.pack("<i", line_bytes), dtype=np.uint8)
    body = block[:, 8:].view("<f2").reshape(h, len(chans), w)
    for k, plane in enumerate(chans.values()):
        body[:, k, :] = np.clip(plane, -65000.0, 65000.0)
    start = len(header) + 8 * h
    offsets = (start + np.arange(h, dtype=np.int64) * (8 + line_bytes)).astype("<u8")
    return header + offsets.tobytes() + block.tobytes()


def encode_frame(rendered, fmt: str = "png", bit_depth: int = 8, exposure_ev: float | None = None) -> bytes:
    """Tone-map (PNG/JPEG) or keep linear (EXR) and encode a RenderedFrame to bytes."""
    fmt = format_for("x." + fmt)
    if bit_depth not in (8, 16):
        raise InputError(f"bit depth {bit_depth} is not 8 or 16", field="bit_depth", value=bit_depth)
    if fmt == "exr":
        return encode_exr(rendered.rgb, rendered.alpha)
    if fmt == "jpeg" and bit_depth != 8:
        raise InputError("JPEG is 8-bit only", field="bit_depth", value=bit_depth,
                         hint="use png for 16-bit output")
    ev = rendered.info.get("exposure_ev", 0.0) if exposure_ev is None else float(exposure_ev)
    if fmt == "jpeg":
        return encode_jpeg(np.stack([tonemap.tone_map_plane(rendered.rgb[k], ev, 8) for k in range(3)]))
    _, h, w = rendered.rgb.shape
    alpha = _alpha_codes(rendered.alpha, bit_depth)
    rgb = np.ascontiguousarray(rendered.rgb, dtype=np.float32)
    if not use_compiled(h * w):
        def fill(rows, r0, r1):
            png_rows_numpy(rgb, r0, r1, ev, bit_depth, alpha, rows)

        return _png_stream(h, w, 4, bit_depth, fill, PNG_LEVEL)
    # A rendered frame's RGB is premultiplied by its image circle: where that
    # coverage is 0 every code is 0, so the compiled pass skips the corners (22 %).
    lo, hi = (circle_row_extent(h) if h == w and not rendered.alpha.flags.writeable
              and rendered.alpha is circle_alpha(h)
              else (np.zeros(h, np.int64), np.full(h, w, np.int64)))
    if bit_depth == 8:
        from domegen.render.kernels import png_rows8

        scale, table = np.float32(tonemap.exposure_scale(ev)), tonemap.full_lut8()

        def fill(rows, r0, r1):   # tone map band by band, straight into the PNG rows
            png_rows8(rgb, r0, r1, lo, hi, scale, table, alpha, rows)
    else:
        from domegen.render.kernels import png_rows16

        scale, (table, base) = np.float32(tonemap.exposure_scale(ev)), tonemap.lut(16)
        lo_val, hi_val = np.float32(tonemap.LUT_MIN), np.float32(tonemap.LUT_MAX)

        def fill(rows, r0, r1):
            png_rows16(rgb, r0, r1, lo, hi, scale, table, base, lo_val, hi_val, alpha, rows)

    return _png_stream(h, w, 4, bit_depth, fill, PNG_LEVEL)


def png_rows_numpy(rgb, r0, r1, ev: float, bit_depth: int, alpha, rows) -> None:
    """kernels.png_rows8/16 in numpy over whole rows: tone_map_plane per channel, then interleave.

    rgb (3, H, W) float32 cd/m^2, alpha (H, W) codes, rows (r1-r0, 1 + 4 W depth/8) uint8.
    """
    rows[:, 0] = 0
    pix = rows[:, 1:].view(">u2" if bit_depth == 16 else np.uint8).reshape(r1 - r0, rgb.shape[2], 4)
    for k in range(3):
        tonemap.tone_map_plane(rgb[k, r0:r1], ev, bit_depth, out=pix[:, :, k])
    pix[:, :, 3] = alpha[r0:r1]


_ALPHA_MEMO: dict = {}


def _alpha_codes(alpha: np.ndarray, bit_depth: int) -> np.ndarray:
    """Alpha codes, memoised for the (read-only, cached) image-circle coverage of a camera."""
    if alpha.flags.writeable:
        return tonemap.alpha_codes(alpha, bit_depth)
    key = (id(alpha), alpha.shape, bit_depth)
    got = _ALPHA_MEMO.get(key)
    if got is None or got[0] is not alpha:
        _ALPHA_MEMO.clear()
        got = _ALPHA_MEMO[key] = (alpha, tonemap.alpha_codes(alpha, bit_depth))
    return got[1]


def write_frame(rendered, path, fmt: str | None = None, bit_depth: int = 8,
                exposure: float | None = None) -> Path:
    """Write ``rendered`` to ``path`` atomically; format from ``fmt`` or the suffix.

    ``exposure``: EV, None = the frame's own (``rendered.info["exposure_ev"]``).
    """
    path = Path(path)
    data = encode_frame(rendered, format_for(path, fmt), bit_depth, exposure)
    if not path.parent.exists():
        raise InputError(f"folder {str(path.parent)!r} does not exist", field="output", value=str(path))
    atomic_write_bytes(path, data)
    return path
