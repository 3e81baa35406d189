"""The schedule search is bounded by iterations and a seed, not by the machine's speed.

A plan must come out the same on a fast idle machine and a slow loaded one: the search stops
after a number of iterations drawn from a seeded generator, and wall time is only an upper
limit, reported when it is what stopped the search.
"""
import time

import numpy as np

from epochpoint.core import schedule_search
from epochpoint.core.plan import plan
from epochpoint.core.schedule import MAX_ITERATIONS, Mount, schedule
from epochpoint.io import read_site, read_targets

from plan_cli import DEMO_SITE, DEMO_TARGETS, plan_json, run_cli

HOUR_S = 3600.0
MOUNT = Mount(settle_s=20.0, slew_rate_deg_s=2.0)


class SlowClock:
    """A stand-in for the time module whose clock runs `factor` times faster than the real
    one: to the search, this machine then looks `factor` times slower (or loaded)."""

    def __init__(self, factor: float):
        self.factor, self.origin = factor, time.perf_counter()

    def perf_counter(self):
        return self.origin + self.factor * (time.perf_counter() - self.origin)


def invented_night(seed: int, n: int):
    """Invented targets: weights, block lengths, one or two windows each, positions."""
    rng = np.random.default_rng(seed)
    weight = 2.0 ** rng.integers(0, 5, n)
    duration = rng.choice([600.0, 900.0, 1200.0, 1800.0], n)
    windows = []
    for _ in range(n):
        start = rng.uniform(0.0, 6 * HOUR_S)
        windows.append([(start, min(8 * HOUR_S, start + rng.uniform(0.5, 3.0) * HOUR_S))])
    return weight, duration, windows, rng.uniform(0, 360, n), rng.uniform(-60, 60, n)


def test_a_slowed_down_run_gives_the_same_schedule(monkeypatch):
    # With the former 1 s budget the slowed run stopped after 83 of 300 iterations and
    # returned another order (364 against 368).
    weight, duration, windows, ra, dec = invented_night(21, 150)
    args = (weight, duration, windows, 8 * HOUR_S)
    where = dict(ra_deg=ra, dec_deg=dec, mount=MOUNT, seed=4, max_iterations=MAX_ITERATIONS)
    fast = schedule(*args, **where)
    # A machine twenty times slower than this one (or as loaded).
    monkeypatch.setattr(schedule_search, "time", SlowClock(20.0))
    slow = schedule(*args, **where)
    assert fast.stopped_by == slow.stopped_by == "iterations"
    assert fast.iterations == slow.iterations == MAX_ITERATIONS
    assert slow.entries == fast.entries
    assert slow.total_weight == fast.total_weight


def test_a_time_limit_that_stops_the_search_is_reported():
    weight, duration, windows, ra, dec = invented_night(22, 40)
    order = schedule(weight, duration, windows, 8 * HOUR_S, ra_deg=ra, dec_deg=dec,
                     mount=MOUNT, max_seconds=0.0)
    assert order.stopped_by == "time"


def test_the_plan_names_its_seed_and_the_limit_that_stopped_it(capsys):
    data = plan_json(capsys, DEMO_TARGETS, "--site", DEMO_SITE, "--night", "2026-03-18",
                     "--seed", "3", "--schedule-iterations", "20")
    assert data["search"] == {"iterations": 20, "seed": 3, "stopped_by": "iterations"}
    again = plan_json(capsys, DEMO_TARGETS, "--site", DEMO_SITE, "--night", "2026-03-18",
                      "--seed", "3", "--schedule-iterations", "20")
    assert again["schedule"] == data["schedule"]
    code, out, _ = run_cli(capsys, "plan", DEMO_TARGETS, "--site", DEMO_SITE, "--night",
                           "2026-03-18", "--schedule-seconds", "0")
    assert code == 0
    assert "Search: 0 iterations with seed 0, stopped by its time limit" in out
    code, _, err = run_cli(capsys, "plan", DEMO_TARGETS, "--site", DEMO_SITE, "--night",
                           "2026-03-18", "--seed", "-1")
    assert code == 2 and "seed" in err and "Traceback" not in err


def test_the_default_plan_is_bounded_by_iterations():
    result = plan(read_targets(DEMO_TARGETS), read_site(DEMO_SITE), "2026-03-18")
    assert result.schedule.stopped_by in ("iterations", "patience")
