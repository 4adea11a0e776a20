"""Solar and lunar eclipses as seen from one venue, in one shape for lists, cue sheets and pages.

:class:`LocalEclipse` holds the contacts in time order (solar: C1, C2, max,
C3, C4; lunar: P1, U1, U2, max, U3, U4, P4 - those that exist), the altitude
and azimuth of the Sun (solar) or Moon (lunar) at each, and the local
magnitude, obscuration and duration.  The numbers come from the eclipse
engines (domegen.eclipse); this module only reshapes them.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import date, datetime, timedelta, timezone

import numpy as np

from domegen.errors import NotFoundError
from domegen.sky.events import SkyEvent
from domegen.sky.site import Site
from domegen.sky.times import iso_local, iso_utc

SOLAR_KEYS = ("C1", "C2", "max", "C3", "C4")
LUNAR_KEYS = ("P1", "U1", "U2", "max", "U3", "U4", "P4")
CONTACT_LABELS = {
    "C1": "first contact (partial phase begins)", "C2": "second contact (totality begins)",
    "max": "maximum eclipse", "C3": "third contact (totality ends)",
    "C4": "fourth contact (partial phase ends)",
    "P1": "penumbral eclipse begins", "U1": "partial eclipse begins", "U2": "total eclipse begins",
    "U3": "total eclipse ends", "U4": "partial eclipse ends", "P4": "penumbral eclipse ends",
}
ANNULAR_LABELS = {"C2": "second contact (annular phase begins)",
                  "C3": "third contact (annular phase ends)"}


@dataclass(frozen=True)
class Contact:
    key: str
    utc: datetime
    label: str
    alt_deg: float      # refracted altitude of the Sun (solar) or Moon (lunar), deg
    az_deg: float

    def as_json(self, tz: str) -> dict:
        return {"key": self.key, "label": self.label, "utc": iso_utc(self.utc),
                "local": iso_local(self.utc, tz), "alt_deg": round(self.alt_deg, 2),
                "az_deg": round(self.az_deg, 2), "above_horizon": bool(self.alt_deg > 0.0)}


@dataclass(frozen=True)
class LocalEclipse:
    """One eclipse at one site; ``contacts`` in time order, only those that occur."""

    kind: str                       # "solar" | "lunar"
    global_type: str                # total, annular, hybrid, partial, penumbral
    local_type: str                 # what the site sees: total, annular, partial, penumbral, none
    site: Site
    contacts: tuple
    magnitude: float | None
    obscuration: float | None       # solar: fraction of the Sun's disc covered at maximum
    duration_s: float | None        # solar: totality/annularity here; lunar: totality (or partial)
    visible: bool
    greatest_utc: datetime
    details: dict = field(default_factory=dict, compare=False, hash=False)
    #: the engine's eclipse object (SolarEclipse or LunarEclipse)
    source: object = field(default=None, compare=False, hash=False, repr=False)

    def contact(self, key: str) -> Contact | None:
        for c in self.contacts:
            if c.key == key:
                return c
        return None

    @property
    def body(self) -> str:
        return "Sun" if self.kind == "solar" else "Moon"

    @property
    def title(self) -> str:
        what = "solar" if self.kind == "solar" else "lunar"
        if self.kind == "solar":
            seen = {"total": "total", "annular": "annular", "partial": "partial"}.get(self.local_type,
                                                                                   self.local_type)
            t = f"{seen.capitalize()} solar eclipse"
            if self.local_type != self.global_type:
                t += f" (a {self.global_type} eclipse elsewhere)"
            if self.magnitude is not None:
                t += f", magnitude {self.magnitude:.3f}"
            if self.obscuration is not None:
                t += f", {100 * self.obscuration:.1f}% of the Sun covered"
            return t
        t = f"{self.global_type.capitalize()} {what} eclipse"
        if self.global_type == "penumbral" and "penumbral_magnitude" in self.details:
            t += f", penumbral magnitude {self.details['penumbral_magnitude']:.3f}"
        elif self.magnitude is not None:
            t += f", umbral magnitude {self.magnitude:.3f}"
        return t

    @property
    def seen_text(self) -> str:
        """What of the eclipse the site sees, in words ("the Sun sets before C4", ...)."""
        if not self.contacts:
            return "not seen from here"
        first, last = self.contacts[0], self.contacts[-1]
        body = self.body
        if first.alt_deg > 0 and last.alt_deg > 0:
            where = "seen from start to end"
        elif first.alt_deg > 0:
            gone = next(c for c in self.contacts if c.alt_deg <= 0)
            where = f"the {body} sets during the eclipse, before {gone.key}"
        elif last.alt_deg > 0:
            up = next(c for c in self.contacts if c.alt_deg > 0)
            where = f"the {body} rises already eclipsed, before {up.key}"
        elif any(c.alt_deg > 0 for c in self.contacts):
            where = f"the {body} is up only for part of the eclipse"
        else:
            where = f"the {body} is below the horizon throughout"
        return where

    def as_json(self) -> dict:
        tz = self.site.timezone
        return {"kind": self.kind, "seen": self.seen_text, "type": self.global_type, "local_type": self.local_type,
                "title": self.title, "site": self.site.as_json(),
                "greatest_utc": iso_utc(self.greatest_utc),
                "magnitude": None if self.magnitude is None else round(self.magnitude, 4),
                "obscuration": None if self.obscuration is None else round(self.obscuration, 4),
                "duration_s": None if self.duration_s is None else round(self.duration_s, 1),
                "visible": self.visible, "contacts": [c.as_json(tz) for c in self.contacts],
                "details": self.details}

    def as_event(self) -> SkyEvent:
        first, last = self.contacts[0], self.contacts[-1]
        mx = self.contact("max")
        return SkyEvent(kind=f"{self.kind}_eclipse", utc=mx.utc, title=self.title,
                        bodies=(self.body,), alt_deg=mx.alt_deg, visible=self.visible,
                        start_utc=first.utc, end_utc=last.utc,
                        best_utc=mx.utc if mx.alt_deg > 0 else None,
                        best_alt_deg=mx.alt_deg if mx.alt_deg > 0 else None,
                        details={"type": self.global_type, "local_type": self.local_type,
                                 "seen": self.seen_text,
                                 "magnitude": self.magnitude, "obscuration": self.obscuration,
                                 "duration_s": self.duration_s,
                                 "contacts": {c.key: iso_utc(c.utc) for c in self.contacts}})


def _altaz(site: Site, name: str, utcs: list[datetime]) -> tuple[np.ndarray, np.ndarray]:
    """Refracted altitude and azimuth (deg) of a body at the site, one per instant."""
    from domegen.sky.ephemeris import body
    from domegen.sky.times import to_time, unix_seconds

    t = to_time(np.atleast_1d(unix_seconds(utcs)))
    alt, az, _ = site.observer().at(t).observe(body(name)).apparent().altaz(
        temperature_C=site.temperature_C, pressure_mbar=site.pressure_mbar)
    return np.atleast_1d(alt.degrees), np.atleast_1d(az.degrees)


def _contacts(site: Site, body: str, times: dict, labels: dict) -> tuple:
    keys = [k for k, v in times.items() if v is not None]
    alt, az = _altaz(site, body, [times[k] for k in keys])
    order = sorted(range(len(keys)), key=lambda i: times[keys[i]])
    return tuple(Contact(keys[i], times[keys[i]], labels.get(keys[i], CONTACT_LABELS[keys[i]]),
                         float(alt[i]), float(az[i])) for i in order)


# ----------------------------------------------------------------------------- lunar
def lunar_at_site(eclipse, site: Site) -> LocalEclipse:
    """A :class:`LocalEclipse` for one ``domegen.eclipse.lunar.LunarEclipse``."""
    from domegen.eclipse.lunar_local import lunar_local

    loc = lunar_local(eclipse, site)
    times = {("max" if k == "greatest" else k): v for k, v in eclipse.contacts_utc.items()}
    contacts = _contacts(site, "Moon", times, {})
    frac = loc.phase_visible_fraction
    seen = [name for name in ("total", "partial", "penumbral") if frac.get(name)]
    local_type = seen[0] if seen else "none"
    dur_min = eclipse.duration_total_min or eclipse.duration_partial_min
    return LocalEclipse(kind="lunar", global_type=eclipse.type, local_type=local_type, site=site,
                        contacts=contacts, magnitude=eclipse.umbral_magnitude, obscuration=None,
                        duration_s=None if dur_min is None else dur_min * 60.0,
                        visible=bool(seen), greatest_utc=eclipse.greatest_utc, source=eclipse,
                        details={"penumbral_magnitude": round(eclipse.penumbral_magnitude, 4),
                                 "saros": eclipse.saros,
                                 "phase_visible_fraction": {k: (None if v is None else round(v, 3))
                                                            for k, v in frac.items()}})


def lunar_events(site: Site, start_utc: datetime, end_utc: datetime) -> list[SkyEvent]:
    """Lunar eclipses in the period with some phase above the site's horizon."""
    from domegen.eclipse.lunar import find_lunar_eclipses

    return _visible_events(find_lunar_eclipses(start_utc, end_utc), lunar_at_site, site)


