"""The scene format, defined once: used by the validator and by ``domegen schema``."""

from __future__ import annotations

from domegen.scene.fields import Choice, Either, ListOf, Number, Section, Text
from domegen.scene.grammar import AT_RE, DURATION_RE, INSTANT_RE, RATE_RE

SCHEMA_ID = "https://domegen.invalid/scene.schema.json"

EASINGS = ("linear", "ease_in", "ease_out", "ease_in_out", "smooth", "hold")
BODIES = ("Sun", "Moon", "Mercury", "Venus", "Mars", "Jupiter", "Saturn", "Uranus", "Neptune")


def _duration(desc: str, example="20 s", default=...) -> Either:
    kw = {} if default is ... else {"default": default}
    return Either(desc, example=example, options=(
        Number("a number of seconds", example=20, minimum=0),
        Text("a duration such as \"20 s\" or \"1 min 30 s\"", example="1 min 30 s", pattern=DURATION_RE,
             pattern_help="write a duration like '20 s', '1.5 min', '1 min 30 s' or '2 h'"),
    ), **kw)


def _instant(desc: str, example: str) -> Text:
    return Text(desc, example=example, default=None, pattern=INSTANT_RE, accept_dates=True,
                pattern_help="write an ISO time ('2026-08-12T18:27:00Z', or '2026-08-12 20:27' in the venue's "
                             "zone), an event ('sunset', 'second contact', 'U2', 'maximum'), an offset "
                             "('10 s before second contact', 'sunset + 5 min') or 'continue'")


def _opacity(what: str) -> Number:
    return Number(f"opacity of {what}, 0 (hidden) to 1 (full)", example=1, default=None, minimum=0, maximum=1)


#: scene key -> (LayerSpec field, definition). Opacities and numbers fade; texts hold.
LAYER_FIELDS = {
    "stars": ("stars", _opacity("the stars")),
    "planets": ("planets", _opacity("the planets")),
    "sun": ("sun", _opacity("the Sun's disk")),
    "moon": ("moon", _opacity("the Moon's disk")),
    "ground": ("ground", _opacity("the ground below the horizon")),
    "atmosphere": ("atmosphere", _opacity("the daylight/twilight sky glow")),
    "labels": ("labels", _opacity("name labels of bright bodies")),
    "altaz_grid": ("grid_altaz", _opacity("the altitude-azimuth grid")),
    "equatorial_grid": ("grid_equatorial", _opacity("the right ascension-declination grid")),
    "ecliptic_line": ("ecliptic", _opacity("the ecliptic line")),
    "celestial_equator": ("equator", _opacity("the celestial equator line")),
    "meridian": ("meridian", _opacity("the local meridian line")),
    "horizon_line": ("horizon_line", _opacity("the horizon line")),
    "cardinal_points": ("cardinals", _opacity("the N/E/S/W letters")),
    "exposure": ("exposure_ev", Either(
        "exposure in EV (stops), or auto", example="auto", default=None, options=(
            Number("an exposure value in stops", example=-2.0, minimum=-30, maximum=30),
            Choice("auto", example="auto", choices=("auto",))))),
    "sky_dimming": ("sky_dimming", Number("multiplier on the sky's brightness, 0 to 1", example=1,
                                          default=None, minimum=0, maximum=1)),
    "faintest_star": ("star_mag_limit", Number("faintest star drawn, visual magnitude", example=6.5,
                                               default=None, minimum=-2, maximum=12)),
    "light_pollution": ("light_pollution_bortle", Number("light pollution on the Bortle scale 1 (dark) to 9 (city)",
                                                         example=4, default=None, minimum=1, maximum=9)),
    "lunar_eclipse_darkness": ("danjon_L", Number("Danjon brightness L of a totally eclipsed Moon, 0 (dark) to 4",
                                                  example=2, default=None, minimum=0, maximum=4)),
    "panorama": ("panorama", Text("an equirectangular horizon image (path relative to the scene file)",
                                  example="horizons/loire.png", default=None)),
    "noise_seed": ("seed", Number("seed of the film-grain and twinkle noise", example=0, default=None,
                                  integer=True, minimum=0, maximum=2**31 - 1)),
}
LAYER_DEFAULTS = {"stars": 1.0, "planets": 1.0, "sun": 1.0, "moon": 1.0, "ground": 1.0, "atmosphere": 1.0,
                  "labels": 0.0, "altaz_grid": 0.0, "equatorial_grid": 0.0, "ecliptic_line": 0.0,
                  "celestial_equator": 0.0, "meridian": 0.0, "horizon_line": 0.0, "cardinal_points": 0.0}

