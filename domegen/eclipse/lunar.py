"""Lunar eclipses: search, contacts, magnitudes, saros, and visibility from a site.

The search starts from every mean full moon (Meeus, *Astronomical Algorithms*
2nd ed., ch. 49), refines all of them at once to the instant the Moon's
centre passes closest to the axis of the Earth's shadow (the definition of
greatest eclipse in the NASA canon), keeps those where the Moon touches the
penumbra, and solves every contact of every eclipse in one vectorised Newton
iteration.  Shadow radii follow Danjon's (1951) 1/85 enlargement, see
:mod:`domegen.eclipse.lunar_shadow`.

Saros numbers use the lunar numbering of van den Bergh (1955) as continued
in the NASA canon.  Eclipses one saros (223 lunations) apart share a series
and one inex (358 lunations) moves to the next series, so a lunation step
of n changes the series number by 38 n modulo 223 (358 * 38 = 61 * 223 + 1);
one published anchor (2022-11-08, saros 136) fixes the offset.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import date, datetime, timedelta, timezone

import numpy as np

from domegen.eclipse.lunar_shadow import shadow_geometry
from domegen.errors import InputError, NotFoundError
from domegen.sky.ephemeris import EPHEMERIS_END_UTC, EPHEMERIS_START_UTC, timescale
from domegen.sky.times import check_range, iso_utc, tt_datetime

__all__ = ["LunarEclipse", "find_lunar_eclipses", "lunar_eclipse_on", "lunar_local",
           "LunarLocal", "CONTACT_KEYS"]

#: Contact names in time order (``greatest`` included).
CONTACT_KEYS = ("P1", "U1", "U2", "greatest", "U3", "U4", "P4")
SYNODIC_MONTH_DAYS = 29.530588861
#: Mean new moon of lunation k = 0 (2000-01-06), JDE; Meeus ch. 49.
_MEAN_NEW_MOON_JDE = 2451550.09766
#: Published anchor: lunar eclipse 2022-11-08 belongs to saros 136 (Espenak & Meeus 2009).
_SAROS_ANCHOR_LUNATION = 282
_SAROS_ANCHOR = 136
_DAY_S = 86400.0


@dataclass(frozen=True)
class LunarEclipse:
    """One lunar eclipse (geocentric circumstances; times UTC unless named tt)."""

    type: str
    greatest_tt_jd: float
    greatest_utc: datetime
    greatest_tt: datetime
    contacts_utc: dict
    contacts_tt_jd: dict
    umbral_magnitude: float
    penumbral_magnitude: float
    gamma: float
    saros: int
    lunation: int
    duration_penumbral_min: float
    duration_partial_min: float | None
    duration_total_min: float | None
    #: Geometry at greatest eclipse, degrees: Moon semi-diameter, umbral and penumbral radii,
    #: distance of the Moon's centre from the shadow axis.
    geometry_deg: dict = field(default_factory=dict, compare=False)

    def as_json(self) -> dict:
        """The fields of a ``domegen eclipses`` entry (kind "lunar")."""
        return {
            "kind": "lunar",
            "type": self.type,
            "greatest_utc": iso_utc(self.greatest_utc),
            "greatest_tt": _iso_tt(self.greatest_tt),
            "umbral_magnitude": round(self.umbral_magnitude, 4),
            "penumbral_magnitude": round(self.penumbral_magnitude, 4),
            "contacts_utc": {k: iso_utc(self.contacts_utc[k]) for k in CONTACT_KEYS if k != "greatest"},
            "duration_penumbral_min": _round(self.duration_penumbral_min),
            "duration_partial_min": _round(self.duration_partial_min),
            "duration_total_min": _round(self.duration_total_min),
            "gamma": round(self.gamma, 4),
            "saros": self.saros,
        }


def _round(v, nd=1):
    return None if v is None else round(float(v), nd)


def _iso_tt(dt: datetime) -> str:
    """TT instant as ISO 8601 without offset (the name of the field says TT)."""
    dt = (dt + timedelta(microseconds=500_000)).replace(microsecond=0, tzinfo=None)
    return dt.isoformat()


def saros_number(lunation):
    """Lunar saros series for Meeus lunation numbers (full moon after new moon k)."""
    n = np.asarray(lunation, dtype=np.int64) - _SAROS_ANCHOR_LUNATION
    return _SAROS_ANCHOR + (38 * n + 111) % 223 - 111


def _tt_jd_from_utc(dt: datetime) -> float:
    from domegen.sky.times import to_time

    return float(to_time(dt.astimezone(timezone.utc)).tt)


def _parabola_min(tt, h):
    """One parabolic step toward the minimum of D^2 around each tt (days), step h."""
    grid = np.concatenate([tt - h, tt, tt + h])
    D = shadow_geometry(grid)["D"].reshape(3, -1) ** 2
    den = D[0] - 2.0 * D[1] + D[2]
    shift = np.where(den > 0, 0.5 * h * (D[0] - D[2]) / np.where(den > 0, den, 1.0), 0.0)
    return tt + np.clip(shift, -2 * h, 2 * h)


def _greatest(tt_guess):
    tt = np.asarray(tt_guess, dtype=float)
    for h in (0.25, 0.06, 0.01, 0.002, 0.0005):
        tt = _parabola_min(tt, h)
    return tt


def _solve_contacts(tg, sign, which, geo_g):
    """Contact instants (TT JD) where D = radius; sign -1 before greatest, +1 after.

    ``which`` selects the radius per row: 0 = Rp + s_m, 1 = Ru + s_m, 2 = Ru - s_m.
    """
    def g(tt):
        geo = shadow_geometry(tt)
        r = np.choose(which, [geo["Rp"] + geo["s_m"], geo["Ru"] + geo["s_m"], geo["Ru"] - geo["s_m"]])
        return geo["D"] - r

    # relative angular speed from the tangent-plane motion at greatest (rad/day)
    v = geo_g["v"]
    r0 = np.choose(which, [geo_g["Rp"] + geo_g["s_m"], geo_g["Ru"] + geo_g["s_m"], geo_g["Ru"] - geo_g["s_m"]])
    half = np.sqrt(np.maximum(r0 ** 2 - geo_g["D"] ** 2, 0.0)) / v
    tt = tg + sign * half
    dt = 1e-4
    for _ in range(4):
        f0 = g(tt)
        f1 = g(tt + dt)
        slope = (f1 - f0) / dt
        step = np.where(np.abs(slope) > 1e-12, f0 / np.where(np.abs(slope) > 1e-12, slope, 1.0), 0.0)
        tt = tt - np.clip(step, -0.1, 0.1)
    return tt


def _utc(tt_jd: float) -> datetime:
    from domegen.sky.times import from_time

    return from_time(timescale().tt_jd(float(tt_jd)))


def find_lunar_eclipses(start_utc: datetime, end_utc: datetime) -> list[LunarEclipse]:
    """Every lunar eclipse whose greatest eclipse lies in [start_utc, end_utc), in time order.

    Both limits are aware datetimes inside 1900-01-01..2050-12-31 UTC.
    """
    for name, dt in (("start_utc", start_utc), ("end_utc", end_utc)):
        if not isinstance(dt, datetime) or dt.tzinfo is None:
            raise InputError(f"{name} must be a timezone-aware datetime, not {dt!r}", field=name,
                             value=dt, hint="e.g. datetime(2022, 1, 1, tzinfo=timezone.utc)")
        check_range(dt, field=name)
    if end_utc <= start_utc:
        raise InputError("end_utc must be after start_utc", field="end_utc", value=end_utc.isoformat(),
                         hint="swap the two dates")
    tt0, tt1 = _tt_jd_from_utc(start_utc), _tt_jd_from_utc(end_utc)
    k0 = int(np.floor((tt0 - _MEAN_NEW_MOON_JDE) / SYNODIC_MONTH_DAYS - 0.5)) - 1
    k1 = int(np.ceil((tt1 - _MEAN_NEW_MOON_JDE) / SYNODIC_MONTH_DAYS - 0.5)) + 1
    k = np.arange(k0, k1 + 1)
    guess = _MEAN_NEW_MOON_JDE + SYNODIC_MONTH_DAYS * (k + 0.5)
    # keep the guesses whose +-1.5 d window stays inside DE421 (1899-07-29 .. 2053-10-09)
    ok = (guess > 2414864.5 + 2) & (guess < 2470172.5 - 2)
    k, guess = k[ok], guess[ok]
    tg = _greatest(guess)
    geo = shadow_geometry(tg)
    hit = (geo["D"] < geo["Rp"] + geo["s_m"]) & (tg >= tt0) & (tg < tt1)
    if not np.any(hit):
        return []
    tg, k = tg[hit], k[hit]
    geo = shadow_geometry(tg)
    # angular speed of the Moon relative to the axis (rad/day), tangent plane
    ge = shadow_geometry(tg + 0.01)
    gb = shadow_geometry(tg - 0.01)
    geo["v"] = np.hypot(ge["x"] - gb["x"], ge["y"] - gb["y"]) / 0.02
    D, s_m, Ru, Rp = geo["D"], geo["s_m"], geo["Ru"], geo["Rp"]
    umag = (Ru + s_m - D) / (2 * s_m)
    pmag = (Rp + s_m - D) / (2 * s_m)
    has = {0: np.ones_like(D, dtype=bool), 1: D < Ru + s_m, 2: D < Ru - s_m}
    n = tg.size
    which = np.repeat(np.array([0, 1, 2]), n)
    tg3 = np.tile(tg, 3)
    geo3 = {key: np.tile(geo[key], 3) for key in ("D", "Rp", "Ru", "s_m", "v")}
    before = _solve_contacts(tg3, -1.0, which, geo3).reshape(3, n)
    after = _solve_contacts(tg3, +1.0, which, geo3).reshape(3, n)
    names = {0: ("P1", "P4"), 1: ("U1", "U4"), 2: ("U2", "U3")}
    # gamma: distance from the axis in Earth equatorial radii, + when the Moon passes north
    gamma = np.sign(geo["y"]) * np.sin(D) * geo["dm_km"] / 6378.137
    lunation = k.astype(int)
    saros = saros_number(lunation)
    out = []
    for i in range(n):  # one object per eclipse (a few hundred at most), not a hot path
        tt_c = {"greatest": float(tg[i])}
        for w, (a, b) in names.items():
            tt_c[a] = float(before[w, i]) if has[w][i] else None
            tt_c[b] = float(after[w, i]) if has[w][i] else None
        tt_c = {key: tt_c[key] for key in CONTACT_KEYS}
        utc_c = {key: (None if v is None else _utc(v)) for key, v in tt_c.items()}
        etype = "total" if has[2][i] else "partial" if has[1][i] else "penumbral"

        def dur(a, b):
            return None if tt_c[a] is None else (tt_c[b] - tt_c[a]) * 1440.0

        out.append(LunarEclipse(
            type=etype, greatest_tt_jd=float(tg[i]), greatest_utc=utc_c["greatest"],
            greatest_tt=tt_datetime(timescale().tt_jd(float(tg[i]))),
            contacts_utc=utc_c, contacts_tt_jd=tt_c,
            umbral_magnitude=float(umag[i]), penumbral_magnitude=float(pmag[i]),
            gamma=float(gamma[i]), saros=int(saros[i]), lunation=int(lunation[i]),
            duration_penumbral_min=dur("P1", "P4"), duration_partial_min=dur("U1", "U4"),
            duration_total_min=dur("U2", "U3"),
            geometry_deg={"moon_semidiameter": float(np.degrees(s_m[i])),
                          "umbra_radius": float(np.degrees(Ru[i])),
                          "penumbra_radius": float(np.degrees(Rp[i])),
                          "axis_distance": float(np.degrees(D[i]))}))
    return out


def lunar_eclipse_on(day: date | datetime | str) -> LunarEclipse:
    """The lunar eclipse whose greatest eclipse falls on this UTC calendar date.

    Raises :class:`NotFoundError` naming the nearest lunar eclipses if there is none.
    """
    from domegen.sky.times import parse_date

    d = parse_date(day, field="date")
    lo = max(datetime(d.year, d.month, d.day, tzinfo=timezone.utc) - timedelta(days=200),
             EPHEMERIS_START_UTC)
    hi = min(datetime(d.year, d.month, d.day, tzinfo=timezone.utc) + timedelta(days=200),
             EPHEMERIS_END_UTC)
    found = find_lunar_eclipses(lo, hi)
    for ecl in found:
        if ecl.greatest_utc.date() == d:
            return ecl
    target = datetime(d.year, d.month, d.day, 12, tzinfo=timezone.utc)
    before = [e for e in found if e.greatest_utc < target][-1:]
    after = [e for e in found if e.greatest_utc >= target][:1]
    near = ", ".join(f"{e.greatest_utc.date().isoformat()} ({e.type})" for e in before + after)
    raise NotFoundError(f"no lunar eclipse on {d.isoformat()}", field="date", value=d.isoformat(),
                        hint=f"nearest lunar eclipses: {near}" if near else "none within 200 days")


from domegen.eclipse.lunar_local import LunarLocal, lunar_local  # noqa: E402  (public re-export)