def _visible_events(eclipses, at_site, site: Site) -> list[SkyEvent]:
    """Events of the eclipses that ``at_site(eclipse, site)`` says are visible from the site."""
    located = (at_site(ecl, site) for ecl in eclipses)
    return [loc.as_event() for loc in located if loc.visible]


# ----------------------------------------------------------------------------- solar
def solar_at_site(eclipse, site: Site) -> LocalEclipse:
    """A :class:`LocalEclipse` for one ``domegen.eclipse`` SolarEclipse at ``site``.

    Contacts, magnitude, obscuration and duration come from
    ``domegen.eclipse.local.local_circumstances``; the Sun's altitude here is the
    refracted apparent one (skyfield, the site's temperature and pressure).
    """
    from domegen.eclipse.local import local_circumstances

    lc = local_circumstances(eclipse, [site])
    keys = {"c1": "C1", "c2": "C2", "max": "max", "c3": "C3", "c4": "C4"}
    times = {keys[c]: lc.utc(c, 0) for c in keys}
    local_type = str(lc.type_here[0])
    if times["max"] is None:
        local_type = "none"
    labels = ANNULAR_LABELS if local_type == "annular" else {}
    contacts = _contacts(site, "Sun", times, labels) if times["max"] is not None else ()
    above = {keys[c]: bool(lc.above_horizon[c][0]) for c in keys if times[keys[c]] is not None}
    visible = local_type != "none" and any(above.values())
    mag = float(lc.magnitude[0]) if local_type != "none" else None
    obs = float(lc.obscuration[0]) if local_type != "none" else None
    dur = float(lc.duration_s[0]) if local_type in ("total", "annular") else None
    return LocalEclipse(kind="solar", global_type=eclipse.type, local_type=local_type, site=site,
                        contacts=contacts, magnitude=mag, obscuration=obs, duration_s=dur,
                        visible=bool(visible), greatest_utc=eclipse.greatest_utc, source=eclipse,
                        details={"saros": getattr(eclipse, "saros", None),
                                 "gamma": round(float(eclipse.gamma), 4),
                                 "contact_above_horizon": above,
                                 "position_angle_deg": {
                                     keys[c]: round(float(lc.position_angle_deg[c][0]), 1)
                                     for c in keys if times[keys[c]] is not None
                                     and np.isfinite(lc.position_angle_deg[c][0])}})


