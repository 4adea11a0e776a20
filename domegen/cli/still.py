"""``domegen still``: render one dome-master frame of the real sky."""

from __future__ import annotations

import argparse

_OVERLAYS = {"labels": "labels", "grid": "grid_altaz", "eq-grid": "grid_equatorial", "ecliptic": "ecliptic",
             "equator": "equator", "meridian": "meridian", "horizon": "horizon_line", "cardinals": "cardinals"}
_HIDE = ("stars", "planets", "sun", "moon", "ground", "atmosphere")


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "still", help="render one fisheye dome-master frame of the sky",
        description="Render the sky over a site at one instant as a square angular-fisheye dome master "
                    "(front azimuth at the bottom of the frame; with the front to the south, east is on the "
                    "left as seen from below) and print the Sun, Moon and planets it shows.",
        formatter_class=argparse.ArgumentDefaultsHelpFormatter)
    from domegen.cli.common import add_site_arguments

    add_site_arguments(p)
    p.add_argument("--at", required=True, help="instant, ISO 8601 (UTC offset, or wall time in --tz)")
    p.add_argument("-o", "--output", required=True, help="image file to write (.png, .jpg or .exr)")
    p.add_argument("--size", type=int, default=4096, help="frame width = height in pixels (64..16384)")
    p.add_argument("--field", type=float, default=180.0, help="fisheye field of view, degrees (1..240)")
    p.add_argument("--front-az", type=float, default=180.0, help="azimuth at the bottom of the frame, degrees")
    p.add_argument("--tilt", type=float, default=0.0, help="dome tilt toward the front, degrees")
    p.add_argument("--view-az", type=float, default=None, help="free view: azimuth at the frame centre")
    p.add_argument("--view-alt", type=float, default=None, help="free view: altitude at the frame centre")
    p.add_argument("--roll", type=float, default=0.0, help="turn the picture counter-clockwise, degrees")
    p.add_argument("--exposure", type=float, default=None, help="exposure in EV (0 = daytime sky mid-tone; "
                   "+1 doubles); default automatic")
    p.add_argument("--format", default=None, help="png, jpeg or exr (default: from the file suffix)")
    p.add_argument("--bit-depth", type=int, default=8, choices=(8, 16), help="PNG bits per channel")
    p.add_argument("--mag-limit", type=float, default=6.5, help="faintest star drawn, V magnitude")
    p.add_argument("--show", action="append", default=[], choices=sorted(_OVERLAYS) + ["all"],
                   help="add an overlay (repeatable): " + ", ".join(sorted(_OVERLAYS)))
    p.add_argument("--hide", action="append", default=[], choices=_HIDE, help="leave out a layer (repeatable)")
    p.add_argument("--bortle", type=int, default=None, help="light pollution, Bortle class 1..9")
    p.add_argument("--panorama", default=None, help="360-degree equirectangular PNG (alpha = sky) as horizon")
    p.add_argument("--sky", default="auto", help="sky model: auto, physical or gradient")
    p.add_argument("--seed", type=int, default=0, help="seed of the procedural skyline and lunar albedo")
    p.add_argument("--passes", action="store_true",
                   help="also write compositing passes beside the output: NAME-stars, NAME-bodies (light to add) "
                        "and NAME-overlays (lines and text with alpha), at the same exposure")
    p.add_argument("--json", action="store_true", help="print a JSON object instead of text")
    p.set_defaults(func=run)


def run(args) -> int:
    from domegen.cli.common import print_json, site_from_args
    from domegen.render.frame import render_frame
    from domegen.render.output import format_for, write_frame
    from domegen.render.spec import CameraSpec, FrameSpec, LayerSpec
    from domegen.sky.times import iso_utc, parse_instant

    site = site_from_args(args)
    fmt = format_for(args.output, args.format)
    utc = parse_instant(args.at, site.timezone, field="at")
    camera = CameraSpec(size_px=args.size, field_deg=args.field, front_az_deg=args.front_az, tilt_deg=args.tilt,
                        view_az_deg=args.view_az, view_alt_deg=args.view_alt, roll_deg=args.roll)
    shown = set(_OVERLAYS) if "all" in args.show else set(args.show)
    opts = {_OVERLAYS[k]: 1.0 for k in shown}
    opts.update({k: 0.0 for k in args.hide})
    layers = LayerSpec(exposure_ev=args.exposure, star_mag_limit=args.mag_limit,
                       light_pollution_bortle=args.bortle, panorama=args.panorama, seed=args.seed,
                       sky_model=args.sky, **opts)
    spec = FrameSpec(site, utc, camera, layers)
    extra = {}
    if args.passes:
        from pathlib import Path

        from domegen.render.passes import render_passes

        frames = render_passes(spec)
        rendered = frames.pop("full")
        out = Path(args.output)
        for name, frame in frames.items():
            extra[name] = str(write_frame(frame, out.with_name(f"{out.stem}-{name}{out.suffix}"), fmt,
                                          args.bit_depth))
    else:
        rendered = render_frame(spec)
    path = write_frame(rendered, args.output, fmt, args.bit_depth)
    info = rendered.info
    result = {"output": str(path), "format": fmt, "size_px": camera.size_px, "field_deg": camera.field_deg,
              "utc": iso_utc(utc), "site": site.as_json(), "exposure_ev": info["exposure_ev"],
              "sky_model": info.get("sky_model"), "stars_drawn": info.get("stars_drawn", 0),
              "bodies": info["bodies"]}
    if extra:
        result["passes"] = extra
    if args.json:
        print_json(result)
        return 0
    print(f"wrote {path} ({camera.size_px} px, field {camera.field_deg:g} deg, exposure "
          f"{info['exposure_ev']:+.2f} EV, {result['stars_drawn']} stars)")
    for b in info["bodies"]:
        print(f"  {b['name']:<8} alt {b['alt_deg']:7.2f}  az {b['az_deg']:7.2f}  at x {b['x_px']:8.1f}  "
              f"y {b['y_px']:8.1f} px")
    if not info["bodies"]:
        print("  no Sun, Moon or planet in the frame")
    for name, p in extra.items():
        print(f"  pass {name}: {p}")
    return 0
