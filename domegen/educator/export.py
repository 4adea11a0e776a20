"""Event lists as text, CSV and iCalendar (RFC 5545) files.

The .ics writer is our own: a VCALENDAR with one VEVENT per event, times in
UTC (``DTSTART:20201221T182100Z``), text escaped (RFC 5545 3.3.11), lines
folded at 75 octets (3.1) and ended by CRLF.  Eclipses span first to last
contact; instant events have a DTSTART and no DTEND (3.6.1: they end when
they start).
"""

from __future__ import annotations

import csv
import hashlib
import io
from datetime import datetime, timezone

from domegen.sky.events import SkyEvent
from domegen.sky.site import Site
from domegen.sky.times import iso_local, iso_utc, zone

CSV_COLUMNS = ("kind", "utc", "local", "title", "bodies", "alt_deg", "sun_alt_deg",
               "separation_deg", "visible", "best_local", "best_alt_deg", "start_local", "end_local")


def _local_text(dt: datetime | None, tz: str) -> str:
    """``2020-12-21 19:21 CET`` (the zone's own abbreviation), rounded to the minute."""
    if dt is None:
        return ""
    from datetime import timedelta

    loc = (dt + timedelta(seconds=30)).astimezone(zone(tz))
    return loc.strftime("%Y-%m-%d %H:%M ") + (loc.tzname() or "")


def _fmt(v, nd=1) -> str:
    return "" if v is None else f"{v:.{nd}f}"


def events_text(events: list[SkyEvent], site: Site) -> str:
    """A plain table for the terminal, local time first."""
    tz = site.timezone
    lines = [f"Sky events for {site.name or f'{site.lat_deg:.4f}, {site.lon_deg:.4f}'} "
             f"(times in {tz}, then UTC)", ""]
    for ev in events:
        alt = "" if ev.alt_deg is None else f"alt {ev.alt_deg:+5.1f}\u00b0"
        best = ""
        if ev.best_utc is not None and ev.kind not in ("solar_eclipse", "lunar_eclipse"):
            best = f"; best seen {_local_text(ev.best_utc, tz)[11:]} at {ev.best_alt_deg:.0f}\u00b0"
        elif not ev.visible:
            best = "; not seen from here"
        span = ""
        if ev.start_utc is not None and ev.end_utc is not None:
            span = f" [{_local_text(ev.start_utc, tz)[11:]} - {_local_text(ev.end_utc, tz)[11:]}]"
            if ev.details.get("seen"):
                span += f"; {ev.details['seen']}"
        lines.append(f"{_local_text(ev.utc, tz):<22} {iso_utc(ev.utc):<21} {ev.title}{span}  "
                     f"({alt}{best})")
    if any(ev.kind == "solar_eclipse" for ev in events):
        from domegen.eclipse.safety import CAUTION

        lines += ["", CAUTION]
    return "\n".join(lines) + "\n"


def events_csv(events: list[SkyEvent], site: Site) -> str:
    """One row per event with the columns of :data:`CSV_COLUMNS`."""
    tz = site.timezone
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(CSV_COLUMNS)
    for ev in events:
        w.writerow([ev.kind, iso_utc(ev.utc), iso_local(ev.utc, tz), ev.title, " ".join(ev.bodies),
                    _fmt(ev.alt_deg, 2), _fmt(ev.sun_alt_deg, 2), _fmt(ev.separation_deg, 4),
                    "yes" if ev.visible else "no", iso_local(ev.best_utc, tz) or "",
                    _fmt(ev.best_alt_deg, 1), iso_local(ev.start_utc, tz) or "",
                    iso_local(ev.end_utc, tz) or ""])
    return buf.getvalue()


# ----------------------------------------------------------------------------- iCalendar
def _ics_escape(text: str) -> str:
    """TEXT value escaping, RFC 5545 section 3.3.11."""
    return (str(text).replace("\\", "\\\\").replace(";", "\\;").replace(",", "\\,")
            .replace("\r\n", "\\n").replace("\n", "\\n"))


