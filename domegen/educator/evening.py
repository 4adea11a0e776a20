"""A preview page for a chosen evening at a venue: the dome from sunset into the night.

Moments: sunset, the ends of civil, nautical and astronomical twilight (where
they occur that night) and two hours after the last of them.  The page lists
the almanac times, the planets and bright stars up at each moment, and the
sky events of that night (pairings, phases, oppositions, elongations).
"""

from __future__ import annotations

from datetime import date, datetime, time, timedelta

import numpy as np

from domegen.educator.cuesheet import compass
from domegen.educator.preview import Figure, _e, data_uri, dome_jpeg, page_shell
from domegen.sky.site import Site
from domegen.sky.times import iso_utc, zone

MOMENTS = (("sunset", "Sunset"), ("civil_dusk", "End of civil twilight (Sun -6\u00b0)"),
           ("nautical_dusk", "End of nautical twilight (Sun -12\u00b0)"),
           ("astronomical_dusk", "End of astronomical twilight (Sun -18\u00b0)"))
LATE_AFTER_S = 2 * 3600.0
PLANETS = ("Mercury", "Venus", "Mars", "Jupiter", "Saturn")


def evening_moments(site: Site, day: date) -> list[tuple[str, str, datetime]]:
    """(key, label, utc) of the evening's moments, from local noon of ``day`` to the next noon."""
    from domegen.sky.almanac import events

    tz = zone(site.timezone)
    noon = datetime.combine(day, time(12), tzinfo=tz)
    found = events(site, noon, noon + timedelta(days=1), kinds=[k for k, _ in MOMENTS])
    first = {}
    for ev in found:
        first.setdefault(ev.kind, ev.utc)
    out = [(k, label, first[k]) for k, label in MOMENTS if k in first]
    if out:
        last = out[-1][2]
        out.append(("late", "Two hours after twilight", last + timedelta(seconds=LATE_AFTER_S)))
    else:  # midnight Sun or polar night: show local 22:00
        out.append(("late", "22:00 local time", datetime.combine(day, time(22), tzinfo=tz)))
    return out


def visible_objects(site: Site, utc: datetime, *, star_mag: float = 1.5):
    """(name, magnitude, alt_deg, az_deg) of planets and stars above 5 deg at ``utc``."""
    from domegen.educator.star_names import star_name
    from domegen.sky.bodies import body_positions
    from domegen.sky.stars import star_field
    from domegen.sky.times import unix_seconds

    tab = body_positions(site, np.array([unix_seconds(utc)]), names=("Moon",) + PLANETS)
    out = []
    for i, name in enumerate(tab.names):
        alt = float(tab.alt_refracted_deg[i, 0])
        if alt > 5.0:
            out.append((name, float(tab.magnitude[i, 0]), alt, float(tab.az_deg[i, 0])))
    sf = star_field(site, utc, mag_limit=star_mag)
    for hip, mag, alt, az in zip(sf.hip, sf.vmag, sf.alt_deg, sf.az_deg):
        if alt > 5.0:
            out.append((star_name(hip), float(mag), float(alt), float(az)))
    out.sort(key=lambda o: o[1])
    return out


def build_evening_preview(site: Site, day: date, *, size_px: int = 480,
                          generated_utc: datetime | None = None) -> str:
    """The evening page's HTML (frames rendered here)."""
    from domegen.render.spec import CameraSpec
    from domegen.sky.events import SKY_KINDS, sky_events

    tz = site.timezone
    moments = evening_moments(site, day)
    front = 180.0 if site.lat_deg >= 0 else 0.0
    camera = CameraSpec(size_px=int(size_px), front_az_deg=front)
    figures, rows = [], []
    for key, label, utc in moments:
        loc = utc.astimezone(zone(tz))
        jpg = dome_jpeg(site, utc, camera, labels=key != "sunset")
        figures.append(Figure(key, f"{label} \u2014 {loc.strftime('%H:%M')} {loc.tzname()}",
                              data_uri(jpg, "image/jpeg")))
        objs = visible_objects(site, utc)
        up = ", ".join(f"{n} ({compass(az)} {alt:.0f}\u00b0)" for n, _, alt, az in objs[:12]) or "-"
        rows.append(f"<tr><td>{_e(label)}</td><td>{_e(loc.strftime('%H:%M'))} {_e(loc.tzname())}"
                    f"</td><td>{_e(iso_utc(utc)[11:16])}Z</td><td>{_e(up)}</td></tr>")
    start = moments[0][2] - timedelta(hours=3)
    end = moments[-1][2] + timedelta(hours=6)
    events = sky_events(site, start - timedelta(days=1), end + timedelta(days=1), kinds=SKY_KINDS)
    ev_rows = "".join(
        f"<tr><td>{_e(ev.utc.astimezone(zone(tz)).strftime('%Y-%m-%d %H:%M %Z'))}</td>"
        f"<td>{_e(ev.title)}</td><td>{'yes' if ev.visible else 'no'}</td></tr>" for ev in events)
    s = site
    venue = s.name or f"{s.lat_deg:.4f}, {s.lon_deg:.4f}"
    facts = [f"Venue: {venue} ({abs(s.lat_deg):.4f}\u00b0 {'N' if s.lat_deg >= 0 else 'S'}, "
             f"{abs(s.lon_deg):.4f}\u00b0 {'E' if s.lon_deg >= 0 else 'W'}), times in {tz}",
             f"Dome front faces {'south' if front == 180.0 else 'north'}"]
    sections = [
        ("The dome through the evening",
         '<div class="domes">' + "".join(
             f'<figure id="fig-{_e(f.key)}"><img src="{f.data_uri}" alt="{_e(f.caption)}">'
             f"<figcaption>{_e(f.caption)}</figcaption></figure>" for f in figures) + "</div>"),
        ("Moments and what is up (above 5\u00b0)",
         "<table><tr><th>Moment</th><th>Local</th><th>UTC</th><th>Up</th></tr>" + "".join(rows)
         + "</table>"),
        ("Sky events around this night",
         ("<table><tr><th>Local time</th><th>Event</th><th>Seen here</th></tr>" + ev_rows + "</table>")
         if ev_rows else "<p>No pairing, phase, opposition or elongation in these days.</p>"),
    ]
    title = f"Evening of {day.isoformat()} \u2014 {venue}"
    return page_shell(title, title, facts, sections, tz=tz, generated_utc=generated_utc)
