"""An observing site on the WGS84 ellipsoid."""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass, field

from domegen.errors import InputError, OutOfRangeError


@dataclass(frozen=True)
class Site:
    """Where the dome stands.

    Latitude and longitude are geodetic (WGS84) in degrees, longitude east
    positive; elevation in metres above the ellipsoid; temperature (deg C)
    and pressure (mbar) feed refraction; ``timezone`` is an IANA zone name.
    """

    lat_deg: float
    lon_deg: float
    elev_m: float = 0.0
    temperature_C: float = 10.0
    pressure_mbar: float = 1010.0
    timezone: str = "UTC"
    name: str | None = field(default=None, compare=False)

    def __post_init__(self):
        for attr in ("lat_deg", "lon_deg", "elev_m", "temperature_C", "pressure_mbar"):
            v = getattr(self, attr)
            if not isinstance(v, (int, float)) or not math.isfinite(v):
                raise InputError(f"{attr} must be a finite number, not {v!r}", field=attr, value=v)
        if not -90.0 <= self.lat_deg <= 90.0:
            raise OutOfRangeError(f"latitude {self.lat_deg} is outside -90..90 degrees",
                                  field="lat_deg", value=self.lat_deg)
        if not -180.0 <= self.lon_deg <= 360.0:
            raise OutOfRangeError(f"longitude {self.lon_deg} is outside -180..360 degrees",
                                  field="lon_deg", value=self.lon_deg)
        if not -500.0 <= self.elev_m <= 9000.0:
            raise OutOfRangeError(f"elevation {self.elev_m} m is outside -500..9000 m",
                                  field="elev_m", value=self.elev_m)
        if not 0.0 <= self.pressure_mbar <= 1100.0:
            raise OutOfRangeError(f"pressure {self.pressure_mbar} mbar is outside 0..1100",
                                  field="pressure_mbar", value=self.pressure_mbar)
        from domegen.sky.times import zone

        zone(self.timezone)  # raises InputError for an unknown zone

    @functools.cached_property
    def topos(self):
        """skyfield ``GeographicPosition`` (WGS84) of the site."""
        from skyfield.api import wgs84

        return wgs84.latlon(self.lat_deg, self.lon_deg, elevation_m=self.elev_m)

    def observer(self):
        """skyfield vector sum Earth + site, for ``.at(t).observe(...)``."""
        from domegen.sky.ephemeris import earth

        return earth() + self.topos

    def as_json(self) -> dict:
        d = {"lat_deg": self.lat_deg, "lon_deg": self.lon_deg, "elev_m": self.elev_m,
             "timezone": self.timezone}
        if self.name:
            d["place"] = self.name
        return d
