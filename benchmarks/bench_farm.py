"""Farm throughput at 4K: frames per hour with 1 and 2 local workers, and the overhead share.

    python benchmarks/bench_farm.py [--frames 6] [--size 4096]

Renders the first N frames of scenes/benchmark.yaml into a temporary folder,
once with 1 worker (in this process) and once with 2 spawned worker
processes, side by side in one run. "Overhead" is the share of worker time
not spent producing the frame's bytes (render + encode): scheduling,
spec planning, hashing, writing, process start-up and per-process set-up.
"""

from __future__ import annotations

import argparse
import io
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
    ap.add_argument("--frames", type=int, default=6)
    ap.add_argument("--size", type=int, default=4096)
    args = ap.parse_args()
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
            rows.append((workers, rep.rendered, wall, 3600.0 * rep.rendered / wall, rep.render_s,
                         1.0 - rep.render_s / busy, (rep.worker_s - rep.render_s) / max(rep.rendered, 1)))
    print(f"farm benchmark: {len(frames)} frames of scenes/benchmark.yaml at {args.size} px, PNG 8-bit")
    print(f"planning (frame spec + parameter hash) per frame: {plan_s * 1000:.2f} ms")
    print(f"{'workers':>7} {'frames':>6} {'wall s':>8} {'frames/h':>9} {'produce s':>10} {'overhead':>9} "
          f"{'write+hash/frame s':>19}")
    for w, n, wall, fph, prod, over, io_s in rows:
        print(f"{w:>7} {n:>6} {wall:>8.1f} {fph:>9.0f} {prod:>10.1f} {over:>8.1%} {io_s:>19.3f}")
    print(f"scaling 2 workers / 1 worker: {rows[1][3] / rows[0][3]:.2f}x (target >= 1.8 on 2 idle cores)")


if __name__ == "__main__":
    main()
