"""Published reference values for the solar-eclipse tests (see data/solar_canon.json for sources)."""

from __future__ import annotations

import functools
import json
from datetime import datetime, timezone
from pathlib import Path

DATA = Path(__file__).with_name("data") / "solar_canon.json"


@functools.lru_cache(maxsize=1)
def canon() -> dict:
    return json.loads(DATA.read_text())


def eclipses() -> list[dict]:
    return canon()["eclipses"]


def td_instant(date: str, hms: str) -> datetime:
    """A published TD clock reading as an aware datetime (TT scale, labelled UTC)."""
    y, m, d = (int(v) for v in date.split("-"))
    h, mi, s = hms.split(":")
    sec = float(s)
    return datetime(y, m, d, int(h), int(mi), int(sec), int(round((sec % 1) * 1e6)), tzinfo=timezone.utc)


def dms(parts) -> float:
    deg, minutes, hemi = parts
    v = deg + minutes / 60.0
    return -v if hemi in ("S", "W") else v


def t0_tt_jd(date: str, hours: float) -> float:
    from domegen.sky.ephemeris import timescale

    y, m, d = (int(v) for v in date.split("-"))
    return float(timescale().tt(y, m, d, hours).tt)
