"""Render a scene's frames: here, in local worker processes, or on a Dask cluster.

The coordinating process plans the jobs, skips frames the manifest shows
complete and intact, and is the only writer of the manifest: workers return
:class:`FrameResult` items and the coordinator appends them as they arrive.
Frames land under a temporary name and are renamed, so a kill at any moment
leaves whole frames only; the next run redoes whatever is missing or stale.
"""

from __future__ import annotations

import multiprocessing
import os
import time
from dataclasses import dataclass, field, replace
from pathlib import Path

from domegen.errors import InputError
from domegen.farm.manifest import FrameRecord, Manifest
from domegen.farm.plan import (build_jobs, check_disk, check_output_root, estimate_bytes, parse_frames,
                               split_done)
from domegen.farm.progress import Progress
from domegen.farm.worker import DEFAULT_PRODUCER, ignore_sigint, run_chunk, run_job

#: Temporary files older than this (s) are leftovers of killed runs and are removed.
STALE_TMP_S = 3600.0
#: After this many frames the disk estimate is redone from their real sizes.
_RECHECK_AFTER = 4


@dataclass
class RenderReport:
    """What a run did. ``render_s``: summed time inside the producer over rendered frames."""

    frames: list
    rendered: int = 0
    skipped: int = 0
    interrupted: bool = False
    wall_s: float = 0.0
    render_s: float = 0.0
    worker_s: float = 0.0
    workers: int = 1
    estimate_bytes: int = 0
    results: list = field(default_factory=list)


def with_output_root(scene, folder) -> object:
    """The scene writing into ``folder`` instead of its own output folder."""
    return replace(scene, output=replace(scene.output, root=Path(folder).resolve()))


def default_workers() -> int:
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # pragma: no cover - not Linux
        return max(1, os.cpu_count() or 1)


def _clean_tmp(root: Path) -> None:
    now = time.time()
    for p in root.rglob(".*.tmp"):
        try:
            if now - p.stat().st_mtime > STALE_TMP_S:
                p.unlink()
        except OSError:
            pass


def render_scene(scene, *, frames=None, workers: int | None = None, scale: float = 1.0, out=None,
                 scheduler: str | None = None, client=None, allow_outside: bool = False,
                 skip_space_check: bool = False, verify: bool = True, producer: str = DEFAULT_PRODUCER,
                 stream=None, progress_every_s: float = 10.0, tty: bool | None = None) -> RenderReport:
    """Render (or finish rendering) ``scene``; see the module docstring.

    ``frames``: "A-B" text, a list of numbers, or None for all. ``workers``:
    local processes (default: all cores; 1 renders in this process).
    ``scheduler``/``client``: a Dask scheduler address or an open Client.
    """
    if out is not None:
        scene = with_output_root(scene, out)
    check_output_root(scene, trusted_root=out is not None, allow_outside=allow_outside)
    numbers = frames if isinstance(frames, list) else parse_frames(frames, scene.frame_count)
    root = scene.output.root
    manifest = Manifest(root).load()
    unknown = [n for n in numbers if n not in manifest.records]
    if unknown and not skip_space_check:  # quick refusal before planning every frame
        probe = build_jobs(scene, unknown[:1], scale=scale, allow_outside=allow_outside, producer=producer)
        check_disk(root, estimate_bytes(probe, manifest) * len(unknown))
    jobs = build_jobs(scene, numbers, scale=scale, allow_outside=allow_outside, producer=producer)
    root.mkdir(parents=True, exist_ok=True)
    _clean_tmp(root)
    todo, skipped = split_done(jobs, manifest, verify=verify)
    report = RenderReport(frames=numbers, skipped=skipped)
    report.estimate_bytes = estimate_bytes(todo, manifest)
    if not skip_space_check:
        check_disk(root, report.estimate_bytes)
    progress = Progress(len(todo), skipped=skipped, stream=stream, every_s=progress_every_s, tty=tty)
    progress.start()
    t0 = time.perf_counter()
    if scheduler is not None or client is not None:
        results = _dask(todo, scheduler, client, report)
    else:
        n = workers or default_workers()
        report.workers = max(1, min(n, len(todo)))
        results = _inline(todo) if report.workers == 1 else _pool(todo, report.workers)
    try:
        for res in results:
            manifest.append(FrameRecord(res.frame, res.file, res.params, res.sha256, res.bytes))
            report.rendered += 1
            report.render_s += res.render_s
            report.worker_s += res.total_s
            report.results.append(res)
            progress.advance()
            if report.rendered == _RECHECK_AFTER and not skip_space_check:
                # the first frames' real sizes replace the pixel-count guess
                left = [j for j in todo if j.frame not in manifest.records]
                check_disk(root, estimate_bytes(left, manifest))
    except KeyboardInterrupt:
        report.interrupted = True
    finally:
        results.close()  # stops workers still busy (their frames are simply not recorded)
        report.wall_s = time.perf_counter() - t0
        if report.interrupted or frames is not None:
            manifest.close()  # range jobs may share the folder: only a full run rewrites the manifest
        else:
            manifest.compact()
    done = f"{report.rendered} frames rendered, {report.skipped} already complete"
    progress.finish(("interrupted: " if report.interrupted else "") + done)
    return report


def _inline(jobs):
    for j in jobs:
        yield run_job(j)


#: One math-library thread per worker process: the processes already fill the cores.
_THREAD_VARS = ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS")


def _pool(jobs, workers: int):
    ctx = multiprocessing.get_context("spawn")
    saved = {k: os.environ.get(k) for k in _THREAD_VARS}
    os.environ.update({k: "1" for k in _THREAD_VARS})
    try:
        pool = ctx.Pool(workers, initializer=ignore_sigint)  # children copy the environment now
    finally:
        for k, v in saved.items():
            if v is None:
                os.environ.pop(k, None)
            else:
                os.environ[k] = v
    try:
        yield from pool.imap_unordered(run_job, jobs, chunksize=1)
        pool.close()
    finally:
        pool.terminate()
        pool.join()


def _dask(jobs, scheduler, client, report):
    try:
        from distributed import Client, as_completed
    except ImportError:  # pragma: no cover - dask is an optional extra
        raise InputError("--scheduler needs dask.distributed", field="--scheduler",
                         hint="pip install 'dask[distributed]'") from None
    own = client is None
    if own:
        try:
            client = Client(scheduler, timeout="30s")
        except (OSError, TimeoutError) as err:
            raise InputError(f"cannot reach the Dask scheduler at {scheduler}: {err}", field="--scheduler",
                             value=scheduler, hint="start it with 'dask scheduler' and give tcp://HOST:PORT") \
                from None
    return _dask_results(jobs, client, own, report, as_completed)


def _dask_results(jobs, client, own, report, as_completed):
    futures = []
    try:
        n = max(1, len(client.scheduler_info().get("workers", {})))
        report.workers = n
        chunk = max(1, min(16, len(jobs) // (4 * n)))
        futures = [client.submit(run_chunk, jobs[i:i + chunk], pure=False)
                   for i in range(0, len(jobs), chunk)]
        for fut in as_completed(futures):
            yield from fut.result()
    finally:
        if futures:
            client.cancel(futures)
        if own:
            client.close()
