"""Order an observing night: choose and sequence target blocks to maximise the summed weight.

    weight = priority_weight(priority)              # 1 = highest ... 5 = lowest -> 16 ... 1
    plan = schedule(weight, duration_s, windows_s, night_end_s,
                    ra_deg=ra, dec_deg=dec, mount=Mount(settle_s=20.0, slew_rate_deg_s=2.0))
    for index, start_s, end_s, slew_s in plan.entries: ...
    for index, reason in plan.unscheduled: ...

`duration_s[i]` is exposure x repeats, observed in one piece inside ONE of the windows
`windows_s[i]` (a list of (start, end) seconds from the night's start, all constraints already
applied). Slews come from `ra_deg`, `dec_deg` and a `Mount` (schedule_slew.py), or
from `slew_s`: an (n + 1, n) table or a vectorised callable f(from_index, to_index), index n
meaning the park. The problem and its answer are in schedule_model.py, the greedy baseline in
schedule_greedy.py and the search in schedule_search.py.

Determinism: the search is bounded by iterations (`max_iterations`, default
MAX_ITERATIONS, and `patience` iterations without improvement) and draws its random choices
from a generator seeded by `seed`, so for a given input and seed the result is the same on any
machine under any load. `max_seconds` is only an upper limit; `Schedule.stopped_by` says which
limit ended the search ("iterations", "patience", "time", or "empty"), and only "time" means
another run may differ (still valid, never worse than greedy).
"""
from __future__ import annotations

import time

import numpy as np

from .schedule_greedy import greedy_order
from .schedule_model import (DISPLACED, NO_WINDOW, NO_WINDOW_LONG_ENOUGH, Entry, Schedule,
                             ScheduleInputError, Unscheduled, make_schedule, night_problem,
                             priority_weight)
from .schedule_pier import pier_problem
from .schedule_search import evaluate, improve, recreate
from .schedule_slew import Mount, slew_table_s

__all__ = ["schedule", "schedule_all", "candidate_pool", "greedy_schedule", "priority_weight", "Mount", "slew_table_s",
           "Schedule", "Entry", "Unscheduled", "ScheduleInputError", "NO_WINDOW",
           "NO_WINDOW_LONG_ENOUGH", "DISPLACED", "MAX_ITERATIONS", "STOP_REASONS",
           "default_iterations"]

# Ruin-and-recreate iterations by default: MAX_ITERATIONS on small nights (about 0.1 s on the
# demo), fewer on long lists so that iterations x items stays near ITEM_ITERATIONS (an
# iteration costs about items x order length), never below MIN_ITERATIONS. Measured: as many
# blocks and as much weight as the former 0.3 s budget on the demo and on 250 invented
# targets, and more on 10,000 (README, "Speed").
MAX_ITERATIONS = 300
MIN_ITERATIONS = 20
ITEM_ITERATIONS = 15_000
# What may end the search, as reported in Schedule.stopped_by.
STOP_REASONS = ("iterations", "patience", "time", "empty")


def _problem(weight, duration_s, windows_s, night_end_s, slew_s, ra_deg, dec_deg, mount):
    positions_given = ra_deg is not None or dec_deg is not None
    if positions_given and slew_s is not None:
        raise ScheduleInputError("slew_s", None, "give either slew_s or ra_deg/dec_deg, not both")
    if positions_given or mount is not None:
        if ra_deg is None or dec_deg is None or mount is None:
            raise ScheduleInputError("mount", None, "ra_deg, dec_deg and mount go together")
        n = np.asarray(weight).size
        for name, column in (("ra_deg", ra_deg), ("dec_deg", dec_deg)):
            values = np.asarray(column, dtype=float)
            if values.size != n or not np.all(np.isfinite(values)):
                raise ScheduleInputError(name, None, f"needs {n} finite values in degrees")
        if mount.german:
            return pier_problem(weight, duration_s, windows_s, night_end_s, ra_deg, dec_deg,
                                mount)
        slew_s = slew_table_s(ra_deg, dec_deg, mount)
    return night_problem(weight, duration_s, windows_s, night_end_s, slew_s)


