"""Eclipse rendering benchmark: a 4K totality dome frame with and without the eclipse layers.

Burgos, 2026-08-12 at maximum (from the local circumstances).  Three runs of
render_frame side by side in one process, bodies and stars precomputed as a
sequence does, the output buffer reused:

* "plain": the same instant with the eclipse hooks switched off (the
  renderer's own budget for that sky),
* "eclipse": the eclipse hooks on (shadow volume in the sky, photosphere,
  corona and limb), then encoded as the farm does (tone map + PNG): the
  target is the renderer's 4K budget (2 core-s a frame) plus at most 50 %,
  and the ratio to the plain frame is shown beside it,
* the eclipse layer alone (sun_patch), and the shadow function per point.

CPU seconds of this process (core-seconds), wall time in brackets.

    /work/venv/bin/python benchmarks/bench_eclipse_render.py [--size 4096]
"""

from __future__ import annotations

import argparse

import domegen.cli.main  # noqa: F401  - the command line's process set-up (one math-library thread), before numpy

import numpy as np

from _timing import timed




def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--size", type=int, default=4096)
    args = ap.parse_args()

    from domegen.eclipse.local import local_circumstances
    from domegen.eclipse.search import solar_eclipse_on
    from domegen.render import frame
    from domegen.render.eclipse_geometry import disk_geometry, shadow_function
    from domegen.render.eclipse_solar import sun_patch
    from domegen.render.spec import CameraSpec, FrameSpec, LayerSpec
    from domegen.sky.bodies import body_positions
    from domegen.sky.site import Site
    from domegen.sky.stars import star_field
    from domegen.sky.times import unix_seconds

    site = Site(42.34, -3.70, 850.0, timezone="Europe/Madrid")
    ecl = solar_eclipse_on("2026-08-12")
    utc = local_circumstances(ecl, [site]).utc("max")
    u = unix_seconds(utc)
    bodies = body_positions(site, np.array([u]))
    az = float(bodies.az_deg[0, 0])
    spec = FrameSpec(site=site, utc=utc, camera=CameraSpec(size_px=args.size, front_az_deg=az), layers=LayerSpec())
    stars = star_field(site, utc)
    out = np.empty((3, args.size, args.size), np.float32)
    frame.render_frame(spec, bodies=bodies, stars=stars, out=out)            # warm caches and tables

    real = frame.eclipse_modules
    frame.eclipse_modules = lambda b: []
    _, c_plain, w_plain = timed(lambda: frame.render_frame(spec, bodies=bodies, stars=stars, out=out))
    frame.eclipse_modules = real
    rendered, c_ecl, w_ecl = timed(lambda: frame.render_frame(spec, bodies=bodies, stars=stars, out=out))
    from domegen.render.output import encode_frame

    _, c_enc, w_enc = timed(lambda: encode_frame(rendered, "png", 8))

    g = disk_geometry(site, u)
    _, c_patch, w_patch = timed(lambda: sun_patch(spec.camera, site, u, geom=g))
    f = shadow_function(g)
    pts = np.random.default_rng(0).normal(0, 3e5, (3, 1_000_000))
    _, c_sh, w_sh = timed(lambda: f(pts))

    print(f"{args.size} px totality dome frame, {utc.isoformat()}")
    print(f"  plain (hooks off)   {c_plain:7.2f} s CPU  [{w_plain:6.2f} s wall]")
    print(f"  eclipse (hooks on)  {c_ecl:7.2f} s CPU  [{w_ecl:6.2f} s wall]   {c_ecl / c_plain:5.2f} x plain")
    print(f"  eclipse frame + PNG {c_ecl + c_enc:7.2f} s CPU  [{w_ecl + w_enc:6.2f} s wall]   "
          f"target <= 3.0 core-s (renderer budget 2 core-s + 50 %)")
    print(f"  sun_patch alone     {c_patch:7.2f} s CPU  [{w_patch:6.2f} s wall]")
    print(f"  shadow(), 1e6 pts   {c_sh:7.2f} s CPU  [{w_sh:6.2f} s wall]")


if __name__ == "__main__":
    main()
