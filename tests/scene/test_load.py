"""Loading scenes: includes, event anchors, timeline arithmetic, camera moves, purity."""

from __future__ import annotations

import pickle
from datetime import datetime, timedelta, timezone
from pathlib import Path

import numpy as np
import pytest

from domegen.cli.main import main
from domegen.errors import SceneError
from domegen.scene import load_scene

SCENES = Path(__file__).resolve().parents[2] / "scenes"
EXAMPLES = sorted(p for p in SCENES.glob("*.yaml") if not p.name.endswith(".theatre.yaml"))

HEAD = """\
venue: {latitude: 47.2184, longitude: -1.5536, elevation: 20, time_zone: Europe/Paris}
dome: {size: 128}
output: {folder: out, frame_rate: 10}
"""


def scene(tmp_path, body: str, head: str = HEAD):
    p = tmp_path / "s.yaml"
    p.write_text(head + body)
    return load_scene(p)


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.stem)
def test_example_scenes_check_cleanly(path, capsys):
    assert main(["check", str(path)]) == 0
    out = capsys.readouterr().out
    assert "frames" in out and "sky time" in out
    s = load_scene(path)
    expected = sum(round(sh.duration_s * s.output.fps) for sh in s.shots)
    assert s.frame_count == expected
    s.frame_spec(0)
    s.frame_spec(s.frame_count - 1)


def test_solar_eclipse_check_lists_contacts_and_ends_with_the_caution(capsys):
    from domegen.eclipse.safety import CAUTION

    assert main(["check", str(SCENES / "solar-eclipse-2026-burgos.yaml")]) == 0
    out = capsys.readouterr().out
    assert "C2 (second contact)" in out and "C3 (third contact)" in out
    assert out.rstrip().endswith(CAUTION)


def test_include_gives_defaults_the_scene_overrides(tmp_path):
    (tmp_path / "theatre.yaml").write_text(HEAD + "layers: {labels: 1, stars: 0.5}\n")
    s = scene(tmp_path, "include: theatre.yaml\ndome: {front_azimuth: 90}\nlayers: {stars: 1}\n"
                        "shots:\n  - {duration: 1 s, sky: {start: '2026-03-20T20:00:00Z'}}\n", head="")
    assert s.dome["size"] == 128 and s.dome["front_azimuth"] == 90      # merged key by key
    assert s.layer_base["labels"] == 1 and s.layer_base["stars"] == 1
    assert [f.name for f in s.files] == ["s.yaml", "theatre.yaml"]


def test_rate_and_end_instants(tmp_path):
    s = scene(tmp_path, "shots:\n"
                        "  - {duration: 2 s, sky: {start: '2026-03-20 21:00', rate: 1 s of show = 10 min of sky}}\n"
                        "  - {duration: 1 s, sky: {start: continue, end: '2026-03-20T21:00:00Z', easing: ease_in_out}}\n")
    start = datetime(2026, 3, 20, 20, 0, tzinfo=timezone.utc)  # 21:00 in Paris (CET, UTC+1)
    assert s.sky_utc(0) == start
    assert s.sky_utc(10) == start + timedelta(minutes=10)      # 1 s of show later
    assert s.sky_utc(20) == start + timedelta(minutes=20)      # second shot starts where the first ended
    # smoothstep easing: the midpoint of the shot is the midpoint of its sky span
    assert s.shots[1].sky_utc_s(0.5) == pytest.approx(start.timestamp() + 40 * 60, abs=1e-6)  # 20:20 -> 21:00
    assert s.frame_count == 30 and s.duration_s == 3.0


def test_lunar_contact_offsets(tmp_path):
    from domegen.eclipse.lunar import lunar_eclipse_on

    s = scene(tmp_path, "eclipse: {kind: lunar, date: 2029-12-20}\nshots:\n"
                        "  - {duration: 1 s, sky: {start: 10 s before U2, end: maximum + 1 min}}\n")
    c = lunar_eclipse_on("2029-12-20").contacts_utc
    assert s.sky_utc(0) == c["U2"] - timedelta(seconds=10)
    assert s.shots[0].sky_end_s == pytest.approx((c["greatest"] + timedelta(minutes=1)).timestamp(), abs=1e-3)
    assert {e.label for e in s.events} == {"U2 (lunar contact)", "greatest lunar eclipse"}


def test_solar_contact_offsets_at_a_totality_site(tmp_path):
    from domegen.eclipse import local_circumstances, solar_eclipse_on
    from domegen.sky.site import Site

    head = HEAD.replace("latitude: 47.2184, longitude: -1.5536, elevation: 20, time_zone: Europe/Paris",
                        "latitude: 42.34, longitude: -3.70, elevation: 860, time_zone: Europe/Madrid")
    s = scene(tmp_path, "eclipse: {kind: solar, date: 2026-08-12}\nshots:\n"
                        "  - {duration: 1 s, sky: {start: 10 s before second contact, end: C3}}\n", head=head)
    lc = local_circumstances(solar_eclipse_on("2026-08-12"), Site(42.34, -3.70, 860, timezone="Europe/Madrid"))
    assert s.sky_utc(0) == lc.utc("c2") - timedelta(seconds=10)
    # totality near Burgos lasts under two minutes (the central line runs further north-east)
    assert 0 < s.shots[0].sky_end_s - s.shots[0].sky_start_s - 10 < 120


