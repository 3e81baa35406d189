"""Search for a high-value observing order: construction by insertion, then ruin and recreate.

The problem is an orienteering problem with (multiple) time windows, NP-hard (Golden, Levy &
Vohra, Naval Research Logistics 34 (1987) 307-318, from memory), so the search is heuristic:

(1) Insertion (Vansteenwegen, Souffriau, Vanden Berghe & Van Oudheusden, Computers &
Operations Research 36 (2009) 3281-3290, from memory): repeatedly insert the target and
position with the best weight**alpha / shift, where shift is the time the insertion adds at that
point (slew in + wait + block + slew out - the slew it replaces). Every (target, position) pair
is checked at once with numpy from the earliest starts and latest arrivals of the order.

(2) Ruin and recreate (Schrimpf, Schneider, Stamm-Wilbrandt & Dueck, Journal of Computational
Physics 159 (2000) 139-171, from memory): remove a run of consecutive blocks or a random
handful, then refill by insertion with randomised scores, sometimes barring the removed
targets from a first pass. With one block removed this is the remove, relocate (it returns
elsewhere) and swap (another takes its place) move; larger ruins escape local optima. A
candidate becomes the current order when it is worth at least as much (now and then regardless);
after a run without improvement the search returns to the best order found.
"""
from __future__ import annotations

import math
import time

import numpy as np

from .schedule_model import NightProblem, earliest_starts, latest_arrivals

_ACCEPT_WORSE_PROBABILITY = 0.05
_RETURN_TO_BEST_AFTER = 50  # iterations without improvement
_RUIN_FRACTION = 0.3  # largest ruin, as a fraction of the order's length


class Order:
    """A feasible order with its earliest starts, latest arrivals, weight and total slew."""
    __slots__ = ("route", "starts", "latest", "weight", "slew_total_s")

    def __init__(self, problem: NightProblem, route, starts):
        rows = problem.slew_rows
        self.route, self.starts = route, starts
        self.latest = latest_arrivals(problem, route)
        self.weight = math.fsum(problem.weight[route])
        self.slew_total_s = math.fsum(rows[a][b] for a, b in zip([problem.n] + route, route))

    def key(self):
        """Higher is better: more weight, then less time spent slewing."""
        return (self.weight, -self.slew_total_s)


def evaluate(problem: NightProblem, route) -> Order | None:
    """The order with earliest-start timing, or None when it breaks a window."""
    starts = earliest_starts(problem, route)
    return None if starts is None else Order(problem, route, starts)


def _insertions(problem: NightProblem, order: Order, cand: np.ndarray):
    """Earliest start and shift (s) of every candidate (rows) at every position (columns:
    before block k, the last one after the final block); +inf where the insertion breaks a
    window of the candidate or of any later block."""
    slew = problem.slew_s
    before = np.array([problem.n] + order.route)
    after = np.array(order.route + [problem.n])  # index n: the end of the night
    free_s = np.concatenate(([0.0], np.add(order.starts, problem.duration_s[order.route])))
    latest_after_s = np.append(order.latest, np.inf)
    duration = problem.duration_s[cand][:, None]
    slew_out = slew[np.ix_(cand, after)]
    arrival_s = free_s + slew[np.ix_(before, cand)].T
    cap_s = latest_after_s - slew_out - duration
    start = np.full(arrival_s.shape, np.inf)
    for m in range(problem.win_open.shape[1]):
        candidate_s = np.maximum(arrival_s, problem.win_open[cand, m][:, None])
        fits = candidate_s <= np.minimum(problem.win_last_start[cand, m][:, None], cap_s)
        start = np.where(fits, np.minimum(start, candidate_s), start)
    shift = start + duration + slew_out - (free_s + slew[before, after])
    return start, shift


def recreate(problem, order, cand, deadline, rng=None, alpha=2.0, noise=0.0) -> Order:
    """Insert candidates one at a time, best score first, until none fits (or time is up)."""
    weight_term = problem.weight[cand] ** alpha
    while cand.size and time.perf_counter() < deadline:
        start, shift = _insertions(problem, order, cand)
        feasible = np.isfinite(start)
        fits_somewhere = feasible.any(axis=1)
        if not fits_somewhere.any():
            break
        factor = weight_term if not noise else \
            weight_term * rng.uniform(1.0 - noise, 1.0 + noise, weight_term.size)
        score = np.where(feasible, factor[:, None] / np.maximum(shift, 1e-9), -np.inf)
        row, position = divmod(int(np.argmax(score)), score.shape[1])
        route = order.route[:position] + [int(cand[row])] + order.route[position:]
        order = evaluate(problem, route) or order  # feasible by construction
        # A candidate that fits nowhere now never fits later (slews obey the triangle rule);
        # the inserted target's items (one per pier side) leave the candidates.
        fits_somewhere &= problem.group[cand] != problem.group[cand[row]]
        cand, weight_term = cand[fits_somewhere], weight_term[fits_somewhere]
    return order


def _outside(problem: NightProblem, pool: np.ndarray, route) -> np.ndarray:
    """The items of `pool` whose target is not in `route`."""
    free = np.ones(problem.n_targets, dtype=bool)
    free[problem.group[route]] = False
    return pool[free[problem.group[pool]]]


def _ruin(route, rng):
    """Remove a run of consecutive blocks or a random handful; return (kept, removed)."""
    largest = min(len(route), max(2, round(_RUIN_FRACTION * len(route))))
    size = int(rng.integers(1, largest + 1))
    if rng.random() < 0.5:
        first = int(rng.integers(0, len(route) - size + 1))
        removed = route[first:first + size]
    else:
        removed = [route[k] for k in rng.choice(len(route), size, replace=False)]
    gone = set(removed)
    return [j for j in route if j not in gone], removed


def improve(problem, best: Order, pool, deadline, seed, max_iterations, patience):
    """Ruin and recreate from `best`; returns (best order found, iterations run, the limit
    that stopped it: "iterations", "patience", "time" or "empty" for an empty order)."""
    rng = np.random.default_rng(seed)
    current, stall, iterations = best, 0, 0
    while True:
        if not current.route:
            return best, iterations, "empty"
        if iterations >= max_iterations:
            return best, iterations, "iterations"
        if stall >= patience:
            return best, iterations, "patience"
        if time.perf_counter() >= deadline:
            return best, iterations, "time"
        iterations += 1
        kept, removed = _ruin(current.route, rng)
        candidate = evaluate(problem, kept)
        if candidate is None:  # only with a slew table that breaks the triangle rule
            stall += 1
            continue
        alpha = (1.0, 2.0)[int(rng.integers(2))]
        noise = (0.0, 0.2, 0.5)[int(rng.integers(3))]
        if rng.random() < 0.5:  # first refill without the removed targets: forces a swap
            others = _outside(problem, pool, kept + removed)
            candidate = recreate(problem, candidate, others, deadline, rng, alpha, noise)
        rest = _outside(problem, pool, candidate.route)
        candidate = recreate(problem, candidate, rest, deadline, rng, alpha, noise)
        if candidate.key() > best.key():
            best, stall = candidate, 0
        else:
            stall += 1
        if candidate.weight >= current.weight or rng.random() < _ACCEPT_WORSE_PROBABILITY:
            current = candidate
        if stall and stall % _RETURN_TO_BEST_AFTER == 0:
            current = best
