"""Reading site lists for map markers: CSV lines ``name,lat,lon`` or a JSON list."""

from __future__ import annotations

import json
from pathlib import Path

from domegen.errors import InputError, NotFoundError, OutOfRangeError
from domegen.maps.basemap import MapSite


def _site(name, lat, lon, file: str, line: int) -> MapSite:
    try:
        la, lo = float(lat), float(lon)
    except (TypeError, ValueError):
        raise InputError(f"latitude and longitude must be numbers, got {lat!r}, {lon!r}",
                         field="sites", value=(lat, lon), file=file, line=line,
                         hint="write lines like: Burgos,42.34,-3.70") from None
    if not -90.0 <= la <= 90.0 or not -180.0 <= lo <= 360.0:
        raise OutOfRangeError("latitude must be -90..90 and longitude -180..360 degrees",
                              field="sites", value=(la, lo), file=file, line=line)
    return MapSite(str(name).strip() or "site", la, ((lo + 180.0) % 360.0) - 180.0)


def read_sites(path) -> list[MapSite]:
    """Sites from a CSV file (``name,lat_deg,lon_deg`` per line, # comments, optional header)
    or a JSON list of objects with name, lat, lon."""
    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise NotFoundError("no such sites file", field="sites", value=str(p)) from None
    except (OSError, UnicodeDecodeError) as err:
        raise InputError(f"cannot read the sites file: {err}", field="sites", value=str(p)) from None
    stripped = text.lstrip()
    if stripped.startswith("["):
        try:
            items = json.loads(text)
        except json.JSONDecodeError as err:
            raise InputError(f"bad JSON: {err.msg}", field="sites", file=str(p), line=err.lineno) from None
        out = []
        for i, it in enumerate(items):
            if not isinstance(it, dict) or not {"lat", "lon"} <= set(it):
                raise InputError(f"site number {i + 1} needs lat and lon", field="sites", file=str(p))
            out.append(_site(it.get("name", f"site {i + 1}"), it["lat"], it["lon"], str(p), None))
        return out
    out = []
    for n, line in enumerate(text.splitlines(), start=1):
        line = line.split("#", 1)[0].strip()
        if not line:
            continue
        cells = [c.strip() for c in line.split(",")]
        if len(cells) != 3:
            raise InputError("each line must be name,lat,lon", field="sites", value=line,
                             file=str(p), line=n, hint="for example: Burgos,42.34,-3.70")
        if n == 1 and cells[1].lower().startswith("lat"):
            continue  # header
        out.append(_site(cells[0], cells[1], cells[2], str(p), n))
    return out
