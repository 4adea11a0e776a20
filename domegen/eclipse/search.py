"""Find every solar eclipse between two instants from the new moons and the shadow geometry.

1. Mean new moons (Meeus, *Astronomical Algorithms* ch. 49, linear term)
   bracket each lunation; for all of them at once, Newton steps on the
   Besselian x (zero at conjunction in the fundamental plane) from the
   ephemeris give the conjunction to a few seconds.
2. Where the linear least distance of the axis from the Earth's centre is
   below 1.62 Earth radii an eclipse is possible: cubic elements are fitted
   around the integer TT hour nearest greatest eclipse (vectorised over all
   candidates) and the global circumstances decide (none, partial, ...).
"""

from __future__ import annotations

from datetime import datetime, timedelta, timezone

import numpy as np

from domegen.eclipse.besselian import fit_elements, raw_elements
from domegen.eclipse.solar import SolarEclipse, circumstances, greatest_t_h
from domegen.errors import InputError, NotFoundError
from domegen.sky.ephemeris import EPHEMERIS_END_UTC, EPHEMERIS_START_UTC
from domegen.sky.times import check_range

_UNIX_JD = 2440587.5
_NEW_MOON_EPOCH_JDE = 2451550.09766  # Meeus (49.1), k = 0
_SYNODIC_D = 29.530588861
_CANDIDATE_LIMIT = 1.62


def _jd(dt: datetime) -> float:
    return (dt - datetime(1970, 1, 1, tzinfo=timezone.utc)).total_seconds() / 86400.0 + _UNIX_JD


def _conjunctions(start_jd: float, end_jd: float) -> tuple[np.ndarray, np.ndarray]:
    """TT Julian dates of x = 0 for every lunation in range, and the linear least axis distance."""
    k = np.arange(np.floor((start_jd - _NEW_MOON_EPOCH_JDE) / _SYNODIC_D) - 1,
                  np.ceil((end_jd - _NEW_MOON_EPOCH_JDE) / _SYNODIC_D) + 2)
    t = _NEW_MOON_EPOCH_JDE + _SYNODIC_D * k
    probe = np.array([0.0, 1.0 / 24.0])
    for _ in range(4):
        r = raw_elements(t[:, None] + probe[None, :], rough=True)
        dx = (r["x"][:, 1] - r["x"][:, 0]) * 24.0  # per day
        t = t - r["x"][:, 0] / dx
    r = raw_elements(t[:, None] + probe[None, :], rough=True)
    x, y = r["x"][:, 0], r["y"][:, 0]
    vx, vy = r["x"][:, 1] - x, r["y"][:, 1] - y
    least = np.abs(vx * y - vy * x) / np.hypot(vx, vy)
    return t, least


def _nearest_hour(jd: np.ndarray) -> np.ndarray:
    return np.round((jd - 0.5) * 24.0) / 24.0 + 0.5


def _search_tt(start_jd: float, end_jd: float) -> list[SolarEclipse]:
    t, least = _conjunctions(start_jd, end_jd)
    cand = t[least < _CANDIDATE_LIMIT]
    if cand.size == 0:
        return []
    t0 = _nearest_hour(cand)
    elements = fit_elements(t0)
    # Refit where greatest eclipse lies more than half an hour from t0.
    tg = np.array([greatest_t_h(b) for b in elements])
    redo = np.flatnonzero(np.abs(tg) > 0.5)
    if redo.size:
        better = fit_elements(_nearest_hour(t0[redo] + tg[redo] / 24.0))
        for i, b in zip(redo, better):
            elements[i] = b
    found = []
    for b in elements:
        ecl = circumstances(b)
        if ecl is not None:
            found.append(ecl)
    return found


_BLOCK_YEARS = 10


_BLOCKS: dict[int, tuple[SolarEclipse, ...]] = {}


def _fill_blocks(first_years: list[int]) -> None:
    """Search the span of the missing decades in one go and cache each decade's eclipses."""
    missing = sorted(y for y in first_years if y not in _BLOCKS)
    if not missing:
        return
    lo = datetime(missing[0], 1, 1, tzinfo=timezone.utc)
    hi = datetime(missing[-1] + _BLOCK_YEARS, 1, 1, tzinfo=timezone.utc)
    found = _search_tt(_jd(max(lo, EPHEMERIS_START_UTC)) - 1.0, _jd(min(hi, EPHEMERIS_END_UTC)) + 1.0)
    for year in missing:
        a = datetime(year, 1, 1, tzinfo=timezone.utc)
        b = datetime(year + _BLOCK_YEARS, 1, 1, tzinfo=timezone.utc)
        _BLOCKS[year] = tuple(e for e in found if a <= e.greatest_utc < b)


def find_solar_eclipses(start_utc: datetime, end_utc: datetime) -> list[SolarEclipse]:
    """Every solar eclipse whose greatest eclipse falls in [start_utc, end_utc], in time order.

    Both instants must be aware datetimes inside 1900-01-01 .. 2050-12-31 UTC
    (:class:`OutOfRangeError` otherwise).  Results are cached per decade.
    """
    for name, dt in (("from", start_utc), ("to", end_utc)):
        if not isinstance(dt, datetime) or dt.tzinfo is None:
            raise InputError(f"{name} must be a timezone-aware datetime", field=name, value=dt)
        check_range(dt, field=name)
    if end_utc < start_utc:
        raise InputError("the end of the range is before its start", field="to", value=end_utc.isoformat(),
                         hint="swap --from and --to")
    first = start_utc.year - start_utc.year % _BLOCK_YEARS
    years = list(range(first, end_utc.year + 1, _BLOCK_YEARS))
    _fill_blocks(years)
    out: list[SolarEclipse] = []
    for year in years:
        out.extend(e for e in _BLOCKS[year] if start_utc <= e.greatest_utc <= end_utc)
    return out


def solar_eclipse_on(day) -> SolarEclipse:
    """The solar eclipse whose greatest eclipse is on UTC date ``day`` (date or YYYY-MM-DD).

    Raises :class:`NotFoundError` naming the nearest eclipses before and after.
    """
    from domegen.sky.times import parse_date

    d = parse_date(day, field="eclipse")
    start = datetime(d.year, d.month, d.day, tzinfo=timezone.utc)
    lo = max(start - timedelta(days=200), EPHEMERIS_START_UTC)
    hi = min(start + timedelta(days=201), EPHEMERIS_END_UTC)
    decades = range(lo.year - lo.year % _BLOCK_YEARS, hi.year + 1, _BLOCK_YEARS)
    if all(y in _BLOCKS for y in decades):
        near = find_solar_eclipses(lo, hi)
    else:  # search just this window (a whole decade is not needed for one date)
        near = [e for e in _search_tt(_jd(lo), _jd(hi)) if lo <= e.greatest_utc <= hi]
    for e in near:
        if e.date == d:
            return e
    before = [e for e in near if e.greatest_utc < start]
    after = [e for e in near if e.greatest_utc >= start]
    options = []
    if before:
        options.append(f"{before[-1].date.isoformat()} ({before[-1].type})")
    if after:
        options.append(f"{after[0].date.isoformat()} ({after[0].type})")
    raise NotFoundError(f"no solar eclipse on {d.isoformat()}", field="eclipse", value=d.isoformat(),
                        hint="nearest solar eclipses: " + " and ".join(options) if options else None)


__all__ = ["find_solar_eclipses", "solar_eclipse_on"]
