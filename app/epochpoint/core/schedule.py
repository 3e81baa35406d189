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

Determinism: for a given input, `seed` and iteration limits the result is the same every time,
as long as the `max_seconds` budget is not what stopped the search (small and medium nights stop
on `patience` first). When the budget stops it, the best order found so far is returned, so a
slower machine may return a different (still valid, never worse than greedy) schedule.
"""
from __future__ import annotations

import time

import numpy as np

from .schedule_greedy import greedy_order
from .schedule_model import (DISPLACED, NO_WINDOW, NO_WINDOW_LONG_ENOUGH, Entry, Schedule,
                             ScheduleInputError, Unscheduled, make_schedule, night_problem,
                             priority_weight)
from .schedule_search import evaluate, improve, recreate
from .schedule_slew import Mount, slew_table_s

__all__ = ["schedule", "greedy_schedule", "priority_weight", "Mount", "slew_table_s",
           "Schedule", "Entry", "Unscheduled", "ScheduleInputError", "NO_WINDOW",
           "NO_WINDOW_LONG_ENOUGH", "DISPLACED"]


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
        slew_s = slew_table_s(ra_deg, dec_deg, mount)
    return night_problem(weight, duration_s, windows_s, night_end_s, slew_s)


def greedy_schedule(weight, duration_s, windows_s, night_end_s, slew_s=None, *, ra_deg=None,
                    dec_deg=None, mount=None) -> Schedule:
    """The simple greedy baseline (schedule_greedy.py): highest weight first, each block at
    its earliest free time; blocks already placed never move."""
    started = time.perf_counter()
    problem = _problem(weight, duration_s, windows_s, night_end_s, slew_s, ra_deg, dec_deg, mount)
    route, starts = greedy_order(problem)
    return make_schedule(problem, route, starts, 0, time.perf_counter() - started)


def schedule(weight, duration_s, windows_s, night_end_s, slew_s=None, *, ra_deg=None,
             dec_deg=None, mount=None, max_seconds=1.0, seed=0, max_iterations=None,
             patience=None) -> Schedule:
    """The best order found within `max_seconds` (wall time of the whole call).

    Starts from the better of the greedy baseline and two insertion passes (score weight /
    shift and weight**2 / shift), then ruins and recreates with a generator seeded by `seed`
    until `max_seconds`, `max_iterations` or `patience` iterations without improvement
    (default 200 + 10 per schedulable target). Every block starts as early as its order allows.
    Cost: one insertion pass is about (targets x order length x windows) numpy work per block
    placed; 500 targets take about a second (benchmarks/bench_schedule.py).
    """
    started = time.perf_counter()
    deadline = started + max_seconds
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
    best, iterations = improve(problem, best, pool, deadline, seed,
                               max_iterations if max_iterations is not None else 10**9, patience)
    return make_schedule(problem, best.route, best.starts, iterations,
                         time.perf_counter() - started)
