"""The night scheduler: every schedule honours windows and slews, beats or equals the greedy
baseline, and finds the optimum of small nights.

Expectations come from outside the code under test: the slew rule stated in the task
(settle + largest axis travel / rate, both axes at once: common practice for equatorial
mounts), hand-worked scenarios, and an exhaustive search over every order of every subset
written here independently. All targets, windows and nights are invented.
"""
import itertools

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from epochpoint.core.schedule import (DISPLACED, NO_WINDOW, NO_WINDOW_LONG_ENOUGH, Mount,
                                      ScheduleInputError, greedy_schedule, priority_weight,
                                      schedule, slew_table_s)

HOUR_S = 3600.0
TOLERANCE_S = 1e-6
MOUNT = Mount(settle_s=20.0, slew_rate_deg_s=2.0)


def slew_rule_s(ra_a, dec_a, ra_b, dec_b, mount):
    """The task's slew rule, written out independently of the code under test."""
    d_ra = abs(ra_b - ra_a) % 360.0
    d_ra = min(d_ra, 360.0 - d_ra)
    return mount.settle_s + max(d_ra, abs(dec_b - dec_a)) / mount.slew_rate_deg_s


def first_slew_s(j, ra, dec, mount):
    if mount.park_ra_deg is None:
        return mount.settle_s
    return slew_rule_s(mount.park_ra_deg, mount.park_dec_deg, ra[j], dec[j], mount)


def assert_valid(plan, weight, duration, windows, night_end, ra, dec, mount):
    """Every block inside one window of its target and inside the night; blocks in order,
    apart by at least the slew; every target accounted for once with the right reason."""
    previous, free_s = None, 0.0
    for index, start, end, slew in plan.entries:
        assert end - start == pytest.approx(duration[index], abs=TOLERANCE_S)
        assert 0.0 <= start and end <= night_end + TOLERANCE_S
        assert any(a - TOLERANCE_S <= start and end <= b + TOLERANCE_S
                   for a, b in windows[index]), (index, start, end, windows[index])
        expected_slew = (first_slew_s(index, ra, dec, mount) if previous is None
                         else slew_rule_s(ra[previous], dec[previous], ra[index], dec[index],
                                          mount))
        assert slew == pytest.approx(expected_slew, abs=TOLERANCE_S)
        assert start - free_s >= expected_slew - TOLERANCE_S
        previous, free_s = index, end
    scheduled = [e.index for e in plan.entries]
    left = {u.index: u.reason for u in plan.unscheduled}
    assert sorted(scheduled + list(left)) == list(range(len(weight)))
    assert plan.total_weight == pytest.approx(sum(weight[i] for i in scheduled))
    for i, reason in left.items():
        in_night = [(max(a, 0.0), min(b, night_end)) for a, b in windows[i]
                    if min(b, night_end) > max(a, 0.0)]
        if not in_night:
            assert reason == NO_WINDOW
        elif not any(max(a, first_slew_s(i, ra, dec, mount)) + duration[i] <= b
                     for a, b in in_night):
            assert reason == NO_WINDOW_LONG_ENOUGH
        else:
            assert reason == DISPLACED


def exhaustive_best(weight, duration, windows, night_end, slew_from_to):
    """The optimum by brute force: every order of every subset, each block at its earliest
    start (a later start never helps a later block)."""
    n = len(weight)

    def feasible(order):
        free_s, previous = 0.0, n
        for j in order:
            arrival = free_s + slew_from_to(previous, j)
            starts = [max(arrival, a) for a, b in windows[j]
                      if max(arrival, a) + duration[j] <= min(b, night_end)]
            if not starts:
                return False
            free_s, previous = min(starts) + duration[j], j
        return True

    best = 0.0
    for size in range(1, n + 1):
        for order in itertools.permutations(range(n), size):
            value = sum(weight[j] for j in order)
            if value > best and feasible(order):
                best = value
    return best


@st.composite
def small_nights(draw):
    n = draw(st.integers(1, 7))
    night_end = draw(st.floats(1.0 * HOUR_S, 6.0 * HOUR_S))
    seconds = st.floats(-0.5 * HOUR_S, 6.5 * HOUR_S)
    windows = []
    for _ in range(n):
        pairs = draw(st.lists(st.tuples(seconds, st.floats(0.0, 3.0 * HOUR_S)), max_size=3))
        windows.append([(a, a + length) for a, length in pairs])
    park = draw(st.one_of(st.none(), st.tuples(st.floats(0.0, 360.0), st.floats(-30.0, 90.0))))
    mount = Mount(settle_s=draw(st.floats(0.0, 60.0)), slew_rate_deg_s=draw(st.floats(0.2, 5.0)),
                  park_ra_deg=park and park[0], park_dec_deg=park and park[1])
    return dict(
        weight=draw(st.lists(st.integers(1, 16), min_size=n, max_size=n)),
        duration=draw(st.lists(st.floats(60.0, 2.0 * HOUR_S), min_size=n, max_size=n)),
        windows=windows, night_end=night_end, mount=mount,
        ra=draw(st.lists(st.floats(0.0, 359.9), min_size=n, max_size=n)),
        dec=draw(st.lists(st.floats(-60.0, 89.0), min_size=n, max_size=n)))


