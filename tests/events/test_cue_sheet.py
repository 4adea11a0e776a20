"""``domegen cue-sheet``: contacts in local time, sky at maximum, the safety block."""

from __future__ import annotations

import csv
import io
from datetime import datetime, timezone
from zoneinfo import ZoneInfo

import pytest

from domegen.cli.main import main
from domegen.eclipse.safety import CAUTION
from domegen.educator.cuesheet import compass
from domegen.educator.star_names import STAR_NAMES

UTC = timezone.utc


def _cues(path):
    rows = list(csv.DictReader(io.StringIO(path.read_text())))
    return [r for r in rows if r["section"] == "cue"], rows


def test_contacts_in_local_time_match_utc_on_both_sides_of_a_dst_change(tmp_path):
    # Nantes, Europe/Paris: the lunar eclipse of 2025-03-14 falls in winter time (CET, +01:00),
    # the solar eclipse of 2026-08-12 in summer time (CEST, +02:00).
    paris = ZoneInfo("Europe/Paris")
    for date, offset, kind_keys in (("2025-03-14", "+01:00", {"P1", "U1", "U2", "max"}),
                                    ("2026-08-12", "+02:00", {"C1", "max", "C4"})):
        out = tmp_path / f"{date}.csv"
        assert main(["cue-sheet", "--eclipse", date, "--place", "Nantes", "--csv", str(out)]) == 0
        cues, _ = _cues(out)
        assert kind_keys <= {r["name"] for r in cues}
        for r in cues:
            utc = datetime.fromisoformat(r["utc"].replace("Z", "+00:00"))
            local = datetime.fromisoformat(r["local"])
            assert local == utc and local.isoformat().endswith(offset)
            assert local.utcoffset() == utc.astimezone(paris).utcoffset()


def test_total_eclipse_sheet_near_burgos(tmp_path, capsys):
    md, cs = tmp_path / "cue.md", tmp_path / "cue.csv"
    assert main(["cue-sheet", "--eclipse", "2026-08-12", "--place", "Burgos, ES",
                 "--md", str(md), "--csv", str(cs)]) == 0
    text = md.read_text()
    assert "Total solar eclipse" in text and "Duration of totality here: 1 min" in text
    assert text.rstrip().endswith(CAUTION)
    cues, rows = _cues(cs)
    assert [r["name"] for r in cues] == ["C1", "C2", "max", "C3", "C4"]
    times = [datetime.fromisoformat(r["utc"].replace("Z", "+00:00")) for r in cues]
    assert times == sorted(times)
    # Venus is far from the Sun and bright: it must be listed as visible during totality
    venus = [r for r in rows if r["section"] == "sky" and r["name"] == "Venus"][0]
    assert venus["note"].startswith("visible")
    assert rows[-1]["section"] == "safety" and rows[-1]["note"] == CAUTION


def test_markdown_on_stdout_and_unknown_date(capsys):
    assert main(["cue-sheet", "--eclipse", "2026-08-12", "--place", "Nantes"]) == 0
    out = capsys.readouterr().out
    assert "| C1 |" in out and "CEST" in out and CAUTION in out
    assert main(["cue-sheet", "--eclipse", "2026-08-13", "--place", "Nantes"]) == 2
    assert "no solar or lunar eclipse" in capsys.readouterr().err


def test_star_names_match_bright_catalogue_stars():
    from domegen.sky.stars import catalogue

    cat = catalogue()
    index = {int(h): i for i, h in enumerate(cat.hip[: cat.brighter_than(3.0)])}
    for hip in STAR_NAMES:
        assert hip in index, hip


@pytest.mark.parametrize("az, name", [(0, "N"), (11, "N"), (12, "NNE"), (90, "E"), (225, "SW"),
                                      (359, "N")])
def test_compass(az, name):
    assert compass(az) == name
