"""The diamond ring: near-field glare of the last beads of photosphere before second contact."""

from __future__ import annotations

from datetime import timedelta

import numpy as np
import pytest

from domegen.render import eclipse_solar
from domegen.render.eclipse_solar import BLOOM_OUTER_DEG, bead_bloom_kernel


def test_kernel_follows_the_disability_glare_law():
    # CIE 146:2002 (simplified Stiles-Holladay): L_veil = 10 E / theta^2 cd/m^2 (E lux, theta deg),
    # continued inside 0.1 deg with the Sun-centred part (flat there) subtracted.
    deg_per_px = 0.001
    k = bead_bloom_kernel(deg_per_px)
    r = k.shape[0] // 2
    for theta in (0.01, 0.03, 0.05):
        px = int(round(theta / deg_per_px))
        assert k[r, r + px] == pytest.approx(10.0 * (1 / theta**2 - 1 / BLOOM_OUTER_DEG**2), rel=1e-6)
    assert k[r, -1] == pytest.approx(0.0, abs=1e-6)       # vanishes at 0.1 deg
    assert bead_bloom_kernel(0.2) is None                  # below one pixel: the ordinary glare covers it


def _closeup(monkeypatch, bloom: bool):
    from domegen.eclipse.local import local_circumstances
    from domegen.eclipse.search import solar_eclipse_on
    from domegen.render.frame import render_frame
    from domegen.render.spec import CameraSpec, FrameSpec, LayerSpec
    from domegen.sky.bodies import body_positions
    from domegen.sky.site import Site
    from domegen.sky.times import unix_seconds

    if not bloom:
        monkeypatch.setattr(eclipse_solar, "BLOOM_MAX_FRACTION", 0.0)
    site = Site(42.34, -3.70, 850.0, timezone="Europe/Madrid")
    lc = local_circumstances(solar_eclipse_on("2026-08-12"), [site])
    t = lc.utc("c2") - timedelta(seconds=2.5)
    sun = body_positions(site, unix_seconds(t), names=("Sun",)).body("Sun")
    cam = CameraSpec(size_px=256, field_deg=1.5, view_az_deg=float(sun.az_deg[0]),
                     view_alt_deg=float(sun.alt_refracted_deg[0]))
    fr = render_frame(FrameSpec(site=site, utc=t, camera=cam, layers=LayerSpec(exposure_ev=1.0)))
    return fr


def test_last_bead_flares_into_a_diamond(monkeypatch):
    # Common practice (eclipse photography and visual reports): seconds before C2 the last bead is a
    # brilliant point whose flare outshines the inner corona; without the near-field glare it is a
    # sliver of a few pixels.
    from domegen.render.tonemap import exposure_scale

    with_bloom = _closeup(monkeypatch, True)
    monkeypatch.undo()
    plain = _closeup(monkeypatch, False)
    scale = exposure_scale(1.0)
    lum = lambda fr: np.tensordot(np.array([0.2126, 0.7152, 0.0722]), fr.rgb, axes=1) * scale
    bright_bloom = int((lum(with_bloom) > 1.0).sum())
    bright_plain = int((lum(plain) > 1.0).sum())
    assert 0.0 < with_bloom.info["solar_eclipse"]["visible_fraction"] < 1e-3
    assert bright_bloom > 2 * max(bright_plain, 1)
