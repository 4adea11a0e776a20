"""``domegen eclipses``: every solar and lunar eclipse between two dates."""

from __future__ import annotations

import csv
import re
import sys
from datetime import timedelta

from domegen.cli.common import print_json

CSV_FIELDS = ("kind", "type", "greatest_utc", "greatest_tt", "delta_t_s", "gamma", "magnitude", "lat_deg",
              "lon_deg", "sun_alt_deg", "path_width_km", "central_duration_s", "umbral_magnitude",
              "penumbral_magnitude", "duration_penumbral_min", "duration_partial_min", "duration_total_min",
              "saros")


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "eclipses", help="list solar and lunar eclipses between two dates",
        description="List every solar and lunar eclipse whose greatest eclipse falls between two "
                    "dates (UTC; --to is inclusive), computed from the DE421 ephemeris "
                    "(1900-2050). Solar entries give type, greatest eclipse in UTC and TT, "
                    "Delta T, gamma, magnitude, the point of greatest eclipse, path width, "
                    "central duration and saros; lunar entries their contacts and magnitudes.")
    p.add_argument("--from", dest="start", required=True, help="first day (YYYY-MM-DD, UTC) or instant")
    p.add_argument("--to", dest="end", required=True, help="last day (inclusive) or instant")
    p.add_argument("--kind", choices=("solar", "lunar", "all"), default="all",
                   help="which eclipses to list (default: all)")
    out = p.add_mutually_exclusive_group()
    out.add_argument("--json", action="store_true", help="print a JSON list")
    out.add_argument("--csv", action="store_true", help="print CSV with one row per eclipse")
    p.add_argument("--elements", action="store_true",
                   help="with --json: add the polynomial Besselian elements (\"besselian\") to solar entries")
    p.set_defaults(func=run)


def period(start_text: str, end_text: str):
    """(start, end) aware UTC datetimes; a bare end date covers that whole day."""
    from domegen.errors import InputError
    from domegen.sky.ephemeris import EPHEMERIS_END_UTC
    from domegen.sky.times import parse_instant

    start = parse_instant(start_text, "UTC", field="from")
    end = parse_instant(end_text, "UTC", field="to")
    if re.fullmatch(r"\s*\d{4}-\d{2}-\d{2}\s*", str(end_text)):
        end = min(end + timedelta(days=1) - timedelta(microseconds=1), EPHEMERIS_END_UTC)
    if end < start:
        raise InputError(f"--to {end_text} is before --from {start_text}", field="to", value=end_text,
                         hint="swap the two dates")
    return start, end


def collect(start, end, kind: str):
    """Solar and/or lunar eclipses in time order: list of (greatest_utc, kind, eclipse)."""
    items = []
    if kind in ("solar", "all"):
        from domegen.eclipse import find_solar_eclipses

        items += [(e.greatest_utc, "solar", e) for e in find_solar_eclipses(start, end)]
    if kind in ("lunar", "all"):
        from domegen.eclipse.lunar import find_lunar_eclipses

        items += [(e.greatest_utc, "lunar", e) for e in find_lunar_eclipses(start, end)]
    items.sort(key=lambda item: item[0])
    return items


def run(args) -> int:
    from domegen.eclipse.safety import CAUTION

    start, end = period(args.start, args.end)
    items = collect(start, end, args.kind)
    rows = [e.as_json() for _, _, e in items]
    if args.elements:
        for (_, kind, e), r in zip(items, rows):
            if kind == "solar":
                r["besselian"] = e.besselian.as_json()
    if args.json:
        print_json(rows)
        return 0
    if args.csv:
        w = csv.DictWriter(sys.stdout, fieldnames=CSV_FIELDS, extrasaction="ignore", lineterminator="\n")
        w.writeheader()
        for r in rows:
            w.writerow({k: ("" if r.get(k) is None else r.get(k)) for k in CSV_FIELDS})
        return 0
    if not rows:
        print(f"No {'' if args.kind == 'all' else args.kind + ' '}eclipses between "
              f"{start.date().isoformat()} and {end.date().isoformat()}.")
    for (_, kind, e), r in zip(items, rows):
        print(_line(kind, r))
    if any(kind == "solar" for _, kind, _ in items):
        print()
        print(CAUTION)
    return 0


def _line(kind: str, r: dict) -> str:
    when = r["greatest_utc"].replace("T", " ").replace("Z", " UTC")
    if kind == "solar":
        lat, lon = r["lat_deg"], r["lon_deg"]
        place = f"{abs(lat):4.1f}{'N' if lat >= 0 else 'S'} {abs(lon):5.1f}{'E' if lon >= 0 else 'W'}"
        extra = ""
        if r["central_duration_s"] is not None:
            m, s = divmod(int(round(r["central_duration_s"])), 60)
            extra = f"  central {m}m{s:02d}s, path {r['path_width_km']:.0f} km"
        return (f"{when}  solar {r['type']:<8} mag {r['magnitude']:.4f}  gamma {r['gamma']:+.4f}  "
                f"saros {r['saros']:>3}  greatest at {place}{extra}")
    dur = r.get("duration_total_min") or r.get("duration_partial_min") or r.get("duration_penumbral_min")
    phase = "total" if r.get("duration_total_min") else ("partial" if r.get("duration_partial_min") else "penumbral")
    return (f"{when}  lunar {r['type']:<9} umbral mag {r['umbral_magnitude']:.4f}  gamma {r['gamma']:+.4f}  "
            f"saros {r['saros']:>3}  {phase} phase {dur:.0f} min")