def solar_events(site: Site, start_utc: datetime, end_utc: datetime) -> list[SkyEvent]:
    """Solar eclipses in the period that can be seen from the site (Sun up during some phase)."""
    from domegen.eclipse import find_solar_eclipses

    return _visible_events(find_solar_eclipses(start_utc, end_utc), solar_at_site, site)


def eclipse_at_site(day: str | date, site: Site) -> LocalEclipse:
    """The solar or lunar eclipse of this UTC date seen from ``site`` (solar preferred).

    Raises :class:`NotFoundError` when no eclipse falls on that date.
    """
    from domegen.sky.times import parse_date

    d = parse_date(day, field="eclipse")
    lo = datetime(d.year, d.month, d.day, tzinfo=timezone.utc)
    hi = lo + timedelta(days=1)
    try:
        from domegen.eclipse import find_solar_eclipses
    except ImportError:  # pragma: no cover - solar engine missing
        find_solar_eclipses = None
    if find_solar_eclipses is not None:
        for ecl in find_solar_eclipses(lo - timedelta(hours=12), hi + timedelta(hours=12)):
            if ecl.greatest_utc.date() == d:
                return solar_at_site(ecl, site)
    from domegen.eclipse.lunar import find_lunar_eclipses

    for ecl in find_lunar_eclipses(lo - timedelta(hours=12), hi + timedelta(hours=12)):
        if ecl.greatest_utc.date() == d:
            return lunar_at_site(ecl, site)
    raise NotFoundError(f"no solar or lunar eclipse on {d.isoformat()}", field="eclipse",
                        value=d.isoformat(), hint="list them with: domegen eclipses --from ... --to ...")


def seen_eclipse_at_site(day: str | date, site: Site) -> LocalEclipse:
    """:func:`eclipse_at_site`, raising :class:`NotFoundError` when no contact occurs there."""
    ecl = eclipse_at_site(day, site)
    if not ecl.contacts:
        raise NotFoundError(f"the {ecl.kind} eclipse of {day} is not seen from this site",
                            field="eclipse", value=str(day),
                            hint="choose a site inside the eclipse's zone of visibility")
    return ecl
