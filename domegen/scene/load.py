"""``load_scene(path)``: read, merge includes, validate, resolve events, build a :class:`Scene`."""

from __future__ import annotations

from pathlib import Path

from domegen.errors import DomegenError, SceneError
from domegen.scene.anchors import EventResolver, parse_day
from domegen.scene.fields import Ctx
from domegen.scene.grammar import parse_at, parse_duration, parse_instant_expr, parse_rate
from domegen.scene.model import OutputSettings, Scene
from domegen.scene.schema import LAYER_DEFAULTS, LAYER_FIELDS, SCENE
from domegen.scene.timeline import Key, Shot, Track
from domegen.scene.yamlload import Map, Mark, Seq, parse_text, read_file
from domegen.sky.site import Site
from domegen.sky.times import check_range, unix_seconds

MAX_INCLUDE_DEPTH = 16
MAX_FRAMES = 10_000_000


def read_tree(path: Path, *, text: str | None = None, _stack: tuple = ()) -> tuple[Map, list]:
    """The merged raw tree of ``path`` and its includes, and the list of files read."""
    path = Path(path)
    real = path.resolve()
    name = str(path)
    if text is None:
        text = read_file(path)
    tree = parse_text(text, name)
    if tree is None:
        raise SceneError("the scene file is empty", file=name, line=1, column=1,
                         hint="a scene needs at least 'venue' and 'shots'")
    if not isinstance(tree, Map):
        m = getattr(tree, "mark", None) or Mark(name, 1, 1)
        raise m.error("a scene file must be a mapping of keys to values", hint="start with 'title: ...'")
    files = [real]
    inc = tree.get("include")
    if inc is None:
        return tree, files
    items = [inc] if isinstance(inc, str) else inc
    if not isinstance(items, list) or not all(isinstance(i, str) for i in items):
        raise tree.mark_of("include").error("expected a file name or a list of file names",
                                            field="include", value=inc)
    merged = Map()
    merged.mark = tree.mark
    for i, item in enumerate(items):
        m = items.mark_of(i) if isinstance(items, Seq) else tree.mark_of("include")
        target = (path.parent / item)
        if target.resolve() in _stack + (real,):
            chain = " -> ".join(p.name for p in _stack + (real, target.resolve()))
            raise m.error(f"include loop: {chain}", field="include", value=item,
                          hint="a file cannot include itself, directly or through others")
        if len(_stack) >= MAX_INCLUDE_DEPTH:
            raise m.error(f"includes nested deeper than {MAX_INCLUDE_DEPTH} files", field="include")
        if not target.is_file():
            raise m.error(f"cannot find the included file {item!r} (looked for {target})",
                          field="include", value=item)
        sub, sub_files = read_tree(target, _stack=_stack + (real,))
        merged = _merge(merged, sub)
        files += [f for f in sub_files if f not in files]
    own = Map({k: v for k, v in tree.items() if k != "include"})
    own.key_marks = {k: v for k, v in tree.key_marks.items() if k != "include"}
    own.value_marks = {k: v for k, v in tree.value_marks.items() if k != "include"}
    own.mark = tree.mark
    return _merge(merged, own), files


def _merge(base: Map, over: Map) -> Map:
    """Deep merge: mappings merge key by key, anything else in ``over`` replaces ``base``."""
    out = Map()
    out.mark = over.mark or base.mark
    for src in (base, over):
        for k, v in src.items():
            if src is over and isinstance(v, Map) and isinstance(out.get(k), Map):
                v = _merge(out[k], v)
            out[k] = v
            out.key_marks[k] = src.key_marks.get(k)
            out.value_marks[k] = src.value_marks.get(k)
    return out


def load_scene(path, *, text: str | None = None) -> Scene:
    """Load and validate a scene file; every problem is a located :class:`SceneError`."""
    path = Path(path)
    tree, files = read_tree(path, text=text)
    marks: dict = {"": tree.mark}
    data = SCENE.check(tree, Ctx("", tree.mark), marks)
    try:
        return _build(path, data, marks, tuple(files))
    except SceneError:
        raise
    except DomegenError as err:  # e.g. from Site or the engines: give it the scene's location
        m = marks.get(err.field or "") or tree.mark
        raise SceneError(err.message, field=err.field, value=err.value, hint=err.hint,
                         file=m.file, line=m.line, column=m.column) from None


