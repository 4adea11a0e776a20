"""One self-contained HTML preview page for an eclipse at a venue.

The page embeds everything as data URIs (dome frames at the key moments, the
track map) and inline CSS; it has no scripts and loads nothing from outside,
so it opens offline from a file or a USB stick.
"""

from __future__ import annotations

import base64
import html
import io
from dataclasses import dataclass
from datetime import datetime

from domegen.educator.cuesheet import SkyObject, compass, cue_rows, sky_at_maximum
from domegen.educator.eclipses import LocalEclipse
from domegen.sky.times import iso_utc, zone

#: Key moments shown as dome frames, in this order, where they occur.
SOLAR_MOMENTS = ("C1", "C2", "max", "C3", "C4")
LUNAR_MOMENTS = ("U1", "U2", "max", "U3", "U4")
PAGE_NAME = "index.html"


@dataclass(frozen=True)
class Figure:
    key: str
    caption: str
    data_uri: str


def data_uri(data: bytes, mime: str) -> str:
    return f"data:{mime};base64," + base64.b64encode(data).decode("ascii")


#: Field of the close-up views, deg; exposure of the partial-phase close-ups (as through a
#: solar filter: the bright disc becomes a mid-tone), EV.
CLOSEUP_FIELD_DEG = 2.0
FILTERED_EV = -14.0


def dome_jpeg(site, utc: datetime, camera, *, labels: bool, exposure_ev: float | None = None,
              overlays: bool = True) -> bytes:
    """One rendered frame as JPEG bytes (cardinal points and horizon drawn when ``overlays``)."""
    from domegen.render.frame import render_frame
    from domegen.render.output import encode_frame
    from domegen.render.spec import FrameSpec, LayerSpec

    layers = LayerSpec(labels=0.8 if labels else 0.0, cardinals=0.8 if overlays else 0.0,
                       horizon_line=0.4 if overlays else 0.0, exposure_ev=exposure_ev)
    return encode_frame(render_frame(FrameSpec(site, utc, camera, layers)), "jpeg")


def closeups(ecl: LocalEclipse, *, size_px: int = 160) -> list[Figure]:
    """The Sun (or Moon) seen close up at each key moment, 2 deg across.

    Partial phases of a solar eclipse are exposed as through a solar filter
    (:data:`FILTERED_EV`); totality and lunar eclipses use automatic exposure.
    """
    from domegen.render.spec import CameraSpec

    keys = SOLAR_MOMENTS if ecl.kind == "solar" else LUNAR_MOMENTS
    total = {"C2", "C3"} | ({"max"} if ecl.local_type == "total" else set())
    out = []
    for key in keys:
        c = ecl.contact(key)
        if c is None or c.alt_deg < -1.0:
            continue
        cam = CameraSpec(size_px=int(size_px), field_deg=CLOSEUP_FIELD_DEG, view_az_deg=c.az_deg,
                         view_alt_deg=c.alt_deg)
        filtered = ecl.kind == "solar" and key not in total
        jpg = dome_jpeg(ecl.site, c.utc, cam, labels=False, overlays=False,
                        exposure_ev=FILTERED_EV if filtered else None)
        note = " (as through a solar filter)" if filtered else ""
        out.append(Figure(f"close-{key}", f"{key}: the {ecl.body} close up{note}",
                          data_uri(jpg, "image/jpeg")))
    return out


def dome_frames(ecl: LocalEclipse, *, size_px: int = 480, labels: bool = True) -> list[Figure]:
    """Rendered dome masters (JPEG data URIs) at the eclipse's key moments.

    The dome's front (bottom of the frame) faces the eclipsed body's azimuth at maximum.
    """
    from domegen.render.spec import CameraSpec

    keys = SOLAR_MOMENTS if ecl.kind == "solar" else LUNAR_MOMENTS
    mx = ecl.contact("max")
    camera = CameraSpec(size_px=int(size_px), front_az_deg=round(mx.az_deg, 1))
    # star names only where stars can show: totality, or the Sun below -6 deg (twilight's end)
    from domegen.educator.eclipses import _altaz

    dark = {"C2", "C3"} | ({"max"} if ecl.local_type == "total" else set())
    present = [c for c in ecl.contacts if c.key in keys]
    sun_alt, _ = _altaz(ecl.site, "Sun", [c.utc for c in present])
    dark |= {c.key for c, a in zip(present, sun_alt) if a < -6.0}
    tz = ecl.site.timezone
    out = []
    for key in keys:
        c = ecl.contact(key)
        if c is None:
            continue
        jpg = dome_jpeg(ecl.site, c.utc, camera, labels=labels and key in dark)
        loc = c.utc.astimezone(zone(tz))
        where = (f"{ecl.body} {c.alt_deg:+.1f}\u00b0 alt, {c.az_deg:.0f}\u00b0 {compass(c.az_deg)}")
        if c.alt_deg <= 0:
            where += " (below the horizon)"
        cap = f"{key} \u2014 {loc.strftime('%H:%M:%S')} {loc.tzname()} \u2014 {where}"
        out.append(Figure(key, cap, data_uri(jpg, "image/jpeg")))
    return out


