"""Dome-frame renderer benchmark: compute vs encode vs the encode floor, 4096 and 8192 px.

Night frame over the Loire Valley Science Dome (Nantes) with the default
layers.  Per size: the direction grid (once per camera), the frame compute
(render_frame with the instant's bodies and stars precomputed, as a sequence
does, and into a reused buffer), the encode (tone mapping + 8-bit PNG) and
the floor (the same PNG writer on the already tone-mapped codes).  Times are
CPU seconds of this process (core-seconds; wall time in brackets).  Peak
memory is the process's maximum resident set size.  One math-library thread,
as the command line runs.

    python benchmarks/bench_render.py [--sizes 4096 8192]
"""

from __future__ import annotations

import argparse
import resource
from datetime import datetime, timezone

import domegen.cli.main  # noqa: F401  - the command line's process set-up (one math-library thread), before numpy

import numpy as np

from _timing import timed




def _start_kernels() -> None:
    from domegen.render import kernels, tonemap

    z = np.zeros((3, 8, 8), np.float32)
    kernels.upsample_plane(z[0], np.zeros((32, 32), np.float32), np.zeros(8, np.int64), z[0, 0],
                           np.zeros(31, np.int64), np.zeros(31, np.int64), z[0, 0])
    kernels.png_rows8(z, 0, 8, np.zeros(8, np.int64), np.full(8, 8, np.int64), np.float32(1.0),
                      tonemap.full_lut8(), np.zeros((8, 8), np.uint8), np.zeros((8, 33), np.uint8))


def _best(fn, repeat: int = 5) -> float:
    """Best CPU seconds of ``repeat`` calls."""
    return min(timed(fn)[1] for _ in range(repeat))


