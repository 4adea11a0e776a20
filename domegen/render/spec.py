"""What to render: the camera, the layers and the frame, as frozen value objects.

All three classes are frozen dataclasses: hashable (usable as cache keys),
picklable (sent to worker processes) and validated on construction, so a bad
value fails early with a :class:`~domegen.errors.DomegenError` naming the field.

Frame convention (dome master): a square frame, angular (equidistant) fisheye,
the image circle touching the four edges.  The azimuth ``front_az_deg`` faces
the audience and lies at the bottom of the frame; held overhead and seen from
below, left is left and right is right, so with the front to the south north
is at the top and EAST IS ON THE LEFT (like an upward-looking all-sky camera).
Pixel coordinates count from the top-left corner, x to the right and y down,
pixel centres at half-integers; the frame centre is (size/2, size/2).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, fields, replace
from datetime import datetime

from domegen.errors import InputError, OutOfRangeError
from domegen.sky.site import Site

#: Allowed frame sizes, pixels (square).
SIZE_MIN_PX = 64
SIZE_MAX_PX = 16384
#: Allowed total field of view of the fisheye, degrees.
FIELD_MIN_DEG = 1.0
FIELD_MAX_DEG = 240.0
#: Names of the sky models a LayerSpec may ask for ("auto" = the physical sky when installed).
SKY_MODELS = ("auto", "physical", "gradient")

_OPACITY_FIELDS = ("stars", "planets", "sun", "moon", "ground", "atmosphere", "labels",
                   "grid_altaz", "grid_equatorial", "ecliptic", "equator", "meridian",
                   "horizon_line", "cardinals")


def _finite(obj, name: str) -> float:
    v = getattr(obj, name)
    if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v):
        raise InputError(f"{name} must be a finite number, not {v!r}", field=name, value=v)
    return float(v)


@dataclass(frozen=True)
class CameraSpec:
    """A fisheye camera.

    ``size_px``: frame width = height, 64..16384.  ``field_deg``: total angle
    across the image circle, 1..240 (180 = hemisphere).  Dome mode (the
    default): the dome axis is the zenith tilted by ``tilt_deg`` toward the
    front azimuth ``front_az_deg`` (degrees from north through east), which is
    at the bottom of the frame.  Free view: give ``view_alt_deg`` (and
    optionally ``view_az_deg``, default the front azimuth) to put that
    direction at the frame centre with the zenith side up; tilt is then
    ignored.  ``roll_deg`` turns the picture counter-clockwise on the frame.
    """

    size_px: int = 1024
    field_deg: float = 180.0
    front_az_deg: float = 180.0
    tilt_deg: float = 0.0
    view_az_deg: float | None = None
    view_alt_deg: float | None = None
    roll_deg: float = 0.0

    def __post_init__(self):
        s = self.size_px
        if isinstance(s, bool) or not isinstance(s, int):
            raise InputError(f"size must be a whole number of pixels, not {s!r}", field="size_px", value=s)
        if not SIZE_MIN_PX <= s <= SIZE_MAX_PX:
            raise OutOfRangeError(f"size {s} px is outside {SIZE_MIN_PX}..{SIZE_MAX_PX}",
                                  field="size_px", value=s, hint="dome masters are usually 1024..8192")
        for name in ("field_deg", "front_az_deg", "tilt_deg", "roll_deg"):
            _finite(self, name)
        if not FIELD_MIN_DEG <= self.field_deg <= FIELD_MAX_DEG:
            raise OutOfRangeError(f"field {self.field_deg} deg is outside {FIELD_MIN_DEG:g}..{FIELD_MAX_DEG:g}",
                                  field="field_deg", value=self.field_deg)
        if not -90.0 <= self.tilt_deg <= 90.0:
            raise OutOfRangeError(f"tilt {self.tilt_deg} deg is outside -90..90", field="tilt_deg",
                                  value=self.tilt_deg)
        if self.view_az_deg is not None:
            _finite(self, "view_az_deg")
        if self.view_alt_deg is not None:
            _finite(self, "view_alt_deg")
            if not -90.0 <= self.view_alt_deg <= 90.0:
                raise OutOfRangeError(f"view altitude {self.view_alt_deg} deg is outside -90..90",
                                      field="view_alt_deg", value=self.view_alt_deg)
        elif self.view_az_deg is not None:
            raise InputError("view_az_deg needs view_alt_deg too", field="view_alt_deg",
                             hint="give both for a free view, or neither for dome mode")

    @property
    def free_view(self) -> bool:
        return self.view_alt_deg is not None

    @property
    def px_per_deg(self) -> float:
        """Pixels per degree along a radius of the image circle."""
        return self.size_px / self.field_deg


@dataclass(frozen=True)
class LayerSpec:
    """What is drawn, each layer with an opacity 0..1 (0 = off), and how it is exposed.

    ``exposure_ev``: None = automatic from the sky brightness; 0 exposes a
    clear daytime sky as a mid-tone, each +1 doubles.  ``sky_dimming``
    multiplies the sky background's radiance (1 = as modelled, 0 = black).
    ``star_mag_limit``: faintest V magnitude drawn.  Light pollution: a Bortle
    class 1..9 or a zenith brightness in mag/arcsec^2 (V), the latter wins.
    ``danjon_L``: lunar-eclipse darkness (Danjon scale 0..4).  ``panorama``:
    path of a 360-degree equirectangular PNG (alpha = sky) replacing the
    procedural skyline.  ``seed`` drives every procedural detail (skyline,
    lunar albedo).  ``sky_model``: "auto" (the physical atmosphere when
    installed, else the gradient), "physical" or "gradient".
    """

    stars: float = 1.0
    planets: float = 1.0
    sun: float = 1.0
    moon: float = 1.0
    ground: float = 1.0
    atmosphere: float = 1.0
    labels: float = 0.0
    grid_altaz: float = 0.0
    grid_equatorial: float = 0.0
    ecliptic: float = 0.0
    equator: float = 0.0
    meridian: float = 0.0
    horizon_line: float = 0.0
    cardinals: float = 0.0
    exposure_ev: float | None = None
    sky_dimming: float = 1.0
    star_mag_limit: float = 6.5
    light_pollution_bortle: int | None = None
    light_pollution_mag_arcsec2: float | None = None
    danjon_L: float = 2.0
    panorama: str | None = None
    seed: int = 0
    sky_model: str = "auto"

    def __post_init__(self):
        for name in _OPACITY_FIELDS:
            v = _finite(self, name)
            if not 0.0 <= v <= 1.0:
                raise OutOfRangeError(f"opacity {name}={v} is outside 0..1", field=name, value=v)
        if self.exposure_ev is not None:
            v = _finite(self, "exposure_ev")
            if not -30.0 <= v <= 60.0:
                raise OutOfRangeError(f"exposure {v} EV is outside -30..60", field="exposure_ev", value=v)
        if not 0.0 <= _finite(self, "sky_dimming") <= 100.0:
            raise OutOfRangeError("sky_dimming must be within 0..100", field="sky_dimming",
                                  value=self.sky_dimming)
        if not -2.0 <= _finite(self, "star_mag_limit") <= 14.0:
            raise OutOfRangeError(f"star_mag_limit {self.star_mag_limit} is outside -2..14",
                                  field="star_mag_limit", value=self.star_mag_limit)
        b = self.light_pollution_bortle
        if b is not None and (isinstance(b, bool) or not isinstance(b, int) or not 1 <= b <= 9):
            raise OutOfRangeError(f"Bortle class {b!r} is not a whole number 1..9",
                                  field="light_pollution_bortle", value=b)
        if self.light_pollution_mag_arcsec2 is not None:
            if not 10.0 <= _finite(self, "light_pollution_mag_arcsec2") <= 23.0:
                raise OutOfRangeError("light pollution must be 10..23 mag/arcsec^2",
                                      field="light_pollution_mag_arcsec2",
                                      value=self.light_pollution_mag_arcsec2)
        if not 0.0 <= _finite(self, "danjon_L") <= 4.0:
            raise OutOfRangeError(f"Danjon L {self.danjon_L} is outside 0..4", field="danjon_L",
                                  value=self.danjon_L)
        if self.panorama is not None and not isinstance(self.panorama, str):
            raise InputError("panorama must be a file path", field="panorama", value=self.panorama)
        if isinstance(self.seed, bool) or not isinstance(self.seed, int):
            raise InputError(f"seed must be a whole number, not {self.seed!r}", field="seed", value=self.seed)
        if self.sky_model not in SKY_MODELS:
            raise InputError(f"unknown sky model {self.sky_model!r}", field="sky_model",
                             value=self.sky_model, hint="choose one of " + ", ".join(SKY_MODELS))

    def opacities(self) -> dict[str, float]:
        """Layer name -> opacity."""
        return {name: float(getattr(self, name)) for name in _OPACITY_FIELDS}

    def with_only(self, *names: str) -> "LayerSpec":
        """A copy with every opacity layer off except ``names`` (kept as they are)."""
        return replace(self, **{n: 0.0 for n in _OPACITY_FIELDS if n not in names})


@dataclass(frozen=True)
class FrameSpec:
    """One frame: where (``site``), when (``utc``, timezone-aware), how (``camera``, ``layers``)."""

    site: Site
    utc: datetime
    camera: CameraSpec = field(default_factory=CameraSpec)
    layers: LayerSpec = field(default_factory=LayerSpec)

    def __post_init__(self):
        if not isinstance(self.site, Site):
            raise InputError("site must be a domegen.sky.site.Site", field="site", value=self.site)
        if not isinstance(self.utc, datetime) or self.utc.tzinfo is None:
            raise InputError("utc must be a timezone-aware datetime", field="utc", value=self.utc,
                             hint="use domegen.sky.times.parse_instant")
        if not isinstance(self.camera, CameraSpec):
            raise InputError("camera must be a CameraSpec", field="camera", value=self.camera)
        if not isinstance(self.layers, LayerSpec):
            raise InputError("layers must be a LayerSpec", field="layers", value=self.layers)


def layer_names() -> tuple[str, ...]:
    """The opacity layers of :class:`LayerSpec`, in drawing order."""
    return _OPACITY_FIELDS


def spec_fields(cls) -> tuple[str, ...]:
    """Field names of one of the spec classes (for scene validation)."""
    return tuple(f.name for f in fields(cls))
