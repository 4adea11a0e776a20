"""``domegen events``: local times, CSV, JSON and the iCalendar file."""

from __future__ import annotations

import csv
import io
import json
from datetime import datetime, timezone
from zoneinfo import ZoneInfo

import icalendar

from domegen.cli.main import main

UTC = timezone.utc


def test_local_times_follow_the_iana_zone_across_the_dst_change(capsys):
    # Europe/Paris leaves CET (+01:00) for CEST (+02:00) on 2025-03-30 at 01:00 UTC
    # (EU rule: last Sunday of March; common practice). Moon phases on both sides of it.
    assert main(["events", "--place", "Nantes", "--from", "2025-03-15", "--to", "2025-04-15",
                 "--kinds", "moon_phase", "--csv"]) == 0
    rows = list(csv.DictReader(io.StringIO(capsys.readouterr().out)))
    assert len(rows) >= 4
    paris = ZoneInfo("Europe/Paris")
    offsets = set()
    for r in rows:
        utc = datetime.fromisoformat(r["utc"].replace("Z", "+00:00"))
        local = datetime.fromisoformat(r["local"])
        assert local == utc  # the same instant
        assert local.utcoffset() == utc.astimezone(paris).utcoffset()
        offsets.add(local.isoformat()[-6:])
        before = utc < datetime(2025, 3, 30, 1, tzinfo=UTC)
        assert local.isoformat().endswith("+01:00" if before else "+02:00")
    assert offsets == {"+01:00", "+02:00"}


def test_text_output_prints_local_wall_time(capsys):
    assert main(["events", "--place", "Nantes", "--from", "2025-03-20", "--to", "2025-04-10",
                 "--kinds", "moon_phase"]) == 0
    out = capsys.readouterr().out
    # Last Quarter 2025-03-22 11:29:26 UT (USNO gives 11:29) -> 12:29 CET;
    # First Quarter 2025-04-05 02:15 UT (USNO, from memory) -> 04:15 CEST
    assert "2025-03-22 12:29 CET" in out
    assert "2025-04-05 04:1" in out and "CEST" in out


def test_ics_parses_and_holds_the_events(tmp_path, capsys):
    ics = tmp_path / "sky.ics"
    assert main(["events", "--place", "Nantes", "--from", "2020-12-15", "--to", "2020-12-31",
                 "--kinds", "pairing,moon_phase", "--json", "--ics", str(ics)]) == 0
    listed = json.loads(capsys.readouterr().out)["events"]
    cal = icalendar.Calendar.from_ical(ics.read_bytes())
    vevents = [c for c in cal.walk() if c.name == "VEVENT"]
    assert len(vevents) == len(listed) >= 4
    assert str(cal["VERSION"]) == "2.0" and cal["PRODID"]
    uids = {str(v["UID"]) for v in vevents}
    assert len(uids) == len(vevents)
    by_summary = {str(v["SUMMARY"]): v for v in vevents}
    gc = [s for s in by_summary if "Jupiter" in s and "Saturn" in s]
    assert gc, by_summary.keys()
    start = by_summary[gc[0]]["DTSTART"].dt
    assert start.tzinfo is not None
    assert start.astimezone(UTC).strftime("%Y-%m-%d %H") == "2020-12-21 18"
    for v, ev in zip(vevents, listed):
        assert v["DTSTART"].dt.astimezone(UTC) == datetime.fromisoformat(
            ev["utc"].replace("Z", "+00:00"))
        assert str(v["SUMMARY"]) == ev["title"]
        assert v["DTSTAMP"].dt.tzinfo is not None
    raw = ics.read_bytes()
    assert b"\r\n" in raw and all(len(line) <= 75 for line in raw.split(b"\r\n"))


def test_unknown_place_exits_2_with_suggestions(capsys):
    assert main(["events", "--place", "Springfeld", "--from", "2025-01-01", "--to", "2025-01-02"]) == 2
    err = capsys.readouterr().err
    assert "Springfield" in err and "Traceback" not in err


def test_bad_dates_exit_2(capsys):
    assert main(["events", "--place", "Nantes", "--from", "2025-13-01", "--to", "2025-01-02"]) == 2
    assert main(["events", "--place", "Nantes", "--from", "2025-02-01", "--to", "2025-01-02"]) == 2
    err = capsys.readouterr().err
    assert err.count("domegen: error:") == 2


def test_only_eclipses_seen_from_the_site_are_listed():
    from domegen.educator.calendar import events_at_site
    from domegen.sky.site import Site

    nantes = Site(47.2184, -1.5536, 20.0, timezone="Europe/Paris", name="Nantes")
    ev = events_at_site(nantes, datetime(2025, 1, 1, tzinfo=UTC), datetime(2026, 6, 1, tzinfo=UTC),
                        kinds=("solar_eclipse", "lunar_eclipse"))
    got = {(e.kind, e.utc.date().isoformat()): e for e in ev}
    # From memory (NASA eclipse pages): 2025-03-14 total lunar eclipse, Moon setting in totality
    # over western Europe; 2025-03-29 partial solar eclipse over Europe (Sun up throughout in France);
    # 2025-09-07 total lunar eclipse, Moon rising eclipsed in western Europe; 2025-09-21 partial
    # solar (southern hemisphere only), 2026-02-17 annular (Antarctica) and 2026-03-03 total lunar
    # (Americas, Pacific, east Asia) are not seen from France.
    assert set(got) == {("lunar_eclipse", "2025-03-14"), ("solar_eclipse", "2025-03-29"),
                        ("lunar_eclipse", "2025-09-07")}
    assert "sets" in got[("lunar_eclipse", "2025-03-14")].details["seen"]
    assert "rises" in got[("lunar_eclipse", "2025-09-07")].details["seen"]
    assert got[("solar_eclipse", "2025-03-29")].details["seen"] == "seen from start to end"


def test_ics_eclipse_spans_first_to_last_contact_with_caution(tmp_path, capsys):
    ics = tmp_path / "eclipse.ics"
    assert main(["events", "--place", "Nantes", "--from", "2026-08-12", "--to", "2026-08-12",
                 "--kinds", "solar_eclipse", "--json", "--ics", str(ics)]) == 0
    ev = json.loads(capsys.readouterr().out)["events"]
    assert len(ev) == 1 and ev[0]["kind"] == "solar_eclipse"
    cal = icalendar.Calendar.from_ical(ics.read_bytes())
    (v,) = [c for c in cal.walk() if c.name == "VEVENT"]
    c = ev[0]["details"]["contacts"]
    assert v["DTSTART"].dt == datetime.fromisoformat(c["C1"].replace("Z", "+00:00"))
    assert v["DTEND"].dt == datetime.fromisoformat(c["C4"].replace("Z", "+00:00"))
    desc = str(v["DESCRIPTION"])
    assert "ISO 12312-2" in desc and "CEST" in desc
    assert str(v["GEO"].latitude).startswith("47.21")
