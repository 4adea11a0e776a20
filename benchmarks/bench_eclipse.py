"""Solar-eclipse engine timings: search 1900-2050, local circumstances for 10,000 sites, a full path.

Plain script (no assertions): ``/work/venv/bin/python benchmarks/bench_eclipse.py``.
Targets (issue 5): search < 20 s, 10,000 sites < 1 s, path at 1-minute steps < 2 s.
"""

from __future__ import annotations

import time
from datetime import datetime, timezone

import numpy as np


def _timed(label, fn, target_s):
    t = time.perf_counter()
    out = fn()
    dt = time.perf_counter() - t
    print(f"{label:<52} {dt:8.3f} s   target {target_s:5.1f} s   ratio {dt / target_s:5.2f}")
    return out


def main() -> None:
    from domegen.eclipse import compute_path, find_solar_eclipses, local_circumstances, solar_eclipse_on
    from domegen.eclipse.besselian import raw_elements

    _timed("load ephemeris (once per process)", lambda: raw_elements([2451545.0]), 5.0)
    found = _timed("search 1900-2050 (all solar eclipses)",
                   lambda: find_solar_eclipses(datetime(1900, 1, 1, tzinfo=timezone.utc),
                                               datetime(2050, 12, 31, tzinfo=timezone.utc)), 20.0)
    print(f"   {len(found)} eclipses")
    e = solar_eclipse_on("2024-04-08")
    rng = np.random.default_rng(0)
    lat = np.degrees(np.arcsin(rng.uniform(-1, 1, 10_000)))
    lon = rng.uniform(-180, 180, 10_000)
    _timed("local circumstances, 10,000 random sites (2024-04-08)", lambda: local_circumstances(e, (lat, lon)), 1.0)
    lat2 = rng.uniform(15, 50, 10_000)
    lon2 = rng.uniform(-110, -60, 10_000)
    _timed("local circumstances, 10,000 sites under the shadow", lambda: local_circumstances(e, (lat2, lon2)), 1.0)
    path = _timed("full path at 60 s steps (2024-04-08)", lambda: compute_path(e, step_s=60), 2.0)
    print(f"   {len(path.curves)} curve pieces, {sum(c.utc_s.size for c in path.curves)} points")
    _timed("full path at 60 s steps (2023-04-20, hybrid)", lambda: compute_path(solar_eclipse_on("2023-04-20")), 2.0)


if __name__ == "__main__":
    main()
