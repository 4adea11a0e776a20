"""City lookup against published GeoNames positions."""

from __future__ import annotations

import math

import pytest

from domegen.cli.main import main
from domegen.errors import NotFoundError
from domegen.places import find_place, place_matches, timezone_at
from domegen.places._index import normalize

# Published GeoNames positions (geonames.org/<id> pages; values from memory, the London one
# also seen on a public page quoting GeoNames 2643743: 51.50853, -0.12574).
PUBLISHED = [
    ("London, GB", 2643743, 51.50853, -0.12574, "Europe/London"),
    ("Paris", 2988507, 48.85341, 2.3488, "Europe/Paris"),
    ("Tokyo", 1850147, 35.6895, 139.69171, "Asia/Tokyo"),
    ("New York City", 5128581, 40.71427, -74.00597, "America/New_York"),
    ("Sydney", 2147714, -33.86785, 151.20732, "Australia/Sydney"),
    ("Berlin", 2950159, 52.52437, 13.41053, "Europe/Berlin"),
    ("Nantes", 2990969, 47.21725, -1.55336, "Europe/Paris"),
]


def _km(lat1, lon1, lat2, lon2):
    """Great-circle distance on a 6371 km sphere (haversine; common practice)."""
    p1, p2 = math.radians(lat1), math.radians(lat2)
    dp, dl = p2 - p1, math.radians(lon2 - lon1)
    a = math.sin(dp / 2) ** 2 + math.cos(p1) * math.cos(p2) * math.sin(dl / 2) ** 2
    return 2 * 6371.0 * math.asin(math.sqrt(a))


@pytest.mark.parametrize("query, gid, lat, lon, tz", PUBLISHED)
def test_well_known_cities_within_5_km_of_geonames(query, gid, lat, lon, tz):
    p = find_place(query)
    assert _km(p.lat_deg, p.lon_deg, lat, lon) < 5.0
    assert p.geonameid == gid
    assert p.timezone == tz


def test_namesakes_told_apart_by_country_and_state():
    fr, us = find_place("Paris, FR"), find_place("Paris, US")
    assert fr.country_code == "FR" and us.country_code == "US"
    # Paris, Texas: GeoNames 4717560, 33.66094 N 95.55551 W (from memory)
    assert _km(us.lat_deg, us.lon_deg, 33.66094, -95.55551) < 5.0
    assert us.timezone == "America/Chicago"
    assert _km(fr.lat_deg, fr.lon_deg, us.lat_deg, us.lon_deg) > 7000
    # London, Ontario vs London, England
    assert find_place("London, CA").timezone == "America/Toronto"
    assert find_place("London, United Kingdom").country_code == "GB"
    # Springfield, Illinois (state capital): GeoNames 4250542, 39.80172 N 89.64371 W (from memory)
    il = find_place("Springfield, IL")
    assert _km(il.lat_deg, il.lon_deg, 39.80172, -89.64371) < 5.0
    assert find_place("Springfield, Illinois") == il
    assert find_place("Springfield, MA, US").timezone == "America/New_York"


def test_ambiguous_name_picks_most_populous_and_says_so():
    all_ = place_matches("Springfield, US")
    assert len(all_) >= 5
    pops = [p.population for p in all_]
    assert pops == sorted(pops, reverse=True)
    best = find_place("Springfield")
    assert best.population == pops[0]
    assert best.note and "most populous" in best.note
    assert find_place("Springfield, IL").note is None


def test_accent_and_case_insensitive():
    assert find_place("zurich").name == "Zürich"
    assert find_place("SAO PAULO").country_code == "BR"
    assert find_place("saint-etienne").name == "Saint-Étienne"
    assert find_place("Cologne").name == "Köln"  # alternate name
    assert normalize("St. Louis") == normalize("Saint Louis")


def test_unknown_name_gives_suggestions():
    with pytest.raises(NotFoundError) as err:
        find_place("Springfeld")
    assert "Springfield" in err.value.hint
    with pytest.raises(NotFoundError) as err:
        find_place("Paris, DE")
    assert "FR" in err.value.hint


def test_cli_unknown_place_exit_2_with_suggestion(capsys):
    assert main(["place", "Nantess"]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "Nantes" in err and "did you mean" in err


def test_cli_place_prints_position(capsys):
    assert main(["place", "Springfield"]) == 0
    out = capsys.readouterr()
    assert "Springfield, MO, US" in out.out and "most populous" in out.err


def test_timezone_fallback_agrees_with_geonames_field():
    # timezonefinder (independent polygon data) against the GeoNames record's zone
    for q in ("Nantes", "Burgos", "Springfield, IL"):
        p = find_place(q)
        assert timezone_at(p.lat_deg, p.lon_deg) == p.timezone