def _ctx(marks: dict, path: str) -> Ctx:
    """A context for ``path``, located at it or at its nearest located parent."""
    probe = path
    while probe and marks.get(probe) is None:
        if probe.endswith("]"):
            probe = probe[:probe.rindex("[")]
        else:
            probe = probe.rsplit(".", 1)[0] if "." in probe else ""
    return Ctx(path, marks.get(probe))


def _site(data: dict, marks: dict) -> tuple[Site, str | None]:
    v = data["venue"]
    lat, lon, elev, tz, name = v["latitude"], v["longitude"], v["elevation"], v["time_zone"], v["name"]
    if v["place"] is not None:
        from domegen.places import find_place

        try:
            p = find_place(v["place"])
        except DomegenError as err:
            raise _ctx(marks, "venue.place").error(err.message, value=v["place"], hint=err.hint) from None
        lat = p.lat_deg if lat is None else lat
        lon = p.lon_deg if lon is None else lon
        elev = p.elev_m if elev is None else elev
        tz = p.timezone if tz is None else tz
        name = name or p.name
    if lat is None or lon is None:
        raise _ctx(marks, "venue").error("the venue needs a latitude and a longitude, or a place",
                                         hint="for example  venue: {latitude: 47.2184, longitude: -1.5536}")
    if tz is None:
        from domegen.places import timezone_at

        tz = timezone_at(lat, lon)
    try:
        site = Site(lat, lon, elev or 0.0, v["temperature"], v["pressure"], tz, name=name)
    except DomegenError as err:
        raise _ctx(marks, "venue.time_zone" if err.field == "timezone" else "venue").error(
            err.message, value=err.value, hint=err.hint) from None
    return site, name


def _build(path: Path, data: dict, marks: dict, files: tuple) -> Scene:
    site, venue_name = _site(data, marks)
    base_dir = path.resolve().parent
    out = data["output"]
    try:
        out["file_pattern"].format(frame=0)
    except (ValueError, KeyError, IndexError) as err:
        raise _ctx(marks, "output.file_pattern").error(f"cannot use this pattern: {err}",
                                                       value=out["file_pattern"]) from None
    output = OutputSettings(root=(base_dir / out["folder"]).resolve(), pattern=out["file_pattern"],
                            format=out["format"], bit_depth=int(out["bit_depth"]), fps=float(out["frame_rate"]))
    if output.format == "jpeg" and output.bit_depth != 8:
        raise _ctx(marks, "output.bit_depth").error("JPEG frames are 8 bits per channel",
                                                    value=output.bit_depth, hint="use png for 16 bits")
    ecl = data["eclipse"]
    resolver = EventResolver(site, (ecl["kind"], parse_day(ecl["date"])) if ecl else None)
    if ecl:
        check_range(unix_seconds(_midday(parse_day(ecl["date"]))), field="eclipse.date")
    layer_base = dict(LAYER_DEFAULTS)
    layer_base.update({k: v for k, v in data["layers"].items() if v is not None})
    shots, first, prev_end = [], 0, None
    for i, s in enumerate(data["shots"]):
        p = f"shots[{i}]"
        shot = _shot(i, s, p, marks, data, resolver, first, prev_end, output.fps, layer_base)
        shots.append(shot)
        first += shot.frame_count
        prev_end = shot.sky_end_s
    if first > MAX_FRAMES:
        raise _ctx(marks, "shots").error(f"{first} frames is more than {MAX_FRAMES}")
    events = tuple(sorted(resolver.resolved.values(), key=lambda e: e.utc))
    return Scene(path=path.resolve(), title=data["title"], venue_name=venue_name, site=site,
                 dome=dict(data["dome"]), output=output, layer_base=layer_base, shots=tuple(shots),
                 events=events, files=files, base_dir=base_dir)


def _midday(d):
    from datetime import datetime, timezone

    return datetime(d.year, d.month, d.day, 12, tzinfo=timezone.utc)