_AT = Either("show time inside the shot", example="5 s", options=(
    Number("seconds from the start of the shot", example=5, minimum=0),
    Text("a show time: '5 s', '50%', 'start', 'end' or 'end - 2 s'", example="end - 2 s", pattern=AT_RE,
         pattern_help="write '5 s', '50%', 'start', 'end' or 'end - 2 s'")))
_EASING = Choice("how the change between this keyframe and the next speeds up or slows down",
                 example="ease_in_out", default="linear", choices=EASINGS)

LAYERS = Section("layer settings: opacities and rendering options", example={"stars": 1, "labels": 0.5},
                 default={}, fields={k: f for k, (_, f) in LAYER_FIELDS.items()})
LAYER_KEY = Section("layer settings at one show time; values fade towards the next keyframe",
                    example={"at": "2 s", "labels": 1},
                    fields={"at": _AT, "easing": _EASING, **{k: f for k, (_, f) in LAYER_FIELDS.items()}})

CAMERA_VALUES = {
    "front_azimuth": Number("azimuth of the dome's front, degrees from north through east", example=180,
                            default=None, minimum=-3600, maximum=3600, unit="deg"),
    "tilt": Number("tilt of the dome towards its front, degrees", example=15, default=None,
                   minimum=-90, maximum=90, unit="deg"),
    "field": Number("field of view across the fisheye, degrees", example=180, default=None,
                    minimum=1, maximum=240, unit="deg"),
    "look_azimuth": Number("azimuth the centre of the view points at, degrees", example=250, default=None,
                           minimum=-3600, maximum=3600, unit="deg"),
    "look_altitude": Number("altitude the centre of the view points at, degrees", example=20, default=None,
                            minimum=-90, maximum=90, unit="deg"),
    "look_at": Choice("a body the centre of the view follows", example="Sun", default=None, choices=BODIES),
    "roll": Number("roll of the view about its centre, degrees", example=0, default=None,
                   minimum=-360, maximum=360, unit="deg"),
}
CAMERA_KEY = Section("camera at one show time; values move towards the next keyframe",
                     example={"at": "end", "field": 60, "look_at": "Sun"},
                     exclusive=(("look_at", "look_azimuth"), ("look_at", "look_altitude")),
                     fields={"at": _AT, "easing": _EASING, **CAMERA_VALUES})

SKY = Section("how show time maps to sky time in this shot", example={"start": "sunset - 10 min", "rate": "1 s = 2 min"},
              exclusive=(("end", "rate"),), fields={
                  "start": _instant("sky instant at the start of the shot", "sunset - 10 min"),
                  "end": _instant("sky instant at the end of the shot", "astronomical dusk"),
                  "rate": Either("sky time per show time", example="1 s = 10 min", default=None, options=(
                      Number("sky seconds per show second", example=600, minimum=-1e9, maximum=1e9),
                      Text("a rate such as '1 s = 10 min' or 'real time'", example="1 s of show = 10 min of sky",
                           pattern=RATE_RE,
                           pattern_help="write '1 s = 10 min', '1 s of show = 10 min of sky', '10 min per s', "
                                        "'x600' or 'real time'"))),
                  "easing": Choice("how sky time speeds up or slows down between start and end", example="ease_in_out",
                                   default="linear", choices=EASINGS),
                  "date": Text("the local date whose day events (sunset...) this shot uses", example="2026-03-20",
                               default=None, accept_dates=True, pattern=r"\d{4}-\d{2}-\d{2}",
                               pattern_help="write YYYY-MM-DD"),
              })

SHOT = Section("one shot of the show", example={"name": "dusk", "duration": "20 s", "sky": {"start": "sunset"}},
               fields={
                   "name": Text("a name for the shot (used in messages and the contact sheet)", example="dusk",
                                default=None, max_length=80),
                   "duration": _duration("length of the shot in show time"),
                   "sky": SKY,
                   "camera": ListOf("camera keyframes", example=[{"at": "start", "field": 180}], default=[],
                                    item=CAMERA_KEY),
                   "layers": Either("layer settings for the whole shot, or keyframes that fade them",
                                    example={"labels": 1}, default=None,
                                    options=(LAYERS, ListOf("layer keyframes", example=[{"at": 0, "labels": 0}],
                                                            item=LAYER_KEY, min_items=1))),
               })