def test_second_contact_from_nantes_is_refused_with_a_reason(tmp_path):
    with pytest.raises(SceneError, match="does not happen at the venue") as err:
        scene(tmp_path, "eclipse: {kind: solar, date: 2026-08-12}\nshots:\n"
                        "  - duration: 1 s\n    sky: {start: second contact}\n")
    assert err.value.line == 7  # the sky line


def test_sunset_matches_skyfield_almanac(tmp_path):
    from skyfield import almanac

    from domegen.sky.ephemeris import ephemeris, timescale
    from domegen.sky.site import Site

    s = scene(tmp_path, "date: 2026-03-20\nshots:\n  - {duration: 1 s, sky: {start: sunset}}\n")
    eph, ts = ephemeris(), timescale()
    topos = Site(47.2184, -1.5536, 20).topos
    t, _ = almanac.find_settings(eph["earth"] + topos, eph["sun"], ts.utc(2026, 3, 20, 0), ts.utc(2026, 3, 21, 0))
    reference = t[0].utc_datetime()  # skyfield's own routine, default horizon -0.8333 deg
    assert abs((s.sky_utc(0) - reference).total_seconds()) < 60


def test_look_at_sun_points_the_view_at_skyfields_sun(tmp_path):
    from domegen.sky.ephemeris import ephemeris, timescale
    from domegen.sky.site import Site

    s = scene(tmp_path, "shots:\n  - duration: 1 s\n    sky: {start: '2026-06-21T12:00:00Z', rate: 60}\n"
                        "    camera:\n      - {at: start, look_altitude: 90}\n"
                        "      - {at: end, look_at: Sun, field: 40, easing: linear}\n")
    eph, ts = ephemeris(), timescale()
    spec = s.frame_spec(9)
    obs = eph["earth"] + Site(47.2184, -1.5536, 20).topos
    alt, az, _ = obs.at(ts.from_datetime(spec.utc)).observe(eph["sun"]).apparent().altaz("standard")
    # 0.9 of the way from the zenith to the Sun along a great circle, field 180 -> 40
    sun = np.array([np.cos(alt.radians) * np.sin(az.radians), np.cos(alt.radians) * np.cos(az.radians),
                    np.sin(alt.radians)])
    va, vz = np.radians(spec.camera.view_alt_deg), np.radians(spec.camera.view_az_deg)
    view = np.array([np.cos(va) * np.sin(vz), np.cos(va) * np.cos(vz), np.sin(va)])
    angle_to_sun = np.degrees(np.arccos(np.clip(view @ sun, -1, 1)))
    assert angle_to_sun == pytest.approx(0.1 * (90 - alt.degrees), abs=0.05)
    assert spec.camera.field_deg == pytest.approx(180 - 0.9 * 140)


def test_layer_fades_and_held_values(tmp_path):
    s = scene(tmp_path, "layers: {labels: 0.2}\nshots:\n  - duration: 2 s\n    sky: {start: '2026-03-20T20:00:00Z'}\n"
                        "    layers:\n      - {at: 0.5 s, stars: 0, exposure: -3}\n"
                        "      - {at: 1.5 s, stars: 1, exposure: auto, easing: linear}\n")
    stars = [s.frame_spec(n).layers.stars for n in range(20)]
    # from the default 1 at the start down to 0 at 0.5 s, back up to 1 at 1.5 s, then held
    assert stars[0] == 1.0 and stars[5] == 0.0 and stars[15:] == [1.0] * 5
    assert stars[3] == pytest.approx(1 - 3 / 5) and stars[10] == pytest.approx(0.5)
    exposures = [s.frame_spec(n).layers.exposure_ev for n in (0, 4, 5, 10, 14, 15, 19)]
    assert exposures == [None, None, -3.0, -3.0, -3.0, None, None]  # a number and "auto" do not blend
    assert s.frame_spec(3).layers.labels == pytest.approx(0.2)


def test_frame_spec_is_a_pure_function_of_scene_and_number(tmp_path):
    s = load_scene(SCENES / "lunar-eclipse-2029-12-20.yaml")
    order = [1500, 3, 2399, 900, 3]
    first = {n: s.frame_spec(n) for n in order}
    copy = pickle.loads(pickle.dumps(s))
    assert all(copy.frame_spec(n) == first[n] for n in reversed(order))
    with pytest.raises(Exception):
        s.frame_spec(s.frame_count)


def test_venue_by_place_name_and_json_summary(tmp_path, capsys):
    import json

    p = tmp_path / "s.yaml"
    p.write_text("venue: {place: Nantes, elevation: 20}\ndome: {size: 128}\noutput: {folder: out}\n"
                 "shots:\n  - {duration: 1 s, sky: {start: '2026-03-20 21:00'}}\n")
    s = load_scene(p)
    # GeoNames position of Nantes (about 47.22 N, 1.55 W), zone Europe/Paris
    assert s.site.lat_deg == pytest.approx(47.22, abs=0.05) and s.site.lon_deg == pytest.approx(-1.55, abs=0.05)
    assert s.site.timezone == "Europe/Paris"
    assert main(["check", str(p), "--json"]) == 0
    d = json.loads(capsys.readouterr().out)
    assert d["frame_count"] == 30 and d["sky_span"]["start_utc"] == "2026-03-20T20:00:00Z"
    assert d["sky_span"]["start_local"] == "2026-03-20T21:00:00+01:00"
