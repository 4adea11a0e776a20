"""``domegen eclipses`` and ``domegen local``: fields, caution, exit codes."""

from __future__ import annotations

import csv
import io
import json

import pytest

from domegen.cli.main import main
from domegen.eclipse.safety import CAUTION


def run(capsys, *argv):
    code = main(list(argv))
    out = capsys.readouterr()
    return code, out.out, out.err


SOLAR_FIELDS = ["kind", "type", "greatest_utc", "greatest_tt", "delta_t_s", "gamma", "magnitude", "lat_deg",
                "lon_deg", "sun_alt_deg", "path_width_km", "central_duration_s", "saros"]


def test_eclipses_json(capsys):
    code, out, _ = run(capsys, "eclipses", "--from", "2024-01-01", "--to", "2024-12-31", "--kind", "solar", "--json")
    assert code == 0
    rows = json.loads(out)
    assert [r["greatest_utc"][:10] for r in rows] == ["2024-04-08", "2024-10-02"]
    assert all(list(r) == SOLAR_FIELDS for r in rows)
    assert rows[0]["type"] == "total" and rows[0]["saros"] == 139


def test_eclipses_json_with_besselian_elements(capsys):
    code, out, _ = run(capsys, "eclipses", "--from", "2024-04-01", "--to", "2024-04-30", "--kind", "solar",
                       "--json", "--elements")
    (row,) = json.loads(out)
    assert code == 0 and row["besselian"]["t0_tt"] == "2024-04-08T18:00:00"
    assert abs(row["besselian"]["x"][0] - (-0.318244)) < 0.0005  # NASA canon x0 for 2024-04-08


def test_local_lunar_eclipse(capsys):
    code, out, _ = run(capsys, "local", "--eclipse", "2025-03-14", "--lat", "47.2184", "--lon", "-1.5536",
                       "--tz", "Europe/Paris")
    assert code == 0 and "lunar eclipse" in out and CAUTION not in out


def test_eclipses_all_kinds_text_ends_with_caution(capsys):
    code, out, _ = run(capsys, "eclipses", "--from", "2025-01-01", "--to", "2025-12-31")
    assert code == 0
    assert "solar partial" in out and "lunar total" in out
    assert out.rstrip().endswith(CAUTION)
    assert "ISO 12312-2" in CAUTION and "health authorities" in CAUTION


def test_lunar_only_listing_has_no_caution(capsys):
    code, out, _ = run(capsys, "eclipses", "--from", "2025-01-01", "--to", "2025-12-31", "--kind", "lunar")
    assert code == 0 and "lunar" in out and CAUTION not in out


def test_eclipses_csv(capsys):
    code, out, _ = run(capsys, "eclipses", "--from", "2026-01-01", "--to", "2026-12-31", "--kind", "solar", "--csv")
    rows = list(csv.DictReader(io.StringIO(out)))
    assert code == 0 and [r["type"] for r in rows] == ["annular", "total"]
    assert rows[1]["saros"] == "126"


def test_local_json_fields(capsys):
    code, out, _ = run(capsys, "local", "--eclipse", "2024-04-08", "--lat", "32.7767", "--lon", "-96.797",
                       "--elev", "150", "--tz", "America/Chicago", "--json")
    assert code == 0
    d = json.loads(out)
    for key in ("type_here", "c1_utc", "c2_utc", "max_utc", "c3_utc", "c4_utc", "c1_local", "c2_local",
                "max_local", "c3_local", "c4_local", "timezone", "magnitude", "obscuration", "duration_s",
                "sun_alt_deg_at_max", "sun_az_deg_at_max"):
        assert key in d
    assert d["type_here"] == "total" and d["timezone"] == "America/Chicago"
    assert d["c2_local"].endswith("-05:00") and d["c2_utc"].endswith("Z")
    assert 200 < d["duration_s"] < 260


def test_local_text_ends_with_caution(capsys):
    code, out, _ = run(capsys, "local", "--eclipse", "2026-08-12", "--lat", "47.2184", "--lon", "-1.5536",
                       "--elev", "20", "--tz", "Europe/Paris")
    assert code == 0 and "partial" in out
    assert out.rstrip().endswith(CAUTION)


def test_local_site_without_eclipse_is_none_not_error(capsys):
    code, out, _ = run(capsys, "local", "--eclipse", "2024-04-08", "--lat", "-33.87", "--lon", "151.21",
                       "--tz", "Australia/Sydney", "--json")
    assert code == 0 and json.loads(out)["type_here"] == "none"


@pytest.mark.parametrize("argv, needle", [
    (("local", "--eclipse", "2024-04-09", "--lat", "0", "--lon", "0"), "2024-04-08"),
    (("local", "--eclipse", "1899-01-01", "--lat", "0", "--lon", "0"), "outside the ephemeris"),
    (("eclipses", "--from", "2049-01-01", "--to", "2055-01-01"), "outside the ephemeris"),
    (("eclipses", "--from", "2025-01-01", "--to", "2024-01-01"), "before"),
    (("local", "--eclipse", "2024-13-01", "--lat", "0", "--lon", "0"), "date"),
])
def test_bad_input_exits_2_with_one_line(capsys, argv, needle):
    code, out, err = run(capsys, *argv)
    assert code == 2 and needle in err and len(err.strip().splitlines()) == 1 and "Traceback" not in err


def test_help_texts(capsys):
    for cmd in ("eclipses", "local"):
        with pytest.raises(SystemExit) as ex:
            main([cmd, "--help"])
        assert ex.value.code == 0
        assert len(capsys.readouterr().out) > 200
