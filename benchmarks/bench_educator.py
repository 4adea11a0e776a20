"""Educator timings: place lookup, one year of sky events, and the pairing search side by side.

Run: python benchmarks/bench_educator.py   (prints timings and ratios; asserts nothing)
"""

from __future__ import annotations

import itertools
import os
import tempfile
import time
from datetime import datetime, timezone

import numpy as np


def _t(f, n=1):
    t = time.perf_counter()
    for _ in range(n):
        out = f()
    return (time.perf_counter() - t) / n, out


def main() -> None:
    os.environ["DOMEGEN_CACHE_DIR"] = tempfile.mkdtemp(prefix="domegen-bench-")
    from domegen.places import _index, find_place

    cold, _ = _t(lambda: find_place("Nantes"))
    _index._index.cache_clear()
    warm_load, _ = _t(lambda: find_place("Nantes"))
    lookup, _ = _t(lambda: find_place("Springfield, IL"), n=200)
    print(f"find_place: first build {cold:.2f} s, load from cache {warm_load:.3f} s, "
          f"lookup {lookup * 1e6:.0f} us")

    from domegen.sky.events import PAIR_BODIES, find_pairings, sky_events
    from domegen.sky.site import Site
    from domegen.sky.times import to_time, unix_seconds

    site = Site(47.2184, -1.5536, 20.0, timezone="Europe/Paris", name="Nantes")
    t0, t1 = datetime(2025, 1, 1, tzinfo=timezone.utc), datetime(2026, 1, 1, tzinfo=timezone.utc)
    year, ev = _t(lambda: sky_events(site, t0, t1))
    print(f"sky_events, one year at Nantes: {year:.2f} s, {len(ev)} events")

    s0, s1 = unix_seconds(t0), unix_seconds(t1)
    ours, found = _t(lambda: find_pairings(s0, s1, max_separation_deg=3.0))
    # the same question asked pair by pair with skyfield's own find_minima (2-hour sampling)
    from skyfield.searchlib import find_minima

    from domegen.sky.ephemeris import body, earth

    def per_pair():
        out = []
        e = earth()
        for a, b in itertools.combinations(PAIR_BODIES, 2):
            ba, bb = body(a), body(b)

            def sep(t, ba=ba, bb=bb):
                o = e.at(t)
                return o.observe(ba).apparent().separation_from(o.observe(bb).apparent()).degrees
            sep.step_days = 1.0 / 12
            t, v = find_minima(to_time(s0), to_time(s1), sep)
            out += [(a, b, float(x)) for x in np.atleast_1d(v) if x < 3.0]
        return out

    naive, ref = _t(per_pair)
    print(f"pairings < 3 deg in 2025: vectorised {ours:.2f} s ({len(found)} found), "
          f"per-pair skyfield find_minima {naive:.2f} s ({len(ref)} found), "
          f"ratio {naive / ours:.1f}x")


if __name__ == "__main__":
    main()