VENUE = Section("where the dome stands", example={"place": "Nantes"}, default={}, fields={
    "name": Text("the venue's name", example="Loire Valley Science Dome", default=None),
    "place": Text("a city to take coordinates and time zone from", example="Nantes", default=None),
    "latitude": Number("geodetic latitude, degrees north", example=47.2184, default=None,
                       minimum=-90, maximum=90, unit="deg"),
    "longitude": Number("longitude, degrees east (west negative)", example=-1.5536, default=None,
                        minimum=-180, maximum=360, unit="deg"),
    "elevation": Number("height above sea level, metres", example=20, default=None,
                        minimum=-500, maximum=9000, unit="m"),
    "time_zone": Text("IANA time zone of the venue", example="Europe/Paris", default=None),
    "temperature": Number("air temperature for refraction, deg C", example=10, default=10.0,
                          minimum=-80, maximum=60, unit="C"),
    "pressure": Number("air pressure for refraction, mbar", example=1010, default=1010.0,
                       minimum=0, maximum=1100, unit="mbar"),
})

DOME = Section("the dome master frame", example={"size": 2048, "front_azimuth": 180}, default={}, fields={
    "size": Number("frame width and height, pixels", example=2048, default=1024, integer=True,
                   minimum=64, maximum=16384, unit="px"),
    "field": Number("fisheye field of view, degrees", example=180, default=180.0, minimum=1, maximum=240,
                    unit="deg"),
    "front_azimuth": Number("azimuth at the bottom (front) of the frame, degrees", example=180,
                            default=180.0, minimum=-360, maximum=360, unit="deg"),
    "tilt": Number("dome tilt towards the front, degrees", example=0, default=0.0, minimum=-90, maximum=90,
                   unit="deg"),
})

OUTPUT = Section("where and how frames are written", example={"folder": "renders/evening"}, default={}, fields={
    "folder": Text("output folder (relative to the scene file)", example="renders/evening", default="renders"),
    "file_pattern": Text("file name of each frame; {frame} is the frame number", example="dusk_{frame:05d}.png",
                         default="frame_{frame:05d}.png", pattern=r"[^{}]*\{frame(?::0?\d+d)?\}[^{}]*",
                         pattern_help="include {frame} or {frame:05d} exactly once"),
    "format": Choice("image format", example="png", default="png", choices=("png", "jpeg", "exr")),
    "bit_depth": Choice("bits per colour channel (PNG 8 or 16; JPEG 8; EXR is always half float)", example=8,
                        default=8, choices=(8, 16)),
    "frame_rate": Number("frames per second of show time", example=30, default=30.0, minimum=1, maximum=240,
                         unit="fps"),
})

ECLIPSE = Section("the eclipse that contact names (C2, U2, maximum) refer to",
                  example={"kind": "solar", "date": "2026-08-12"}, default=None, fields={
                      "kind": Choice("solar or lunar", example="solar", choices=("solar", "lunar")),
                      "date": Text("the eclipse's date (UTC)", example="2026-08-12", accept_dates=True,
                                   pattern=r"\d{4}-\d{2}-\d{2}", pattern_help="write YYYY-MM-DD"),
                  })

SCENE = Section("a domegen scene: a venue, a dome, an output and a timeline of shots",
                example={"title": "Evening", "shots": [{"duration": "10 s", "sky": {"start": "sunset"}}]},
                fields={
                    "include": ListOf("scene files whose settings this one starts from (relative paths)",
                                      example=["theatre.yaml"], default=[], item=Text("a file path",
                                                                                      example="theatre.yaml")),
                    "title": Text("title of the show", example="Evening to night over the Loire", default=None),
                    "notes": Text("free notes for the production team", example="draft 2", default=None,
                                  max_length=5000),
                    "date": Text("local date whose day events (sunset, dusk...) the shots use",
                                 example="2026-03-20", default=None, accept_dates=True,
                                 pattern=r"\d{4}-\d{2}-\d{2}", pattern_help="write YYYY-MM-DD"),
                    "eclipse": ECLIPSE,
                    "venue": VENUE,
                    "dome": DOME,
                    "output": OUTPUT,
                    "layers": LAYERS,
                    "shots": ListOf("the timeline: shots played one after another", min_items=1,
                                    example=[{"duration": "10 s", "sky": {"start": "sunset"}}], item=SHOT),
                })


def json_schema() -> dict:
    """The scene format as JSON Schema draft 2020-12 (YAML dates are written as text)."""
    out = {"$schema": "https://json-schema.org/draft/2020-12/schema", "$id": SCHEMA_ID,
           "title": "domegen scene"}
    out.update(SCENE.json())
    return out
