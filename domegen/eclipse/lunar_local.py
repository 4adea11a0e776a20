"""A lunar eclipse seen from one site: the Moon's altitude at each contact and per phase.

A phase counts as seen when the Moon's centre is above the horizon
(refracted altitude > 0, Saemundsson refraction for the site's temperature
and pressure; a mean horizon, no terrain).  Each phase is sampled once a
minute so a moonrise or moonset inside a phase is reported with the fraction
of the phase above the horizon.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import datetime, timedelta

import numpy as np

from domegen.sky.times import iso_local, iso_utc

_PHASES = {"penumbral": ("P1", "P4"), "partial": ("U1", "U4"), "total": ("U2", "U3")}


@dataclass(frozen=True)
class LunarLocal:
    """Local circumstances of one lunar eclipse at one site."""

    eclipse: object
    site: object
    #: contact key -> (alt_deg refracted, az_deg) or None where the contact does not exist
    moon_altaz_deg: dict
    #: phase -> fraction (0..1) of that phase with the Moon above the horizon; None if no such phase
    phase_visible_fraction: dict

    @property
    def visible_contacts(self) -> list[str]:
        return [k for k, v in self.moon_altaz_deg.items() if v is not None and v[0] > 0.0]

    def as_json(self) -> dict:
        tz = self.site.timezone
        contacts = {}
        for key, utc in self.eclipse.contacts_utc.items():
            aa = self.moon_altaz_deg[key]
            contacts[key] = None if utc is None else {
                "utc": iso_utc(utc), "local": iso_local(utc, tz),
                "moon_alt_deg": round(aa[0], 2), "moon_az_deg": round(aa[1], 2),
                "above_horizon": bool(aa[0] > 0.0)}
        phases = {name: (None if f is None else {"visible_fraction": round(f, 3),
                                                 "seen": "all" if f >= 0.999 else "none" if f <= 0.001
                                                 else "part"})
                  for name, f in self.phase_visible_fraction.items()}
        return {"kind": "lunar", "eclipse": self.eclipse.as_json(), "site": self.site.as_json(),
                "contacts": contacts, "phases": phases}


def _moon_alt_az(site, utc_list: list[datetime]):
    from domegen.sky.ephemeris import body
    from domegen.sky.refraction import refract
    from domegen.sky.times import to_time, unix_seconds

    t = to_time(np.atleast_1d(unix_seconds(utc_list)))
    alt, az, _ = site.observer().at(t).observe(body("Moon")).apparent().altaz()
    alt_r = refract(alt.degrees, site.temperature_C, site.pressure_mbar)
    return np.atleast_1d(alt_r), np.atleast_1d(az.degrees)


def lunar_local(eclipse, site) -> LunarLocal:
    """Moon altitude/azimuth at every contact and the visible share of each phase."""
    keys = [k for k, v in eclipse.contacts_utc.items() if v is not None]
    alt, az = _moon_alt_az(site, [eclipse.contacts_utc[k] for k in keys])
    altaz = {k: None for k in eclipse.contacts_utc}
    for k, a, z in zip(keys, alt, az):
        altaz[k] = (float(a), float(z))
    # one sampling grid across the whole eclipse (P1..P4), one minute apart
    p1, p4 = eclipse.contacts_utc["P1"], eclipse.contacts_utc["P4"]
    n = max(2, int((p4 - p1).total_seconds() // 60) + 2)
    grid = [p1 + (p4 - p1) * (i / (n - 1)) for i in range(n)]
    galt, _ = _moon_alt_az(site, grid)
    gs = np.array([(g - p1).total_seconds() for g in grid])
    frac = {}
    for name, (a, b) in _PHASES.items():
        ta, tb = eclipse.contacts_utc[a], eclipse.contacts_utc[b]
        if ta is None:
            frac[name] = None
            continue
        sa, sb = (ta - p1).total_seconds(), (tb - p1).total_seconds()
        inside = (gs >= sa) & (gs <= sb)
        frac[name] = float(np.mean(galt[inside] > 0.0)) if np.any(inside) else float(
            np.interp(0.5 * (sa + sb), gs, galt) > 0.0)
    return LunarLocal(eclipse=eclipse, site=site, moon_altaz_deg=altaz, phase_visible_fraction=frac)