def kernel_ratios(spec, bodies, stars) -> None:
    """The compiled kernels against their numpy forms, same frame, same run (best of 5, CPU)."""
    from domegen.render import kernels, tonemap
    from domegen.render.camera import circle_row_extent
    from domegen.render.frame import (coarse_sky, render_frame, sky_light, sky_model_named, upsample_plan,
                                      upsample_plane_numpy)
    from domegen.render.output import PNG_BAND_ROWS, _alpha_codes, png_rows_numpy

    f = render_frame(spec, bodies=bodies, stars=stars)
    n = spec.camera.size_px
    sky, _ = coarse_sky(spec.camera, sky_model_named(spec.layers.sky_model), sky_light(spec, bodies))
    plan = upsample_plan(n, sky.shape[1])
    plane = np.empty((n, n), np.float32)
    up_np = _best(lambda: [upsample_plane_numpy(plane, sky[k], *plan) for k in range(3)])
    up_nb = _best(lambda: [kernels.upsample_plane(plane, sky[k], *plan) for k in range(3)])
    ev = f.info["exposure_ev"]
    alpha = _alpha_codes(f.alpha, 8)
    lo, hi = circle_row_extent(n)
    rows = np.empty((PNG_BAND_ROWS, 1 + 4 * n), np.uint8)
    bands = range(0, n - PNG_BAND_ROWS + 1, PNG_BAND_ROWS)
    scale, table = np.float32(tonemap.exposure_scale(ev)), tonemap.full_lut8()
    tm_np = _best(lambda: [png_rows_numpy(f.rgb, r, r + PNG_BAND_ROWS, ev, 8, alpha, rows) for r in bands])
    tm_nb = _best(lambda: [kernels.png_rows8(f.rgb, r, r + PNG_BAND_ROWS, lo, hi, scale, table, alpha, rows)
                           for r in bands])
    print("  compiled kernels vs their numpy forms (CPU s, best of 5; the kernel skips the image corners):")
    print(f"    sky upsampling           numpy {up_np:6.3f}  kernel {up_nb:6.3f}  ratio {up_np / up_nb:5.2f}")
    print(f"    tone map into PNG rows   numpy {tm_np:6.3f}  kernel {tm_nb:6.3f}  ratio {tm_np / tm_nb:5.2f}")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", type=int, nargs="+", default=[4096, 8192])
    args = ap.parse_args()
    if len(args.sizes) > 1:   # one process per size, so each peak memory figure is that size's own
        import subprocess
        import sys

        for n in args.sizes:
            subprocess.run([sys.executable, __file__, "--sizes", str(n)], check=True)
        return

    from domegen.render import camera as cam
    from domegen.render.compiled import COMPILED_MIN_PIXELS
    from domegen.render import tonemap
    from domegen.render.frame import render_frame
    from domegen.render.output import encode_frame, encode_png
    from domegen.render.spec import CameraSpec, FrameSpec, LayerSpec
    from domegen.sky.bodies import body_positions
    from domegen.sky.site import Site
    from domegen.sky.stars import star_field
    from domegen.sky.times import unix_seconds

    site = Site(47.2184, -1.5536, 20.0, timezone="Europe/Paris")
    when = datetime(2026, 8, 12, 22, 30, tzinfo=timezone.utc)
    layers = LayerSpec()
    bodies, c_b, _ = timed(lambda: body_positions(site, np.array([unix_seconds(when)])))
    stars, c_s, _ = timed(lambda: star_field(site, when, mag_limit=layers.star_mag_limit))
    print(f"positions (once per instant): bodies {c_b:.3f} s, {len(stars)} stars {c_s:.3f} s")
    # warm the sky model's caches on a small frame, and load (or compile) the kernels
    render_frame(FrameSpec(site, when, CameraSpec(size_px=256), layers), bodies=bodies, stars=stars)
    _, c_jit, w_jit = timed(_start_kernels)
    print(f"numba start and kernel load (once per process, frames of {COMPILED_MIN_PIXELS:,} px and up): "
          f"{c_jit:.3f} s [{w_jit:.3f}]")

    for n in args.sizes:
        camera = CameraSpec(size_px=n)
        spec = FrameSpec(site, when, camera, layers)
        first, c_first, w_first = timed(lambda: render_frame(spec, bodies=bodies, stars=stars))
        again, c_comp, w_comp = timed(lambda: render_frame(spec, bodies=bodies, stars=stars, out=first.rgb))
        data, c_enc, w_enc = timed(lambda: encode_frame(again, "png", 8))
        ev = again.info["exposure_ev"]
        codes = [tonemap.tone_map_plane(again.rgb[k], ev, 8) for k in range(3)] + [tonemap.alpha_codes(again.alpha, 8)]
        info, png_mb = again.info, len(data) / 1e6
        del first, again, data
        _, c_floor, w_floor = timed(lambda: encode_png(codes))
        total = c_comp + c_enc
        print(f"\n{n} px night frame ({info.get('stars_drawn', 0)} stars, {info['sky_model']}, "
              f"EV {ev:+.2f}), PNG {png_mb:.1f} MB")
        print(f"  first frame (fresh buffers)      {c_first:6.3f} s  [{w_first:.3f}]")
        print(f"  compute (steady state)           {c_comp:6.3f} s  [{w_comp:.3f}]")
        print(f"  encode (tone map + PNG)          {c_enc:6.3f} s  [{w_enc:.3f}]")
        print(f"  encode floor (PNG writer only)   {c_floor:6.3f} s  [{w_floor:.3f}]")
        print(f"  compute / floor {c_comp / c_floor:5.2f}   encode / floor {c_enc / c_floor:5.2f}   "
              f"frame (compute + encode) {total:.3f} core-s = {total / c_floor:.2f} x floor")
        del codes
        kernel_ratios(spec, bodies, stars)
        peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 2 ** 20
        print(f"  peak resident memory of render + encode {peak:.2f} GiB")
        # the full direction grid (overlays, eclipse layers) is built once per camera, on first use
        cam.direction_grid.cache_clear()
        _, c_grid, w_grid = timed(lambda: cam.direction_grid(camera))
        print(f"  direction grid (once per camera, when used) {c_grid:6.3f} s  [{w_grid:.3f}]")
        peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 2 ** 20
        print(f"  peak resident memory with the grid {peak:.2f} GiB")


if __name__ == "__main__":
    main()