@settings(max_examples=150, deadline=None, derandomize=True)
@given(small_nights())
def test_schedules_honour_windows_and_slews_and_equal_or_beat_greedy(night):
    args = (night["weight"], night["duration"], night["windows"], night["night_end"])
    where = dict(ra_deg=night["ra"], dec_deg=night["dec"], mount=night["mount"])
    plan = schedule(*args, **where, max_iterations=40)
    baseline = greedy_schedule(*args, **where)
    for result in (plan, baseline):
        assert_valid(result, night["weight"], night["duration"], night["windows"],
                     night["night_end"], night["ra"], night["dec"], night["mount"])
    assert plan.total_weight >= baseline.total_weight


def random_night(rng, n, night_end, windows_per_target=(1, 3)):
    """An invented night: random weights, blocks, windows and sky positions."""
    weight = rng.integers(1, 17, n).astype(float)
    duration = rng.uniform(0.2 * HOUR_S, 1.2 * HOUR_S, n)
    windows = []
    for _ in range(n):
        opens = rng.uniform(-0.5 * HOUR_S, night_end, rng.integers(*windows_per_target))
        windows.append([(a, a + rng.uniform(0.5 * HOUR_S, 2.5 * HOUR_S)) for a in opens])
    return weight, duration, windows, rng.uniform(0.0, 360.0, n), rng.uniform(-60.0, 80.0, n)


def test_optimal_on_thirty_small_nights_against_exhaustive_search():
    mount = Mount(settle_s=30.0, slew_rate_deg_s=0.5)
    night_end = 4.0 * HOUR_S
    misses = []
    for trial in range(30):
        rng = np.random.default_rng(1000 + trial)
        weight, duration, windows, ra, dec = random_night(rng, 6, night_end)

        def slew_from_to(a, b):
            if a == len(weight):
                return mount.settle_s  # no park: the first block pays the settle alone
            return slew_rule_s(ra[a], dec[a], ra[b], dec[b], mount)

        best = exhaustive_best(weight, duration, windows, night_end, slew_from_to)
        found = schedule(weight, duration, windows, night_end, ra_deg=ra, dec_deg=dec,
                         mount=mount).total_weight
        if found != best:
            misses.append((trial, found, best))
    assert misses == [], f"not optimal on {len(misses)} of 30 nights: {misses}"


def test_at_least_greedy_on_an_invented_night_of_forty_targets():
    # Invented: 40 targets over an 8-hour night, two windows each at most.
    for seed in (7, 8, 9):
        rng = np.random.default_rng(seed)
        weight, duration, windows, ra, dec = random_night(rng, 40, 8.0 * HOUR_S)
        args = (weight, duration, windows, 8.0 * HOUR_S)
        plan = schedule(*args, ra_deg=ra, dec_deg=dec, mount=MOUNT, max_seconds=0.5)
        baseline = greedy_schedule(*args, ra_deg=ra, dec_deg=dec, mount=MOUNT)
        assert_valid(plan, weight, duration, windows, 8.0 * HOUR_S, ra, dec, MOUNT)
        assert plan.total_weight >= baseline.total_weight


def test_two_short_blocks_beat_one_long_block_that_greedy_takes():
    # Worked by hand. A (weight 8) needs 4 h in its only window 0.5-4.5 h; B and C (5 each)
    # need 1.5 h in 0-2 h and 3-5 h. Greedy places A at 0.5 h, after which neither B nor C
    # fits: 8. B then C is feasible (the 20-30 s slews fit easily) and A fits with neither: 10.
    args = ([8.0, 5.0, 5.0], [4 * HOUR_S, 1.5 * HOUR_S, 1.5 * HOUR_S],
            [[(0.5 * HOUR_S, 4.5 * HOUR_S)], [(0.0, 2 * HOUR_S)], [(3 * HOUR_S, 5 * HOUR_S)]],
            5 * HOUR_S)
    where = dict(ra_deg=[10.0, 20.0, 30.0], dec_deg=[0.0, 10.0, -10.0], mount=MOUNT)
    assert greedy_schedule(*args, **where).total_weight == 8.0
    plan = schedule(*args, **where)
    assert plan.total_weight == 10.0
    assert [e.index for e in plan.entries] == [1, 2]
    assert plan.unscheduled[0] == (0, DISPLACED)


