"""Lunar eclipse API: JSON fields, errors, and visibility from a site."""

from __future__ import annotations

from datetime import datetime, timezone

import numpy as np
import pytest

from domegen.eclipse.lunar import find_lunar_eclipses, lunar_eclipse_on, lunar_local
from domegen.errors import DomegenError, InputError, NotFoundError, OutOfRangeError
from domegen.sky.ephemeris import body
from domegen.sky.site import Site
from domegen.sky.times import to_time

NANTES = Site(47.2184, -1.5536, 20.0, timezone="Europe/Paris", name="Loire Valley Science Dome")

_FIELDS = {"kind", "type", "greatest_utc", "greatest_tt", "umbral_magnitude", "penumbral_magnitude",
           "contacts_utc", "duration_penumbral_min", "duration_partial_min", "duration_total_min",
           "gamma", "saros"}


def test_json_fields_exactly_as_issue_6():
    j = lunar_eclipse_on("2021-11-19").as_json()
    assert set(j) == _FIELDS
    assert j["kind"] == "lunar" and j["type"] == "partial"
    assert set(j["contacts_utc"]) == {"P1", "U1", "U2", "U3", "U4", "P4"}
    assert j["contacts_utc"]["U2"] is None and j["contacts_utc"]["U3"] is None
    assert j["duration_total_min"] is None and j["duration_partial_min"] > 200
    assert j["greatest_utc"].endswith("Z") and "T" in j["greatest_tt"]


def test_no_eclipse_names_the_nearest():
    with pytest.raises(NotFoundError) as info:
        lunar_eclipse_on("2022-12-01")
    assert "2022-11-08" in str(info.value) and "2023-05-05" in str(info.value)


def test_bad_inputs():
    with pytest.raises(InputError):
        lunar_eclipse_on("not a date")
    with pytest.raises(OutOfRangeError):
        lunar_eclipse_on("1850-01-01")
    with pytest.raises(DomegenError):
        find_lunar_eclipses(datetime(2022, 1, 1), datetime(2023, 1, 1))  # naive
    with pytest.raises(InputError):
        find_lunar_eclipses(datetime(2023, 1, 1, tzinfo=timezone.utc), datetime(2022, 1, 1, tzinfo=timezone.utc))


def test_window_is_half_open():
    ecl = lunar_eclipse_on("2022-05-16")
    inside = find_lunar_eclipses(ecl.greatest_utc, datetime(2022, 6, 1, tzinfo=timezone.utc))
    after = find_lunar_eclipses(datetime(2022, 4, 1, tzinfo=timezone.utc), ecl.greatest_utc)
    assert [e.greatest_utc.date().isoformat() for e in inside] == ["2022-05-16"]
    assert after == []


def test_local_circumstances_nantes_2025_09_07():
    # Total lunar eclipse of 2025-09-07: the Moon rises in eclipse over western Europe (common
    # knowledge of that event); from Nantes P1 and U1 are below the horizon, U3..P4 above.
    ecl = lunar_eclipse_on("2025-09-07")
    assert ecl.type == "total"
    loc = lunar_local(ecl, NANTES)
    alts = {k: v[0] for k, v in loc.moon_altaz_deg.items()}
    assert alts["P1"] < 0 and alts["U1"] < 0
    assert alts["U3"] > 0 and alts["U4"] > 0 and alts["P4"] > 0
    assert alts["P1"] < alts["U1"] < alts["U2"] < alts["U3"]  # a rising Moon
    frac = loc.phase_visible_fraction
    assert 0 < frac["penumbral"] < 1 and 0 < frac["partial"] < 1
    j = loc.as_json()
    assert j["contacts"]["P4"]["above_horizon"] is True
    assert j["contacts"]["U3"]["local"].endswith("+02:00")  # CEST
    # near greatest eclipse the Moon sits opposite the Sun: altitudes nearly opposite
    # (topocentric parallax up to ~1 deg, the shadow axis offset ~0.5 deg)
    t = to_time(ecl.greatest_utc)
    sun_alt = NANTES.observer().at(t).observe(body("Sun")).apparent().altaz()[0].degrees
    moon_alt = NANTES.observer().at(t).observe(body("Moon")).apparent().altaz()[0].degrees
    assert moon_alt == pytest.approx(-sun_alt, abs=2.0)


def test_local_for_moon_down_all_eclipse():
    # 2022-11-08 maximum over the Pacific: from Nantes (10:59 UTC = midday) the Moon is down throughout
    loc = lunar_local(lunar_eclipse_on("2022-11-08"), NANTES)
    assert all(v is None or v[0] < 0 for v in loc.moon_altaz_deg.values())
    assert loc.phase_visible_fraction == {"penumbral": 0.0, "partial": 0.0, "total": 0.0}
    assert loc.visible_contacts == []


def test_saros_steps():
    # one saros apart: same series; the magnitudes and gamma change slowly
    a = lunar_eclipse_on("2004-10-28")
    b = lunar_eclipse_on("2022-11-08")
    assert a.saros == b.saros == 136
    assert abs(a.gamma - b.gamma) < 0.1
    assert np.sign(a.gamma) == np.sign(b.gamma)
