"""The eclipse search: published calendar, century statistics, saros arithmetic, bad input."""

from __future__ import annotations

from collections import Counter
from datetime import datetime, timezone

import pytest

from domegen.eclipse import find_solar_eclipses, solar_eclipse_on
from domegen.eclipse.saros import saros_inex, solar_saros
from domegen.errors import InputError, NotFoundError, OutOfRangeError
from tests.eclipse._solar_data import canon, eclipses

UTC = timezone.utc


def _all():
    return find_solar_eclipses(datetime(1900, 1, 1, tzinfo=UTC), datetime(2050, 12, 31, tzinfo=UTC))


def test_2024_to_2027_matches_the_published_calendar():
    found = find_solar_eclipses(datetime(2024, 1, 1, tzinfo=UTC), datetime(2027, 12, 31, 23, tzinfo=UTC))
    expected = canon()["calendar_2024_2027"]["eclipses"]
    assert [(e.date.isoformat(), e.type) for e in found] == [tuple(x) for x in expected]


def test_twentieth_century_statistics():
    # 228 solar eclipses in 1901-2000: 78 partial, 73 annular, 71 total, 6 hybrid
    # (NASA eclipse web site, statistics of the 20th-century catalogue; from memory).
    found = [e for e in _all() if 1901 <= e.greatest_utc.year <= 2000]
    assert len(found) == 228
    assert Counter(e.type for e in found) == {"partial": 78, "annular": 73, "total": 71, "hybrid": 6}


def test_search_is_consistent():
    found = _all()
    times = [e.greatest_utc for e in found]
    assert times == sorted(times)
    # Consecutive solar eclipses are 1, 5 or 6 lunations apart (common practice).
    gaps = {round((b - a).total_seconds() / 86400 / 29.530589) for a, b in zip(times, times[1:])}
    assert gaps <= {1, 5, 6}
    # Eclipses one saros (223 lunations) apart share a series; the series gamma moves one way.
    by_saros = {}
    for e in found:
        by_saros.setdefault(e.saros, []).append(e)
    for series in by_saros.values():
        for a, b in zip(series, series[1:]):
            assert round((b.greatest_utc - a.greatest_utc).total_seconds() / 86400 / 29.530589) % 223 == 0
        gammas = [e.gamma for e in series]
        steps = [b - a for a, b in zip(gammas, gammas[1:])]
        assert all(s > 0 for s in steps) or all(s < 0 for s in steps)
    # Odd series at the ascending node (gamma decreases), even at the descending node (from memory).
    for saros, series in by_saros.items():
        if len(series) >= 2:
            assert (series[1].gamma < series[0].gamma) == (saros % 2 == 1)


def test_saros_arithmetic():
    for n in (-1800, -223, -1, 0, 1, 5, 6, 358, 1500):
        a, b = saros_inex(n)
        assert 223 * a + 358 * b == n and -111 <= b <= 111
    for ref in eclipses():
        e = solar_eclipse_on(ref["date"])
        assert solar_saros(e.besselian.tt_jd(e.greatest_t_h)) == ref["saros"]


def test_date_without_eclipse_names_the_nearest():
    with pytest.raises(NotFoundError) as err:
        solar_eclipse_on("2024-04-09")
    assert "2024-04-08" in str(err.value) and "2024-10-02" in str(err.value)


def test_dates_outside_the_ephemeris():
    with pytest.raises(OutOfRangeError):
        find_solar_eclipses(datetime(1890, 1, 1, tzinfo=UTC), datetime(1901, 1, 1, tzinfo=UTC))
    with pytest.raises(OutOfRangeError):
        solar_eclipse_on("2060-01-01")
    with pytest.raises(InputError):
        find_solar_eclipses(datetime(2001, 1, 1), datetime(2002, 1, 1, tzinfo=UTC))
    with pytest.raises(InputError):
        find_solar_eclipses(datetime(2002, 1, 1, tzinfo=UTC), datetime(2001, 1, 1, tzinfo=UTC))


def test_json_fields():
    data = solar_eclipse_on("2024-04-08").as_json()
    assert list(data) == ["kind", "type", "greatest_utc", "greatest_tt", "delta_t_s", "gamma", "magnitude",
                          "lat_deg", "lon_deg", "sun_alt_deg", "path_width_km", "central_duration_s", "saros"]
    assert data["greatest_utc"].endswith("Z") and data["greatest_tt"] == "2024-04-08T18:18:29"
    partial = solar_eclipse_on("2025-03-29").as_json()
    assert partial["path_width_km"] is None and partial["central_duration_s"] is None
