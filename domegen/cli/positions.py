"""``domegen positions``: where the Sun, Moon, planets and bright stars are."""

from __future__ import annotations

from domegen.cli.common import add_site_arguments, print_json, site_from_args


def register(sub) -> None:
    p = sub.add_parser("positions", help="positions of the Sun, Moon, planets and bright stars for a site",
                       description="Apparent topocentric positions of the Sun, Moon, planets and the brightest "
                                   "stars above the horizon, for one instant.")
    add_site_arguments(p)
    p.add_argument("--at", required=True, metavar="ISO",
                   help="instant: ISO 8601 with offset or Z, or a local wall time read in --tz / the site's zone")
    p.add_argument("--stars-brighter-than", type=float, default=2.0, metavar="MAG",
                   help="list stars brighter than this V magnitude (default 2.0)")
    p.add_argument("--json", action="store_true", help="print one JSON object (stable field names)")
    p.set_defaults(func=run)


def run(args) -> int:
    from domegen.sky.positions import positions_report

    site = site_from_args(args)
    report = positions_report(site, args.at, star_mag_limit=args.stars_brighter_than)
    if args.json:
        print_json(report)
        return 0
    print(f"Site {site.lat_deg:.4f}, {site.lon_deg:.4f}, {site.elev_m:.0f} m ({site.timezone})"
          + (f" - {site.name}" if site.name else ""))
    print(f"UTC {report['time_utc']}   TT {report['time_tt']}   local {report['time_local']}")
    print(f"{'body':<8} {'alt':>8} {'alt(refr)':>10} {'az':>8} {'RA h':>8} {'Dec':>8} {'mag':>6} {'lit':>5}")
    for b in report["bodies"]:
        print(f"{b['name']:<8} {b['alt_deg']:8.3f} {b['alt_refracted_deg']:10.3f} {b['az_deg']:8.3f} "
              f"{b['ra_hours']:8.4f} {b['dec_deg']:8.3f} {b['magnitude']:6.2f} {b['illuminated_fraction']:5.2f}")
    if report["stars"]:
        print(f"stars above the horizon brighter than V {args.stars_brighter_than}:")
        for s in report["stars"]:
            print(f"  HIP {s['hip']:<7d} alt {s['alt_deg']:7.3f}  az {s['az_deg']:7.3f}  V {s['magnitude']:5.2f}")
    return 0
