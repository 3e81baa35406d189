"""DE421's valid span is enforced with a one-line error, and the ephemeris is read only when
a body row is present."""
import subprocess
import sys

import pytest
from astropy.time import Time

from epochpoint.core.bodies.ephemeris import EphemerisRangeError, barycentric_position

from .body_helpers import planet_targets, positions_module


def test_outside_1900_2050_is_refused_in_one_line():
    with pytest.raises(EphemerisRangeError) as err:
        positions_module.positions(planet_targets(["mars"]), None,
                                   Time("2060-01-01T00:00:00", scale="utc"))
    assert "\n" not in str(err.value) and "1900-01-01 to 2050-12-31" in str(err.value)
    with pytest.raises(EphemerisRangeError):
        barycentric_position("moon", 2400000.5)


def test_star_positions_do_not_load_the_ephemeris():
    code = ("import importlib, sys; from epochpoint.core.targets import Targets;"
            "P = importlib.import_module('epochpoint.core.positions');"
            "P.positions(Targets.from_columns(ra=[1.0], dec=[2.0]), None, '2024-01-01T00:00:00Z');"
            "print('jplephem' in sys.modules, 'de421' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert out.stdout.strip() == "False False", out.stderr
