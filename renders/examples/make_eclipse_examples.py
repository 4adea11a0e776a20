"""Regenerate the eclipse example frames in this folder (run from the repository root).

    /work/venv/bin/python renders/examples/make_eclipse_examples.py [--size 1024] [--only NAME]

Every frame goes through the normal renderer (domegen.render.frame.render_frame);
the eclipse layers come from its hooks.  Instants come from the eclipse engine
(local circumstances / lunar contacts), never typed in.
"""

from __future__ import annotations

import argparse
import math
import sys
from datetime import timedelta

import numpy as np


def _sun_view(site, utc):
    from domegen.sky.bodies import body_positions
    from domegen.sky.times import unix_seconds

    b = body_positions(site, np.array([unix_seconds(utc)]), names=("Sun", "Moon"))
    return float(b.alt_refracted_deg[0, 0]), float(b.az_deg[0, 0]), float(b.alt_refracted_deg[1, 0]), float(b.az_deg[1, 0])


def _frame(site, utc, camera, path, **layers):
    from domegen.render.frame import render_frame
    from domegen.render.output import write_frame
    from domegen.render.spec import FrameSpec, LayerSpec

    spec = FrameSpec(site=site, utc=utc, camera=camera, layers=LayerSpec(**layers))
    fr = render_frame(spec)
    write_frame(fr, path)
    print(path, utc.isoformat(), "EV", fr.info.get("exposure_ev"), fr.info.get("solar_eclipse") or "",
          fr.info.get("lunar_eclipse") or "", flush=True)
    return fr


def main(argv=None) -> None:
    from domegen.eclipse.local import local_circumstances
    from domegen.eclipse.lunar import lunar_eclipse_on
    from domegen.eclipse.search import solar_eclipse_on
    from domegen.render.spec import CameraSpec
    from domegen.sky.site import Site

    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--size", type=int, default=1024)
    ap.add_argument("--only", default=None)
    ap.add_argument("--out", default="renders/examples")
    a = ap.parse_args(argv)
    n, out = a.size, a.out

    def want(name):
        return a.only is None or a.only in name

    nantes = Site(47.2184, -1.5536, 20.0, timezone="Europe/Paris", name="Loire Valley Science Dome")
    burgos = Site(42.34, -3.70, 850.0, timezone="Europe/Madrid", name="near Burgos")
    ecl = solar_eclipse_on("2026-08-12")
    lc_n = local_circumstances(ecl, [nantes])
    lc_b = local_circumstances(ecl, [burgos])

    if want("eclipse-partial"):
        t = lc_n.utc("max") - timedelta(minutes=20)
        alt, az, _, _ = _sun_view(nantes, t)
        _frame(nantes, t, CameraSpec(size_px=n, front_az_deg=az), f"{out}/eclipse-partial-dome.png")
        # through a solar filter: optical density 5 (1e-5 transmission) = 16.6 EV darker than the eye
        _frame(nantes, t, CameraSpec(size_px=n, field_deg=2.5, view_az_deg=az, view_alt_deg=alt),
               f"{out}/eclipse-partial-closeup-filtered.png", exposure_ev=-13.0)
    c2, c3, tmax = lc_b.utc("c2"), lc_b.utc("c3"), lc_b.utc("max")
    alt, az, _, _ = _sun_view(burgos, tmax)
    close = CameraSpec(size_px=n, field_deg=2.5, view_az_deg=az, view_alt_deg=alt)
    if want("eclipse-diamond-ring"):
        # fixed exposure so the last beads of photosphere stand out from the inner corona
        t = c2 - timedelta(seconds=2.5)
        dalt, daz, _, _ = _sun_view(burgos, t)
        _frame(burgos, t, CameraSpec(size_px=n, field_deg=1.5, view_az_deg=daz, view_alt_deg=dalt),
               f"{out}/eclipse-diamond-ring.png", exposure_ev=1.0)
    if want("eclipse-totality"):
        _frame(burgos, tmax, CameraSpec(size_px=n, front_az_deg=az), f"{out}/eclipse-totality-dome.png")
        _frame(burgos, tmax, close, f"{out}/eclipse-totality-closeup.png")
    if want("eclipse-c2-sequence"):
        from PIL import Image

        tiles = []
        for i, dt in enumerate((-8.0, -3.0, -1.5, -0.5, 0.5, 3.0)):
            p = f"/tmp/eclipse-c2-{i}.png"
            t = c2 + timedelta(seconds=dt)
            salt, saz, _, _ = _sun_view(burgos, t)
            _frame(burgos, t, CameraSpec(size_px=n // 2, field_deg=1.5, view_az_deg=saz, view_alt_deg=salt), p,
                   exposure_ev=1.0)
            tiles.append(Image.open(p).convert("RGB"))
        w = tiles[0].width
        sheet = Image.new("RGB", (3 * w, 2 * w))
        for i, im in enumerate(tiles):
            sheet.paste(im, ((i % 3) * w, (i // 3) * w))
        sheet.save(f"{out}/eclipse-c2-sequence.png")
        print(f"{out}/eclipse-c2-sequence.png: C2 -8, -3, -1.5, -0.5, +0.5, +3 s")
    if want("eclipse-annular"):
        ann = solar_eclipse_on("2023-10-14")
        albuquerque = Site(35.0844, -106.6504, 1500.0, timezone="America/Denver", name="Albuquerque")
        lc_a = local_circumstances(ann, [albuquerque])
        t = lc_a.utc("max")
        alt, az, _, _ = _sun_view(albuquerque, t)
        # annularity is a partial phase for the eyes: seen through a solar filter (density 5)
        _frame(albuquerque, t, CameraSpec(size_px=n, field_deg=1.2, view_az_deg=az, view_alt_deg=alt),
               f"{out}/eclipse-annular-ring-filtered.png", exposure_ev=-13.0)
    if want("eclipse-lunar"):
        le = lunar_eclipse_on("2029-12-20")
        t = le.contacts_utc["greatest"]
        _, _, malt, maz = _sun_view(nantes, t)
        _frame(nantes, t, CameraSpec(size_px=n, front_az_deg=maz), f"{out}/eclipse-lunar-total-dome.png")
        _frame(nantes, t, CameraSpec(size_px=n, field_deg=2.0, view_az_deg=maz, view_alt_deg=malt),
               f"{out}/eclipse-lunar-total-closeup.png", exposure_ev=12.0)


if __name__ == "__main__":
    main()
    from domegen.eclipse.safety import CAUTION

    print(CAUTION)
