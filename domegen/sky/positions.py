"""One instant's positions report (the data behind ``domegen positions``)."""

from __future__ import annotations

import numpy as np

from domegen.sky.bodies import body_positions
from domegen.sky.site import Site
from domegen.sky.times import iso_local, iso_utc, parse_instant, to_time, tt_datetime, unix_seconds


def positions_report(site: Site, at, *, star_mag_limit: float = 2.0) -> dict:
    """Bodies and bright stars above the horizon, as a JSON-ready dict (field names are stable)."""
    when = parse_instant(at, site.timezone, field="at")
    tab = body_positions(site, unix_seconds(when))
    bodies = []
    for i, name in enumerate(tab.names):
        bodies.append({
            "name": name,
            "alt_deg": round(float(tab.alt_deg[i, 0]), 6),
            "alt_refracted_deg": round(float(tab.alt_refracted_deg[i, 0]), 6),
            "az_deg": round(float(tab.az_deg[i, 0]), 6),
            "ra_hours": round(float(tab.ra_hours[i, 0]), 7),
            "dec_deg": round(float(tab.dec_deg[i, 0]), 6),
            "distance_km": round(float(tab.distance_km[i, 0]), 1),
            "angular_radius_deg": round(float(tab.angular_radius_deg[i, 0]), 7),
            "phase_angle_deg": round(float(tab.phase_angle_deg[i, 0]), 4),
            "illuminated_fraction": round(float(tab.illuminated_fraction[i, 0]), 5),
            "bright_limb_pa_deg": round(float(tab.bright_limb_pa_deg[i, 0]), 3),
            "magnitude": round(float(tab.magnitude[i, 0]), 3),
        })
    from domegen.sky.stars import star_field

    field = star_field(site, when, mag_limit=star_mag_limit, refraction=False)
    up = np.nonzero(field.alt_deg > 0.0)[0]
    order = up[np.argsort(field.vmag[up], kind="stable")]
    stars = [{"hip": int(field.hip[k]), "alt_deg": round(float(field.alt_deg[k]), 6),
              "az_deg": round(float(field.az_deg[k]), 6), "magnitude": round(float(field.vmag[k]), 3)}
             for k in order]
    return {
        "site": site.as_json(),
        "time_utc": iso_utc(when),
        "time_tt": iso_utc(tt_datetime(to_time(when))).replace("Z", ""),
        "time_local": iso_local(when, site.timezone),
        "bodies": bodies,
        "stars": stars,
    }
