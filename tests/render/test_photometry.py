"""Photometry: flux conservation of splats, Pogson ratios, the Moon's phase and bright limb."""

from __future__ import annotations

import math
from datetime import datetime, timezone

import numpy as np
import pytest

from domegen.render.camera import pixel_solid_angle, project
from domegen.render.frame import render_frame
from domegen.render.layer_bodies import limb_darkening
from domegen.render.spec import CameraSpec, FrameSpec, LayerSpec
from domegen.render.splat import LUX_AT_V0, splat_sources
from domegen.sky.bodies import body_positions
from domegen.sky.frames import altaz_to_enu
from domegen.sky.site import Site
from domegen.sky.stars import StarField

NANTES = Site(47.2184, -1.5536, 20.0, timezone="Europe/Paris")


def test_summed_signal_constant_under_subpixel_shifts():
    # Energy conservation: the same star moved by fractions of a pixel keeps its total within 1 %
    # (issue 3 acceptance; the splat renormalises its pixel-integrated weights exactly).
    n = 128
    rng = np.random.default_rng(5)
    totals = []
    for dx, dy in rng.random((40, 2)):
        planes = np.zeros((3, n, n), np.float32)
        splat_sources(planes, 4096, np.array([60.0 + dx]), np.array([61.0 + dy]),
                      np.array([[1e-6, 1e-6, 1e-6]]), np.array([1e-6]))
        totals.append(planes[1].sum(dtype=np.float64) * 1e-6)
    totals = np.array(totals)
    assert np.ptp(totals) / totals.mean() < 0.01
    assert abs(totals.mean() - 1e-6) / 1e-6 < 1e-3   # sum(radiance * Omega) = illuminance


def test_bright_source_gets_a_halo_not_a_single_pixel():
    n = 160
    planes = np.zeros((3, n, n), np.float32)
    splat_sources(planes, 4096, np.array([80.3]), np.array([80.6]), np.full((1, 3), LUX_AT_V0 * 10 ** 0.6),
                  np.array([1e-6]))
    p = planes[1]
    lit = p > p.max() * 1e-3
    assert lit.sum() > 100        # light spread over a soft halo
    assert p.max() / p.sum() < 0.3


def _synthetic_stars(vmags, alt_deg=50.0, az_deg=(100.0, 140.0)):
    alt = np.full(len(vmags), alt_deg)
    az = np.array(az_deg[:len(vmags)], dtype=float)
    enu = altaz_to_enu(alt, az)
    return StarField(hip=np.arange(len(vmags)), alt_deg=alt, az_deg=az, enu=enu, vmag=np.array(vmags, float),
                     bv=np.zeros(len(vmags)), rgb=np.ones((len(vmags), 3)), utc_s=0.0, refracted=True)


def test_five_magnitudes_are_a_hundred_times_in_the_image():
    # Pogson: m1 - m2 = -2.5 log10(F1/F2), so 5 mag = 100x (common practice).
    when = datetime(2026, 8, 12, 23, 0, tzinfo=timezone.utc)
    layers = LayerSpec(atmosphere=0.0, ground=0.0, sun=0.0, moon=0.0, planets=0.0)
    spec = FrameSpec(NANTES, when, CameraSpec(size_px=512), layers)
    stars = _synthetic_stars([1.0, 6.0], az_deg=(60.0, 200.0))
    r = render_frame(spec, stars=stars)
    x, y, theta = project(spec.camera, stars.enu)
    sums = []
    for k in range(2):
        xi, yi = int(x[k]), int(y[k])
        sums.append(r.rgb[1, yi - 70:yi + 71, xi - 70:xi + 71].sum(dtype=np.float64) * pixel_solid_angle(spec.camera, theta[k]))
    assert abs(sums[0] / sums[1] / 100.0 - 1.0) < 0.01
    # and the absolute level: E = 2.54e-6 * 10^(-0.4 V) lx (Hollan 2001) times the point gain
    # (no atmosphere in this frame, so no extinction)
    t = r.info["point_gain"] * LUX_AT_V0 * 10 ** (-0.4 * 6.0)
    assert abs(sums[1] / t - 1) < 0.01


def _moon_closeup(when, size=256, field=1.0):
    b = body_positions(NANTES, when).body("Moon")
    cam = CameraSpec(size_px=size, field_deg=field, view_az_deg=float(b.az_deg[0]),
                     view_alt_deg=float(b.alt_refracted_deg[0]))
    layers = LayerSpec(stars=0.0, planets=0.0, sun=0.0, ground=0.0, atmosphere=0.0, exposure_ev=10.0)
    return render_frame(FrameSpec(NANTES, when, cam, layers)), b, cam


# Crescent, quarter, gibbous: instants with the Moon well above the horizon at Nantes (checked with our engine).
PHASES = [datetime(2026, 8, 17, 19, 0, tzinfo=timezone.utc), datetime(2026, 8, 20, 18, 0, tzinfo=timezone.utc),
          datetime(2026, 8, 24, 21, 0, tzinfo=timezone.utc), datetime(2026, 9, 2, 5, 0, tzinfo=timezone.utc)]


