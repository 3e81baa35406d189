"""The mount-frame stage's pier sides: the same side the scheduler always took.

Reference: the rule of mount firmware (common practice): a German mount slewed to hour angle
H takes the east side for a target east of the meridian, H in (-180, 0) deg once H is wrapped
to (-180, 180], and the west side otherwise. It is written out here with plain arithmetic;
hour angles are seeded random over many turns, plus the boundaries.
"""
import numpy as np
import pytest

from epochpoint.core import schedule_pier
from epochpoint.core.pointing_model import pier_side_for
from epochpoint.core.pointing_model.pier_sides import EAST, WEST, side_codes, side_signs


def _rule(ha_deg):
    wrapped = (np.asarray(ha_deg, dtype=float) + 180.0) % 360.0 - 180.0
    wrapped = np.where(wrapped == -180.0, 180.0, wrapped)
    return np.where(wrapped < 0.0, "east", "west")


def test_random_hour_angles_give_the_schedulers_side():
    rng = np.random.default_rng(20240611)
    ha = np.concatenate([rng.uniform(-1080.0, 1080.0, 50_000),
                         [0.0, -0.0, 180.0, -180.0, 360.0, -360.0, 1e-12, -1e-12, 540.0,
                          179.999999, -179.999999]])
    expected = _rule(ha)
    assert np.array_equal(pier_side_for(ha), expected)
    assert np.array_equal(schedule_pier.side_of(ha), np.where(expected == "east", EAST, WEST))
    # The scheduler's names are the stage's own.
    from epochpoint.core.pointing_model import pier_sides
    assert schedule_pier.axis_angles is pier_sides.axis_angles
    assert schedule_pier.side_of is pier_sides.side_of


def test_scalars_and_names():
    assert pier_side_for(-15.0) == "east" and isinstance(pier_side_for(-15.0), str)
    assert pier_side_for(0.0) == "west" and pier_side_for(200.0) == "east"
    assert list(side_codes(["East", " WEST ", "east"])) == [EAST, WEST, EAST]
    assert list(side_signs("west", (3,))) == [-1.0, -1.0, -1.0]
    assert list(side_codes(np.array([0, 1]))) == [EAST, WEST]
    for bad in (["east", "north"], ["", "west"], [None], [2]):
        with pytest.raises(ValueError, match="is not a pier side"):
            side_codes(bad)
