"""Solar eclipse rendering checked against the eclipse geometry computed elsewhere.

* Frame brightness (the Sun's flux summed over the pixels of the eclipse layer)
  follows the uncovered fraction of the limb-darkened disk, falls monotonically
  to second contact and is symmetric about maximum at the site of greatest
  eclipse (2026-08-12, from the Besselian-element engine).
* During totality the physical sky's horizon is brighter than its zenith on
  every azimuth (light scattered in from outside the umbra).
* In a partial-phase close-up the Moon's disk, found in the image by fitting
  circles to the rendered edges, sits where the local circumstances
  (Besselian elements, Meeus 1989 procedure) put it.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from domegen.eclipse.local import local_circumstances
from domegen.eclipse.search import solar_eclipse_on
from domegen.render import camera as cam
from domegen.render.eclipse_geometry import covered_fraction_exact, disk_geometry, visible_fraction_polar
from domegen.render.eclipse_solar import SUN_MEAN_LUMINANCE, rough_visible_fraction, sun_patch
from domegen.render.spec import CameraSpec
from domegen.sky.site import Site


@pytest.fixture(scope="module")
def eclipse():
    return solar_eclipse_on("2026-08-12")


@pytest.fixture(scope="module")
def central(eclipse):
    site = Site(float(eclipse.lat_deg), float(eclipse.lon_deg), 0.0)
    lc = local_circumstances(eclipse, [site])
    return site, lc


def _frame_flux(site, utc_s, size=160, field=2.5):
    """Sun flux (cd/m^2 sr) in a small close-up frame centred on the Sun, and the DiskGeometry."""
    g = disk_geometry(site, utc_s)
    alt = math.degrees(math.asin(float(g.sun_enu[2, 0])))
    az = math.degrees(math.atan2(float(g.sun_enu[0, 0]), float(g.sun_enu[1, 0])))
    from domegen.sky.refraction import refract

    camera = CameraSpec(size_px=size, field_deg=field, view_az_deg=az,
                        view_alt_deg=float(refract(alt, site.temperature_C, site.pressure_mbar)))
    p = sun_patch(camera, site, utc_s, geom=g)
    h, w = p.rgb.shape[:2]
    theta = cam.project(camera, cam.direction_grid(camera)[p.y0:p.y0 + h, p.x0:p.x0 + w].reshape(-1, 3).T)[2]
    omega = cam.pixel_solid_angle(camera, theta).reshape(h, w)
    lum = p.rgb.astype(float) @ np.array([0.2126, 0.7152, 0.0722])
    return float((lum * omega).sum()), g


def test_visible_fraction_integrals_agree():
    # polar rough-limb integral with a smooth limb == annulus integral, over phases
    for s, q in [(0.3, 1.0), (1.2, 0.95), (0.04, 1.03), (0.05, 0.94), (1.9, 1.0)]:
        pol = visible_fraction_polar((0.6 * s, 0.8 * s), np.full(4096, q))
        assert pol == pytest.approx(1.0 - covered_fraction_exact(s, q), abs=3e-4)
    # a concentric disk of radius 0.3 hides int_0^0.3 I 2r dr / 0.805 (Allen: disk mean / centre = 0.805)
    from scipy.integrate import quad

    def allen(r):
        mu = math.sqrt(1.0 - r * r)
        return (0.30 + 0.93 * mu - 0.23 * mu * mu) * 2.0 * r

    assert covered_fraction_exact(0.0, 0.3) == pytest.approx(quad(allen, 0.0, 0.3)[0] / 0.805, rel=1e-3)


def test_frame_flux_follows_uncovered_fraction_and_is_symmetric(central):
    site, lc = central
    c1, c2, tmax = lc.utc_s["c1"][0], lc.utc_s["c2"][0], lc.utc_s["max"][0]
    times = np.linspace(c1 + 120.0, c2 - 20.0, 7)
    fluxes, fracs = [], []
    for t in times:
        flux, g = _frame_flux(site, float(t))
        full = SUN_MEAN_LUMINANCE * math.pi * math.tan(float(g.r_sun_rad[0])) ** 2
        vis = rough_visible_fraction(site, g, seed=0)
        fluxes.append(flux / full)
        fracs.append(vis)
    fluxes, fracs = np.array(fluxes), np.array(fracs)
    # brightness follows the computed uncovered fraction (2 % of the full disk, plus 3 % relative)
    assert np.all(np.abs(fluxes - fracs) < 0.02 + 0.03 * fracs), (fluxes, fracs)
    assert np.all(np.diff(fluxes) < 0), fluxes          # monotone toward second contact
    # symmetric about maximum at the central site
    for dt in (900.0, 2400.0):
        a, _ = _frame_flux(site, float(tmax - dt))
        b, _ = _frame_flux(site, float(tmax + dt))
        assert a == pytest.approx(b, rel=0.03), dt


def test_totality_horizon_brighter_than_zenith(central, eclipse):
    from domegen.render.atmosphere.physical import PhysicalSky
    from domegen.render.eclipse_solar import eclipse_light
    from domegen.render.frame import sky_light
    from domegen.render.spec import FrameSpec
    from domegen.sky.bodies import body_positions
    from domegen.sky.times import from_unix_seconds

    site, lc = central
    tmax = float(lc.utc_s["max"][0])
    spec = FrameSpec(site=site, utc=from_unix_seconds(tmax))
    bodies = body_positions(site, np.array([tmax]))
    light = eclipse_light(spec, sky_light(spec, bodies), bodies)
    assert light.extra["solar_eclipse"]["visible_fraction"] == 0.0     # totality at this instant
    az = np.radians(np.arange(0.0, 360.0, 15.0))
    alt = np.radians(3.0)
    dirs = np.stack([np.cos(alt) * np.sin(az), np.cos(alt) * np.cos(az), np.full(az.size, np.sin(alt))])
    dirs = np.concatenate([dirs, [[0.0], [0.0], [1.0]]], axis=1).astype(np.float32)
    rgb = PhysicalSky().radiance(dirs, light)
    lum = rgb.astype(float) @ np.array([0.2126, 0.7152, 0.0722])
    assert np.all(lum[:-1] > 1.5 * lum[-1]), lum
    # and totality is dark: far below the uneclipsed sky at the same instant
    plain = PhysicalSky().radiance(dirs, sky_light(spec, bodies)).astype(float) @ np.array([0.2126, 0.7152, 0.0722])
    assert lum[-1] < 1e-2 * plain[-1]


def _fit_circle(x, y):
    """Algebraic least-squares circle (Kasa fit): centre and radius."""
    a = np.stack([x, y, np.ones_like(x)], axis=1)
    b = x * x + y * y
    cx, cy, c = np.linalg.lstsq(a, b, rcond=None)[0]
    cx, cy = cx / 2, cy / 2
    return cx, cy, math.sqrt(c + cx * cx + cy * cy)


def test_moon_centre_in_closeup_matches_local_circumstances(eclipse):
    # Nantes (the scenario's dome) sees a deep partial eclipse; the picture at the local maximum
    site = Site(47.2184, -1.5536, 20.0)
    lc = local_circumstances(eclipse, [site])
    tmax = float(lc.utc_s["max"][0])
    g = disk_geometry(site, tmax)
    alt = math.degrees(math.asin(float(g.sun_enu[2, 0])))
    az = math.degrees(math.atan2(float(g.sun_enu[0, 0]), float(g.sun_enu[1, 0])))
    from domegen.sky.refraction import refract

    alt_app = float(refract(alt, site.temperature_C, site.pressure_mbar))
    camera = CameraSpec(size_px=400, field_deg=1.2, view_az_deg=az, view_alt_deg=alt_app)
    p = sun_patch(camera, site, tmax, geom=g)
    img = np.zeros((400, 400))
    h, w = p.rgb.shape[:2]
    img[p.y0:p.y0 + h, p.x0:p.x0 + w] = p.rgb.astype(float) @ np.array([0.2126, 0.7152, 0.0722])
    bright = img > 0.5 * SUN_MEAN_LUMINANCE * 0.3          # photosphere, even at the darkened limb
    # edge pixels: bright pixels with a dark 4-neighbour; split into solar-limb and lunar-limb edges
    pad = np.pad(bright, 1)
    dark_nb = ~(pad[:-2, 1:-1] & pad[2:, 1:-1] & pad[1:-1, :-2] & pad[1:-1, 2:])
    ey, ex = np.nonzero(bright & dark_nb)
    sx, sy = 200.0, 200.0                                     # the camera looks at the apparent Sun
    r_sun_px = float(g.r_sun_rad[0]) / cam.rad_per_px(camera)
    # first pass: the Sun's circle from points near its expected radius, then the rest is the Moon's edge
    d_sun = np.hypot(ex + 0.5 - sx, ey + 0.5 - sy)
    outer = np.abs(d_sun - r_sun_px) < 2.5
    cx, cy, rs = _fit_circle(ex[outer] + 0.5, ey[outer] + 0.5)
    inner = np.hypot(ex - cx, ey - cy) < rs - 2
    mx, my, rm = _fit_circle(ex[inner] + 0.5, ey[inner] + 0.5)
    sep_px = math.hypot(mx - cx, my - cy)
    # local circumstances: magnitude = (r_s + r_m - sep) / (2 r_s) at maximum
    r_s = float(g.r_sun_rad[0]) / cam.rad_per_px(camera)
    r_m = float(g.r_moon_rad[0]) / cam.rad_per_px(camera)
    sep_expected = r_s + r_m - 2.0 * r_s * float(lc.magnitude[0])
    assert rm == pytest.approx(r_m, rel=0.01)
    assert abs(sep_px - sep_expected) < 0.01 * 2 * r_s, (sep_px, sep_expected)


def test_darkness_comes_from_the_shadow_side_and_leaves_on_the_other(central):
    """Horizon toward the approaching umbra darkens first; after C3 that side recovers and the other darkens.

    Compared as a ratio of the two opposite horizons at the same azimuths before C2 and after C3
    (four minutes apart), so the Sun's forward-scattering glow cancels out.
    """
    from domegen.render.atmosphere.physical import PhysicalSky
    from domegen.render.eclipse_geometry import shadow_function
    from domegen.render.eclipse_solar import eclipse_light
    from domegen.render.frame import sky_light
    from domegen.render.spec import FrameSpec
    from domegen.sky.bodies import body_positions
    from domegen.sky.times import from_unix_seconds

    site, lc = central
    az = np.radians(np.arange(0.0, 360.0, 10.0))
    ring = np.stack([np.sin(az) * 1e5, np.cos(az) * 1e5, np.full(az.size, 1e4)])
    sky = PhysicalSky()
    before, after = float(lc.utc_s["c2"][0]) - 30.0, float(lc.utc_s["c3"][0]) + 30.0

    def umbra_side(t):
        """Azimuth of the darkest part of a 100 km ring around the site (shadow geometry)."""
        f = shadow_function(disk_geometry(site, t))(ring)
        w = f.max() - f
        return math.atan2(float(w @ np.sin(az)), float(w @ np.cos(az)))

    where = [umbra_side(t) for t in (before, after)]
    # the umbra arrives from one side and leaves toward the other
    turn = abs((math.degrees(where[1] - where[0]) + 180.0) % 360.0 - 180.0)
    assert turn > 120.0, turn
    alt = np.radians(4.0)
    a0 = where[0]
    d = np.array([[np.cos(alt) * np.sin(a), np.cos(alt) * np.cos(a), np.sin(alt)]
                  for a in (a0, a0 + np.pi)]).T.astype(np.float32)
    ratio = []
    for t in (before, after):
        spec = FrameSpec(site=site, utc=from_unix_seconds(t))
        bodies = body_positions(site, np.array([t]))
        light = eclipse_light(spec, sky_light(spec, bodies), bodies)
        lum = sky.radiance(d, light).astype(float) @ np.array([0.2126, 0.7152, 0.0722])
        ratio.append(lum[0] / lum[1])
    assert ratio[0] < 0.8 * ratio[1], ratio
