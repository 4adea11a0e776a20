"""Offline ephemeris and timescale.

The JPL DE421 ephemeris comes from the ``skyfield-data`` package and the
timescale (leap seconds, Delta T) from skyfield's builtin tables, so no code
path ever tries the network.  DE421 covers 1899-07-29 to 2053-10-09; domegen
promises 1900-01-01 to 2050-12-31 UTC.
"""

from __future__ import annotations

import atexit
import functools
import os
from datetime import datetime, timezone

from domegen.errors import OutOfRangeError

#: First and last instants (UTC) that domegen accepts.
EPHEMERIS_START_UTC = datetime(1900, 1, 1, tzinfo=timezone.utc)
EPHEMERIS_END_UTC = datetime(2050, 12, 31, 23, 59, 59, tzinfo=timezone.utc)

#: Body names as reported, mapped to DE421 segment names.
BODY_TARGETS = {
    "Sun": "sun",
    "Moon": "moon",
    "Mercury": "mercury barycenter",
    "Venus": "venus barycenter",
    "Mars": "mars barycenter",
    "Jupiter": "jupiter barycenter",
    "Saturn": "saturn barycenter",
    "Uranus": "uranus barycenter",
    "Neptune": "neptune barycenter",
}
#: Everything the sky engine positions, in display order.
BODY_NAMES = ("Sun", "Moon", "Mercury", "Venus", "Mars", "Jupiter", "Saturn", "Uranus", "Neptune")


def _data_dir() -> str:
    import skyfield_data

    # Not skyfield_data.get_skyfield_data_path(): that warns about the bundled
    # Earth-orientation file, which we never use (the timescale is builtin).
    return os.path.join(os.path.dirname(os.path.abspath(skyfield_data.__file__)), "data")


@functools.lru_cache(maxsize=None)
def ephemeris():
    """The DE421 kernel from skyfield-data (loaded once per process)."""
    from skyfield.api import Loader

    loader = Loader(_data_dir(), verbose=False, expire=False)
    path = os.path.join(_data_dir(), "de421.bsp")
    if not os.path.exists(path):  # pragma: no cover - broken install
        raise OutOfRangeError("the DE421 ephemeris is missing from skyfield-data; reinstall it")
    kernel = loader("de421.bsp")
    atexit.register(kernel.close)
    return kernel


@functools.lru_cache(maxsize=None)
def timescale():
    """skyfield timescale from its builtin leap-second and Delta T tables."""
    from skyfield.api import Loader

    return Loader(_data_dir(), verbose=False, expire=False).timescale(builtin=True)


def body(name: str):
    """The ephemeris segment for a body name ("Sun", "Moon", "Mars", ...)."""
    from domegen.errors import NotFoundError

    key = BODY_TARGETS.get(name) or BODY_TARGETS.get(str(name).capitalize())
    if key is None:
        raise NotFoundError(f"unknown body {name!r}", field="body", value=name,
                            hint="choose one of " + ", ".join(BODY_NAMES))
    return ephemeris()[key]


def earth():
    return ephemeris()["earth"]
