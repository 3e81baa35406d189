"""Timed events in the night plan: reserved blocks stay intact, the scheduler never overlaps
them, and a collision is won by the higher priority (properties of the plan; the event times
themselves are checked against astropy in test_event_timing.py)."""
import datetime as dt
import warnings

import numpy as np
import pytest
from astropy.time import Time

from epochpoint.core.plan import plan
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.io.eventfields import event_ephemerides

SITE = Site(latitude=-30.2, longitude=-70.7, height=2200.0)
NIGHT = "2027-03-01"
SEED = 314


@pytest.fixture(autouse=True)
def _quiet():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        yield


def _targets():
    rng = np.random.default_rng(SEED)
    n = 40
    mid = Time("2027-03-02T05:00:00", scale="utc").tdb.jd
    ra = np.concatenate(([163.0, 170.0], rng.uniform(90.0, 250.0, n)))
    dec = np.concatenate(([-30.0, -25.0], rng.uniform(-60.0, 10.0, n)))
    blank = [""] * n
    extra = {"event_epoch": [f"{mid - 3.7 * 40:.6f}", f"{mid + 20 / 1440 - 5.1 * 30:.6f}"] + blank,
             "event_period": ["3.7", "5.1"] + blank, "event_duration": ["3", "2.5"] + blank,
             "event_kind": ["transit", "primary eclipse"] + blank,
             "priority": ["1", "2"] + ["3"] * n, "exposure": ["600"] * (n + 2)}
    names = ["Keystone", "Lantern"] + [f"F{i}" for i in range(n)]
    return Targets.from_columns(ra=ra, dec=dec, name=names, extra=extra)


def _utc(text):
    return dt.datetime.fromisoformat(text.rstrip("Z"))


def test_fixed_blocks_are_kept_and_never_overlapped():
    """The higher-priority event gets its block (baseline included) marked fixed; the other,
    overlapping it, is reported as a collision; no other block overlaps a fixed one."""
    targets = _targets()
    result = plan(targets, SITE, NIGHT, events=event_ephemerides(targets))
    data = result.to_json()
    fixed = [e for e in data["schedule"] if e.get("fixed")]
    others = [e for e in data["schedule"] if not e.get("fixed")]
    assert [e["name"] for e in fixed] == ["Keystone"]
    block = fixed[0]
    # 3 h event + 30 min baseline either side.
    assert (_utc(block["end"]) - _utc(block["start"])).total_seconds() == pytest.approx(
        4.0 * 3600.0, abs=1.0)
    assert data["collisions"] and data["collisions"][0]["name"] == "Lantern"
    assert data["collisions"][0]["lost_to"] == "Keystone"
    assert len(others) > 5
    for entry in others:
        assert entry["name"] not in ("Keystone", "Lantern")
        assert (_utc(entry["end"]) <= _utc(block["start"])
                or _utc(entry["start"]) >= _utc(block["end"])), entry
    starts = [e["start"] for e in data["schedule"]]
    assert starts == sorted(starts)


def test_plan_without_events_is_unchanged():
    """Without event ephemerides the plan has no fixed blocks and no collisions."""
    targets = _targets()
    data = plan(targets, SITE, NIGHT).to_json()
    assert not any(e.get("fixed") for e in data["schedule"])
    assert data["collisions"] == []
