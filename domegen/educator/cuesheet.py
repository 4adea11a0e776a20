"""A narration cue sheet for one eclipse at one venue: Markdown and CSV.

Cues are the contacts in local time with the altitude and azimuth of the
eclipsed body, the time from the first contact, and what to say.  The sky
section lists the planets and bright stars above the horizon at maximum
eclipse and whether they should be bright enough to see then.

Visibility rule (common practice of eclipse observing guides, not a sky-
brightness model): during totality the sky is about as bright as civil
twilight and objects to magnitude ~+2 show; at a deep partial or annular
maximum (more than 95% of the Sun covered) only Venus-class objects (V < -3.5)
might; otherwise none.  For a lunar eclipse the Sun must be below -6 deg and
objects to magnitude +2 are listed as visible.  Every object must also be
more than 3 deg above the horizon.
"""

from __future__ import annotations

import csv
import io
from dataclasses import dataclass
from datetime import datetime, timedelta

import numpy as np

from domegen.educator.eclipses import LocalEclipse
from domegen.educator.star_names import star_name
from domegen.sky.times import iso_local, iso_utc, zone

PLANETS = ("Mercury", "Venus", "Mars", "Jupiter", "Saturn")
TOTALITY_MAG_LIMIT = 2.0
DEEP_PARTIAL_MAG_LIMIT = -3.5
MIN_ALT_DEG = 3.0
_COMPASS = ("N", "NNE", "NE", "ENE", "E", "ESE", "SE", "SSE",
            "S", "SSW", "SW", "WSW", "W", "WNW", "NW", "NNW")


@dataclass(frozen=True)
class SkyObject:
    name: str
    kind: str            # "planet" | "star"
    magnitude: float
    alt_deg: float
    az_deg: float
    sun_distance_deg: float
    visible: bool

    @property
    def direction(self) -> str:
        return compass(self.az_deg)


