"""The small text languages inside a scene: durations, show times, rates, sky instants.

Each language is one regular expression (used by the validator *and* put in
the JSON Schema) plus a parser.  Examples::

    duration   20 | "20 s" | "1 min 30 s" | "2 h" | "500 ms"
    at         "0 s" | "12.5 s" | "50%" | "start" | "end" | "end - 2 s"
    rate       600 | "1 s = 10 min" | "1 s of show = 10 min of sky" | "10 min per s" | "real time"
    instant    "2026-08-12T18:27:00Z" | "2026-08-12 20:27" (venue time) | "sunset"
               | "10 s before second contact" | "C2 - 10 s" | "maximum + 1 min" | "continue"
"""

from __future__ import annotations

import re
from dataclasses import dataclass

_UNITS = {
    "ms": 0.001, "millisecond": 0.001, "milliseconds": 0.001,
    "s": 1.0, "sec": 1.0, "secs": 1.0, "second": 1.0, "seconds": 1.0,
    "min": 60.0, "mins": 60.0, "minute": 60.0, "minutes": 60.0,
    "h": 3600.0, "hr": 3600.0, "hrs": 3600.0, "hour": 3600.0, "hours": 3600.0,
    "d": 86400.0, "day": 86400.0, "days": 86400.0,
}
_UNIT_RE = "|".join(sorted(_UNITS, key=len, reverse=True))
_NUM = r"\d+(?:\.\d+)?"
_PART = rf"{_NUM}\s*(?:{_UNIT_RE})"
DURATION_RE = rf"\s*{_PART}(?:\s+{_PART})*\s*"
AT_RE = rf"\s*(?:start|end|end\s*-\s*{DURATION_RE}|{_NUM}\s*%|{DURATION_RE}|{_NUM})\s*"
RATE_RE = (rf"\s*(?:real\s+time|x\s*{_NUM}|{_NUM}\s*x"
           rf"|{DURATION_RE}(?:of\s+show\s*)?=\s*{DURATION_RE}(?:of\s+sky\s*)?"
           rf"|{DURATION_RE}(?:of\s+sky\s+)?per\s+(?:{_UNIT_RE}|{DURATION_RE})(?:\s*of\s+show)?)\s*")

#: Events anchored at the venue, by kind; the keys are what a scene may write.
DAY_EVENTS = {
    "sunrise": "sunrise", "sunset": "sunset", "moonrise": "moonrise", "moonset": "moonset",
    "solar noon": "transit_sun", "moon transit": "transit_moon",
    "civil dusk": "civil_dusk", "nautical dusk": "nautical_dusk", "astronomical dusk": "astronomical_dusk",
    "civil dawn": "civil_dawn", "nautical dawn": "nautical_dawn", "astronomical dawn": "astronomical_dawn",
}
SOLAR_EVENTS = {
    "c1": "c1", "first contact": "c1", "start of eclipse": "c1",
    "c2": "c2", "second contact": "c2", "start of totality": "c2",
    "c3": "c3", "third contact": "c3", "end of totality": "c3",
    "c4": "c4", "fourth contact": "c4", "end of eclipse": "c4",
    "maximum": "max", "greatest eclipse": "max",
}
LUNAR_EVENTS = {
    "p1": "P1", "u1": "U1", "u2": "U2", "u3": "U3", "u4": "U4", "p4": "P4",
    "penumbral start": "P1", "partial start": "U1", "totality start": "U2",
    "totality end": "U3", "partial end": "U4", "penumbral end": "P4",
    "maximum": "greatest", "greatest eclipse": "greatest",
}
_EVENT_NAMES = sorted(set(DAY_EVENTS) | set(SOLAR_EVENTS) | set(LUNAR_EVENTS), key=lambda n: (-len(n), n))
_EVENT_RE = "|".join(n.replace(" ", r"\s+") for n in _EVENT_NAMES)
ISO_RE = (r"\d{4}-\d{2}-\d{2}(?:[Tt ]\d{1,2}:\d{2}(?::\d{2}(?:\.\d+)?)?)?"
          r"(?:\s*(?:[zZ]|[+-]\d{2}(?::?\d{2})?))?")
_BASE = rf"(?:{_EVENT_RE}|{ISO_RE})"
INSTANT_RE = (rf"\s*(?:continue|(?:{DURATION_RE}(?:before|after)\s+)?{_BASE}"
              rf"(?:\s*[+-]\s*{DURATION_RE})?)\s*")


def parse_duration(value) -> float:
    """Seconds from a number (seconds) or a text such as "1 min 30 s"."""
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return float(value)
    total = 0.0
    for num, unit in re.findall(rf"({_NUM})\s*({_UNIT_RE})", str(value), flags=re.IGNORECASE):
        total += float(num) * _UNITS[unit.lower()]
    return total


@dataclass(frozen=True)
class At:
    """A show time inside a shot: ``fraction`` of the shot plus ``offset_s``."""

    fraction: float
    offset_s: float

    def seconds(self, duration_s: float) -> float:
        return self.fraction * duration_s + self.offset_s


def parse_at(value) -> At:
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return At(0.0, float(value))
    s = str(value).strip().lower()
    if s == "start":
        return At(0.0, 0.0)
    if s.startswith("end"):
        rest = s[3:].strip().lstrip("-").strip()
        return At(1.0, -parse_duration(rest) if rest else 0.0)
    if s.endswith("%"):
        return At(float(s[:-1]) / 100.0, 0.0)
    if re.fullmatch(_NUM, s):
        return At(0.0, float(s))
    return At(0.0, parse_duration(s))


def parse_rate(value) -> float:
    """Sky seconds per show second."""
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return float(value)
    s = " ".join(str(value).strip().lower().split())
    if s == "real time":
        return 1.0
    m = re.fullmatch(rf"x\s*({_NUM})|({_NUM})\s*x", s)
    if m:
        return float(m.group(1) or m.group(2))
    if "=" in s:
        show, sky = s.split("=", 1)
        return parse_duration(sky) / parse_duration(show)
    sky, show = s.split(" per ", 1)
    show = show.replace("of show", "").strip()
    show_s = _UNITS[show] if show in _UNITS else parse_duration(show)
    return parse_duration(sky) / show_s


@dataclass(frozen=True)
class InstantExpr:
    """A parsed sky instant: a base (event name or ISO text) and an offset in seconds."""

    base: str            # "continue", an event key (lower case, single spaces) or ISO text
    offset_s: float
    is_event: bool


def parse_instant_expr(value) -> InstantExpr:
    s = " ".join(str(value).strip().split())
    low = s.lower()
    if low == "continue":
        return InstantExpr("continue", 0.0, False)
    offset = 0.0
    m = re.match(rf"({DURATION_RE})(before|after)\s+(.*)$", s, flags=re.IGNORECASE)
    if m:
        d = parse_duration(m.group(1))
        offset += -d if m.group(2).lower() == "before" else d
        s = m.group(3)
    m = re.fullmatch(rf"(.*?)\s*([+-])\s*({DURATION_RE})", s)
    if m and not re.fullmatch(ISO_RE, s):
        d = parse_duration(m.group(3))
        offset += d if m.group(2) == "+" else -d
        s = m.group(1)
    key = " ".join(s.lower().split())
    if key in DAY_EVENTS or key in SOLAR_EVENTS or key in LUNAR_EVENTS:
        return InstantExpr(key, offset, True)
    return InstantExpr(s.strip(), offset, False)
