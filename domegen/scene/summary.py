"""A scene's summary for people and for JSON: frames, durations, sky span, events."""

from __future__ import annotations

from domegen.sky.times import from_unix_seconds, iso_local, iso_utc


def show_clock(seconds: float, fps: float | None = None) -> str:
    """Show time as ``H:MM:SS`` (with ``:FF`` frames when ``fps`` is given)."""
    whole = int(seconds)
    h, rem = divmod(whole, 3600)
    m, s = divmod(rem, 60)
    text = f"{h}:{m:02d}:{s:02d}"
    if fps:
        text += f":{int(round((seconds - whole) * fps)) % max(1, int(round(fps))):02d}"
    return text


def _is_solar(scene) -> bool:
    return any(e.label.startswith(("C1", "C2", "C3", "C4", "maximum eclipse")) for e in scene.events)


def summary(scene) -> dict:
    """JSON-ready facts about a loaded scene."""
    tz = scene.site.timezone
    lo, hi = scene.sky_span()
    out = {
        "scene": str(scene.path),
        "title": scene.title,
        "venue": {"name": scene.venue_name, **scene.site.as_json()},
        "dome": scene.dome,
        "output": {"folder": str(scene.output.root), "file_pattern": scene.output.pattern,
                   "format": scene.output.format, "bit_depth": scene.output.bit_depth,
                   "frame_rate": scene.output.fps},
        "frame_count": scene.frame_count,
        "show_duration_s": scene.duration_s,
        "sky_span": {"start_utc": iso_utc(lo), "end_utc": iso_utc(hi),
                     "start_local": iso_local(lo, tz), "end_local": iso_local(hi, tz),
                     "length_s": (hi - lo).total_seconds()},
        "shots": [{"index": s.index, "name": s.name, "first_frame": s.first_frame,
                   "last_frame": s.first_frame + s.frame_count - 1, "duration_s": s.duration_s,
                   "sky_start_utc": iso_utc(from_unix_seconds(s.sky_start_s)),
                   "sky_end_utc": iso_utc(from_unix_seconds(s.sky_end_s))} for s in scene.shots],
        "events": [{"event": e.label, "utc": iso_utc(e.utc), "local": iso_local(e.utc, tz)}
                   for e in scene.events],
        "files": [str(f) for f in scene.files],
    }
    if _is_solar(scene):
        from domegen.eclipse.safety import CAUTION

        out["caution"] = CAUTION
    return out


def summary_text(scene) -> str:
    """The summary as a few aligned lines of text."""
    d = summary(scene)
    fps = scene.output.fps
    v = d["venue"]
    lines = [
        f"scene      {d['scene']}" + (f"  ({d['title']})" if d["title"] else ""),
        f"venue      {(v.get('name') or '') + ' ' if v.get('name') else ''}{v['lat_deg']:.4f}, "
        f"{v['lon_deg']:.4f}, {v['elev_m']:g} m, {v['timezone']}",
        f"dome       {d['dome']['size']} px, field {d['dome']['field']:g} deg, front azimuth "
        f"{d['dome']['front_azimuth']:g} deg, tilt {d['dome']['tilt']:g} deg",
        f"output     {d['output']['folder']}/{d['output']['file_pattern']}  ({d['output']['format']}, "
        f"{d['output']['bit_depth']} bit, {fps:g} fps)",
        f"frames     {d['frame_count']} (0-{d['frame_count'] - 1})",
        f"show time  {show_clock(d['show_duration_s'], fps)} (H:MM:SS:FF, {d['show_duration_s']:g} s)",
        f"sky time   {d['sky_span']['start_local']} to {d['sky_span']['end_local']}"
        f"  ({d['sky_span']['start_utc']} to {d['sky_span']['end_utc']}, "
        f"{show_clock(d['sky_span']['length_s'])})",
        "shots",
    ]
    tz = scene.site.timezone
    for s in scene.shots:
        a, b = from_unix_seconds(s.sky_start_s), from_unix_seconds(s.sky_end_s)
        lines.append(f"  {s.index + 1:>3}  {s.name:<24} frames {s.first_frame}-{s.first_frame + s.frame_count - 1}"
                     f"  {s.duration_s:g} s  sky {iso_local(a, tz)} -> {iso_local(b, tz)}")
    if d["events"]:
        lines.append("events (local, UTC)")
        width = max(len(e["event"]) for e in d["events"])
        for e in d["events"]:
            lines.append(f"  {e['event']:<{width}}  {e['local']}  {e['utc']}")
    else:
        lines.append("events     none used")
    if "caution" in d:
        lines.append(d["caution"])
    return "\n".join(lines)
