"""Benchmark: the event search for 10,000 periodic systems over 120 nights, and the timing of
mid-events against astropy's barycentric light travel time, in one process.

Epochpoint: find_events at the demo site (night boundaries and the Sun/Moon track of each
night, every (system, cycle) timed at the site, each event judged at 25 instants). Systems
are random over the sky with periods log-uniform in 0.5-10 d and durations 1-5 h (about the
range of known transiting planets and short-period eclipsing binaries; common practice).
astropy: the observed instants of 20,000 cycles by iterating Time.light_travel_time
(kind="barycentric", location=...) four times, compared per cycle with Epochpoint's
BarycentricClock doing the same. Best of 2 runs for the timing comparison; the whole search
runs once (it takes seconds).
Run: .venv/bin/python benchmarks/bench_events.py [N_SYSTEMS] [N_NIGHTS]
"""
from __future__ import annotations

import sys
import time
import warnings
from pathlib import Path

import numpy as np

import astropy.units as u
from astropy.coordinates import EarthLocation, SkyCoord
from astropy.time import Time

from epochpoint.core.event_search import find_events
from epochpoint.core.events import BarycentricClock, tt_days_of
from epochpoint.core.targets import Targets
from epochpoint.io import read_site
from epochpoint.io.eventfields import event_ephemerides

DEMO_SITE = Path(__file__).resolve().parents[1] / "sample_targets" / "loma_candil.toml"
FIRST_NIGHT = "2027-01-05"
TIMING_CYCLES = 5000


def random_systems(n: int, seed: int = 2027) -> Targets:
    rng = np.random.default_rng(seed)
    period = np.exp(rng.uniform(np.log(0.5), np.log(10.0), n))
    extra = {"event_epoch": np.char.mod("%.6f", 2461000.0 + rng.uniform(0.0, 10.0, n)),
             "event_period": np.char.mod("%.7f", period),
             "event_duration": np.char.mod("%.3f", rng.uniform(1.0, 5.0, n)),
             "event_epoch_error": np.full(n, "0.0005"),
             "event_period_error": np.full(n, "0.000005")}
    return Targets.from_columns(ra=rng.uniform(0.0, 360.0, n),
                                dec=np.degrees(np.arcsin(rng.uniform(-1.0, 1.0, n))),
                                extra=extra)


def timing_ratio(site) -> tuple[float, float]:
    """Seconds for TIMING_CYCLES observed mid times: (Epochpoint, astropy)."""
    rng = np.random.default_rng(7)
    bjd = Time(FIRST_NIGHT).tdb.jd + rng.uniform(0.0, 120.0, TIMING_CYCLES)
    coord = SkyCoord(ra=rng.uniform(0, 360, TIMING_CYCLES) * u.deg,
                     dec=np.degrees(np.arcsin(rng.uniform(-1, 1, TIMING_CYCLES))) * u.deg)
    direction = coord.cartesian.xyz.value
    loc = EarthLocation.from_geodetic(site.longitude * u.deg, site.latitude * u.deg,
                                      site.height * u.m)

    def ours():
        tt = tt_days_of(Time(bjd, format="jd", scale="tdb"))
        clock = BarycentricClock(site, tt.min() - 1.0, tt.max() + 1.0)
        return clock.observed_tt(bjd - 2451545.0, direction)

    def theirs():
        t = Time(bjd, format="jd", scale="tdb", location=loc)
        for _ in range(4):
            ltt = t.light_travel_time(coord, kind="barycentric", location=loc)
            t = Time(Time(bjd, format="jd", scale="tdb") - ltt, location=loc)
        return t

    best = []
    for func in (ours, theirs):
        func()
        runs = []
        for _ in range(2):
            start = time.perf_counter()
            func()
            runs.append(time.perf_counter() - start)
        best.append(min(runs))
    return best[0], best[1]


def main(n: int = 10000, nights: int = 120) -> None:
    warnings.simplefilter("ignore")
    site = read_site(str(DEMO_SITE))
    targets = random_systems(n)
    eph = event_ephemerides(targets)
    start = time.perf_counter()
    found = find_events(targets, eph, site, FIRST_NIGHT, nights)
    elapsed = time.perf_counter() - start
    counts = {k: int((found["observable"] == k).sum()) for k in ("full", "partial")}
    print(f"event search: {n} systems x {nights} nights in {elapsed:.1f} s; "
          f"{found.nrows} events listed ({counts['full']} full, {counts['partial']} partial)")
    ours, theirs = timing_ratio(site)
    print(f"mid-event timing, {TIMING_CYCLES} cycles: Epochpoint {ours * 1e3:.0f} ms, astropy "
          f"light_travel_time iterated {theirs * 1e3:.0f} ms, ratio {theirs / ours:.1f}")


if __name__ == "__main__":
    main(*(int(a) for a in sys.argv[1:3]))
