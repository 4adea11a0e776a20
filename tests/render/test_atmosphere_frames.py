"""The physical sky through the renderer: small frames at noon, sunset and night."""

from __future__ import annotations

from datetime import datetime, timezone

import numpy as np
import pytest

from domegen.render.frame import render_frame
from domegen.render.spec import CameraSpec, FrameSpec, LayerSpec
from domegen.sky.site import Site

SITE = Site(lat_deg=47.2184, lon_deg=-1.5536, elev_m=20.0, name="Loire Valley Science Dome",
            timezone="Europe/Paris")


def frame(utc, **layers):
    spec = FrameSpec(site=SITE, utc=utc, camera=CameraSpec(size_px=128),
                     layers=LayerSpec(sky_model="physical", stars=0.0, planets=0.0, **layers))
    return render_frame(spec)


def zenith_rgb(rendered):
    n = rendered.rgb.shape[1]
    return rendered.rgb[:, n // 2 - 2:n // 2 + 2, n // 2 - 2:n // 2 + 2].reshape(3, -1).mean(axis=1)


@pytest.fixture(scope="module")
def frames():
    return {
        "noon": frame(datetime(2026, 6, 21, 12, 8, tzinfo=timezone.utc)),
        "night": frame(datetime(2026, 8, 12, 23, 30, tzinfo=timezone.utc), light_pollution_bortle=1),
    }


def test_physical_sky_is_used_and_noon_zenith_is_blue(frames):
    noon = zenith_rgb(frames["noon"])
    assert frames["noon"].info["sky_model"] == "PhysicalSky"
    assert noon[2] > noon[0]
    assert 2000.0 < float(noon @ np.array([0.2126, 0.7152, 0.0722])) < 12000.0


def test_night_frame_is_darker_with_a_lower_exposure_value(frames):
    night = zenith_rgb(frames["night"])
    y = float(night @ np.array([0.2126, 0.7152, 0.0722]))
    assert 1e-4 < y < 5e-4  # ~21.8 mag/arcsec^2 = 2.0e-4 cd/m^2 (Bortle 1)
    assert frames["night"].info["exposure_ev"] > frames["noon"].info["exposure_ev"] + 10
