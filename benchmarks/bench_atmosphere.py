"""Atmosphere timings (table build, coarse-grid radiance for 4K frames, extinction, exposure).

Run: python benchmarks/bench_atmosphere.py [--examples]   (--examples also renders the
1024 px example frames into renders/examples/atmosphere-*.png through the renderer)
"""

from __future__ import annotations

import argparse

import domegen.cli.main  # noqa: F401  - the command line's process set-up (one math-library thread), before numpy
import os
import tempfile
import time
from datetime import datetime, timezone
from pathlib import Path

import numpy as np


def _enu(alt_deg, az_deg):
    a, z = np.radians(alt_deg), np.radians(az_deg)
    return np.array([np.cos(a) * np.sin(z), np.cos(a) * np.cos(z), np.sin(a)])


def _timed(fn, repeat=5):
    """Best CPU time (core-seconds of this process, robust on a shared machine) and the result."""
    best = np.inf
    for _ in range(repeat):
        t0 = time.process_time()
        out = fn()
        best = min(best, time.process_time() - t0)
    return best, out


def bench() -> None:
    os.environ.setdefault("DOMEGEN_CACHE_DIR", tempfile.mkdtemp(prefix="domegen-bench-"))
    from domegen.render.atmosphere import PhysicalSky, auto_exposure_ev
    from domegen.render.atmosphere.scatter import build_site_table
    from domegen.render.atmosphere.tables import tables_for
    from domegen.render.sky_model import SkyLight

    sky = PhysicalSky()
    ref = np.random.default_rng(1).random(1_000_000).astype(np.float32)
    t_ref, _ = _timed(lambda: np.exp(ref), 5)
    print(f"machine reference: exp of 1e6 float32 {t_ref * 1e3:.2f} ms CPU (about 1-2 ms on an idle core)")
    t0 = time.process_time()
    tables_for(sky.atmosphere)
    t1 = time.process_time()
    build_site_table(sky.atmosphere, 0.0)
    t2 = time.process_time()
    print(f"table build: transmittance + multiple scattering {t1 - t0:.2f} core-s, site table {t2 - t1:.2f} core-s "
          "(once per atmosphere and site height; the site table is cached on disk)")
    m = 256  # the renderer's coarse grid for a 4096 px frame (size // 16)
    rng = np.random.default_rng(0)
    d = rng.normal(size=(3, m * m))
    d /= np.linalg.norm(d, axis=0)
    d[2] = np.abs(d[2])
    d = d.astype(np.float32)
    sky.radiance(d[:, :10], SkyLight(sun_enu=_enu(30, 200), sun_alt_deg=30.0))  # load the table
    cases = {
        "day (Sun 45)": SkyLight(sun_enu=_enu(45, 180), sun_alt_deg=45.0),
        "sunset (Sun 1)": SkyLight(sun_enu=_enu(1, 290), sun_alt_deg=1.0),
        "night + Moon + Bortle 5": SkyLight(sun_enu=_enu(-30, 0), sun_alt_deg=-30.0, moon_enu=_enu(40, 160),
                                            moon_alt_deg=40.0, moon_illuminance_lux=0.25,
                                            light_pollution_mag_arcsec2=20.3),
    }
    budget = 2.0
    for name, light in cases.items():
        t, _ = _timed(lambda: sky.radiance(d, light))
        te, _ = _timed(lambda: auto_exposure_ev(light), 3)
        print(f"{name:26s} radiance {m}x{m}={m * m} dirs: {t * 1e3:7.1f} ms  auto exposure {te * 1e3:6.1f} ms"
              f"  share of a {budget:.0f} core-s 4K budget: {100 * (t + te) / budget:5.1f} %")
    stars = rng.uniform(-5, 90, 20000)
    t, _ = _timed(lambda: sky.transmittance(stars, cases["day (Sun 45)"]))
    print(f"transmittance for 20000 stars: {t * 1e3:.1f} ms")
    ecl = SkyLight(sun_enu=_enu(45, 180), sun_alt_deg=45.0,
                   shadow=lambda p: np.clip(np.hypot(p[0], p[1]) / 100e3 - 0.5, 0.0, 1.0))
    t, _ = _timed(lambda: sky.radiance(d, ecl), 2)
    tl, _ = _timed(lambda: sky.radiance(d, cases["day (Sun 45)"]), 3)
    print(f"eclipse (ray-marched correction on 32x49 directions, {sky.march_steps} samples/ray) for "
          f"{m}x{m} dirs: {t * 1e3:.1f} ms vs table {tl * 1e3:.1f} ms")