def compass(az_deg: float) -> str:
    """16-point compass direction for an azimuth (deg from north through east)."""
    return _COMPASS[int(((az_deg % 360.0) + 11.25) // 22.5) % 16]


def _mag_limit(ecl: LocalEclipse, sun_alt_deg: float) -> float | None:
    if ecl.kind == "solar":
        if ecl.local_type == "total":
            return TOTALITY_MAG_LIMIT
        if (ecl.obscuration or 0.0) > 0.95:
            return DEEP_PARTIAL_MAG_LIMIT
        return None
    return TOTALITY_MAG_LIMIT if sun_alt_deg < -6.0 else None


def sky_at_maximum(ecl: LocalEclipse, *, star_mag_limit: float = 2.5) -> list[SkyObject]:
    """Planets and stars brighter than ``star_mag_limit`` above the horizon at maximum."""
    from domegen.sky.bodies import body_positions
    from domegen.sky.stars import star_field
    from domegen.sky.times import unix_seconds

    t = ecl.contact("max").utc
    s = np.array([unix_seconds(t)])
    tab = body_positions(ecl.site, s, names=("Sun",) + PLANETS)
    sun_enu = tab.enu_refracted[0, :, 0]
    sun_alt = float(tab.alt_refracted_deg[0, 0])
    limit = _mag_limit(ecl, sun_alt)
    out = []
    for i, name in enumerate(PLANETS, start=1):
        alt = float(tab.alt_refracted_deg[i, 0])
        if alt <= 0.0:
            continue
        d = float(np.degrees(np.arccos(np.clip(tab.enu_refracted[i, :, 0] @ sun_enu, -1, 1))))
        mag = float(tab.magnitude[i, 0])
        out.append(SkyObject(name, "planet", mag, alt, float(tab.az_deg[i, 0]), d,
                             limit is not None and mag <= limit and alt > MIN_ALT_DEG))
    sf = star_field(ecl.site, t, mag_limit=star_mag_limit)
    up = sf.alt_deg > 0.0
    dots = np.clip(sun_enu @ sf.enu[:, up], -1.0, 1.0)
    for hip, alt, az, mag, dot in zip(sf.hip[up], sf.alt_deg[up], sf.az_deg[up], sf.vmag[up], dots):
        out.append(SkyObject(star_name(hip), "star", float(mag), float(alt), float(az),
                             float(np.degrees(np.arccos(dot))),
                             limit is not None and mag <= limit and alt > MIN_ALT_DEG))
    out.sort(key=lambda o: o.magnitude)
    return out


def _clock(dt: datetime, tz: str) -> str:
    loc = (dt + timedelta(microseconds=500_000)).astimezone(zone(tz))
    return loc.strftime("%H:%M:%S ") + (loc.tzname() or "")


def _offset(dt: datetime, t0: datetime) -> str:
    s = int(round((dt - t0).total_seconds()))
    sign = "-" if s < 0 else "+"
    s = abs(s)
    return f"T{sign}{s // 3600:d}:{s % 3600 // 60:02d}:{s % 60:02d}"


def _duration(s: float | None) -> str:
    if s is None:
        return "none here"
    m, sec = divmod(int(round(s)), 60)
    return f"{m} min {sec:02d} s" if m else f"{sec} s"


def _what(ecl: LocalEclipse, c) -> str:
    body = ecl.body
    where = "above" if c.alt_deg > 0 else "BELOW"
    text = c.label[0].upper() + c.label[1:]
    if c.alt_deg <= 0:
        text += f" - the {body} is below the horizon here, not seen"
    elif c.alt_deg < 5:
        text += f" - the {body} is very low ({where} the horizon by {c.alt_deg:.1f} deg)"
    return text


def cue_rows(ecl: LocalEclipse) -> list[dict]:
    """One dict per contact: key, local, utc, offset, alt_deg, az_deg, direction, what."""
    tz = ecl.site.timezone
    t0 = ecl.contacts[0].utc
    return [{"key": c.key, "local": _clock(c.utc, tz), "local_iso": iso_local(c.utc, tz),
             "utc": iso_utc(c.utc), "offset": _offset(c.utc, t0), "alt_deg": c.alt_deg,
             "az_deg": c.az_deg, "direction": compass(c.az_deg), "what": _what(ecl, c)}
            for c in ecl.contacts]


def _site_label(ecl: LocalEclipse) -> str:
    s = ecl.site
    lat = f"{abs(s.lat_deg):.4f} {'N' if s.lat_deg >= 0 else 'S'}"
    lon = f"{abs(s.lon_deg):.4f} {'E' if s.lon_deg >= 0 else 'W'}"
    return f"{s.name + ', ' if s.name else ''}{lat}, {lon}, {s.elev_m:.0f} m"


def cue_sheet_markdown(ecl: LocalEclipse, sky: list[SkyObject] | None = None) -> str:
    """The cue sheet as Markdown, ending with the eye-safety caution for solar eclipses."""
    from domegen.eclipse.safety import CAUTION

    tz = ecl.site.timezone
    mx = ecl.contact("max")
    date_local = mx.utc.astimezone(zone(tz)).date().isoformat()
    body = ecl.body
    lines = [f"# Cue sheet: {ecl.title}", "",
             f"- Venue: {_site_label(ecl)}",
             f"- Date: {date_local} (local), times in {tz}",
             f"- Seen here: {ecl.local_type}" + (f" (the eclipse is {ecl.global_type} elsewhere)"
                                                if ecl.local_type != ecl.global_type else "")]
    if ecl.kind == "solar":
        if ecl.magnitude is not None:
            lines.append(f"- Magnitude at maximum: {ecl.magnitude:.3f}; obscuration "
                         f"{100 * (ecl.obscuration or 0):.1f}% of the Sun's disc")
        if ecl.local_type in ("total", "annular"):
            lines.append(f"- Duration of {'annularity' if ecl.local_type == 'annular' else 'totality'}"
                         f" here: {_duration(ecl.duration_s)}")
        else:
            lines.append(f"- No {'annular phase' if ecl.global_type == 'annular' else 'totality'} "
                         f"here: the Moon covers only part of the Sun")
    else:
        lines.append(f"- Umbral magnitude: {ecl.magnitude:.3f}; "
                     f"duration of {'totality' if ecl.global_type == 'total' else 'the partial phase'}: "
                     f"{_duration(ecl.duration_s)}")
    first, last = ecl.contacts[0], ecl.contacts[-1]
    lines.append(f"- From this site: {ecl.seen_text}")
    lines.append(f"- Whole eclipse: {_duration((last.utc - first.utc).total_seconds())} "
                 f"({_clock(first.utc, tz)} to {_clock(last.utc, tz)})")
    lines += ["", "## Cues", "",
              f"| Cue | Local time | UTC | From start | {body} alt | {body} az | What happens |",
              "|---|---|---|---|---|---|---|"]
    for r in cue_rows(ecl):
        lines.append(f"| {r['key']} | {r['local']} | {r['utc']} | {r['offset']} | "
                     f"{r['alt_deg']:+.1f}\u00b0 | {r['az_deg']:.1f}\u00b0 {r['direction']} | {r['what']} |")
    if sky is not None:
        what = "totality" if ecl.local_type == "total" else "maximum eclipse"
        lines += ["", f"## In the sky at {what} ({_clock(mx.utc, tz)})", ""]
        seen = [o for o in sky if o.visible]
        if seen:
            lines.append("Bright enough to point out: " + ", ".join(
                f"{o.name} ({o.direction}, {o.alt_deg:.0f}\u00b0 up)" for o in seen) + ".")
        else:
            lines.append("No planet or star is expected to be bright enough to see at this moment.")
        shown = [o for o in sky if o.visible or o.kind == "planet" or o.magnitude <= 1.0]
        lines += ["", "| Object | Kind | Mag | Alt | Az | From Sun | Visible then? |",
                  "|---|---|---|---|---|---|---|"]
        for o in shown:
            lines.append(f"| {o.name} | {o.kind} | {o.magnitude:+.1f} | {o.alt_deg:.1f}\u00b0 | "
                         f"{o.az_deg:.0f}\u00b0 {o.direction} | {o.sun_distance_deg:.0f}\u00b0 | "
                         f"{'yes' if o.visible else 'no'} |")
        if len(shown) < len(sky):
            lines += ["", f"({len(sky) - len(shown)} fainter stars above the horizon are not listed; "
                          "the CSV has them all.)"]
    if ecl.kind == "solar":
        lines += ["", "## Eye safety", "", CAUTION]
    return "\n".join(lines) + "\n"


def cue_sheet_csv(ecl: LocalEclipse, sky: list[SkyObject] | None = None) -> str:
    """The cues (and the sky objects) as CSV; the last row of a solar sheet is the caution."""
    from domegen.eclipse.safety import CAUTION

    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(["section", "name", "local", "utc", "from_start", "alt_deg", "az_deg", "magnitude",
                "note"])
    for r in cue_rows(ecl):
        w.writerow(["cue", r["key"], r["local_iso"], r["utc"],
                    r["offset"], f"{r['alt_deg']:.2f}", f"{r['az_deg']:.2f}", "", r["what"]])
    for o in sky or ():
        w.writerow(["sky", o.name, "", "", "", f"{o.alt_deg:.2f}", f"{o.az_deg:.2f}",
                    f"{o.magnitude:.2f}", ("visible" if o.visible else "too faint or too low")
                    + f"; {o.kind}; {o.sun_distance_deg:.1f} deg from the Sun"])
    if ecl.kind == "solar":
        w.writerow(["safety", "caution", "", "", "", "", "", "", CAUTION])
    return buf.getvalue()