@pytest.mark.parametrize("when", PHASES, ids=lambda d: d.strftime("%m%d"))
def test_moon_lit_fraction_matches_the_sky_engine(when):
    r, b, cam = _moon_closeup(when)
    assert b.alt_deg[0] > 5
    lum = 0.2126 * r.rgb[0] + 0.7152 * r.rgb[1] + 0.0722 * r.rgb[2]
    # disk from geometry: pixels within the angular radius of the centre (coverage-weighted by 4x4 subsamples)
    n = cam.size_px
    ys, xs = np.mgrid[0:n, 0:n]
    rad_px = b.angular_radius_deg[0] / (cam.field_deg / n)
    rr = np.hypot(xs + 0.5 - n / 2, ys + 0.5 - n / 2)
    disk = rr < rad_px - 1.0
    lit = lum > 1e-3 * lum.max()
    frac = lit[disk].sum() / disk.sum()
    assert abs(frac - b.illuminated_fraction[0]) < 0.02
    # the whole disk (earthshine included) is drawn where the camera puts the Moon: centroid within 0.5 px
    # (1 px = 14 arcsec here), and its radius matches the sky engine's angular radius
    cover = lum > 0
    cy, cx = (ys[cover] + 0.5).mean(), (xs[cover] + 0.5).mean()
    assert math.hypot(cx - n / 2, cy - n / 2) < 0.5
    assert abs(math.sqrt(cover.sum() / math.pi) - rad_px) < 1.0


@pytest.mark.parametrize("when", PHASES[:3], ids=lambda d: d.strftime("%m%d"))
def test_moon_bright_limb_faces_the_sun_pixel(when):
    r, b, cam = _moon_closeup(when)
    sun = body_positions(NANTES, when).body("Sun")
    sx, sy, _ = project(cam, sun.enu_refracted[:, 0])
    n = cam.size_px
    # the lit part (above earthshine) is symmetric about the Sun's direction whatever the albedo
    lum = (r.rgb[1] > 1e-3 * r.rgb[1].max()).astype(np.float64)
    ys, xs = np.mgrid[0:n, 0:n]
    cx, cy = (lum * (xs + 0.5)).sum() / lum.sum(), (lum * (ys + 0.5)).sum() / lum.sum()
    got = math.atan2(cy - n / 2, cx - n / 2)
    want = math.atan2(float(sy) - n / 2, float(sx) - n / 2)   # Moon at the centre: a straight line (equidistant)
    diff = abs((math.degrees(got - want) + 180) % 360 - 180)
    assert diff < 3.0


def test_sun_disk_carries_the_sun_illuminance():
    # Limb-darkened disk normalised to E = 2.54e-6 * 10^(-0.4 V) (Hollan 2001) times the transmittance.
    when = datetime(2026, 6, 21, 12, 0, tzinfo=timezone.utc)
    b = body_positions(NANTES, when).body("Sun")
    cam = CameraSpec(size_px=256, field_deg=1.2, view_az_deg=float(b.az_deg[0]), view_alt_deg=float(b.alt_refracted_deg[0]))
    layers = LayerSpec(stars=0.0, planets=0.0, moon=0.0, ground=0.0, atmosphere=0.0, exposure_ev=0.0)
    spec = FrameSpec(NANTES, when, cam, layers)
    r = render_frame(spec)
    jj, ii = np.meshgrid(np.arange(256) + 0.5, np.arange(256) + 0.5)
    theta = np.hypot(jj - 128, ii - 128) / 128 * math.radians(0.6)
    e = (r.rgb[1] * pixel_solid_angle(cam, theta)).sum(dtype=np.float64)
    e_sun = LUX_AT_V0 * 10 ** (-0.4 * b.magnitude[0])   # no atmosphere: no extinction
    # Veiling glare, CIE 146:2002 disability glare L = 10 E / theta^2 (theta in deg; flat below 0.1 deg,
    # tapered to 0 at 30 deg): the part beyond this 0.6 deg radius frame is missing from the sum.
    t = np.linspace(0.0, 30.0, 300_001)
    prof = 10.0 / np.maximum(t, 0.1) ** 2 * (1 - t / 30.0) ** 2 * np.sin(np.radians(t)) * 2 * np.pi
    outside = np.trapezoid(np.where(t > 0.6, prof, 0.0), np.radians(t))
    assert abs(e / (e_sun * (1.0 - outside)) - 1.0) < 0.01


def test_limb_darkening_law_values():
    # Neckel & Labs (1994) polynomials: I(1) = 1 by construction; at mu = 0 the 541.8 nm row gives
    # A0 / sum(A) = 0.26073 / 1.0 (the table's normalised coefficients).
    ld = limb_darkening(np.array([1.0, 0.0]))
    assert np.allclose(ld[0], 1.0)
    assert abs(ld[1, 1] - 0.26073 / 1.0) < 2e-3
    assert ld[1, 2] < ld[1, 1] < ld[1, 0]     # blue darkens more toward the limb (REFERENCES 3.1 source)


def test_tabulated_erf_matches_the_standard_library_everywhere():
    # math.erf (C99 erf, correctly rounded to ~1 ulp) is the reference; the table's bound is
    # step^2/8 * max|erf''| = 2.9e-8 (linear interpolation error, common practice).
    import math

    from domegen.render.splat import erf

    x = np.concatenate([np.linspace(-8, 8, 200_001), np.random.default_rng(5).normal(0, 2, 20_000)])
    want = np.array([math.erf(v) for v in x])
    got = erf(x)
    assert np.max(np.abs(got - want)) < 3e-8
    assert np.all(np.diff(erf(np.linspace(-7, 7, 100_001))) >= 0)   # monotone: weights never negative
