"""Everything coming up in a venue's sky over a period, eclipses included.

:func:`events_at_site` merges :func:`domegen.sky.events.sky_events` with the
solar and lunar eclipses that can be seen from the site (local circumstances
from the eclipse engines), sorted by time.
"""

from __future__ import annotations

from datetime import datetime

from domegen.sky.events import KINDS, SKY_KINDS, SkyEvent, sky_events
from domegen.sky.site import Site


def events_at_site(site: Site, start_utc: datetime, end_utc: datetime, *, kinds=KINDS,
                   max_separation_deg: float = 3.0, visible_only: bool = False) -> list[SkyEvent]:
    """Sky events and locally visible eclipses in [start_utc, end_utc), by time.

    Eclipses are listed only where some phase can be seen from the site (the
    Sun or Moon above the horizon during it); other events carry ``visible``.
    """
    from domegen.educator.eclipses import lunar_events, solar_events

    events = sky_events(site, start_utc, end_utc, kinds=[k for k in kinds if k in SKY_KINDS],
                        max_separation_deg=max_separation_deg, visible_only=visible_only)
    if "solar_eclipse" in kinds:
        events += solar_events(site, start_utc, end_utc)
    if "lunar_eclipse" in kinds:
        events += lunar_events(site, start_utc, end_utc)
    events.sort(key=lambda ev: ev.utc)
    return events
