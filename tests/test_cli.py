"""Command-line promises: --help everywhere, --version, clean errors with exit 2."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from domegen.cli.main import build_parser, main


def _subcommands():
    parser = build_parser()
    for action in parser._actions:
        if action.__class__.__name__ == "_SubParsersAction":
            return dict(action.choices)
    return {}


def test_every_subcommand_has_help_text(capsys):
    subs = _subcommands()
    assert "positions" in subs
    for name, sub in subs.items():
        assert (sub.description or "").strip(), f"`domegen {name}` has no description"
        with pytest.raises(SystemExit) as exc:
            main([name, "--help"])
        assert exc.value.code == 0
        out = capsys.readouterr().out
        assert "usage:" in out and name in out


def test_version_and_module_entry_point():
    out = subprocess.run([sys.executable, "-m", "domegen", "--version"], capture_output=True, text=True)
    assert out.returncode == 0 and out.stdout.startswith("domegen ")


def test_positions_json_fields(capsys):
    code = main(["positions", "--lat", "47.2184", "--lon", "-1.5536", "--elev", "20", "--tz", "Europe/Paris",
                 "--at", "2026-08-12T20:00:00Z", "--json"])
    assert code == 0
    doc = json.loads(capsys.readouterr().out)
    assert set(doc["site"]) >= {"lat_deg", "lon_deg", "elev_m", "timezone"}
    assert doc["time_utc"] == "2026-08-12T20:00:00Z"
    assert doc["time_tt"].startswith("2026-08-12T20:01:")  # TT - UTC = 69.184 s since 2017 (IERS Bulletin C)
    names = [b["name"] for b in doc["bodies"]]
    assert names == ["Sun", "Moon", "Mercury", "Venus", "Mars", "Jupiter", "Saturn", "Uranus", "Neptune"]
    for b in doc["bodies"]:
        assert set(b) >= {"name", "alt_deg", "alt_refracted_deg", "az_deg", "ra_hours", "dec_deg",
                          "distance_km", "angular_radius_deg", "illuminated_fraction", "magnitude"}
    assert doc["stars"] and all(set(s) == {"hip", "alt_deg", "az_deg", "magnitude"} for s in doc["stars"])
    assert all(s["alt_deg"] > 0 for s in doc["stars"])
    # Vega (HIP 91262) stands high in the east-south-east on an August evening in France (common practice).
    vega = [s for s in doc["stars"] if s["hip"] == 91262]
    assert vega and vega[0]["alt_deg"] > 60


@pytest.mark.parametrize("argv, word", [
    (["--lat", "91", "--lon", "0", "--at", "2024-01-01T00:00Z"], "latitude"),
    (["--lat", "10", "--lon", "0", "--at", "1899-06-01T00:00Z"], "outside the ephemeris"),
    (["--lat", "10", "--lon", "0", "--at", "2051-06-01T00:00Z"], "outside the ephemeris"),
    (["--lat", "10", "--lon", "0", "--at", "2024-13-45T99:00"], "ISO 8601"),
    (["--lat", "10", "--lon", "0", "--at", "2024-01-01T00:00", "--tz", "Mars/Olympus"], "time zone"),
    (["--lon", "0", "--at", "2024-01-01T00:00Z"], "--lat"),
])
def test_positions_bad_input_exit_2_without_traceback(argv, word):
    r = subprocess.run([sys.executable, "-m", "domegen", "positions", *argv], capture_output=True, text=True)
    assert r.returncode == 2
    assert "Traceback" not in r.stderr
    assert word in r.stderr
    assert len(r.stderr.strip().splitlines()) == 1