def bench_frames(size_px: int = 4096) -> None:
    """Full 4K frames through the renderer (render + PNG encode), and the sky's share of them."""
    from domegen.render import frame as frame_mod
    from domegen.render.output import encode_frame
    from domegen.render.spec import CameraSpec, FrameSpec, LayerSpec
    from domegen.sky.site import Site

    site = Site(lat_deg=47.2184, lon_deg=-1.5536, elev_m=20.0, name="Loire Valley Science Dome",
                timezone="Europe/Paris")
    cases = {"day": datetime(2026, 6, 21, 12, 8, tzinfo=timezone.utc),
             "night": datetime(2026, 8, 12, 23, 30, tzinfo=timezone.utc)}
    for name, utc in cases.items():
        spec = FrameSpec(site=site, utc=utc, camera=CameraSpec(size_px=size_px),
                         layers=LayerSpec(sky_model="physical", light_pollution_bortle=4))
        frame_mod.render_frame(spec)  # warm caches (tables, stars)
        sky_time = [0.0]
        real = frame_mod.coarse_sky

        def timed_coarse(*a, **k):
            t0 = time.process_time()
            out = real(*a, **k)
            sky_time[0] += time.process_time() - t0
            return out

        frame_mod.coarse_sky = timed_coarse
        try:
            c0 = time.process_time()
            w0 = time.perf_counter()
            rendered = frame_mod.render_frame(spec)
            encode_frame(rendered, "png", 8, None)
            cpu = time.process_time() - c0
            wall = time.perf_counter() - w0
        finally:
            frame_mod.coarse_sky = real
        print(f"4K {name} frame: {cpu:.2f} core-s ({wall:.2f} s wall) incl. PNG encode; sky radiance "
              f"{sky_time[0]:.3f} core-s = {100 * sky_time[0] / cpu:.1f} % (budget 2 core-s)")


def _time_at_sun_alt(site, day_utc: datetime, target_deg: float, evening: bool) -> datetime:
    """Instant of the day when the Sun's airless altitude crosses target_deg (evening or morning)."""
    from domegen.sky.bodies import body_positions

    t0 = day_utc.timestamp()
    ts = t0 + np.arange(0, 86400, 60.0)
    alt = body_positions(site, ts, names=("Sun",)).body("Sun").alt_deg
    i_noon = int(np.argmax(alt))
    seg = slice(i_noon, None) if evening else slice(0, i_noon + 1)
    a, t = alt[seg], ts[seg]
    if evening:
        k = int(np.argmax(a < target_deg))
        f = (a[k - 1] - target_deg) / (a[k - 1] - a[k])
    else:
        k = int(np.argmax(a > target_deg))
        f = (target_deg - a[k - 1]) / (a[k] - a[k - 1])
    return datetime.fromtimestamp(t[k - 1] + f * 60.0, tz=timezone.utc)


