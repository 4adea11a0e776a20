"""The procedural ground's pixel set against a brute-force, per-pixel evaluation of the whole frame."""

from __future__ import annotations

import numpy as np
import pytest

from domegen.render.camera import unproject
from domegen.render.layer_ground import _TABLE, ground_layout, skyline_table
from domegen.render.spec import CameraSpec


@pytest.mark.parametrize("camera", [CameraSpec(size_px=1000, tilt_deg=30.0, front_az_deg=200.0),
                                    CameraSpec(size_px=512),
                                    CameraSpec(size_px=640, field_deg=220.0, tilt_deg=10.0),
                                    CameraSpec(size_px=600, field_deg=90.0, view_az_deg=100.0, view_alt_deg=5.0)],
                         ids=lambda c: f"n{c.size_px}f{c.field_deg:g}t{c.tilt_deg:g}")
def test_solid_runs_and_edge_pixels_are_the_ground_a_full_frame_search_finds(camera):
    # Brute force over every pixel centre: coverage clip((skyline - alt) / px + 1/2) > 0 inside the
    # circle and its rim (the layer's own definition); whole flat ground must be fully covered.
    g = ground_layout(camera, 3, None, None)
    n = camera.size_px
    deg_px = camera.field_deg / n
    jj, ii = np.meshgrid(np.arange(n) + 0.5, np.arange(n) + 0.5)
    d = unproject(camera, jj, ii)
    alt = np.degrees(np.arcsin(np.clip(d[2], -1, 1)))
    az = np.degrees(np.arctan2(d[0], d[1])) % 360.0
    table = skyline_table(3)
    sky_h = np.interp(az / 360.0 * _TABLE, np.arange(_TABLE + 1), np.append(table, table[0]))
    cov = np.clip((sky_h - alt) / deg_px + 0.5, 0.0, 1.0)
    rim = np.hypot(jj - n / 2, ii - n / 2) <= n / 2 * (1 + 2.0 / n)
    want = rim & (cov > 0)
    got = np.zeros((n, n), bool)
    got.reshape(-1)[g.idx] = True
    solid = np.zeros((n, n), bool)
    for r0, r1, c0, c1 in g.runs:
        assert not solid[r0:r1, c0:c1].any()          # runs do not overlap
        solid[r0:r1, c0:c1] = True
    assert not (got & solid).any()
    # float32 directions may move pixels lying within 1e-3 px of the coverage edge
    edge = rim & (np.abs((sky_h - alt) / deg_px + 0.5) < 1e-3)
    assert not ((got | solid) ^ want)[~edge].any()
    assert np.all(cov[solid] == 1.0) and np.all(alt[solid] < -0.5 * deg_px)
    if camera.tilt_deg >= 30:
        assert solid.sum() > 0.5 * want.sum()          # most of a tilted dome's ground is whole blocks
    assert g.cov.min() > 0 and g.cov.max() <= 1
