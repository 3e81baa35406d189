"""Moving scheduled blocks towards transit keeps the schedule valid (invented small nights)."""
import numpy as np
from hypothesis import given, settings, strategies as st

from epochpoint.core.plan import centre_on_transit
from epochpoint.core.schedule import schedule


def test_single_block_is_centred_on_transit():
    order = schedule([1.0], [600.0], [[(0.0, 10_000.0)]], 20_000.0)
    moved = centre_on_transit(order, [[(0.0, 10_000.0)]], np.array([5_000.0]))
    assert moved.start_s[0] == 4_700.0 and moved.end_s[0] == 5_300.0


def test_block_never_moves_past_its_window_or_earlier():
    order = schedule([1.0], [600.0], [[(0.0, 3_000.0)]], 20_000.0)
    moved = centre_on_transit(order, [[(0.0, 3_000.0)]], np.array([9_000.0]))
    assert moved.end_s[0] == 3_000.0
    moved = centre_on_transit(order, [[(0.0, 3_000.0)]], np.array([-9_000.0]))
    assert moved.start_s[0] == order.start_s[0]


@settings(max_examples=60, deadline=None)
@given(st.integers(min_value=0, max_value=10_000))
def test_random_nights_stay_valid(seed):
    rng = np.random.default_rng(seed)
    n = 8
    starts = rng.uniform(0, 30_000, n)
    windows = [[(s, s + rng.uniform(1_000, 15_000))] for s in starts]
    duration = rng.uniform(300, 2_000, n)
    slew = np.full((n + 1, n), 60.0)
    order = schedule(np.ones(n), duration, windows, 50_000.0, slew_s=slew, max_seconds=0.2)
    transit = rng.uniform(0, 50_000, n)
    moved = centre_on_transit(order, windows, transit)
    assert np.all(moved.start_s >= order.start_s - 1e-9)
    for k, i in enumerate(moved.index):
        (w_start, w_end), = windows[i]
        assert w_start - 1e-6 <= moved.start_s[k] and moved.end_s[k] <= w_end + 1e-6
        if k:
            assert moved.start_s[k] - moved.end_s[k - 1] >= moved.slew_s[k] - 1e-6
