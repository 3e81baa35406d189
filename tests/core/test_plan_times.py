"""Plan instants as ISO text: the fast numpy path equals astropy's, leap seconds included.

The leap second at the end of 2016-12-31 is from IERS Bulletin C 52 (common practice)."""
import warnings

import numpy as np
import pytest

import epochpoint as ep
from epochpoint.core.plan import plan

SITE = ep.Site(latitude=-28.47, longitude=-67.29, height=2870.0,
               timezone="America/Argentina/Catamarca")
TARGETS = ep.Targets.from_columns(ra=[10.0, 200.0], dec=[-30.0, -60.0])


@pytest.mark.parametrize("night, leap", [("2027-01-19", False), ("2016-12-31", True)])
def test_iso_many_matches_astropy(night, leap):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        p = plan(TARGETS, SITE, night, max_seconds=0.05)
    assert p._leap_second_inside() is leap
    offsets = np.array([0.0, 1234.5678, 40000.0, 80000.0, np.nan])
    assert p.iso_many(offsets) == [p.iso(x) for x in offsets]