def track_map(ecl: LocalEclipse, *, width_px: int = 960) -> Figure | None:
    """The eclipse's track on a world map with the venue marked (solar eclipses only)."""
    if ecl.kind != "solar":
        return None
    from domegen.maps import MapSite, render_world_map

    eclipse = ecl.source
    name = ecl.site.name or "venue"
    canvas = render_world_map(eclipse, int(width_px),
                              sites=[MapSite(name, ecl.site.lat_deg, ecl.site.lon_deg)])
    buf = io.BytesIO()
    canvas.to_image().save(buf, format="PNG", optimize=True)
    return Figure("map", f"Track of the {ecl.global_type} solar eclipse of "
                         f"{ecl.greatest_utc.date().isoformat()}, with {name} marked",
                  data_uri(buf.getvalue(), "image/png"))


_CSS = """
body{font-family:system-ui,-apple-system,'Segoe UI',sans-serif;margin:0;background:#0b0f1a;color:#e8ecf4}
main{max-width:1100px;margin:0 auto;padding:24px}
h1{font-size:1.6em;margin:0 0 .2em} h2{font-size:1.2em;margin:1.6em 0 .5em;color:#9fc3ff}
.facts{color:#b8c2d6;margin:0;padding-left:1.2em}
.domes{display:flex;flex-wrap:wrap;gap:14px}
figure{margin:0;background:#121a2b;border-radius:8px;padding:8px;width:min(100%,320px)}
figure img{width:100%;height:auto;display:block;border-radius:50%;background:#000}
.close figure{width:min(100%,180px)}
figure.map{width:100%} figure.map img{border-radius:4px}
figcaption{font-size:.82em;color:#c9d3e6;margin-top:6px}
table{border-collapse:collapse;width:100%;font-size:.9em}
th,td{border-bottom:1px solid #273352;padding:5px 8px;text-align:left}
th{color:#9fc3ff;font-weight:600} td.num{text-align:right;font-variant-numeric:tabular-nums}
.caution{background:#3a1010;border:2px solid #ff6b57;border-radius:8px;padding:12px 16px;margin-top:2em}
.caution strong{color:#ffb0a3} footer{color:#7d89a3;font-size:.8em;margin-top:2em}
"""


def _e(text) -> str:
    return html.escape(str(text), quote=True)


def _figure(fig: Figure, cls: str = "") -> str:
    c = f' class="{cls}"' if cls else ""
    return (f'<figure{c} id="fig-{_e(fig.key)}"><img src="{fig.data_uri}" alt="{_e(fig.caption)}">'
            f"<figcaption>{_e(fig.caption)}</figcaption></figure>")