def test_narrow_window_target_goes_first_instead_of_being_blocked():
    # Worked by hand. A (weight 10, 2 h) may go anywhere in 0-6 h; B (weight 4, 1 h) only in
    # 0-1.5 h. Greedy puts A at its earliest (after the 20 s settle) and B no longer fits: 10.
    # B first, then A after a slew of 20 s + 30 deg / 2 deg/s = 35 s: 14.
    args = ([10.0, 4.0], [2 * HOUR_S, 1 * HOUR_S], [[(0.0, 6 * HOUR_S)], [(0.0, 1.5 * HOUR_S)]],
            6 * HOUR_S)
    where = dict(ra_deg=[100.0, 130.0], dec_deg=[20.0, 20.0], mount=MOUNT)
    assert greedy_schedule(*args, **where).total_weight == 10.0
    plan = schedule(*args, **where)
    assert plan.total_weight == 14.0
    assert [(e.index, e.start_s) for e in plan.entries] == [(1, 20.0), (0, HOUR_S + 20.0 + 35.0)]


def test_reasons_for_targets_left_out():
    night_end = 2 * HOUR_S
    windows = [[], [(0.0, 600.0)], [(3 * HOUR_S, 4 * HOUR_S)], [(0.0, night_end)],
               [(0.0, night_end)]]
    plan = schedule([1.0, 1.0, 1.0, 1.0, 4.0], [900.0, 900.0, 900.0, 1.5 * HOUR_S, 1.5 * HOUR_S],
                    windows, night_end)
    assert dict(plan.unscheduled) == {0: NO_WINDOW, 1: NO_WINDOW_LONG_ENOUGH,
                                      2: NO_WINDOW, 3: DISPLACED}
    assert [e.index for e in plan.entries] == [4]


def test_slew_table_follows_the_slew_rule():
    # Worked by hand: RA 350 -> 10 deg is 20 deg across 0 h, not 340; dec 0 -> 5 deg.
    mount = Mount(settle_s=15.0, slew_rate_deg_s=2.0, park_ra_deg=0.0, park_dec_deg=90.0)
    table = slew_table_s([350.0, 10.0], [0.0, 5.0], mount)
    assert table[0, 1] == pytest.approx(15.0 + 20.0 / 2.0)
    assert table[1, 0] == pytest.approx(15.0 + 20.0 / 2.0)
    assert table[2, 0] == pytest.approx(15.0 + 90.0 / 2.0)  # park at the pole: dec axis rules
    assert table[2, 1] == pytest.approx(15.0 + 85.0 / 2.0)
    assert np.all(table[:, 2] == 0.0)  # to the end of the night


def test_a_callable_or_a_table_gives_the_same_schedule_as_positions():
    rng = np.random.default_rng(3)
    weight, duration, windows, ra, dec = random_night(rng, 12, 5 * HOUR_S)
    args = (weight, duration, windows, 5 * HOUR_S)
    by_position = schedule(*args, ra_deg=ra, dec_deg=dec, mount=MOUNT, max_iterations=50)
    table = slew_table_s(ra, dec, MOUNT)[:, :12]
    by_table = schedule(*args, table, max_iterations=50)
    by_callable = schedule(*args, lambda a, b: table[a, b], max_iterations=50)
    for other in (by_table, by_callable):
        assert other.entries == by_position.entries


def test_same_input_and_seed_give_the_same_schedule():
    rng = np.random.default_rng(11)
    weight, duration, windows, ra, dec = random_night(rng, 60, 8 * HOUR_S)
    args = (weight, duration, windows, 8 * HOUR_S)
    runs = [schedule(*args, ra_deg=ra, dec_deg=dec, mount=MOUNT, max_seconds=60.0,
                     max_iterations=60, seed=5) for _ in range(2)]
    assert runs[0].iterations == 60
    assert runs[0].entries == runs[1].entries


def test_priority_weight_doubles_per_step():
    # The task's rule: weight = 2 ** (5 - priority).
    assert [priority_weight(p) for p in (1, 2, 3, 4, 5)] == [16.0, 8.0, 4.0, 2.0, 1.0]
    assert list(priority_weight(np.array([5, 1]))) == [1.0, 16.0]
    for bad in (0, 6, 2.5):
        with pytest.raises(ScheduleInputError, match="priority"):
            priority_weight(bad)
    with pytest.raises(ScheduleInputError, match="target 2, priority"):
        priority_weight([1, 7])


