"""What the sky does over a period: pairings, oppositions, elongations, Moon phases.

All searches sample the whole period at once (vectorised over time and body
pairs) and then refine every bracket together by repeated zooming on a small
grid, as skyfield's own search routines do.  Definitions (common practice):

- pairing: a local minimum of the geocentric apparent angular separation of
  two bodies (the Moon and the five naked-eye planets), kept when below
  ``max_separation_deg``; the topocentric separation at the site is reported too;
- opposition: the planet's apparent geocentric ecliptic longitude differs from
  the Sun's by 180 deg (skyfield.almanac.oppositions_conjunctions);
- greatest elongation: a local maximum of the Sun-planet angle seen from the
  Earth's centre (Mercury, Venus); east = evening sky, west = morning sky;
- Moon phases: ecliptic longitude differences 0/90/180/270 deg
  (skyfield.almanac.moon_phases).

Each event carries its UTC instant, the body's refracted altitude at the site
at that instant, the Sun's altitude, and the best moment to look within
+-12 h (the body highest while the Sun is below -6 deg), which decides
whether the event can be seen from the site at all.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import datetime

import numpy as np

from domegen.errors import InputError
from domegen.sky.ephemeris import body, earth
from domegen.sky.event_search import (COARSE_STEP_S, ELONGATION_BODIES, OPPOSITION_BODIES,  # noqa: F401
                                      PAIR_BODIES, _angle, altitudes_deg, find_greatest_elongations,
                                      find_moon_phases, find_oppositions, find_pairings,
                                      geocentric_unit)
from domegen.sky.site import Site
from domegen.sky.times import check_range, from_unix_seconds, iso_local, iso_utc, to_time, unix_seconds

KINDS = ("solar_eclipse", "lunar_eclipse", "pairing", "opposition", "elongation", "moon_phase")
SKY_KINDS = ("pairing", "opposition", "elongation", "moon_phase")
PHASE_NAMES = ("New Moon", "First Quarter", "Full Moon", "Last Quarter")
#: Longest period searched in one call, days.
MAX_PERIOD_DAYS = 366.0 * 10
#: The Sun must be below this altitude (deg) for a body to count as seen (civil twilight end).
DARK_SUN_ALT_DEG = -6.0
#: ...and the body above this altitude (deg).
MIN_BODY_ALT_DEG = 5.0


@dataclass(frozen=True)
class SkyEvent:
    """One event of the period.

    ``utc`` is the instant of the event (aware, UTC); ``alt_deg`` the refracted
    altitude of ``bodies[0]`` at the site then; ``best_utc``/``best_alt_deg`` the
    best moment to look within +-12 h (None if never seen against a dark
    enough sky); ``details`` holds kind-specific numbers (units in the keys).
    """

    kind: str
    utc: datetime
    title: str
    bodies: tuple = ()
    alt_deg: float | None = None
    sun_alt_deg: float | None = None
    separation_deg: float | None = None
    visible: bool = True
    best_utc: datetime | None = None
    best_alt_deg: float | None = None
    end_utc: datetime | None = None
    start_utc: datetime | None = None
    details: dict = field(default_factory=dict, compare=False, hash=False)

    def local(self, tz: str) -> datetime:
        from domegen.sky.times import zone

        return self.utc.astimezone(zone(tz))

    def as_json(self, tz: str | None = None) -> dict:
        d = {"kind": self.kind, "title": self.title, "utc": iso_utc(self.utc)}
        if tz:
            d["local"] = iso_local(self.utc, tz)
        d["bodies"] = list(self.bodies)
        for key in ("alt_deg", "sun_alt_deg", "separation_deg", "best_alt_deg"):
            v = getattr(self, key)
            d[key] = None if v is None else round(float(v), 4)
        d["visible"] = bool(self.visible)
        for key in ("best_utc", "start_utc", "end_utc"):
            v = getattr(self, key)
            if v is not None:
                d[key] = iso_utc(v)
                if tz:
                    d[key.replace("_utc", "_local")] = iso_local(v, tz)
        d["details"] = self.details
        return d


# ----------------------------------------------------------------------------- assembly
def window_altitudes_deg(site: Site, names, mid_utc_s: np.ndarray, offsets_s: np.ndarray) -> dict:
    """Refracted altitudes (deg), shape (E, K), of each body around E instants.

    Apparent geocentric places (true equator of date) are computed exactly at
    the window's start, middle and end and interpolated quadratically; each
    sample is turned to the horizon with the exact mean sidereal time; the Moon's
    diurnal parallax is applied as alt -= asin(R/d cos alt).  Checked against
    skyfield's topocentric altaz in the tests (within 0.05 deg over +-12 h).
    """
    from domegen.sky.frames import utc_time
    from domegen.sky.refraction import refract

    mid = np.asarray(mid_utc_s, dtype=float)
    offs = np.asarray(offsets_s, dtype=float)
    e = mid.size
    half = max(abs(offs[0]), abs(offs[-1]), 1.0)
    knots = mid[:, None] + np.array([-half, 0.0, half])[None, :]       # (E, 3)
    tk = to_time(knots.ravel())
    obs = earth().at(tk)
    grid = mid[:, None] + offs[None, :]                                  # (E, K)
    # mean sidereal time: the equation of the equinoxes (< 1.2 s of time, 0.005 deg) is dropped
    gast_rad = np.radians(np.asarray(utc_time(grid.ravel()).gmst, dtype=float) * 15.0).reshape(grid.shape)
    lat = np.radians(site.lat_deg)
    x = (offs / half)[None, :]                                           # -1..1
    w = np.stack([0.5 * x * (x - 1.0), 1.0 - x * x, 0.5 * x * (x + 1.0)])  # (3, 1, K) Lagrange
    out = {}
    for name in names:
        ra, dec, dist = obs.observe(body(name)).apparent().radec(epoch="date")
        r = np.radians(np.asarray(ra.hours, dtype=float) * 15.0).reshape(e, 3)
        d = np.radians(np.asarray(dec.degrees, dtype=float)).reshape(e, 3)
        v = np.stack([np.cos(d) * np.cos(r), np.cos(d) * np.sin(r), np.sin(d)])  # (3, E, 3)
        vi = np.einsum("cek,kxn->cen", v, w)                            # (3, E, K)
        vi /= np.linalg.norm(vi, axis=0)
        ha = gast_rad + np.radians(site.lon_deg) - np.arctan2(vi[1], vi[0])
        sin_alt = np.sin(lat) * vi[2] + np.cos(lat) * np.sqrt(1.0 - vi[2] ** 2) * np.cos(ha)
        alt = np.degrees(np.arcsin(np.clip(sin_alt, -1.0, 1.0)))
        if name == "Moon":
            dkm = np.asarray(dist.km, dtype=float).reshape(e, 3)
            dk = np.einsum("ek,kxn->en", dkm, w)
            alt = alt - np.degrees(np.arcsin(6378.137 / dk * np.cos(np.radians(alt))))
        out[name] = refract(alt, site.temperature_C, site.pressure_mbar)
    return out


def _best_view(site: Site, names_per_event, utc_s: np.ndarray, *, half_window_s: float = 12 * 3600.0,
               step_s: float = 600.0):
    """Best moment to look near each event: all its bodies up, the Sun below -6 deg.

    Returns (best_utc_s (E,), best_alt_deg (E,), alt_now_deg (E,), sun_now_deg (E,));
    best values are NaN where the event is never seen in the window.
    """
    e = len(utc_s)
    offs = np.arange(-half_window_s, half_window_s + step_s / 2, step_s)
    grid = utc_s[:, None] + offs[None, :]                   # (E, K)
    k0 = len(offs) // 2                                     # the event instant itself
    wanted = sorted({n for names in names_per_event for n in names} | {"Sun"})
    alts = window_altitudes_deg(site, wanted, utc_s, offs)
    sun = alts["Sun"]
    lowest = np.full(grid.shape, np.inf)
    first_alt = np.full(grid.shape, np.nan)
    for k, names in enumerate(names_per_event):
        for n in names:
            lowest[k] = np.minimum(lowest[k], alts[n][k])
        first_alt[k] = alts[names[0]][k]
    ok = (lowest > MIN_BODY_ALT_DEG) & (sun < DARK_SUN_ALT_DEG)
    score = np.where(ok, lowest, -np.inf)
    j = np.argmax(score, axis=1)
    rows = np.arange(e)
    seen = np.isfinite(score[rows, j])
    best_t = np.where(seen, grid[rows, j], np.nan)
    best_alt = np.where(seen, first_alt[rows, j], np.nan)
    return best_t, best_alt, first_alt[:, k0], sun[:, k0]


def _dt(s: float) -> datetime:
    return from_unix_seconds(round(float(s), 3))


def sky_events(site: Site, start_utc: datetime, end_utc: datetime, *, kinds=SKY_KINDS,
               max_separation_deg: float = 3.0, visible_only: bool = False) -> list[SkyEvent]:
    """Pairings, oppositions, greatest elongations and Moon phases for ``site``, by time.

    ``start_utc``/``end_utc`` are aware datetimes; the period may span up to ten years.
    """
    unknown = set(kinds) - set(KINDS)
    if unknown:
        raise InputError(f"unknown event kind(s) {sorted(unknown)}", field="kinds",
                         value=sorted(unknown), hint="choose from " + ", ".join(KINDS))
    if not end_utc > start_utc:
        raise InputError("the period ends before it starts", field="to", value=iso_utc(end_utc),
                         hint="give --to after --from")
    check_range(start_utc, field="from")
    check_range(end_utc, field="to")
    if (end_utc - start_utc).total_seconds() > MAX_PERIOD_DAYS * 86400.0:
        raise InputError("the period is longer than ten years", field="to", value=iso_utc(end_utc),
                         hint="split it into shorter periods")
    if not 0.0 < max_separation_deg <= 20.0:
        raise InputError(f"pairing threshold {max_separation_deg} deg is outside 0..20",
                         field="max_separation_deg", value=max_separation_deg)
    t0, t1 = unix_seconds(start_utc), unix_seconds(end_utc)
    raw: list[tuple[str, float, tuple, str, float | None, dict]] = []
    if "pairing" in kinds:
        for a, b, t, sep in find_pairings(t0, t1, max_separation_deg=max_separation_deg):
            raw.append(("pairing", t, (a, b), f"{a} {sep:.2f}\u00b0 from {b}", sep, {}))
    if "opposition" in kinds:
        for name, t in find_oppositions(t0, t1):
            raw.append(("opposition", t, (name,), f"{name} at opposition", None, {}))
    if "elongation" in kinds:
        for name, t, el, side in find_greatest_elongations(t0, t1):
            sky = "evening" if side == "east" else "morning"
            raw.append(("elongation", t, (name,),
                        f"{name} at greatest {side}ern elongation, {el:.1f}\u00b0 ({sky} sky)", None,
                        {"elongation_deg": round(el, 3), "side": side, "sky": sky}))
    if "moon_phase" in kinds:
        for p, t in find_moon_phases(t0, t1):
            raw.append(("moon_phase", t, ("Moon",), PHASE_NAMES[p], None, {"phase": PHASE_NAMES[p]}))
    if not raw:
        return []
    times = np.array([r[1] for r in raw])
    best_t, best_alt, alt_now, sun_now = _best_view(site, [r[2] for r in raw], times)
    topo = _topocentric_separations(site, raw)
    events = []
    for k, (kind, t, names, title, sep, details) in enumerate(raw):
        seen = bool(np.isfinite(best_t[k]))
        if kind == "moon_phase" and PHASE_NAMES.index(details["phase"]) == 0:
            seen = False  # a new Moon is never seen; listed for planning dark nights
        if kind == "pairing":
            details = dict(details, topocentric_separation_deg=round(float(topo[k]), 4))
        ev = SkyEvent(kind=kind, utc=_dt(t), title=title, bodies=names,
                      alt_deg=float(alt_now[k]), sun_alt_deg=float(sun_now[k]), separation_deg=sep,
                      visible=seen, best_utc=_dt(best_t[k]) if seen else None,
                      best_alt_deg=float(best_alt[k]) if seen else None, details=details)
        if ev.visible or not visible_only:
            events.append(ev)
    events.sort(key=lambda ev: ev.utc)
    return events


def _topocentric_separations(site: Site, raw) -> np.ndarray:
    """Separation (deg) of each pairing's bodies seen from the site at the event instant."""
    out = np.full(len(raw), np.nan)
    idx = [k for k, r in enumerate(raw) if r[0] == "pairing"]
    if not idx:
        return out
    t = to_time(np.array([raw[k][1] for k in idx]))
    obs = site.observer().at(t)
    names = sorted({n for k in idx for n in raw[k][2]})
    vec = {}
    for n in names:
        v = obs.observe(body(n)).apparent().position.au
        vec[n] = v / np.linalg.norm(v, axis=0)
    for j, k in enumerate(idx):
        a, b = raw[k][2]
        out[k] = _angle(vec[a][:, j], vec[b][:, j], axis=0)
    return out