def _fold(line: str) -> str:
    """Fold a content line at 75 octets, never inside a UTF-8 sequence (RFC 5545 3.1)."""
    raw = line.encode("utf-8")
    if len(raw) <= 75:
        return line
    parts, start, limit = [], 0, 75
    while start < len(raw):
        end = min(start + limit, len(raw))
        while end < len(raw) and (raw[end] & 0xC0) == 0x80:  # continuation byte: step back
            end -= 1
        parts.append(raw[start:end].decode("utf-8"))
        start, limit = end, 74  # continuation lines start with one space
    return "\r\n ".join(parts)


def _ics_time(dt: datetime) -> str:
    dt = datetime.fromisoformat(iso_utc(dt).replace("Z", "+00:00"))
    return dt.strftime("%Y%m%dT%H%M%SZ")


def _uid(ev: SkyEvent, site: Site) -> str:
    key = f"{ev.kind}|{iso_utc(ev.utc)}|{'-'.join(ev.bodies)}|{site.lat_deg:.4f}|{site.lon_deg:.4f}"
    return hashlib.sha1(key.encode()).hexdigest()[:20] + "@domegen"


def _description(ev: SkyEvent, site: Site) -> str:
    tz = site.timezone
    lines = [ev.title, f"Local time: {_local_text(ev.utc, tz)} ({iso_utc(ev.utc)})"]
    if ev.alt_deg is not None:
        lines.append(f"Altitude of the {ev.bodies[0] if ev.bodies else 'body'} then: {ev.alt_deg:.1f} deg")
    if ev.best_utc is not None and ev.kind not in ("solar_eclipse", "lunar_eclipse"):
        lines.append(f"Best seen: {_local_text(ev.best_utc, tz)} at {ev.best_alt_deg:.0f} deg altitude")
    elif not ev.visible:
        lines.append("Not seen from this site (below the horizon or in daylight).")
    if ev.separation_deg is not None:
        lines.append(f"Separation (geocentric): {ev.separation_deg:.3f} deg")
    if ev.start_utc is not None and ev.end_utc is not None:
        lines.append(f"From {_local_text(ev.start_utc, tz)} to {_local_text(ev.end_utc, tz)}")
        contacts = ev.details.get("contacts") or {}
        if contacts:
            lines.append("Contacts (local): " + ", ".join(
                f"{k} {_local_text(datetime.fromisoformat(v.replace('Z', '+00:00')), tz)[11:]}"
                for k, v in contacts.items()))
        if ev.details.get("seen"):
            lines.append(f"Seen here: {ev.details['seen']}")
    if ev.kind == "solar_eclipse":
        from domegen.eclipse.safety import CAUTION

        lines.append(CAUTION)
    return "\n".join(lines)


def events_ics(events: list[SkyEvent], site: Site, *, dtstamp: datetime | None = None) -> bytes:
    """An RFC 5545 calendar (bytes, CRLF line ends) holding one VEVENT per event."""
    stamp = _ics_time(dtstamp or datetime.now(timezone.utc))
    where = site.name or f"{site.lat_deg:.4f}, {site.lon_deg:.4f}"
    lines = ["BEGIN:VCALENDAR", "VERSION:2.0", "PRODID:-//domegen//sky events//EN",
             "CALSCALE:GREGORIAN", "METHOD:PUBLISH",
             f"X-WR-CALNAME:{_ics_escape('Sky events - ' + where)}"]
    for ev in events:
        lines += ["BEGIN:VEVENT", f"UID:{_uid(ev, site)}", f"DTSTAMP:{stamp}"]
        if ev.start_utc is not None and ev.end_utc is not None:
            lines += [f"DTSTART:{_ics_time(ev.start_utc)}", f"DTEND:{_ics_time(ev.end_utc)}"]
        else:
            lines.append(f"DTSTART:{_ics_time(ev.utc)}")
        lines += [f"SUMMARY:{_ics_escape(ev.title)}",
                  f"DESCRIPTION:{_ics_escape(_description(ev, site))}",
                  f"LOCATION:{_ics_escape(where)}",
                  f"GEO:{site.lat_deg:.6f};{site.lon_deg:.6f}",
                  f"CATEGORIES:{_ics_escape(ev.kind.replace('_', ' '))}",
                  "TRANSP:TRANSPARENT", "END:VEVENT"]
    lines.append("END:VCALENDAR")
    return ("\r\n".join(_fold(line) for line in lines) + "\r\n").encode("utf-8")