def default_iterations(items: int) -> int:
    """The default iteration limit for a night of `items` targets (or pier-side items)."""
    return int(min(MAX_ITERATIONS, max(MIN_ITERATIONS, ITEM_ITERATIONS // max(items, 1))))


def greedy_schedule(weight, duration_s, windows_s, night_end_s, slew_s=None, *, ra_deg=None,
                    dec_deg=None, mount=None) -> Schedule:
    """The simple greedy baseline (schedule_greedy.py): highest weight first, each block at
    its earliest free time; blocks already placed never move."""
    started = time.perf_counter()
    problem = _problem(weight, duration_s, windows_s, night_end_s, slew_s, ra_deg, dec_deg, mount)
    route, starts = greedy_order(problem)
    return make_schedule(problem, route, starts, 0, time.perf_counter() - started)


# Long lists are cut to this many candidates per block the night can hold (at least
# MIN_CANDIDATES): a night holds ~100 blocks, and the slew table grows as the square.
CANDIDATES_PER_BLOCK = 4
MIN_CANDIDATES = 400


def candidate_pool(weight, duration_s, windows_s) -> np.ndarray | None:
    """For long lists, the indices worth offering to the search: the targets whose block fits
    a window, with the highest weights (then the least flexible windows), up to four times
    the number of blocks the night can hold. None when no cut is needed."""
    weight = np.asarray(weight, dtype=float)
    duration = np.asarray(duration_s, dtype=float)
    usable = np.array([sum(max(0.0, e - s) for s, e in w) for w in windows_s])
    fits = np.array([any(e - s >= d for s, e in w) for w, d in zip(windows_s, duration)],
                    dtype=bool)
    spans = [(s, e) for w in windows_s for s, e in w]
    night = (max(e for _, e in spans) - min(s for s, _ in spans)) if spans else 0.0
    fitting = np.flatnonzero(fits)
    if fitting.size <= MIN_CANDIDATES:
        return None
    capacity = night / max(float(np.median(duration[fitting])), 1.0)
    limit = max(MIN_CANDIDATES, int(CANDIDATES_PER_BLOCK * capacity))
    if fitting.size <= limit:
        return None
    order = np.lexsort((usable[fitting], -weight[fitting]))
    return np.sort(fitting[order[:limit]])


def schedule(weight, duration_s, windows_s, night_end_s, slew_s=None, *, ra_deg=None,
             dec_deg=None, mount=None, max_seconds=30.0, seed=0,
             max_iterations=None, patience=None) -> Schedule:
    """The best order found within the limits (see `schedule_all`).

    With positions and a mount, long lists are first cut to `candidate_pool` (a night holds
    about a hundred blocks); targets left out that fit a window are reported as displaced.
    """
    if ra_deg is None or slew_s is not None:
        return schedule_all(weight, duration_s, windows_s, night_end_s, slew_s, ra_deg=ra_deg,
                            dec_deg=dec_deg, mount=mount, max_seconds=max_seconds, seed=seed,
                            max_iterations=max_iterations, patience=patience)
    n = np.asarray(weight).size
    pool = candidate_pool(weight, duration_s, windows_s)
    if pool is None:
        return schedule_all(weight, duration_s, windows_s, night_end_s, ra_deg=ra_deg,
                            dec_deg=dec_deg, mount=mount, max_seconds=max_seconds, seed=seed,
                            max_iterations=max_iterations, patience=patience)
    pick = lambda column: np.asarray(column)[pool]  # noqa: E731
    sub = schedule_all(pick(weight), pick(duration_s), [windows_s[i] for i in pool],
                       night_end_s, ra_deg=pick(ra_deg), dec_deg=pick(dec_deg), mount=mount,
                       max_seconds=max_seconds, seed=seed, max_iterations=max_iterations,
                       patience=patience)
    chosen = set(pool[sub.index].tolist())
    duration = np.asarray(duration_s, dtype=float)
    unscheduled = tuple(Unscheduled(i, _alone_reason(windows_s[i], duration[i]))
                        for i in range(n) if i not in chosen)
    return Schedule(pool[sub.index], sub.start_s, sub.end_s, sub.slew_s, unscheduled,
                    sub.total_weight, sub.iterations, sub.elapsed_s, sub.seed, sub.stopped_by)


def _alone_reason(windows, duration: float) -> str:
    if not windows:
        return NO_WINDOW
    if not any(e - s >= duration for s, e in windows):
        return NO_WINDOW_LONG_ENOUGH
    return DISPLACED


def schedule_all(weight, duration_s, windows_s, night_end_s, slew_s=None, *, ra_deg=None,
                 dec_deg=None, mount=None, max_seconds=30.0, seed=0,
                 max_iterations=None, patience=None) -> Schedule:
    """The best order found within the limits.

    Starts from the better of the greedy baseline and two insertion passes (score weight /
    shift and weight**2 / shift), then ruins and recreates with a generator seeded by `seed`
    until `max_iterations` iterations (None: `default_iterations`), `patience` iterations
    without improvement (default 200 + 10 per schedulable target) or, as an upper limit only,
    `max_seconds` of wall time for the whole call (None: no limit). Every block starts as early as its order allows.
    Cost: one insertion pass is about (targets x order length x windows) numpy work per block
    placed; 500 targets take about a second (benchmarks/bench_schedule.py).
    """
    started = time.perf_counter()
    deadline = started + (max_seconds if max_seconds is not None else float("inf"))
    problem = _problem(weight, duration_s, windows_s, night_end_s, slew_s, ra_deg, dec_deg, mount)
    pool = np.array([i for i in range(problem.n) if problem.reason[i] is None], dtype=int)
    # The baseline's order retimed to earliest starts stays feasible: each start can only move
    # earlier, and an earlier arrival never makes a later block's start later.
    best = evaluate(problem, greedy_order(problem)[0])
    empty = evaluate(problem, [])
    for alpha in (1.0, 2.0):
        built = recreate(problem, empty, pool, deadline, alpha=alpha)
        if built.key() > best.key():
            best = built
    if patience is None:
        patience = 200 + 10 * pool.size
    best, iterations, stopped_by = improve(
        problem, best, pool, deadline, seed,
        max_iterations if max_iterations is not None else default_iterations(problem.n),
        patience)
    return make_schedule(problem, best.route, best.starts, iterations,
                         time.perf_counter() - started, seed, stopped_by)