def examples(out_dir: Path, size_px: int = 1024) -> None:
    from domegen.render.frame import render_frame
    from domegen.render.output import write_frame
    from domegen.render.spec import CameraSpec, FrameSpec, LayerSpec
    from domegen.sky.site import Site

    site = Site(lat_deg=47.2184, lon_deg=-1.5536, elev_m=20.0, name="Loire Valley Science Dome",
                timezone="Europe/Paris")
    day = datetime(2026, 6, 21, tzinfo=timezone.utc)
    scenes = {
        "noon": (_noon(site, day), dict(light_pollution_bortle=7)),
        "sunset": (_time_at_sun_alt(site, day, 0.3, True), dict(light_pollution_bortle=7)),
        "civil-twilight": (_time_at_sun_alt(site, day, -4.0, True), dict(light_pollution_bortle=7)),
        "nautical-twilight": (_time_at_sun_alt(site, day, -9.0, True), dict(light_pollution_bortle=7)),
        # full Moon of 2026-09-26, high in the south around local midnight
        "moonlit-night": (datetime(2026, 9, 26, 23, 30, tzinfo=timezone.utc), dict(light_pollution_bortle=4)),
        # new Moon 2026-08-12, late evening, the same place imagined without light pollution
        "dark-site-night": (datetime(2026, 8, 12, 23, 30, tzinfo=timezone.utc), dict(light_pollution_bortle=1)),
    }
    from domegen.sky.bodies import body_positions

    t_set = scenes["sunset"][0]
    sun_az = float(body_positions(site, np.array([t_set.timestamp()]), names=("Sun",)).body("Sun").az_deg[0])
    cameras = {"sunset-west": CameraSpec(size_px=size_px, field_deg=120.0, view_az_deg=round(sun_az, 1),
                                         view_alt_deg=25.0)}
    scenes["sunset-west"] = (t_set, dict(light_pollution_bortle=7))
    burgos, t_tot = _totality()
    scenes["totality-burgos"] = (t_tot, dict(light_pollution_bortle=4))
    cameras["totality-burgos"] = CameraSpec(size_px=size_px, field_deg=120.0, view_az_deg=280.0, view_alt_deg=25.0)
    for name, (utc, kw) in scenes.items():
        cam = cameras.get(name, CameraSpec(size_px=size_px))
        # automatic exposure (exposure_ev None): the renderer asks the atmosphere's auto_exposure_ev
        spec = FrameSpec(site=burgos if name.startswith("totality") else site, utc=utc, camera=cam,
                         layers=LayerSpec(sky_model="physical", **kw, **_extra_layers()))
        t0 = time.perf_counter()
        frame = render_frame(spec)
        dt = time.perf_counter() - t0
        path = write_frame(frame, out_dir / f"atmosphere-{name}.png")
        print(f"{path}  {utc:%Y-%m-%d %H:%M} UTC  EV {frame.info['exposure_ev']:+.2f}  {dt:.2f} s")


def _extra_layers() -> dict:
    """Layer overrides from $ATMOSPHERE_EXAMPLE_LAYERS, e.g. "sun=0" (work-around switch)."""
    out = {}
    for item in filter(None, os.environ.get("ATMOSPHERE_EXAMPLE_LAYERS", "").split(",")):
        k, v = item.split("=")
        out[k.strip()] = float(v)
    return out


def _totality():
    """A site near Burgos in the path of the 2026-08-12 total solar eclipse and its mid-totality."""
    from datetime import date

    from domegen.eclipse.local import local_circumstances
    from domegen.eclipse.search import solar_eclipse_on
    from domegen.sky.site import Site

    burgos = Site(lat_deg=42.34, lon_deg=-3.70, elev_m=850.0, name="near Burgos", timezone="Europe/Madrid")
    lc = local_circumstances(solar_eclipse_on(date(2026, 8, 12)), [burgos])
    return burgos, datetime.fromtimestamp(float(lc.utc_s["max"][0]), tz=timezone.utc)


def _noon(site, day_utc: datetime) -> datetime:
    from domegen.sky.bodies import body_positions

    ts = day_utc.timestamp() + np.arange(0, 86400, 60.0)
    alt = body_positions(site, ts, names=("Sun",)).body("Sun").alt_deg
    return datetime.fromtimestamp(ts[int(np.argmax(alt))], tz=timezone.utc)


def main() -> None:
    p = argparse.ArgumentParser(description=__doc__)
    p.add_argument("--examples", action="store_true", help="also render the example frames")
    p.add_argument("--out", default="renders/examples", help="folder for the example frames")
    p.add_argument("--no-bench", action="store_true", help="skip the timings")
    args = p.parse_args()
    if not args.no_bench:
        bench()
        bench_frames()
    if args.examples:
        out = Path(args.out)
        out.mkdir(parents=True, exist_ok=True)
        examples(out)
        from domegen.eclipse.safety import CAUTION

        print(CAUTION)  # the examples include a solar eclipse


if __name__ == "__main__":
    main()