@pytest.mark.parametrize("weight, duration, windows, night_end, message", [
    ([1.0, -2.0], [60.0, 60.0], [[], []], 3600.0, "target 2, weight"),
    ([1.0, 2.0], [60.0, float("nan")], [[], []], 3600.0, "target 2, duration_s"),
    ([1.0, 2.0], [60.0, 60.0], [[], [(100.0, 50.0)]], 3600.0, "target 2, windows_s"),
    ([1.0, 2.0], [60.0, 60.0], [[]], 3600.0, "windows_s: has 1 lists for 2 targets"),
    ([1.0], [60.0], [[(0.0, 1.0, 2.0)]], 3600.0, "target 1, windows_s"),
    ([1.0], [60.0], [[]], 0.0, "night_end_s"),
])
def test_bad_input_names_the_target_and_argument(weight, duration, windows, night_end, message):
    with pytest.raises(ScheduleInputError, match=message):
        schedule(weight, duration, windows, night_end)


def test_bad_slew_input_is_reported():
    with pytest.raises(ScheduleInputError, match="slew_s: shape"):
        schedule([1.0], [60.0], [[(0.0, 100.0)]], 3600.0, np.zeros((1, 1)))
    with pytest.raises(ScheduleInputError, match="mount"):
        schedule([1.0], [60.0], [[(0.0, 100.0)]], 3600.0, ra_deg=[0.0], dec_deg=[0.0])
    with pytest.raises(ScheduleInputError, match="slew_rate_deg_s"):
        Mount(settle_s=10.0, slew_rate_deg_s=0.0)
    with pytest.raises(ScheduleInputError, match="park"):
        Mount(settle_s=10.0, slew_rate_deg_s=1.0, park_ra_deg=0.0)


def test_empty_and_hopeless_nights():
    empty = schedule([], [], [], 3600.0)
    assert empty.entries == () and empty.unscheduled == () and empty.total_weight == 0.0
    hopeless = schedule([1.0, 2.0], [100.0, 100.0], [[], [(0.0, 50.0)]], 3600.0)
    assert hopeless.entries == ()
    assert hopeless.unscheduled == ((0, NO_WINDOW), (1, NO_WINDOW_LONG_ENOUGH))


def test_latest_arrivals_are_the_last_moments_that_keep_the_order_feasible():
    # The slack behind every insertion check: arriving at block k by latest[k] keeps the rest
    # of the order feasible and arriving 1 ms later does not (checked by simulating the rest
    # of the order, written out here; probed 1 us early to stay clear of rounding).
    from epochpoint.core.schedule_model import latest_arrivals, night_problem
    from epochpoint.core.schedule_search import evaluate

    def rest_feasible(order, k, arrival, duration, windows, night_end, ra, dec):
        free_s = None
        for previous, j in zip([None] + order[k:], order[k:]):
            if free_s is not None:
                arrival = free_s + slew_rule_s(ra[previous], dec[previous], ra[j], dec[j], MOUNT)
            starts = [max(arrival, a) for a, b in windows[j]
                      if max(arrival, a) + duration[j] <= min(b, night_end)]
            if not starts:
                return False
            free_s = min(starts) + duration[j]
        return True

    checked = 0
    for trial in range(40):
        rng = np.random.default_rng(500 + trial)
        weight, duration, windows, ra, dec = random_night(rng, 6, 4 * HOUR_S, (1, 4))
        problem = night_problem(weight, duration, windows, 4 * HOUR_S,
                                slew_table_s(ra, dec, MOUNT))
        # A feasible order to probe: the scheduler's own (its optimality is tested elsewhere).
        plan = schedule(weight, duration, windows, 4 * HOUR_S, ra_deg=ra, dec_deg=dec,
                        mount=MOUNT, max_iterations=20)
        order = evaluate(problem, [int(j) for j in plan.index])
        latest = latest_arrivals(problem, order.route)
        night = (duration, windows, 4 * HOUR_S, ra, dec)
        for k in range(len(order.route)):
            assert rest_feasible(order.route, k, latest[k] - 1e-6, *night)
            assert not rest_feasible(order.route, k, latest[k] + 1e-3, *night)
            checked += 1
    assert checked >= 80


def test_a_block_exactly_as_long_as_its_window_fits_despite_rounding():
    # Found by hypothesis: a window exactly as long as the block, and a settle time so small
    # that start + duration rounds to the window's end, must still take the block.
    plan = schedule([1.0], [60.0], [[(0.0, 60.0)]], 3600.0, slew_s=np.full((2, 1), 2e-176))
    assert list(plan.index) == [0]
