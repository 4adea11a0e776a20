"""Timings of the map renderer, measured side by side in one run (no assertions).

    /work/venv/bin/python benchmarks/bench_maps.py

Budget from the issue: a 4096 px world map and one 2048 px globe frame, each under 2 s.
"""

from __future__ import annotations

import datetime as dt
import tempfile
import time
from pathlib import Path

BUDGET_S = 2.0


def _t(label, fn, *args, **kw):
    t0, c0 = time.perf_counter(), time.process_time()
    out = fn(*args, **kw)
    s, c = time.perf_counter() - t0, time.process_time() - c0
    print(f"{label:<50s} wall {s:7.3f} s  cpu {c:7.3f} s  ({s / BUDGET_S:5.2f} x budget)")
    return out, s


def main() -> None:
    import os

    print(f"load average {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores (wall times grow with load)")
    from domegen.eclipse import solar_eclipse_on
    from domegen.maps import landmask
    from domegen.maps.render import GlobeTrack, _track_canvas, eclipse_path, render_world_map

    _t("land mask grid (cache load or first build)", landmask.land_grid)
    e, _ = _t("eclipse 2026-08-12 (engine search)", solar_eclipse_on, dt.date(2026, 8, 12))
    _t("path (engine compute_path, 60 s step)", eclipse_path, e)
    canvas, s_map = _t("world map 4096 x 2048, complete (render)", render_world_map, e, 4096)
    img, s_enc = _t("  -> RGBA uint8 + labels (to_image)", canvas.to_image)
    with tempfile.TemporaryDirectory() as d:
        _t("  -> PNG encode + atomic write", canvas.save_png, Path(d) / "m.png")
    ov, s_ov = _t("world map 4096 x 2048, overlay only (render)", render_world_map, e, 4096,
                  overlay_only=True)
    track = GlobeTrack("2026-08-12", frame_count=60, size_px=2048)
    c1, s_g1 = _t("globe frame 2048, first (cold grid caches)", _track_canvas, track, 30)
    c2, s_g2 = _t("globe frame 2048, next frame (warm caches)", _track_canvas, track, 31)
    _t("  -> RGBA uint8 + labels (to_image)", c2.to_image)
    print(f"summary: map {s_map + s_enc:.2f} s (render + to_image), globe frame cold {s_g1:.2f} s, "
          f"warm {s_g2:.2f} s; budget {BUDGET_S:.1f} s each")


if __name__ == "__main__":
    main()
