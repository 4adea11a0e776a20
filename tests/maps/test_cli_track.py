"""``domegen track``: help, exit status 2 on bad input, files written, caution at the end."""

from __future__ import annotations

import json

import pytest

from domegen.cli.main import main
from domegen.eclipse.safety import CAUTION


def test_help_text(capsys):
    with pytest.raises(SystemExit) as ex:
        main(["track", "--help"])
    assert ex.value.code == 0
    out = capsys.readouterr().out
    for flag in ("--eclipse", "--geojson", "--map", "--globe", "--frames", "--sites"):
        assert flag in out


@pytest.mark.parametrize("argv", [
    ["track", "--eclipse", "2026-08-13", "--geojson", "x.json"],      # no eclipse that day
    ["track", "--eclipse", "2026-13-01", "--geojson", "x.json"],      # not a date
    ["track", "--eclipse", "2026-08-12"],                             # nothing to write
    ["track", "--eclipse", "2026-08-12", "--map", "m.png", "--width", "9000"],
    ["track", "--eclipse", "2026-08-12", "--globe", "g.png", "--centre", "north"],
    ["track", "--eclipse", "2026-08-12", "--geojson", "x.json", "--sites", "missing.csv"],
])
def test_bad_input_exits_2_with_one_line(argv, capsys, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    assert main(argv) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and err[0].startswith("domegen: error:")
    assert not (tmp_path / "x.json").exists()


def test_bad_sites_line_is_located(tmp_path, capsys):
    f = tmp_path / "s.csv"
    f.write_text("Burgos,42.34,-3.70\nNowhere,north,3\n")
    assert main(["track", "--eclipse", "2026-08-12", "--geojson", str(tmp_path / "x.json"),
                 "--sites", str(f)]) == 2
    assert "s.csv:2" in capsys.readouterr().err


def test_writes_everything_and_ends_with_the_caution(tmp_path, capsys):
    sites = tmp_path / "sites.csv"
    sites.write_text("name,lat,lon\nBurgos,42.34,-3.70\nNantes,47.2184,-1.5536\n")
    rc = main(["track", "--eclipse", "2026-08-12", "--geojson", str(tmp_path / "p.geojson"),
               "--map", str(tmp_path / "m.png"), "--width", "256", "--globe", str(tmp_path / "g.png"),
               "--size", "128", "--frames", str(tmp_path / "fr"), "--frame-count", "2",
               "--sites", str(sites)])
    assert rc == 0
    out = capsys.readouterr().out
    assert out.rstrip().endswith(CAUTION.rstrip())
    fc = json.loads((tmp_path / "p.geojson").read_text())
    assert fc["type"] == "FeatureCollection" and fc["properties"]["type"] == "total"
    from PIL import Image

    for name, size in (("m.png", (256, 128)), ("g.png", (128, 128))):
        with Image.open(tmp_path / name) as im:
            assert im.size == size
    assert sorted(p.name for p in (tmp_path / "fr").iterdir()) == ["globe-00000.png", "globe-00001.png"]