def _shot(i, s, p, marks, data, resolver, first, prev_end, fps, layer_base) -> Shot:
    name = s["name"] or f"shot {i + 1}"
    dur = parse_duration(s["duration"])
    if dur <= 0:
        raise _ctx(marks, f"{p}.duration").error(f"a shot must last longer than 0 s, not {dur:g} s",
                                                 value=s["duration"])
    nf = int(round(dur * fps))
    if nf < 1:
        raise _ctx(marks, f"{p}.duration").error(f"{dur:g} s is shorter than one frame at {fps:g} fps",
                                                 value=s["duration"])
    sky = s["sky"]
    day = parse_day(sky["date"] or data["date"])

    def instant(key):
        text = sky[key]
        if text is None:
            return None
        ctx = _ctx(marks, f"{p}.sky.{key}")
        expr = parse_instant_expr(text)
        if expr.base == "continue":
            if key != "start":
                raise ctx.error("'continue' only makes sense for a shot's start")
            if prev_end is None:
                raise ctx.error("the first shot cannot continue from a previous one",
                                hint="give a time or an event such as 'sunset'")
            return prev_end + expr.offset_s
        return unix_seconds(resolver.resolve(expr, day=day, ctx=ctx))

    start, end = instant("start"), instant("end")
    rate = parse_rate(sky["rate"]) if sky["rate"] is not None else None
    if start is None and end is None:
        if prev_end is None:
            raise _ctx(marks, f"{p}.sky").error("the first shot needs a sky start (or end)",
                                                hint="for example  sky: {start: sunset, rate: 1 s = 1 min}")
        start = prev_end
    if start is None:
        start = end - (rate if rate is not None else 1.0) * dur
    if end is None:
        end = start + (rate if rate is not None else 1.0) * dur
    for key, value in (("start", start), ("end", end)):
        try:
            check_range(value, field=f"{p}.sky.{key}")
        except DomegenError as err:
            raise _ctx(marks, f"{p}.sky").error(err.message, value=err.value) from None
    return Shot(index=i, name=name, duration_s=dur, first_frame=first, frame_count=nf,
                sky_start_s=float(start), sky_end_s=float(end), sky_easing=sky["easing"],
                camera=_camera_tracks(s["camera"], p, marks, dur, data["dome"]),
                layers=_layer_tracks(s["layers"], p, marks, dur, layer_base))


def _key_time(k, path, marks, dur) -> float:
    t = parse_at(k["at"]).seconds(dur)
    if t < -1e-9 or t > dur + 1e-9:
        raise _ctx(marks, f"{path}.at").error(f"{t:g} s is outside the shot (0 to {dur:g} s)", value=k["at"])
    return min(max(t, 0.0), dur)


def _camera_tracks(keys: list, p: str, marks: dict, dur: float, dome: dict) -> dict:
    chans: dict = {}
    for j, k in enumerate(keys):
        t = _key_time(k, f"{p}.camera[{j}]", marks, dur)
        for name in ("front_azimuth", "tilt", "field", "roll"):
            if k[name] is not None:
                chans.setdefault(name, []).append(Key(t, k[name], k["easing"]))
        if k["look_at"] is not None:
            chans.setdefault("look", []).append(Key(t, ("body", k["look_at"]), k["easing"]))
        elif k["look_azimuth"] is not None or k["look_altitude"] is not None:
            chans.setdefault("look", []).append(Key(t, ("dir", k["look_azimuth"], k["look_altitude"]),
                                                    k["easing"]))
    base = {"front_azimuth": dome["front_azimuth"], "tilt": dome["tilt"], "field": dome["field"], "roll": 0.0,
            "look": ("dir", None, None)}
    return _tracks(chans, base)


def _tracks(chans: dict, base: dict) -> dict:
    """Sorted tracks; a channel whose first key comes after the start moves there from its base value."""
    out = {}
    for name, keys in chans.items():
        keys = sorted(keys, key=lambda key: key.t_s)
        if keys[0].t_s > 0 and base.get(name) is not None:
            keys.insert(0, Key(0.0, base[name], keys[0].easing))
        out[name] = Track(tuple(keys))
    return out


def _layer_tracks(layers, p: str, marks: dict, dur: float, base: dict) -> dict:
    if layers is None:
        return {}
    if isinstance(layers, dict):
        layers = [dict(layers, at=0.0, easing="hold")]
        p_keys = [f"{p}.layers"]
    else:
        p_keys = [f"{p}.layers[{j}]" for j in range(len(layers))]
    chans: dict = {}
    for k, kp in zip(layers, p_keys):
        t = _key_time(k, kp, marks, dur)
        for name in LAYER_FIELDS:
            if k.get(name) is not None:
                chans.setdefault(name, []).append(Key(t, k[name], k["easing"]))
    return _tracks(chans, dict(base, exposure=base.get("exposure") or "auto"))


__all__ = ["load_scene", "read_tree"]
