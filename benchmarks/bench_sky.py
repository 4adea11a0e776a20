"""Sky engine speed: all 10 bodies for 54,000 instants, next to skyfield's direct path.

Run: python benchmarks/bench_sky.py   (prints seconds and the ratio, measured in one run)
"""

from __future__ import annotations

import time

import numpy as np

from domegen.sky.bodies import body_positions
from domegen.sky.ephemeris import BODY_NAMES, body
from domegen.sky.frames import utc_time
from domegen.sky.site import Site

N = 54_000


def main() -> None:
    site = Site(47.2184, -1.5536, 20.0)
    utc = 1.7e9 + np.arange(N) * 2.0  # 30 h of sky at 2 s per frame
    body_positions(site, utc[:10])  # load ephemeris, imports

    t0 = time.perf_counter()
    tab = body_positions(site, utc)
    ours = time.perf_counter() - t0

    t0 = time.perf_counter()
    t = utc_time(utc)
    at = site.observer().at(t)
    for name in ("Sun", "Moon", "Mars"):
        at.observe(body(name)).apparent().altaz()
    direct3 = time.perf_counter() - t0

    print(f"domegen body_positions, {len(BODY_NAMES)} bodies x {N} instants: {ours:.2f} s (target < 3 s)")
    print(f"skyfield direct path, 3 bodies x {N} instants:             {direct3:.2f} s")
    print(f"per-body ratio (skyfield direct / domegen): {direct3 / 3 / (ours / len(BODY_NAMES)):.1f}x")
    assert tab.alt_deg.shape == (len(BODY_NAMES), N)


if __name__ == "__main__":
    main()
