"""``domegen local``: an eclipse as seen from one site (solar or lunar)."""

from __future__ import annotations

from domegen.cli.common import add_site_arguments, print_json, site_from_args


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "local", help="local circumstances of a solar or lunar eclipse at a site",
        description="Contact times (UTC and the site's local time), magnitude, obscuration, "
                    "duration and the Sun's position for a solar eclipse, or the Moon's altitude "
                    "at each contact of a lunar eclipse, seen from one site. DATE is the UTC date "
                    "of greatest eclipse. A site that does not see the eclipse gets type_here "
                    "\"none\" (not an error).")
    p.add_argument("--eclipse", required=True, metavar="DATE", help="UTC date of greatest eclipse, YYYY-MM-DD")
    p.add_argument("--kind", choices=("auto", "solar", "lunar"), default="auto",
                   help="which eclipse on that date (default: whichever there is, solar first)")
    add_site_arguments(p)
    p.add_argument("--json", action="store_true", help="print JSON")
    p.set_defaults(func=run)


def find_eclipse(day: str, kind: str):
    """("solar"|"lunar", eclipse) on the UTC date ``day``; NotFoundError names the nearest."""
    from domegen.eclipse import solar_eclipse_on
    from domegen.errors import NotFoundError

    errors = []
    if kind in ("auto", "solar"):
        try:
            return "solar", solar_eclipse_on(day)
        except NotFoundError as err:
            errors.append(("solar", err))
    if kind in ("auto", "lunar"):
        from domegen.eclipse.lunar import lunar_eclipse_on

        try:
            return "lunar", lunar_eclipse_on(day)
        except NotFoundError as err:
            errors.append(("lunar", err))
    hints = "; ".join(e.hint for _, e in errors if e.hint)
    what = "eclipse" if kind == "auto" else f"{kind} eclipse"
    raise NotFoundError(f"no {what} on {day}", field="eclipse", value=day, hint=hints or None)


def run(args) -> int:
    site = site_from_args(args)
    kind, eclipse = find_eclipse(args.eclipse, args.kind)
    if kind == "lunar":
        from domegen.eclipse.lunar import lunar_local

        result = lunar_local(eclipse, site)
        if args.json:
            print_json(result.as_json())
        else:
            _print_lunar(result.as_json())
        return 0
    from domegen.eclipse import local_circumstances

    lc = local_circumstances(eclipse, site)
    data = lc.as_json(0, site.timezone)
    if args.json:
        data["site"] = site.as_json()
        print_json(data)
        return 0
    _print_solar(data, site)
    return 0


def _print_solar(d: dict, site) -> None:
    from domegen.eclipse.safety import CAUTION

    name = site.name or f"{site.lat_deg:.4f}, {site.lon_deg:.4f}"
    print(f"{d['eclipse_type'].capitalize()} solar eclipse of {d['eclipse']} seen from {name} "
          f"({site.elev_m:.0f} m): {d['type_here']}")
    if d["type_here"] == "none":
        print("The eclipse is not visible here (no overlap, or the Sun is below the horizon throughout).")
    else:
        labels = {"c1": "partial eclipse begins (C1)", "c2": "total/annular phase begins (C2)",
                  "max": "maximum eclipse", "c3": "total/annular phase ends (C3)",
                  "c4": "partial eclipse ends (C4)"}
        for c, label in labels.items():
            if d[f"{c}_utc"] is None:
                continue
            info = d["contacts"][c]
            horizon = "" if info["above_horizon"] else "  (Sun below the horizon)"
            print(f"  {label:<32} {d[f'{c}_local']}  ({d[f'{c}_utc']})  Sun alt {info['sun_alt_deg']:5.1f}  "
                  f"az {info['sun_az_deg']:5.1f}{horizon}")
        print(f"  magnitude {d['magnitude']:.4f}, obscuration {100 * d['obscuration']:.1f}%"
              + (f", duration {d['duration_s']:.1f} s" if d["duration_s"] else ""))
    print()
    print(CAUTION)


def _print_lunar(d: dict) -> None:
    ecl = d.get("eclipse") or {}
    when = str(ecl.get("greatest_utc", "")).replace("T", " ").replace("Z", " UTC")
    print(f"{str(ecl.get('type', '')).capitalize()} lunar eclipse, greatest {when}:")
    for key, info in (d.get("contacts") or {}).items():
        if info is None:
            continue
        where = "above" if info.get("above_horizon") else "below"
        print(f"  {key:<9} {info.get('local')}  Moon alt {info.get('moon_alt_deg'):5.1f} ({where} the horizon)")
    for phase, info in (d.get("phases") or {}).items():
        if info:
            print(f"  {phase} phase seen: {info.get('seen')}")
