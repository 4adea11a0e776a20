"""Instants: parsing, range checks and conversion to skyfield times.

Inside domegen an instant is a timezone-aware ``datetime`` (for people) or a
float of UTC seconds since 1970-01-01 (for arrays; POSIX seconds, so leap
seconds are handled by skyfield on conversion).  TT is derived by skyfield.

"UTC" before 1972 means UT1 (the Universal Time of eclipse canons and
historical almanacs); from 1972 it is UTC with leap seconds.  Convert with
:func:`to_time` and :func:`from_time` (never skyfield's ``from_datetime`` /
``utc_datetime``, which extend the 1972 leap-second offset backwards).
"""

from __future__ import annotations

import re
from datetime import date, datetime, timedelta, timezone
from zoneinfo import ZoneInfo, ZoneInfoNotFoundError

import numpy as np

from domegen.errors import InputError, OutOfRangeError
from domegen.sky.ephemeris import EPHEMERIS_END_UTC, EPHEMERIS_START_UTC

_UNIX_EPOCH = datetime(1970, 1, 1, tzinfo=timezone.utc)


def zone(name: str | None):
    """An IANA zone by name (``None`` or "UTC" gives UTC)."""
    if name is None or name.upper() in ("UTC", "Z", "GMT"):
        return timezone.utc
    try:
        return ZoneInfo(name)
    except (ZoneInfoNotFoundError, ValueError, IsADirectoryError):
        raise InputError(f"unknown time zone {name!r}", field="timezone", value=name,
                         hint="use an IANA name such as 'Europe/Paris' or 'America/Chicago'") from None


def parse_instant(text: str | datetime, tz: str | None = None, *, field: str = "time") -> datetime:
    """Parse ISO 8601 into an aware UTC datetime.

    ``2024-04-08T18:18:29Z`` and ``2024-04-08T13:18:29-05:00`` carry their own
    offset; a wall time without offset (``2024-04-08 13:18``) is read in the
    IANA zone ``tz`` (UTC if none).  A bare date means 00:00 in that zone.
    Raises :class:`InputError` for malformed text and
    :class:`OutOfRangeError` outside 1900-2050.
    """
    if isinstance(text, datetime):
        dt = text
    else:
        s = str(text).strip()
        if re.fullmatch(r"-?\d{4,}-\d{2}-\d{2}", s):
            s += "T00:00:00"
        s = re.sub(r"[zZ]$", "+00:00", s)
        try:
            dt = datetime.fromisoformat(s)
        except ValueError:
            raise InputError(f"cannot read {text!r} as an ISO 8601 instant", field=field, value=text,
                             hint="write e.g. 2024-04-08T18:18:29Z, 2024-04-08T13:18-05:00 "
                                  "or a local wall time with a time zone") from None
    if dt.tzinfo is None:
        dt = dt.replace(tzinfo=zone(tz))
    dt = dt.astimezone(timezone.utc)
    check_range(dt, field=field)
    return dt


def parse_date(text: str | date, *, field: str = "date") -> date:
    """Parse ``YYYY-MM-DD`` into a date, range-checked against the ephemeris."""
    if isinstance(text, datetime):
        d = text.date()
    elif isinstance(text, date):
        d = text
    else:
        try:
            d = date.fromisoformat(str(text).strip())
        except ValueError:
            raise InputError(f"cannot read {text!r} as a date", field=field, value=text,
                             hint="write YYYY-MM-DD, e.g. 2024-04-08") from None
    check_range(datetime(d.year, d.month, d.day, 12, tzinfo=timezone.utc), field=field)
    return d


def check_range(dt: datetime | np.ndarray, *, field: str = "time") -> None:
    """Raise :class:`OutOfRangeError` if any instant lies outside 1900-2050 UTC."""
    if isinstance(dt, datetime):
        lo = hi = dt
    else:
        s = np.asarray(dt, dtype=float)
        if s.size == 0:
            return
        lo = from_unix_seconds(float(np.min(s)))
        hi = from_unix_seconds(float(np.max(s)))
    if lo < EPHEMERIS_START_UTC or hi > EPHEMERIS_END_UTC:
        bad = lo if lo < EPHEMERIS_START_UTC else hi
        raise OutOfRangeError(
            f"{bad.isoformat()} is outside the ephemeris range 1900-01-01 to 2050-12-31 (DE421)",
            field=field, value=bad.isoformat())


def unix_seconds(dt: datetime | list | np.ndarray) -> float | np.ndarray:
    """UTC datetime(s) to POSIX seconds (float)."""
    if isinstance(dt, datetime):
        return (dt - _UNIX_EPOCH).total_seconds()
    return np.array([(d - _UNIX_EPOCH).total_seconds() for d in dt], dtype=float)


def from_unix_seconds(s: float) -> datetime:
    """POSIX seconds to an aware UTC datetime."""
    return _UNIX_EPOCH + timedelta(seconds=float(s))


def to_time(utc: datetime | float | np.ndarray):
    """A skyfield ``Time`` for a datetime, or for an array of POSIX UTC seconds."""
    from domegen.sky.frames import utc_time

    if isinstance(utc, datetime):
        return utc_time(unix_seconds(utc.astimezone(timezone.utc)))
    return utc_time(utc)


def from_time(t) -> datetime | list[datetime]:
    """Aware UTC datetime(s) of a skyfield Time on domegen's civil scale (UTC; UT1 before 1972)."""
    from domegen.sky.frames import civil_seconds

    secs = civil_seconds(t)
    if np.ndim(t.tt) == 0:
        return from_unix_seconds(secs[0])
    return [from_unix_seconds(x) for x in secs]


def tt_minus_civil_s(t) -> np.ndarray:
    """TT minus domegen's civil time, seconds: 32.184 + leap seconds from 1972, Delta T before."""
    from domegen.sky.frames import civil_seconds

    tt = np.atleast_1d(np.asarray(t.tt, dtype=float))
    return (tt - 2440587.5) * 86400.0 - civil_seconds(t)


def tt_datetime(t) -> datetime:
    """A skyfield Time (scalar) as an aware datetime on the TT scale (labelled UTC offset 0)."""
    return datetime(2000, 1, 1, 12, tzinfo=timezone.utc) + timedelta(days=float(t.tt) - 2451545.0)


def iso_utc(dt: datetime | None, *, seconds: bool = True) -> str | None:
    """ISO 8601 text in UTC with a ``Z`` suffix, rounded to the second."""
    if dt is None:
        return None
    dt = dt.astimezone(timezone.utc)
    if seconds:
        dt = (dt + timedelta(microseconds=500_000)).replace(microsecond=0)
    return dt.isoformat().replace("+00:00", "Z")


def iso_local(dt: datetime | None, tz: str | None) -> str | None:
    """ISO 8601 text in the zone ``tz`` with its offset, rounded to the second."""
    if dt is None:
        return None
    dt = (dt.astimezone(timezone.utc) + timedelta(microseconds=500_000)).replace(microsecond=0)
    return dt.astimezone(zone(tz)).isoformat()
