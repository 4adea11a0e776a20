"""Farm throughput at 4K: frames per hour with 1 and 2 local workers, and the overhead share.

    python benchmarks/bench_farm.py [--frames 6] [--size 4096] [--sheet-only]

Renders the first N frames of scenes/benchmark.yaml into a temporary folder,
once with 1 worker (in this process) and once with 2 spawned worker
processes, side by side in one run. "Overhead" is the share of worker time
not spent producing the frame's bytes (render + encode): scheduling,
spec planning, hashing, writing, process start-up and per-process set-up.
Then: time from a save to an updated contact sheet (12 thumbnails, 256 px)
for the solar eclipse scene, cold and after an edit that changes one shot.
"""

from __future__ import annotations

import argparse
import io
import os
import sys
import tempfile
import time
from dataclasses import replace
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from domegen.farm.plan import build_jobs  # noqa: E402
from domegen.farm.runner import render_scene  # noqa: E402
from domegen.farm.worker import run_job  # noqa: E402
from domegen.scene import load_scene  # noqa: E402


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--frames", type=int, default=24)
    ap.add_argument("--size", type=int, default=4096)
    ap.add_argument("--sheet-only", action="store_true")
    args = ap.parse_args()
    if not args.sheet_only:
        farm(args)
    sheet()


def sheet() -> None:
    from domegen.farm.sheet import ThumbnailCache, sheet_frames, write_sheet

    src = (ROOT / "scenes" / "solar-eclipse-2026-burgos.yaml").read_text()
    with tempfile.TemporaryDirectory() as tmp:
        for name in ("solar-eclipse-2026-burgos.yaml", "loire-dome.theatre.yaml"):
            (Path(tmp) / name).write_text((ROOT / "scenes" / name).read_text())
        path = Path(tmp) / "solar-eclipse-2026-burgos.yaml"
        cache = ThumbnailCache()
        rows = []
        for label, text in (("first save (cold)", src), ("no change", src),
                            ("edit the last shot's rate", src.replace("rate: 1 s = 2 min", "rate: 1 s = 3 min"))):
            path.write_text(text)
            t0 = time.perf_counter()
            before = cache.rendered
            scene = load_scene(path)
            write_sheet(scene, Path(tmp) / "sheet.png", every=250, size_px=256, cache=cache)
            rows.append((label, time.perf_counter() - t0, cache.rendered - before))
        n = len(sheet_frames(scene, 250))
    print(f"contact sheet, solar eclipse scene, {n} thumbnails at 256 px (target < 5 s per save):")
    for label, dt, k in rows:
        print(f"  {label:<28} {dt:6.1f} s  ({k} thumbnails rendered)")


def farm(args) -> None:
    scene = load_scene(ROOT / "scenes" / "benchmark.yaml")
    scene = replace(scene, dome=dict(scene.dome, size=args.size))
    frames = list(range(min(args.frames, scene.frame_count)))
    with tempfile.TemporaryDirectory() as tmp:
        # warm the on-disk caches (star catalogue) so that neither run pays their one-off build
        warm = build_jobs(scene, [0], scale=64 / args.size)[0]
        run_job(replace(warm, path=str(Path(tmp) / "warm.png")))
        t0 = time.perf_counter()
        planned = build_jobs(scene, frames)
        plan_s = (time.perf_counter() - t0) / len(frames)
        rows = []
        for workers in (1, 2):
            t0 = time.perf_counter()
            rep = render_scene(scene, frames=frames, workers=workers, out=Path(tmp) / f"w{workers}",
                               stream=io.StringIO())
            wall = time.perf_counter() - t0
            used = rep.workers
            busy = wall * used
            cpu = sum(r.cpu_s for r in rep.results) / max(rep.rendered, 1)
            rows.append((workers, rep.rendered, wall, 3600.0 * rep.rendered / wall, rep.render_s,
                         1.0 - rep.render_s / busy, (rep.worker_s - rep.render_s) / max(rep.rendered, 1), cpu))
    print(f"farm benchmark: {len(frames)} frames of scenes/benchmark.yaml at {args.size} px, PNG 8-bit")
    print(f"planning (frame spec + parameter hash) per frame: {plan_s * 1000:.2f} ms")
    print(f"{'workers':>7} {'frames':>6} {'wall s':>8} {'frames/h':>9} {'produce s':>10} {'overhead':>9} "
          f"{'write+hash/frame s':>19} {'cpu s/frame':>12}")
    for w, n, wall, fph, prod, over, io_s, cpu in rows:
        print(f"{w:>7} {n:>6} {wall:>8.1f} {fph:>9.0f} {prod:>10.1f} {over:>8.1%} {io_s:>19.3f} {cpu:>12.2f}")
    print(f"scaling 2 workers / 1 worker: {rows[1][3] / rows[0][3]:.2f}x (target >= 1.8 on 2 idle cores)")
    print(f"CPU-bound ceiling on 2 idle cores: {2 * 3600 / rows[1][7]:.0f} frames/h "
          f"(1 core: {3600 / rows[0][7]:.0f}); load average now {os.getloadavg()[0]:.1f} "
          f"(other processes share these cores)")


if __name__ == "__main__":
    main()