def page_html(ecl: LocalEclipse, figures: list[Figure], map_fig: Figure | None,
              sky: list[SkyObject], *, close: list[Figure] = (),
              generated_utc: datetime | None = None) -> str:
    """The page as one HTML string (UTF-8, no external references)."""
    from domegen.eclipse.safety import CAUTION

    tz = ecl.site.timezone
    mx = ecl.contact("max")
    s = ecl.site
    venue = s.name or "venue"
    pos = (f"{abs(s.lat_deg):.4f}\u00b0 {'N' if s.lat_deg >= 0 else 'S'}, "
           f"{abs(s.lon_deg):.4f}\u00b0 {'E' if s.lon_deg >= 0 else 'W'}")
    facts = [f"Venue: {venue} ({pos}), times in {tz}",
             f"Seen here: {ecl.local_type}" + (f" (the eclipse is {ecl.global_type} elsewhere)"
                                              if ecl.local_type != ecl.global_type else "")]
    if ecl.magnitude is not None:
        facts.append(f"Magnitude {ecl.magnitude:.3f}" + (
            f", {100 * ecl.obscuration:.1f}% of the Sun covered" if ecl.obscuration is not None else ""))
    if ecl.duration_s:
        m, sec = divmod(int(round(ecl.duration_s)), 60)
        facts.append(f"Duration of {'annularity' if ecl.local_type == 'annular' else 'totality'}: "
                     f"{m} min {sec:02d} s")
    body = ecl.body
    rows = "".join(
        f"<tr><td>{_e(r['key'])}</td><td>{_e(r['local'])}</td><td>{_e(r['utc'][11:])}</td>"
        f"<td>{_e(r['offset'])}</td><td class=num>{r['alt_deg']:+.1f}\u00b0</td>"
        f"<td class=num>{r['az_deg']:.1f}\u00b0 {_e(r['direction'])}</td><td>{_e(r['what'])}</td></tr>"
        for r in cue_rows(ecl))
    seen = [o for o in sky if o.visible]
    sky_rows = "".join(
        f"<tr><td>{_e(o.name)}</td><td>{o.kind}</td><td class=num>{o.magnitude:+.1f}</td>"
        f"<td class=num>{o.alt_deg:.0f}\u00b0</td><td>{o.az_deg:.0f}\u00b0 {o.direction}</td></tr>"
        for o in seen)
    sky_html = (f"<table><tr><th>Object</th><th>Kind</th><th>Mag</th><th>Alt</th><th>Direction</th>"
                f"</tr>{sky_rows}</table>" if seen else
                "<p>No planet or bright star is expected to show at this moment.</p>")
    loc_max = mx.utc.astimezone(zone(tz))
    sections = [
        ("The dome at the key moments", '<div class="domes">' + "".join(_figure(f) for f in figures)
         + "</div>"),
    ]
    if close:
        sections.append((f"The {body} close up ({CLOSEUP_FIELD_DEG:.0f}\u00b0 field)",
                         '<div class="domes close">' + "".join(_figure(f) for f in close) + "</div>"))
    sections += [
        (f"Cues ({tz})",
         f"<table><tr><th>Cue</th><th>Local time</th><th>UTC</th><th>From start</th>"
         f"<th>{body} alt</th><th>{body} az</th><th>What happens</th></tr>{rows}</table>"),
        (f"Bright enough to point out at maximum ({loc_max.strftime('%H:%M')} {loc_max.tzname()})",
         sky_html),
    ]
    if map_fig is not None:
        sections.append(("Track map", _figure(map_fig, "map")))
    return page_shell(f"{ecl.title} \u2014 {venue}", ecl.title, facts, sections, tz=tz,
                      caution=CAUTION if ecl.kind == "solar" else None, generated_utc=generated_utc)


def page_shell(title: str, heading: str, facts: list[str], sections: list[tuple[str, str]], *,
               tz: str, caution: str | None = None, generated_utc: datetime | None = None) -> str:
    """The common page: heading, fact list, (heading, trusted HTML) sections, caution, footer."""
    parts = [
        "<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        "<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; "
        "img-src data:; style-src 'unsafe-inline'\">",
        f"<title>{_e(title)}</title><style>{_CSS}</style></head><body><main>",
        f"<h1>{_e(heading)}</h1>",
        "<ul class=facts>" + "".join(f"<li>{_e(f)}</li>" for f in facts) + "</ul>",
    ]
    for head, body_html in sections:
        parts += [f"<h2>{_e(head)}</h2>", body_html]
    if caution:
        parts.append(f'<div class="caution" id="caution"><strong>Eye safety.</strong> {_e(caution)}</div>')
    stamp = f" on {iso_utc(generated_utc)}" if generated_utc else ""
    parts += [f"<footer>Made with domegen{_e(stamp)}. Positions: JPL DE421; times UTC and "
              f"{_e(tz)}.</footer>", "</main></body></html>"]
    return "\n".join(parts) + "\n"


def build_preview(ecl: LocalEclipse, *, size_px: int = 480, map_width_px: int = 960,
                  generated_utc: datetime | None = None) -> str:
    """Render the frames and the map and return the page's HTML."""
    figures = dome_frames(ecl, size_px=size_px)
    close = closeups(ecl, size_px=max(96, size_px // 3))
    return page_html(ecl, figures, track_map(ecl, width_px=map_width_px),
                     sky_at_maximum(ecl), close=close, generated_utc=generated_utc)
